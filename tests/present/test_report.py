"""HTML reports without a browser (issue 15): self-contained, sections follow the data, files never clobbered."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from motorlib.present.report import (ChartBlock, Facts, MatchReport, Notes, TableBlock, Trace, file_sha256,
                                     render_html, write_report)
from motorlib.present.svgcharts import SvgChart, nice_ticks, thin


def _report(title: str = "Motors <&> rockets") -> MatchReport:
    chart = SvgChart(title="A chart", description="Two points joined by a line.", x_label="x (s)", y_label="y (m)",
                     x_range=(0.0, 1.0), y_range=(0.0, 1.0))
    chart.line([0.0, 1.0], [0.0, 1.0], "a line")
    return MatchReport(title, "sub", TableBlock("Ranking", ("#", "motor"), (("1", "F29-8"),), (True, False), ("ok",)),
                       ChartBlock(chart.render(), "caption"), Facts("Conditions", (("wind", "3 m/s"),)),
                       Trace("0.1.0", "motorlib match x.toml", (("x.toml", "ab" * 32),), "2026-12-02 00:00 UTC"),
                       assumptions=Notes("Assumptions", ("one",)))


def test_the_page_holds_everything_it_shows() -> None:
    html = render_html(_report())
    assert "<script" not in html.lower() and "<link" not in html.lower() and "@import" not in html
    assert "@font-face" not in html and "url(http" not in html
    # the only address in the file is the SVG namespace, which is a name, never fetched
    assert set(re.findall(r"https?://[^\s\"')]+", html)) == {"http://www.w3.org/2000/svg"}
    assert "@page" in html and "@media print" in html


def test_text_is_escaped_and_charts_carry_their_text_alternative() -> None:
    html = render_html(_report())
    assert "Motors &lt;&amp;&gt; rockets" in html
    assert 'role="img"' in html and "<title>A chart</title>" in html and "<desc>Two points" in html


def test_the_cautions_and_the_trace_are_always_there() -> None:
    html = render_html(_report())
    for phrase in ("estimate", "safety code", "range safety officer decides", "within your certification"):
        assert phrase in html
    assert "sha256 " + "ab" * 32 in html and "motorlib 0.1.0" in html


def test_a_missing_section_does_not_appear() -> None:
    assert "<h2>Assumptions</h2>" not in render_html(MatchReport("t", "", _report().ranking, None, Facts("c", ()),
                                                                 Trace("0", "c", ())))


def test_write_report_never_clobbers_and_never_writes_over_an_input(tmp_path: Path) -> None:
    target = tmp_path / "r.html"
    write_report(_report(), target)
    with pytest.raises(FileExistsError, match="already exists"):
        write_report(_report(), target)
    write_report(_report("new"), target, overwrite=True)
    assert "<title>new</title>" in target.read_text()
    source = tmp_path / "rocket.toml"
    source.write_text("name = 'x'\n")
    with pytest.raises(ValueError, match="is an input of this report"):
        write_report(_report(), source, overwrite=True, inputs=[source])
    assert source.read_text() == "name = 'x'\n"


def test_file_sha256_is_the_digest_of_the_bytes(tmp_path: Path) -> None:
    path = tmp_path / "f"
    path.write_bytes(b"abc")
    assert file_sha256(path) == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"  # FIPS 180-2 "abc"


def test_ticks_are_round_and_cover_the_range() -> None:
    assert nice_ticks(0.0, 1717.0) == [0.0, 500.0, 1000.0, 1500.0, 2000.0]
    assert nice_ticks(0.0, 1.9)[-1] >= 1.9


def test_thinning_keeps_the_ends_and_the_highest_point() -> None:
    xs = list(range(10_000))
    ys = [-(x - 4321) ** 2 for x in xs]
    tx, ty = thin(xs, ys, 200)
    assert len(tx) <= 202 and tx[0] == 0 and tx[-1] == 9999 and 4321 in tx


def test_a_large_ranking_lists_the_best_motors_and_says_how_many_are_left_out() -> None:
    # New-user trial: 150 fitting motors printed on 26 A4 pages (the page limit is checked in a real browser in
    # test_report_browser.py); the report lists the best ones in rank order, its chart the same ones, and says
    # how many more there are and where to see them.
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.matching.rank import MatchSettings, rank
    from motorlib.present.report_content import match_report

    from ..conftest import SAMPLE_DIR
    from ..synthetic import synthetic_motors

    frame = load_airframe(SAMPLE_DIR / "airframes" / "quibble-41.toml")
    result = rank(frame, synthetic_motors(150, seed=3), MatchSettings(target_m=400.0, ceiling_m=600.0))
    report = match_report(result, inputs=[], command="test", catalog="synthetic", frame=frame)
    fitting = [c for c in result.candidates if c.fits]
    listed = [row[1] for row in report.ranking.rows]
    assert 5 <= len(listed) < len(fitting)
    assert listed == [c.designation for c in fitting[: len(listed)]]
    assert f"The next {len(fitting) - len(listed)} motor(s) that fit" in report.ranking.note
    assert report.chart is not None and f"({len(listed)} shown)" in report.chart.svg


def test_the_match_png_of_a_large_ranking_stays_readable(tmp_path: Path) -> None:
    # New-user trial: 1,123 flown motors drew a PNG 49,740 px wide (about 1,500 reach matplotlib's 2^16 px limit,
    # an internal error); the chart draws the best motors in rank order and says how many it leaves out.
    from PIL import Image

    from motorlib.files.airframe_toml import load_airframe
    from motorlib.matching.rank import MatchSettings, rank
    from motorlib.present.display import DisplayUnits
    from motorlib.present.plots import MATCH_PLOT_MOTORS, match_plot

    from ..conftest import SAMPLE_DIR
    from ..synthetic import synthetic_motors

    frame = load_airframe(SAMPLE_DIR / "airframes" / "quibble-41.toml")
    result = rank(frame, synthetic_motors(200, seed=5), MatchSettings(target_m=400.0))
    flown = [c for c in result.candidates if c.apogee_m is not None]
    assert len(flown) > MATCH_PLOT_MOTORS
    path = match_plot(result, tmp_path / "m.png", DisplayUnits())
    with Image.open(path) as image:
        width, height = image.size
    assert width < 4000 and height < 1500


def test_the_rocket_section_says_when_each_device_opens() -> None:
    # new-user trial: the report's Rocket section read "main, opened at altitude" without the altitude
    from motorlib.flight.airframe import Recovery
    from motorlib.present.report_content import _recovery_words

    devices = (Recovery(device="drogue", deploy="apogee", drag_area_m2=0.2, delay_s=1.0),
               Recovery(device="main", deploy="altitude", deploy_altitude_m=300.0, drag_area_m2=5.0),
               Recovery(device="streamer", deploy="ejection", drag_area_m2=0.03),
               Recovery(device="parachute", deploy="after", delay_s=2.0, drag_area_m2=1.0))
    words = _recovery_words(devices, "si")
    assert "drogue, opened 1 s after apogee" in words
    assert "main, opened at 300 m on the way down" in words
    assert "streamer, opened by the motor's delay charge" in words
    assert "parachute, opened 2 s after the device before it" in words
    assert "ft" in _recovery_words(devices[1:2], "imperial")
    assert "2 s after liftoff" in _recovery_words(devices[3:], "si")  # a timer on the first device counts from liftoff
