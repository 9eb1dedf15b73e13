"""What an airframe's shape gives, gathered for display or JSON: lengths, centre of pressure, CG and
stability margins with a motor, the drag build-up at one Mach number and a Cd(Mach) table.

The figures come from :mod:`.geometry` (Barrowman CP), :mod:`.stability` (CG, margins, nose weight)
and :mod:`.drag` (component build-up); this module only collects them as plain floats (None for a
figure that cannot be had), in SI units, positions from the nose tip.

numpy only.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Final

import numpy as np

from .drag import drag_breakdown, drag_components, drag_conditions_for
from .geometry import center_of_pressure_m, normal_force_components
from .stability import MIN_STABILITY_CAL, nose_weight_kg, stability_for, stability_margin_cal, stability_warnings

if TYPE_CHECKING:
    from ..motor.record import MotorRecord
    from .airframe import Airframe

__all__ = ["DEFAULT_TABLE_MACHS", "airframe_summary", "drag_summary"]

# Mach numbers of the printed Cd table: dense through the transonic rise, where Cd changes fastest
DEFAULT_TABLE_MACHS: Final = (0.0, 0.3, 0.5, 0.7, 0.8, 0.9, 0.95, 1.0, 1.05, 1.1, 1.2, 1.5, 2.0, 2.5, 3.0)


def _num(value: Any) -> float | None:
    number = float(value)
    return number if np.isfinite(number) else None


def _shape(airframe: Airframe) -> dict[str, Any]:
    g = airframe.geometry
    assert g is not None
    fins = None
    if g.fins is not None:
        f = g.fins
        fins = {"count": f.count, "root_chord_m": f.root_chord_m, "tip_chord_m": f.tip_chord_m, "span_m": f.span_m,
                "sweep_m": f.sweep_m, "thickness_m": f.thickness_m, "offset_m": f.offset_m, "profile": f.profile,
                "root_leading_edge_m": g.fin_root_leading_edge_m}
    return {
        "length_m": g.length_m,
        "nose": {"shape": g.nose.shape, "length_m": g.nose.length_m, "exponent": g.nose.exponent},
        "body_length_m": g.body.length_m,
        "fins": fins,
        "transitions": [{"fore_diameter_m": t.fore_diameter_m, "aft_diameter_m": t.aft_diameter_m,
                         "length_m": t.length_m, "position_m": t.position_m} for t in g.transitions],
        "finish": {"name": g.finish.name or None, "roughness_m": g.finish.roughness_m},
        "launch_guide": g.launch_guide,
        "motor_offset_m": g.motor_offset_m,
    }


def airframe_summary(airframe: Airframe, motor: MotorRecord | None = None, *, mach: float = 0.3,
                     table_machs: tuple[float, ...] = DEFAULT_TABLE_MACHS,
                     required_margin_cal: float = MIN_STABILITY_CAL) -> dict[str, Any]:
    """The derived figures of an airframe with a geometry, and of it with one motor.

    Parameters
    ----------
    airframe : Airframe
        With a ``geometry``.
    motor : MotorRecord, optional
        Adds the CG at liftoff and burnout, the margins, warnings and, when the smallest margin is
        below ``required_margin_cal``, the nose weight that restores it.
    mach : float
        Mach number of the drag build-up, >= 0.
    table_machs : tuple of float
        Mach numbers of the Cd table, >= 0.
    required_margin_cal : float
        Margin the nose-weight solve aims for [calibers].

    Returns
    -------
    dict
        Plain, JSON-ready values (SI; positions from the nose tip): ``airframe``, ``diameter_m``,
        ``mass_kg``, ``geometry`` (lengths and parts), ``normal_force`` (each part's CN_α and CP),
        ``cp_m`` and ``cp_mach`` (the subsonic CP), ``cg_empty_m``, ``margin_empty_cal``, ``motor``,
        ``stability`` (the ``fly --json`` keys; rail exit None: no flight here),
        ``required_margin_cal``, ``nose_weight_for_stability_kg``, ``nose_weight_position_m``,
        ``warnings``, ``drag`` (build-up at ``mach``), ``drag_table`` and ``drag_given`` (the
        airframe's own Cd, shown beside the estimate).

    Raises
    ------
    ValueError
        If the airframe has no geometry or a Mach number is negative.
    """
    g = airframe.geometry
    if g is None:
        raise ValueError(f"`airframe` {airframe.name!r} has no geometry")
    if not mach >= 0.0 or any(not m >= 0.0 for m in table_machs):
        raise ValueError("`mach` and `table_machs` must be >= 0")
    d = airframe.diameter_m
    cp = float(center_of_pressure_m(g, d))
    out: dict[str, Any] = {
        "airframe": airframe.name, "diameter_m": d, "mass_kg": airframe.mass_kg, "geometry": _shape(airframe),
        "normal_force": [{"part": p.part, "cn_alpha": float(p.cn_alpha), "cp_m": p.cp_m}
                         for p in normal_force_components(g, d)],
        "cp_m": cp, "cp_mach": 0.0, "cg_empty_m": g.cg_m, "margin_empty_cal": float(stability_margin_cal(cp, g.cg_m, d)),
        "motor": None, "stability": None, "required_margin_cal": required_margin_cal,
        "nose_weight_for_stability_kg": None, "nose_weight_position_m": None, "warnings": [],
    }
    if motor is not None:
        nan = float("nan")
        total = nan if motor.total_mass_kg is None else motor.total_mass_kg
        prop = nan if motor.propellant_mass_kg is None else motor.propellant_mass_kg
        length = nan if motor.length_m is None else motor.length_m
        stab = stability_for(airframe, np.array([total]), np.array([prop]), np.array([length]))
        out["motor"] = {"designation": motor.designation, "maker": motor.maker, "total_mass_kg": motor.total_mass_kg,
                        "propellant_mass_kg": motor.propellant_mass_kg, "length_m": motor.length_m,
                        "diameter_m": motor.diameter_m}
        out["stability"] = stab.as_dict(0)
        weight = float(nose_weight_kg(stab, required_margin_cal)[0])
        if np.isnan(weight) or weight > 0.0:
            out["nose_weight_for_stability_kg"] = _num(weight)  # None: unknown, or out of reach (inf)
            out["nose_weight_position_m"] = stab.added_mass_position_m
        out["warnings"] = [{"code": code, "message": text}
                           for code, text in stability_warnings(out["stability"]["min_margin_cal"])]
        if np.isinf(weight):
            out["warnings"].append({"code": "nose-weight-out-of-reach", "message": (
                f"no nose weight at {1e3 * stab.added_mass_position_m:.0f} mm from the tip gives "
                f"{required_margin_cal:g} cal: enlarge the fins or lengthen the body")})
    conditions = drag_conditions_for(airframe)
    breakdown = drag_breakdown(g, d, mach, **conditions)
    out["drag"] = {"mach": float(mach), **conditions,
                   "components": {k: v for k, v in breakdown.items() if not k.startswith("total")},
                   "cd_powered": breakdown["total, powered"], "cd_coasting": breakdown["total, coasting"]}
    parts = drag_components(g, d, np.array(table_machs, dtype=float), **conditions)
    out["drag_table"] = [{"mach": float(m), "cd_powered": float(p), "cd_coasting": float(c)}
                         for m, p, c in zip(parts.mach, parts.cd_powered, parts.cd_coasting)]
    given_at_mach = float(np.interp(mach, airframe.drag_machs, airframe.drag_cds))
    out["drag_given"] = {"drag_coefficient": None if airframe.drag_table else airframe.drag_coefficient,
                         "drag_table": [list(row) for row in airframe.drag_table] or None, "cd_at_mach": given_at_mach}
    return out


def drag_summary(airframe: Airframe, mach: float = 0.3) -> dict[str, Any]:
    """Where the flight's drag comes from, and the shape's estimate beside a given Cd.

    Parameters
    ----------
    airframe : Airframe
    mach : float
        Mach number the two Cd are compared at, >= 0 (coasting values).

    Returns
    -------
    dict
        ``drag_source`` (``given`` or ``estimated``), ``mach``, ``cd_flown`` (the coasting Cd the
        flight uses at ``mach``) and ``cd_estimated`` (the shape's coasting estimate there; None
        without a geometry). When the drag is estimated the two are the same figure.

    >>> from motorlib.flight.airframe import Airframe
    >>> drag_summary(Airframe("a", 0.3, 0.04, drag_coefficient=0.6))
    {'drag_source': 'given', 'mach': 0.3, 'cd_flown': 0.6, 'cd_estimated': None}
    """
    if not mach >= 0.0:
        raise ValueError("`mach` must be >= 0")
    flown = float(np.interp(mach, airframe.drag_machs, airframe.drag_cds))
    estimated = None
    if airframe.geometry is not None:
        breakdown = drag_breakdown(airframe.geometry, airframe.diameter_m, mach, **drag_conditions_for(airframe))
        estimated = breakdown["total, coasting"]
    return {"drag_source": airframe.drag_source, "mach": float(mach), "cd_flown": flown, "cd_estimated": estimated}
