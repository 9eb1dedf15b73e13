"""Maxima of speed, dynamic pressure and Mach inside a flown step.

The batched flight samples its running maxima at step ends; a maximum can lie inside a step (thrust falling below
drag and weight in the middle of a long thrust-curve segment, say), where the step-end values miss it. Before this
search they were low by up to 2.3 % in dynamic pressure and 0.5 % in speed on a 5,000-motor synthetic catalog
(tests/synthetic.py), and by 0.6 % in speed for the long thrust tail in wind of tests/flight/test_flight_maxima.py.
A step whose start and end rates of a figure (:func:`.dynamics._figure_rates`) show it rising and then falling
holds such a maximum. The loop records those steps; after it, each step's cubic Hermite interpolant (positions from
the speeds, speeds from the accelerations, at both ends) is searched on a grid of 17 points, then on 9 points
around the best, and a parabola through the best three gives the peak. All recorded steps are searched together.
numpy only.
"""

from __future__ import annotations

import numpy as np

from .dynamics import _Group

__all__: list[str] = []

_FIRST = np.linspace(0.0, 1.0, 17)  # the first grid over the step (fractions of it)
_SECOND = np.linspace(0.0, 1.0, 9)  # the second, across the first grid's best point and its neighbours


def _hermite(theta: np.ndarray, h: np.ndarray, y0: np.ndarray, d0: np.ndarray, y1: np.ndarray,
             d1: np.ndarray) -> np.ndarray:
    """Cubic Hermite interpolant at fractions ``theta`` (shape (p, m)) of steps of length h (shape (m,)) between
    values y0, y1 with time derivatives d0, d1 (shape (m,))."""
    t2 = theta * theta
    t3 = t2 * theta
    return ((2.0 * t3 - 3.0 * t2 + 1.0) * y0 + (t3 - 2.0 * t2 + theta) * (h * d0)
            + (3.0 * t2 - 2.0 * t3) * y1 + (t3 - t2) * (h * d1))


def _figures(g: _Group, params: dict[str, np.ndarray], theta: np.ndarray, h: np.ndarray,
             ends: tuple[dict[str, np.ndarray], dict[str, np.ndarray]], planar: bool) -> np.ndarray:
    """Speed over the ground [m/s], dynamic pressure [Pa] and Mach at fractions ``theta`` (shape (p, m)) of the
    steps: array of shape (3, p, m)."""
    e0, e1 = ends
    shape2 = theta.shape
    z = _hermite(theta, h, e0["z"], e0["vz"], e1["z"], e1["vz"])
    vx = _hermite(theta, h, e0["vx"], e0["ax"], e1["vx"], e1["ax"])
    vz = _hermite(theta, h, e0["vz"], e0["az"], e1["vz"], e1["az"])
    flat = {k: np.broadcast_to(v, shape2).ravel() for k, v in params.items()}
    zf = z.ravel()
    rho, sound, _, shape = g.lookup(zf)
    wind_x, wind_y = g.wind(flat, zf, shape)
    vrx = vx.ravel() - wind_x
    speed2, rel2 = vx * vx + vz * vz, (vrx * vrx).reshape(shape2) + vz * vz
    if not planar:
        vy = _hermite(theta, h, e0["vy"], e0["ay"], e1["vy"], e1["ay"])
        vry = vy.ravel() if wind_y is None else vy.ravel() - wind_y
        speed2 = speed2 + vy * vy
        rel2 = rel2 + (vry * vry).reshape(shape2)
    rel = np.sqrt(rel2)
    return np.stack((np.sqrt(speed2), 0.5 * rho.reshape(shape2) * rel2, rel / sound.reshape(shape2)))


def interior_peaks(g: _Group, params: dict[str, np.ndarray], h: np.ndarray,
                   ends: tuple[dict[str, np.ndarray], dict[str, np.ndarray]], planar: bool) -> np.ndarray:
    """The largest speed over the ground [m/s], dynamic pressure [Pa] and Mach inside each of m steps (shape (3, m)).

    ``params``: the flights' parameters the wind needs (``wind``, or the axes for a measured profile), shape (m,);
    ``h``: the steps' lengths [s]; ``ends``: the state at each end (z, vx, vy, vz, ax, ay, az [m, m/s, m/s²]),
    the acceleration the derivative there.
    """
    m = h.size
    grid = np.broadcast_to(_FIRST[:, None], (_FIRST.size, m))
    values = _figures(g, params, grid, h, ends, planar)  # (3, p, m)
    spacing = _FIRST[1] - _FIRST[0]
    centre = _FIRST[np.argmax(values, axis=1)]  # (3, m): each figure's best point
    lo, hi = np.maximum(centre - spacing, 0.0), np.minimum(centre + spacing, 1.0)
    # each figure's nine points between its best point's neighbours, all searched in one pass: (3·9, m)
    theta = (lo[:, None, :] + (hi - lo)[:, None, :] * _SECOND[None, :, None]).reshape(-1, m)
    fine_all = _figures(g, params, theta, h, ends, planar)
    out = np.empty((3, m))
    cols = np.arange(m)
    n = _SECOND.size
    for f in range(3):
        fine = fine_all[f, f * n:(f + 1) * n]  # (9, m)
        k = np.clip(np.argmax(fine, axis=0), 1, n - 2)
        y_lo, y_mid, y_hi = fine[k - 1, cols], fine[k, cols], fine[k + 1, cols]
        # the parabola through three equally spaced points peaks (y_hi − y_lo)² / (8·(2·y_mid − y_lo − y_hi)) above
        # the middle one; the peak lying between the outer two, that is at most |y_hi − y_lo| / 8
        curve = 2.0 * y_mid - y_lo - y_hi
        lift = np.where(curve > 0.0, (y_hi - y_lo) ** 2 / (8.0 * np.where(curve > 0.0, curve, 1.0)), 0.0)
        out[f] = np.maximum(fine.max(axis=0), y_mid + np.minimum(lift, np.abs(y_hi - y_lo) / 8.0))
    return out
