"""Defects a first-time user met (new-user trial before closing issue 17): each test failed before its fix."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from .conftest import AIRFRAMES, SAMPLE_DIR, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")
TOLLGATE = str(AIRFRAMES / "tollgate-98.toml")


def test_fly_exits_1_when_the_flight_breaks_a_launch_rule() -> None:
    # README, "When something goes wrong": status 1 when a flight breaks a rule (the results are printed first).
    # G99-14 on quibble-41 at a 3 s delay opens the parachute far above its 25 m/s limit.
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G99-14", "--delay", "3", "--json")
    payload = json.loads(out)
    assert "deployment-fast" in [w["code"] for w in payload["warnings"]]
    assert code == 1


def test_fly_refuses_a_delay_for_a_plugged_motor() -> None:
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "H124-P", "--delay", "6")
    assert code == 2
    assert "H124-P" in out and "no ejection charge" in out


def test_fly_refuses_a_delay_when_electronics_open_the_recovery() -> None:
    code, out = run("fly", TOLLGATE, "--catalog", str(SAMPLE_DIR), "--motor", "600I296-14", "--delay", "14")
    assert code == 2
    assert "electronics" in out


def test_match_robust_refuses_the_options_it_does_not_use() -> None:
    # (--target stays: among motors equally likely to succeed, the robust ranking prefers the median nearest it)
    for extra in (("--ballast",), ("--csv",), ("--show-rejected",), ("--report", "r.html"), ("--plot", "r.png")):
        code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--robust", "--samples", "5", *extra)
        assert code == 2, (extra, out)
        assert extra[0] in out and "--robust" in out


def test_match_reports_no_descent_rate_where_nothing_opens() -> None:
    # fly gives null (stuck) or the ballistic fall; match's estimate under the device must not pretend it opened
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors", "--show-rejected", "--json")
    assert code == 0, out
    by_name = {c["designation"]: c for c in json.loads(out)["candidates"]}
    for name in ("B6-0", "A8-3,5"):
        assert by_name[name]["landing_speed_m_s"] is None, (name, by_name[name]["landing_speed_m_s"])


# ---------------------------------------------------------------- a later trial: a student team with a high-power
# airframe and a club safety officer checking their choice (each test failed before its fix)
def _fly_json(*args: str) -> dict:
    code, out = run("fly", *args, "--json")
    assert code in (0, 1), out
    return json.loads(out)


def test_scatter_nominal_apogee_flies_the_chosen_delay() -> None:
    # a 3 s delay on G99-14 (optimal about 12 s) opens the parachute while it climbs: the nominal flight
    # scatter prints must be that flight, the one `fly --delay 3` gives, not the flight at the optimal delay
    code, out = run("scatter", QUIBBLE, "--motor", "G99-14", "--delay", "3", "-n", "3", "--workers", "1",
                    "--no-uncertainty", "--json")
    assert code == 0, out
    data = json.loads(out)
    flown = _fly_json(QUIBBLE, "--motor", "G99-14", "--delay", "3")["apogee_m"]
    assert abs(data["nominal_apogee_m"] - flown) < 1e-6 * flown
    assert abs(data["apogee_m"]["p50"] - data["nominal_apogee_m"]) < 1e-6 * flown


def test_robust_counts_the_samples_under_the_minimum_margin(tmp_path) -> None:
    # the robust ranking judged stability on the nominal flight only: with the CG known to +-40 mm, F29-8
    # (nominal least margin 2.1 cal) never failed; now each sample's own margin is judged and counted
    frame = tmp_path / "q.toml"
    frame.write_text(Path(QUIBBLE).read_text() + '\n[uncertainty]\ncg = "40 mm"\n')
    args = ("match", str(frame), "--catalog", str(SAMPLE_DIR), "--robust", "--samples", "60", "--workers", "1",
            "--allow-smaller-motors")
    code, out = run(*args, "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["conditions"]["min_stability_cal"] == 1.0
    f29 = next(c for c in data["candidates"] if c["designation"] == "F29-8")
    assert f29["n_below_min_stability"] > 0
    assert f29["failures"]["stability-low"] == f29["n_below_min_stability"] / 60
    assert f29["stability_margin_cal"]["p5"] < f29["stability_margin_cal"]["p50"] < f29["stability_margin_cal"]["p95"]
    code, out = run(*args)
    assert code == 0, out
    assert f"F29-8: {f29['n_below_min_stability']}" in " ".join(out.split())


def _table_row(out: str, name: str) -> list[str]:
    return next(line.split() for line in out.splitlines() if f" {name} " in line)


def test_match_shows_the_opening_speed_fly_reports_and_the_report_agrees() -> None:
    # The speed column must be the figure the rule judges: with a parachute listed, the air speed at which it
    # opens (deployment-fast, max_deployment_speed_m_s in --json), the speed fly's card gives under
    # "Recovery". The table showed the speed over the ground at the charge instead (2.8 m/s for F29-8 against
    # fly's 7.8 m/s opening: the wind, not the rocket, moves the air past the canopy at apogee).
    from motorlib.catalog import Catalog
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.matching.rank import MatchSettings, rank
    from motorlib.present.report_content import match_report

    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors", "--json")
    f29 = next(c for c in json.loads(out)["candidates"] if c["designation"] == "F29-8")
    opening = _fly_json(QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "F29-8")["deployments"][0]["speed_m_s"]
    assert f29["max_deployment_speed_m_s"] == opening
    assert abs(f29["ejection_speed_m_s"] - opening) > 1.0  # the two figures differ: which one is shown matters
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors")
    assert code == 0, out
    header = out.splitlines()[2] + out.splitlines()[3]
    assert "opens" in header and "eject" not in header
    assert f"{opening:.1f}" in _table_row(out, "F29-8")
    result = rank(load_airframe(QUIBBLE), Catalog(SAMPLE_DIR, read_only=True), MatchSettings(allow_smaller_motors=True))
    ranking = match_report(result, inputs=[], command="", catalog="").ranking
    column = ranking.columns.index("opening")
    row = next(r for r in ranking.rows if r[1] == "F29-8")
    assert row[column] == f"{opening:.1f} m/s"


def test_fly_says_which_speed_each_recovery_figure_is(tmp_path) -> None:
    # fly --json gives G99-14's charge 7.04 m/s (chosen_ejection_speed_m_s) and the parachute's opening 1.38 m/s
    # at the same instant: the first is the speed over the ground, the second the speed through the air (the
    # rocket drifts with the wind near apogee). The card must say which one it shows.
    data = _fly_json(QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G99-14")
    assert abs(data["chosen_ejection_speed_m_s"] - data["deployments"][0]["speed_m_s"]) > 3.0
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G99-14")
    line = next(line for line in out.splitlines() if "1.4 m/s" in line)
    assert "air speed" in line
    # without a device listed, the card shows the charge's speed: over the ground
    bare = tmp_path / "bare.toml"
    text = Path(QUIBBLE).read_text()
    bare.write_text(text[: text.index("[recovery]")] + text[text.index("[geometry]"):] if "[geometry]" in text
                    else text[: text.index("[recovery]")])
    code, out = run("fly", str(bare), "--catalog", str(SAMPLE_DIR), "--motor", "G99-14")
    line = next(line for line in out.splitlines() if "7.0 m/s" in line)
    assert "ground speed" in line


def test_one_verdict_vocabulary_in_table_report_plot_and_json(tmp_path) -> None:
    # the table said "pass+ballast", the title "1 more with ballast", the charts "✓ with ballast", the JSON and
    # the report "pass with ballast": one verdict, one phrase
    from motorlib.matching.verdicts import VERDICTS

    args = ("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--target", "400", "--ceiling", "600",
            "--allow-smaller-motors", "--ballast")
    code, out = run(*args, "--json")
    verdicts = {c["designation"]: c["verdict"] for c in json.loads(out)["candidates"]}
    assert verdicts["F29-8"] == "pass with ballast"
    report = tmp_path / "r.html"
    code, table = run(*args, "--report", str(report), env={"COLUMNS": "80"})
    assert code == 0, table
    html = report.read_text()
    svg = html[html.index("<svg"):html.index("</svg>")]
    for text in (table, html):
        assert "pass with ballast" in text
        for variant in ("pass+ballast", "more with ballast", "✓ with ballast"):
            assert variant not in text, variant
    assert "pass with ballast" in " ".join(_table_row(table, "F29-8"))
    # every verdict word the table shows is a word of the one list (fail with its codes)
    for line in table.splitlines():
        words = line.split()
        if len(words) > 2 and words[0].isdigit() and words[1] in verdicts:
            shown = " ".join(words[-3:])
            assert any(shown.endswith(v) for v in VERDICTS) or "fail" in words, line
    assert "pass with ballast" in svg


def test_an_unknown_motor_suggests_close_designations(tmp_path) -> None:
    # a typo in --motor said only "no motor with that id, handle or designation": name the near ones
    for command in (("fly", QUIBBLE), ("scatter", QUIBBLE, "-n", "2"), ("airframe", QUIBBLE)):
        code, out = run(*command, "--catalog", str(SAMPLE_DIR), "--motor", "F2-8")
        assert code == 2, out
        text = " ".join(out.split())
        assert "no motor with that id, handle or designation" in text and "did you mean F29-8" in text, text
    code, out = run("catalog", "show", "--catalog", str(SAMPLE_DIR), "G59-01")
    assert code == 2 and "did you mean G59-10" in " ".join(out.split()), out
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "Q1-zzz")  # nothing near: no guess
    assert code == 2 and "did you mean" not in out and "catalog list" in out, out
    own = tmp_path / "cat"
    assert run("catalog", "add", "--catalog", str(own), str(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"))[0] == 0
    for command in (("tag", "F2-8", "in-stock"), ("untag", "F2-8", "in-stock"), ("remove", "F2-8")):
        code, out = run("catalog", command[0], "--catalog", str(own), *command[1:])
        assert code == 2 and "did you mean F29-8" in " ".join(out.split()), (command, out)


@pytest.mark.parametrize("given", ["-5%", "0%", "150%", "nan%", "inf%", "abc%", "", "5x", "500m", "0m", "5"])
def test_a_bad_target_tolerance_says_what_to_give(given: str) -> None:
    # "-5%" answered "target_tolerance must be a fraction between 0 and 1, got -0.05" (a library name, a
    # fraction the user never typed); "500m" on a 400 m target "got 1.25"; "" asked for "a length such as 29 mm"
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--target", "400", "--target-tolerance", given)
    text = " ".join(out.split())
    assert code == 2, text
    assert "--target-tolerance" in text and "5%" in text and "20m" in text, text
    assert "target_tolerance" not in text and "fraction" not in text and "29 mm" not in text, text


def test_a_target_tolerance_without_a_target_is_refused() -> None:
    # a percentage without --target was silently ignored (the length form was refused)
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--target-tolerance", "10%")
    assert code == 2 and "--target" in out, out


_SI_FIGURE = re.compile(r"(?<![\w.])\d[\d,]*(\.\d+)?\s?(m|m/s|m/s²|kg|°C|hPa|kPa|m²)(?![\w/²³])")


def _si_figures(text: str) -> list[str]:
    return [m.group(0) for m in _SI_FIGURE.finditer(text)]


def _imperial(path: str, folder: Path, swaps: dict[str, str]) -> str:
    """A copy of an airframe file with its quantities given in imperial units (a file's own numbers are echoed
    as typed, README "Units": in an imperial file every figure shown must then be imperial)."""
    text = Path(path).read_text()
    for old, new in swaps.items():
        assert old in text, old
        text = text.replace(old, new)
    out = folder / Path(path).name
    out.write_text(text)
    return str(out)


def test_imperial_match_words_every_figure_in_imperial(tmp_path) -> None:
    # --units imperial: the reasons, notes, assumptions, report and chart labels still quoted SI figures
    # ("the parachute opens too fast: 32 m/s (limit 25 m/s ...)", the report's reasons, Assumptions and axes in m).
    # Motor sizes stay in mm and impulse in N·s (README, Units).
    frame = _imperial(QUIBBLE, tmp_path, {'"310 g"': '"10.93 oz"', '"41.6 mm"': '"1.64 in"', '"2.4 m"': '"7.9 ft"',
                                          '"120 m"': '"394 ft"', '"15 degC"': '"59 degF"', '"3 m/s"': '"9.8 ft/s"',
                                          '"0.6 m"': '"23.6 in"'})
    report = tmp_path / "r.html"
    args = ("--units", "imperial", "match", frame, "--catalog", str(SAMPLE_DIR), "--target", "1300ft",
            "--ceiling", "2000ft", "--allow-smaller-motors", "--ballast")
    code, out = run(*args, "--report", str(report), env={"COLUMNS": "200"})
    assert code == 0, out
    assert "opens too fast" in out  # the case that kept its SI text
    assert _si_figures(out) == [], _si_figures(out)
    html = report.read_text()
    body = re.sub(r"<[^>]+>", " ", html[: html.index('<section class="trace">')])  # the trace quotes the command
    assert "opens too fast" in body
    assert _si_figures(body) == [], _si_figures(body)
    code, csv_text = run(*args[:-1], "--csv")
    assert code == 0 and _si_figures(csv_text) == [], _si_figures(csv_text)


def test_imperial_fly_report_words_every_figure_in_imperial(tmp_path) -> None:
    frame = _imperial(TOLLGATE, tmp_path, {'"9.5 kg"': '"20.94 lb"', '"102 mm"': '"4.02 in"', '"5.5 m"': '"18 ft"',
                                           '"24 degC"': '"75 degF"', '"970 hPa"': '"28.64 inHg"',
                                           '"4 m/s"': '"13.1 ft/s"', '"3 m"': '"118.1 in"'})
    report = tmp_path / "f.html"
    code, out = run("--units", "imperial", "fly", frame, "--catalog", str(SAMPLE_DIR), "--motor", "K1084-P",
                    "--report", str(report), env={"COLUMNS": "200"})
    assert code in (0, 1), out
    assert _si_figures(out) == [], _si_figures(out)
    html = report.read_text()
    body = re.sub(r"<[^>]+>", " ", html[: html.index('<section class="trace">')])
    assert _si_figures(body) == [], _si_figures(body)


@pytest.mark.parametrize("command", ["fly", "match"])
@pytest.mark.parametrize("value", ["nan", "inf"])
def test_min_stability_refuses_what_is_not_a_number(command: str, value: str) -> None:
    # fly --min-stability nan switched the stability rule off ("nan to 3 cal" on the card); match answered with
    # the library's field name ("min_stability_cal must be finite")
    code, out = run(command, QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "F29-8", "--min-stability", value) \
        if command == "fly" else run(command, QUIBBLE, "--catalog", str(SAMPLE_DIR), "--min-stability", value)
    assert code == 2, out
    assert "--min-stability" in out and "min_stability_cal" not in out, out


def test_a_relative_spread_of_30_percent_or_more_is_refused_in_the_users_terms(tmp_path) -> None:
    # "--drag-std 50%" answered "drag_relative_std must be below 0.3, got 0.5" (a library name, a fraction)
    code, out = run("scatter", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "F29-8", "-n", "2", "--drag-std", "50%")
    text = " ".join(out.split())
    assert code == 2 and "--drag-std" in text and "50%" in text and "30 %" in text, text
    assert "drag_relative_std" not in text and "0.3" not in text, text
    frame = tmp_path / "q.toml"
    frame.write_text(Path(QUIBBLE).read_text() + '\n[uncertainty]\ndrag = "50 %"\n')
    code, out = run("scatter", str(frame), "--catalog", str(SAMPLE_DIR), "--motor", "F29-8", "-n", "2")
    text = " ".join(out.split())
    assert code == 2 and "uncertainty.drag" in text and "30 %" in text and "drag_relative_std" not in text, text


def test_the_airframe_command_shows_a_name_with_brackets_as_written(tmp_path) -> None:
    # "[red]Evil[/red]" came out as "\[red]Evil\[/red]": escaped for markup inside a Text, which reads none
    frame = tmp_path / "b.toml"
    frame.write_text(Path(QUIBBLE).read_text().replace('name = "Quibble 41 (demo)"', 'name = "Quibble [v2]"'))
    code, out = run("airframe", str(frame), "--catalog", str(SAMPLE_DIR), "--motor", "F29-8")
    assert code == 0, out
    assert "Quibble [v2]: derived airframe" in out and "\\[" not in out, out


def test_check_shows_a_file_name_with_brackets_as_written(tmp_path) -> None:
    # "File f29\[new].xml": Text.assemble reads no markup, the escape showed
    curve = tmp_path / "f29[new].xml"
    curve.write_bytes((SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml").read_bytes())
    code, out = run("check", str(curve))
    assert code == 0 and "f29[new].xml" in out and "\\[" not in out, out


def test_the_airframe_command_follows_the_units_switch() -> None:
    # `motorlib --units imperial airframe` printed "310.0 g" and every position in mm (README: one setting switches
    # every table)
    code, out = run("--units", "imperial", "airframe", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "F29-8")
    assert code == 0, out
    assert "10.9 oz" in out and "CG (in)" in out and "22.83 in" in out, out  # 580 mm = 22.83 in
    assert " mm" not in out and " g," not in out, out
    code, out = run("airframe", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "F29-8")
    assert code == 0 and "CG (mm)" in out and "580.0 mm" in out, out


def test_top_says_how_many_ranked_motors_it_hides() -> None:
    # `match --top 5` on a large catalog hid hundreds of flown motors without a word
    quibble = str(AIRFRAMES / "quibble-41.toml")
    code, out = run("match", quibble, "--target", "400", "--allow-smaller-motors", "--json")
    fitting = sum(c["fits"] for c in json.loads(out[out.index("{"):out.rindex("}") + 1])["candidates"])
    assert fitting > 2  # the check below has something to hide
    code, out = run("match", quibble, "--target", "400", "--allow-smaller-motors", "--top", "2")
    assert f"{fitting - 2} more ranked motor(s) below #2 are not shown" in " ".join(out.split())


@pytest.mark.parametrize("key, raw", [("cg", 10), ("rail_angle", 2), ("wind_direction", 20.0)])
def test_a_bare_number_for_a_small_spread_asks_for_a_unit_in_the_file(tmp_path, key, raw) -> None:
    # [uncertainty] cg = 10 was read as 10 m (and rail_angle = 2 as 2 rad, 115 deg) while --cg-std 10 meant
    # 10 mm: the same number, two meanings a thousand times apart. Both now ask for a unit.
    from motorlib.errors import SimulationInputError
    from motorlib.files.uncertainty_toml import uncertainty_from_dict

    with pytest.raises(SimulationInputError, match=f"uncertainty.{key}: .*give a unit"):
        uncertainty_from_dict({"uncertainty": {key: raw}}, "rocket.toml")
    assert uncertainty_from_dict({"uncertainty": {key: 0}}, "rocket.toml") is not None  # zero needs none


def test_a_bare_cg_spread_on_the_command_line_asks_for_a_unit() -> None:
    code, out = run("scatter", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "-n", "20", "--cg-std", "10")
    assert code == 2 and "has no unit" in out
    code, out = run("scatter", str(AIRFRAMES / "quibble-41.toml"), "--motor", "F29-8", "-n", "20", "--cg-std", "10mm")
    assert code in (0, 1), out


def test_an_empty_ranking_names_the_speed_of_the_recovery_it_has() -> None:
    # Nothing fits, so nothing flew: the header said 'eject', the rules 'ejection <= 25 m/s' and the key
    # '(no recovery device listed)', beside an Assumptions line with a parachute deployed at apogee.
    code, out = run("match", str(AIRFRAMES / "tollgate-98.toml"), "--max-class", "A")
    flat = " ".join(out.split())
    assert "parachute" in flat and "opening <=" in flat
    assert "ejection <=" not in flat and "no recovery device listed" not in flat


def test_the_robust_ranking_says_what_it_ranked_and_what_it_left_out() -> None:
    # match --robust printed no airframe, no count of motors left unsampled or hidden by --top, no spreads used
    code, out = run("match", str(AIRFRAMES / "quibble-41.toml"), "--robust", "--allow-smaller-motors",
                    "--altitude-window", "250m..330m", "--top", "1", "--samples", "20", "--workers", "1")
    flat = " ".join(out.split())
    assert "Quibble 41 (demo): robust ranking" in flat
    assert "more sampled motor(s) below #1 are not shown" in flat
    assert "do not fit the mount or the class limit and were not sampled" in flat
    assert "Sampled spreads (one standard deviation): impulse 3 %" in flat and "Catalog:" in flat


def test_a_robust_success_of_every_sample_is_not_shown_as_certain() -> None:
    # "100.0 ± 0.0" from 200 samples read as certainty: with every sample alike the binomial standard error is 0.
    # The table marks it and the key gives the 95 % upper bound 3/n (the "rule of three"; Hanley and
    # Lippman-Hand, JAMA 1983: if none of n trials fails, the 95 % upper bound on the failure rate is about 3/n).
    code, out = run("match", str(AIRFRAMES / "quibble-41.toml"), "--robust", "--allow-smaller-motors",
                    "--samples", "40", "--workers", "1")
    flat = " ".join(out.split())
    assert re.search(r"100\.0 \* ", flat) and not re.search(r"100\.0 0\.0 ", flat)
    assert "all 40 sampled flights alike" in flat and "below about 7.5 %" in flat


def test_an_apogee_under_thrust_is_told_in_time_order_on_the_card_and_the_report(tmp_path) -> None:
    # new-user trial: the long-burning G25-4 on quibble-41 with 1.4 kg of ballast tops out (4.16 s) before its
    # motor burns out (4.95 s). The card listed burnout under "Boost" before the apogee and put the apogee under
    # "Coast to apogee"; the report's chart drew a "coast: unpowered climb" band after burnout
    args = (QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G25-4", "--ballast", "1.4kg")
    data = _fly_json(*args)
    assert data["time_to_apogee_s"] < data["burnout_time_s"] < data["landing"]["time_s"]
    report = tmp_path / "r.html"
    code, out = run("fly", *args, "--report", str(report), env={"COLUMNS": "100"})
    lines = out.splitlines()
    assert "Coast to apogee" not in out
    where = {name: next(i for i, line in enumerate(lines) if name in line)
             for name in ("Apogee before burnout (no coast)", "Burnout, 0.8 s after apogee", "Landing")}
    assert where["Apogee before burnout (no coast)"] < where["Burnout, 0.8 s after apogee"] < where["Landing"], out
    html = report.read_text()
    assert "Coast to apogee" not in html and ">coast<" not in html and "white coast" not in html
    assert "Apogee before burnout (no coast)" in html


def test_fly_csv_labels_a_ballistic_fall_freefall(tmp_path) -> None:
    # new-user trial: G25-4 on quibble-41 with 1.4 kg of ballast lands before its 4 s delay fires, so no device
    # ever opens; fly --csv labelled every row "ascent", the fall from apogee to the ground too
    path = tmp_path / "t.csv"
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G25-4", "--ballast", "1.4kg",
                    "--csv", str(path))
    rows = [line.split(",") for line in path.read_text().splitlines()]
    header, rows = rows[0], rows[1:]
    altitude, phase = header.index("altitude_m"), header.index("phase")
    top = max(range(len(rows)), key=lambda k: float(rows[k][altitude]))
    assert {r[phase] for r in rows[: top + 1]} == {"ascent"}
    assert {r[phase] for r in rows[top + 1:]} == {"freefall"} and float(rows[-1][altitude]) == 0.0


def test_a_parachute_opening_3_m_above_the_ground_fails_in_match_and_warns_in_fly() -> None:
    # new-user trial: C6-3 on quibble-41 fires 1.9 s after apogee (inside the 2 s delay slack) and opens the
    # parachute 3.0 m above the ground at 19.4 m/s through the air; fly's card ticked every figure and match
    # failed it only for the rail exit and thrust-to-weight. In the second the device takes to open the rocket
    # falls about 19 m: it needs that much height
    data = _fly_json(QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "C6-3")
    (opening,) = data["deployments"]
    assert opening["altitude_m"] < 4.0 and opening["speed_m_s"] > 18.0
    low = [w["message"] for w in data["warnings"] if w["code"] == "deployment-low"]
    assert len(low) == 1 and "3 m above the ground" in low[0] and "shorter delay" in low[0], data["warnings"]
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "C6-3")
    assert code == 1
    height = next(line for line in out.splitlines() if line.strip().startswith(("! height", "height")))
    assert height.lstrip().startswith("!") and "3 m" in height and ">= 19 m" in height, out
    assert "deployment-low" in out
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors", "--json")
    c6 = next(c for c in json.loads(out)["candidates"] if c["designation"] == "C6-3,5,7")
    assert "deployment-low" in c6["reason_codes"] and c6["verdict"] == "fail"
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors")
    row = _table_row(out, "C6-3,5,7")
    assert "G" in row[row.index("fail"):], row
