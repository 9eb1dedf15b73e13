"""The ``[uncertainty]`` table of an airframe file (documented in ``data_schema/AIRFRAME.md``): the spread of
each sampled input of a Monte Carlo run (:mod:`motorlib.flight.dispersion`).
"""

from __future__ import annotations

import math
import os
from typing import Any

from ..errors import SimulationInputError
from ..units import is_bare_number
from .airframe_toml import _load_toml, _quantity, _section

__all__ = ["load_uncertainty", "uncertainty_from_dict"]

# [uncertainty] key -> (Uncertainty field, kind); "relative" takes a fraction or a percentage string
_UNCERTAINTY_KEYS = {
    "total_impulse": ("total_impulse_relative_std", "relative"), "burn_time": ("burn_time_relative_std", "relative"),
    "airframe_mass": ("airframe_mass_relative_std", "relative"), "motor_mass": ("motor_mass_relative_std", "relative"),
    "drag": ("drag_relative_std", "relative"), "wind_speed": ("wind_speed_std_m_s", "speed"),
    "wind_direction": ("wind_direction_std_rad", "angle"), "rail_angle": ("rail_angle_std_rad", "angle"),
    "rail_azimuth": ("rail_azimuth_std_rad", "angle"), "temperature": ("pad_temperature_std_k", "temperature difference"),
    "cg": ("cg_std_m", "length"), "deploy_altitude": ("deploy_altitude_std_m", "length"),
}
# Spreads whose everyday unit is not the SI one: a bare number is refused (cg = 10 would be 10 m, rail_angle = 2
# would be 2 rad), as for motor sizes and small masses; the example names the unit to give
_UNIT_NEEDED = {"cg": "10 mm", "wind_direction": "20 deg", "rail_angle": "1 deg", "rail_azimuth": "5 deg"}
_SI = {"length": "m", "angle": "rad"}


# a temperature *difference*: 1 degC = 1 K, 1 degF = 5/9 K (exact by the scales' definitions)
_DIFFERENCE_UNITS = {"K": 1.0, "degC": 1.0, "degF": 5.0 / 9.0}


def load_uncertainty(path: str | os.PathLike[str], base: Any = None) -> Any:
    """The ``[uncertainty]`` table of an airframe file over ``base`` (default: the documented defaults).

    Returns a :class:`motorlib.flight.dispersion.Uncertainty`; keys the file leaves out keep
    their value from ``base``. See data_schema/AIRFRAME.md.

    Raises
    ------
    SimulationInputError
        Naming the file and the key.
    """
    source = str(path)
    data = _load_toml(path)
    return uncertainty_from_dict(data, source, base)


def uncertainty_from_dict(data: dict[str, Any], source: str = "airframe", base: Any = None) -> Any:
    """:func:`load_uncertainty` for parsed TOML data."""
    from dataclasses import replace

    from ..flight.dispersion import Uncertainty

    base = base if base is not None else Uncertainty()
    table = _section(source, data, "uncertainty", False)
    if table is None:
        return base
    values = {}
    for key, raw in table.items():
        name, kind = _UNCERTAINTY_KEYS[key]
        where = f"uncertainty.{key}"
        if kind == "relative":
            values[name] = _relative(source, where, raw)
        elif kind == "temperature difference":
            values[name] = _difference_k(source, where, raw)
        else:
            if key in _UNIT_NEEDED and is_bare_number(raw) and raw != 0:
                raise SimulationInputError(source, where, f"give a unit, e.g. {_UNIT_NEEDED[key]!r} (a bare number "
                                                          f"would be read in the SI unit, {raw} {_SI[kind]})")
            values[name] = _quantity(source, table, "uncertainty", key, kind)
        if not (math.isfinite(values[name]) and values[name] >= 0.0):
            raise SimulationInputError(source, where, f"a standard deviation must be at least 0, got {raw!r}")
    try:
        return replace(base, **values)
    except ValueError as exc:
        raise SimulationInputError(source, "uncertainty", str(exc).replace("`", "")) from None


def _relative(source: str, where: str, raw: Any) -> float:
    """A fraction (0.03) or a percentage string ("3 %"), below :data:`~motorlib.flight.dispersion.MAX_RELATIVE_STD`."""
    from ..flight.dispersion import MAX_RELATIVE_STD

    value = None
    if isinstance(raw, (int, float)) and not isinstance(raw, bool):
        value = float(raw)
    elif isinstance(raw, str) and raw.strip().endswith("%"):
        try:
            value = float(raw.strip()[:-1]) / 100.0
        except ValueError:
            pass
    if value is None:
        raise SimulationInputError(source, where, f"expected a fraction such as 0.03 or a percentage such as '3 %', "
                                                  f"got {raw!r}")
    if value >= MAX_RELATIVE_STD:
        raise SimulationInputError(source, where, relative_too_large(repr(raw), MAX_RELATIVE_STD))
    return value


def relative_too_large(given: str, limit: float) -> str:
    """Why a relative standard deviation of ``limit`` or more is refused, in percent as the user writes it."""
    return (f"{given} is {limit * 100:g} % or more: a draw about three standard deviations low would reach zero; give "
            f"less than {limit * 100:g} %")


def _difference_k(source: str, where: str, raw: Any) -> float:
    """A temperature difference: a number of kelvin, or "2 K", "2 degC", "3.6 degF"."""
    if isinstance(raw, (int, float)) and not isinstance(raw, bool):
        return float(raw)
    if isinstance(raw, str):
        text = raw.strip()
        for unit, factor in _DIFFERENCE_UNITS.items():
            if text.endswith(unit):
                try:
                    return float(text[: -len(unit)]) * factor
                except ValueError:
                    break
    raise SimulationInputError(source, where, f"expected a temperature difference such as '2 K' or '3 degF', got {raw!r}")
