"""SI constants and the few non-SI conversion factors motorlib accepts at its edges.

Everything inside motorlib is SI (m, kg, s, N, Pa, K). Values in other units
appear only in files and on the command line, and are converted once, here.
Each factor names its source; tests compare every one against ``pint``.

Standard library only.
"""

from __future__ import annotations

import math
import re
from typing import Final

from .errors import QuantityError

__all__ = [
    "FOOT_M",
    "GRAM_KG",
    "INCH_M",
    "INCH_OF_MERCURY_PA",
    "KILOGRAM_FORCE_N",
    "OUNCE_FORCE_N",
    "OUNCE_KG",
    "POUND_FORCE_N",
    "POUND_KG",
    "PSI_PA",
    "Quantity",
    "STANDARD_GRAVITY_M_S2",
    "UNITS",
    "format_unit",
    "parse_quantity",
    "to_si",
    "miss_percent",
    "is_bare_number",
]

STANDARD_GRAVITY_M_S2: Final = 9.80665  # exact by definition (3rd CGPM, 1901)
INCH_M: Final = 0.0254  # exact (international yard and pound agreement, 1959)
FOOT_M: Final = 0.3048  # exact, 12 inches (same agreement)
POUND_KG: Final = 0.45359237  # exact avoirdupois pound (same agreement)
OUNCE_KG: Final = POUND_KG / 16.0  # avoirdupois ounce, 1/16 lb = 28.349523125 g
GRAM_KG: Final = 1e-3
POUND_FORCE_N: Final = POUND_KG * STANDARD_GRAVITY_M_S2  # 4.4482216152605 N, lb x g0 by definition
KILOGRAM_FORCE_N: Final = STANDARD_GRAVITY_M_S2  # 1 kgf = 1 kg x g0 by definition
OUNCE_FORCE_N: Final = OUNCE_KG * STANDARD_GRAVITY_M_S2  # 0.27801385... N, oz x g0 by definition (small load cells)
MILE_M: Final = 1609.344  # exact, 5280 ft
# Pound-force per square inch from the exact pound, g0 and inch: 6894.757293... Pa.
PSI_PA: Final = POUND_FORCE_N / INCH_M**2
# Conventional inch of mercury, 1 in x 13 595.1 kg/m³ (mercury near 0 °C) x g0 = 3386.38864 Pa, to the seven
# digits NIST SP 811 (2008), appendix B.8 prints (3.386 389 E+03 Pa); barometers and altimeter logs give inHg.
# Both checked against pint: tests/reference/check_values.md#units-pressure.
INCH_OF_MERCURY_PA: Final = 3386.389

# kind -> unit symbol -> factor to the SI unit of that kind (value_si = value * factor).
# Aliases are listed separately so that every factor is written once.
UNITS: Final[dict[str, dict[str, float]]] = {
    "length": {"m": 1.0, "mm": 1e-3, "cm": 1e-2, "km": 1e3, "in": INCH_M, "ft": FOOT_M},
    "mass": {"kg": 1.0, "g": GRAM_KG, "oz": OUNCE_KG, "lb": POUND_KG},
    "time": {"s": 1.0, "ms": 1e-3, "us": 1e-6},
    "force": {
        "N": 1.0,
        "kN": 1e3,
        "lbf": POUND_FORCE_N,
        "kgf": KILOGRAM_FORCE_N,
        "gf": GRAM_KG * KILOGRAM_FORCE_N,
        "ozf": OUNCE_FORCE_N,
    },
    "impulse": {"Ns": 1.0, "lbfs": POUND_FORCE_N},
    "speed": {"m/s": 1.0, "ft/s": FOOT_M, "km/h": 1000.0 / 3600.0, "mph": MILE_M / 3600.0},
    "angle": {"rad": 1.0, "deg": 3.141592653589793 / 180.0},
    "area": {"m²": 1.0, "cm²": 1e-4, "mm²": 1e-6, "in²": INCH_M**2, "ft²": FOOT_M**2},
}

_ALIASES: Final[dict[str, str]] = {
    "meter": "m", "metre": "m", "meters": "m", "metres": "m",
    "millimeter": "mm", "millimetre": "mm", "inch": "in", "inches": "in", '"': "in",
    "feet": "ft", "foot": "ft", "'": "ft",
    "gram": "g", "grams": "g", "kilogram": "kg", "ounce": "oz", "ounces": "oz", "lbs": "lb",
    "sec": "s", "second": "s", "seconds": "s", "msec": "ms",
    "µs": "us", "μs": "us", "usec": "us", "microsecond": "us", "microseconds": "us", "oz-force": "ozf",
    "n": "N", "newton": "N", "newtons": "N", "kn": "kN", "lbs-force": "lbf",
    "n*s": "Ns", "n.s": "Ns", "n-s": "Ns", "n·s": "Ns", "ns": "Ns",
    "lbf*s": "lbfs", "lbf.s": "lbfs", "lbf-s": "lbfs", "lbf·s": "lbfs", "lb-s": "lbfs",
    "m/sec": "m/s", "fps": "ft/s", "kph": "km/h", "kmh": "km/h",
    "degree": "deg", "degrees": "deg", "°": "deg",
    "m2": "m²", "m^2": "m²", "sqm": "m²", "cm2": "cm²", "cm^2": "cm²", "mm2": "mm²", "mm^2": "mm²",
    "in2": "in²", "in^2": "in²", "sqin": "in²", "ft2": "ft²", "ft^2": "ft²", "sqft": "ft²",
}

# Temperatures are affine, not factors: handled apart from UNITS.
_TEMPERATURE_UNITS: Final = ("K", "degC", "degF")
_TEMPERATURE_ALIASES: Final = {"c": "degC", "°c": "degC", "degc": "degC", "f": "degF", "°f": "degF",
                               "degf": "degF", "k": "K", "kelvin": "K"}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_QUANTITY_RE: Final = re.compile(rf"^\s*(?P<number>{_NUMBER})\s*(?P<unit>.*?)\s*$")


_PRETTY: Final = {"degC": "°C", "degF": "°F", "Ns": "N·s", "lbfs": "lbf·s"}


def format_unit(symbol: str) -> str:
    """The symbol as people write it: ``degC`` -> ``°C``, ``Ns`` -> ``N·s``; others unchanged.

    >>> format_unit("Ns")
    'N·s'
    """
    return _PRETTY.get(symbol, symbol)


class Quantity(float):
    """A value in SI that remembers how it was given, so that messages can echo the user's own words.

    A float in every other respect (arithmetic on it gives plain floats). ``text`` is the number as it was
    typed with the unit's symbol, e.g. ``"2300 ft"`` for ``"2300ft"``; a bare number gets the unit it was
    taken in.

    >>> q = parse_quantity("2300ft", "length", keep_text=True)
    >>> round(float(q), 2), q.text
    (701.04, '2300 ft')
    """

    text: str

    def __new__(cls, value_si: float, text: str) -> Quantity:
        obj = super().__new__(cls, value_si)
        obj.text = text
        return obj

    def __reduce__(self) -> tuple[type, tuple[float, str]]:
        return (Quantity, (float(self), self.text))


def _canonical_unit(kind: str, unit: str) -> str | None:
    """Return the canonical symbol for ``unit`` in ``kind``, or None if unknown."""
    if kind == "temperature":
        if unit in _TEMPERATURE_UNITS:
            return unit
        return _TEMPERATURE_ALIASES.get(unit.lower())
    table = UNITS[kind]
    if unit in table:
        return unit
    folded = unit.replace(" ", "")
    if folded in table:
        return folded
    alias = _ALIASES.get(folded.lower()) or _ALIASES.get(folded)
    if alias in table:
        return alias
    for symbol in table:  # case-insensitive last resort ("MM", "Lbf")
        if symbol.lower() == folded.lower():
            return symbol
    return None


def to_si(value: float, unit: str, kind: str, *, field: str = "value") -> float:
    """Convert ``value`` given in ``unit`` (of ``kind``) to SI.

    Temperatures convert to kelvin. Raises :class:`QuantityError` for an unknown unit.

    >>> to_si(29.0, "mm", "length")
    0.029
    """
    if kind != "temperature" and kind not in UNITS:
        raise ValueError(f"`kind` must be one of {sorted(UNITS) + ['temperature']}, got {kind!r}")
    symbol = _canonical_unit(kind, unit)
    if symbol is None:
        raise QuantityError(field, f"unknown {kind} unit {unit!r}; expected one of {', '.join(known_units(kind))}")
    if kind == "temperature":
        if symbol == "K":
            return value
        if symbol == "degC":
            return value + 273.15  # exact offset by definition of the Celsius scale
        return (value - 32.0) * 5.0 / 9.0 + 273.15
    factor = UNITS[kind][symbol]
    # Divide by the exact decimal reciprocal where there is one, so that "29 mm" is 0.029 exactly.
    if factor < 1.0 and round(1.0 / factor) == 1.0 / factor:
        return value / round(1.0 / factor)
    return value * factor


def known_units(kind: str) -> list[str]:
    """The canonical unit symbols accepted for ``kind``."""
    if kind == "temperature":
        return list(_TEMPERATURE_UNITS)
    return list(UNITS[kind])


def _unit_kind_of(unit: str) -> str | None:
    for kind in list(UNITS) + ["temperature"]:
        if _canonical_unit(kind, unit) is not None:
            return kind
    return None


def parse_quantity(
    text: str | float | int,
    kind: str,
    *,
    field: str = "value",
    default_unit: str | None = None,
    keep_text: bool = False,
) -> float:
    """Parse a quantity such as ``"13mm"``, ``"0.85 oz"`` or ``"15 degC"`` into SI.

    Parameters
    ----------
    text : str or float
        A number followed by an optional unit. A plain number (or a bare
        int/float) is taken in ``default_unit``, or in SI when that is None.
    kind : str
        One of ``length, mass, time, force, impulse, speed, angle, temperature, area``.
    field : str
        Name used in error messages (an option or key name).
    default_unit : str, optional
        Unit of a plain number, e.g. ``"mm"`` for a ``--diameter`` option.
    keep_text : bool
        Return a :class:`Quantity` that also carries the text as given (number and unit), for echoing it.

    Returns
    -------
    float
        The value in the SI unit of ``kind`` (m, kg, s, N, N·s, m/s, rad, K, m²).

    Raises
    ------
    QuantityError
        If the text is not a finite number with a known unit of the expected kind.

    >>> parse_quantity("0.5 in", "length")
    0.0127
    >>> parse_quantity("24", "mass", default_unit="g")
    0.024
    """
    if isinstance(text, bool):
        raise QuantityError(field, f"expected a {kind}, got {text!r}")
    if isinstance(text, (int, float)):
        number, unit, typed = float(text), "", f"{float(text):g}"
    else:
        match = _QUANTITY_RE.match(str(text))
        if match is None:
            raise QuantityError(field, f"expected a {kind} such as {_example(kind)}, got {text!r}")
        number, unit, typed = float(match["number"]), match["unit"], match["number"]
    if not unit:
        unit = default_unit or _si_unit(kind)
    elif _canonical_unit(kind, unit) is None:
        other = _unit_kind_of(unit)
        if other is not None:
            raise QuantityError(field, f"expected a {kind}, got {text!r} (a {other})")
        raise QuantityError(
            field, f"unknown {kind} unit {unit!r} in {text!r}; expected one of {', '.join(known_units(kind))}"
        )
    value = to_si(number, unit, kind, field=field)
    if not math.isfinite(value):  # "1e400 m": a number beyond the float range, or nan/inf given as a float
        raise QuantityError(field, f"{text!r} is not a finite {kind}")
    if keep_text:
        return Quantity(value, f"{typed} {format_unit(_canonical_unit(kind, unit) or unit)}")
    return value


def _si_unit(kind: str) -> str:
    return "K" if kind == "temperature" else next(s for s, f in UNITS[kind].items() if f == 1.0)


def _example(kind: str) -> str:
    return {
        "length": "'29 mm'", "mass": "'24 g'", "time": "'1.5 s'", "force": "'12 N'",
        "impulse": "'10 Ns'", "speed": "'3 m/s'", "angle": "'5 deg'", "temperature": "'15 degC'",
        "area": "'0.05 m2'",
    }[kind]


def miss_percent(miss: float, tolerance: float) -> str:
    """``|miss|`` as a percentage with the fewest decimals that keep it on the right side of ``tolerance``.

    >>> miss_percent(0.0503, 0.05), miss_percent(0.26, 0.05), miss_percent(0.049, 0.05)
    ('5.03', '26', '4.9')
    """
    value, limit = abs(miss) * 100.0, tolerance * 100.0
    for decimals in range(4):
        text = f"{value:.{decimals}f}"
        if (float(text) > limit) == (value > limit) and (float(text) != limit or value == limit):
            return text
    return f"{value:.4f}"


def is_bare_number(value: object) -> bool:
    """Whether ``value`` is a number without a unit: a Python number (not a bool), or text that reads as one."""
    if isinstance(value, bool):
        return False
    if isinstance(value, (int, float)):
        return True
    try:
        float(str(value).strip())
    except ValueError:
        return False
    return True
