"""Centre of gravity with a motor, static stability margin over the powered flight, and the nose weight
that restores a required margin.

Model
-----
Centre of gravity: the empty airframe at its measured balance point ``geometry.cg_m``, any added
(nose) weight at its own position, the motor case at its centre of mass (by default the middle of
the motor) and the propellant centred in the motor; motor aft end = body aft end +
``geometry.motor_offset_m``. Propellant is consumed in proportion to the impulse delivered (as the
flight integrator assumes) and its centre stays put (a core-burning grain burns evenly along its
length).

Static margin = (x_CP − x_CG)/d calibers, positive when the CP lies behind the CG (stable), with
x_CP by Barrowman's method (:mod:`.geometry`) and d the airframe (reference) diameter.

Over the powered flight. The propellant's mass shrinks at a fixed place, so the CG moves
monotonically from its liftoff to its burnout position; with one CP the smallest margin of the burn
is therefore at liftoff or at burnout, and those two are always evaluated. Rail exit is evaluated
too when the share of propellant burnt by then is given: it is the margin the rocket has when it
first flies free. ``min_margin_cal`` is the smallest of the evaluated points.

CP against Mach (an assumption). One CP per flight: the subsonic CP (Mach 0) by default, or the CP at
a Mach number given per motor (the flight's Mach at rail exit, say). Barrowman's fin
compressibility factor moves the CP aft as Mach rises to 0.8 (and is held above), so Mach 0 is the
most cautious choice this model offers. The real CP shifts in the transonic and supersonic range in
ways this subsonic method does not follow.

Nose weight (closed form). A mass w at x_w moves the CG of a rocket of mass M at x_G to
(M·x_G + w·x_w)/(M + w). A required margin m puts the CG at x* = x_CP − m·d, which needs
w = M·(x_G − x*)/(x* − x_w) when x_G > x* (else none), possible only when x_w < x*. The CG moves
forward monotonically as w grows, so the weight that satisfies every evaluated point is the largest
of their weights.

Thresholds (common practice, no published source): at least :data:`MIN_STABILITY_CAL` = 1 caliber;
above :data:`OVERSTABLE_CAL` = 3 calibers a rocket is over-stable (it turns into the wind).

numpy only.

The module runs a little past 500 lines on purpose: CG, margins and the nose-weight solve are one
model, and the solve reads the same arrays the margins do.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Final

import numpy as np

from .geometry import Geometry, center_of_pressure_m
from ..motor.record import cumulative_impulse_ns

if TYPE_CHECKING:  # only for annotations: airframe.py imports geometry, which this module imports
    from ..motor.record import MotorRecord
    from .airframe import Airframe
    from .pack import MotorPack
    from .results import FlightResults

__all__ = [
    "MIN_STABILITY_CAL",
    "OVERSTABLE_CAL",
    "Stability",
    "burnt_fraction",
    "cg_m",
    "cg_with_motor_m",
    "default_nose_weight_position_m",
    "flight_stability",
    "nose_weight_kg",
    "stability_for",
    "stability_for_pack",
    "stability_for_records",
    "stability_margin_cal",
    "stability_margins",
    "stability_warnings",
]

MIN_STABILITY_CAL: Final = 1.0  # the usual minimum static margin: common practice, no published source
OVERSTABLE_CAL: Final = 3.0  # above this a rocket weathercocks strongly: common practice, no published source


def default_nose_weight_position_m(geometry: Geometry) -> float:
    """Where added nose weight is taken to sit by default: half the nose length behind the tip [m].

    Weight packed into a nose sits in its forward half; its centre at mid-length asks for a little
    more weight than weight nearer the tip would, the cautious side.

    >>> from motorlib.flight.geometry import Body, Nose
    >>> default_nose_weight_position_m(Geometry(0.5, Nose("ogive", 0.2), Body(0.8)))
    0.1
    """
    return geometry.nose.length_m / 2.0


def _motor_place(geometry: Geometry, motor_length_m: np.ndarray, case_cg_from_aft_m: np.ndarray | float | None
                 ) -> tuple[np.ndarray, np.ndarray]:
    aft = geometry.length_m + geometry.motor_offset_m
    centre = aft - motor_length_m / 2.0
    case = centre if case_cg_from_aft_m is None else aft - np.asarray(case_cg_from_aft_m, dtype=float)
    return case, centre


def cg_m(geometry: Geometry, airframe_mass_kg: np.ndarray | float, motor_case_mass_kg: np.ndarray | float,
         motor_propellant_mass_kg: np.ndarray | float, motor_length_m: np.ndarray | float, *,
         case_cg_from_aft_m: np.ndarray | float | None = None, added_mass_kg: np.ndarray | float = 0.0,
         added_mass_position_m: float = 0.0) -> np.ndarray:
    """Centre of gravity from the nose tip [m] of the airframe with a motor holding some propellant.

    Parameters
    ----------
    geometry : Geometry
        Gives the airframe's own CG, the body's aft end and the motor offset.
    airframe_mass_kg : float or ndarray
        Empty airframe mass [kg] (its balance point is ``geometry.cg_m``), scalar or shape (n_motors,).
    motor_case_mass_kg, motor_propellant_mass_kg, motor_length_m : float or ndarray
        Motor case (hardware) mass [kg], propellant mass present [kg] and motor length [m];
        shape (n_motors,) or broadcastable.
    case_cg_from_aft_m : float or ndarray, optional
        Case centre of mass ahead of the motor's aft end [m]; default half the motor length.
    added_mass_kg : float or ndarray
        Extra mass (nose weight, ballast) [kg], shape (n_motors,) or scalar.
    added_mass_position_m : float
        Where the extra mass sits, from the nose tip [m].

    Returns
    -------
    ndarray
        x_CG [m], shape (n_motors,) (broadcast shape of the inputs).

    Notes
    -----
    x_CG = (m_a·x_a + m_w·x_w + m_c·x_c + m_p·x_p)/(m_a + m_w + m_c + m_p); motor aft end at body
    aft end + ``motor_offset_m``; propellant centred in the motor.

    >>> from motorlib.flight.geometry import Body, Nose
    >>> g = Geometry(0.5, Nose("ogive", 0.2), Body(0.8))
    >>> round(float(cg_m(g, 1.0, 0.0, 1.0, 0.2)), 6)   # 1 kg at 0.5 m, 1 kg at 0.9 m
    0.7
    """
    length = np.asarray(motor_length_m, dtype=float)
    case_x, prop_x = _motor_place(geometry, length, case_cg_from_aft_m)
    case_kg = np.asarray(motor_case_mass_kg, dtype=float)
    prop_kg = np.asarray(motor_propellant_mass_kg, dtype=float)
    added_kg = np.asarray(added_mass_kg, dtype=float)
    moment = airframe_mass_kg * geometry.cg_m + added_kg * added_mass_position_m + case_kg * case_x + prop_kg * prop_x
    return moment / (airframe_mass_kg + added_kg + case_kg + prop_kg)


def cg_with_motor_m(geometry: Geometry, airframe_mass_kg: float, motor_total_mass_kg: np.ndarray | float,
                    motor_propellant_mass_kg: np.ndarray | float, motor_length_m: np.ndarray | float, *,
                    case_cg_from_aft_m: np.ndarray | float | None = None, added_mass_kg: np.ndarray | float = 0.0,
                    added_mass_position_m: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """CG from the nose tip [m] at liftoff (full motor) and at burnout (empty case).

    Parameters as :func:`cg_m`, with the motor's loaded mass ``motor_total_mass_kg`` [kg];
    arrays of shape (n_motors,) give one CG per motor (vectorised: k motors together equal k
    single calls).

    Returns
    -------
    cg_liftoff_m, cg_burnout_m : ndarray
        Shape (n_motors,).

    Raises
    ------
    ValueError
        If a propellant mass exceeds its motor's total mass.
    """
    total = np.asarray(motor_total_mass_kg, dtype=float)
    prop = np.asarray(motor_propellant_mass_kg, dtype=float)
    if np.any(prop > total) or np.any(prop < 0.0):
        raise ValueError("`motor_propellant_mass_kg` must lie between 0 and `motor_total_mass_kg`")
    case = total - prop
    extra = {"case_cg_from_aft_m": case_cg_from_aft_m, "added_mass_kg": added_mass_kg,
             "added_mass_position_m": added_mass_position_m}
    liftoff = cg_m(geometry, airframe_mass_kg, case, prop, motor_length_m, **extra)
    burnout = cg_m(geometry, airframe_mass_kg, case, 0.0 * prop, motor_length_m, **extra)
    return liftoff, burnout


def stability_margin_cal(cp_m: np.ndarray | float, cg_m: np.ndarray | float, diameter_m: float) -> np.ndarray:
    """Static margin (x_CP − x_CG)/d in calibers; positive when the CP is behind the CG (stable).

    >>> round(float(stability_margin_cal(0.9, 0.8, 0.05)), 12)
    2.0
    """
    return (np.asarray(cp_m, dtype=float) - np.asarray(cg_m, dtype=float)) / diameter_m


def _frozen(values: Any) -> np.ndarray:
    out = np.array(values, dtype=float)  # our own copy, frozen
    out.flags.writeable = False
    return out


@dataclass(frozen=True, eq=False)
class Stability:
    """CP, CG, masses and margins of one airframe with each of n motors; arrays have shape (n_motors,).

    Positions are from the nose tip [m]; margins in calibers of ``diameter_m``. The rail-exit
    values are NaN when rail exit was not evaluated; all values are NaN for a motor lacking its
    masses or length. ``mass_*_kg`` is the whole rocket's mass at each point (airframe, added
    weight at ``added_mass_position_m`` and motor), which :func:`nose_weight_kg` needs.
    """

    diameter_m: float
    cp_m: np.ndarray
    cg_liftoff_m: np.ndarray
    cg_rail_exit_m: np.ndarray
    cg_burnout_m: np.ndarray
    mass_liftoff_kg: np.ndarray
    mass_rail_exit_kg: np.ndarray
    mass_burnout_kg: np.ndarray
    added_mass_position_m: float = 0.0

    def __post_init__(self) -> None:
        names = ("cp_m", "cg_liftoff_m", "cg_rail_exit_m", "cg_burnout_m", "mass_liftoff_kg", "mass_rail_exit_kg",
                 "mass_burnout_kg")
        shape = np.broadcast_shapes(*(np.shape(getattr(self, name)) for name in names))
        for name in names:
            object.__setattr__(self, name, _frozen(np.broadcast_to(getattr(self, name), shape)))
        if not self.diameter_m > 0.0:
            raise ValueError(f"`diameter_m` must be > 0, got {self.diameter_m!r}")

    @property
    def n_motors(self) -> int:
        return int(self.cp_m.size)

    @property
    def margin_liftoff_cal(self) -> np.ndarray:
        return stability_margin_cal(self.cp_m, self.cg_liftoff_m, self.diameter_m)

    @property
    def margin_rail_exit_cal(self) -> np.ndarray:
        return stability_margin_cal(self.cp_m, self.cg_rail_exit_m, self.diameter_m)

    @property
    def margin_burnout_cal(self) -> np.ndarray:
        return stability_margin_cal(self.cp_m, self.cg_burnout_m, self.diameter_m)

    @property
    def min_margin_cal(self) -> np.ndarray:
        """Smallest margin of liftoff, rail exit (when evaluated) and burnout."""
        # fmin skips the NaN of an unevaluated rail exit; liftoff and burnout are NaN together
        return np.fmin(np.fmin(self.margin_liftoff_cal, self.margin_burnout_cal), self.margin_rail_exit_cal)

    def as_dict(self, i: int = 0) -> dict[str, float | None]:
        """Motor ``i``'s figures as plain floats (None for NaN), keyed as in ``fly --json``."""
        def num(values: np.ndarray) -> float | None:
            value = float(values.reshape(-1)[i])
            return value if np.isfinite(value) else None

        return {"cp_m": num(self.cp_m), "cg_liftoff_m": num(self.cg_liftoff_m), "cg_burnout_m": num(self.cg_burnout_m),
                "margin_liftoff_cal": num(self.margin_liftoff_cal),
                "margin_rail_exit_cal": num(self.margin_rail_exit_cal),
                "margin_burnout_cal": num(self.margin_burnout_cal), "min_margin_cal": num(self.min_margin_cal)}


def stability_margins(geometry: Geometry, diameter_m: float, airframe_mass_kg: np.ndarray | float,
                      motor_total_mass_kg: np.ndarray | float, motor_propellant_mass_kg: np.ndarray | float,
                      motor_length_m: np.ndarray | float, *, mach: np.ndarray | float = 0.0,
                      rail_exit_burnt_fraction: np.ndarray | float | None = None,
                      added_mass_kg: np.ndarray | float = 0.0, added_mass_position_m: float | None = None,
                      case_cg_from_aft_m: np.ndarray | float | None = None) -> Stability:
    """CP, CG and margins [calibers] at liftoff, rail exit and burnout for each motor.

    Parameters
    ----------
    geometry : Geometry
    diameter_m : float
        Reference (and nose base) diameter [m].
    airframe_mass_kg : float or ndarray
        Empty airframe mass [kg], scalar or shape (n_motors,) (its balance point is ``geometry.cg_m``).
    motor_total_mass_kg, motor_propellant_mass_kg, motor_length_m : float or ndarray
        Loaded motor mass [kg], its propellant [kg] and motor length [m], shape (n_motors,);
        NaN for a motor whose figure is unknown gives NaN results for it.
    mach : float or ndarray
        Mach number of the CP, scalar or shape (n_motors,); 0 (subsonic CP, the most cautious)
        by default. See the module docstring for this assumption.
    rail_exit_burnt_fraction : float or ndarray, optional
        Share of the propellant burnt by rail exit, 0 to 1, shape (n_motors,); None (or NaN for
        one motor): rail exit not evaluated, its values are NaN.
    added_mass_kg : float or ndarray
        Nose weight or ballast already carried [kg], scalar or shape (n_motors,).
    added_mass_position_m : float, optional
        Its position from the nose tip [m]; default :func:`default_nose_weight_position_m`.
    case_cg_from_aft_m : float or ndarray, optional
        As in :func:`cg_m`.

    Returns
    -------
    Stability
        Vectorised: k motors together give the numbers of k single calls.

    Raises
    ------
    ValueError
        If a propellant mass exceeds its motor's mass or a burnt fraction lies outside [0, 1].

    >>> from motorlib.flight.geometry import Body, Fins, Nose
    >>> g = Geometry(0.45, Nose("ogive", 0.15), Body(0.6), Fins(3, 0.1, 0.05, 0.05, 0.05, 0.003))
    >>> s = stability_margins(g, 0.04, 0.2, [0.05, 0.2], [0.02, 0.1], [0.1, 0.2])
    >>> bool(s.margin_liftoff_cal[0] > s.margin_liftoff_cal[1])   # the heavier motor costs margin
    True
    """
    total = np.asarray(motor_total_mass_kg, dtype=float)
    prop = np.asarray(motor_propellant_mass_kg, dtype=float)
    known = np.isfinite(total) & np.isfinite(prop)
    if np.any(known & ((prop > total) | (prop < 0.0))):
        raise ValueError("`motor_propellant_mass_kg` must lie between 0 and `motor_total_mass_kg`")
    position = default_nose_weight_position_m(geometry) if added_mass_position_m is None else float(added_mass_position_m)
    added = np.asarray(added_mass_kg, dtype=float)
    if np.any(added < 0.0):
        raise ValueError("`added_mass_kg` must be >= 0")
    case = total - prop
    extra = {"case_cg_from_aft_m": case_cg_from_aft_m, "added_mass_kg": added, "added_mass_position_m": position}
    dry_kg = airframe_mass_kg + added + case
    cg0 = cg_m(geometry, airframe_mass_kg, case, prop, motor_length_m, **extra)
    cg1 = cg_m(geometry, airframe_mass_kg, case, 0.0 * prop, motor_length_m, **extra)
    if rail_exit_burnt_fraction is None:
        cg_rail, mass_rail = np.full_like(cg0, np.nan), np.full_like(cg0, np.nan)
    else:
        burnt = np.asarray(rail_exit_burnt_fraction, dtype=float)
        if np.any(burnt < 0.0) or np.any(burnt > 1.0):
            raise ValueError("`rail_exit_burnt_fraction` must lie between 0 and 1")
        left = prop * (1.0 - burnt)
        cg_rail, mass_rail = cg_m(geometry, airframe_mass_kg, case, left, motor_length_m, **extra), dry_kg + left
    cp = center_of_pressure_m(geometry, diameter_m, mach)
    cp = np.where(np.isfinite(cg0), cp, np.nan)  # a motor we cannot place gets no CP either: all NaN together
    return Stability(diameter_m, cp, cg0, cg_rail, cg1, dry_kg + prop, mass_rail, dry_kg, position)


def _require_geometry(airframe: Airframe) -> Geometry:
    if airframe.geometry is None:
        raise ValueError(f"`airframe` {airframe.name!r} has no geometry")
    return airframe.geometry


def stability_for(airframe: Airframe, motor_total_mass_kg: np.ndarray | float, motor_propellant_mass_kg: np.ndarray | float,
                  motor_length_m: np.ndarray | float, *, mach: np.ndarray | float = 0.0,
                  rail_exit_burnt_fraction: np.ndarray | float | None = None, added_mass_kg: np.ndarray | float = 0.0,
                  added_mass_position_m: float | None = None,
                  airframe_mass_kg: np.ndarray | float | None = None) -> Stability:
    """:func:`stability_margins` for an :class:`~motorlib.flight.airframe.Airframe` with a geometry.

    ``airframe_mass_kg`` (scalar or shape (n_motors,)) replaces the airframe's empty mass [kg], at the same
    balance point: the sampled masses of a dispersion run.

    Raises
    ------
    ValueError
        If the airframe has no ``geometry``.
    """
    empty_kg = airframe.mass_kg if airframe_mass_kg is None else airframe_mass_kg
    return stability_margins(_require_geometry(airframe), airframe.diameter_m, empty_kg, motor_total_mass_kg,
                             motor_propellant_mass_kg, motor_length_m, mach=mach,
                             rail_exit_burnt_fraction=rail_exit_burnt_fraction, added_mass_kg=added_mass_kg,
                             added_mass_position_m=added_mass_position_m)


def burnt_fraction(time_s: np.ndarray, thrust_n: np.ndarray, at_time_s: np.ndarray | float) -> np.ndarray:
    """Share of each motor's total impulse (so of its propellant) delivered by ``at_time_s``.

    Parameters
    ----------
    time_s, thrust_n : ndarray
        Thrust curves padded to shape (n_motors, n_samples_max): times [s] non-decreasing along
        each row (padding repeats the last time), thrust [N] linear between samples (padding 0).
    at_time_s : float or ndarray
        Time from ignition [s], scalar or shape (n_motors,); clipped to each curve's span.

    Returns
    -------
    ndarray
        Shape (n_motors,), from 0 to 1. Exact for the piecewise-linear curve (a trapezoid up to
        ``at_time_s`` inside its sample interval); vectorised over motors.

    >>> t = np.array([[0.0, 1.0, 2.0], [0.0, 2.0, 2.0]])
    >>> f = np.array([[10.0, 10.0, 0.0], [5.0, 5.0, 0.0]])
    >>> burnt_fraction(t, f, np.array([1.0, 1.0])).round(6).tolist()
    [0.666667, 0.5]
    """
    time = np.atleast_2d(np.asarray(time_s, dtype=float))
    thrust = np.atleast_2d(np.asarray(thrust_n, dtype=float))
    if time.shape != thrust.shape or time.shape[1] < 2:
        raise ValueError("`time_s` and `thrust_n` must have the same shape (n_motors, n_samples >= 2)")
    n = time.shape[0]
    rows = np.arange(n)
    cumulative = cumulative_impulse_ns(time, thrust)
    at = np.clip(np.broadcast_to(np.asarray(at_time_s, dtype=float), (n,)), time[:, 0], time[:, -1])
    k = np.clip(np.sum(time <= at[:, None], axis=1) - 1, 0, time.shape[1] - 2)
    t0, t1, f0, f1 = time[rows, k], time[rows, k + 1], thrust[rows, k], thrust[rows, k + 1]
    width = t1 - t0
    f_at = np.where(width > 0.0, f0 + (f1 - f0) * (at - t0) / np.where(width > 0.0, width, 1.0), f0)
    delivered = cumulative[rows, k] + 0.5 * (f0 + f_at) * (at - t0)
    total = cumulative[:, -1]
    return np.clip(np.where(total > 0.0, delivered / np.where(total > 0.0, total, 1.0), 0.0), 0.0, 1.0)


def stability_for_pack(airframe: Airframe, pack: MotorPack, motor_length_m: np.ndarray, *,
                       rail_exit_time_s: np.ndarray | float | None = None, mach: np.ndarray | float = 0.0,
                       added_mass_kg: np.ndarray | float = 0.0, added_mass_position_m: float | None = None,
                       airframe_mass_kg: np.ndarray | float | None = None) -> Stability:
    """Stability of each motor of a packed batch, rail exit included when its time is given.

    Parameters
    ----------
    airframe : Airframe
        With a ``geometry``.
    pack : MotorPack
        Uses ``time_s``, ``thrust_n`` (shape (n_motors, n_samples_max)), ``total_mass_kg``,
        ``propellant_mass_kg`` and ``has_mass`` (shape (n_motors,)).
    motor_length_m : ndarray
        Shape (n_motors,) [m]; NaN where unknown (that motor's results are NaN).
    rail_exit_time_s : float or ndarray, optional
        Each flight's rail exit time from ignition [s] (NaN where it never left): the propellant
        burnt by then sets the rail-exit CG.
    mach, added_mass_kg, added_mass_position_m
        As in :func:`stability_margins`.
    airframe_mass_kg : float or ndarray, optional
        As in :func:`stability_for`.

    Returns
    -------
    Stability
    """
    has_mass = np.asarray(pack.has_mass, dtype=bool)
    total = np.where(has_mass, pack.total_mass_kg, np.nan)
    prop = np.where(has_mass, pack.propellant_mass_kg, np.nan)
    burnt = None
    if rail_exit_time_s is not None:
        exit_s = np.broadcast_to(np.asarray(rail_exit_time_s, dtype=float), has_mass.shape)
        burnt = burnt_fraction(pack.time_s, pack.thrust_n, np.nan_to_num(exit_s, nan=0.0))
        burnt = np.where(np.isfinite(exit_s), burnt, np.nan)  # never left the rail: no rail-exit point
    return stability_for(airframe, total, prop, np.asarray(motor_length_m, dtype=float), mach=mach,
                         rail_exit_burnt_fraction=burnt, added_mass_kg=added_mass_kg,
                         added_mass_position_m=added_mass_position_m, airframe_mass_kg=airframe_mass_kg)


def stability_for_records(airframe: Airframe, records: list[MotorRecord], *,
                          rail_exit_time_s: np.ndarray | float | None = None, mach: np.ndarray | float = 0.0,
                          added_mass_kg: np.ndarray | float = 0.0, added_mass_position_m: float | None = None
                          ) -> Stability:
    """:func:`stability_for_pack` for motor records (lengths from the records; NaN where absent)."""
    from .integrate import MotorPack  # the packing lives with the integrator

    lengths = np.array([np.nan if r.length_m is None else r.length_m for r in records], dtype=float)
    return stability_for_pack(airframe, MotorPack.from_records(records), lengths, rail_exit_time_s=rail_exit_time_s,
                              mach=mach, added_mass_kg=added_mass_kg, added_mass_position_m=added_mass_position_m)


def flight_stability(airframe: Airframe, records: list[MotorRecord], results: FlightResults, *,
                     added_mass_kg: np.ndarray | float = 0.0, added_mass_position_m: float | None = None
                     ) -> Stability | None:
    """Stability of flown flights: margins at liftoff, at rail exit (the flight's own) and at burnout.

    Parameters
    ----------
    airframe : Airframe
        Without a ``geometry`` there is no stability to tell: None is returned.
    records : list of MotorRecord
        The motors flown, shape (n_motors,), in the order of ``results``.
    results : FlightResults
        Their flights; ``rail_exit_time_s`` (from ignition, NaN where the rocket never left)
        sets how much propellant has burnt at rail exit.
    added_mass_kg : float or ndarray
        Ballast or nose weight flown with [kg], taken to sit at ``added_mass_position_m``
        (default :func:`default_nose_weight_position_m`).
    added_mass_position_m : float, optional
        Its position from the nose tip [m].

    Returns
    -------
    Stability or None
        With the subsonic CP (Mach 0, the cautious choice; see the module docstring).
    """
    if airframe.geometry is None:
        return None
    return stability_for_records(airframe, records, rail_exit_time_s=np.asarray(results.rail_exit_time_s, dtype=float),
                                 added_mass_kg=added_mass_kg, added_mass_position_m=added_mass_position_m)


def nose_weight_kg(stability: Stability, required_margin_cal: float = MIN_STABILITY_CAL, *,
                   position_m: float | None = None) -> np.ndarray:
    """Nose weight [kg] that brings every evaluated point of each flight to ``required_margin_cal``.

    Parameters
    ----------
    stability : Stability
        Liftoff, burnout and (when evaluated) rail-exit CG and masses of each motor.
    required_margin_cal : float
        Margin to restore [calibers].
    position_m : float, optional
        Where the weight goes, from the nose tip [m]; default ``stability.added_mass_position_m``
        (so the result adds to the weight already counted there).

    Returns
    -------
    ndarray
        Shape (n_motors,): 0 where the margin already suffices, ``inf`` where no weight at
        ``position_m`` can do it (the required CG lies at or ahead of it), NaN where the
        stability is unknown.

    Notes
    -----
    With x* = x_CP − m·d: w = M·(x_G − x*)/(x* − x_w) at each point (module docstring); the
    largest over liftoff, rail exit and burnout. Closed form; vectorised over motors.

    >>> from motorlib.flight.geometry import Body, Fins, Nose
    >>> g = Geometry(0.45, Nose("ogive", 0.15), Body(0.6), Fins(3, 0.1, 0.05, 0.05, 0.05, 0.003))
    >>> s = stability_margins(g, 0.04, 0.2, [0.05, 0.4], [0.02, 0.2], [0.1, 0.2])
    >>> w = nose_weight_kg(s, 1.0)
    >>> float(w[0]), bool(w[1] > 0)
    (0.0, True)
    >>> s2 = stability_margins(g, 0.04, 0.2, [0.05, 0.4], [0.02, 0.2], [0.1, 0.2], added_mass_kg=w)
    >>> round(float(s2.min_margin_cal[1]), 9)
    1.0
    """
    x_w = stability.added_mass_position_m if position_m is None else float(position_m)
    target = stability.cp_m - required_margin_cal * stability.diameter_m
    need = np.full(stability.cp_m.shape, np.nan)
    for cg, mass in ((stability.cg_liftoff_m, stability.mass_liftoff_kg),
                     (stability.cg_rail_exit_m, stability.mass_rail_exit_kg),
                     (stability.cg_burnout_m, stability.mass_burnout_kg)):
        reachable = target > x_w
        w = mass * (cg - target) / np.where(reachable, target - x_w, 1.0)
        w = np.where(cg <= target, 0.0, np.where(reachable, w, np.inf))
        w = np.where(np.isfinite(cg), w, np.nan)
        need = np.fmax(need, w)  # NaN (an unevaluated point) never wins
    return need


def stability_warnings(margin_cal: float | None, *, min_margin_cal: float = MIN_STABILITY_CAL,
                       overstable_cal: float = OVERSTABLE_CAL) -> list[tuple[str, str]]:
    """(code, message) warnings for one flight's smallest margin over the powered flight.

    >>> stability_warnings(0.4)[0][0]
    'stability-low'
    >>> stability_warnings(1.8)
    []
    """
    if margin_cal is None or not np.isfinite(margin_cal):
        return [("stability-unknown", "the stability margin is unknown: the motor record lacks its masses or length")]
    if margin_cal < 0.0:
        return [("unstable", f"stability margin {margin_cal:.2f} cal: the CG lies behind the CP, the rocket is "
                             "unstable; add nose weight or larger fins")]
    if margin_cal < min_margin_cal:
        return [("stability-low", f"stability margin {margin_cal:.2f} cal is below {min_margin_cal:g} cal; add nose "
                                  "weight or larger fins")]
    if margin_cal > overstable_cal:
        return [("over-stable", f"stability margin {margin_cal:.2f} cal is above {overstable_cal:g} cal: the rocket "
                                "will turn strongly into the wind")]
    return []
