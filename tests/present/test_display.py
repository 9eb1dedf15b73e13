"""Display units (issue 14): one module converts and formats every quantity a command shows."""

from __future__ import annotations

import pint
import pytest
from hypothesis import example, given, settings, strategies as st

from motorlib.present.display import DisplayUnits, format_number, normalise_system
from motorlib.units import parse_quantity

UREG = pint.UnitRegistry()
METRIC, IMPERIAL = DisplayUnits("metric"), DisplayUnits("imperial")


def test_systems_and_their_names() -> None:
    assert normalise_system("si") == normalise_system("Metric") == "metric"
    assert DisplayUnits("IMPERIAL").system == "imperial"
    with pytest.raises(ValueError, match="metric or imperial"):
        DisplayUnits("cubits")


@pytest.mark.parametrize(("units", "value", "kind", "expected"), [
    (METRIC, 1024.4, "length", "1,024 m"), (IMPERIAL, 701.04, "length", "2,300 ft"),
    (METRIC, 13.48, "mass", "13.48 kg"), (METRIC, 0.3773, "mass", "377 g"),
    (IMPERIAL, 0.3773, "mass", "13.3 oz"), (IMPERIAL, 13.48, "mass", "29.72 lb"),
    (METRIC, 120.0, "speed", "120.0 m/s"), (IMPERIAL, 288.15, "temperature", "59 °F"),
    (METRIC, 0.029, "motor_size", "29.0 mm"), (IMPERIAL, 0.029, "motor_size", "29.0 mm"),
    (IMPERIAL, 160.0, "impulse", "160.0 N·s"), (IMPERIAL, 6894.757293168361, "pressure", "1.00 psi"),
    (IMPERIAL, 0.1806448, "area", "1.94 ft²"), (IMPERIAL, 0.0180645, "area", "28.0 in²"),
])
def test_quantities_for_people(units: DisplayUnits, value: float, kind: str, expected: str) -> None:
    assert units.quantity(value, kind) == expected


def test_no_scientific_notation_and_thousands_separators() -> None:
    # Issue 14: "1.2e+02 m/s" and "mass 1.348e+04 g" must not appear.
    assert format_number(120.0, 1) == "120.0" and format_number(13480.0, 0) == "13,480"
    assert "e" not in METRIC.quantity(1e-7, "speed") and "e" not in METRIC.quantity(1.2e9, "length")
    assert METRIC.number(None, "length") == METRIC.number(float("nan"), "length") == "-"


def test_a_column_keeps_one_unit_and_enough_decimals() -> None:
    assert METRIC.column_unit([0.2, 13.5], "mass") == "kg" and METRIC.column_unit([0.2, 0.9], "mass") == "g"
    assert METRIC.column_decimals([0.625, 9732.0], "impulse") == 2  # 0.62, 9,732.00: no small motor shows 0.6
    assert METRIC.column_decimals([35.0, 9732.0], "impulse") == 1


def test_the_users_own_numbers_are_echoed() -> None:
    typed = parse_quantity("2300ft", "length", keep_text=True)
    assert METRIC.given(typed, "length") == "2300 ft" and IMPERIAL.limit(typed, "length") == "2300 ft"
    assert METRIC.given(701.04, "length") == "701 m"
    assert IMPERIAL.limit(15.0, "speed") == "49.2 ft/s" and METRIC.limit(6.5, "speed") == "6.5 m/s"


@pytest.mark.parametrize(("value", "limit", "above", "expected"), [
    (6.52, 6.5, True, ("6.52 m/s", "6.5 m/s")), (6.5000001, 6.5, True, ("6.5001 m/s", "6.5 m/s")),
    (14.96, 15.0, False, ("14.96 m/s", "15 m/s")), (14.2, 15.0, False, ("14.2 m/s", "15 m/s")),
])
def test_rounding_never_hides_a_failure(value: float, limit: float, above: bool, expected: tuple[str, str]) -> None:
    # Issue 14: "6.5 m/s (limit 6.5 m/s)" for 6.52 m/s must not appear.
    assert METRIC.beyond(value, limit, "speed", above=above) == expected


def _number(text: str) -> float:
    return float(text.split()[0].replace(",", ""))


@given(st.floats(0.1, 5000.0), st.floats(1e-9, 0.5), st.booleans(), st.sampled_from([METRIC, IMPERIAL]))
@example(15.0, 0.0003, False, IMPERIAL)
def test_a_failing_value_always_reads_beyond_its_limit(limit: float, gap: float, above: bool,
                                                       units: DisplayUnits) -> None:
    value = limit * (1 + gap) if above else limit * (1 - gap)
    shown, limit_shown = units.beyond(value, limit, "speed", above=above)
    assert _number(shown) > _number(limit_shown) if above else _number(shown) < _number(limit_shown)


# Reference: pint's unit registry (its own definitions file), one unit of each kind the display converts.
_PINT_UNITS = {"ft": "foot", "in": "inch", "ft/s": "foot / second", "ft/s²": "foot / second ** 2", "oz": "ounce",
               "lb": "pound", "psi": "psi", "inHg": "inch_Hg", "in²": "inch ** 2", "ft²": "foot ** 2",
               "lb/ft³": "pound / foot ** 3", "m": "meter", "mm": "millimeter", "g": "gram", "kg": "kilogram",
               "kPa": "kilopascal", "hPa": "hectopascal", "m/s": "meter / second", "m²": "meter ** 2",
               "m/s²": "meter / second ** 2", "kg/m³": "kilogram / meter ** 3"}
_SI_UNITS = {"length": "meter", "size": "meter", "speed": "meter / second", "acceleration": "meter / second ** 2",
             "mass": "kilogram", "pressure": "pascal", "air_pressure": "pascal", "area": "meter ** 2",
             "density": "kilogram / meter ** 3"}


@pytest.mark.parametrize("units", [METRIC, IMPERIAL])
@pytest.mark.parametrize("kind", sorted(_SI_UNITS))
@settings(max_examples=30)
@given(value=st.floats(min_value=1e-3, max_value=1e5, allow_nan=False))
def test_conversions_agree_with_pint(units: DisplayUnits, kind: str, value: float) -> None:
    unit = units.unit(kind, value)
    expected = UREG.Quantity(value, _SI_UNITS[kind]).to(_PINT_UNITS[unit]).magnitude
    # pint's inch of mercury (13.5951 g/cm³ at g0) and NIST SP 811's conventional 3386.389 Pa differ by 3e-7
    assert units.convert(value, kind) == pytest.approx(expected, rel=1e-6 if unit == "inHg" else 1e-12)


def test_imperial_lengths_are_shown_in_feet() -> None:
    # 1 ft = 0.3048 m exactly (international yard and pound agreement, 1959): 304.8 m is 1,000 ft
    assert IMPERIAL.quantity(304.8, "length") == "1,000 ft" and IMPERIAL.number(304.8, "length") == "1,000"
    assert IMPERIAL.quantity(3.048, "speed") == "10.0 ft/s"


# The display resolution of every unit (module docstring: "resolution that matters to a flyer, no more"); the
# SI values are exact multiples of each unit (factors from pint, above), so the figures are worked out by hand.
@pytest.mark.parametrize(("units", "value_si", "kind", "expected"), [
    (METRIC, 1234.5678, "length", "1,235 m"), (IMPERIAL, 0.3048 * 1234.5678, "length", "1,235 ft"),
    (METRIC, 0.0412345, "size", "41.2 mm"), (IMPERIAL, 0.0254 * 1.23456, "size", "1.23 in"),
    (METRIC, 12.345, "speed", "12.3 m/s"), (IMPERIAL, 0.3048 * 12.345, "speed", "12.3 ft/s"),
    (METRIC, 123.456, "acceleration", "123.5 m/s²"), (IMPERIAL, 0.3048 * 123.456, "acceleration", "123 ft/s²"),
    (METRIC, 0.123456, "mass", "123 g"), (METRIC, 1.23456, "mass", "1.23 kg"),
    (IMPERIAL, 0.028349523125 * 3.456, "mass", "3.5 oz"), (IMPERIAL, 0.45359237 * 3.456, "mass", "3.46 lb"),
    (METRIC, 12.3456, "force", "12.3 N"), (METRIC, 12.3456, "impulse", "12.3 N·s"), (METRIC, 1.23456, "time", "1.23 s"),
    (METRIC, 12_345.6, "pressure", "12.3 kPa"), (IMPERIAL, 6894.757293168361 * 1.23456, "pressure", "1.23 psi"),
    (METRIC, 101_325.0, "air_pressure", "1,013 hPa"), (IMPERIAL, 3386.389 * 29.9212, "air_pressure", "29.92 inHg"),
    (METRIC, 293.456, "temperature", "20.3 °C"), (IMPERIAL, 293.456, "temperature", "69 °F"),
    (METRIC, 0.0123456, "area", "0.012 m²"), (IMPERIAL, 0.09290304 * 1.23456, "area", "1.23 ft²"),
    (METRIC, 1.23456, "density", "1.235 kg/m³"), (IMPERIAL, 16.018463373960138 * 0.0765, "density", "0.0765 lb/ft³"),
    (METRIC, 0.123456, "angle", "7.1 deg"),
    (METRIC, 12.345, "ratio", "12.3"),
])
def test_each_unit_shows_its_resolution(units: DisplayUnits, value_si: float, kind: str, expected: str) -> None:
    assert units.quantity(value_si, kind) == expected


def test_exact_decimals_show_every_value_exactly_or_stop_at_the_limit() -> None:
    assert METRIC.exact_decimals([29.0, 38.0], "length") == 0
    assert METRIC.exact_decimals([29.0, 10.5], "length") == 1
    assert METRIC.exact_decimals([10.25], "length") == 1  # not exact at one decimal: the limit
    assert METRIC.exact_decimals([10.25], "length", max_decimals=3) == 2
    assert METRIC.exact_decimals([123_456.0000001], "length") == 0  # within 1e-6 relative: exact
    assert METRIC.exact_decimals([None, float("nan")], "length") == 0


@pytest.mark.parametrize(("value", "expected"), [
    (100.0, "100"), (6.5, "6.5"), (0.025, "0.025"), (12_345.0, "12,345"), (123.4567, "123.5"),
    (12.34567, "12.3"), (1.234567, "1.23"), (0.0312345, "0.0312"), (0.0, "0"),
])
def test_plain_numbers_keep_about_three_significant_digits(value: float, expected: str) -> None:
    assert DisplayUnits.plain(value) == expected
