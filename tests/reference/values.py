"""The check values of ``tests/reference/check_values.md`` as Python, so that tests import them.

Each :class:`CheckValues` is one entry of that file: its name (the heading), its status and source in words,
column names and rows. ``tests/reference/test_reference.py`` checks that every number here is written in the
entry of the same name, so the file and this module cannot drift apart.

A test that uses an entry names it in a comment (``tests/reference/check_values.md#atm-table``) or through
:attr:`CheckValues.cite`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Final

__all__ = [
    "ATM_CONSTANTS", "ATM_HANDBOOK", "ATM_LAYERS", "ATM_SUTHERLAND", "ATM_TABLE", "BOOST_COAST_C1",
    "CLASS_BOUNDARIES", "CLASS_UPPER_BOUNDS", "DESCENT_RATE", "ENTRIES", "FALL_FROM_REST", "FALL_FROM_REST_POINTS",
    "PRESSURE_UNITS", "RAIL_EXIT", "SKIN_FRICTION", "STATUSES", "TRIANGLE", "CheckValues",
]

# The status words of check_values.md ("Status words"), in order of trust.
STATUSES: Final = (
    "published",
    "published, secondary copy",
    "textbook closed form",
    "reference library",
    "common practice, no published source",
    "from memory",
)
FILE: Final = "tests/reference/check_values.md"


@dataclass(frozen=True)
class CheckValues:
    """One entry of check_values.md: rows of values under named columns, with the entry's status and source."""

    entry: str
    status: str
    source: str
    columns: tuple[str, ...]
    rows: tuple[tuple[float | str, ...], ...]

    def __post_init__(self) -> None:
        if self.status not in STATUSES:
            raise ValueError(f"{self.entry}: unknown status {self.status!r}")
        if any(len(row) != len(self.columns) for row in self.rows):
            raise ValueError(f"{self.entry}: every row needs one value per column {self.columns}")

    @property
    def cite(self) -> str:
        """Where the entry is written: ``tests/reference/check_values.md#<entry>``."""
        return f"{FILE}#{self.entry}"

    def column(self, name: str) -> tuple[float | str, ...]:
        """One column of every row."""
        i = self.columns.index(name)
        return tuple(row[i] for row in self.rows)

    def select(self, *names: str) -> list[tuple[float | str, ...]]:
        """The rows cut down to the named columns, in that order (for ``pytest.mark.parametrize``)."""
        index = [self.columns.index(name) for name in names]
        return [tuple(row[i] for i in index) for row in self.rows]

    def value(self, key: str) -> float:
        """The second column of the row whose first column is ``key`` (entries of named constants)."""
        for row in self.rows:
            if row[0] == key:
                return float(row[1])
        raise KeyError(f"{self.entry}: no row {key!r}")


ATM_CONSTANTS: Final = CheckValues(
    "atm-constants", "published",
    "U.S. Standard Atmosphere 1976 parameter list as reproduced in two engineering libraries' documentation; "
    "R is R*/M0 (textbook closed form); beta and S as implemented in `fluids` and `ambiance`",
    ("quantity", "value"),
    (("g0_m_s2", 9.80665), ("universal_gas_constant_j_kmol_k", 8314.32), ("molar_mass_kg_kmol", 28.9644),
     ("gas_constant_j_kg_k", 287.053072), ("gamma", 1.4), ("earth_radius_m", 6356766.0), ("t0_k", 288.15),
     ("p0_pa", 101325.0), ("sutherland_beta", 1.458e-6), ("sutherland_s_k", 110.4)),
)

ATM_LAYERS: Final = CheckValues(
    "atm-layers", "published", "U.S. Standard Atmosphere 1976 layer table (three public reproductions agree)",
    ("base_height_km", "base_temperature_k", "lapse_k_per_km"),
    ((0.0, 288.15, -6.5), (11.0, 216.65, 0.0), (20.0, 216.65, 1.0), (32.0, 228.65, 2.8), (47.0, 270.65, 0.0),
     (51.0, 270.65, -2.8), (71.0, 214.65, -2.0)),
)

ATM_TABLE: Final = CheckValues(
    "atm-table", "textbook closed form",
    "U.S. Standard Atmosphere 1976 computed with its own constants; `fluids` 1.3.1 reproduces it to 7e-16",
    ("height_h_m", "height_z_m", "temperature_k", "pressure_pa", "density_kg_m3", "speed_of_sound_m_s",
     "viscosity_pa_s"),
    ((0.0, 0.0, 288.150, 101325.00, 1.224999, 340.294, 1.78938e-5),
     (500.0, 500.0, 284.900, 95460.84, 1.167268, 338.370, 1.77366e-5),
     (1000.0, 1000.2, 281.650, 89874.57, 1.111642, 336.434, 1.75785e-5),
     (2000.0, 2000.6, 275.150, 79495.22, 1.006490, 332.529, 1.72596e-5),
     (3000.0, 3001.4, 268.650, 70108.54, 0.909121, 328.578, 1.69372e-5),
     (5000.0, 5003.9, 255.650, 54019.91, 0.736115, 320.530, 1.62812e-5),
     (8000.0, 8010.1, 236.150, 35599.81, 0.525167, 308.063, 1.52677e-5),
     (11000.0, 11019.1, 216.650, 22632.06, 0.363918, 295.070, 1.42161e-5),
     (15000.0, 15035.5, 216.650, 12044.57, 0.193674, 295.070, 1.42161e-5),
     (20000.0, 20063.1, 216.650, 5474.89, 0.088035, 295.070, 1.42161e-5),
     (25000.0, 25098.7, 221.650, 2511.02, 0.039466, 298.455, 1.44896e-5)),
)

ATM_HANDBOOK: Final = CheckValues(
    "atm-handbook", "published",
    "Mechanical Engineers' Handbook, Table 6, Thermophysical Properties of the U.S. Standard Atmosphere "
    "(volume and editor from memory); rounded to the printed digits",
    ("height_z_m", "temperature_k", "pressure_bar", "density_kg_m3", "speed_of_sound_m_s", "gravity_m_s2"),
    ((1000.0, 281.65, 0.8988, 1.1117, 336.4, 9.8036),
     (5000.0, 255.68, 0.5405, 0.7364, 320.6, 9.7912),
     (11000.0, 216.77, 0.2270, 0.3648, 295.2, 9.7728)),
)

ATM_SUTHERLAND: Final = CheckValues(
    "atm-sutherland", "textbook closed form", "Sutherland's law with the 1976 constants beta = 1.458e-6, S = 110.4 K",
    ("temperature_k", "viscosity_pa_s"),
    ((200.0, 1.328559e-5), (216.65, 1.421613e-5), (288.15, 1.789380e-5)),
)

PRESSURE_UNITS: Final = CheckValues(
    "units-pressure", "textbook closed form",
    "psi from the exact pound, g0 and inch; inHg from pint 0.25.3 (inch x 13 595.1 kg/m3 x g0), printed to seven "
    "digits in NIST SP 811 appendix B.8 (from memory)",
    ("unit", "value_pa"),
    (("psi", 6894.757293168361), ("inHg", 3386.388640341), ("inHg_nist", 3386.389)),
)

CLASS_UPPER_BOUNDS: Final = CheckValues(
    "impulse-classes", "published, secondary copy",
    "published two-decimal class lists (secondary copies); G also NFPA 1122 §4.9.2, O also 14 CFR 101.22(b); "
    "1/8A's bounds from memory, 1/4A's from the doubling rule",
    ("letter", "upper_ns"),
    (("1/8A", 0.3125), ("1/4A", 0.625), ("1/2A", 1.25), ("A", 2.5), ("B", 5.0), ("C", 10.0), ("D", 20.0),
     ("E", 40.0), ("F", 80.0), ("G", 160.0), ("H", 320.0), ("I", 640.0), ("J", 1280.0), ("K", 2560.0),
     ("L", 5120.0), ("M", 10240.0), ("N", 20480.0), ("O", 40960.0)),
)

CLASS_BOUNDARIES: Final = CheckValues(
    "class-boundaries", "published, secondary copy", "published two-decimal class lists (secondary copies)",
    ("impulse_ns", "letter"),
    ((0.3125, "1/8A"), (1.25, "1/2A"), (1.26, "A"), (2.50, "A"), (2.51, "B"), (5.00, "B"), (10.00, "C"),
     (20.00, "D"), (20.01, "E"), (160.00, "G"), (160.01, "H"), (40960.00, "O")),
)

TRIANGLE: Final = CheckValues(
    "curve-oracles", "textbook closed form",
    "areas of triangles: the trapezoid rule is exact for piecewise-linear data",
    ("quantity", "value"),
    (("total_impulse_ns", 5.0), ("peak_thrust_n", 10.0), ("burn_start_s", 0.005), ("burn_end_s", 0.955),
     ("burn_time_s", 0.950), ("window_impulse_ns", 4.9875), ("average_thrust_n", 5.250),
     ("impulse_at_peak_ns", 0.5)),
)

DESCENT_RATE: Final = CheckValues(
    "descent-rate", "textbook closed form", "v = sqrt(2 m g / (rho Cd A)) with the case's inputs",
    ("mass_kg", "canopy_diameter_m", "drag_coefficient", "density_kg_m3", "speed_m_s"),
    ((1.0, 0.9, 0.75, 1.225, 5.7928),),
)

SKIN_FRICTION: Final = CheckValues(
    "skin-friction", "textbook closed form",
    "Blasius 1.328/sqrt(Re), Prandtl 0.074 Re^-0.2, Prandtl-Schlichting 0.455/(log10 Re)^2.58 (plate means)",
    ("reynolds", "blasius", "prandtl", "schlichting"),
    ((1e5, 4.199505e-3, 7.400000e-3, 7.155975e-3),
     (5e5, 1.878076e-3, 5.363370e-3, 5.105717e-3),
     (1e6, 1.328000e-3, 4.669084e-3, 4.470758e-3),
     (1e7, 4.199505e-4, 2.945993e-3, 3.003713e-3)),
)

FALL_FROM_REST: Final = CheckValues(
    "fall-from-rest", "textbook closed form",
    "v = v_t tanh(g t / v_t), x = (v_t^2 / g) ln cosh(g t / v_t), v_t = 50 m/s; checked against solve_ivp",
    ("time_s", "speed_m_s", "distance_m"),
    ((1.0, 9.6828073444, 4.8722067898), (2.0, 18.6656040785, 19.1300291159),
     (5.0, 37.6676816872, 106.8496081241), (10.0, 48.0595594336, 328.2920166520)),
)
# Same entry, the points named in its text: 99 % of v_t and the speed after 100 m of fall.
FALL_FROM_REST_POINTS: Final = CheckValues(
    "fall-from-rest", "textbook closed form", FALL_FROM_REST.source,
    ("quantity", "value"),
    (("terminal_speed_m_s", 50.0), ("time_to_99_percent_s", 13.4941718750),
     ("distance_to_99_percent_m", 499.2830818), ("speed_after_100_m_m_s", 36.8668816)),
)

BOOST_COAST_C1: Final = CheckValues(
    "boost-coast", "textbook closed form",
    "Fehskens-Malewicki constant-mass boost and coast (secondary copies of the method); checked against solve_ivp",
    ("thrust_n", "mass_kg", "burn_s", "k_kg_m", "coast_mass_kg", "apogee_m", "burnout_speed_m_s", "coast_time_s"),
    ((10.0, 0.05, 1.0, 1.0e-4, 0.045, 542.7223222368, 169.2574910455, 8.1070592639),),
)

RAIL_EXIT: Final = CheckValues(
    "rail-exit", "textbook closed form", "v = sqrt(2 L (T/m - g cos theta)), T = 20 N, m = 0.5 kg, L = 1 m",
    ("angle_deg", "speed_m_s"),
    ((0.0, 7.770888), (10.0, 7.790037), (20.0, 7.846625), (30.0, 7.938160)),
)

ENTRIES: Final = (ATM_CONSTANTS, ATM_LAYERS, ATM_TABLE, ATM_HANDBOOK, ATM_SUTHERLAND, PRESSURE_UNITS,
                  CLASS_UPPER_BOUNDS, CLASS_BOUNDARIES, TRIANGLE, DESCENT_RATE, SKIN_FRICTION, FALL_FROM_REST,
                  FALL_FROM_REST_POINTS, BOOST_COAST_C1, RAIL_EXIT)
