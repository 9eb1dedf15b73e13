"""Drag coefficient against Mach number from the airframe's shape: a component build-up.

Model
-----
Cd(M) referred to the reference area A = π·d²/4 of the airframe diameter is the sum of:

* skin friction of the body (nose, tubes, transitions) and of the fins: flat-plate C_f at the
  flight Reynolds number (laminar, transition at Re = 5·10⁵, turbulent, roughness-limited,
  compressible; :func:`friction_coefficient`) on the wetted areas, times Barrowman's form
  factors 1 + 1/(2·f_B) for a body of fineness f_B and 1 + 2·t/c for fins (Barrowman 1967; from memory);
* nose (and shoulder) pressure drag: 0.8·sin²φ subsonically for a surface meeting the body at
  angle φ (zero for tangent noses; Hoerner, *Fluid-Dynamic Drag*, 1965, from memory) and the
  conical-nose wave drag (0.083 + 0.096/M²)·(σ/10°)^1.69 supersonically (a fit to cone data
  quoted in the model-rocket literature, from memory), with σ the mean surface angle of the nose
  weighted by frontal area, σ = ∫θ dA / A (our generalisation of the cone's half-angle: it ranks
  a 3/4-power nose below a cone and a blunt elliptical nose well above it), and a smooth (cubic
  "smoothstep") rise between Mach 0.8 and 1;
* base drag (Hoerner, ch. 3, from memory): at low speed C_base = 0.029/√C_D,forebody on the base
  area, which depends on the forebody boundary layer; with Mach it follows
  C_base + (0.25 − C_base)·M² below Mach 1 and 0.25/M above — for C_base = 0.12 this is the
  widely quoted 0.12 + 0.13·M² / 0.25/M base-drag curve (from memory; its original source
  unconfirmed). While the motor burns, the exhaust fills the motor's area of the base and only
  the rest keeps base drag (a common simplification; jet entrainment is ignored);
* boattails: the base-drag coefficient on the annulus they close, scaled from 1 (length ratio
  L/Δd <= 1) to 0 (>= 3) (Hoerner's boattail trend, from memory);
* fin edges per unit frontal area s·t: square leading edge 0.85·q_stag/q, rounded
  (1 − M²)^−0.417 − 1 below Mach 0.9, 1 − 1.785·(M − 0.9) to Mach 1 and
  1.214 − 0.502/M² + 0.1095/M⁴ above (Hoerner-based fits, from memory), taken at the Mach
  number normal to a swept edge and scaled by cos²Γ (independence principle); square trailing
  edge the base drag, rounded half of it, airfoil none; airfoil fins add the supersonic
  thickness wave drag of a biconvex section, (16/3)·(t/c)²/√(M² − 1) (Ackeret's linear theory),
  from Mach 1.2 up, blended from zero at Mach 0.8;
* launch guide: a launch lug (a blunt ring at 0.85·q_stag/q plus friction inside and out) or
  two rail buttons (0.6·q_stag/q on their frontal area); invented typical sizes, crude (±50 %).

q_stag/q, the compressible stagnation-pressure ratio: 1 + M²/4 + M⁴/40 below Mach 1 and
1.84 − 0.76/M² + 0.166/M⁴ + 0.035/M⁶ above (behind the normal shock; Hoerner, from memory).

Every piece is continuous in Mach (the stagnation-pressure fits differ by 0.5 % at Mach 1, the
rounded-edge fits by 0.1 % at Mach 0.9), so Cd(M) has no jumps.

Accuracy: expect ±10–20 % subsonically for a conventional, well-built rocket and ±20–30 % in
the transonic and supersonic range; launch guides, surface finish and fin-body joints are the
least certain terms. Not modelled: fin-body interference drag, fin cant, protuberances other
than the launch guide, angle of attack (drag at α = 0), the Reynolds number's change along the
flight (one altitude is used), and Reynolds numbers below that of Mach 0.1 (friction held there).

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields
from typing import TYPE_CHECKING, Final

import numpy as np

from .atmosphere import density_kg_m3, dynamic_viscosity_pa_s, speed_of_sound_m_s
from .geometry import Geometry, disc_area_m2, outline_m

if TYPE_CHECKING:
    from .airframe import Airframe

__all__ = [
    "DragComponents",
    "MIN_FRICTION_MACH",
    "TRANSITION_REYNOLDS",
    "TRANSONIC_START_MACH",
    "base_drag_coefficient",
    "drag_breakdown",
    "drag_components",
    "drag_conditions_for",
    "drag_curves",
    "drag_table_for",
    "friction_coefficient",
    "laminar_friction_coefficient",
    "stagnation_pressure_ratio",
    "turbulent_friction_coefficient",
]

TRANSITION_REYNOLDS: Final = 5e5  # flat-plate laminar-turbulent transition, the usual textbook value (Schlichting)
TRANSONIC_START_MACH: Final = 0.8  # start of the nose wave-drag rise for slender bodies (common value, from memory)
MIN_FRICTION_MACH: Final = 0.1  # friction below this speed is held (the laminar C_f is infinite at rest)
_ROUGH_CUTOFF_SUBSONIC: Final = 38.21  # Raymer, Aircraft Design, eq. 12.28 (from memory)
_ROUGH_CUTOFF_SUPERSONIC: Final = 44.62  # Raymer, eq. 12.29, times M^1.16 (from memory)
_BLUNT_EDGE_CD: Final = 0.85  # flat face normal to the flow, per q_stag (Hoerner, from memory)
_BUTTON_CD: Final = 0.6  # rail button, partly inside the boundary layer: our estimate
_HOERNER_BASE: Final = 0.029  # C_base = 0.029/√C_D,forebody (Hoerner, Fluid-Dynamic Drag, ch. 3; from memory)
_SONIC_BASE: Final = 0.25  # base-drag coefficient at Mach 1 of the quoted 0.12 + 0.13 M² curve
# Launch lugs (rod diameter, lug length) and rail buttons (frontal area of one): invented typical sizes.
_LUG_BY_DIAMETER: Final = ((0.030, 0.125 * 0.0254, 0.050), (0.060, 0.1875 * 0.0254, 0.075), (math.inf, 0.25 * 0.0254, 0.100))
_BUTTON_AREA_M2: Final = ((0.060, 55e-6), (math.inf, 125e-6))
_AUTO_LUG_BELOW_M: Final = 0.040


def laminar_friction_coefficient(reynolds: np.ndarray | float) -> np.ndarray:
    """Mean skin-friction coefficient of a laminar flat plate, C_f = 1.328/√Re (Blasius).

    >>> round(float(laminar_friction_coefficient(1e6)), 6)
    0.001328
    """
    return 1.328 / np.sqrt(np.asarray(reynolds, dtype=float))


def turbulent_friction_coefficient(reynolds: np.ndarray | float, *, law: str = "schlichting") -> np.ndarray:
    """Mean skin-friction coefficient of a fully turbulent, smooth flat plate.

    Parameters
    ----------
    reynolds : float or ndarray
        Reynolds number on the plate length.
    law : str
        ``schlichting``: 0.455/(log₁₀ Re)^2.58 (Prandtl–Schlichting, good to Re ~ 10⁹);
        ``prandtl``: 0.074·Re^(−1/5) (1/7-power law, Re below ~ 10⁷).

    References
    ----------
    H. Schlichting, *Boundary-Layer Theory* (McGraw-Hill), chapter on the turbulent flat plate.

    >>> round(float(turbulent_friction_coefficient(1e6)), 6)
    0.004471
    """
    re = np.asarray(reynolds, dtype=float)
    if law == "schlichting":
        return 0.455 / np.log10(re) ** 2.58
    if law == "prandtl":
        return 0.074 * re ** -0.2
    raise ValueError(f"`law` must be 'schlichting' or 'prandtl', got {law!r}")


def friction_coefficient(reynolds: np.ndarray | float, *, mach: np.ndarray | float = 0.0,
                         relative_roughness: float = 0.0) -> np.ndarray:
    """Skin-friction coefficient of a plate with laminar run, roughness and compressibility.

    Parameters
    ----------
    reynolds : float or ndarray
        Reynolds number on the length, > 0.
    mach : float or ndarray
        Mach number (broadcast with ``reynolds``).
    relative_roughness : float
        Roughness height over the length, k/L (0 for a smooth surface).

    Returns
    -------
    ndarray
        C_f, broadcast shape of the inputs.

    Notes
    -----
    Smooth: Blasius 1.328/√Re below Re_t = 5·10⁵; above it the Prandtl–Schlichting turbulent
    value minus the laminar run, C_f,turb(Re) − A/Re with A = Re_t·(C_f,turb(Re_t) − C_f,lam(Re_t))
    ≈ 1614, which makes C_f continuous (Schlichting tabulates A = 1700 for this Re_t).
    Rough: the turbulent value at the cutoff Reynolds number (D. P. Raymer, *Aircraft Design: A
    Conceptual Approach*, eqs. 12.28–29, from memory), Re_cut = (L/k)^1.053·max(38.21,
    44.62·M^1.16) — Raymer gives the first below and the second above the transonic range; the
    larger of the two switches continuously at M ≈ 0.875. The surface takes the larger of the
    smooth and rough values. Compressibility: C_f·(1 + 0.144·M²)^−0.65 (Raymer eq. 12.27, an
    adiabatic-wall turbulent correction, applied here to the whole value).

    >>> round(float(friction_coefficient(1e7)), 6)   # turbulent, less a laminar run of 1614/Re
    0.002842
    """
    re = np.asarray(reynolds, dtype=float)
    if np.any(~(re > 0.0)):
        raise ValueError("`reynolds` must be > 0")
    m = np.asarray(mach, dtype=float)
    run = TRANSITION_REYNOLDS * float(turbulent_friction_coefficient(TRANSITION_REYNOLDS)
                                      - laminar_friction_coefficient(TRANSITION_REYNOLDS))
    turbulent_re = np.maximum(re, TRANSITION_REYNOLDS)  # keeps the unused branch of np.where finite
    cf = np.where(re < TRANSITION_REYNOLDS, laminar_friction_coefficient(re),
                  turbulent_friction_coefficient(turbulent_re) - run / turbulent_re)
    if relative_roughness > 1e-12:  # smaller roughness only matters above Re ~ 1e14: smooth
        cutoff = (1.0 / relative_roughness) ** 1.053 * np.maximum(_ROUGH_CUTOFF_SUBSONIC, _ROUGH_CUTOFF_SUPERSONIC * m**1.16)
        cf = np.maximum(cf, turbulent_friction_coefficient(np.maximum(cutoff, 10.0)))
    return cf * (1.0 + 0.144 * m**2) ** -0.65


def stagnation_pressure_ratio(mach: np.ndarray | float) -> np.ndarray:
    """q_stag/q: stagnation pressure rise over dynamic pressure (behind the normal shock when supersonic).

    >>> round(float(stagnation_pressure_ratio(0.0)), 6)
    1.0
    """
    m = np.asarray(mach, dtype=float)
    sup = np.maximum(m, 1.0)
    return np.where(m < 1.0, 1.0 + m**2 / 4.0 + m**4 / 40.0, 1.84 - 0.76 / sup**2 + 0.166 / sup**4 + 0.035 / sup**6)


def base_drag_coefficient(mach: np.ndarray | float, low_speed: np.ndarray | float = 0.12) -> np.ndarray:
    """Base-drag coefficient on the base area: C₀ + (0.25 − C₀)·M² below Mach 1, 0.25/M above.

    With the default C₀ = 0.12 this is the widely quoted 0.12 + 0.13·M² curve (from memory).

    >>> round(float(base_drag_coefficient(0.5)), 4)
    0.1525
    """
    m = np.asarray(mach, dtype=float)
    c0 = np.asarray(low_speed, dtype=float)
    return np.where(m < 1.0, c0 + (_SONIC_BASE - c0) * m**2, _SONIC_BASE / np.maximum(m, 1.0))


def _smoothstep(m: np.ndarray, lo: float, hi: float) -> np.ndarray:
    t = np.clip((m - lo) / (hi - lo), 0.0, 1.0)
    return t * t * (3.0 - 2.0 * t)


def _cone_wave(m: np.ndarray, half_angle_rad: float) -> np.ndarray:
    """Supersonic wave drag of a cone on its base area, held at its Mach-1 value below Mach 1."""
    sup = np.maximum(m, 1.0)
    return (0.083 + 0.096 / sup**2) * (math.degrees(half_angle_rad) / 10.0) ** 1.69


def _pressure_drag(m: np.ndarray, shoulder_rad: float, wave_angle_rad: float) -> np.ndarray:
    """Nose or shoulder pressure drag on its own frontal area, continuous across Mach 0.8–1."""
    sub = 0.8 * math.sin(shoulder_rad) ** 2
    rise = _smoothstep(m, TRANSONIC_START_MACH, 1.0)
    return np.where(m < 1.0, sub + (_cone_wave(np.ones_like(m), wave_angle_rad) - sub) * rise, _cone_wave(m, wave_angle_rad))


def _rounded_edge(m: np.ndarray) -> np.ndarray:
    sub = np.minimum(m, 0.9)
    sup = np.maximum(m, 1.0)
    return np.where(m < 0.9, (1.0 - sub**2) ** -0.417 - 1.0,
                    np.where(m < 1.0, 1.0 - 1.785 * (m - 0.9), 1.214 - 0.502 / sup**2 + 0.1095 / sup**4))


def _nose_wave_angle_rad(geometry: Geometry, diameter_m: float) -> float:
    """Mean surface angle of the nose weighted by frontal area, Σ θ·ΔA / A [rad]."""
    x, r = outline_m(geometry, diameter_m, n_nose=2001)
    inside = x <= geometry.nose.length_m
    x, r = x[inside], r[inside]
    d_area = np.pi * np.diff(r**2)
    angle = np.arctan2(np.diff(r), np.diff(x))
    return float(np.sum(angle * d_area) / np.sum(d_area))


@dataclass(frozen=True, eq=False)
class DragComponents:
    """Drag coefficients of each component against Mach; every array has shape (n_mach,).

    All are referred to the airframe's reference area π·d²/4.
    """

    mach: np.ndarray
    body_friction: np.ndarray
    fin_friction: np.ndarray
    nose_pressure: np.ndarray
    transition_pressure: np.ndarray
    fin_leading_edge: np.ndarray
    fin_trailing_edge: np.ndarray
    fin_wave: np.ndarray
    launch_guide: np.ndarray
    base_coasting: np.ndarray
    base_powered: np.ndarray

    def __post_init__(self) -> None:
        for f in fields(self):
            values = np.array(getattr(self, f.name), dtype=float)
            values.flags.writeable = False
            object.__setattr__(self, f.name, values)

    @property
    def _shared(self) -> np.ndarray:
        return (self.body_friction + self.fin_friction + self.nose_pressure + self.transition_pressure
                + self.fin_leading_edge + self.fin_trailing_edge + self.fin_wave + self.launch_guide)

    @property
    def cd_coasting(self) -> np.ndarray:
        """Total Cd with the motor burnt out (whole base)."""
        return self._shared + self.base_coasting

    @property
    def cd_powered(self) -> np.ndarray:
        """Total Cd while the motor burns (exhaust fills part of the base)."""
        return self._shared + self.base_powered


def drag_components(geometry: Geometry, diameter_m: float, mach: np.ndarray | float, *, altitude_m: float = 0.0,
                    exhaust_diameter_m: float | None = None) -> DragComponents:
    """Component drag build-up at each Mach number (see the module docstring for the formulas).

    Parameters
    ----------
    geometry : Geometry
    diameter_m : float
        Reference (and nose base) diameter [m].
    mach : float or ndarray
        Mach numbers >= 0, shape (n_mach,).
    altitude_m : float
        Geometric altitude [m] of the standard atmosphere used for the Reynolds number
        (viscosity by Sutherland's law, USSA 1976).
    exhaust_diameter_m : float or None
        Diameter of the base area filled by the exhaust while the motor burns [m] (the motor
        diameter); None: none (powered base drag = coasting).

    Returns
    -------
    DragComponents
    """
    if not diameter_m > 0.0:
        raise ValueError(f"`diameter_m` must be > 0, got {diameter_m!r}")
    m = np.atleast_1d(np.asarray(mach, dtype=float))
    if m.ndim != 1 or np.any(~(m >= 0.0)):
        raise ValueError("`mach` must be 1-D and >= 0")
    area_ref = disc_area_m2(diameter_m)
    nu = float(dynamic_viscosity_pa_s(altitude_m) / density_kg_m3(altitude_m))
    speed = np.maximum(m, MIN_FRICTION_MACH) * float(speed_of_sound_m_s(altitude_m))
    roughness = geometry.finish.roughness_m
    length = geometry.length_m
    zeros = np.zeros_like(m)

    x, r = outline_m(geometry, diameter_m, n_nose=801)
    wetted_body = float(np.sum(np.pi * (r[1:] + r[:-1]) * np.hypot(np.diff(x), np.diff(r))))
    cf_body = friction_coefficient(speed * length / nu, mach=m, relative_roughness=roughness / length)
    body_friction = cf_body * (1.0 + diameter_m / (2.0 * length)) * wetted_body / area_ref

    nose = geometry.nose
    nose_pressure = _pressure_drag(m, nose.shoulder_angle_rad(diameter_m / 2.0), _nose_wave_angle_rad(geometry, diameter_m))

    transition_pressure = zeros.copy()
    for tr in geometry.transitions:
        a_fore, a_aft = disc_area_m2(tr.fore_diameter_m), disc_area_m2(tr.aft_diameter_m)
        if a_aft > a_fore:  # shoulder: like the frustum of a cone
            angle = math.atan((tr.aft_diameter_m - tr.fore_diameter_m) / (2.0 * tr.length_m))
            transition_pressure += _pressure_drag(m, angle, angle) * (a_aft - a_fore) / area_ref
        elif a_aft < a_fore:  # boattail: base drag on the closed annulus, less the longer it is
            ratio = tr.length_m / (tr.fore_diameter_m - tr.aft_diameter_m)
            share = min(max((3.0 - ratio) / 2.0, 0.0), 1.0)
            transition_pressure += base_drag_coefficient(m) * share * (a_fore - a_aft) / area_ref

    fin_friction, leading, trailing, wave = zeros.copy(), zeros.copy(), zeros.copy(), zeros.copy()
    fins = geometry.fins
    if fins is not None:
        chord = fins.mean_aerodynamic_chord_m
        cf_fin = friction_coefficient(speed * chord / nu, mach=m, relative_roughness=roughness / chord)
        fin_friction = cf_fin * (1.0 + 2.0 * fins.thickness_m / chord) * 2.0 * fins.count * fins.area_m2 / area_ref
        edge_area = fins.count * fins.span_m * fins.thickness_m / area_ref
        cos_sweep = math.cos(fins.leading_edge_sweep_rad)
        normal_mach = m * cos_sweep
        if fins.profile == "square":
            leading = _BLUNT_EDGE_CD * stagnation_pressure_ratio(normal_mach) * cos_sweep**2 * edge_area
            trailing = base_drag_coefficient(m) * edge_area
        elif fins.profile == "rounded":
            leading = _rounded_edge(normal_mach) * cos_sweep**2 * edge_area
            trailing = 0.5 * base_drag_coefficient(m) * edge_area
        else:
            ratio2 = (fins.thickness_m / chord) ** 2
            at_start = 16.0 / 3.0 * ratio2 / math.sqrt(1.2**2 - 1.0)
            ackeret = 16.0 / 3.0 * ratio2 / np.sqrt(np.maximum(m, 1.2) ** 2 - 1.0)
            section = np.where(m < 1.2, at_start * _smoothstep(m, TRANSONIC_START_MACH, 1.2), ackeret)
            wave = section * fins.count * fins.area_m2 / area_ref

    guide = geometry.launch_guide
    if guide == "auto":
        guide = "lug" if diameter_m < _AUTO_LUG_BELOW_M else "buttons"
    launch_guide = zeros.copy()
    if guide == "lug":
        _, rod, lug_length = next(row for row in _LUG_BY_DIAMETER if diameter_m < row[0])
        inner, outer = rod + 0.5e-3, rod + 1.5e-3  # 0.25 mm clearance, 0.5 mm wall
        ring = math.pi * (outer**2 - inner**2) / 4.0
        cf_lug = friction_coefficient(speed * lug_length / nu, mach=m, relative_roughness=roughness / lug_length)
        launch_guide = (_BLUNT_EDGE_CD * stagnation_pressure_ratio(m) * ring
                        + cf_lug * math.pi * (inner + outer) * lug_length) / area_ref
    elif guide == "buttons":
        _, button = next(row for row in _BUTTON_AREA_M2 if diameter_m < row[0])
        launch_guide = 2.0 * _BUTTON_CD * stagnation_pressure_ratio(m) * button / area_ref

    aft_diameter = geometry.transitions[-1].aft_diameter_m if geometry.transitions else diameter_m
    area_base = disc_area_m2(aft_diameter)
    forebody = (body_friction + nose_pressure + transition_pressure) * area_ref / area_base
    low_speed = np.minimum(_HOERNER_BASE / np.sqrt(forebody), _SONIC_BASE)
    base = base_drag_coefficient(m, low_speed)
    filled = 0.0 if exhaust_diameter_m is None else min(disc_area_m2(exhaust_diameter_m), area_base)
    return DragComponents(
        mach=m, body_friction=body_friction, fin_friction=fin_friction, nose_pressure=nose_pressure,
        transition_pressure=transition_pressure, fin_leading_edge=leading, fin_trailing_edge=trailing, fin_wave=wave,
        launch_guide=launch_guide, base_coasting=base * area_base / area_ref,
        base_powered=base * (area_base - filled) / area_ref,
    )


_LABELS: Final = {
    "body_friction": "body skin friction", "fin_friction": "fin skin friction", "nose_pressure": "nose pressure and wave",
    "transition_pressure": "transitions", "fin_leading_edge": "fin leading edges", "fin_trailing_edge": "fin trailing edges",
    "fin_wave": "fin thickness wave", "launch_guide": "launch guide", "base_coasting": "base, coasting",
    "base_powered": "base, powered",
}


def drag_breakdown(geometry: Geometry, diameter_m: float, mach: float, *, altitude_m: float = 0.0,
                   exhaust_diameter_m: float | None = None) -> dict[str, float]:
    """Each component's Cd at one Mach number, for display, with both totals.

    Returns
    -------
    dict
        Readable component name -> Cd on the reference area, in build-up order, then
        ``"total, powered"`` and ``"total, coasting"``.
    """
    parts = drag_components(geometry, diameter_m, float(mach), altitude_m=altitude_m, exhaust_diameter_m=exhaust_diameter_m)
    table = {label: float(getattr(parts, name)[0]) for name, label in _LABELS.items()}
    table["total, powered"] = float(parts.cd_powered[0])
    table["total, coasting"] = float(parts.cd_coasting[0])
    return table


def drag_curves(geometry: Geometry, diameter_m: float, *, max_mach: float = 3.0, mach_step: float = 0.01,
                altitude_m: float = 0.0, exhaust_diameter_m: float | None = None
                ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Cd(Mach) tables for powered and coasting flight on an even Mach grid from 0 to ``max_mach``.

    Returns
    -------
    mach, cd_powered, cd_coasting : ndarray
        Shape (n_mach,); Cd on the reference area π·d²/4, linear interpolation between points is
        accurate to well under 1 % at the default step.

    >>> from motorlib.flight.geometry import Body, Fins, Nose
    >>> g = Geometry(0.35, Nose("ogive", 0.12), Body(0.45), Fins(3, 0.07, 0.035, 0.045, 0.04, 0.002))
    >>> mach, powered, coasting = drag_curves(g, 0.0416, max_mach=2.0)
    >>> mach.shape, bool(np.all(powered <= coasting))
    ((201,), True)
    """
    if not 0.0 < max_mach <= 10.0 or not 0.0 < mach_step <= max_mach:
        raise ValueError(f"`max_mach` must lie in (0, 10] and `mach_step` in (0, max_mach], got {max_mach!r}, {mach_step!r}")
    n = int(round(max_mach / mach_step)) + 1
    mach = np.linspace(0.0, (n - 1) * mach_step, n)
    parts = drag_components(geometry, diameter_m, mach, altitude_m=altitude_m, exhaust_diameter_m=exhaust_diameter_m)
    return parts.mach, parts.cd_powered, parts.cd_coasting


def drag_table_for(airframe: Airframe, *, max_mach: float = 3.0, mach_step: float = 0.01
                   ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`drag_curves` for an airframe with a geometry: (mach, cd_powered, cd_coasting).

    Uses the airframe diameter, the pad elevation for the Reynolds number and the motor mount
    diameter as the exhaust-filled base area (none if the mount is not given).

    Raises
    ------
    ValueError
        If the airframe has no ``geometry``.
    """
    if airframe.geometry is None:
        raise ValueError(f"`airframe` {airframe.name!r} has no geometry")
    return drag_curves(airframe.geometry, airframe.diameter_m, max_mach=max_mach, mach_step=mach_step,
                       **drag_conditions_for(airframe))


def drag_conditions_for(airframe: Airframe) -> dict[str, float | None]:
    """The conditions :func:`drag_table_for` estimates an airframe's drag at, as keyword arguments.

    ``altitude_m``: the pad elevation [m] (the Reynolds number's altitude); ``exhaust_diameter_m``:
    the motor mount diameter [m] (the base area the exhaust fills while burning), or None.

    >>> from motorlib.flight.airframe import Airframe
    >>> drag_conditions_for(Airframe("a", 0.3, 0.04, mount_diameter_m=0.029))
    {'altitude_m': 0.0, 'exhaust_diameter_m': 0.029}
    """
    return {"altitude_m": airframe.launch.site.elevation_m, "exhaust_diameter_m": airframe.mount_diameter_m}
