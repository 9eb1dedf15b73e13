"""Barrowman centre of pressure and the shape records (issue 11); CG and margins are in test_stability.py.

Hand-worked checks use the equations of J. S. Barrowman, *The Practical Calculation of the
Aerodynamic Characteristics of Slender Finned Vehicles*, M.S. thesis, Catholic University of
America, 1967 (published; tests/reference/check_values.md#barrowman), written out again below
independently of motorlib's code. We know no published worked example well enough to quote.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from motorlib import SimulationInputError
from motorlib.flight.geometry import (
    Body,
    Finish,
    Fins,
    Geometry,
    Nose,
    Transition,
    center_of_pressure_m,
    check_diameters,
    diameter_at_m,
    normal_force_components,
)


def _barrowman_fins(n: int, a: float, b: float, s: float, xt: float, d: float, x_le: float, r: float) -> tuple[float, float]:
    """Barrowman (1967) fin normal-force slope with interference, and fin CP, by the textbook formulas."""
    lm = math.sqrt(s**2 + (xt + b / 2 - a / 2) ** 2)
    cn = (1 + r / (s + r)) * 4 * n * (s / d) ** 2 / (1 + math.sqrt(1 + (2 * lm / (a + b)) ** 2))
    x = x_le + xt / 3 * (a + 2 * b) / (a + b) + (a + b - a * b / (a + b)) / 6
    return cn, x


def test_cone_with_three_trapezoidal_fins_matches_barrowman_by_hand() -> None:
    d, nose_l, body_l = 0.040, 0.12, 0.50
    a, b, s, xt = 0.08, 0.04, 0.05, 0.03
    g = Geometry(0.4, Nose("conical", nose_l), Body(body_l), Fins(3, a, b, s, xt, 0.002))
    # Barrowman: nose CN_α = 2, cone CP at 2/3 of its length
    cn_nose, x_nose = 2.0, 2.0 / 3.0 * nose_l
    cn_fins, x_fins = _barrowman_fins(3, a, b, s, xt, d, nose_l + body_l - a, d / 2)
    expected = (cn_nose * x_nose + cn_fins * x_fins) / (cn_nose + cn_fins)
    parts = {p.part: p for p in normal_force_components(g, d)}
    assert parts["nose"].cn_alpha == 2.0 and parts["nose"].cp_m == pytest.approx(x_nose, rel=1e-12)
    assert parts["fins"].cn_alpha == pytest.approx(cn_fins, rel=1e-12)
    assert parts["fins"].cp_m == pytest.approx(x_fins, rel=1e-12)
    assert float(center_of_pressure_m(g, d)) == pytest.approx(expected, rel=1e-12)
    # by calculator: l_m = 0.05099, K = 1.2857, CN_α = 1.2857·18.75/2.3123 = 10.4255;
    # x_F = 0.54 + 0.01333 + 0.01556 = 0.56889; x_CP = (2·0.08 + 10.4255·0.56889)/12.4255 = 0.49020
    assert cn_fins == pytest.approx(10.4255, abs=1e-4) and x_fins == pytest.approx(0.56889, abs=1e-5)
    assert expected == pytest.approx(0.49020, abs=1e-5)


def test_ogive_with_four_clipped_delta_fins_matches_barrowman_by_hand() -> None:
    d, nose_l, body_l = 0.054, 0.27, 0.90  # a 5:1 tangent ogive
    a, b, s = 0.15, 0.05, 0.07
    xt = a - b  # clipped delta: trailing edge square to the body
    offset = 0.01
    g = Geometry(0.7, Nose("ogive", nose_l), Body(body_l), Fins(4, a, b, s, xt, 0.003, offset))
    # Barrowman's table gives the ogive CP at 0.466 of the nose length (from memory; the slender-body
    # value L − V/A of a tangent ogive tends to 7/15 = 0.4667 as it gets longer, 0.4651 at 5:1)
    x_nose = 0.466 * nose_l
    cn_fins, x_fins = _barrowman_fins(4, a, b, s, xt, d, nose_l + body_l - offset - a, d / 2)
    expected = (2.0 * x_nose + cn_fins * x_fins) / (2.0 + cn_fins)
    parts = {p.part: p for p in normal_force_components(g, d)}
    assert parts["nose"].cp_m == pytest.approx(x_nose, rel=3e-3)
    assert parts["fins"].cn_alpha == pytest.approx(cn_fins, rel=1e-12)
    assert float(center_of_pressure_m(g, d)) == pytest.approx(expected, rel=1e-3)


@pytest.mark.parametrize(("shape", "exponent", "fraction"), [
    ("conical", None, 2 / 3),        # Barrowman's table: cone 0.666
    ("power", 0.5, 0.5),             # Barrowman's table: parabola (paraboloid) 0.500
    ("elliptical", None, 1 / 3),     # slender-body theory x = L − V/A with V = (2/3)·A·L
    ("parabolic", None, 7 / 15),     # same with V = (8/15)·A·L for R·(2t − t²)
    ("power", 0.75, 1.5 / 2.5),      # same with V = A·L/(2n + 1)
])
def test_nose_centre_of_pressure(shape: str, exponent: float | None, fraction: float) -> None:
    g = Geometry(0.3, Nose(shape, 0.2, exponent), Body(0.5))
    assert float(center_of_pressure_m(g, 0.05)) == pytest.approx(fraction * 0.2, rel=1e-12)


def test_tangent_ogive_volume_by_quadrature() -> None:
    nose = Nose("ogive", 0.3)
    r = 0.025
    x = np.linspace(0.0, 0.3, 200_001)
    volume = np.trapezoid(np.pi * nose.radius_m(x, r) ** 2, x)
    assert nose.volume_fraction(r) == pytest.approx(volume / (np.pi * r * r * 0.3), rel=1e-8)


def test_transitions_match_barrowman_by_hand() -> None:
    d = 0.040
    shoulder = Transition(0.040, 0.054, 0.05, 0.30)
    boattail = Transition(0.054, 0.045, 0.06, 0.80)
    g = Geometry(0.5, Nose("ogive", 0.16), Body(0.80), transitions=(shoulder, boattail))
    parts = {p.part: p for p in normal_force_components(g, d)}
    for name, (d1, d2, length, x) in {"transition 1": (0.040, 0.054, 0.05, 0.30),
                                      "transition 2": (0.054, 0.045, 0.06, 0.80)}.items():
        # Barrowman: CN_α = 2[(d2/d)² − (d1/d)²], x = x_T + (L/3)[1 + (1 − d1/d2)/(1 − (d1/d2)²)]
        cn = 2 * ((d2 / d) ** 2 - (d1 / d) ** 2)
        cp = x + length / 3 * (1 + (1 - d1 / d2) / (1 - (d1 / d2) ** 2))
        assert parts[name].cn_alpha == pytest.approx(cn, rel=1e-12) and parts[name].cp_m == pytest.approx(cp, rel=1e-12)
    assert parts["transition 2"].cn_alpha < 0  # a boattail pulls the CP forward
    assert float(diameter_at_m(g, d, 0.5)) == pytest.approx(0.054) and float(diameter_at_m(g, d, 0.9)) == pytest.approx(0.045)


def test_fins_on_a_wider_body_use_the_local_radius() -> None:
    d = 0.040
    tr = Transition(0.040, 0.060, 0.05, 0.30)
    fins = Fins(3, 0.1, 0.05, 0.06, 0.05, 0.003)
    g = Geometry(0.5, Nose("ogive", 0.16), Body(0.80), fins, transitions=(tr,))
    cn, _ = _barrowman_fins(3, 0.1, 0.05, 0.06, 0.05, d, 0.86, 0.030)
    assert {p.part: p for p in normal_force_components(g, d)}["fins"].cn_alpha == pytest.approx(cn, rel=1e-12)


def test_fin_compressibility_follows_the_finite_wing_formula() -> None:
    d = 0.040
    fins = Fins(4, 0.08, 0.04, 0.05, 0.03, 0.002)
    g = Geometry(0.4, Nose("ogive", 0.15), Body(0.6), fins)
    # Diederich's lift-slope formula (as used in Barrowman's thesis for subsonic fins; from memory):
    # CN_α(pair) = 2π·A_R·(A_f/A_ref)/(2 + √(4 + (β·A_R/cos Γc)²)), β = √(1 − M²), times N/2 and K
    area = 0.05 * 0.06
    aspect = 2 * 0.05**2 / area
    cos_gc = 0.05 / math.hypot(0.05, 0.03 + 0.02 - 0.04)
    k = 1 + 0.02 / 0.07

    def cn(mach: float) -> float:
        beta = math.sqrt(1 - mach**2)
        return k * 2 * 2 * math.pi * aspect * area / (math.pi * d * d / 4) / (2 + math.sqrt(4 + (beta * aspect / cos_gc) ** 2))

    slopes = normal_force_components(g, d, np.array([0.0, 0.5, 0.8, 1.5]))[-1].cn_alpha
    assert slopes[0] == pytest.approx(cn(0.0), rel=1e-12) and slopes[1] == pytest.approx(cn(0.5), rel=1e-12)
    assert slopes[3] == slopes[2] == pytest.approx(cn(0.8), rel=1e-12)  # held above Mach 0.8
    cps = center_of_pressure_m(g, d, np.array([0.0, 0.5]))
    assert cps.shape == (2,) and cps[1] > cps[0]  # fins gain slope with Mach, the CP moves aft


@given(st.floats(0.02, 0.12), st.floats(0.0, 0.3))
@example(0.02, 0.3)
def test_wider_fins_move_the_cp_aft(span_m: float, extra_m: float) -> None:
    # Invariant: the fin CP lies aft of the nose CP, so adding fin normal force moves the CP aft.
    def cp(span: float) -> float:
        g = Geometry(0.4, Nose("ogive", 0.15), Body(0.6), Fins(3, 0.08, 0.04, span, 0.04, 0.002))
        return float(center_of_pressure_m(g, 0.04))
    assert cp(span_m + extra_m) >= cp(span_m)


@pytest.mark.parametrize(("make", "message"), [
    (lambda: Nose("bullet", 0.1), r"geometry\.nose\.shape: must be one of"),
    (lambda: Nose("ogive", 0.1, 0.5), r"geometry\.nose\.exponent: is used only with shape 'power'"),
    (lambda: Nose("power", 0.1), r"geometry\.nose\.exponent: shape 'power' needs an exponent"),
    (lambda: Body(-0.1), r"geometry\.body\.length: must be above 0"),
    (lambda: Fins(1, 0.1, 0.05, 0.05, 0.05, 0.003), r"geometry\.fins\.count: must be a whole number from 2 to 8"),
    (lambda: Fins(3, 0.1, 0.05, 0.05, 0.05, 0.003, profile="wavy"), r"geometry\.fins\.profile: must be one of"),
    (lambda: Fins(3, 0.1, 0.05, 0.05, 0.05, 0.2), r"geometry\.fins\.thickness"),
    (lambda: Finish.preset("chrome"), r"geometry\.finish: must be a length or one of"),
    (lambda: Geometry(2.0, Nose("ogive", 0.1), Body(0.5)), r"geometry\.cg: must lie inside the airframe"),
    (lambda: Geometry(0.3, Nose("ogive", 0.1), Body(0.5), Fins(3, 0.6, 0.05, 0.05, 0.05, 0.003)), r"geometry\.fins\.offset"),
    (lambda: Geometry(0.3, Nose("ogive", 0.1), Body(0.5), transitions=(Transition(0.04, 0.05, 0.1, 0.05),)),
     r"geometry\.transition\[1\]\.position"),
    (lambda: Geometry(0.3, Nose("ogive", 0.1), Body(0.5), launch_guide="rope"), r"geometry\.launch_guide"),
])
def test_bad_geometry_names_the_field(make, message: str) -> None:
    with pytest.raises(SimulationInputError, match=message) as info:
        make()
    assert isinstance(info.value, ValueError)


def test_transition_must_start_at_the_diameter_ahead() -> None:
    g = Geometry(0.3, Nose("ogive", 0.1), Body(0.5), transitions=(Transition(0.05, 0.06, 0.05, 0.2),))
    check_diameters(g, 0.0502)  # within 1 % is accepted
    with pytest.raises(SimulationInputError, match=r"geometry\.transition\[1\]\.fore_diameter: must equal the diameter ahead"):
        check_diameters(g, 0.040)


def test_docstring_examples_run() -> None:
    import doctest

    from motorlib.flight import drag, geometry
    for module in (geometry, drag):
        assert doctest.testmod(module).failed == 0


@pytest.mark.parametrize(("shape", "exponent"), [("conical", None), ("ogive", None), ("parabolic", None),
                                                 ("elliptical", None), ("power", 0.5), ("power", 0.3)])
def test_nose_cp_is_the_centroid_of_the_area_growth(shape: str, exponent: float | None) -> None:
    # Slender-body theory (Munk; the nose term of Barrowman 1967): the normal force per unit length is
    # proportional to dS/dx, so CN_α = 2·S_base/A_ref and x_CP = ∫ x·(dS/dx) dx / S_base. Evaluated here by
    # scipy's quad on the radius written out again, independently of Nose.volume_fraction (L − V/A).
    from scipy.integrate import quad

    length, r = 0.2, 0.025
    rho = (r * r + length * length) / (2 * r)
    radius = {
        "conical": lambda x: r * x / length,
        "ogive": lambda x: math.sqrt(rho**2 - (length - x) ** 2) + r - rho,
        "parabolic": lambda x: r * (2 * x / length - (x / length) ** 2),
        "elliptical": lambda x: r * math.sqrt(x / length * (2 - x / length)),
        "power": lambda x: r * (x / length) ** (exponent or 1.0),
    }[shape]
    h = 1e-7

    def area_slope(x: float) -> float:  # d(π r²)/dx by a central difference, one-sided at the ends
        lo, hi = max(x - h, 0.0), min(x + h, length)
        return math.pi * (radius(hi) ** 2 - radius(lo) ** 2) / (hi - lo)

    moment = quad(lambda x: x * area_slope(x), 0.0, length, limit=200, points=[1e-6])[0]
    x_cp = moment / (math.pi * r * r)
    nose = normal_force_components(Geometry(0.3, Nose(shape, length, exponent), Body(0.5)), 2 * r)[0]
    assert nose.cn_alpha == 2.0
    assert nose.cp_m == pytest.approx(x_cp, rel=1e-6)
