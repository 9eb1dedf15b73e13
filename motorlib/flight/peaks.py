"""Maxima of speed, dynamic pressure and Mach inside a flown step.

The batched flight samples its running maxima at step ends; a maximum can lie inside a step (thrust falling below
drag and weight in the middle of a long thrust-curve segment, say), where the step-end values miss it. Before this
search they were low by up to 2.3 % in dynamic pressure and 0.5 % in speed on a 5,000-motor synthetic catalog
(tests/synthetic.py), and by 0.6 % in speed for the long thrust tail in wind of tests/flight/test_flight_maxima.py.
A step whose start and end rates of a figure (:func:`.dynamics._figure_rates`) show it rising and then falling
holds such a maximum (for a thrust curve cut off above zero, its last burn step with the burn's own derivative at its
end). The loop records those steps with their stages; after it, each step's state is followed inside it by the
Dormand–Prince pair's continuous extension of order 4, searched on a grid of 17 points, then on 9 points across the
best and its neighbours, and a parabola through the best three gives the peak; all recorded steps are searched
together. Against the solve_ivp oracle's own search (tests/reference_flight.py) on 300 synthetic flights the three
maxima agree to 3.6e-6 at worst; an independent check on 1,400 2-D and 3-D flights found 5.6e-6. A Mach peak on a
corner of the atmosphere (coasting through the tropopause at 11 km, where the speed of sound stops falling) is
found to about 2e-5 (9 and 5 points overshot such a corner by 1.6e-5 and erred 5.6e-5: not taken). numpy only.
"""

from __future__ import annotations

from typing import Final

import numpy as np

from .dynamics import _Group

__all__: list[str] = []

_FIRST = np.linspace(0.0, 1.0, 17)  # the first grid over the step (fractions of it)
_SECOND = np.linspace(0.0, 1.0, 9)  # the second, across the first grid's best point and its neighbours

# The Dormand–Prince pair's continuous extension of order 4 (L. F. Shampine, "Some practical Runge-Kutta formulas",
# Math. Comp. 46, 1986, pp. 135-150; the coefficients as scipy's RK45 carries them, which the tests compare): the
# state at the fraction θ of a step h is y0 + h·Σᵢ kᵢ·Σⱼ P[i, j]·θ^(j+1) over the seven stages kᵢ.
_DP_DENSE: Final = np.array([
    [1.0, -8048581381 / 2820520608, 8663915743 / 2820520608, -12715105075 / 11282082432],
    [0.0, 0.0, 0.0, 0.0],
    [0.0, 131558114200 / 32700410799, -68118460800 / 10900136933, 87487479700 / 32700410799],
    [0.0, -1754552775 / 470086768, 14199869525 / 1410260304, -10690763975 / 1880347072],
    [0.0, 127303824393 / 49829197408, -318862633887 / 49829197408, 701980252875 / 199316789632],
    [0.0, -282668133 / 205662961, 2019193451 / 616988883, -1453857185 / 822651844],
    [0.0, 40617522 / 29380423, -110615467 / 29380423, 69997945 / 29380423],
])


def _polynomials(h: np.ndarray, state: np.ndarray, stages: np.ndarray, rows: tuple[int, ...]) -> list[tuple]:
    """The continuous extension of the state components ``rows`` as polynomials in θ, one per step: for each
    component, its start value and the coefficients h·Σᵢ kᵢ·P[i, j] of θ^(j+1) (each shape (m,)), from the
    steps' lengths h (m,), start states (components, m) and stages (7, components, m). Summed element by element in a
    fixed order (no matrix product), so that a step's figures do not depend on the other steps in the batch."""
    out = []
    for c in rows:
        coefficients = []
        for j in range(4):
            total = _DP_DENSE[0, j] * stages[0, c]
            for i in range(2, 7):  # stage 2's weights are zero
                total = total + _DP_DENSE[i, j] * stages[i, c]
            coefficients.append(h * total)
        out.append((state[c], *coefficients))
    return out


def _dense(theta: np.ndarray, polynomials: list[tuple]) -> list[np.ndarray]:
    """The components of :func:`_polynomials` at fractions ``theta`` (shape (p, m)) of their steps, by Horner's
    rule: y0 + θ·(c1 + θ·(c2 + θ·(c3 + θ·c4)))."""
    return [y0 + theta * (c1 + theta * (c2 + theta * (c3 + theta * c4))) for y0, c1, c2, c3, c4 in polynomials]


def _figures(g: _Group, params: dict[str, np.ndarray], theta: np.ndarray, polynomials: list[tuple]) -> np.ndarray:
    """Speed over the ground [m/s], dynamic pressure [Pa] and Mach at fractions ``theta`` (shape (p, m)) of the
    steps, whose continuous extension is ``polynomials`` (z, vx, vz or z, vx, vy, vz): array of shape (3, p, m)."""
    shape2 = theta.shape
    if len(polynomials) == 3:  # planar: y and its speed stay 0
        z, vx, vz = _dense(theta, polynomials)
        vy = None
    else:
        z, vx, vy, vz = _dense(theta, polynomials)
    flat = {k: np.broadcast_to(v, shape2).ravel() for k, v in params.items()}
    zf = z.ravel()
    rho, sound, _, shape = g.lookup(zf)
    wind_x, wind_y = g.wind(flat, zf, shape)
    vrx = vx.ravel() - wind_x
    speed2, rel2 = vx * vx + vz * vz, (vrx * vrx).reshape(shape2) + vz * vz
    if vy is not None:
        vry = vy.ravel() if wind_y is None else vy.ravel() - wind_y
        speed2 = speed2 + vy * vy
        rel2 = rel2 + (vry * vry).reshape(shape2)
    rel = np.sqrt(rel2)
    return np.stack((np.sqrt(speed2), 0.5 * rho.reshape(shape2) * rel2, rel / sound.reshape(shape2)))


def interior_peaks(g: _Group, params: dict[str, np.ndarray], h: np.ndarray, state: np.ndarray, stages: np.ndarray,
                   planar: bool) -> np.ndarray:
    """The largest speed over the ground [m/s], dynamic pressure [Pa] and Mach inside each of m steps (shape (3, m)).

    ``params``: the flights' parameters the wind needs (``wind``, or the axes for a measured profile), shape (m,);
    ``h``: the steps' lengths [s]; ``state``: the states at the steps' starts, shape (components, m), positions
    then speeds [m, m/s] ((x, z, vx, vz) when ``planar``, else (x, y, z, vx, vy, vz)); ``stages``: the steps'
    Dormand–Prince stages, shape (7, components, m), the seventh the derivative at the end.
    """
    m = h.size
    polynomials = _polynomials(h, state, stages, (1, 2, 3) if planar else (2, 3, 4, 5))
    values = _figures(g, params, np.broadcast_to(_FIRST[:, None], (_FIRST.size, m)), polynomials)  # (3, p, m)
    spacing = _FIRST[1] - _FIRST[0]
    centre = _FIRST[np.argmax(values, axis=1)]  # (3, m): each figure's best point
    lo, hi = np.maximum(centre - spacing, 0.0), np.minimum(centre + spacing, 1.0)
    # each figure's nine points between its best point's neighbours, all searched in one pass: (3·9, m)
    theta = (lo[:, None, :] + (hi - lo)[:, None, :] * _SECOND[None, :, None]).reshape(-1, m)
    fine_all = _figures(g, params, theta, polynomials)
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
