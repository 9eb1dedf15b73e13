"""Airframe TOML files: units accepted, errors naming the key and the expected kind."""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from motorlib import SimulationInputError
from motorlib.files.airframe_toml import load_airframe

from ..conftest import SAMPLE_DIR

BASE = '''name = "Test frame"
[airframe]
mass = "310 g"
diameter = "1.64 in"
drag_coefficient = 0.55
mount_diameter = "29 mm"
mount_length = "200 mm"
[launch]
rail_length = "1.5 m"
rail_angle = "5 deg"
elevation = "800 ft"
temperature = "15 degC"
wind_speed = "3 m/s"
[recovery]
device = "parachute"
deploy = "ejection"
drag_coefficient = 0.8
diameter = "0.6 m"
'''


def _write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "frame.toml"
    path.write_text(text)
    return path


def test_units_are_converted(tmp_path: Path) -> None:
    frame = load_airframe(_write(tmp_path, BASE))
    assert frame.mass_kg == pytest.approx(0.31)
    assert frame.diameter_m == pytest.approx(1.64 * 0.0254)  # inch = 25.4 mm exactly (pint agrees)
    assert frame.mount_diameter_m == pytest.approx(0.029) and frame.mount_length_m == pytest.approx(0.2)
    assert frame.launch.rail_angle_rad == pytest.approx(math.radians(5))
    assert frame.launch.site.elevation_m == pytest.approx(243.84)
    assert frame.launch.site.temperature_k == pytest.approx(288.15)
    assert frame.recovery.drag_area_m2 == pytest.approx(0.8 * math.pi * 0.3**2)


def test_plain_numbers_are_si_and_tables_work(tmp_path: Path) -> None:
    text = BASE.replace('mass = "310 g"', "mass = 0.31").replace("drag_coefficient = 0.55",
                                                                 "drag_table = [[0.0, 0.5], [0.9, 0.6], [1.2, 0.7]]")
    text = text.replace('wind_speed = "3 m/s"', 'wind_speed = "3 m/s"\npressure = "980 hPa"')
    frame = load_airframe(_write(tmp_path, text))
    assert frame.mass_kg == 0.31 and frame.drag_table == ((0.0, 0.5), (0.9, 0.6), (1.2, 0.7))
    assert frame.launch.site.pressure_pa == pytest.approx(98_000.0)


@pytest.mark.parametrize(("old", "new", "message"), [
    ('rail_length = "1.5 m"', 'rail_length = "3 kg"', r"launch\.rail_length: expected a length, got '3 kg' \(a mass\)"),
    ('mass = "310 g"', 'mass = "-310 g"', r"airframe\.mass: must be above 0"),
    ('mass = "310 g"\n', "", r"airframe\.mass: missing; expected a mass"),
    ('diameter = "1.64 in"', 'diameter = "1.64 furlongs"', r"airframe\.diameter: unknown length unit"),
    # a negative body was blamed on the mount ("mount_diameter: 0.029 m is wider than the body"; new-user trial)
    ('diameter = "1.64 in"', 'diameter = "-1.64 in"', r"airframe\.diameter: must be above 0"),
    ('drag_coefficient = 0.55', 'drag_coefficent = 0.55', r"airframe\.drag_coefficent: unknown key"),
    ('rail_angle = "5 deg"', 'rail_angle = "45 deg"', r"launch\.rail_angle: must lie between 0 and 30 degrees"),
    ('device = "parachute"', 'device = "balloon"', r"recovery\.device: must be one of"),
    ('diameter = "0.6 m"\n', "", r"recovery\.diameter: missing; expected a length"),
    ('temperature = "15 degC"', 'temperature = "warm"', r"launch\.temperature: expected a temperature"),
    ('name = "Test frame"', 'name = "Test frame', r"TOML: not valid TOML"),
])
def test_errors_name_the_file_and_key(tmp_path: Path, old: str, new: str, message: str) -> None:
    path = _write(tmp_path, BASE.replace(old, new, 1))
    with pytest.raises(SimulationInputError, match=message) as info:
        load_airframe(path)
    assert str(info.value).startswith(str(path))
    assert isinstance(info.value, ValueError)


def test_bundled_airframes_load() -> None:
    names = sorted(p.stem for p in (SAMPLE_DIR / "airframes").glob("*.toml"))
    assert len(names) >= 3
    for name in names:
        frame = load_airframe(SAMPLE_DIR / "airframes" / f"{name}.toml")
        assert "(demo)" in frame.name and frame.mount_diameter_m is not None


def test_recovery_area_takes_a_unit_and_values_remember_their_text(tmp_path: Path) -> None:
    # Issue 14: drag area in m² or in²; reports echo the file's own numbers ("800 ft", not 243.84 m).
    text = BASE.replace('diameter = "0.6 m"', 'area = "78 in2"')
    frame = load_airframe(_write(tmp_path, text))
    assert frame.recovery.drag_area_m2 == pytest.approx(0.8 * 78 * 0.0254**2)
    assert frame.launch.site.elevation_m.text == "800 ft" and frame.launch.rail_length_m.text == "1.5 m"
    bare = load_airframe(_write(tmp_path, text.replace('area = "78 in2"', "area = 0.05")))
    assert bare.recovery.drag_area_m2 == pytest.approx(0.8 * 0.05)


@pytest.mark.parametrize(("old", "new", "field"), [
    ('mount_diameter = "29 mm"', "mount_diameter = 54", "airframe.mount_diameter"),  # 54 m: a unit forgotten
    ('diameter = "0.6 m"', 'diameter = "-0.6 m"', "recovery.diameter"),  # squared into a positive area before
])
def test_sizes_that_cannot_be_are_refused_with_the_key(tmp_path: Path, old: str, new: str, field: str) -> None:
    text = (SAMPLE_DIR / "airframes" / "quibble-41.toml").read_text()
    assert old in text
    path = tmp_path / "bad.toml"
    path.write_text(text.replace(old, new, 1))
    with pytest.raises(SimulationInputError) as info:
        load_airframe(path)
    assert field in str(info.value)
