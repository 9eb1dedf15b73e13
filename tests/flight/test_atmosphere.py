"""U.S. Standard Atmosphere 1976 against the published tables and the `fluids` library."""

from __future__ import annotations

import math

import numpy as np
import pytest
from fluids.atmosphere import ATMOSPHERE_1976
from scipy.integrate import quad

from motorlib import MotorRecord
from motorlib.flight import atmosphere as atm
from motorlib.flight import simulate
from motorlib.flight.airframe import Airframe, Launch
from motorlib.flight.atmosphere import Site

from ..reference.values import ATM_CONSTANTS, ATM_HANDBOOK, ATM_LAYERS, ATM_SUTHERLAND, ATM_TABLE
from ..reference_flight import reference_flight

R0 = ATM_CONSTANTS.value("earth_radius_m")

# The 1976 table by geopotential H (textbook closed form; `fluids` 1.3.1 reproduces it to 7e-16):
# tests/reference/check_values.md#atm-table. Columns: H (m), T (K), p (Pa), rho (kg/m3), a (m/s), mu (Pa s).
TABLE_1_3 = ATM_TABLE.select("height_h_m", "temperature_k", "pressure_pa", "density_kg_m3", "speed_of_sound_m_s",
                             "viscosity_pa_s")


@pytest.mark.parametrize(("h", "t", "p", "rho", "a", "mu"), TABLE_1_3)
def test_matches_the_1976_table(h: float, t: float, p: float, rho: float, a: float, mu: float) -> None:
    z = R0 * h / (R0 - h)  # the table is by geopotential altitude; our functions take geometric altitude
    assert float(atm.temperature_k(z)) == pytest.approx(t, abs=5e-4)
    assert float(atm.pressure_pa(z)) == pytest.approx(p, abs=5e-3, rel=1e-7)
    assert float(atm.density_kg_m3(z)) == pytest.approx(rho, abs=5e-7, rel=1e-6)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(a, abs=5e-4)
    assert float(atm.dynamic_viscosity_pa_s(z)) == pytest.approx(mu, rel=5e-6)


# Published: a handbook's table of the U.S. Standard Atmosphere by geometric altitude, rounded to the printed
# digits (tests/reference/check_values.md#atm-handbook).
@pytest.mark.parametrize(("z", "t", "p_bar", "rho", "a", "g"), ATM_HANDBOOK.rows)
def test_matches_the_handbook_by_geometric_altitude(z, t, p_bar, rho, a, g) -> None:
    assert float(atm.temperature_k(z)) == pytest.approx(t, abs=0.006)
    assert float(atm.pressure_pa(z)) / 1e5 == pytest.approx(p_bar, abs=6e-5)
    assert float(atm.density_kg_m3(z)) == pytest.approx(rho, abs=6e-5)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(a, abs=0.06)
    assert float(atm.gravity_m_s2(z)) == pytest.approx(g, abs=6e-5)


@pytest.mark.parametrize("z", [0.0, 250.0, 999.0, 4321.0, 10_999.0, 11_050.0, 19_900.0, 32_500.0, 47_100.0,
                               60_000.0, 75_000.0, 85_500.0])
def test_matches_fluids(z: float) -> None:
    # Reference library: fluids 1.3.1, ATMOSPHERE_1976 (geometric altitude), tests/reference/check_values.md#atm-fluids.
    ref = ATMOSPHERE_1976(z)
    assert float(atm.temperature_k(z)) == pytest.approx(ref.T, rel=1e-12)
    assert float(atm.pressure_pa(z)) == pytest.approx(ref.P, rel=1e-10)
    assert float(atm.density_kg_m3(z)) == pytest.approx(ref.rho, rel=1e-10)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(ref.v_sonic, rel=1e-12)
    assert float(atm.dynamic_viscosity_pa_s(z)) == pytest.approx(ref.mu, rel=1e-12)
    assert float(atm.gravity_m_s2(z)) == pytest.approx(ref.g, rel=1e-12)


# Sutherland's law, beta = 1.458e-6, S = 110.4 K (textbook closed form, tests/reference/check_values.md#atm-sutherland),
# at the standard altitudes whose temperature is t (geopotential H: 200 K at 78,325 m where the 1976 model falls
# by 2.0 K/km from 214.65 K at 71 km, 216.65 K at 11 km, 288.15 K at 0 m; #atm-layers).
@pytest.mark.parametrize(("h", "t", "mu"), [(h, t, mu) for h, (t, mu) in zip((78_325.0, 11_000.0, 0.0),
                                                                             ATM_SUTHERLAND.rows)])
def test_sutherland_values(h: float, t: float, mu: float) -> None:
    z = R0 * h / (R0 - h)
    assert float(atm.temperature_k(z)) == pytest.approx(t, abs=1e-9)
    assert float(atm.dynamic_viscosity_pa_s(z)) == pytest.approx(mu, rel=5e-7)


def test_vectorised_equals_scalar() -> None:
    z = np.linspace(-500.0, 86_000.0, 777)
    rho = atm.density_kg_m3(z)
    assert rho.shape == z.shape
    assert all(float(atm.density_kg_m3(zi)) == pytest.approx(ri, rel=1e-15) for zi, ri in zip(z[::50], rho[::50]))
    assert np.all(np.diff(rho) < 0)  # density falls monotonically with height


def test_site_offsets() -> None:
    standard = Site(elevation_m=1500.0)
    t, p, rho, a = standard.air(0.0)
    assert float(t) == pytest.approx(float(atm.temperature_k(1500.0)))
    hot = Site(elevation_m=1500.0, temperature_k=float(atm.temperature_k(1500.0)) + 20.0, pressure_pa=84_000.0)
    t2, p2, rho2, a2 = hot.air(np.array([0.0, 1000.0]))
    assert t2[0] == pytest.approx(float(t) + 20.0) and p2[0] == pytest.approx(84_000.0)
    assert t2[1] - float(atm.temperature_k(2500.0)) == pytest.approx(20.0)  # constant offset with height
    assert rho2[0] == pytest.approx(84_000.0 / (atm.GAS_CONSTANT_J_KG_K * t2[0]))
    with pytest.raises(ValueError, match="temperature_k"):
        Site(temperature_k=500.0)


# ---- issue 10, defect 5: an off-standard day is hydrostatic --------------------------------------------------
# The reference below is written independently of motorlib.flight.atmosphere: its own constants and its own
# standard temperature (tests/reference/check_values.md#atm-constants and #atm-layers), and scipy quadrature
# of the hydrostatic equation in GEOMETRIC height with inverse-square gravity,
# d ln p / dZ = -g(Z) / (R T(Z)), g(Z) = g0 (r0 / (r0 + Z))^2.
G0_REF = ATM_CONSTANTS.value("g0_m_s2")  # m/s^2
R_REF = ATM_CONSTANTS.value("universal_gas_constant_j_kmol_k") / ATM_CONSTANTS.value("molar_mass_kg_kmol")  # R*/M0
GAMMA_REF = ATM_CONSTANTS.value("gamma")
R0_REF = ATM_CONSTANTS.value("earth_radius_m")  # m
LAYERS_REF = [(1000.0 * hb_km, tb, 1e-3 * lapse_k_km)  # (Hb m, Tb K, lapse K/m) up to 47 km
              for hb_km, tb, lapse_k_km in ATM_LAYERS.rows if hb_km < 47.0]


def _t_std_ref(z: float) -> float:
    h = R0_REF * z / (R0_REF + z)
    hb, tb, lapse = [layer for layer in LAYERS_REF if layer[0] <= h][-1] if h >= 0 else LAYERS_REF[0]
    return tb + lapse * (h - hb)


def _p_std_ref(z: float) -> float:
    """Standard pressure by quadrature from sea level (the 1976 model is this integral)."""
    return ATM_CONSTANTS.value("p0_pa") * math.exp(_log_ratio_ref(0.0, z, 0.0))


def _log_ratio_ref(z_from: float, z_to: float, offset_k: float) -> float:
    """ln(p(z_to) / p(z_from)) for the column T(Z) = T_std(Z) + offset, by adaptive quadrature."""
    def integrand(z: float) -> float:
        return -G0_REF * (R0_REF / (R0_REF + z)) ** 2 / (R_REF * (_t_std_ref(z) + offset_k))

    lo, hi = sorted((z_from, z_to))
    kinks = [R0_REF * hb / (R0_REF - hb) for hb, _, _ in LAYERS_REF if lo < R0_REF * hb / (R0_REF - hb) < hi]
    value, error = quad(integrand, lo, hi, points=kinks or None, epsabs=1e-14, epsrel=1e-13, limit=200)
    assert error < 1e-12
    return value if z_to >= z_from else -value


HOT_SITE = Site(elevation_m=3000.0, temperature_k=303.15)  # a 3,000 m site at 30 °C (issue 10)
HOT_HEIGHTS = [-100.0, 0.0, 500.0, 3000.0, 6000.0, 7900.0, 8100.0, 12_000.0, 20_000.0]  # crosses 11 km (H)


@pytest.mark.parametrize("elevation", [-500.0, 0.0, 1500.0, 4321.0, 8000.0])
def test_standard_day_site_reproduces_the_standard_atmosphere(elevation: float) -> None:
    heights = np.array([-400.0, 0.0, 1.0, 333.0, 2500.0, 9000.0, 15_000.0, 30_000.0, 60_000.0])
    for site in (Site(elevation_m=elevation),
                 Site(elevation_m=elevation, temperature_k=float(atm.temperature_k(elevation)))):
        t, p, rho, a = site.air(heights)
        z = elevation + heights
        np.testing.assert_allclose(t, atm.temperature_k(z), rtol=1e-12)
        np.testing.assert_allclose(p, atm.pressure_pa(z), rtol=1e-9)
        np.testing.assert_allclose(rho, atm.density_kg_m3(z), rtol=1e-9)
        np.testing.assert_allclose(a, atm.speed_of_sound_m_s(z), rtol=1e-12)


def test_reference_quadrature_reproduces_the_published_standard() -> None:
    # the test's own hydrostatic integral, checked on tests/reference/check_values.md#atm-table (H = 3000 m, 15000 m)
    published = dict(ATM_TABLE.select("height_h_m", "pressure_pa"))
    for h in (3000.0, 15_000.0):
        assert _p_std_ref(R0_REF * h / (R0_REF - h)) == pytest.approx(published[h], abs=5e-3)


@pytest.mark.parametrize("height", HOT_HEIGHTS)
def test_hot_day_is_hydrostatic(height: float) -> None:
    z_pad = HOT_SITE.elevation_m
    offset = 303.15 - _t_std_ref(z_pad)
    p_pad = _p_std_ref(z_pad)  # no measured pressure: the standard pressure at the pad elevation
    z = z_pad + height
    t_ref = _t_std_ref(z) + offset
    p_ref = p_pad * math.exp(_log_ratio_ref(z_pad, z, offset))
    t, p, rho, a = (float(v) for v in HOT_SITE.air(height))
    assert t == pytest.approx(t_ref, rel=1e-12)
    assert p == pytest.approx(p_ref, rel=1e-9)
    assert rho == pytest.approx(p_ref / (R_REF * t_ref), rel=1e-9)
    # a survived mutation: "speed of sound ignores the site temperature offset"
    assert a == pytest.approx(math.sqrt(GAMMA_REF * R_REF * t_ref), rel=1e-12)


def test_measured_pad_pressure_starts_the_hydrostatic_column() -> None:
    site = Site(elevation_m=1200.0, temperature_k=280.0, pressure_pa=86_500.0)
    offset = 280.0 - _t_std_ref(1200.0)
    heights = np.array([-50.0, 0.0, 2000.0, 11_000.0])
    _, p, rho, _ = site.air(heights)
    for h, p_i, rho_i in zip(heights, p, rho):
        p_ref = 86_500.0 * math.exp(_log_ratio_ref(1200.0, 1200.0 + h, offset))
        assert p_i == pytest.approx(p_ref, rel=1e-9)
        assert rho_i == pytest.approx(p_ref / (R_REF * (_t_std_ref(1200.0 + h) + offset)), rel=1e-9)


def test_hot_day_density_aloft_is_not_the_shifted_standard_ratio() -> None:
    # The old model kept the standard pressure ratio and only shifted T: 6 km above a 3,000 m, 30 °C pad its
    # density came out 9.5 % low (issue 10), i.e. the hydrostatic column is 10.6 % denser there.
    z = 9000.0
    offset = 303.15 - _t_std_ref(3000.0)
    old = _p_std_ref(z) / (R_REF * (_t_std_ref(z) + offset))
    _, _, rho, _ = HOT_SITE.air(6000.0)
    assert 1.0 - old / float(rho) == pytest.approx(0.0955, abs=5e-4)


def test_site_elevation_reaches_the_gravity_of_a_flight() -> None:
    # A survived mutation: "gravity table ignores site elevation". In vacuum only gravity acts after burnout, so a
    # flight from an 8,000 m pad must agree with the solve_ivp reference, whose gravity includes the elevation
    # (and coast about 0.25 % higher than from sea level).
    high = Launch(rail_length_m=1.0, site=Site(elevation_m=8000.0))
    frame = Airframe("vacuum", 0.4, 1e-6, 0.5, launch=high)
    motor = MotorRecord("test", [0.0, 1.2], [30.0, 30.0], total_mass_kg=0.1, propellant_mass_kg=1e-9,
                        delays_s=(3.0,))
    apogee = float(simulate(frame, [motor], descent=False).apogee_m[0])
    assert apogee == pytest.approx(reference_flight(frame, motor)["apogee_m"], rel=1e-6)
    sea = simulate(Airframe("vacuum", 0.4, 1e-6, 0.5), [motor], descent=False).apogee_m[0]
    assert apogee / sea - 1.0 > 2e-3


@pytest.mark.parametrize(("kwargs", "field"), [
    ({"elevation_m": 9000.1}, "elevation_m"), ({"elevation_m": -1000.1}, "elevation_m"),
    ({"temperature_k": 179.9}, "temperature_k"), ({"temperature_k": 340.1}, "temperature_k"),
    ({"pressure_pa": 9_999.0}, "pressure_pa"), ({"pressure_pa": 110_001.0}, "pressure_pa"),
])
def test_a_site_outside_its_range_is_refused(kwargs: dict, field: str) -> None:
    with pytest.raises(ValueError, match=field):
        Site(**kwargs)


def test_a_site_at_the_ends_of_its_range_is_accepted() -> None:
    for site in (Site(elevation_m=9000.0, temperature_k=180.0, pressure_pa=10_000.0),
                 Site(elevation_m=-1000.0, temperature_k=340.0, pressure_pa=110_000.0)):
        t, p, rho, a = (float(v) for v in site.air(0.0))
        assert rho == pytest.approx(p / (R_REF * t), rel=1e-9)  # ideal gas at the pad
