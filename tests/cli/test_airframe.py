"""``motorlib airframe`` through click's CliRunner: text in 80 columns, JSON keys, the plot file, errors (issue 11)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from motorlib import MotorRecord, write_record
from motorlib.files.airframe_toml import load_airframe
from motorlib.flight.geometry import center_of_pressure_m
from motorlib.flight.stability import stability_for

from .conftest import AIRFRAMES, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")
PNG = b"\x89PNG\r\n\x1a\n"
STABILITY_KEYS = {"cp_m", "cg_liftoff_m", "cg_burnout_m", "margin_liftoff_cal", "margin_rail_exit_cal",
                  "margin_burnout_cal", "min_margin_cal"}


def heavy_motor(folder: Path) -> Path:
    """A 29 mm motor of 0.8 kg (invented): in the Quibble 41 it puts the CG behind the CP."""
    record = MotorRecord("I195-8", np.array([0.0, 0.05, 1.95, 2.0]), np.array([0.0, 200.0, 200.0, 0.0]),
                         maker="Test (fictional)", diameter_m=0.029, length_m=0.2, total_mass_kg=0.8,
                         propellant_mass_kg=0.4, delays_s=(8.0,))
    return write_record(record, folder / "heavy.xml")


def test_text_fits_80_columns_and_ends_with_the_caution() -> None:
    code, out = run("airframe", QUIBBLE, "--motor", "F29-8")
    assert code == 0, out
    for words in ("derived airframe", "CP (subsonic)", "Stability with F29-8", "liftoff", "burnout",
                  "smallest, powered", "Drag build-up at Mach 0.3", "Estimated Cd against Mach", "airframe file gives Cd 0.55",
                  "range safety officer"):
        assert words in out, words
    assert max(len(line) for line in out.splitlines()) <= 80


def test_without_motor_shows_shape_and_drag_only() -> None:
    code, out = run("airframe", str(AIRFRAMES / "tollgate-98.toml"), "--mach", "1.2")
    assert code == 0, out
    assert "Stability with" not in out and "Drag build-up at Mach 1.2" in out and "a Cd table" in out
    assert max(len(line) for line in out.splitlines()) <= 80


def test_json_keys_and_figures() -> None:
    code, out = run("airframe", QUIBBLE, "--motor", "F29-8", "--json", "--mach", "0.5")
    assert code == 0, out
    data = json.loads(out)
    for key in ("airframe", "diameter_m", "mass_kg", "geometry", "normal_force", "cp_m", "cg_empty_m", "margin_empty_cal",
                "motor", "stability", "required_margin_cal", "nose_weight_for_stability_kg", "warnings", "drag",
                "drag_table", "drag_given", "plot", "caution"):
        assert key in data, key
    assert set(data["stability"]) == STABILITY_KEYS
    assert data["stability"]["margin_rail_exit_cal"] is None  # no flight here, so no rail exit
    frame = load_airframe(QUIBBLE)
    assert data["cp_m"] == pytest.approx(float(center_of_pressure_m(frame.geometry, frame.diameter_m)), rel=1e-12)
    m = data["motor"]
    expected = stability_for(frame, m["total_mass_kg"], m["propellant_mass_kg"], m["length_m"])
    assert data["stability"]["min_margin_cal"] == pytest.approx(float(expected.min_margin_cal[()]), rel=1e-12)
    assert data["nose_weight_for_stability_kg"] is None and data["warnings"] == []  # a stable pairing
    assert data["drag"]["mach"] == 0.5 and {"cd_powered", "cd_coasting", "components"} <= set(data["drag"])
    assert sum(data["drag"]["components"][k] for k in data["drag"]["components"] if k != "base, powered") == \
        pytest.approx(data["drag"]["cd_coasting"], rel=1e-12)
    assert {"mach", "cd_powered", "cd_coasting"} == set(data["drag_table"][0]) and data["drag_given"]["drag_coefficient"] == 0.55
    assert "range safety officer" in data["caution"]


def test_heavy_motor_is_flagged_with_the_nose_weight(tmp_path: Path) -> None:
    motor = heavy_motor(tmp_path)
    code, out = run("airframe", QUIBBLE, "--motor", str(motor), "--json")
    assert code == 0, out
    data = json.loads(out)
    assert data["stability"]["min_margin_cal"] < 0.0 and data["warnings"][0]["code"] == "unstable"
    weight = data["nose_weight_for_stability_kg"]
    assert weight > 0 and data["nose_weight_position_m"] == pytest.approx(0.08)
    code, out = run("airframe", QUIBBLE, "--motor", str(motor))
    assert code == 0 and "warning unstable" in out and f"{weight * 1e3:.0f} g at 80 mm from the tip" in out


def test_plot_is_a_png_and_never_overwrites_without_asking(tmp_path: Path) -> None:
    plot = tmp_path / "shape.png"
    code, out = run("airframe", QUIBBLE, "--motor", "F29-8", "--plot", str(plot))
    assert code == 0, out
    assert plot.read_bytes()[:8] == PNG and "Wrote" in out
    plot.write_bytes(b"keep me")
    code, out = run("airframe", QUIBBLE, "--plot", str(plot))
    assert code == 2 and "already exists" in out and "--overwrite" in out
    assert plot.read_bytes() == b"keep me"
    code, out = run("airframe", QUIBBLE, "--plot", str(plot), "--overwrite", "--json")
    assert code == 0, out
    assert plot.read_bytes()[:8] == PNG and json.loads(out)["plot"] == str(plot)


def test_plot_never_replaces_an_input(tmp_path: Path) -> None:
    frame = tmp_path / "frame.toml"
    frame.write_bytes(Path(QUIBBLE).read_bytes())
    motor = heavy_motor(tmp_path)
    for target in (frame, motor):
        before = target.read_bytes()
        code, out = run("airframe", str(frame), "--motor", str(motor), "--plot", str(target), "--overwrite")
        assert code == 2 and "is an input of this command" in out  # issue 13: one check, one status for outputs
        assert target.read_bytes() == before


def test_errors_are_clear(tmp_path: Path) -> None:
    bare = tmp_path / "bare.toml"
    bare.write_text('name = "Bare"\n[airframe]\nmass = "300 g"\ndiameter = "41.6 mm"\ndrag_coefficient = 0.5\n')
    code, out = run("airframe", str(bare))
    assert code == 2 and "[geometry]: missing section" in out  # a file this command cannot use: exit 2
    code, out = run("airframe", QUIBBLE, "--motor", "Z99")
    assert code == 2 and "no motor with that id, handle or designation" in out
    code, out = run("airframe", QUIBBLE, "--mach", "-1")
    assert code == 2


@pytest.mark.parametrize("system, unit, per_m", [("metric", "mm", 1e3), ("imperial", "in", 1 / 0.0254)])
def test_the_profile_chart_follows_the_units_switch(tmp_path, monkeypatch, system, unit, per_m) -> None:
    # `airframe --plot` drew and labelled the profile in mm whatever --units said (the table followed it)
    from motorlib.files.airframe_toml import load_airframe
    from motorlib.flight.summary import airframe_summary
    from motorlib.present import plots
    from motorlib.present.display import DisplayUnits

    seen = {}
    real_save = plots._save

    def capture(fig, path, **kwargs):
        seen["xlabels"] = [axes.get_xlabel() for axes in fig.axes]
        seen["notes"] = [text.get_text() for axes in fig.axes for text in axes.texts]
        seen["xlim"] = fig.axes[0].get_xlim()
        return real_save(fig, path, **kwargs)

    monkeypatch.setattr(plots, "_save", capture)
    frame = load_airframe(QUIBBLE)
    summary = airframe_summary(frame, None)
    plots.airframe_plot(frame, summary, tmp_path / "profile.png", units=DisplayUnits(system))
    assert f"distance from the nose tip ({unit})" in seen["xlabels"]
    cp_note = next(note for note in seen["notes"] if note.startswith("CP"))
    assert cp_note.endswith(f" {unit}")
    # 1 in = 25.4 mm exactly (international inch, 1959)
    assert float(cp_note.split("\n")[1].split()[0]) == pytest.approx(summary["cp_m"] * per_m, abs=0.51)
    assert seen["xlim"][1] == pytest.approx(frame.geometry.length_m * 1.03 * per_m, rel=0.2)
