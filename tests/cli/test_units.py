"""One units switch for every command (issue 14): option, environment, config file; JSON stays SI.

Also the number formats people read (no exponent, the user's own numbers echoed, failures never rounded
away), bare numbers (SI, or refused where they would mislead) and the 80-column screens.
"""

from __future__ import annotations

import json
import os
import re
from pathlib import Path

import pytest

from motorlib.present.display import DisplayUnits
from motorlib.present.messages import reason_text

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")
EXPONENT = re.compile(r"\d\.?\d*[eE][+-]?\d")
DESCENT = ("descent", "--mass", "450g", "--cd", "0.8", "--diameter", "0.6m", "--height", "300m")


def _config(text: str) -> Path:
    path = Path(os.environ["XDG_CONFIG_HOME"]) / "motorlib" / "config.toml"
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text)
    return path


def test_metric_by_default() -> None:
    code, out = run(*DESCENT)
    assert code == 0 and "Terminal speed: 5.6 m/s" in out and "ft" not in out


def test_the_environment_the_config_file_and_the_options_in_that_order() -> None:
    _config('units = "imperial"\n')
    assert "ft/s" in run(*DESCENT)[1]                                           # the config file
    assert "m/s" in run(*DESCENT, env={"MOTORLIB_UNITS": "metric"})[1]          # beats the config file
    assert "ft/s" in run("--units", "imperial", *DESCENT, env={"MOTORLIB_UNITS": "metric"})[1]  # the group option
    assert "m/s" in run("--units", "imperial", *DESCENT, "--units", "metric")[1]  # the command's own option
    assert "m/s" in run("--units", "si", *DESCENT)[1]                           # si is another name for metric


def test_a_broken_setting_names_its_source() -> None:
    code, out = run(*DESCENT, env={"MOTORLIB_UNITS": "cubits"})
    assert code == 2 and "MOTORLIB_UNITS" in out and "metric or imperial" in out
    path = _config('units = "cubits"\n')
    code, out = run(*DESCENT)
    assert code == 2 and str(path) in out.replace("\n", "")
    _config('unit = "imperial"\n')
    code, out = run(*DESCENT)
    assert code == 2 and "unit: unknown key" in out


def test_json_stays_si() -> None:
    metric = json.loads(run(*DESCENT, "--json")[1])
    assert json.loads(run(*DESCENT, "--json", "--units", "imperial")[1]) == metric


def test_fly_in_imperial_units_table_csv_and_json(tmp_path: Path) -> None:
    csv_path = tmp_path / "t.csv"
    code, out = run("fly", QUIBBLE, "--motor", "F29-8", "--units", "imperial", "--csv", str(csv_path))
    assert code == 0, out
    assert re.search(r"apogee\s+1,6\d\d ft", out) and "ft/s" in out and " oz" in out and "psi" in out
    assert " m/s" not in out and " m " not in out
    assert csv_path.read_text().splitlines()[0] == ("time_s,x_ft,y_ft,altitude_ft,east_ft,north_ft,vx_ft_s,vy_ft_s,vz_ft_s,"
                                                    "ax_ft_s2,ay_ft_s2,az_ft_s2,phase")
    assert not EXPONENT.search(out)


def test_match_echoes_the_users_numbers_and_converts_the_rest() -> None:
    # A US flyer thinking in feet: 2300 ft stays 2300 ft (not 701.04 m) in a metric report too.
    code, out = run("match", QUIBBLE, "--target", "1300ft", "--ceiling", "2300ft", "--allow-smaller-motors")
    assert code == 0, out
    out = " ".join(out.split())  # prose wraps at 80 columns
    assert "target 1300 ft" in out and "ceiling 2300 ft" in out and "above 2300 ft" in out
    assert "rail 2.4 m at 5 deg" in out and "120 m elevation" in out  # the airframe file's own words
    code, out = run("match", QUIBBLE, "--target", "400", "--ceiling", "600", "--units", "imperial")
    out = " ".join(out.split())  # prose wraps at 80 columns
    assert "target 400 m" in out and re.search(r"apogee [\d,]+ ft above 600 m", out)
    assert "rail exit >= 49.2 ft/s" in out and "descent <= 21.3 ft/s" in out
    code, out = run("match", QUIBBLE, "--target", "400", "--units", "imperial", "--csv")
    header = out.splitlines()[0].split(",")
    assert {"apogee_ft", "rail_exit_speed_ft_s", "liftoff_mass_lb", "diameter_mm", "total_impulse_ns"} <= set(header)


def test_check_catalog_and_reduce_follow_the_switch(tmp_path: Path) -> None:
    code, out = run("check", str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"), "--units", "imperial")
    assert code == 0 and re.search(r"total / propellant mass\s+4\.\d oz / 2\.\d oz", out)
    code, out = run("check", str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"))
    assert re.search(r"total / propellant mass\s+126 g / 61 g", out)
    code, out = run("catalog", "list", "--catalog", str(SAMPLE_DIR), "--units", "imperial", env={"COLUMNS": "130"})
    header = out.split("───")[0]
    assert code == 0 and "mass" in header and "lb" in header
    code, out = run("catalog", "list", "--catalog", str(SAMPLE_DIR), "--units", "imperial", "--csv")
    assert "total_mass_lb" in out.splitlines()[0] and "diameter_mm" in out.splitlines()[0]
    code, out = run("catalog", "show", "--catalog", str(SAMPLE_DIR), "G59-10", "--units", "imperial")
    assert code == 0 and " oz" in out


def test_demo_in_imperial_units(tmp_path: Path) -> None:
    # not os.devnull: before issue 13 the chart's atomic rename replaced /dev/null itself when run as root
    code, out = run("--units", "imperial", "demo", "--plot", str(tmp_path / "demo.png"))
    assert code == 0, out
    assert "target 1300 ft" in out and "ft/s" in out and "Caution" in out


def test_rounding_never_hides_a_failure_in_a_reason() -> None:
    # Issue 14: "descent too fast: 6.5 m/s (limit 6.5 m/s)" when the value is 6.52.
    candidate, conditions = {"landing_speed_m_s": 6.52}, {"max_landing_speed_m_s": 6.5}
    assert reason_text("descent-fast", "", candidate, conditions, DisplayUnits()).startswith(
        "descent too fast: 6.52 m/s under the device (limit 6.5 m/s)")
    candidate = {"apogee_m": 600.2}
    assert reason_text("over-ceiling", "", candidate, {"ceiling_m": 600.0}, DisplayUnits()) == \
        "over the ceiling: apogee 600.2 m above 600 m"


@pytest.mark.parametrize(("args", "needle"), [
    (("fly", QUIBBLE, "--motor", "F29-8", "--ballast", "25"), "'25' has no unit"),
    (("catalog", "list", "--catalog", str(SAMPLE_DIR), "--diameter", "29"), "'29' has no unit"),
    (("descent", "--mass", "450", "--drag-area", "0.2"), "'450' has no unit"),
    (("check", str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"), "--total-mass", "120"), "'120' has no unit"),
])
def test_bare_numbers_that_would_mislead_are_refused(args: tuple[str, ...], needle: str) -> None:
    # Issue 14: `--ballast 25` was 25 g while `mass = 115` in TOML is 115 kg; now a bare number is SI or refused.
    code, out = run(*args)
    assert code == 2 and needle in out


def test_quantity_options_take_units() -> None:
    code, out = run("descent", "--height", "82m", "--fall-time", "9.5s", "--mass", "15g", "--json")
    assert code == 0 and json.loads(out)["fall_time_s"] == 9.5
    by_area = json.loads(run("descent", "--mass", "1lb", "--drag-area", "280in2", "--json")[1])
    assert by_area["drag_area_m2"] == pytest.approx(280 * 0.0254**2)
    assert json.loads(run("descent", "--mass", "1lb", "--drag-area", "0.1806448", "--json")[1]) == \
        pytest.approx(by_area)
    code, out = run("fly", QUIBBLE, "--motor", "F29-8", "--delay", "8s", "--ballast", "25g", "--json")
    assert code == 0 and json.loads(out)["chosen_delay_s"] == 8.0


def test_screens_fit_80_columns_without_exponents() -> None:
    # Issue 14: the verdict column was cut or wrapped one word a line; "1.2e+02 m/s" and "1.348e+04 g" appeared.
    code, out = run("match", QUIBBLE, "--target", "400", "--ceiling", "600", "--allow-smaller-motors", "--ballast",
                    "--show-rejected")
    assert code == 0
    lines = out.splitlines()
    assert max(len(line) for line in lines) <= 80 and not EXPONENT.search(out) and "…" not in out
    words = r"pass|pass with ballast|off target|fail( [A-Z])+|no fit|no liftoff|stuck on rail|above class|no masses"
    rows = [line for line in lines if re.match(rf"^\s*\d+  \S.*  ({words})\s*$", line)]
    assert len(rows) == 27  # every candidate on exactly one line, its codes included
    assert "Fail codes:" in out and re.search(r"\bno fit: does not fit the mount", out.replace("\n", " "))
    code, out = run("check", str(SAMPLE_DIR))
    assert code == 0 and max(len(line) for line in out.splitlines()) <= 80
    assert all(line.rstrip().endswith("sound") for line in out.splitlines() if "_" in line and "%" in line)


def test_wider_terminals_get_more_columns() -> None:
    narrow = run("match", QUIBBLE, "--target", "400", "--top", "3")[1]
    wide = run("match", QUIBBLE, "--target", "400", "--top", "3", env={"COLUMNS": "140"})[1]
    assert "maker" not in narrow and "maker" in wide and "liftoff" in wide  # the rocket's liftoff mass ("loaded" read as the motor's)
    wide = run("catalog", "list", "--catalog", str(SAMPLE_DIR), env={"COLUMNS": "140"})[1]
    assert all(name in wide for name in ("maker", "length", "mass", "Marmalade Moon Motors"))


def test_one_designation_from_two_makers_is_told_apart(tmp_path: Path) -> None:
    source = (SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml").read_text()
    other = tmp_path / "other-g59.xml"
    other.write_text(source.replace("Bramblewick Propulsion (fictional)", "Quillmoss Rocketry (fictional)"))
    cat = str(tmp_path / "cat")
    assert run("catalog", "add", "--catalog", cat, str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"),
               str(other))[0] == 0
    out = run("catalog", "list", "--catalog", cat)[1]
    assert "G59-10 Bramblewick" in out and "G59-10 Quillmoss" in out


def test_catalog_list_sorts_by_the_header_names() -> None:
    code, out = run("catalog", "list", "--catalog", str(SAMPLE_DIR), "--class", "G", "--sort", "thrust", "--json")
    thrusts = [r["average_thrust_n"] for r in json.loads(out)]
    assert code == 0 and thrusts == sorted(thrusts)
    code, out = run("catalog", "list", "--catalog", str(SAMPLE_DIR), "--sort", "colour")
    assert code == 2 and "thrust" in out and "impulse" in out


def test_catalog_show_gives_the_provenance() -> None:
    code, out = run("catalog", "show", "--catalog", str(SAMPLE_DIR), "G59-10")
    assert code == 0
    assert re.search(r"source\s+demo", out) and re.search(r"test date\s+2026-12-01", out) and "Invented" in out


def test_new_airframe_writes_a_template_that_loads_and_never_overwrites(tmp_path: Path) -> None:
    from motorlib.files.airframe_toml import load_airframe

    path = tmp_path / "rocket.toml"
    code, out = run("new-airframe", str(path))
    assert code == 0 and path.exists() and "# " in path.read_text()
    assert load_airframe(path).mount_diameter_m == pytest.approx(0.029)
    code, out = run("new-airframe", str(path), "--units", "imperial")
    assert code == 2 and "--overwrite" in out and "ft" not in path.read_text().split("[launch]")[1][:40]
    code, out = run("new-airframe", str(path), "--units", "imperial", "--overwrite")
    assert code == 0 and '"6 ft"' in path.read_text()
    assert load_airframe(path).launch.rail_length_m == pytest.approx(6 * 0.3048)


def test_progress_bars_only_on_a_terminal_and_for_long_work(monkeypatch: pytest.MonkeyPatch) -> None:
    import io

    from rich.console import Console

    from motorlib.cli import catalog as catalog_cli

    monkeypatch.setattr(catalog_cli, "_err_console", lambda: Console(file=io.StringIO(), force_terminal=False))
    with catalog_cli._progress("work", 500) as advance:
        assert advance is None
    terminal = Console(file=io.StringIO(), force_terminal=True)
    monkeypatch.setattr(catalog_cli, "_err_console", lambda: terminal)
    with catalog_cli._progress("work", 5) as advance:
        assert advance is None
    with catalog_cli._progress("work", 500) as advance:
        assert advance is not None
        advance(500)


def test_flight_warnings_follow_the_units_and_never_round_a_failure_away() -> None:
    from motorlib.flight.rules import LaunchRules
    from motorlib.present.messages import reason_text

    summary = {"landing_speed_m_s": 6.52, "rail_exit_speed_m_s": 14.96}
    limits = LaunchRules().conditions(0.0)
    assert reason_text("descent-fast", "", summary, limits, DisplayUnits()).startswith(
        "descent too fast: 6.52 m/s under the device (limit 6.5 m/s)")
    assert reason_text("rail-exit-slow", "", summary, limits, DisplayUnits("imperial")).startswith(
        "rail exit too slow: 49.1 ft/s, below 49.2 ft/s")
    assert reason_text("new-code", "library words", summary, limits, DisplayUnits()) == "library words"


def test_a_fast_descent_keeps_the_library_advice_in_display_units() -> None:
    # new-user trial: a main that opened too low was told "use a larger recovery device" on the card although the
    # rule book's own message said to open it higher; the display wording kept only its own advice
    from motorlib.flight.rules import LaunchRules

    limits = LaunchRules().conditions(0.0)
    message = ("descent too fast: 7.1 m/s under the device (limit 6.5 m/s): the device opened too low to slow to "
               "its descent rate before landing: open it higher (see its own finding)")
    shown = reason_text("descent-fast", message, {"landing_speed_m_s": 7.1}, limits, DisplayUnits("imperial"))
    assert shown.startswith("descent too fast: 23.3 ft/s under the device (limit 21.3 ft/s): the device opened too low")
    plain = reason_text("descent-fast", "", {"landing_speed_m_s": 7.1}, limits, DisplayUnits())
    assert plain.endswith("use a larger recovery device")


def test_fly_card_warnings_follow_the_units_switch() -> None:
    # 10 oz of ballast slows the rail exit below 15 m/s and the descent above 6.5 m/s: both warnings in ft/s
    code, out = run("--units", "imperial", "fly", QUIBBLE, "--motor", "F29-8", "--ballast", "10oz")
    assert code == 1, out  # the ballast breaks the rail-exit and thrust-to-weight rules: status 1
    flat = " ".join(out.split())
    assert "descent too fast" in flat and "ft/s" in flat
    assert " m/s" not in flat.split("Assumptions")[0]


@pytest.mark.parametrize("system", ["metric", "imperial"])
def test_the_template_geometry_block_loads_when_uncommented(tmp_path: Path, system: str) -> None:
    # the commented [geometry] block is a complete shape: uncommented, `motorlib airframe` can use it at once
    from motorlib.files.airframe_template import airframe_template
    from motorlib.files.airframe_toml import load_airframe

    text = airframe_template(system)
    head, block = text.split("# [geometry]\n")
    uncommented = head + "[geometry]\n" + "\n".join(line[2:] if line.startswith("# ") else line
                                                  for line in block.splitlines()) + "\n"
    path = tmp_path / "shaped.toml"
    path.write_text(uncommented)
    frame = load_airframe(path)
    assert frame.geometry is not None and frame.geometry.fins.count == 3
    code, out = run("airframe", str(path), "--motor", "F29-8", "--json")
    assert code == 0, out
    assert json.loads(out)["stability"]["margin_liftoff_cal"] > 1.0  # a sound example shape: stable


@pytest.mark.parametrize(("args", "option"), [
    (("match", QUIBBLE, "--target", "-5"), "--target"),
    (("match", QUIBBLE, "--ceiling", "0"), "--ceiling"),
    (("fly", QUIBBLE, "--motor", "F29-8", "--ballast", "-50g"), "--ballast"),
    (("fly", QUIBBLE, "--motor", "F29-8", "--delay", "-3"), "--delay"),
    (("descent", "--mass", "1kg", "--drag-area", "0.1", "--height", "-100"), "--height"),
])
def test_signs_that_make_no_sense_are_refused_with_the_option_name(args: tuple[str, ...], option: str) -> None:
    code, out = run(*args)
    assert code == 2 and option in out and "_m" not in out and "_kg" not in out, out


def test_match_csv_carries_the_caution_on_stderr_and_says_when_stability_is_not_checked() -> None:
    from click.testing import CliRunner

    from motorlib.cli.main import main

    result = CliRunner().invoke(main, ["match", QUIBBLE, "--target", "400", "--csv"])
    assert result.exit_code == 0
    assert "Caution" in result.stderr and "Caution" not in result.stdout  # the CSV stays clean data
    plain = str(SAMPLE_DIR / "airframes" / "fennelwick-24.toml")  # no [geometry]
    code, out = run("match", plain, "--target", "200", "--min-stability", "2", "--allow-smaller-motors")
    assert code == 0 and "stability not checked" in " ".join(out.split())


def test_nose_weight_reasons_follow_the_units_and_never_read_zero() -> None:
    from motorlib.present.messages import reason_text, small_mass

    u = DisplayUnits("imperial")
    assert small_mass(u, 0.0008) == "0.03 oz"  # 0.8 g = 0.0282 oz (avoirdupois ounce, exact in grams)
    c = {"stability_margin_cal": 0.98, "nose_weight_for_stability_kg": 0.0327}
    text = reason_text("stability-low", "library text in g", c, {"min_stability_cal": 1.0}, u)
    assert text == "stability margin 0.98 cal, below 1 cal; 1.2 oz of nose weight restores it"


def test_field_day_wind_replaces_a_measured_profile(tmp_path: Path) -> None:
    # --wind on a file with a wind_profile changed nothing but the rail rule: the profile was flown regardless
    frame = tmp_path / "profiled.toml"
    frame.write_text(Path(QUIBBLE).read_text().replace(
        "[launch]", '[launch]\nwind_profile = [[0, 2, 270], [500, 6, 270]]', 1))
    def landing(*extra: str) -> dict:
        code, out = run("fly", str(frame), "--motor", "F29-8", "--json", *extra)
        assert code in (0, 1), out
        return json.loads(out[out.index("{"):])["landing"]
    calm, strong = landing(), landing("--wind", "9m/s", "--wind-from", "90deg")
    assert strong["east_m"] < 0 < calm["east_m"]  # the wind now blows from the east: the rocket lands west


@pytest.mark.parametrize(("option", "value", "words"), [
    ("--rail-azimuth", "400deg", "between 0 and 360 degrees"), ("--temperature", "-300degC", "between 180 and 340 K"),
    ("--elevation", "40000m", "between -1000 and 9000 m"),
])
def test_field_day_values_out_of_range_name_the_option_as_typed(option: str, value: str, words: str) -> None:
    code, out = run("fly", QUIBBLE, "--motor", "F29-8", option, value)
    flat = " ".join(out.split())
    assert code == 2 and option in flat and words in flat and "_k" not in flat and " rad" not in flat, out


def test_the_rail_rule_reads_the_flown_profile_wind_not_the_unused_key(tmp_path: Path) -> None:
    # with a measured profile flown, the 4 x wind rail rule used the file's wind_speed key (5 m/s: 20 m/s needed)
    # instead of the profile's 10 m wind (2 m/s here: the 15 m/s minimum rules)
    frame = tmp_path / "profiled.toml"
    text = Path(QUIBBLE).read_text()
    frame.write_text(text.replace("[launch]", '[launch]\nwind_profile = [[0, 2, 270], [500, 2, 270]]', 1)
                     .replace('wind_speed = "3 m/s"', 'wind_speed = "5 m/s"'))
    code, out = run("match", str(frame), "--target", "400", "--json")
    assert json.loads(out)["conditions"]["rail_exit_needed_m_s"] == pytest.approx(15.0)


@pytest.mark.parametrize("system", ["metric", "imperial"])
def test_the_commands_new_airframe_suggests_succeed(system: str, tmp_path: Path,
                                                    monkeypatch: pytest.MonkeyPatch) -> None:
    # new-user trial: the suggested `motorlib fly rocket.toml --motor F29-8` failed (rail exit 14.8 m/s, status 1)
    import shlex

    monkeypatch.chdir(tmp_path)
    code, out = run("new-airframe", "rocket.toml", "--units", system)
    assert code == 0, out
    suggested = re.findall(r"'(motorlib [^']+)'", " ".join(out.split()))
    tried = re.findall(r"(motorlib \S+ rocket\.toml .*?)(?:\s{2,}|\n)", (tmp_path / "rocket.toml").read_text())
    assert suggested and len(tried) == 2, (out, tried)  # the 'Wrote' line; the file's fly and match
    for command in {*suggested, *tried}:
        code, out = run(*shlex.split(command)[1:])
        assert code == 0, (command, out)
        if command.startswith("motorlib fly"):
            assert "warning" not in out, out  # a clean first flight, not one that passes with a warning
