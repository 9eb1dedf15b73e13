"""The HTML reports in a real browser (issue 15): headless Chromium, driven over the DevTools pipe.

Each report (``fly``, ``fly`` with the stability, deployments and landing keys, ``match``, ``reduce`` of a
series and of one firing) is loaded once; the measurements are then checked one property per test:

* the page loads with no console error and asks for nothing but itself over the network;
* printed on A4 and on Letter paper it has at most two pages (``/Type /Page`` objects in the PDF);
* at 390 px and 1280 px wide nothing overflows horizontally;
* every chart has a text alternative (a flight that never leaves the rail still has its thrust curve) (``role="img"`` with an ``aria-label``, or a ``<title>``);
* every chart has data ink in its plot area in a screenshot, and the measure itself sees an empty chart as
  empty (a control page).

Without Chromium the tests skip and say how to install it; under ``.ci/run`` (``CI_BROWSER_REQUIRED=1``) a
missing browser is a failure. The whole module takes about 15 s here.
"""

from __future__ import annotations

import io
import os
import re
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from click.testing import CliRunner

from motorlib.cli.main import main
from motorlib.present import palette
from motorlib.present.report import ChartBlock, Facts, MatchReport, TableBlock, Trace, render_html
from motorlib.present.svgcharts import SvgChart

from ..conftest import SAMPLE_DIR
from .browser import Browser, find_chromium

AIRFRAME = SAMPLE_DIR / "airframes" / "quibble-41.toml"
A4_IN = (8.27, 11.69)
LETTER_IN = (8.5, 11.0)
MIN_INK_FRACTION = 0.004  # of the plot area: a drawn curve or bars; axes and grid alone give none
REPORTS = ["fly", "fly-3d", "fly-failed", "match", "match-big", "series", "single"]


def _pages(pdf: bytes) -> int:
    return len(re.findall(rb"/Type\s*/Page(?![s\w])", pdf))


def _ink_fraction(png: bytes) -> float:
    """Share of pixels near one of the palette's three inks (curves, bars, marks), not paper, tints or grid."""
    from PIL import Image

    pixels = np.asarray(Image.open(io.BytesIO(png)).convert("RGB"), dtype=float).reshape(-1, 3)
    inks = np.array([[int(c[i:i + 2], 16) for i in (1, 3, 5)] for c in (palette.INK, palette.BLUE, palette.ORANGE)])
    near = (np.abs(pixels[:, None, :] - inks[None, :, :]).max(axis=2) < 48).any(axis=1)
    return float(near.mean())


def _write_logs(folder: Path) -> list[Path]:
    """Three load-cell logs of one motor, each a little different (rate 1 kHz, noise, offset)."""
    from motorlib.files.motor_xml import read_record

    known = read_record(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")
    paths = []
    for i in range(3):
        rng = np.random.default_rng(i)
        t = np.arange(-0.4, known.time_s[-1] + 0.5, 1e-3)
        f = known.thrust_at_n(t * (1 + 0.03 * (i - 1))) * (1 + 0.02 * (i - 1)) + 12.0 + rng.normal(0.0, 0.4, t.size)
        path = folder / f"firing-{i + 1}.csv"
        path.write_text("time_s,force_N\n" + "".join(f"{a:.4f},{b:.4f}\n" for a, b in zip(t, f)))
        paths.append(path)
    return paths


def _fly_3d_report(folder: Path) -> Path:
    """A fly report whose summary carries the keys of the 3-D flight and stability work (sections appear)."""
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.files.motor_xml import read_record
    from motorlib.flight.integrate import simulate
    from motorlib.flight.rulebook import evaluate_rules, flown_rule_inputs
    from motorlib.present.report import write_report
    from motorlib.present.report_content import fly_report

    frame = load_airframe(AIRFRAME)
    motor = read_record(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml")
    results = simulate(frame, [motor], trajectories=True)
    summary = results.summary(0, motor.delays_s)
    summary["stability"] = {"cp_m": 0.71, "cg_liftoff_m": 0.62, "cg_burnout_m": 0.60, "margin_liftoff_cal": 2.1,
                            "margin_rail_exit_cal": 2.2, "margin_burnout_cal": 2.6, "min_margin_cal": 2.1}
    summary["deployments"] = [
        {"name": "drogue at apogee", "time_s": 9.9, "altitude_m": 497.0, "speed_m_s": 3.1},
        {"name": "main at 150 m", "time_s": 40.2, "altitude_m": 150.0, "speed_m_s": 27.5},
    ]
    summary["landing"] = {"time_s": 70.3, "speed_m_s": 5.1, "east_m": 300.0, "north_m": -120.0,
                          "distance_m": 323.1, "bearing_deg": 112.0}
    warnings = [(f.code, f.message) for f in evaluate_rules(flown_rule_inputs(frame, results))[0]]
    report = fly_report(frame, motor, summary, warnings, results.trajectories[0], inputs=[str(AIRFRAME)],
                        command="test", made_at="2026-12-02 00:00 UTC")
    return write_report(report, folder / "fly-3d.html")


def _big_match_report(folder: Path) -> Path:
    """A ranking of 150 invented 29 mm motors (most failing, with long reasons) in imperial units: the report
    must still print on two pages (New-user trial: a large ranking spilled onto a third page)."""
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.matching.rank import MatchSettings, rank
    from motorlib.present.report import write_report
    from motorlib.present.report_content import match_report

    from ..synthetic import synthetic_motors

    result = rank(load_airframe(AIRFRAME), synthetic_motors(150, seed=3),
                  MatchSettings(target_m=400.0, ceiling_m=600.0, ballast=True))
    report = match_report(result, inputs=[str(AIRFRAME)], command="test", catalog="synthetic", units="imperial",
                          made_at="2026-12-02 00:00 UTC", frame=load_airframe(AIRFRAME))
    return write_report(report, folder / "match-big.html")


def _empty_chart_page(folder: Path) -> Path:
    """The control: a report whose one chart has axes, grid and a legend but no data."""
    chart = SvgChart(title="Nothing drawn", description="An empty chart.", x_label="x", y_label="y",
                     x_range=(0.0, 1.0), y_range=(0.0, 1.0), key="empty")
    report = MatchReport("Control", "", TableBlock("t", ("a",), ()), ChartBlock(chart.render()), Facts("f", ()),
                         Trace("0", "test", ()))
    path = folder / "empty.html"
    path.write_text(render_html(report))
    return path


@pytest.fixture(scope="module")
def report_files(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Path]:
    folder = tmp_path_factory.mktemp("reports")
    runner = CliRunner()
    logs = _write_logs(folder)
    commands = {
        "fly": ["fly", str(AIRFRAME), "--motor", str(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml")],
        "fly-failed": ["fly", str(AIRFRAME), "--motor", str(SAMPLE_DIR / "teakettle-thrust-co_1-2a3-2-4.xml")],
        "match": ["match", str(AIRFRAME), "--catalog", str(SAMPLE_DIR), "--target", "400", "--ceiling", "600",
                  "--allow-smaller-motors"],
        "series": ["reduce", *map(str, logs), "--combine", "--designation", "G59-10", "--diameter", "29mm",
                   "--length", "124mm", "--total-mass", "150g", "--propellant-mass", "62g", "--delays", "10"],
        "single": ["reduce", str(logs[0]), "--designation", "G59-10"],
    }
    files = {}
    for name, args in commands.items():
        path = folder / f"{name}.html"
        result = runner.invoke(main, [*args, "--report", str(path)])
        assert result.exit_code == (1 if name == "fly-failed" else 0), result.output  # a failed flight exits 1
        files[name] = path
    files["fly-3d"] = _fly_3d_report(folder)
    files["match-big"] = _big_match_report(folder)
    files["empty"] = _empty_chart_page(folder)
    return files


_CHART_CHECK = """
Array.from(document.querySelectorAll('svg, img')).filter(e => e.tagName === 'IMG' || !e.parentElement.closest('svg'))
  .map(e => {
    const label = (e.getAttribute('aria-label') || '').trim();
    const title = e.querySelector(':scope > title');
    const ok = (e.getAttribute('role') === 'img' && label.length > 10) || (title && title.textContent.trim().length > 3)
               || (e.tagName === 'IMG' && (e.getAttribute('alt') || '').trim().length > 3);
    return ok ? '' : e.outerHTML.slice(0, 80);
  }).filter(Boolean)
"""
_FRAMES = """
Array.from(document.querySelectorAll('svg.chart')).map(svg => {
  const r = svg.querySelector('rect.frame').getBoundingClientRect();
  return {title: svg.querySelector('title').textContent, x: r.left + scrollX + 2, y: r.top + scrollY + 2,
          width: r.width - 4, height: r.height - 4};
})
"""


def _measure(browser: Browser, path: Path) -> dict[str, Any]:
    url = path.resolve().as_uri()
    browser.load(url, 1280)
    out: dict[str, Any] = {}
    out["console_errors"] = [e["params"] for e in browser.events
                             if (e["method"] == "Runtime.consoleAPICalled" and e["params"]["type"] in ("error", "assert"))
                             or e["method"] == "Runtime.exceptionThrown"
                             or (e["method"] == "Log.entryAdded" and e["params"]["entry"]["level"] == "error")]
    out["requests"] = [e["params"]["request"]["url"] for e in browser.events
                       if e["method"] == "Network.requestWillBeSent" and e["params"]["request"]["url"] != url]
    out["width_1280"] = browser.evaluate("[document.documentElement.scrollWidth, innerWidth]")
    out["charts_without_text"] = browser.evaluate(_CHART_CHECK)
    out["n_charts"] = browser.evaluate("document.querySelectorAll('svg.chart').length")
    out["ink"] = {frame["title"]: _ink_fraction(browser.screenshot({k: frame[k] for k in ("x", "y", "width", "height")}))
                  for frame in browser.evaluate(_FRAMES)}
    browser.resize(390, 844, mobile=True)
    out["width_390"] = browser.evaluate("[document.documentElement.scrollWidth, innerWidth]")
    out["pages_a4"] = _pages(browser.pdf(*A4_IN))
    out["pages_letter"] = _pages(browser.pdf(*LETTER_IN))
    return out


@pytest.fixture(scope="module")
def measured(report_files: dict[str, Path]) -> dict[str, dict[str, Any]]:
    executable = find_chromium()
    if executable is None:
        message = ("Chromium not found on PATH: the browser checks of the HTML reports need Debian's chromium "
                   "package (as root: apt-get update && apt-get install -y chromium)")
        if os.environ.get("CI_BROWSER_REQUIRED") == "1":
            pytest.fail(message + "; CI_BROWSER_REQUIRED=1, so this is a failure", pytrace=False)
        pytest.skip(message)
    browser = Browser(executable)
    try:
        return {name: _measure(browser, path) for name, path in report_files.items()}
    finally:
        browser.close()


@pytest.mark.parametrize("name", REPORTS)
def test_the_page_loads_with_no_console_error(measured: dict[str, dict[str, Any]], name: str) -> None:
    assert measured[name]["console_errors"] == []


@pytest.mark.parametrize("name", REPORTS)
def test_the_page_asks_for_nothing_over_the_network(measured: dict[str, dict[str, Any]], name: str) -> None:
    assert measured[name]["requests"] == []


@pytest.mark.parametrize("name", REPORTS)
def test_the_report_prints_on_at_most_two_pages(measured: dict[str, dict[str, Any]], name: str) -> None:
    assert 1 <= measured[name]["pages_a4"] <= 2
    assert 1 <= measured[name]["pages_letter"] <= 2


@pytest.mark.parametrize("name", REPORTS)
@pytest.mark.parametrize("width", [390, 1280])
def test_nothing_overflows_sideways(measured: dict[str, dict[str, Any]], name: str, width: int) -> None:
    scroll_width, inner_width = measured[name][f"width_{width}"]
    assert inner_width == width
    assert scroll_width <= inner_width


@pytest.mark.parametrize("name", REPORTS)
def test_every_chart_has_a_text_alternative(measured: dict[str, dict[str, Any]], name: str) -> None:
    assert measured[name]["n_charts"] >= 1
    assert measured[name]["charts_without_text"] == []


@pytest.mark.parametrize("name", REPORTS)
def test_every_chart_shows_data(measured: dict[str, dict[str, Any]], name: str) -> None:
    ink = measured[name]["ink"]
    assert len(ink) == measured[name]["n_charts"]
    empty = {title: share for title, share in ink.items() if share < MIN_INK_FRACTION}
    assert not empty, f"charts with (almost) nothing drawn in their plot area: {empty}"


def test_the_ink_measure_sees_an_empty_chart(measured: dict[str, dict[str, Any]]) -> None:
    # The control: without this, a measure that always passes would go unnoticed.
    (share,) = measured["empty"]["ink"].values()
    assert share < MIN_INK_FRACTION / 4


def test_the_fly_report_has_the_sections_its_data_allow(report_files: dict[str, Path]) -> None:
    plain = report_files["fly"].read_text()
    full = report_files["fly-3d"].read_text()
    # the sample airframe has a [geometry], so `fly` itself adds the stability section (issue 11); an
    # airframe without one leaves it out (tests/present/test_report.py)
    assert "<h2>Stability</h2>" in plain and "<h2>Stability</h2>" in full
    assert "Recovery: main at 150 m" in full and "toward 112°" in full
    for text in (plain, full):
        assert "range safety officer decides" in text and "sha256" in text and "Signature" in text
