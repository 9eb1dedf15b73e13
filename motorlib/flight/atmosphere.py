"""U.S. Standard Atmosphere 1976 up to 86 km geometric altitude, with a launch-site adjustment.

Model
-----
Seven layers of constant lapse rate in geopotential altitude H (USSA 1976, Part 1;
identical with the ICAO standard atmosphere below 32 km). Geometric altitude Z
converts as H = r0·Z / (r0 + Z). In a layer with lapse L != 0,
T = Tb + L·(H − Hb) and p = pb·(Tb/T)^(g0·M0/(R*·L)); in an isothermal layer
p = pb·exp(−g0·M0·(H − Hb)/(R*·Tb)). Then ρ = p/(R·T), a = √(γ·R·T) and the
Sutherland law μ = β·T^1.5/(T + S). Above the top of the model (84.852 km
geopotential, about 86 km geometric) the top temperature is held constant,
an isothermal extension that the 1976 report does not make; drag there is
negligible for the flights motorlib simulates.

Constants: g0 = 9.80665 m/s², R* = 8314.32 J/(kmol·K), M0 = 28.9644 kg/kmol,
r0 = 6 356 766 m, γ = 1.4, β = 1.458e-6 kg/(m·s·K^½), S = 110.4 K
(tests/reference/check_values.md#atm-constants).

Launch sites (:class:`Site`): a measured temperature shifts the temperature
profile by the constant offset ΔT = T_site − T_std(elevation), T(H) = T_std(H) + ΔT;
the pressure at the pad is the measured one (or the standard pressure at the
pad elevation), and the pressure at every other height follows from the
hydrostatic equation with the ideal-gas law, integrated up and down from the
pad through that warmer or colder column:

    dp/dZ = −p·g(Z)/(R·T),  g(Z) = g0·(r0/(r0 + Z))².

Since dH = (g(Z)/g0)·dZ, this is dp/dH = −p·g0/(R·T) in geopotential height,
which the 1976 model integrates layer by layer; with the shifted temperature
each layer still has a closed form, T = Tb + ΔT + L·(H − Hb) and
ln(p/pb) = −(g0/(R·L))·ln(T/(Tb + ΔT)) (isothermal: −g0·(H − Hb)/(R·(Tb + ΔT))).
With ΔT = 0 and no measured pressure the site reproduces the standard
atmosphere (to rounding, about 1e-14 relative). Density and speed of sound
follow from the site's T and p; viscosity is not adjusted.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Final

import numpy as np

from ..units import STANDARD_GRAVITY_M_S2

__all__ = [
    "EARTH_RADIUS_M",
    "GAS_CONSTANT_J_KG_K",
    "Site",
    "density_kg_m3",
    "dynamic_viscosity_pa_s",
    "geopotential_altitude_m",
    "gravity_m_s2",
    "pressure_pa",
    "speed_of_sound_m_s",
    "temperature_k",
]

# USSA 1976 values (tests/reference/check_values.md#atm-constants); R* is the 1976 value, not CODATA's.
UNIVERSAL_GAS_CONSTANT_J_KMOL_K: Final = 8314.32
MOLAR_MASS_KG_KMOL: Final = 28.9644  # sea-level mean molar mass of air, USSA 1976
GAS_CONSTANT_J_KG_K: Final = UNIVERSAL_GAS_CONSTANT_J_KMOL_K / MOLAR_MASS_KG_KMOL  # 287.053072
GAMMA: Final = 1.4  # ratio of specific heats of air, USSA 1976
EARTH_RADIUS_M: Final = 6_356_766.0  # effective radius for geopotential, USSA 1976
SUTHERLAND_BETA: Final = 1.458e-6  # kg/(m·s·K^0.5), USSA 1976 viscosity law
SUTHERLAND_S_K: Final = 110.4  # Sutherland constant, USSA 1976
_HYDROSTATIC: Final = STANDARD_GRAVITY_M_S2 * MOLAR_MASS_KG_KMOL / UNIVERSAL_GAS_CONSTANT_J_KMOL_K  # K/m

# Layer bases: geopotential altitude [m] and lapse rate [K/m]; USSA 1976 Table 4.
_BASE_H_M: Final = np.array([0.0, 11_000.0, 20_000.0, 32_000.0, 47_000.0, 51_000.0, 71_000.0, 84_852.0])
_LAPSE_K_M: Final = np.array([-6.5e-3, 0.0, 1.0e-3, 2.8e-3, 0.0, -2.8e-3, -2.0e-3, 0.0])


def _layer_bases() -> tuple[np.ndarray, np.ndarray]:
    temps = [288.15]
    pressures = [101_325.0]
    for i in range(len(_BASE_H_M) - 1):
        dh = _BASE_H_M[i + 1] - _BASE_H_M[i]
        tb, pb, lapse = temps[-1], pressures[-1], _LAPSE_K_M[i]
        if lapse == 0.0:
            temps.append(tb)
            pressures.append(pb * math.exp(-_HYDROSTATIC * dh / tb))
        else:
            t_top = tb + lapse * dh
            temps.append(t_top)
            pressures.append(pb * (tb / t_top) ** (_HYDROSTATIC / lapse))
    return np.array(temps), np.array(pressures)


_BASE_T_K, _BASE_P_PA = _layer_bases()


def geopotential_altitude_m(altitude_m: np.ndarray | float) -> np.ndarray:
    """Geopotential altitude H [m] for geometric altitude Z [m]: H = r0·Z/(r0 + Z)."""
    z = np.asarray(altitude_m, dtype=float)
    return EARTH_RADIUS_M * z / (EARTH_RADIUS_M + z)


def gravity_m_s2(altitude_m: np.ndarray | float) -> np.ndarray:
    """Gravity [m/s²] at geometric altitude Z [m]: g0·(r0/(r0 + Z))²."""
    z = np.asarray(altitude_m, dtype=float)
    return STANDARD_GRAVITY_M_S2 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + z)) ** 2


def _layer(h: np.ndarray) -> np.ndarray:
    return np.clip(np.searchsorted(_BASE_H_M, h, side="right") - 1, 0, len(_BASE_H_M) - 1)


def temperature_k(altitude_m: np.ndarray | float) -> np.ndarray:
    """Standard temperature [K] at geometric altitude [m] (valid from −5 km)."""
    h = geopotential_altitude_m(altitude_m)
    i = _layer(h)
    return _BASE_T_K[i] + _LAPSE_K_M[i] * (h - _BASE_H_M[i])


def pressure_pa(altitude_m: np.ndarray | float) -> np.ndarray:
    """Standard pressure [Pa] at geometric altitude [m]."""
    h = geopotential_altitude_m(altitude_m)
    i = _layer(h)
    tb, pb, lapse = _BASE_T_K[i], _BASE_P_PA[i], _LAPSE_K_M[i]
    t = tb + lapse * (h - _BASE_H_M[i])
    isothermal = lapse == 0.0
    safe_lapse = np.where(isothermal, 1.0, lapse)
    with np.errstate(divide="ignore", invalid="ignore"):
        graded = pb * (tb / t) ** (_HYDROSTATIC / safe_lapse)
    flat = pb * np.exp(-_HYDROSTATIC * (h - _BASE_H_M[i]) / tb)
    return np.where(isothermal, flat, graded)


def density_kg_m3(altitude_m: np.ndarray | float) -> np.ndarray:
    """Standard density [kg/m³] at geometric altitude [m]: ρ = p/(R·T).

    >>> round(float(density_kg_m3(0.0)), 4)
    1.225
    """
    return pressure_pa(altitude_m) / (GAS_CONSTANT_J_KG_K * temperature_k(altitude_m))


def speed_of_sound_m_s(altitude_m: np.ndarray | float) -> np.ndarray:
    """Standard speed of sound [m/s] at geometric altitude [m]: a = √(γ·R·T)."""
    return np.sqrt(GAMMA * GAS_CONSTANT_J_KG_K * temperature_k(altitude_m))


def dynamic_viscosity_pa_s(altitude_m: np.ndarray | float) -> np.ndarray:
    """Dynamic viscosity [Pa·s] by Sutherland's law at the standard temperature."""
    t = temperature_k(altitude_m)
    return SUTHERLAND_BETA * t**1.5 / (t + SUTHERLAND_S_K)


@dataclass(frozen=True)
class Site:
    """A launch site: elevation above sea level and optional measured air data.

    Attributes
    ----------
    elevation_m : float
        Pad elevation above mean sea level [m].
    temperature_k : float or None
        Measured air temperature at the pad [K]; None for the standard value.
    pressure_pa : float or None
        Measured (station, not sea-level-corrected) pressure at the pad [Pa]; None for standard.
    """

    elevation_m: float = 0.0
    temperature_k: float | None = None
    pressure_pa: float | None = None

    def __post_init__(self) -> None:
        # Ranges wide enough for any launch site and narrow enough to catch a wrong unit (from memory: the lowest
        # dry land lies about 430 m below sea level, the highest summit 8849 m above; surface temperatures have
        # been measured from about 184 K to 330 K; sea-level pressure stays below about 108.4 kPa, while the
        # standard pressure at 9000 m is 30.8 kPa). A temperature in °C or °F given as K, a pressure in hPa or
        # inHg given as Pa, an elevation in feet of a high site fail.
        if not -1000.0 <= self.elevation_m <= 9000.0:
            raise ValueError(f"`elevation_m` must lie between -1000 and 9000 m, got {self.elevation_m!r}")
        if self.temperature_k is not None and not 180.0 <= self.temperature_k <= 340.0:
            raise ValueError(f"`temperature_k` must lie between 180 and 340 K, got {self.temperature_k!r}")
        if self.pressure_pa is not None and not 10_000.0 <= self.pressure_pa <= 110_000.0:
            raise ValueError(f"`pressure_pa` must lie between 10 and 110 kPa, got {self.pressure_pa!r}")

    @property
    def temperature_offset_k(self) -> float:
        """ΔT added to the standard temperature at every height [K]."""
        if self.temperature_k is None:
            return 0.0
        return self.temperature_k - float(temperature_k(self.elevation_m))

    @property
    def pad_pressure_pa(self) -> float:
        """Pressure at the pad [Pa]: the measured one, else the standard one at the pad elevation."""
        if self.pressure_pa is None:
            return float(pressure_pa(self.elevation_m))
        return self.pressure_pa

    def air(self, height_m: np.ndarray | float) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Temperature [K], pressure [Pa], density [kg/m³], speed of sound [m/s] at heights above the pad [m].

        Parameters
        ----------
        height_m : float or array_like
            Heights above the pad [m], any shape (negative below the pad).

        Returns
        -------
        temperature_k, pressure_pa, density_kg_m3, speed_of_sound_m_s : np.ndarray
            Each of the shape of ``height_m``.

        Notes
        -----
        T = T_std + ΔT at every height; p integrates dp/dZ = −p·g(Z)/(R·T) from the pad
        pressure (module docstring), exactly per layer in geopotential height.

        >>> t, p, rho, a = Site(elevation_m=3000.0, temperature_k=303.15).air([0.0, 6000.0])
        >>> [round(float(x), 4) for x in rho]
        [0.8058, 0.449]
        """
        altitude = self.elevation_m + np.asarray(height_m, dtype=float)
        offset = self.temperature_offset_k
        t = temperature_k(altitude) + offset
        log_p = _log_pressure_ratio(geopotential_altitude_m(altitude), offset) - _log_pressure_ratio(
            geopotential_altitude_m(self.elevation_m), offset)
        p = self.pad_pressure_pa * np.exp(log_p)
        return t, p, p / (GAS_CONSTANT_J_KG_K * t), np.sqrt(GAMMA * GAS_CONSTANT_J_KG_K * t)


def _log_pressure_ratio(h: np.ndarray, offset_k: float) -> np.ndarray:
    """ln(p(H)/p(0)) in the column T = T_std(H) + offset_k [K]; H geopotential [m], any shape.

    The hydrostatic integral −∫ g0/(R·T) dH, in closed form per layer and summed over the layers below.
    """
    tb = _BASE_T_K + offset_k  # shifted layer-base temperatures
    widths = np.diff(_BASE_H_M)
    full = _layer_integral(widths, tb[:-1], _LAPSE_K_M[:-1])  # each whole layer, bottom to top
    below = np.concatenate(([0.0], np.cumsum(full)))  # integral from H = 0 to each layer base
    i = _layer(h)
    return -(below[i] + _layer_integral(h - _BASE_H_M[i], tb[i], _LAPSE_K_M[i]))


def _layer_integral(dh: np.ndarray, tb: np.ndarray, lapse: np.ndarray) -> np.ndarray:
    """∫ g0/(R·T) dH over dh [m] above a layer base at tb [K] with lapse [K/m] (dh may be negative)."""
    isothermal = lapse == 0.0
    safe_lapse = np.where(isothermal, 1.0, lapse)
    # log1p keeps thin slices exact; L·dh/tb > −1 for every height the model is used at (T stays positive)
    graded = (_HYDROSTATIC / safe_lapse) * np.log1p(safe_lapse * dh / tb)
    return np.where(isothermal, _HYDROSTATIC * dh / tb, graded)
