"""The optional [geometry] tables of an airframe TOML file (issue 11): units, defaults, errors naming the key."""

from __future__ import annotations

from pathlib import Path

import pytest

from motorlib import SimulationInputError
from motorlib.files.airframe_toml import load_airframe
from motorlib.flight.airframe import Airframe
from motorlib.flight.drag import drag_table_for
from motorlib.flight.geometry import FINISHES, center_of_pressure_m
from motorlib.flight.stability import stability_for

from ..conftest import SAMPLE_DIR

BASE = '''name = "Shape test"
[airframe]
mass = "310 g"
diameter = "41.6 mm"
drag_coefficient = 0.55
mount_diameter = "29 mm"

[geometry]
cg = "24.4 in"
motor_offset = "-5 mm"
finish = "smooth_paint"

[geometry.nose]
shape = "ogive"
length = "16 cm"

[geometry.body]
length = 0.74

[geometry.fins]
count = 3
root_chord = "90 mm"
tip_chord = "40 mm"
span = "50 mm"
sweep = "60 mm"
thickness = "3 mm"
offset = "2 mm"
profile = "square"

[[geometry.transition]]
fore_diameter = "41.6 mm"
aft_diameter = "54 mm"
length = "30 mm"
position = "300 mm"

[[geometry.transition]]
fore_diameter = "54 mm"
aft_diameter = "41.6 mm"
length = "30 mm"
position = "500 mm"
'''


def _write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "frame.toml"
    path.write_text(text)
    return path


def test_geometry_is_parsed_with_units(tmp_path: Path) -> None:
    frame = load_airframe(_write(tmp_path, BASE))
    g = frame.geometry
    assert g is not None and frame.drag_coefficient == 0.55  # the flat Cd path is untouched
    assert g.cg_m == pytest.approx(24.4 * 0.0254) and g.motor_offset_m == pytest.approx(-0.005)
    assert g.nose.shape == "ogive" and g.nose.length_m == pytest.approx(0.16) and g.body.length_m == 0.74
    assert g.fins is not None and g.fins.count == 3 and g.fins.profile == "square"
    assert (g.fins.root_chord_m, g.fins.tip_chord_m, g.fins.span_m, g.fins.sweep_m, g.fins.thickness_m, g.fins.offset_m) == \
        pytest.approx((0.09, 0.04, 0.05, 0.06, 0.003, 0.002))
    assert [t.aft_diameter_m for t in g.transitions] == pytest.approx([0.054, 0.0416])
    assert g.finish.roughness_m == FINISHES["smooth_paint"] and g.launch_guide == "auto"
    assert 0.5 < float(center_of_pressure_m(g, frame.diameter_m)) < g.length_m


def test_defaults_and_a_roughness_height(tmp_path: Path) -> None:
    text = BASE.replace('motor_offset = "-5 mm"\n', "").replace('finish = "smooth_paint"', 'finish = "0.02 mm"')
    text = text.replace('offset = "2 mm"\n', "").replace('profile = "square"\n', "")
    g = load_airframe(_write(tmp_path, text)).geometry
    assert g.motor_offset_m == 0.0 and g.fins.offset_m == 0.0 and g.fins.profile == "rounded"
    assert g.finish.roughness_m == pytest.approx(2e-5)
    bare = BASE.split("[geometry.fins]")[0].replace('finish = "smooth_paint"\n', "")
    g = load_airframe(_write(tmp_path, bare)).geometry
    assert g.fins is None and g.transitions == () and g.finish.name == "paint"


def test_power_nose_takes_an_exponent(tmp_path: Path) -> None:
    text = BASE.replace('shape = "ogive"', 'shape = "power"\nexponent = 0.5')
    assert load_airframe(_write(tmp_path, text)).geometry.nose.exponent == 0.5


@pytest.mark.parametrize(("old", "new", "message"), [
    ('cg = "24.4 in"\n', "", r"geometry\.cg: missing; expected a length"),
    ('cg = "24.4 in"', 'cg = "310 g"', r"geometry\.cg: expected a length, got '310 g' \(a mass\)"),
    ('shape = "ogive"', 'shape = "bullet"', r"geometry\.nose\.shape: must be one of"),
    ('shape = "ogive"', "shape = 3", r"geometry\.nose\.shape: expected a name"),
    ('shape = "ogive"', 'shape = "ogive"\nexponent = 0.5', r"geometry\.nose\.exponent: is used only with shape 'power'"),
    ('length = "16 cm"\n', "", r"geometry\.nose\.length: missing; expected a length"),
    ("[geometry.body]\nlength = 0.74\n", "", r"\[geometry\.body\]: missing section"),
    ("count = 3", "count = 3.5", r"geometry\.fins\.count: expected a whole number"),
    ("count = 3", "count = 12", r"geometry\.fins\.count: must be a whole number from 2 to 8"),
    ('span = "50 mm"', 'span = "-50 mm"', r"geometry\.fins\.span: must be above 0"),
    ('sweep = "60 mm"\n', "", r"geometry\.fins\.sweep: missing; expected a length"),
    ('profile = "square"', 'profile = "wavy"', r"geometry\.fins\.profile: must be one of"),
    ('thickness = "3 mm"', 'thickness = "3 mm"\ncant = "1 deg"', r"geometry\.fins\.cant: unknown key"),
    ('finish = "smooth_paint"', 'finish = "chrome"', r"geometry\.finish: expected a roughness height \(a length\) or one of"),
    ('finish = "smooth_paint"', 'finsh = "paint"', r"geometry\.finsh: unknown key"),
    ('length = "30 mm"\nposition = "500 mm"', 'length = "-30 mm"\nposition = "500 mm"',
     r"geometry\.transition\[2\]\.length: must be above 0"),
    ('position = "500 mm"', 'postion = "500 mm"', r"geometry\.transition\[2\]\.postion: unknown key"),
    ('fore_diameter = "54 mm"', 'fore_diameter = "50 mm"', r"geometry\.transition\[2\]\.fore_diameter: must equal the diameter ahead"),
    ('position = "300 mm"', 'position = "510 mm"', r"geometry\.transition\[2\]\.position: must be at or behind"),
    ('offset = "2 mm"', 'offset = "700 mm"', r"geometry\.fins\.offset: fins must start behind the nose base"),
])
def test_geometry_errors_name_the_file_and_key(tmp_path: Path, old: str, new: str, message: str) -> None:
    assert old in BASE
    path = _write(tmp_path, BASE.replace(old, new, 1))
    with pytest.raises(SimulationInputError, match=message) as info:
        load_airframe(path)
    assert str(info.value).startswith(str(path))


@pytest.mark.parametrize("name", ["quibble-41", "tollgate-98"])
def test_demo_airframes_have_a_stable_geometry(name: str) -> None:
    frame = load_airframe(SAMPLE_DIR / "airframes" / f"{name}.toml")
    assert frame.geometry is not None and frame.geometry.fins is not None
    # an empty motor case of 0.1 % of the airframe mass: the margin of the airframe alone, well above 1 caliber
    margin = stability_for(frame, 0.001 * frame.mass_kg, 0.0, 0.1).margin_liftoff_cal
    assert float(margin[()]) > 1.0


def test_drag_table_for_the_demo_airframe() -> None:
    frame = load_airframe(SAMPLE_DIR / "airframes" / "tollgate-98.toml")
    mach, powered, coasting = drag_table_for(frame, max_mach=2.5)
    assert mach[0] == 0.0 and mach[-1] == pytest.approx(2.5) and powered.shape == coasting.shape == mach.shape
    # an HPR airframe of this kind: subsonic Cd of roughly 0.4–0.6 (from memory); its hand-written table says 0.48
    assert 0.35 <= coasting[30] <= 0.6
    with pytest.raises(ValueError, match="has no geometry"):
        drag_table_for(Airframe("bare", 1.0, 0.05))
