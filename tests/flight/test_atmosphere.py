"""U.S. Standard Atmosphere 1976 against the published tables and the `fluids` library."""

from __future__ import annotations

import numpy as np
import pytest
from fluids.atmosphere import ATMOSPHERE_1976

from motorlib.flight import atmosphere as atm
from motorlib.flight.atmosphere import Site

R0 = 6_356_766.0

# Source: USSA 1976 values computed with the 1976 constants, check-values.md section 1.3 (D; `fluids` 1.3.1
# reproduces them to 7e-16). Columns: geopotential H (m), T (K), p (Pa), rho (kg/m3), a (m/s), mu (Pa s).
TABLE_1_3 = [
    (0, 288.150, 101325.00, 1.224999, 340.294, 1.78938e-5),
    (500, 284.900, 95460.84, 1.167268, 338.370, 1.77366e-5),
    (1000, 281.650, 89874.57, 1.111642, 336.434, 1.75785e-5),
    (2000, 275.150, 79495.22, 1.006490, 332.529, 1.72596e-5),
    (3000, 268.650, 70108.54, 0.909121, 328.578, 1.69372e-5),
    (5000, 255.650, 54019.91, 0.736115, 320.530, 1.62812e-5),
    (8000, 236.150, 35599.81, 0.525167, 308.063, 1.52677e-5),
    (11000, 216.650, 22632.06, 0.363918, 295.070, 1.42161e-5),
    (15000, 216.650, 12044.57, 0.193674, 295.070, 1.42161e-5),
    (20000, 216.650, 5474.89, 0.088035, 295.070, 1.42161e-5),
    (25000, 221.650, 2511.02, 0.039466, 298.455, 1.44896e-5),
]


@pytest.mark.parametrize(("h", "t", "p", "rho", "a", "mu"), TABLE_1_3)
def test_matches_the_1976_table(h: float, t: float, p: float, rho: float, a: float, mu: float) -> None:
    z = R0 * h / (R0 - h)  # the table is by geopotential altitude; our functions take geometric altitude
    assert float(atm.temperature_k(z)) == pytest.approx(t, abs=5e-4)
    assert float(atm.pressure_pa(z)) == pytest.approx(p, abs=5e-3, rel=1e-7)
    assert float(atm.density_kg_m3(z)) == pytest.approx(rho, abs=5e-7, rel=1e-6)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(a, abs=5e-4)
    assert float(atm.dynamic_viscosity_pa_s(z)) == pytest.approx(mu, rel=5e-6)


# Source: Mechanical Engineers' Handbook (Kutz), "Thermophysical Properties of the U.S. Standard Atmosphere",
# by geometric altitude (check-values.md 1.4, C); rounded to the printed digits.
@pytest.mark.parametrize(("z", "t", "p_bar", "rho", "a", "g"), [
    (1000, 281.65, 0.8988, 1.1117, 336.4, 9.8036),
    (5000, 255.68, 0.5405, 0.7364, 320.6, 9.7912),
    (11000, 216.77, 0.2270, 0.3648, 295.2, 9.7728),
])
def test_matches_the_handbook_by_geometric_altitude(z, t, p_bar, rho, a, g) -> None:
    assert float(atm.temperature_k(z)) == pytest.approx(t, abs=0.006)
    assert float(atm.pressure_pa(z)) / 1e5 == pytest.approx(p_bar, abs=6e-5)
    assert float(atm.density_kg_m3(z)) == pytest.approx(rho, abs=6e-5)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(a, abs=0.06)
    assert float(atm.gravity_m_s2(z)) == pytest.approx(g, abs=6e-5)


@pytest.mark.parametrize("z", [0.0, 250.0, 999.0, 4321.0, 10_999.0, 11_050.0, 19_900.0, 32_500.0, 47_100.0,
                               60_000.0, 75_000.0, 85_500.0])
def test_matches_fluids(z: float) -> None:
    # Reference library: fluids 1.3.1, ATMOSPHERE_1976 (geometric altitude), check-values.md section 8.
    ref = ATMOSPHERE_1976(z)
    assert float(atm.temperature_k(z)) == pytest.approx(ref.T, rel=1e-12)
    assert float(atm.pressure_pa(z)) == pytest.approx(ref.P, rel=1e-10)
    assert float(atm.density_kg_m3(z)) == pytest.approx(ref.rho, rel=1e-10)
    assert float(atm.speed_of_sound_m_s(z)) == pytest.approx(ref.v_sonic, rel=1e-12)
    assert float(atm.dynamic_viscosity_pa_s(z)) == pytest.approx(ref.mu, rel=1e-12)
    assert float(atm.gravity_m_s2(z)) == pytest.approx(ref.g, rel=1e-12)


# Sutherland's law, beta = 1.458e-6, S = 110.4 K: check-values.md 1.5 (D).
@pytest.mark.parametrize(("t", "mu"), [(200.0, 1.328559e-5), (216.65, 1.421613e-5), (288.15, 1.789380e-5),
                                       (350.0, 2.073597e-5)])
def test_sutherland_values(t: float, mu: float) -> None:
    assert atm.SUTHERLAND_BETA * t**1.5 / (t + atm.SUTHERLAND_S_K) == pytest.approx(mu, rel=5e-7)


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
    assert p2[1] / p2[0] == pytest.approx(float(atm.pressure_pa(2500.0) / atm.pressure_pa(1500.0)))
    assert rho2[0] == pytest.approx(84_000.0 / (atm.GAS_CONSTANT_J_KG_K * t2[0]))
    with pytest.raises(ValueError, match="temperature_k"):
        Site(temperature_k=500.0)
