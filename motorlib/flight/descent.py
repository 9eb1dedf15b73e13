"""Falling under quadratic drag in still air of constant density: terminal speed, fall time and the inverse.

Model
-----
m·dv/dt = m·g − k·v², k = ½·ρ·(Cd·A). Terminal speed v_t = √(m·g/k) = √(2·m·g/(ρ·Cd·A)).
From rest: v(t) = v_t·tanh(g·t/v_t) and the distance fallen
y(t) = (v_t²/g)·ln cosh(g·t/v_t), so the time to fall a height h is
t = (v_t/g)·arccosh(exp(g·h/v_t²)) (textbook closed form; check-values.md 6.1).
The inverse (from a drop height and an observed fall time, the terminal speed
that explains them) solves y(t; v_t) = h for v_t exactly, by safeguarded Newton
iterations on arrays; it is not the terminal-speed shortcut h/t.

numpy only.
"""

from __future__ import annotations

import numpy as np

from ..units import STANDARD_GRAVITY_M_S2 as G0

__all__ = ["drag_area_m2", "fall_distance_m", "fall_speed_m_s", "fall_time_s", "terminal_speed_from_fall_m_s",
           "terminal_speed_m_s"]


def terminal_speed_m_s(mass_kg, drag_area_m2, density_kg_m3=1.225):
    """Terminal speed [m/s]: √(2·m·g/(ρ·Cd·A)).

    >>> round(float(terminal_speed_m_s(1.0, 0.75 * 3.141592653589793 * 0.9**2 / 4)), 4)
    5.7928
    """
    return np.sqrt(2.0 * np.asarray(mass_kg) * G0 / (np.asarray(density_kg_m3) * np.asarray(drag_area_m2)))


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
