"""The batched flight's Runge-Kutta pair (issue 16): the Dormand–Prince 5(4) tableau, its order and stability,
and the same bits for a flight whatever the batch.

Outside references: scipy's own RK45 tableau (scipy.integrate, the same published pair), the order conditions of
Runge-Kutta methods (Butcher; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed., 1993,
Table II.2.2) and the stability polynomial of the fifth-order solution, 1 + z + z²/2 + z³/6 + z⁴/24 + z⁵/120 +
z⁶/600, with its real stability limit of about -3.31 (Hairer & Wanner, Solving Ordinary Differential Equations II,
2nd ed., 1996, section IV.2, the stability domain of DOPRI5; the digits here are computed, the figure is from
memory).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate._ivp.rk import RK45

from motorlib.flight import FlightSettings, MotorPack, simulate
from motorlib.flight.integrate import _DP_A, _DP_B, _DP_C, _DP_E, _MAX_DESCENT_STEP_FRACTION, _combine

from ..synthetic import synthetic_flights


def _matrix() -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    a = np.zeros((6, 6))
    for i, row in enumerate(_DP_A):
        a[i, :len(row)] = row
    return a, np.array(_DP_B), np.array(_DP_C)


def test_the_tableau_is_scipys_rk45() -> None:
    a, b, c = _matrix()
    assert np.allclose(a[1:, :5], RK45.A[1:], rtol=1e-15, atol=0.0)
    assert np.allclose(b, RK45.B, rtol=1e-15, atol=0.0)
    assert np.allclose(c, RK45.C, rtol=1e-15, atol=0.0)
    # scipy stores the embedded solution minus the fifth-order one; ours is b − b̂: opposite signs
    assert np.allclose(_DP_E, -RK45.E, rtol=1e-15, atol=1e-18)


def test_order_conditions_up_to_five() -> None:
    # Butcher's conditions for order 5 (the 17 trees up to order 5, the usual list; Hairer, Nørsett & Wanner I,
    # Table II.2.2), and c = A·1 (the nodes are the rows' sums)
    a, b, c = _matrix()
    assert np.allclose(a.sum(axis=1), c, atol=1e-15)
    ac, ac2, ac3 = a @ c, a @ c**2, a @ c**3
    conditions = [
        (b.sum(), 1.0), (b @ c, 1 / 2), (b @ c**2, 1 / 3), (b @ ac, 1 / 6),
        (b @ c**3, 1 / 4), (b @ (c * ac), 1 / 8), (b @ ac2, 1 / 12), (b @ (a @ ac), 1 / 24),
        (b @ c**4, 1 / 5), (b @ (c**2 * ac), 1 / 10), (b @ (c * ac2), 1 / 15), (b @ (c * (a @ ac)), 1 / 30),
        (b @ (ac * ac), 1 / 20), (b @ ac3, 1 / 20), (b @ (a @ (c * ac)), 1 / 40), (b @ (a @ ac2), 1 / 60),
        (b @ (a @ (a @ ac)), 1 / 120),
    ]
    for got, want in conditions:
        assert got == pytest.approx(want, abs=1e-14)
    # the embedded solution b̂ = b − e (over the seven stages, the seventh at the step's end) is of order 4, not 5
    full_a = np.zeros((7, 7))
    full_a[:6, :6] = a
    full_a[6, :6] = b
    b_hat = np.append(b, 0.0) - np.array(_DP_E)
    c7 = np.append(c, 1.0)
    assert b_hat.sum() == pytest.approx(1.0, abs=1e-15)
    assert b_hat @ c7**3 == pytest.approx(1 / 4, abs=1e-15)
    assert b_hat @ c7**4 != pytest.approx(1 / 5, abs=1e-6)


def _stability(z: float) -> float:
    a, b, _ = _matrix()
    return float(1.0 + z * b @ np.linalg.solve(np.eye(6) - z * a, np.ones(6)))


def test_stability_polynomial_and_the_descent_step_limit() -> None:
    for z in (-0.5, -1.7, -3.0, 0.4):
        assert _stability(z) == pytest.approx(sum(z**k / f for k, f in enumerate((1, 1, 2, 6, 24, 120, 600))),
                                              rel=1e-12)
    # stable on the real axis to about -3.31; the descent step's fraction f of the drag time scale gives
    # h·λ = -2f, so the largest accepted fraction (1.6, h·λ = -3.2) and the default (1.5) lie inside it
    assert abs(_stability(-3.30)) < 1.0 < abs(_stability(-3.32))
    assert abs(_stability(-2.0 * _MAX_DESCENT_STEP_FRACTION)) < 0.85
    assert abs(_stability(-2.0 * FlightSettings().descent_step_fraction)) < 0.6


def test_combine_adds_the_stages_in_order_per_element() -> None:
    rng = np.random.default_rng(3)
    stages = rng.normal(size=(7, 4, 1001))
    whole = _combine(_DP_E, stages)
    for lo, hi in ((0, 1), (3, 700), (999, 1001)):
        assert np.array_equal(_combine(_DP_E, stages[:, :, lo:hi]), whole[:, lo:hi])
    assert np.allclose(whole, np.tensordot(np.array(_DP_E), stages, axes=1), rtol=1e-12, atol=1e-15)


def test_a_flight_has_the_same_bits_alone_and_in_any_batch() -> None:
    frames, motors = synthetic_flights(40, seed=11)
    pack = MotorPack.from_records(motors)
    together = simulate(frames, pack, descent=False)
    for i in (0, 17, 39):
        alone = simulate([frames[i]], [motors[i]], descent=False)
        assert alone.apogee_m[0] == together.apogee_m[i]
        assert alone.apogee_time_s[0] == together.apogee_time_s[i]
        assert alone.rail_exit_speed_m_s[0] == together.rail_exit_speed_m_s[i]


def test_the_continuous_extension_is_scipys_and_ends_on_the_step() -> None:
    # Shampine's order-4 extension of the pair (Math. Comp. 46, 1986), as scipy's RK45 carries it
    from motorlib.flight.peaks import _DP_DENSE

    np.testing.assert_allclose(_DP_DENSE, RK45.P, rtol=1e-15, atol=0.0)
    # at θ = 1 it is the fifth-order solution: Σⱼ P[i, j] = bᵢ (b₇ = 0)
    np.testing.assert_allclose(_DP_DENSE.sum(axis=1), list(_DP_B) + [0.0], rtol=0.0, atol=1e-15)
    # y' = y from y(0) = 1 over one step of 0.1: inside the step it follows e^t to the extension's order
    from motorlib.flight.peaks import _dense, _polynomials

    h = np.array([0.1])
    k = np.empty((7, 1, 1))
    y = np.array([[1.0]])
    for i in range(6):
        k[i, 0, 0] = 1.0 + h[0] * sum(a * k[j, 0, 0] for j, a in enumerate(_DP_A[i]))
    k[6, 0, 0] = 1.0 + h[0] * sum(b * k[j, 0, 0] for j, b in enumerate(_DP_B))  # the derivative at the end
    theta = np.linspace(0.0, 1.0, 11)[:, None]
    (inside,) = _dense(theta, _polynomials(h, y, k, (0,)))
    assert np.max(np.abs(inside[:, 0] - np.exp(theta[:, 0] * 0.1))) < 1e-8  # error O(h^5) ~ 1e-5·1e-4
