"""Winds aloft: horizontal wind against height above the pad, as east and north components.

Model
-----
Two profiles, both frozen records with the same call,
``east_m_s, north_m_s = profile.velocity_m_s(height_m)``:

* :class:`PowerLawWind`, from one reading at 10 m above the pad:
  w(z) = w10·(min(max(z, z_floor), z_cap)/10 m)^α with α = 1/7, in one direction.
  The 1/7 exponent is the textbook neutral-stability value over open, level
  ground (the "one-seventh power law", usually credited to Hellmann, 1916; from
  memory, not checked here). Real exponents range from about 0.1 (unstable,
  sunny afternoon) to 0.4 or more (stable night, rough ground). Below the floor
  (1 m) the speed is the floor's, so the wind does not vanish at the pad; above
  the cap (1,000 m by default, roughly the top of a daytime boundary layer) it
  is held constant instead of growing without limit. The cap is common
  practice, no published source; ``cap_m=math.inf`` gives the uncapped law.
* :class:`MeasuredWind`, a table of (height above the pad [m], speed [m/s],
  direction [deg]) rows, e.g. from a forecast or a balloon. It is interpolated
  linearly in the east and north components, not in speed and angle (so a wind
  veering from 350° to 010° passes through 000°, and a wind turning through
  90° is slower half way, as the average of the two vectors is), and held
  constant beyond the first and last rows.

Direction is the meteorological one, as weather reports give it: where the
wind blows FROM, in degrees clockwise from north. A wind of speed w from θ
moves air toward θ + 180°: east = −w·sin θ, north = −w·cos θ, so a west wind
(270°) blows toward +east.

Using a profile in an integrator (vectorised over the active flights):

    east_m_s, north_m_s = wind.velocity_m_s(z_m)        # z_m: shape (n_active,), height above the pad
    v_rel_east, v_rel_north = v_east - east_m_s, v_north - north_m_s   # air-relative velocity

Both calls allocate a few arrays of the input's shape and never loop in Python.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Final, Sequence

import numpy as np

from ..errors import SimulationInputError

__all__ = ["MAX_WIND_SPEED_M_S", "MeasuredWind", "PowerLawWind", "WindProfile", "wind_components_m_s"]

HELLMANN_EXPONENT: Final = 1.0 / 7.0  # neutral-stability open-terrain value (textbook; from memory, see above)
REFERENCE_HEIGHT_M: Final = 10.0  # standard anemometer height of surface wind reports
DEFAULT_FLOOR_M: Final = 1.0  # same floor as the 2-D integrator's FlightSettings.wind_floor_m
DEFAULT_CAP_M: Final = 1000.0  # about the top of a daytime boundary layer; common practice, no published source
MAX_WIND_SPEED_M_S: Final = 150.0  # above any jet-stream core reported; a table faster than this is a unit error
_SOURCE: Final = "launch"


def _require(field: str, ok: bool, problem: str) -> None:
    if not ok:
        raise SimulationInputError(_SOURCE, field, problem)


def wind_components_m_s(speed_m_s: np.ndarray | float, direction_from_deg: np.ndarray | float
                        ) -> tuple[np.ndarray, np.ndarray]:
    """East and north components [m/s] of a wind of ``speed_m_s`` blowing FROM ``direction_from_deg``.

    Parameters
    ----------
    speed_m_s : array_like
        Wind speed [m/s].
    direction_from_deg : array_like
        Direction the wind blows from, degrees clockwise from north (meteorological convention).

    Returns
    -------
    east_m_s, north_m_s : np.ndarray
        Components of the air's velocity, of the broadcast shape.

    >>> east, north = wind_components_m_s(10.0, 270.0)   # a west wind blows toward the east
    >>> round(float(east), 6), round(float(north), 6)
    (10.0, 0.0)
    """
    theta = np.radians(np.asarray(direction_from_deg, dtype=float))
    speed = np.asarray(speed_m_s, dtype=float)
    return -speed * np.sin(theta), -speed * np.cos(theta)


@dataclass(frozen=True)
class PowerLawWind:
    """Wind from a 10 m reading, growing with height as a power law up to a cap, in one direction.

    Attributes
    ----------
    speed_10m_m_s : float
        Wind speed at 10 m above the pad [m/s], 0 to 150.
    direction_from_deg : float
        Direction the wind blows from, degrees clockwise from north; 0 to 360. The default 270
        (a west wind) blows toward +east, the downrange direction of the 2-D integrator.
    exponent : float
        Power-law exponent α, 1/7 by default (module docstring); 0 to 1.
    floor_m : float
        Below this height the speed is the one at this height [m]; positive.
    cap_m : float
        Above this height the speed is held [m]; at least ``floor_m`` and 10 m; ``math.inf`` for no cap.
    """

    speed_10m_m_s: float = 0.0
    direction_from_deg: float = 270.0
    exponent: float = HELLMANN_EXPONENT
    floor_m: float = DEFAULT_FLOOR_M
    cap_m: float = DEFAULT_CAP_M

    def __post_init__(self) -> None:
        speed = self.speed_10m_m_s
        _require("launch.wind_speed", math.isfinite(speed) and 0.0 <= speed <= MAX_WIND_SPEED_M_S,
                 f"must lie between 0 and {MAX_WIND_SPEED_M_S:g} m/s, got {speed!r}")
        _require("launch.wind_direction", math.isfinite(self.direction_from_deg) and 0.0 <= self.direction_from_deg
                 <= 360.0, f"must lie between 0 and 360 degrees, got {self.direction_from_deg!r}")
        _require("exponent", math.isfinite(self.exponent) and 0.0 <= self.exponent <= 1.0,
                 f"must lie between 0 and 1, got {self.exponent!r}")
        _require("floor_m", math.isfinite(self.floor_m) and 0.0 < self.floor_m <= REFERENCE_HEIGHT_M,
                 f"must lie above 0 and at most 10 m, got {self.floor_m!r}")
        _require("cap_m", self.cap_m >= REFERENCE_HEIGHT_M, f"must be at least 10 m (or inf), got {self.cap_m!r}")

    def speed_m_s(self, height_m: np.ndarray | float) -> np.ndarray:
        """Wind speed [m/s] at heights above the pad [m], any shape: w10·(clip(z, floor, cap)/10)^α."""
        z = np.clip(np.asarray(height_m, dtype=float), self.floor_m, self.cap_m)
        return self.speed_10m_m_s * (z * (1.0 / REFERENCE_HEIGHT_M)) ** self.exponent

    def velocity_m_s(self, height_m: np.ndarray | float) -> tuple[np.ndarray, np.ndarray]:
        """East and north wind components [m/s] at heights above the pad [m], each of the shape of ``height_m``.

        >>> east, north = PowerLawWind(5.0, 270.0).velocity_m_s([10.0, 5000.0])
        >>> [round(float(e), 3) for e in east]
        [5.0, 9.653]
        """
        east, north = wind_components_m_s(1.0, self.direction_from_deg)
        speed = self.speed_m_s(height_m)
        return speed * float(east), speed * float(north)


@dataclass(frozen=True, eq=False)
class MeasuredWind:
    """A measured wind profile: rows of height above the pad, speed and direction, interpolated in components.

    Attributes
    ----------
    heights_m : np.ndarray
        Heights above the pad [m], shape (n_rows,), at least one row, not negative, strictly increasing.
    speeds_m_s : np.ndarray
        Wind speeds [m/s], shape (n_rows,), 0 to 150.
    directions_from_deg : np.ndarray
        Directions the wind blows from, degrees clockwise from north, shape (n_rows,), 0 to 360.

    Raises
    ------
    SimulationInputError
        A row that breaks these rules; the field names the row, e.g. ``launch.wind_profile[2].height``.
    """

    heights_m: np.ndarray
    speeds_m_s: np.ndarray
    directions_from_deg: np.ndarray
    _east_m_s: np.ndarray = field(init=False, repr=False)  # components of each row, for the interpolation
    _north_m_s: np.ndarray = field(init=False, repr=False)

    def __post_init__(self) -> None:
        for name in ("heights_m", "speeds_m_s", "directions_from_deg"):
            values = np.array(getattr(self, name), dtype=float)  # our own copy, frozen below
            _require("launch.wind_profile", values.ndim == 1, f"`{name}` must be 1-D")
            values.flags.writeable = False
            object.__setattr__(self, name, values)
        n = self.heights_m.size
        _require("launch.wind_profile", n >= 1, "needs at least one row of [height, speed, direction]")
        _require("launch.wind_profile", self.speeds_m_s.size == n == self.directions_from_deg.size,
                 "heights, speeds and directions must have one value per row")
        for i in range(n):
            row = f"launch.wind_profile[{i}]"
            h, speed, direction = self.heights_m[i], self.speeds_m_s[i], self.directions_from_deg[i]
            _require(f"{row}.height", math.isfinite(h) and h >= 0.0, f"must be a height above the pad in m, got {h!r}")
            if i:
                _require(f"{row}.height", h > self.heights_m[i - 1],
                         f"must be above the row before ({self.heights_m[i - 1]:g} m), got {h:g} m")
            _require(f"{row}.speed", math.isfinite(speed) and 0.0 <= speed <= MAX_WIND_SPEED_M_S,
                     f"must lie between 0 and {MAX_WIND_SPEED_M_S:g} m/s, got {speed!r}")
            _require(f"{row}.direction", math.isfinite(direction) and 0.0 <= direction <= 360.0,
                     f"must lie between 0 and 360 degrees (the direction the wind blows from), got {direction!r}")
        east, north = wind_components_m_s(self.speeds_m_s, self.directions_from_deg)
        east.flags.writeable = north.flags.writeable = False
        object.__setattr__(self, "_east_m_s", east)
        object.__setattr__(self, "_north_m_s", north)

    @classmethod
    def from_rows(cls, rows: Sequence[Sequence[float]]) -> MeasuredWind:
        """Build from rows ``[height_m, speed_m_s, direction_from_deg]`` (the TOML ``wind_profile`` layout).

        >>> MeasuredWind.from_rows([[0, 4, 270], [500, 9, 250]]).heights_m.tolist()
        [0.0, 500.0]
        """
        rows = list(rows)
        _require("launch.wind_profile", len(rows) >= 1, "needs at least one row of [height, speed, direction]")
        for i, row in enumerate(rows):
            _require(f"launch.wind_profile[{i}]", len(row) == 3,
                     f"must be [height, speed, direction], got {len(row)} value(s)")
        columns = np.array(rows, dtype=float).T
        return cls(columns[0], columns[1], columns[2])

    def velocity_m_s(self, height_m: np.ndarray | float) -> tuple[np.ndarray, np.ndarray]:
        """East and north wind components [m/s] at heights above the pad [m], each of the shape of ``height_m``.

        Linear in each component between rows, constant beyond the ends.

        >>> east, north = MeasuredWind.from_rows([[0, 10, 0], [1000, 10, 90]]).velocity_m_s(500.0)
        >>> round(float(east), 6), round(float(north), 6)
        (-5.0, -5.0)
        """
        z = np.asarray(height_m, dtype=float)
        return np.interp(z, self.heights_m, self._east_m_s), np.interp(z, self.heights_m, self._north_m_s)

    def speed_m_s(self, height_m: np.ndarray | float) -> np.ndarray:
        """Wind speed [m/s] at heights above the pad [m]: the length of the interpolated vector."""
        east, north = self.velocity_m_s(height_m)
        return np.hypot(east, north)


WindProfile = PowerLawWind | MeasuredWind
"""Either profile; both answer ``velocity_m_s(height_m) -> (east_m_s, north_m_s)`` and ``speed_m_s(height_m)``."""
