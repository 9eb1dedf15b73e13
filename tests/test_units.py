"""Unit conversions, each factor checked against pint (an independent reference library)."""

from __future__ import annotations

import pint
import pytest

from motorlib import QuantityError
from motorlib.units import INCH_OF_MERCURY_PA, PSI_PA, UNITS, parse_quantity, to_si

from .reference.values import PRESSURE_UNITS

UREG = pint.UnitRegistry()

# Our symbol -> pint expression; reference library: pint's default registry
# (tests/reference/check_values.md#units-pint).
PINT_NAMES = {
    ("length", "in"): "inch", ("length", "ft"): "foot", ("length", "mm"): "millimeter", ("length", "cm"): "centimeter",
    ("length", "km"): "kilometer", ("length", "m"): "meter",
    ("mass", "oz"): "ounce", ("mass", "lb"): "pound", ("mass", "g"): "gram", ("mass", "kg"): "kilogram",
    ("time", "ms"): "millisecond", ("time", "s"): "second", ("time", "us"): "microsecond",
    ("force", "ozf"): "force_ounce",
    ("force", "lbf"): "force_pound", ("force", "kgf"): "force_kilogram", ("force", "gf"): "force_gram",
    ("force", "N"): "newton", ("force", "kN"): "kilonewton",
    ("impulse", "Ns"): "newton * second", ("impulse", "lbfs"): "force_pound * second",
    ("speed", "ft/s"): "foot / second", ("speed", "mph"): "mile / hour", ("speed", "km/h"): "kilometer / hour",
    ("speed", "m/s"): "meter / second", ("angle", "deg"): "degree", ("angle", "rad"): "radian",
    ("area", "m²"): "meter ** 2", ("area", "cm²"): "centimeter ** 2", ("area", "mm²"): "millimeter ** 2",
    ("area", "in²"): "inch ** 2", ("area", "ft²"): "foot ** 2",
}
SI = {"length": "meter", "mass": "kilogram", "time": "second", "force": "newton", "impulse": "newton * second",
      "speed": "meter / second", "angle": "radian", "area": "meter ** 2"}


@pytest.mark.parametrize(("kind", "unit"), [(k, u) for k, table in UNITS.items() for u in table])
def test_every_factor_matches_pint(kind: str, unit: str) -> None:
    expected = UREG.Quantity(1.0, PINT_NAMES[(kind, unit)]).to(SI[kind]).magnitude
    assert to_si(1.0, unit, kind) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(("text", "kind", "expected"), [
    ("13mm", "length", 0.013), ("0.5 in", "length", 0.0127), ("24g", "mass", 0.024),
    ("0.85 oz", "mass", 0.85 * 0.028349523125), ("800 ft", "length", 243.84), ("3 m/s", "speed", 3.0),
    ("5 deg", "angle", 5 * 3.141592653589793 / 180), ("1.5 lbf", "force", 1.5 * 4.4482216152605),
])
def test_parse_quantity_with_units(text: str, kind: str, expected: float) -> None:
    # Reference values: pint 0.25.3 (reference library, tests/reference/check_values.md#units-pint).
    assert parse_quantity(text, kind) == pytest.approx(expected, rel=1e-12)
    assert parse_quantity(text, kind) == pytest.approx(UREG.Quantity(text).to(SI[kind]).magnitude, rel=1e-12)


def test_psi_is_a_pound_force_per_square_inch() -> None:
    # Exact definitions: 0.45359237 kg x 9.80665 m/s² / (0.0254 m)² = 6894.757293168361... Pa
    # (tests/reference/check_values.md#units-pressure); pint gives the same.
    assert PSI_PA == pytest.approx(PRESSURE_UNITS.value("psi"), rel=1e-15)
    assert PSI_PA == pytest.approx(UREG.Quantity(1.0, "psi").to("pascal").magnitude, rel=1e-15)


def test_inch_of_mercury_is_the_conventional_one_to_seven_digits() -> None:
    # pint: inch x conventional mercury density 13 595.1 kg/m³ x g0 = 3386.388640341 Pa (reference library);
    # NIST SP 811, appendix B.8 prints it to seven digits, 3.386 389 E+03 Pa (from memory). Not the inch of
    # mercury at 60 °F (pint: about 3376.85 Pa).
    exact = UREG.Quantity(1.0, "inHg").to("pascal").magnitude
    assert exact == pytest.approx(PRESSURE_UNITS.value("inHg"), rel=1e-12)
    assert INCH_OF_MERCURY_PA == round(exact, 3) == PRESSURE_UNITS.value("inHg_nist")
    assert INCH_OF_MERCURY_PA != pytest.approx(UREG.Quantity(1.0, "inHg_60F").to("pascal").magnitude, rel=1e-3)


def test_temperatures_match_pint() -> None:
    for text, unit in (("15 degC", "degC"), ("59 degF", "degF"), ("288.15 K", "kelvin")):
        magnitude = float(text.split()[0])
        expected = UREG.Quantity(magnitude, unit).to("kelvin").magnitude
        assert parse_quantity(text, "temperature") == pytest.approx(expected, rel=1e-12)


def test_bare_numbers_take_the_default_unit_or_si() -> None:
    assert parse_quantity("29", "length", default_unit="mm") == 0.029
    assert parse_quantity(29, "length", default_unit="mm") == 0.029
    assert parse_quantity("1.5", "length") == 1.5
    assert to_si(29.0, "mm", "length") == 0.029  # exact: division by 1000, not multiplication by 1e-3


def test_wrong_kind_names_the_field_and_the_kind() -> None:
    with pytest.raises(QuantityError, match=r"rail_length: expected a length, got '3 kg' \(a mass\)"):
        parse_quantity("3 kg", "length", field="rail_length")


def test_unknown_unit_lists_the_accepted_ones() -> None:
    with pytest.raises(QuantityError, match="unknown length unit 'furlong'.*mm"):
        parse_quantity("3 furlong", "length", field="diameter")
    with pytest.raises(QuantityError, match="expected a mass"):
        parse_quantity("heavy", "mass", field="total_mass")
    with pytest.raises(ValueError):  # QuantityError is a ValueError
        parse_quantity(True, "mass")


@pytest.mark.parametrize(("text", "expected_m2"), [("280 in2", 280 * 0.0254**2), ("280 in²", 280 * 0.0254**2),
                                                   ("1.9 sq ft", 1.9 * 0.3048**2), ("0.05", 0.05), ("500 cm^2", 0.05)])
def test_areas_take_square_units_or_a_bare_si_number(text: str, expected_m2: float) -> None:
    # Issue 14: drag area in m² or in².
    assert parse_quantity(text, "area") == pytest.approx(expected_m2, rel=1e-12)


def test_a_quantity_can_keep_the_text_it_was_given_as() -> None:
    # Issue 14: messages echo the user's own numbers (2300 ft, not 701.04 m).
    given = parse_quantity("2300ft", "length", keep_text=True)
    assert given == pytest.approx(701.04) and given.text == "2300 ft"
    assert parse_quantity("9.5", "time", keep_text=True).text == "9.5 s"
    assert parse_quantity("15degC", "temperature", keep_text=True).text == "15 °C"
    assert type(given * 2) is float  # arithmetic forgets the text
