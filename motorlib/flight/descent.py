"""Falling under quadratic drag: closed forms in air of constant density, and the fall through the atmosphere.

Model
-----
Constant density (the closed forms): m·dv/dt = m·g − k·v², k = ½·ρ·(Cd·A).
Terminal speed v_t = √(m·g/k) = √(2·m·g/(ρ·Cd·A)).
From rest: v(t) = v_t·tanh(g·t/v_t) and the distance fallen
y(t) = (v_t²/g)·ln cosh(g·t/v_t), so the time to fall a height h is
t = (v_t/g)·arccosh(exp(g·h/v_t²)) (textbook closed form; tests/reference/check_values.md#fall-from-rest).
The inverse (from a drop height and an observed fall time, the terminal speed
that explains them) solves y(t; v_t) = h for v_t exactly, by safeguarded Newton
iterations on arrays; it is not the terminal-speed shortcut h/t.

Through the atmosphere (:func:`fall_through_air`, :func:`drag_area_from_fall_m2`):
m·dv/dt = m·g(Z) − ½·ρ(Z)·Cd·A·v², with ρ from a :class:`Site` profile (standard
atmosphere, or the site's hydrostatic off-standard day) and inverse-square g.
With β = m/(Cd·A) (ballistic coefficient) and distance fallen s, u = v² obeys
the linear equation du/ds = b·(u_eq − u), b = ρ/β, u_eq = v_t² = 2·β·g/ρ. The fall
is cut into equal slabs (at most ``slab_m`` high, 5 m by default, and at least
128 of them; each fall of a batch has its own, so a batch gives the numbers of
single runs). In each slab b is held at its mid-slab value and u_eq varies
linearly between its values at the slab's edges; then u is exact:

    u1 = q1 + (u0 − q0)·e^(−bΔ) − (q1 − q0)·(1 − e^(−bΔ))/(bΔ),  q0, q1 = u_eq at top, bottom,

which follows the local terminal speed with the right lag in thin air and
thick (an exponential integrator, second order and stable for any bΔ). The slab
time is that of the constant-air solution between the same speeds,
t = Δ/v_t + (v_t/g)·ln((v_t + v1)/(v_t + v0)) with the mid-slab v_t and g (one
formula below and above v_t; from the tanh and coth solutions). In uniform
air both are exact for any slab, so the closed forms above are reproduced
to rounding. In the atmosphere the error is second order in the slab height;
with the defaults it stayed below 2e-7 relative in the fall time and 5e-8 in
the landing speed over 240 random falls (5 m to 15 km, terminal speeds
3–200 m/s, sites 0–4 km, hot and cold days, moving starts) against solve_ivp
(DOP853, rtol 1e-12).

numpy only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Final, NamedTuple

import numpy as np

from .atmosphere import EARTH_RADIUS_M, Site
from ..units import STANDARD_GRAVITY_M_S2 as G0

if TYPE_CHECKING:
    from .airframe import Airframe

__all__ = ["Fall", "drag_area_from_fall_m2", "drag_area_m2", "fall_distance_m", "fall_speed_m_s", "fall_through_air",
           "fall_time_s", "landing_descent_rate_m_s", "pad_terminal_speed_m_s", "terminal_speed_from_fall_m_s", "terminal_speed_m_s"]

SLAB_M: Final = 5.0  # default slab height [m]; error bound in the module docstring
_MIN_SLABS: Final = 128  # short falls are mostly the start-up transient: resolve it whatever the height
MAX_FALL_HEIGHT_M: Final = 80_000.0  # the atmosphere model ends at 86 km geometric; nothing falls from higher here


def terminal_speed_m_s(mass_kg, drag_area_m2, density_kg_m3=1.225, gravity_m_s2=G0):
    """Terminal speed [m/s]: √(2·m·g/(ρ·Cd·A)), where drag ½·ρ·v²·Cd·A balances the weight m·g.

    Every terminal speed of the library comes from here (the pad's in :func:`pad_terminal_speed_m_s`, the
    matcher's landing and opening speeds); arrays broadcast.

    >>> round(float(terminal_speed_m_s(1.0, 0.75 * 3.141592653589793 * 0.9**2 / 4)), 4)
    5.7928
    """
    return np.sqrt(2.0 * np.asarray(mass_kg) * np.asarray(gravity_m_s2)
                   / (np.asarray(density_kg_m3) * np.asarray(drag_area_m2)))


def drag_area_m2(mass_kg, terminal_speed, density_kg_m3=1.225):
    """Drag area Cd·A [m²] that gives ``terminal_speed`` [m/s] to a mass [kg]."""
    return 2.0 * np.asarray(mass_kg) * G0 / (np.asarray(density_kg_m3) * np.asarray(terminal_speed) ** 2)


def fall_speed_m_s(time_s, terminal_speed):
    """Speed [m/s] after falling from rest for ``time_s`` [s]: v_t·tanh(g·t/v_t)."""
    v_t = np.asarray(terminal_speed, dtype=float)
    return v_t * np.tanh(G0 * np.asarray(time_s) / v_t)


def _log_cosh(x):
    x = np.abs(x)
    return x + np.log1p(np.exp(-2.0 * x)) - np.log(2.0)  # stable for large x


def fall_distance_m(time_s, terminal_speed):
    """Distance [m] fallen from rest in ``time_s`` [s]: (v_t²/g)·ln cosh(g·t/v_t)."""
    v_t = np.asarray(terminal_speed, dtype=float)
    return v_t**2 / G0 * _log_cosh(G0 * np.asarray(time_s) / v_t)


def fall_time_s(height_m, terminal_speed):
    """Time [s] to fall ``height_m`` [m] from rest: (v_t/g)·arccosh(exp(g·h/v_t²))."""
    v_t = np.asarray(terminal_speed, dtype=float)
    s = G0 * np.asarray(height_m, dtype=float) / v_t**2
    # arccosh(e^s) = s + ln(1 + sqrt(1 - e^(-2s))), stable for large s
    return v_t / G0 * (s + np.log1p(np.sqrt(-np.expm1(-2.0 * s))))


def terminal_speed_from_fall_m_s(height_m, time_s):
    """Terminal speed [m/s] that makes a fall from rest through ``height_m`` take ``time_s``.

    Raises
    ------
    ValueError
        When the fall is faster than a fall in vacuum (t <= √(2h/g)), which no drag explains.
    """
    h = np.asarray(height_m, dtype=float)
    t = np.asarray(time_s, dtype=float)
    if np.any(h <= 0.0) or np.any(t <= 0.0):
        raise ValueError("`height_m` and `time_s` must be positive")
    vacuum = np.sqrt(2.0 * h / G0)
    if np.any(t <= vacuum):
        raise ValueError(f"a fall of {float(np.max(h)):g} m needs more than {float(np.max(vacuum)):.4g} s even in "
                         "vacuum; the observed time is too short")
    # y(v) = h is increasing in v; bracket between h/t (the shortcut, too low) and a large speed
    lo = h / t
    hi = np.maximum(10.0 * lo, 2.0 * G0 * t)
    for _ in range(200):  # widen until the bracket holds the root (near-vacuum falls need large speeds)
        short = fall_distance_m(t, hi) < h
        if not np.any(short):
            break
        hi = np.where(short, 4.0 * hi, hi)
    v = np.sqrt(lo * hi)
    for _ in range(100):
        y = fall_distance_m(t, v) - h
        lo = np.where(y < 0.0, v, lo)
        hi = np.where(y >= 0.0, v, hi)
        x = G0 * t / v
        dy_dv = 2.0 * v / G0 * _log_cosh(x) - t * np.tanh(x)  # d/dv of (v²/g)·ln cosh(g t / v)
        converged = np.abs(y) <= 1e-13 * h
        if np.all(converged):
            break
        newton = v - y / np.where(dy_dv == 0.0, 1.0, dy_dv)
        step = np.where((newton >= lo) & (newton <= hi), newton, 0.5 * (lo + hi))
        v = np.where(converged, v, step)
    return v


class Fall(NamedTuple):
    """A fall from rest (or from a given speed) to the pad; arrays of the broadcast input shape.

    Attributes
    ----------
    time_s : np.ndarray
        Time to reach the pad [s].
    landing_speed_m_s : np.ndarray
        Speed at the pad [m/s].
    terminal_speed_m_s : np.ndarray
        Terminal speed in the pad's air [m/s], √(2·m·g/(ρ·Cd·A)); inf without drag.
    """

    time_s: np.ndarray
    landing_speed_m_s: np.ndarray
    terminal_speed_m_s: np.ndarray


def _check_fall_inputs(height_m, mass_kg, drag_area_m2) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    h, m, area = (np.asarray(x, dtype=float) for x in (height_m, mass_kg, drag_area_m2))
    for name, values, ok in (("height_m", h, (h >= 0.0) & (h <= MAX_FALL_HEIGHT_M)), ("mass_kg", m, m > 0.0),
                             ("drag_area_m2", area, (area >= 0.0) & np.isfinite(area))):
        if not np.all(ok & np.isfinite(values)):
            limit = f"between 0 and {MAX_FALL_HEIGHT_M:g} m" if name == "height_m" else (
                "positive" if name == "mass_kg" else "finite and not negative")
            raise ValueError(f"`{name}` must be {limit}")
    return h, m, area


def _gravity(site: Site, z: np.ndarray, vary_gravity: bool) -> np.ndarray:
    if not vary_gravity:
        return np.full(np.shape(z), G0)
    return G0 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + z)) ** 2


class _Slabs(NamedTuple):
    """Each fall cut into its own n equal slabs, top first. ``n_slabs`` and ``height_m`` have the batch shape;
    air at the slab edges has shape (n_max + 1,) + batch shape and at the mid-slabs (n_max,) + batch shape, where
    a fall's slabs beyond its own n are empty (at the pad)."""

    n_slabs: np.ndarray
    height_m: np.ndarray
    rho_edge: np.ndarray
    g_edge: np.ndarray
    rho_mid: np.ndarray
    g_mid: np.ndarray


def _slabs(h: np.ndarray, site: Site, uniform_air: bool, vary_gravity: bool, slab_m: float) -> _Slabs:
    # each fall's own slab count, so a batch gives the numbers of single runs
    n = np.maximum(_MIN_SLABS, np.ceil(h / slab_m)).astype(np.int64)
    k = np.arange(int(np.max(n, initial=_MIN_SLABS)) + 1).reshape((-1,) + (1,) * h.ndim)
    edges = h * np.maximum(1.0 - k / n, 0.0)  # heights above the pad [m], top first
    mids = 0.5 * (edges[:-1] + edges[1:])
    out = []
    for z in (edges, mids):
        rho = np.full(z.shape, float(site.air(0.0)[2])) if uniform_air else site.air(z)[2]
        out += [rho, _gravity(site, z, vary_gravity)]
    return _Slabs(n, h, *out)


def _fall_slabs(beta: np.ndarray, v0: np.ndarray, slabs: _Slabs) -> tuple[np.ndarray, np.ndarray]:
    """Time [s] and end speed [m/s] of falls through ``slabs``; β = m/(Cd·A) [kg/m²] (inf: no drag)."""
    shape = slabs.height_m.shape
    t = np.zeros(shape)
    v = np.broadcast_to(v0, shape).astype(float)
    drag = np.isfinite(beta)
    safe_beta = np.where(drag, beta, 1.0)
    width = slabs.height_m / slabs.n_slabs
    u_eq_top = 2.0 * safe_beta * slabs.g_edge[0] / slabs.rho_edge[0]
    for k in range(slabs.rho_mid.shape[0]):  # sequential in height, vectorised over the batch
        rho_k, g_k = slabs.rho_mid[k], slabs.g_mid[k]
        dz = np.where(k < slabs.n_slabs, width, 0.0)
        u_eq_bottom = 2.0 * safe_beta * slabs.g_edge[k + 1] / slabs.rho_edge[k + 1]
        v_t = np.sqrt(2.0 * safe_beta * g_k / rho_k)
        x = rho_k * dz / safe_beta  # b·Δ with b = ρ/β, the relaxation rate of u = v² per metre
        decay = -np.expm1(-x)  # 1 − exp(−bΔ)
        ratio = np.where(x > 1e-8, decay / np.where(x > 1e-8, x, 1.0), 1.0 - 0.5 * x)  # (1 − e^−bΔ)/(bΔ)
        slope_term = (u_eq_bottom - u_eq_top) * (1.0 - ratio)  # u_eq linear across the slab
        gain = np.where(drag, (u_eq_top - v * v) * decay + slope_term, 2.0 * g_k * dz)  # v1² − v0²
        v1 = np.sqrt(np.maximum(v * v + gain, 0.0))
        dv = gain / np.maximum(v1 + v, 1e-300)  # v1 − v0 without cancellation; 0 for an empty slab
        # Δ/v_t + (v_t/g)·ln(1 + (v1 − v0)/(v_t + v0)); the vacuum limit is (v1 − v0)/g
        t_drag = dz / v_t + v_t / g_k * np.log1p(dv / (v_t + v))
        t = t + np.where(drag, t_drag, dv / g_k)
        v = v1
        u_eq_top = u_eq_bottom
    return t, v


def fall_through_air(height_m: np.ndarray | float, mass_kg: np.ndarray | float, drag_area_m2: np.ndarray | float,
                     site: Site | None = None, *, start_speed_m_s: np.ndarray | float = 0.0,
                     uniform_air: bool = False, vary_gravity: bool = True, slab_m: float = SLAB_M) -> Fall:
    """Fall under quadratic drag from ``height_m`` above the pad to the pad, through the site's atmosphere.

    Parameters
    ----------
    height_m : array_like
        Height above the pad where the fall starts [m], 0 to 80 km.
    mass_kg : array_like
        Falling mass [kg], positive.
    drag_area_m2 : array_like
        Cd·A of everything falling [m²]; 0 for a fall without drag.
    site : Site, optional
        Launch site (elevation, measured temperature and pressure); the sea-level standard atmosphere if None.
    start_speed_m_s : array_like
        Downward speed at ``height_m`` [m/s], 0 (from rest) by default.
    uniform_air : bool
        Hold the pad's density at every height (the closed forms' model).
    vary_gravity : bool
        Inverse-square gravity with altitude (default); False for constant g0.
    slab_m : float
        Largest slab height of the scheme [m] (module docstring).

    The arrays broadcast together; the result has the broadcast shape. Vectorisation
    contract: a batch gives the numbers of single runs (each fall is cut into its
    own slabs). Memory: a few arrays of (number of slabs of the highest fall) ×
    (batch size) floats.

    Returns
    -------
    Fall
        Fall time [s], landing speed [m/s] and terminal speed in the pad's air [m/s].

    Raises
    ------
    ValueError
        A negative or too large height, a mass that is not positive, a negative drag area.

    Notes
    -----
    m·dv/dt = m·g(Z) − ½·ρ(Z)·Cd·A·v², integrated slab by slab: v² exactly for a
    constant relaxation rate and a linearly varying terminal speed squared, the time
    from the constant-air solution (module docstring, which states the error bound).

    >>> fall = fall_through_air(3000.0, 1.0, 2 * 9.80665 / (1.225 * 5.0**2))
    >>> round(float(fall.time_s), 1), round(float(fall.terminal_speed_m_s), 3)
    (558.4, 5.0)
    """
    site = Site() if site is None else site
    h, m, area = _check_fall_inputs(height_m, mass_kg, drag_area_m2)
    v0 = np.asarray(start_speed_m_s, dtype=float)
    if not np.all(np.isfinite(v0) & (v0 >= 0.0)):
        raise ValueError("`start_speed_m_s` must be finite and not negative")
    if not slab_m > 0.0:
        raise ValueError("`slab_m` must be positive")
    with np.errstate(divide="ignore"):
        beta = m / area  # ballistic coefficient m/(Cd·A); inf without drag
    h, beta, v0 = np.broadcast_arrays(h, beta, v0)
    t, v = _fall_slabs(beta, v0, _slabs(h, site, uniform_air, vary_gravity, slab_m))
    return Fall(t, v, pad_terminal_speed_m_s(m, area, site, vary_gravity=vary_gravity) * np.ones(t.shape))


def pad_terminal_speed_m_s(mass_kg: np.ndarray | float, drag_area_m2: np.ndarray | float, site: Site | None = None,
                           *, vary_gravity: bool = True) -> np.ndarray:
    """Terminal speed [m/s] in the air at the pad of ``site``: √(2·m·g/(ρ·Cd·A)); inf without drag.

    The speed a long fall approaches on landing; g is the pad's (inverse-square with the
    elevation unless ``vary_gravity`` is False), ρ the site's at the pad.

    >>> round(float(pad_terminal_speed_m_s(1.0, 0.75 * 3.141592653589793 * 0.9**2 / 4)), 4)
    5.7928
    """
    site = Site() if site is None else site
    _, m, area = _check_fall_inputs(0.0, mass_kg, drag_area_m2)
    g_pad = _gravity(site, np.zeros(()), vary_gravity)
    with np.errstate(divide="ignore"):
        return terminal_speed_m_s(m, area, float(site.air(0.0)[2]), g_pad)


def landing_descent_rate_m_s(frame: Airframe, burnt_mass_kg: np.ndarray | float,
                             body_drag_area_m2: np.ndarray | float | None = None) -> np.ndarray:
    """Estimated descent rate under the recovery device(s) at landing [m/s]: the terminal speed at the pad,
    √(2·m·g₀/(ρ_pad·(Cd·A_devices + Cd·A_body))), NaN for an airframe without a device.

    The rate a descent under a device approaches well before landing; ``match`` and ``match --robust`` judge it
    where they do not fly the descent (``fly`` and ``scatter`` always fly it). The devices open at landing are
    every device, or the last one that replaces those before it. The body's drag area is its drag coefficient (a
    table's first entry) times its reference area, unless ``body_drag_area_m2`` gives one per flight (sampled
    airframes); g₀ is standard gravity and ρ the site's density at the pad.

    Parameters
    ----------
    frame : Airframe
    burnt_mass_kg : float or ndarray, shape (n,)
        The rocket's mass after burnout [kg].
    body_drag_area_m2 : float or ndarray, shape (n,), optional
        The body's Cd·A [m²].
    """
    burnt = np.asarray(burnt_mass_kg, dtype=float)
    devices = frame.recovery_devices
    if not devices:
        return np.full(burnt.shape, np.nan)
    if body_drag_area_m2 is None:
        body_drag_area_m2 = (frame.drag_cds[0] if frame.drag_table else frame.drag_coefficient) * frame.reference_area_m2
    open_m2 = 0.0
    for device in devices:
        open_m2 = device.drag_area_m2 + (0.0 if device.replaces else open_m2)
    return terminal_speed_m_s(burnt, open_m2 + np.asarray(body_drag_area_m2, dtype=float),
                              float(frame.launch.site.air(0.0)[2]))


def drag_area_from_fall_m2(height_m: np.ndarray | float, time_s: np.ndarray | float,
                           mass_kg: np.ndarray | float = 1.0, site: Site | None = None, *,
                           uniform_air: bool = False, vary_gravity: bool = True, slab_m: float = SLAB_M
                           ) -> np.ndarray:
    """Drag area Cd·A [m²] that makes ``mass_kg`` fall from rest through ``height_m`` in ``time_s``.

    Parameters
    ----------
    height_m, time_s : array_like
        Height fallen [m] and the observed fall time [s], both positive.
    mass_kg : array_like
        Falling mass [kg]; with the default 1 kg the result is the drag area per kilogram.
    site, uniform_air, vary_gravity, slab_m
        As in :func:`fall_through_air`.

    Returns
    -------
    np.ndarray
        Cd·A [m²], of the broadcast shape; ``fall_through_air`` with it reproduces ``time_s``
        to 1e-12 relative.

    Raises
    ------
    ValueError
        Non-positive height or time, or a fall faster than in vacuum (which no drag explains).

    Notes
    -----
    The fall time decreases monotonically in the ballistic coefficient β = m/(Cd·A).
    The root of ln t(β) = ln t_obs is bracketed in ln β, starting from the
    constant-density inverse, and refined by regula falsi with the Illinois
    safeguard (bisection when a step stalls); in the terminal-speed regime
    ln t is nearly linear in ln β, so a few steps suffice.

    >>> round(float(drag_area_from_fall_m2(82.0, 9.5, 0.015)), 5)
    0.00281
    """
    site = Site() if site is None else site
    h, m, _ = _check_fall_inputs(height_m, mass_kg, 0.0)
    t_obs = np.asarray(time_s, dtype=float)
    if not (np.all(h > 0.0) and np.all(np.isfinite(t_obs) & (t_obs > 0.0))):
        raise ValueError("`height_m` and `time_s` must be positive")
    h, t_obs, m = np.broadcast_arrays(h, t_obs, m)
    vacuum_s = np.sqrt(2.0 * h / G0)
    if np.any(t_obs <= vacuum_s):
        worst = int(np.argmax((t_obs <= vacuum_s).ravel()))
        raise ValueError(f"a fall of {h.ravel()[worst]:g} m needs more than {vacuum_s.ravel()[worst]:.4g} s even "
                         "in vacuum; the observed time is too short")
    slabs = _slabs(h, site, uniform_air, vary_gravity, slab_m)
    zero = np.zeros(h.shape)

    def excess(log_beta: np.ndarray) -> np.ndarray:
        """ln(t(β)/t_obs): positive when the fall is too slow (β too small); decreasing in ln β."""
        t, _ = _fall_slabs(np.exp(log_beta), zero, slabs)
        return np.log(t / t_obs)

    # start around the constant-density inverse at the pad; thinner air aloft needs a smaller β (more drag)
    v_guess = terminal_speed_from_fall_m_s(h, t_obs)
    x_guess = np.log(v_guess**2 * float(site.air(0.0)[2]) / (2.0 * G0))
    lo, hi = x_guess - 0.5, x_guess + 0.5
    f_lo, f_hi = excess(lo), excess(hi)
    for _ in range(60):  # widen until f(lo) > 0 > f(hi); β spans e^±120, far beyond any parachute or dart
        widen_lo, widen_hi = f_lo <= 0.0, f_hi >= 0.0
        if not (np.any(widen_lo) or np.any(widen_hi)):
            break
        lo, hi = np.where(widen_lo, lo - 4.0, lo), np.where(widen_hi, hi + 4.0, hi)
        f_lo, f_hi = excess(lo), excess(hi)
    if np.any(f_hi >= 0.0):  # inverse-square gravity makes the model's vacuum fall a little slower than √(2h/g0)
        raise ValueError("the observed time is too short: even without drag the fall takes longer")
    if np.any(f_lo <= 0.0):
        raise ValueError("the observed time is too long for any drag area")
    root = np.full(h.shape, np.nan)
    open_ = np.ones(h.shape, dtype=bool)
    replaced = np.zeros(h.shape, dtype=int)  # Illinois bookkeeping: −1 lo, +1 hi was replaced last
    for _ in range(200):
        x = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)  # f_lo > 0 > f_hi, so the denominator is never 0
        x = np.where((x > lo) & (x < hi), x, 0.5 * (lo + hi))  # bisect when rounding puts it on an end
        f = excess(x)
        done = open_ & ((np.abs(f) <= 1e-13) | (hi - lo <= 4e-16 * np.maximum(1.0, np.abs(x))))
        root = np.where(done, x, root)
        open_ &= ~done
        if not np.any(open_):
            break
        slow = f > 0.0  # x becomes the new lo
        f_hi = np.where(slow & (replaced == -1), 0.5 * f_hi, f_hi)  # Illinois: halve the end kept twice
        f_lo = np.where(~slow & (replaced == 1), 0.5 * f_lo, f_lo)
        lo, f_lo = np.where(slow, x, lo), np.where(slow, f, f_lo)
        hi, f_hi = np.where(slow, hi, x), np.where(slow, f_hi, f)
        replaced = np.where(slow, -1, 1)
    root = np.where(open_, 0.5 * (lo + hi), root)
    return m / np.exp(root)
