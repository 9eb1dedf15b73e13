"""Drag calibration: fit a constant Cd, or a scale on the Cd(Mach) table, to what flights really did.

Two sources of data:

* **Flown apogees** (:func:`fit_apogees`): the batched integrator flies each flight (its own
  airframe record carries the day's conditions) with trial drag values; one flight gives a
  root solve of h(k) = H (apogee falls monotonically with drag), several a least-squares fit
  of Σ((h_i(k) − H_i)/σ_i)² by Gauss–Newton. The uncertainty of k is the larger of the
  measurement part 1/√(Σ J_i²/σ_i²) and, from 2 flights on, the scatter part √(s²/Σ J_i²),
  s² = Σ r_i²/(n − 1), with J_i = ∂h_i/∂k at the fit.
* **An altimeter log** (:func:`fit_log`): liftoff, burnout and apogee are detected in the
  altitude record; over the coast (burnout + a margin to apogee) a vertical point-mass model
  ż = v, v̇ = −g(Z) − ½ρ(z)·v|v|·Cd(Mach)·A·k/m is fitted by Gauss–Newton in (k, z0, v0),
  the altitude and speed at the start of the window being free so that neither the
  motor's impulse nor the boost matter. Air and gravity as in :mod:`motorlib.flight.integrate`
  (the site's atmosphere, inverse-square gravity). The coast is taken as vertical: a flight
  that arcs over or weathercocks strongly makes the fitted drag too high.

``k`` is the constant Cd itself for an airframe without a drag table (``drag_coefficient``),
or the factor on every Cd of the table (``drag_scale``, 1 = the table as given).

numpy only at import; the functions use no other package.
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Any, Final, Sequence

import numpy as np

from .airframe import Airframe
from .atmosphere import EARTH_RADIUS_M, pressure_pa
from .integrate import OK, FlightSettings, simulate
from .results import dense_trajectory
from ..motor.record import MotorRecord
from ..units import STANDARD_GRAVITY_M_S2

__all__ = ["DEFAULT_APOGEE_RELATIVE_STD", "PLAUSIBLE_DRAG", "altitude_from_pressure_m", "detect_events", "drag_kind", "fit_apogees", "implausible_drag", "flight_conditions", "simulated_track",
           "fit_log", "with_drag"]

DEFAULT_APOGEE_RELATIVE_STD: Final = 0.01  # from memory: hobby barometric altimeters are good to about 1 %
_COAST_MARGIN_S: Final = 0.3  # skip the tail-off and the ejection of the motor's last gases after burnout


def drag_kind(frame: Airframe) -> str:
    """``drag_scale`` for an airframe with a Cd(Mach) table, else ``drag_coefficient``."""
    return "drag_scale" if frame.drag_table else "drag_coefficient"


# Plausible fitted drag: a whole model or high-power rocket has a zero-lift Cd of about 0.3 to 1.0 on its body
# cross-section (common practice, no published source); a fitted scale on a Cd(Mach) table estimated from the
# shape should stay within about 0.6 to 1.6 of it (common practice, no published source). Outside, a wrong unit
# (feet read as metres), a wrong motor or a wrong mass is far more likely than the drag.
PLAUSIBLE_DRAG = {"drag_coefficient": (0.3, 1.0), "drag_scale": (0.6, 1.6)}


def implausible_drag(kind: str, value: float) -> str | None:
    """Why a fitted drag ``value`` of ``kind`` (see :func:`drag_kind`) is hard to believe, or None.

    >>> implausible_drag("drag_coefficient", 0.55) is None
    True
    >>> implausible_drag("drag_coefficient", 2.35)[:20]
    'a drag coefficient o'
    """
    low, high = PLAUSIBLE_DRAG[kind]
    if low <= value <= high:
        return None
    name = "a drag coefficient" if kind == "drag_coefficient" else "a drag scale"
    return (f"{name} of {value:.3g} is outside the usual {low:g} to {high:g}: check the measured apogee's unit "
            "(feet or metres), the motor and the masses before trusting it")


def nominal_drag(frame: Airframe) -> float:
    """The drag value the airframe file gives: its constant Cd, or 1 (the scale) with a Cd(Mach) table."""
    return 1.0 if frame.drag_table else frame.drag_coefficient


def with_drag(frame: Airframe, value: float) -> Airframe:
    """``frame`` flying with drag value ``value`` (a Cd, or a scale on the table).

    The table's scale is flown as a scaled reference area (the diameter times √k), which
    changes the drag only; the geometry is dropped (its nose must match the diameter).
    """
    if not (math.isfinite(value) and value > 0.0):
        raise ValueError(f"a drag value must be positive, got {value!r}")
    if frame.drag_table:
        return replace(frame, diameter_m=frame.diameter_m * math.sqrt(value), geometry=None)
    return replace(frame, drag_coefficient=value, geometry=None)


def _apogees(frames: Sequence[Airframe], records: Sequence[MotorRecord], values: np.ndarray,
             settings: FlightSettings) -> np.ndarray:
    """Apogee [m] of every flight at every drag value, shape (n_values, n_flights); one batched call."""
    batch = [with_drag(f, float(v)) for v in values for f in frames]
    res = simulate(batch, [r for _ in values for r in records], settings, descent=False)
    apogee = np.where(res.status == OK, res.apogee_m, np.nan)
    return apogee.reshape(len(values), len(frames))


def fit_apogees(frames: Sequence[Airframe], records: Sequence[MotorRecord], apogees_m: Sequence[float], *,
                apogee_std_m: Sequence[float] | float | None = None, settings: FlightSettings | None = None,
                labels: Sequence[str] | None = None) -> dict[str, Any]:
    """Fit the drag that reproduces measured apogees.

    Parameters
    ----------
    frames : sequence of Airframe
        One per flight, with that day's launch conditions and mass; all with a drag table, or all without.
    records : sequence of MotorRecord
        The motor of each flight.
    apogees_m : sequence of float
        Measured apogees above the pad [m].
    apogee_std_m : float or sequence, optional
        One standard deviation of each measurement [m]; default 1 % of it (``DEFAULT_APOGEE_RELATIVE_STD``).
    settings : FlightSettings, optional
    labels : sequence of str, optional

    Returns
    -------
    dict
        ``drag_scale`` or ``drag_coefficient``; ``uncertainty`` (one standard deviation of it);
        ``residuals_m`` (measured − simulated with the fit); ``simulated_m``; ``method``
        (``root`` or ``least squares``); ``sensitivity_m`` (∂h/∂k of each flight).

    Raises
    ------
    ValueError
        Mismatched lengths, mixed drag kinds, a non-positive apogee, or no drag value that reaches
        an apogee (between a tenth and ten times the nominal drag).

    Examples
    --------
    One flight gives the drag that reproduces it; the residual is (nearly) zero:

    >>> from motorlib.flight.airframe import Airframe
    >>> from motorlib.motor.record import MotorRecord
    >>> motor = MotorRecord("F30", [0.0, 0.1, 1.5, 1.6], [0.0, 30.0, 30.0, 0.0], total_mass_kg=0.08,
    ...                     propellant_mass_kg=0.04, delays_s=(6.0,))
    >>> fit = fit_apogees([Airframe("demo", 0.3, 0.04, 0.6)], [motor], [400.0])
    >>> round(abs(fit["residuals_m"][0]), 3)
    0.0
    """
    n = len(frames)
    if not (n == len(records) == len(apogees_m)) or n == 0:
        raise ValueError("`frames`, `records` and `apogees_m` must have the same non-zero length")
    kinds = {drag_kind(f) for f in frames}
    if len(kinds) != 1:
        raise ValueError("`frames` must all have a drag table, or all a constant drag coefficient")
    kind = kinds.pop()
    measured = np.asarray(apogees_m, dtype=float)
    if not np.all(np.isfinite(measured) & (measured > 0.0)):
        raise ValueError("every measured apogee must be a positive number")
    sigma = (DEFAULT_APOGEE_RELATIVE_STD * measured if apogee_std_m is None
             else np.broadcast_to(np.asarray(apogee_std_m, dtype=float), (n,)).astype(float))
    if not np.all(sigma > 0.0):
        raise ValueError("`apogee_std_m` must be positive")
    s = settings or FlightSettings()
    k0 = nominal_drag(frames[0])
    upper = 4.99 if kind == "drag_coefficient" else 10.0 * k0  # the Airframe record refuses Cd >= 5
    grid = np.geomspace(0.1 * k0, min(upper, 10.0 * k0), 13)
    heights = _apogees(frames, records, grid, s)
    weights = 1.0 / sigma**2
    cost = np.nansum(weights * (heights - measured) ** 2, axis=1)
    cost = np.where(np.all(np.isfinite(heights), axis=1), cost, np.inf)
    best = int(np.argmin(cost))
    if not np.isfinite(cost[best]):
        raise ValueError("no drag value between a tenth and ten times the nominal one gives every flight an apogee")
    if n == 1:
        k, method = _root(frames, records, float(measured[0]), grid, heights[:, 0], s), "root"
    else:
        k, method = _least_squares(frames, records, measured, weights, float(grid[best]), s), "least squares"
    step = 1e-3 * k
    h = _apogees(frames, records, np.array([k, k + step]), s)
    sensitivity = (h[1] - h[0]) / step
    residuals = measured - h[0]
    information = float(np.sum(sensitivity**2 * weights))
    uncertainty = 1.0 / math.sqrt(information) if information > 0 else math.inf
    if n >= 2:
        scatter = float(np.sum(residuals**2) / (n - 1))
        uncertainty = max(uncertainty, math.sqrt(scatter / max(float(np.sum(sensitivity**2)), 1e-300)))
    return {kind: k, "uncertainty": uncertainty, "residuals_m": [float(r) for r in residuals],
            "simulated_m": [float(v) for v in h[0]], "measured_m": [float(v) for v in measured],
            "apogee_std_m": [float(v) for v in sigma], "sensitivity_m": [float(v) for v in sensitivity],
            "method": method, "n_flights": n, "labels": list(labels) if labels else [f"flight {i + 1}" for i in range(n)],
            "rms_residual_m": float(np.sqrt(np.mean(residuals**2)))}


def _root(frames, records, target: float, grid: np.ndarray, heights: np.ndarray, s: FlightSettings) -> float:
    """Illinois regula falsi on h(k) − H, bracketed on the grid (h falls with k)."""
    f = heights - target
    sign_change = np.flatnonzero((f[:-1] > 0.0) & (f[1:] <= 0.0))
    if sign_change.size == 0:
        raise ValueError(f"no drag value between {grid[0]:.3g} and {grid[-1]:.3g} gives the measured apogee "
                         f"{target:.1f} m (simulated {np.nanmin(heights):.1f} to {np.nanmax(heights):.1f} m)")
    i = int(sign_change[0])
    lo, hi, f_lo, f_hi = float(grid[i]), float(grid[i + 1]), float(f[i]), float(f[i + 1])
    side = 0
    k = lo
    for _ in range(60):
        k = (lo * f_hi - hi * f_lo) / (f_hi - f_lo) if f_hi != f_lo else 0.5 * (lo + hi)
        value = float(_apogees(frames, records, np.array([k]), s)[0, 0]) - target
        if abs(value) <= 1e-7 * target or hi - lo <= 1e-12 * k:
            break
        if value > 0.0:  # still too high: more drag
            lo, f_lo = k, value
            if side == 1:
                f_hi /= 2.0
            side = 1
        else:
            hi, f_hi = k, value
            if side == -1:
                f_lo /= 2.0
            side = -1
    return k


def _least_squares(frames, records, measured: np.ndarray, weights: np.ndarray, k: float, s: FlightSettings) -> float:
    """Gauss–Newton in one parameter, the derivative by a forward difference in the same batched call."""
    for _ in range(30):
        step = 1e-4 * k
        h = _apogees(frames, records, np.array([k, k + step]), s)
        jac = (h[1] - h[0]) / step
        r = measured - h[0]
        delta = float(np.sum(weights * jac * r) / np.sum(weights * jac * jac))
        new = min(max(k + delta, 0.5 * k), 2.0 * k)  # at most a factor of 2 per step
        if abs(new - k) <= 1e-9 * k:
            return new
        k = new
    return k


# ----------------------------------------------------------------------------- altimeter logs
def altitude_from_pressure_m(pressure_pa_values: np.ndarray, pad_pressure_pa: float) -> np.ndarray:
    """Height above the pad [m] from pressures [Pa], by the standard atmosphere (as altimeters do).

    z = Z(p) − Z(p_pad), Z the standard geometric altitude of a pressure, inverted from a 0.5 m table.

    >>> round(float(altitude_from_pressure_m(np.array([89874.57]), 101325.0)[0]), 1)
    1000.2
    """
    heights = np.arange(-2000.0, 40_000.0, 0.5)
    table = np.log(pressure_pa(heights))[::-1]  # increasing for np.interp
    def level(p: np.ndarray) -> np.ndarray:
        return np.interp(np.log(p), table, heights[::-1])
    return level(np.asarray(pressure_pa_values, dtype=float)) - float(level(np.array([pad_pressure_pa]))[0])


def _smooth(values: np.ndarray, width: int) -> np.ndarray:
    """Centred moving average over ``width`` samples (odd), edges by the shorter windows."""
    width = max(1, width | 1)
    kernel = np.ones(width)
    total = np.convolve(values, kernel, mode="same")
    count = np.convolve(np.ones_like(values), kernel, mode="same")
    return total / count


def detect_events(time_s: np.ndarray, altitude_m: np.ndarray) -> dict[str, float]:
    """Liftoff, burnout and apogee times [s] in an altitude record (heights above the pad).

    Liftoff: the last time before the record first passes 10 m where the smoothed height is
    within 3 noise standard deviations (at least 0.5 m) of the pad level; burnout: the highest
    vertical speed (a 0.25 s linear fit) between liftoff and apogee; apogee: the highest
    smoothed height. The pad level and its noise come from the record before liftoff.

    Raises
    ------
    ValueError
        When the record never rises 10 m above its start.
    """
    t = np.asarray(time_s, dtype=float)
    z = np.asarray(altitude_m, dtype=float)
    if t.ndim != 1 or t.size != z.size or t.size < 10 or np.any(np.diff(t) <= 0):
        raise ValueError("the log needs at least 10 samples with strictly increasing times")
    rate = 1.0 / float(np.median(np.diff(t)))
    smooth = _smooth(z, int(round(0.2 * rate)))
    start = max(3, int(round(0.5 * rate)))
    pad = float(np.median(z[:start]))
    above = np.flatnonzero(smooth - pad > 10.0)
    if above.size == 0:
        raise ValueError("the log never rises 10 m above its first reading: no flight found")
    first = int(above[0])
    noise = float(np.std(z[: max(start, first // 2)] - smooth[: max(start, first // 2)]))
    near = np.flatnonzero(smooth[:first] - pad <= max(3.0 * noise, 0.5))
    liftoff = int(near[-1]) if near.size else 0
    top = int(np.argmax(smooth))
    half = max(2, int(round(0.125 * rate)))
    speeds = np.full(t.size, -np.inf)
    for i in range(liftoff + half, max(top - half, liftoff + half + 1)):
        window = slice(i - half, i + half + 1)
        speeds[i] = np.polyfit(t[window] - t[i], z[window], 1)[0]
    burnout = int(np.argmax(speeds))
    return {"liftoff_time_s": float(t[liftoff]), "burnout_time_s": float(t[burnout]), "apogee_time_s": float(t[top]),
            "apogee_m": float(smooth[top] - pad), "pad_level_m": pad, "noise_m": noise,
            "max_speed_m_s": float(speeds[burnout])}


def _coast(frame: Airframe, mass_kg: float, params: np.ndarray, t0: float, times: np.ndarray,
           settings: FlightSettings) -> np.ndarray:
    """Heights at ``times`` of vertical coasts from (t0, z0, v0), drag value k; params shape (n_sets, 3)."""
    site = frame.launch.site
    heights = np.arange(-100.0, 40_000.0, 5.0)
    _, _, rho_table, sound_table = site.air(heights)
    machs, cds = np.array(frame.drag_machs), np.array(frame.drag_cds)
    k, z, v = (params[:, j].astype(float).copy() for j in range(3))
    area = frame.reference_area_m2
    scale = k if frame.drag_table else k / frame.drag_coefficient  # the table's Cd times k, or Cd = k

    def accel(zz: np.ndarray, vv: np.ndarray) -> np.ndarray:
        rho = np.interp(zz, heights, rho_table)
        if settings.uniform_air:
            rho = np.full_like(zz, float(rho_table[20]))
        cd = np.interp(np.abs(vv) / np.interp(zz, heights, sound_table), machs, cds) * scale
        grav = (STANDARD_GRAVITY_M_S2 * (EARTH_RADIUS_M / (EARTH_RADIUS_M + site.elevation_m + zz)) ** 2
                if settings.vary_gravity else STANDARD_GRAVITY_M_S2)
        return -grav - 0.5 * rho * vv * np.abs(vv) * cd * area / mass_kg

    out = np.empty((params.shape[0], times.size))
    h_max = 0.01  # [s]: RK4 error far below a barometer's noise at this step
    now = t0
    for j, target in enumerate(times):
        while target - now > 1e-12:
            h = min(h_max, target - now)
            a1 = accel(z, v)
            a2 = accel(z + 0.5 * h * v, v + 0.5 * h * a1)
            a3 = accel(z + 0.5 * h * (v + 0.5 * h * a1), v + 0.5 * h * a2)
            a4 = accel(z + h * (v + 0.5 * h * a2), v + h * a3)
            z = z + h * (v + h * (a1 + a2 + a3) / 6.0)
            v = v + h * (a1 + 2.0 * a2 + 2.0 * a3 + a4) / 6.0
            now += h
        out[:, j] = z
    return out


def fit_log(frame: Airframe, record: MotorRecord, time_s: np.ndarray, altitude_m: np.ndarray, *,
            settings: FlightSettings | None = None) -> dict[str, Any]:
    """Fit the drag over the coast of an altimeter log.

    Parameters
    ----------
    frame : Airframe
        The airframe as flown (its mass without motor, the day's site).
    record : MotorRecord
        The motor flown: its burnt-out mass sets the coasting mass, its burn time the earliest coast start.
    time_s, altitude_m : array, shape (n_samples,)
        The log: time [s] and height above the pad [m] (:func:`altitude_from_pressure_m` for pressures).
    settings : FlightSettings, optional
        Only ``vary_gravity`` and ``uniform_air`` are read.

    Returns
    -------
    dict
        ``drag_scale`` or ``drag_coefficient``, ``uncertainty``, ``residuals_m`` (measured − model over the
        window), ``events`` (:func:`detect_events`), ``window_s`` (start, end), ``coast_start`` (fitted
        height and speed), ``model_time_s`` and ``model_altitude_m`` for a plot, ``rms_residual_m``.

    Raises
    ------
    ValueError
        No flight in the log, a coast shorter than 1 s, or a motor without masses.
    """
    if record.total_mass_kg is None or record.propellant_mass_kg is None:
        raise ValueError(f"motor {record.designation}: total and propellant masses are needed for the coasting mass")
    s = settings or FlightSettings()
    t = np.asarray(time_s, dtype=float)
    z_all = np.asarray(altitude_m, dtype=float)
    events = detect_events(t, z_all)
    z = z_all - events["pad_level_m"]
    burn_s = float(record.time_s[-1] - record.time_s[0])  # the whole curve: liftoff comes after ignition
    start = max(events["burnout_time_s"], events["liftoff_time_s"] + burn_s) + _COAST_MARGIN_S
    end = events["apogee_time_s"] - 0.2  # the last points near apogee carry little drag and the ejection's puff
    window = (t >= start) & (t <= end)
    if window.sum() < 10 or end - start < 1.0:
        raise ValueError(f"the coast from {start:.2f} s to {end:.2f} s is too short to fit a drag")
    tw, zw = t[window], z[window]
    mass = frame.mass_kg + record.total_mass_kg - record.propellant_mass_kg
    # start values: a quadratic through the window's first second for height and speed, the nominal drag
    first = tw <= tw[0] + 1.0
    c2, c1, c0 = np.polyfit(tw[first] - tw[0], zw[first], 2)
    params = np.array([nominal_drag(frame), c0, c1])
    t0 = float(tw[0])
    for _ in range(40):
        steps = np.array([1e-4 * params[0], 1e-3, 1e-3])
        trial = np.vstack([params] + [params + np.eye(3)[j] * steps[j] for j in range(3)])
        model = _coast(frame, mass, trial, t0, tw, s)
        r = zw - model[0]
        jac = ((model[1:] - model[0]) / steps[:, None]).T  # (n_points, 3)
        delta, *_ = np.linalg.lstsq(jac, r, rcond=None)
        delta[0] = np.clip(delta[0], -0.5 * params[0], params[0])  # keep the drag positive, at most double it
        params = params + delta
        if abs(delta[0]) <= 1e-7 * params[0] and abs(delta[1]) < 1e-6 and abs(delta[2]) < 1e-6:
            break
    model = _coast(frame, mass, params[None, :], t0, tw, s)[0]
    residuals = zw - model
    dof = max(tw.size - 3, 1)
    s2 = float(np.sum(residuals**2) / dof)
    cov = s2 * np.linalg.inv(jac.T @ jac)
    kind = drag_kind(frame)
    return {kind: float(params[0]), "uncertainty": float(math.sqrt(max(cov[0, 0], 0.0))),
            "residuals_m": [float(v) for v in residuals], "rms_residual_m": float(math.sqrt(np.mean(residuals**2))),
            "n_points": int(tw.size), "events": events, "window_s": [float(tw[0]), float(tw[-1])],
            "coast_start": {"time_s": t0, "altitude_m": float(params[1]), "speed_m_s": float(params[2])},
            "model_time_s": [float(v) for v in tw], "model_altitude_m": [float(v) for v in model],
            "method": "least squares over the coast"}


def flight_conditions(frame: Airframe, *, wind_speed_m_s: float | None = None, temperature_k: float | None = None,
                      pressure_pa: float | None = None, added_mass_kg: float = 0.0) -> Airframe:
    """``frame`` with one flight's conditions: wind at 10 m, pad temperature and pressure, added mass.

    Raises
    ------
    SimulationInputError, ValueError
        When a value is outside what the records accept.
    """
    launch = frame.launch
    site = launch.site
    if temperature_k is not None or pressure_pa is not None:
        site = replace(site, temperature_k=site.temperature_k if temperature_k is None else temperature_k,
                       pressure_pa=site.pressure_pa if pressure_pa is None else pressure_pa)
    launch = replace(launch, site=site,
                     wind_speed_m_s=launch.wind_speed_m_s if wind_speed_m_s is None else wind_speed_m_s)
    return replace(frame, mass_kg=frame.mass_kg + added_mass_kg, launch=launch)


def simulated_track(frame: Airframe, record: MotorRecord, value: float, liftoff_time_s: float,
                    settings: FlightSettings | None = None) -> tuple[np.ndarray, np.ndarray]:
    """Time [s, on the log's clock] and height [m] of the whole simulated flight with drag ``value``, to plot
    against a log; the simulated liftoff is put at the log's ``liftoff_time_s``."""
    res = simulate(with_drag(frame, value), [record], settings, trajectories=True)
    track = dense_trajectory(res.trajectories[0])  # the path between the steps too, to draw
    return track["time_s"] - float(res.liftoff_time_s[0]) + liftoff_time_s, track["altitude_m"]
