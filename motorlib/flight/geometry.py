"""Airframe shape and its centre of pressure by Barrowman's method.

Model
-----
Barrowman's method (J. S. Barrowman, *The Practical Calculation of the Aerodynamic
Characteristics of Slender Finned Vehicles*, M.S. thesis, Catholic University of America,
March 1967; J. S. and J. A. Barrowman, NARAM-8 R&D report, 1966). Each part contributes a
normal-force slope CN_α [1/rad], referred to the reference area A = π·d²/4 of the airframe
diameter d, acting at its own centre of pressure x [m]; the rocket's centre of pressure is
the CN_α-weighted mean of the parts' x.

* Nose (slender-body theory): CN_α = 2 on its base area, x = L − V/A_base (V the nose volume).
* Conical transition from d₁ to d₂: CN_α = 2·[(d₂/d)² − (d₁/d)²] (negative for a boattail),
  x = x_T + (L_T/3)·[1 + (1 − d₁/d₂)/(1 − (d₁/d₂)²)].
* N trapezoidal fins, root chord a, tip chord b, semi-span s, leading-edge sweep distance x_t,
  mid-chord line length l_m = √(s² + (x_t + b/2 − a/2)²):
  CN_α = K·4N·(s/d)² / (1 + √(1 + (2·l_m/(a + b))²)), with the fin–body interference factor
  K = 1 + r/(s + r) (r the body radius at the fins), acting at
  x = x_root_LE + (x_t/3)·(a + 2b)/(a + b) + (1/6)·[a + b − a·b/(a + b)].

Assumptions (those of the method): small angle of attack (α → 0, so forces are linear in α and
only the slopes matter); steady, inviscid, attached flow over a slender axisymmetric body with
gentle slopes; thin flat fins; the cylindrical body carries no normal force (true in potential
flow; the viscous body lift that grows with α² is neglected); fins act as N/2 independent pairs
(exact for 4 fins, the usual rule for 3; fin–fin interference of 5 or more fins is ignored);
subsonic flow. Conventional rockets: CP within a few percent of the body length of wind-tunnel
values (common experience, no published bound we could confirm).

Compressibility (fins only): the normal-force slope of one fin pair is the finite-wing formula
CN_α = 2π·A_R·(A_fin/A_ref)/(2 + √(4 + (β·A_R/cos Γ_c)²)), β = √(1 − M²), A_R = 2s²/A_fin,
Γ_c the mid-chord sweep (Diederich's lift-slope formula, the subsonic fin form of Barrowman's
thesis; from memory). At M = 0 it reduces exactly to the fin formula above. It is applied up to
Mach 0.8 and held above (:data:`MAX_CORRECTED_MACH`); the method is not valid supersonically.

Coordinates: x [m] from the nose tip, positive aft. The body's aft end is at
nose length + body length; transitions lie inside that length.

The centre of gravity with a motor and the stability margin live in :mod:`.stability`.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Final

import numpy as np

from ..errors import SimulationInputError

__all__ = [
    "FIN_PROFILES",
    "FINISHES",
    "LAUNCH_GUIDES",
    "MAX_CORRECTED_MACH",
    "NOSE_SHAPES",
    "Body",
    "Fins",
    "Finish",
    "Geometry",
    "Nose",
    "NormalForce",
    "Transition",
    "center_of_pressure_m",
    "check_diameters",
    "diameter_at_m",
    "disc_area_m2",
    "disc_drag_area_m2",
    "normal_force_components",
    "outline_m",
]

NOSE_SHAPES: Final = ("conical", "ogive", "parabolic", "elliptical", "power")
FIN_PROFILES: Final = ("square", "rounded", "airfoil")
LAUNCH_GUIDES: Final = ("auto", "lug", "buttons", "none")
MAX_CORRECTED_MACH: Final = 0.8  # the fin compressibility factor is held above this (subsonic method)

# Surface finishes: equivalent sand-grain roughness height [m]. The first five are the skin-roughness
# table of D. P. Raymer, *Aircraft Design: A Conceptual Approach* (AIAA), Table 12.5, given there in
# feet (values from memory; we could not re-check the edition). The last is our own estimate.
FINISHES: Final[dict[str, float]] = {
    "molded": 0.52e-6,        # smooth molded composite, 0.17e-5 ft (Raymer; from memory)
    "polished": 1.52e-6,      # polished sheet metal, 0.50e-5 ft (Raymer; from memory)
    "sheet_metal": 4.05e-6,   # production sheet metal, 1.33e-5 ft (Raymer; from memory)
    "smooth_paint": 6.34e-6,  # smooth paint, 2.08e-5 ft (Raymer; from memory)
    "paint": 10.15e-6,        # camouflage paint on aluminium, 3.33e-5 ft (Raymer; from memory)
    "unfinished": 100e-6,     # bare paper tube, sanded balsa: no published source, grain and seams ~0.1 mm
}
DEFAULT_FINISH: Final = "paint"

_SRC: Final = "geometry"


def disc_area_m2(diameter_m: float) -> float:
    """Area [m²] of a circle of ``diameter_m`` [m]: π·d²/4 (a body's reference area, a canopy's nominal area).

    >>> round(disc_area_m2(2.0), 6)
    3.141593
    """
    return math.pi * diameter_m**2 / 4.0


def disc_drag_area_m2(drag_coefficient: float, diameter_m: float) -> float:
    """Drag area Cd·A [m²] of a round device, its Cd referred to the disc of ``diameter_m`` [m]: Cd·π·d²/4.

    >>> round(disc_drag_area_m2(0.75, 0.9), 5)
    0.47713
    """
    return drag_coefficient * disc_area_m2(diameter_m)


def _require(name: str, ok: bool, problem: str) -> None:
    if not ok:
        raise SimulationInputError(_SRC, name, problem)


@dataclass(frozen=True)
class Nose:
    """A nose cone of base diameter equal to the airframe diameter.

    Attributes
    ----------
    shape : str
        With t = x/L and R the base radius, the radius is: ``conical`` R·t; ``ogive``
        (tangent ogive) √(ρ² − (L − x)²) + R − ρ with ρ = (R² + L²)/(2R); ``parabolic``
        (parabolic series, tangent to the body) R·(2t − t²); ``elliptical`` R·√(t(2 − t));
        ``power`` R·t^n. (Barrowman's "parabola", a paraboloid of revolution, is ``power``
        with exponent 0.5.)
    length_m : float
        Tip to base [m].
    exponent : float or None
        n of the ``power`` shape, 0 < n <= 1; only with that shape.
    """

    shape: str
    length_m: float
    exponent: float | None = None

    def __post_init__(self) -> None:
        # Length bounds here and in the other shape records (20 m nose, 50 m body, 10 m fins and transitions, 2 m
        # diameters) lie far above hobby rockets and catch lengths in mm read as m: common practice, no published
        # source.
        _require("geometry.nose.shape", self.shape in NOSE_SHAPES, f"must be one of {', '.join(NOSE_SHAPES)}, got {self.shape!r}")
        _require("geometry.nose.length", 0.0 < self.length_m <= 20.0, f"must be above 0 and at most 20 m, got {self.length_m!r} m")
        if self.shape == "power":
            _require("geometry.nose.exponent", self.exponent is not None and 0.0 < self.exponent <= 1.0,
                     f"shape 'power' needs an exponent above 0 and at most 1, got {self.exponent!r}")
        else:
            _require("geometry.nose.exponent", self.exponent is None, f"is used only with shape 'power', not {self.shape!r}")

    def radius_m(self, x_m: np.ndarray, base_radius_m: float) -> np.ndarray:
        """Radius [m] at distances ``x_m`` from the tip (clipped to the nose); shape as ``x_m``."""
        t = np.clip(np.asarray(x_m, dtype=float) / self.length_m, 0.0, 1.0)
        r = base_radius_m
        if self.shape == "conical":
            return r * t
        if self.shape == "ogive":
            length = self.length_m
            rho = (r * r + length * length) / (2.0 * r)
            return np.sqrt(np.maximum(rho * rho - (length * (1.0 - t)) ** 2, 0.0)) + r - rho
        if self.shape == "parabolic":
            return r * (2.0 * t - t * t)
        if self.shape == "elliptical":
            return r * np.sqrt(t * (2.0 - t))
        return r * t ** float(self.exponent)

    def volume_fraction(self, base_radius_m: float) -> float:
        """Nose volume over base area × length: 1/3 for a cone (closed forms, ogive by Simpson's rule)."""
        if self.shape == "conical":
            return 1.0 / 3.0
        if self.shape == "parabolic":
            return 8.0 / 15.0  # ∫(2t − t²)² dt over [0, 1]
        if self.shape == "elliptical":
            return 2.0 / 3.0
        if self.shape == "power":
            return 1.0 / (2.0 * float(self.exponent) + 1.0)
        t = np.linspace(0.0, 1.0, 4001)  # the tangent ogive is smooth: Simpson's rule errs by ~1e-13 here
        y2 = (self.radius_m(t * self.length_m, base_radius_m) / base_radius_m) ** 2
        h = t[1] - t[0]
        return float(h / 3.0 * (y2[0] + y2[-1] + 4.0 * y2[1:-1:2].sum() + 2.0 * y2[2:-1:2].sum()))

    def shoulder_angle_rad(self, base_radius_m: float) -> float:
        """Angle between the nose surface and the body axis at the base [rad]; 0 for tangent shapes."""
        if self.shape == "conical":
            return math.atan(base_radius_m / self.length_m)
        if self.shape == "power":
            return math.atan(float(self.exponent) * base_radius_m / self.length_m)
        return 0.0


@dataclass(frozen=True)
class Body:
    """The body tube(s) behind the nose; its diameter is the airframe diameter.

    Attributes
    ----------
    length_m : float
        From the nose base to the aft end [m], transitions included.
    """

    length_m: float

    def __post_init__(self) -> None:
        _require("geometry.body.length", 0.0 < self.length_m <= 50.0, f"must be above 0 and at most 50 m, got {self.length_m!r} m")


@dataclass(frozen=True)
class Fins:
    """A set of identical trapezoidal fins, equally spaced around the body.

    Attributes
    ----------
    count : int
        2 to 8 (Barrowman's method is written for 3 and 4).
    root_chord_m, tip_chord_m : float
        Chords at the body and at the tip [m]; tip 0 for a delta fin.
    span_m : float
        Semi-span: body surface to tip [m].
    sweep_m : float
        Leading-edge sweep: distance along the body from the root leading edge to the tip
        leading edge [m] (``root − tip`` gives a clipped delta with a square trailing edge).
    thickness_m : float
        Fin thickness [m] (drag only).
    offset_m : float
        Root trailing edge this far ahead of the body's aft end [m]; negative behind it.
    profile : str
        Edge shape for drag: ``square``, ``rounded`` (leading and trailing edges) or ``airfoil``.
    """

    count: int
    root_chord_m: float
    tip_chord_m: float
    span_m: float
    sweep_m: float
    thickness_m: float
    offset_m: float = 0.0
    profile: str = "rounded"

    def __post_init__(self) -> None:
        p = "geometry.fins."
        # 2 to 8 fins, a thickness below 0.2 m: the fin sets hobby rockets fly (common practice, no published source).
        _require(p + "count", isinstance(self.count, int) and not isinstance(self.count, bool) and 2 <= self.count <= 8,
                 f"must be a whole number from 2 to 8, got {self.count!r}")
        _require(p + "root_chord", 0.0 < self.root_chord_m <= 10.0, f"must be above 0 and at most 10 m, got {self.root_chord_m!r} m")
        _require(p + "tip_chord", 0.0 <= self.tip_chord_m <= 10.0, f"must lie between 0 and 10 m, got {self.tip_chord_m!r} m")
        _require(p + "span", 0.0 < self.span_m <= 10.0, f"must be above 0 and at most 10 m, got {self.span_m!r} m")
        _require(p + "sweep", -self.root_chord_m <= self.sweep_m <= 10.0,
                 f"must lie between minus the root chord and 10 m, got {self.sweep_m!r} m")
        _require(p + "thickness", 0.0 <= self.thickness_m < min(self.root_chord_m, 0.2),
                 f"must be at least 0 and below the root chord (and 0.2 m), got {self.thickness_m!r} m")
        _require(p + "offset", abs(self.offset_m) <= 10.0, f"must lie within 10 m, got {self.offset_m!r} m")
        _require(p + "profile", self.profile in FIN_PROFILES, f"must be one of {', '.join(FIN_PROFILES)}, got {self.profile!r}")

    @property
    def area_m2(self) -> float:
        """Planform area of one fin, s·(a + b)/2 [m²]."""
        return self.span_m * (self.root_chord_m + self.tip_chord_m) / 2.0

    @property
    def mean_aerodynamic_chord_m(self) -> float:
        """(2/3)·(a + b − a·b/(a + b)) [m] for a trapezoid."""
        a, b = self.root_chord_m, self.tip_chord_m
        return 2.0 / 3.0 * (a + b - a * b / (a + b))

    @property
    def midchord_length_m(self) -> float:
        """Length of the mid-chord line from root to tip, l_m [m]."""
        a, b = self.root_chord_m, self.tip_chord_m
        return math.hypot(self.span_m, self.sweep_m + b / 2.0 - a / 2.0)

    @property
    def leading_edge_sweep_rad(self) -> float:
        """Sweep angle of the leading edge from the span direction [rad]."""
        return math.atan2(self.sweep_m, self.span_m)


@dataclass(frozen=True)
class Transition:
    """A conical shoulder (widening) or boattail (narrowing) inside the body length.

    Attributes
    ----------
    fore_diameter_m, aft_diameter_m : float
        Diameters at its fore and aft ends [m]; the fore one must equal the diameter ahead of it.
    length_m : float
        Axial length [m].
    position_m : float
        Distance from the nose tip to its fore end [m].
    """

    fore_diameter_m: float
    aft_diameter_m: float
    length_m: float
    position_m: float

    def __post_init__(self) -> None:
        p = "geometry.transition."
        for key, value in (("fore_diameter", self.fore_diameter_m), ("aft_diameter", self.aft_diameter_m)):
            _require(p + key, 0.0 < value <= 2.0, f"must be above 0 and at most 2 m, got {value!r} m")
        _require(p + "length", 0.0 < self.length_m <= 10.0, f"must be above 0 and at most 10 m, got {self.length_m!r} m")
        _require(p + "position", self.position_m >= 0.0, f"must be at least 0, got {self.position_m!r} m")


@dataclass(frozen=True)
class Finish:
    """Surface finish: equivalent sand-grain roughness height [m] (see :data:`FINISHES`)."""

    roughness_m: float
    name: str = ""

    def __post_init__(self) -> None:
        _require("geometry.finish", 0.0 <= self.roughness_m <= 5e-3, f"roughness must lie between 0 and 5 mm, got {self.roughness_m!r} m")

    @classmethod
    def preset(cls, name: str) -> Finish:
        """A named finish from :data:`FINISHES`."""
        _require("geometry.finish", name in FINISHES, f"must be a length or one of {', '.join(FINISHES)}, got {name!r}")
        return cls(FINISHES[name], name)


@dataclass(frozen=True)
class Geometry:
    """The outside shape of an airframe and where its mass sits.

    Attributes
    ----------
    cg_m : float
        Balance point of the airframe WITHOUT motor, from the nose tip [m] (measured).
    nose : Nose
    body : Body
    fins : Fins or None
    transitions : tuple of Transition
        Ordered fore to aft, not overlapping, inside the body length.
    finish : Finish
        Surface roughness for skin friction; default the ``paint`` preset.
    motor_offset_m : float
        Motor aft end behind (+) or ahead of (−) the body's aft end [m].
    launch_guide : str
        ``lug``, ``buttons``, ``none`` or ``auto`` (a lug below 40 mm diameter, rail buttons
        above); drag only.
    """

    cg_m: float
    nose: Nose
    body: Body
    fins: Fins | None = None
    transitions: tuple[Transition, ...] = ()
    finish: Finish = field(default_factory=lambda: Finish.preset(DEFAULT_FINISH))
    motor_offset_m: float = 0.0
    launch_guide: str = "auto"

    def __post_init__(self) -> None:
        object.__setattr__(self, "transitions", tuple(self.transitions))
        total = self.length_m
        _require("geometry.cg", 0.0 < self.cg_m < total, f"must lie inside the airframe (0 to {total:.4g} m), got {self.cg_m!r} m")
        _require("geometry.motor_offset", abs(self.motor_offset_m) <= 2.0, f"must lie within 2 m, got {self.motor_offset_m!r} m")
        _require("geometry.launch_guide", self.launch_guide in LAUNCH_GUIDES,
                 f"must be one of {', '.join(LAUNCH_GUIDES)}, got {self.launch_guide!r}")
        fore = self.nose.length_m
        for i, tr in enumerate(self.transitions, start=1):
            name = f"geometry.transition[{i}].position"
            _require(name, tr.position_m >= fore - 1e-9, f"must be at or behind {fore:.4g} m (the nose base or the previous transition's end)")
            _require(name, tr.position_m + tr.length_m <= total + 1e-9, f"transition must end inside the airframe length {total:.4g} m")
            fore = tr.position_m + tr.length_m
        if self.fins is not None:
            _require("geometry.fins.offset", self.fin_root_leading_edge_m >= self.nose.length_m,
                     "fins must start behind the nose base (root chord + offset exceeds the body length)")

    @property
    def length_m(self) -> float:
        """Nose tip to body aft end [m]."""
        return self.nose.length_m + self.body.length_m

    @property
    def fin_root_leading_edge_m(self) -> float:
        """Nose tip to the fins' root leading edge [m] (requires fins)."""
        assert self.fins is not None
        return self.length_m - self.fins.offset_m - self.fins.root_chord_m


def check_diameters(geometry: Geometry, diameter_m: float) -> None:
    """Check that each transition starts at the diameter ahead of it (within 1 % or 0.5 mm).

    Raises
    ------
    SimulationInputError
        Naming ``geometry.transition[i].fore_diameter``.
    """
    ahead = diameter_m
    for i, tr in enumerate(geometry.transitions, start=1):
        _require(f"geometry.transition[{i}].fore_diameter", abs(tr.fore_diameter_m - ahead) <= max(0.01 * ahead, 5e-4),
                 f"must equal the diameter ahead of it ({ahead * 1e3:.4g} mm), got {tr.fore_diameter_m * 1e3:.4g} mm")
        ahead = tr.aft_diameter_m


def diameter_at_m(geometry: Geometry, diameter_m: float, x_m: np.ndarray | float) -> np.ndarray:
    """Body diameter [m] at distances ``x_m`` from the nose tip (nose included); shape as ``x_m``.

    >>> g = Geometry(0.3, Nose("conical", 0.1), Body(0.5))
    >>> float(diameter_at_m(g, 0.04, 0.05))
    0.02
    """
    x = np.asarray(x_m, dtype=float)
    d = np.where(x < geometry.nose.length_m, 2.0 * geometry.nose.radius_m(x, diameter_m / 2.0), diameter_m)
    for tr in geometry.transitions:
        t = np.clip((x - tr.position_m) / tr.length_m, 0.0, 1.0)
        inside = x >= tr.position_m
        d = np.where(inside, tr.fore_diameter_m + t * (tr.aft_diameter_m - tr.fore_diameter_m), d)
    return d


def outline_m(geometry: Geometry, diameter_m: float, n_nose: int = 201) -> tuple[np.ndarray, np.ndarray]:
    """Side profile: x from the nose tip [m] and radius [m], both shape (n_points,), tip to aft end.

    The nose is sampled densely near the tip (blunt shapes have an infinite slope there).
    """
    u = np.linspace(0.0, 1.0, n_nose)
    x_nose = geometry.nose.length_m * u * u
    breaks = [geometry.nose.length_m, geometry.length_m]
    for tr in geometry.transitions:
        breaks += [tr.position_m, tr.position_m + tr.length_m]
    x_body = np.unique(np.array(breaks))
    x = np.concatenate((x_nose, x_body[x_body > geometry.nose.length_m]))
    return x, diameter_at_m(geometry, diameter_m, x) / 2.0


@dataclass(frozen=True)
class NormalForce:
    """One part's normal-force slope CN_α [1/rad] (on the reference area) and its centre of pressure [m]."""

    part: str
    cn_alpha: float | np.ndarray
    cp_m: float


def _fin_cn_alpha(fins: Fins, diameter_m: float, body_radius_m: float, mach: np.ndarray) -> np.ndarray:
    """CN_α of the fin set with body interference; shape as ``mach`` (see the module docstring)."""
    area_ref = disc_area_m2(diameter_m)
    aspect = 2.0 * fins.span_m**2 / fins.area_m2
    cos_midchord = fins.span_m / fins.midchord_length_m
    beta = np.sqrt(1.0 - np.minimum(mach, MAX_CORRECTED_MACH) ** 2)
    pair = 2.0 * math.pi * aspect * (fins.area_m2 / area_ref) / (2.0 + np.sqrt(4.0 + (beta * aspect / cos_midchord) ** 2))
    interference = 1.0 + body_radius_m / (fins.span_m + body_radius_m)
    return interference * fins.count / 2.0 * pair


def normal_force_components(geometry: Geometry, diameter_m: float, mach: np.ndarray | float = 0.0) -> tuple[NormalForce, ...]:
    """Barrowman normal-force slopes and centres of pressure of the nose, each transition and the fins.

    Parameters
    ----------
    geometry : Geometry
    diameter_m : float
        Reference (and nose base) diameter [m].
    mach : float or ndarray
        Mach number(s); only the fins depend on it. Arrays give ``cn_alpha`` of the same shape.

    Returns
    -------
    tuple of NormalForce
        ``nose``, ``transition 1`` ..., ``fins`` (when present), fore to aft.
    """
    mach_arr = np.asarray(mach, dtype=float)
    radius = diameter_m / 2.0
    nose = geometry.nose
    parts = [NormalForce("nose", 2.0, nose.length_m * (1.0 - nose.volume_fraction(radius)))]
    for i, tr in enumerate(geometry.transitions, start=1):
        d1, d2 = tr.fore_diameter_m, tr.aft_diameter_m
        cn = 2.0 * ((d2 / diameter_m) ** 2 - (d1 / diameter_m) ** 2)
        ratio = d1 / d2
        # (1 − q)/(1 − q²) = 1/(1 + q), the form that stays finite when d1 = d2
        parts.append(NormalForce(f"transition {i}", cn, tr.position_m + tr.length_m / 3.0 * (1.0 + 1.0 / (1.0 + ratio))))
    fins = geometry.fins
    if fins is not None:
        a, b, xt = fins.root_chord_m, fins.tip_chord_m, fins.sweep_m
        x_le = geometry.fin_root_leading_edge_m
        body_radius = float(diameter_at_m(geometry, diameter_m, x_le + a / 2.0)) / 2.0
        cp = x_le + xt / 3.0 * (a + 2.0 * b) / (a + b) + (a + b - a * b / (a + b)) / 6.0
        cn_fins = _fin_cn_alpha(fins, diameter_m, body_radius, mach_arr)
        parts.append(NormalForce("fins", float(cn_fins) if cn_fins.ndim == 0 else cn_fins, cp))
    return tuple(parts)


def center_of_pressure_m(geometry: Geometry, diameter_m: float, mach: np.ndarray | float = 0.0) -> np.ndarray:
    """Centre of pressure from the nose tip [m] by Barrowman's method.

    Parameters
    ----------
    geometry : Geometry
    diameter_m : float
        Reference (and nose base) diameter [m].
    mach : float or ndarray
        Mach number(s), >= 0; the fin compressibility factor is held above Mach 0.8.

    Returns
    -------
    ndarray
        x_CP [m], shape as ``mach`` (0-d for a scalar).

    Notes
    -----
    x_CP = Σ CN_α,i·x_i / Σ CN_α,i over the parts of :func:`normal_force_components`.

    References
    ----------
    J. S. Barrowman, *The Practical Calculation of the Aerodynamic Characteristics of Slender
    Finned Vehicles*, M.S. thesis, Catholic University of America, 1967.

    >>> g = Geometry(0.3, Nose("conical", 0.3), Body(0.6))
    >>> round(float(center_of_pressure_m(g, 0.05)), 6)   # a bare cone: 2/3 of its length
    0.2
    """
    if np.any(np.asarray(mach) < 0.0):
        raise ValueError("`mach` must be >= 0")
    parts = normal_force_components(geometry, diameter_m, mach)
    total = sum(p.cn_alpha for p in parts)
    moment = sum(p.cn_alpha * p.cp_m for p in parts)
    return np.asarray(moment / total, dtype=float)
