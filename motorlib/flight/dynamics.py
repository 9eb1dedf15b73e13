"""The right-hand side of the batched flight: air, gravity and wind on a height grid, and the accelerations.

Forces on each flight (the model is described in :mod:`motorlib.flight`):
thrust along the rail, or along the air-relative velocity once free; drag
½·ρ·|v_rel|²·(Cd·A + device Cd·A) against v_rel; gravity g(Z) = g0·(r0/(r0+Z))²
or constant g0. Air (the site's U.S. Standard Atmosphere 1976, or uniform air) and
gravity are tabulated every 5 m above the pad, so that a lookup is one index and a
linear interpolation (no search).

Axes: each flight is integrated in its own horizontal basis, x along the
direction the wind blows toward at 10 m (downrange) and y 90° to its left, z up;
:func:`_basis` gives the east/north components of both axes. A power-law wind then
has no y component, so a flight whose rail leans along the wind (or stands
vertical) stays in its x-z plane and the group is integrated in 2-D (``planar``);
a rail leaning across the wind, or a measured profile (which turns with height),
makes the group 3-D. Results are turned to east and north at the end.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Final

import numpy as np

from .airframe import Airframe, Launch
from .atmosphere import EARTH_RADIUS_M
from .wind import MeasuredWind
from ..units import STANDARD_GRAVITY_M_S2

if TYPE_CHECKING:  # annotation only: integrate imports this module
    from .integrate import FlightSettings

_TABLE_STEP_M: Final = 5.0  # air-table spacing [m]; linear interpolation of ρ errs by ~4e-8 relative


@dataclass
class _Group:
    """What flights integrated together share: air, gravity, wind shape and drag table, on one height grid.

    Tables are sampled every ``step_m`` from ``base_m`` above the pad, so a lookup is
    one index computation and a linear interpolation per table (no search).
    """

    base_m: float
    step_m: float
    rho: np.ndarray  # density [kg/m³]; linear interpolation error ~4e-8 relative at 5 m spacing
    sound: np.ndarray  # speed of sound [m/s]
    gravity: np.ndarray  # [m/s²]
    wind_floor_m: float
    wind_exponent: float
    wind_cap_m: float
    machs: np.ndarray
    cds: np.ndarray
    table_cd: bool
    cds_powered: np.ndarray | None = None  # Cd while burning on ``machs`` (estimated drag); None: as ``cds``
    profile: MeasuredWind | None = None  # a measured wind profile (east/north against height) for the group
    planar: bool = True  # every flight stays in its x-z plane: y and its speed are not integrated
    calm: bool = False  # no flight of the group has wind: the wind is not computed at all

    def wind(self, a: dict[str, np.ndarray], z: np.ndarray, shape: np.ndarray
             ) -> tuple[np.ndarray, np.ndarray | None]:
        """Wind along each flight's x and y axes [m/s] at heights z (y None for a power law: it has none)."""
        if self.calm:
            return 0.0, None
        if self.profile is None:
            return a["wind"] * shape, None
        east, north = self.profile.velocity_m_s(z)
        return east * a["e1e"] + north * a["e1n"], east * a["e2e"] + north * a["e2n"]

    def lookup(self, z: np.ndarray, with_slopes: bool = False) -> tuple:
        """Density, speed of sound, gravity and wind shape w(z)/w(10 m) at heights z above the pad (shape None in
        a calm group). ``with_slopes``: a fifth item, the tables' changes over the 5 m step at z (rows: density,
        speed of sound, gravity), the height derivatives times ``step_m``.

        The wind power law is computed exactly: it is too curved near the ground for a 5 m table.
        """
        u = (z - self.base_m) * (1.0 / self.step_m)
        i = np.minimum(np.maximum(u.astype(np.int64), 0), self.rho.size - 2)
        rows = self.table.take(i, axis=1)  # one gather: density, speed of sound, gravity, then their slopes
        air, slope = rows[:3], rows[3:]
        air += (u - i) * slope
        # 0.1 = 1 / (10 m reference); held above the cap
        # (np.minimum/np.maximum: np.clip costs several times more per call on arrays this size)
        shape = None if self.calm else (
            np.minimum(np.maximum(z, self.wind_floor_m), self.wind_cap_m) * 0.1) ** self.wind_exponent
        return (air[0], air[1], air[2], shape, slope) if with_slopes else (air[0], air[1], air[2], shape)

    def __post_init__(self) -> None:
        # density, speed of sound and gravity stacked with their slopes per table step: one gather reads all
        air = np.stack((self.rho, self.sound, self.gravity))
        self.table = np.concatenate((air, np.diff(air, axis=1, append=air[:, -1:])))


def _basis(launch: Launch) -> tuple[float, float, float, float, float]:
    """East/north components (e1e, e1n) of a flight's x axis (downwind; its y axis, 90° to the left, is
    (-e1n, e1e)), and the rail's direction (ux, uy, uz) in that basis, from the wind direction and the
    rail's angle and azimuth (downwind when not given)."""
    downwind = launch.wind_direction_rad + math.pi  # the wind blows FROM its direction
    e1e, e1n = math.sin(downwind), math.cos(downwind)
    azimuth = downwind if launch.rail_azimuth_rad is None else launch.rail_azimuth_rad
    lean = math.sin(launch.rail_angle_rad)
    ux = lean * math.cos(azimuth - downwind)
    uy = -lean * math.sin(azimuth - downwind)
    if abs(uy) < 1e-12:  # along the wind (or vertical): exactly planar
        uy = 0.0
    return e1e, e1n, ux, uy, math.cos(launch.rail_angle_rad)


def _make_group(frame: Airframe, s: FlightSettings) -> _Group:
    site = frame.launch.site
    top = 100_000.0 - site.elevation_m
    heights = np.arange(-100.0, top + 2 * _TABLE_STEP_M, _TABLE_STEP_M)
    _, _, rho, sound = site.air(heights)
    if s.uniform_air:
        _, _, rho0, sound0 = site.air(0.0)
        rho, sound = np.full(heights.size, float(rho0)), np.full(heights.size, float(sound0))
    if s.vary_gravity:
        gravity = STANDARD_GRAVITY_M_S2 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + heights)) ** 2
    else:
        gravity = np.full(heights.size, STANDARD_GRAVITY_M_S2)
    return _Group(base_m=float(heights[0]), step_m=_TABLE_STEP_M, rho=rho, sound=sound, gravity=gravity,
                  wind_floor_m=s.wind_floor_m, wind_exponent=s.wind_exponent, wind_cap_m=s.wind_cap_m,
                  machs=np.array(frame.drag_machs), cds=np.array(frame.drag_cds),
                  table_cd=bool(frame.drag_table), profile=frame.launch.wind_profile,
                  cds_powered=np.array(frame.drag_cds_powered) if frame.drag_table_powered else None)


def _accel(g: _Group, a: dict[str, np.ndarray], t, x, y, z, vx, vy, vz, *, rates: bool = False,
           figures: bool = True):
    """Accelerations (ax, ay, az), Mach and dynamic pressure of every active flight; arrays of shape (n_active,).

    ``a`` holds the active flights' parameters and phase flags (compacted with the state), among them
    ``half_cda``, half the drag area Cd·A plus the open devices' [m²] (with a constant Cd). In a planar group
    ``ay`` is None (y and its speed stay 0). Without ``figures`` only (ax, ay, az) (a Runge-Kutta stage needs no
    more). With ``rates``, a sixth item: positive multiples of the time derivatives of speed over the ground,
    dynamic pressure and Mach, stacked (3, n) (:func:`_figure_rates`), by whose signs a step tells that one of the
    flown maxima lies inside it.
    """
    dt = t - a["seg_t"]
    thrust = a["seg_f"] + a["seg_s"] * dt  # the segment's coefficients: 0 while coasting
    mass = a["seg_m0"] + (a["seg_m1"] + a["seg_m2"] * dt) * dt
    if rates:
        rho, sound, grav, shape, slope = g.lookup(z, with_slopes=True)
    else:
        rho, sound, grav, shape = g.lookup(z)
    wind_x, wind_y = g.wind(a, z, shape)
    vrx = vx if g.calm else vx - wind_x
    if g.planar:
        vry = None
        speed = np.sqrt(vrx * vrx + vz * vz)
    else:
        vry = vy if wind_y is None else vy - wind_y
        speed = np.sqrt(vrx * vrx + vry * vry + vz * vz)
    rho_v = rho * speed
    if g.table_cd:
        mach = speed / sound
        cd = np.interp(mach, g.machs, g.cds)
        if g.cds_powered is not None:  # smaller base drag while the exhaust fills part of the base
            cd = np.where(a["burning"], np.interp(mach, g.machs, g.cds_powered), cd)
        drag_per_v = rho_v * (0.5 * (cd * a["area"] + a["extra"]))  # drag force / |v_rel|
    else:
        mach = None
        drag_per_v = rho_v * a["half_cda"]
    # free flight: thrust along v_rel (weathercocking), drag against it
    along = (thrust / np.maximum(speed, 1e-9) - drag_per_v) / mass
    ax = along * vrx
    ay = None if vry is None else along * vry
    az = along * vz - grav
    if a["any_rail"]:
        on_rail, ux, uz = a["on_rail"], a["ux"], a["uz"]
        rel_along = vrx * ux + vz * uz if vry is None else vrx * ux + vry * a["uy"] + vz * uz
        a_rail = (thrust - drag_per_v * rel_along) / mass - grav * uz  # uz = cos(rail angle)
        ax = np.where(on_rail, a_rail * ux, ax)
        az = np.where(on_rail, a_rail * uz, az)
        if ay is not None:
            ay = np.where(on_rail, a_rail * a["uy"], ay)
    if not figures:
        return ax, ay, az
    if mach is None:
        mach = speed / sound
    q = 0.5 * rho_v * speed
    if rates:
        return ax, ay, az, mach, q, _figure_rates(g, a, z, vx, vy, vz, vrx, vry, wind_x, wind_y, ax, ay, az, speed,
                                                  rho, sound, slope)
    return ax, ay, az, mach, q


def _figure_rates(g: _Group, a: dict[str, np.ndarray], z, vx, vy, vz, vrx, vry, wind_x, wind_y, ax, ay, az, speed,
                  rho, sound, slope) -> np.ndarray:
    """Positive multiples of the time derivatives of speed over the ground, dynamic pressure q = ½·ρ·|v_rel|² and
    Mach |v_rel|/a, with v_rel = v − wind, stacked (3, n): v·(dv/dt), dq/dt [Pa/s] and dM/dt·a·|v_rel| [m²/s³]
    (only their signs are read). d(|v_rel|²)/dt = 2·v_rel·(dv/dt − dwind/dz·vz); dρ/dt = ρ'(z)·vz and
    da/dt = a'(z)·vz from the air tables' slopes (``slope``, per table step); the power-law wind's dw/dz = p·w/z
    between its floor and cap, a measured profile's by a central difference over 2 cm."""
    vz_az = vz * az
    ground_dot = vx * ax + vz_az
    rel_ax, rel_ay = ax, ay
    if not g.calm:
        if g.profile is None:
            inside = (z > g.wind_floor_m) & (z < g.wind_cap_m)
            rel_ax = ax - np.where(inside, wind_x * vz * g.wind_exponent / np.maximum(z, 1e-300), 0.0)
        else:
            east_hi, north_hi = g.profile.velocity_m_s(z + 0.01)
            east_lo, north_lo = g.profile.velocity_m_s(z - 0.01)
            d_east, d_north = (east_hi - east_lo) * 50.0, (north_hi - north_lo) * 50.0
            rel_ax = ax - (d_east * a["e1e"] + d_north * a["e1n"]) * vz
            if vry is not None:
                rel_ay = ay - (d_east * a["e2e"] + d_north * a["e2n"]) * vz
    rel_dot = vrx * rel_ax + vz_az  # v_rel · dv_rel/dt
    if vry is not None:
        rel_dot = rel_dot + vry * rel_ay
        ground_dot = ground_dot + vy * ay
    climb = speed * speed * vz * (1.0 / g.step_m)  # |v_rel|²·vz per metre of table step
    return np.stack((ground_dot, rho * rel_dot + 0.5 * slope[0] * climb, rel_dot - slope[1] * climb / sound))
