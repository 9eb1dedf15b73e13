"""Display units: SI values from the library shown in the metric or the imperial system, formatted for people.

One place decides how every command shows a quantity (tables, lines, plot labels, CSV headers):

* **Systems.** ``metric`` shows m, m/s, g/kg, kPa, °C; ``imperial`` shows ft, ft/s, oz/lb, psi, °F. Impulse and
  thrust stay in N·s and N in both, and motor sizes in mm, because a motor's label, its impulse class and the
  mount sizes (18, 29, 38 mm) are stated in those units everywhere; the flight figures follow the system.
* **Numbers.** A fixed number of decimals per unit (a table column keeps one count for all its rows),
  thousands separators, never scientific notation; masses switch to kg (lb) from 1 kg (1 lb), imperial
  areas from in² to ft² at 1 ft².
* **Limits.** :meth:`DisplayUnits.beyond` shows a failing value so that it never reads as equal to its limit
  (6.52 m/s against a 6.5 m/s limit is "6.52 m/s", not "6.5 m/s").
* **The user's own numbers.** A :class:`~motorlib.units.Quantity` (a value given on the command line or in an
  airframe file) is echoed as it was typed: "2300 ft" stays "2300 ft" in either system.

Factors come from :mod:`motorlib.units`; nothing here knows about click or rich.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final, Iterable

from ..units import (
    FOOT_M,
    GRAM_KG,
    INCH_M,
    INCH_OF_MERCURY_PA,
    OUNCE_KG,
    POUND_KG,
    PSI_PA,
    STANDARD_GRAVITY_M_S2,
)

__all__ = ["SYSTEMS", "DisplayUnits", "format_number", "normalise_system"]

SYSTEMS: Final = ("metric", "imperial")

# kind -> (metric unit, imperial unit). Masses upgrade to kg / lb from 1 kg / 1 lb (see _BIG_MASS).
_KIND_UNITS: Final[dict[str, tuple[str, str]]] = {
    "length": ("m", "ft"),            # heights, distances, rail lengths
    "size": ("mm", "in"),             # airframe and recovery-device diameters
    "motor_size": ("mm", "mm"),       # motor diameter and length: mounts are named in mm everywhere
    "speed": ("m/s", "ft/s"),
    "acceleration": ("m/s²", "ft/s²"),
    "mass": ("g", "oz"),
    "force": ("N", "N"),              # thrust: the label's average thrust is in N
    "impulse": ("N·s", "N·s"),        # impulse classes are defined in N·s
    "time": ("s", "s"),
    "pressure": ("kPa", "psi"),       # dynamic pressure
    "air_pressure": ("hPa", "inHg"),  # station pressure
    "temperature": ("°C", "°F"),
    "area": ("m²", "in²"),
    "density": ("kg/m³", "lb/ft³"),
    "angle": ("deg", "deg"),
    "ratio": ("", ""),                # thrust-to-weight and other pure numbers
}
# small unit -> (big unit, threshold in SI): kilograms above a kilogram, pounds above a pound, ft² above a ft²
_BIG_UNITS: Final = {"g": ("kg", 1.0), "oz": ("lb", POUND_KG), "in²": ("ft²", FOOT_M**2)}

# unit -> SI value of one unit
_FACTORS: Final[dict[str, float]] = {
    "m": 1.0, "ft": FOOT_M, "mm": 1e-3, "in": INCH_M, "m/s": 1.0, "ft/s": FOOT_M, "m/s²": 1.0, "ft/s²": FOOT_M,
    "g": GRAM_KG, "kg": 1.0, "oz": OUNCE_KG, "lb": POUND_KG, "N": 1.0, "N·s": 1.0, "s": 1.0,
    "kPa": 1e3, "psi": PSI_PA, "hPa": 100.0, "inHg": INCH_OF_MERCURY_PA, "m²": 1.0, "ft²": FOOT_M**2,
    "in²": INCH_M**2, "kg/m³": 1.0, "lb/ft³": POUND_KG / FOOT_M**3, "deg": math.pi / 180.0, "g0": STANDARD_GRAVITY_M_S2,
    "": 1.0,
}

# Decimals a value in this unit is shown with: resolution that matters to a flyer, no more.
_DECIMALS: Final[dict[str, int]] = {
    "m": 0, "ft": 0, "mm": 1, "in": 2, "m/s": 1, "ft/s": 1, "m/s²": 1, "ft/s²": 0, "g": 0, "kg": 2, "oz": 1,
    "lb": 2, "N": 1, "N·s": 1, "s": 2, "kPa": 1, "psi": 2, "hPa": 0, "inHg": 2, "°C": 1, "°F": 0, "m²": 3,
    "ft²": 2, "in²": 1, "kg/m³": 3, "lb/ft³": 4, "deg": 1, "g0": 1, "": 1,
}

# File-name friendly unit spellings for CSV headers and JSON-like keys (altitude_ft, speed_ft_s).
_SUFFIX: Final = {"m/s": "m_s", "ft/s": "ft_s", "m/s²": "m_s2", "ft/s²": "ft_s2", "N·s": "ns", "N": "n",
                  "m²": "m2", "ft²": "ft2", "kg/m³": "kg_m3", "lb/ft³": "lb_ft3", "°C": "degc", "°F": "degf"}


def normalise_system(name: str) -> str:
    """``metric`` or ``imperial`` from a setting (``si`` is accepted for ``metric``); ValueError otherwise."""
    folded = str(name).strip().lower()
    if folded in ("si", "metric"):
        return "metric"
    if folded == "imperial":
        return "imperial"
    raise ValueError(f"units must be metric or imperial, got {name!r}")


def format_number(value: float, decimals: int) -> str:
    """``value`` with ``decimals`` decimals and thousands separators; never scientific notation.

    >>> format_number(13480.4, 0), format_number(-0.04, 1), format_number(0.625, 2)
    ('13,480', '0.0', '0.62')
    """
    text = f"{value:,.{max(0, decimals)}f}"
    if text.startswith("-") and not text.strip("-0.,"):
        text = text[1:]  # no "-0.0"
    return text


@dataclass(frozen=True)
class DisplayUnits:
    """How SI values are shown: the ``metric`` or the ``imperial`` system.

    >>> DisplayUnits("imperial").quantity(701.04, "length")
    '2,300 ft'
    >>> DisplayUnits().quantity(13.48, "mass")
    '13.48 kg'
    """

    system: str = "metric"

    def __post_init__(self) -> None:
        object.__setattr__(self, "system", normalise_system(self.system))

    # ------------------------------------------------------------------ units
    def unit(self, kind: str, value_si: float | None = None) -> str:
        """The unit ``kind`` is shown in; masses of 1 kg (1 lb) and more in kg (lb)."""
        unit = _KIND_UNITS[kind][SYSTEMS.index(self.system)]
        if unit in _BIG_UNITS and value_si is not None and abs(value_si) >= _BIG_UNITS[unit][1]:
            return _BIG_UNITS[unit][0]
        return unit

    def column_unit(self, values: Iterable[float | None], kind: str) -> str:
        """One unit for a whole column: kg (lb) when its largest mass reaches 1 kg (1 lb)."""
        finite = [abs(float(v)) for v in values if v is not None and math.isfinite(float(v))]
        return self.unit(kind, max(finite) if finite else None)

    @staticmethod
    def suffix(unit: str) -> str:
        """The unit as a name suffix: ``ft/s`` -> ``ft_s`` (CSV headers)."""
        return _SUFFIX.get(unit, unit)

    def convert(self, value_si: float, kind: str, unit: str | None = None) -> float:
        """``value_si`` in ``unit`` (default: the unit ``kind`` is shown in)."""
        unit = self.unit(kind, value_si) if unit is None else unit
        if kind == "temperature":
            celsius = float(value_si) - 273.15  # exact offset by definition of the Celsius scale
            return celsius if unit == "°C" else celsius * 9.0 / 5.0 + 32.0
        return float(value_si) / _FACTORS[unit]

    @staticmethod
    def decimals(unit: str) -> int:
        return _DECIMALS.get(unit, 2)

    def column_decimals(self, values: Iterable[float | None], kind: str, unit: str | None = None,
                        significant: int = 2, max_decimals: int = 3) -> int:
        """Decimals for a column: the unit's own, or more so that its smallest value keeps ``significant`` digits."""
        values = [float(v) for v in values if v is not None and math.isfinite(float(v))]
        unit = self.column_unit(values, kind) if unit is None else unit
        base = self.decimals(unit)
        shown = [abs(self.convert(v, kind, unit)) for v in values]
        smallest = min((v for v in shown if v > 0), default=None)
        if smallest is None:
            return base
        needed = significant - 1 - math.floor(math.log10(smallest))
        return max(base, min(needed, max_decimals))

    def exact_decimals(self, values: Iterable[float | None], kind: str, max_decimals: int = 1) -> int:
        """The fewest decimals (up to ``max_decimals``) that show every value of a column exactly (29, 10.5)."""
        shown = [self.convert(float(v), kind) for v in values if v is not None and math.isfinite(float(v))]
        for decimals in range(max_decimals + 1):
            if all(abs(round(v, decimals) - v) <= 1e-6 * max(1.0, abs(v)) for v in shown):
                return decimals
        return max_decimals

    # ------------------------------------------------------------------ text
    def number(self, value_si: float | None, kind: str, decimals: int | None = None, unit: str | None = None) -> str:
        """The number alone (for a table cell under a header that names the unit); ``-`` for None or NaN."""
        if value_si is None or not math.isfinite(float(value_si)):
            return "-"
        unit = self.unit(kind, value_si) if unit is None else unit
        return format_number(self.convert(value_si, kind, unit), self.decimals(unit) if decimals is None else decimals)

    def quantity(self, value_si: float | None, kind: str, decimals: int | None = None, unit: str | None = None) -> str:
        """Number and unit, e.g. ``"1,024 m"``; ``-`` for None or NaN."""
        if value_si is None or not math.isfinite(float(value_si)):
            return "-"
        unit = self.unit(kind, value_si) if unit is None else unit
        return f"{self.number(value_si, kind, decimals, unit)} {unit}".rstrip()

    def precise(self, value_si: float | None, kind: str, significant: int = 3) -> str:
        """:meth:`quantity` with at least ``significant`` digits for small values (0.625 N·s, 235.0 N·s)."""
        if value_si is None or not math.isfinite(float(value_si)):
            return "-"
        unit = self.unit(kind, value_si)
        return self.quantity(value_si, kind, self.column_decimals([value_si], kind, unit, significant, 4), unit)

    def given(self, value_si: float | None, kind: str, decimals: int | None = None) -> str:
        """A value the user gave, as they typed it ("2300 ft") when it carries its text; else :meth:`quantity`."""
        text = getattr(value_si, "text", None)
        return text if text else self.quantity(value_si, kind, decimals)

    @staticmethod
    def header(name: str, unit: str | None) -> str:
        """A column header: the name, and the unit on a second line (keeps columns narrow at 80 columns)."""
        return f"{name}\n{unit}" if unit else name

    def beyond(self, value_si: float, limit_si: float, kind: str, *, above: bool, decimals: int | None = None,
               unit: str | None = None, with_unit: bool = True) -> tuple[str, str]:
        """A failing value and its limit as texts that never read as equal: ``(value, limit)``.

        The value is rounded as usual when that already shows it beyond the limit as displayed; otherwise up
        to three more decimals are added, and at the finest of those it is rounded away from the limit. A
        limit the user gave keeps its text; a limit converted for display gets the digits it needs. So
        6.52 m/s against a 6.5 m/s limit reads "6.52 m/s", never "6.5 m/s (limit 6.5 m/s)".

        >>> DisplayUnits().beyond(6.52, 6.5, "speed", above=True)
        ('6.52 m/s', '6.5 m/s')
        >>> DisplayUnits().beyond(14.96, 15.0, "speed", above=False, with_unit=False)
        ('14.96', '15 m/s')
        """
        unit = self.unit(kind, limit_si) if unit is None else unit
        base = self.decimals(unit) if decimals is None else decimals
        v, lim = self.convert(value_si, kind, unit), self.convert(limit_si, kind, unit)

        def past(x: float, bound: float) -> bool:
            return x > bound if above else x < bound

        given = getattr(limit_si, "text", None)
        if given:
            limit_text, bound = given, lim
        else:
            digits = self._digits(lim)
            while digits < 9 and not past(v, round(lim, digits)):  # the value lies between the limit and its
                digits += 1                                         # rounded display: show the limit finely
            limit_text, bound = f"{format_number(lim, digits)} {unit}".rstrip(), round(lim, digits)
            bound = max(bound, lim) if above else min(bound, lim)
        for extra in range(4):
            rounded = round(v, base + extra)
            if past(rounded, bound):
                text = format_number(rounded, base + extra)
                break
        else:
            scale = 10 ** (base + 3)
            text = format_number((math.ceil(v * scale) if above else math.floor(v * scale)) / scale, base + 3)
        return (f"{text} {unit}".rstrip() if with_unit else text), limit_text

    @classmethod
    def plain(cls, value: float) -> str:
        """A bare number with the digits it needs and no exponent: 100, 6.5, 0.025, 12,345.

        >>> DisplayUnits.plain(12345.0), DisplayUnits.plain(0.0312345)
        ('12,345', '0.0312')
        """
        return format_number(value, cls._digits(value))

    def limit(self, value_si: float, kind: str) -> str:
        """A rule's limit with its unit, as the user gave it or with the digits it needs (15 m/s, 49.2 ft/s)."""
        text = getattr(value_si, "text", None)
        if text:
            return text
        unit = self.unit(kind, value_si)
        value = self.convert(value_si, kind, unit)
        return f"{format_number(value, self._digits(value))} {unit}".rstrip()

    @staticmethod
    def _digits(value: float) -> int:
        """Decimals that show ``value`` without noise: up to three when exact, else about three significant digits."""
        for digits in range(0, 4):
            if abs(round(value, digits) - value) <= 1e-9 * max(1.0, abs(value)):
                return digits
        return max(1, 2 - math.floor(math.log10(abs(value)))) if value else 1
