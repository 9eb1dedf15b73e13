"""``motorlib scatter`` through click's CliRunner: the JSON contract, the plot, options and the file's table."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from .conftest import AIRFRAMES, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")


def test_scatter_json_follows_the_contract() -> None:
    # Issue 12's JSON contract: these exact keys (more are allowed).
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "60", "--seed", "5", "--workers", "1",
                    "--ceiling", "520", "--field-radius", "400", "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["n_flights"] == 60 and data["seed"] == 5
    assert {"p5", "p50", "p95", "mean", "std"} <= set(data["apogee_m"])
    assert 0.0 <= data["p_over_ceiling"] <= 1.0 and 0.0 <= data["p_outside_field"] <= 1.0
    assert set(data["landing"]["ellipse95"]) == {"east_m", "north_m", "semi_major_m", "semi_minor_m", "orientation_deg"}


def test_scatter_table_and_plot_and_no_overwrite(tmp_path: Path) -> None:
    plot = tmp_path / "s.png"
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "40", "--workers", "1", "--target", "480",
                    "--ceiling", "520", "--field-radius", "400", "--plot", str(plot))
    assert code == 0, out
    assert "apogee" in out and "95 % landing ellipse" in out and "range safety officer" in out
    assert plot.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "40", "--plot", str(plot))
    assert code != 0 and "--overwrite" in out
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "40", "--workers", "1", "--plot", str(plot),
                    "--overwrite")
    assert code == 0, out


def test_no_uncertainty_gives_the_nominal_apogee_every_time() -> None:
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "5", "--workers", "1", "--no-uncertainty", "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["apogee_m"]["std"] < 1e-9
    assert data["apogee_m"]["p5"] == data["apogee_m"]["p95"] == data["nominal_apogee_m"]


def test_the_file_table_and_options_set_the_uncertainty(tmp_path: Path) -> None:
    frame = tmp_path / "r.toml"
    frame.write_text(Path(QUIBBLE).read_text() + '\n[uncertainty]\ndrag = "8 %"\nwind_direction = "10 deg"\n'
                     'temperature = "3.6 degF"\n')
    code, out = run("scatter", str(frame), "--motor", "F29-8", "-n", "5", "--workers", "1", "--wind-speed-std",
                    "2", "--json")
    assert code == 0, out
    u = json.loads(out)["uncertainty"]
    assert u["drag_relative_std"] == 0.08 and u["wind_speed_std_m_s"] == 2.0
    assert abs(u["wind_direction_std_rad"] - 0.17453292519943295) < 1e-12
    assert abs(u["pad_temperature_std_k"] - 2.0) < 1e-12


def test_bad_uncertainty_entries_name_the_key(tmp_path: Path) -> None:
    frame = tmp_path / "r.toml"
    frame.write_text(Path(QUIBBLE).read_text() + '\n[uncertainty]\ndrag = "lots"\n')
    code, out = run("scatter", str(frame), "--motor", "F29-8", "-n", "5")
    assert code == 2 and "uncertainty.drag" in out
    frame.write_text(Path(QUIBBLE).read_text() + '\n[uncertainty]\ndarg = "5 %"\n')
    code, out = run("fly", str(frame), "--motor", "F29-8")
    assert code == 2 and "uncertainty.darg" in out


def test_match_robust_json_and_windows() -> None:
    code, out = run("match", QUIBBLE, "--robust", "--samples", "20", "--workers", "1", "--allow-smaller-motors",
                    "--altitude-window", "250m..330m", "--duration-window", "20s..200s", "--json")
    assert code == 0, out
    data = json.loads(out)
    # not a terminal: one compact line, as `match --json` (indenting only pays for a person reading it)
    assert out.count("\n") == 1
    assert data["n_samples"] == 20 and data["windows"]["altitude_m"] == [250.0, 330.0]
    best = data["candidates"][0]
    assert best["designation"] == "E25-7" and best["p_success"] > 0.5
    assert {"p_success", "p_success_standard_error", "apogee_m", "failures"} <= set(best)


def test_match_robust_table_and_bad_window() -> None:
    code, out = run("match", QUIBBLE, "--robust", "--samples", "10", "--workers", "1", "--allow-smaller-motors",
                    "--altitude-window", "800ft..1100ft")
    assert code == 0, out
    flat = " ".join(out.split())
    assert "success" in flat and "the altitude window" in flat  # the key says what success was judged on
    assert all(len(line) <= 80 for line in out.splitlines()), out
    code, out = run("match", QUIBBLE, "--robust", "--altitude-window", "260m..240m")
    assert code == 2 and "low end" in out


def test_a_measured_firing_spread_replaces_the_motor_default(tmp_path: Path) -> None:
    from dataclasses import replace

    from motorlib import FiringSpread, write_record
    from motorlib.files.curvefiles import load_curve_file

    from ..conftest import SAMPLE_DIR

    motor = load_curve_file(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml")
    measured = replace(motor, firing_spread=FiringSpread(5, motor.total_impulse_ns, 0.004 * motor.total_impulse_ns,
                                                         1.7, 0.017))
    path = tmp_path / "f29-measured.xml"
    write_record(measured, path)
    code, out = run("scatter", QUIBBLE, "--motor", str(path), "-n", "5", "--workers", "1", "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["firing_spread"]["n_firings"] == 5 and data["firing_spread"]["source"] == "motor record"
    assert abs(data["uncertainty"]["total_impulse_relative_std"] - 0.004) < 1e-12
    assert abs(data["uncertainty"]["burn_time_relative_std"] - 0.01) < 1e-12


def test_a_bare_relative_std_of_one_or_more_asks_for_a_percent_sign() -> None:
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "--drag-std", "8")
    assert code == 2 and "8%" in out
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "20", "--workers", "1", "--drag-std", "8%",
                    "--delay", "8s", "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["uncertainty"]["drag_relative_std"] == 0.08 and data["delay_s"] == 8.0


def test_the_landing_ellipse_centre_is_told_in_compass_words() -> None:
    from motorlib.present.scatter import _offset
    from motorlib.present.display import DisplayUnits

    assert _offset(DisplayUnits(), -373.0, "north", "south") == "373 m south"
    assert _offset(DisplayUnits(), 6.0, "east", "west") == "6 m east"


def test_bare_numbers_take_the_unit_the_help_states() -> None:
    # --wind-from's help says a bare number is degrees: 90 must be 90 deg, not 90 rad; --cg-std asks for a unit
    def summary(*args: str) -> dict:
        code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "30", "--seed", "2", "--workers", "1",
                        "--json", *args)
        assert code == 0, out
        return json.loads(out)

    assert summary("--wind-from", "90") == summary("--wind-from", "90deg")
    assert summary("--cg-std", "5mm")["uncertainty"]["cg_std_m"] == 0.005  # a bare 5 is refused: it would be 5 m
    assert summary("--wind-direction-std", "10")["uncertainty"]["wind_direction_std_rad"] == \
        pytest.approx(10 * 3.141592653589793 / 180)  # exact by definition of the degree


def test_a_small_standard_error_is_not_shown_as_zero() -> None:
    # "Mean apogee 495 m ± 0 m (standard error)" for 0.43 m: a standard error keeps two significant digits
    from motorlib.present.display import DisplayUnits

    assert DisplayUnits().precise(0.43, "length", 2) == "0.43 m"
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "3000", "--seed", "2", "--workers", "1")
    assert code in (0, 1), out
    error = " ".join(out.split()).split(" ± ")[1].split(" (standard error)")[0]
    assert error not in ("0 m", "0 ft") and float(error.split()[0]) > 0


def test_the_text_output_lists_the_spreads_it_sampled() -> None:
    # Only --json said which uncertainties were sampled: a safety officer checking a printed scatter could not
    code, out = run("scatter", QUIBBLE, "--motor", "F29-8", "-n", "30", "--seed", "2", "--workers", "1",
                    "--wind-speed-std", "2m/s", "--cg-std", "15mm", "--drag-std", "0")
    flat = " ".join(out.split())
    assert "Sampled spreads (one standard deviation): impulse 3 %" in flat
    assert "wind 2 m/s" in flat and "CG 15 mm" in flat and "drag" not in flat.split("Sampled spreads")[1].split(".")[0]
    code, out = run("--units", "imperial", "scatter", QUIBBLE, "--motor", "F29-8", "-n", "30", "--seed", "2",
                    "--workers", "1", "--cg-std", "0.5in")
    assert "CG 0.5 in" in " ".join(out.split())


def test_match_robust_says_what_target_does_and_refuses_a_tolerance() -> None:
    # new-user trial: with --target and no window, motors 2.5 x over the target had 100 % success and nothing said
    # that the target is not judged: it orders motors of equal success; a tolerance of it means nothing here
    code, out = run("match", QUIBBLE, "--robust", "--samples", "5", "--workers", "1", "--allow-smaller-motors",
                    "--target", "300")
    assert code == 0, out
    flat = " ".join(out.split())
    assert "--target only orders motors of equal success" in flat and "--altitude-window" in flat, out
    code, out = run("match", QUIBBLE, "--robust", "--samples", "5", "--target", "300", "--target-tolerance", "10%")
    assert code == 2 and "--target-tolerance" in out and "--altitude-window" in out, out
    # the refusal of a plain-only option gives no advice about apogee that has nothing to do with it
    code, out = run("match", QUIBBLE, "--robust", "--samples", "5", "--csv")
    assert code == 2 and "--csv" in out and "altitude-window" not in out, out
