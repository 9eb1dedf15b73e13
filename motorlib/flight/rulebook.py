"""One evaluation of the launch rules for many flights at once: ``fly`` (one flight) and ``match`` (every motor).

A flight's figures reach the rules as a :class:`RuleInputs` record (arrays of shape
``(n_flights,)``); :func:`broken_rules` compares every figure with its threshold in
:class:`~motorlib.flight.rules.LaunchRules` for all flights at once, and
:func:`evaluate_rules` turns each broken rule into a
:class:`~motorlib.motor.checks.Finding` (severity ``warning``; ``note`` for the codes in
:data:`~motorlib.flight.rules.NOTE_CODES`) with an SI message. The codes are listed in
:mod:`motorlib.flight.rules`.

Vectorisation contract: k flights evaluated together give the findings of k evaluations of one
flight each (``inputs.take(i)``). :func:`code_masks` gives the same codes as one boolean array per code, for
the commands that count them over many sampled flights (``scatter`` and ``match --robust``). A figure that is NaN (not known, or the event never happened)
breaks no threshold rule: comparisons with NaN are false; the rules that are about a missing
event (``no-ejection-charge``, ``lands-before-ejection``, ``no-deployment``) say so.

numpy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields
from typing import TYPE_CHECKING, Callable, Final

import numpy as np

from ..motor.checks import Finding
from .delays import no_optimal_delay
from .results import MESSAGES, NO_LIFTOFF, OK, STUCK_ON_RAIL
from .rules import NOTE_CODES, LaunchRules

if TYPE_CHECKING:
    from .airframe import Airframe
    from .results import FlightResults

__all__ = ["FLIGHT_CODES", "RuleInputs", "broken_rules", "code_masks", "device_rule_entries", "evaluate_rules",
           "flown_rule_inputs", "rule_entries"]

# Failed flight status -> its code; any other failed status is "not-flown".
_STATUS_CODES = {NO_LIFTOFF: "no-liftoff", STUCK_ON_RAIL: "stuck-on-rail"}

FLIGHT_CODES: Final = (
    "no-liftoff", "stuck-on-rail", "not-flown", "flight-incomplete", "rail-exit-slow", "thrust-to-weight-low",
    "over-ceiling", "delays-unknown", "no-ejection-charge", "ejection-far-from-apogee", "ejection-fast",
    "ejection-low", "lands-before-ejection", "descent-fast", "constant-cd-past-mach", "deployment-fast",
    "deployment-low", "deployment-while-burning", "lands-outside-field", "no-deployment", "no-recovery",
    "live-charge-before-apogee")
"""Every code :func:`evaluate_rules` can give a flight, in the order it lists them (the keys of :func:`code_masks`)."""


# RuleInputs fields that describe the airframe, the same for every flight (not arrays of shape (n_flights,))
_PER_BOOK: Final = frozenset({"device_kinds", "device_triggers", "recovery_sequence", "recovery_none"})


@dataclass(frozen=True, eq=False)
class RuleInputs:
    """What the rules read of each flight; arrays have shape (n_flights,) unless stated; SI; NaN: not known.

    Attributes
    ----------
    status : ndarray of int
        Flight status (:data:`~motorlib.flight.results.OK` or a failure code).
    rail_exit_speed_m_s, wind_speed_m_s : ndarray
        Speed at rail exit, and the surface wind (at 10 m) it is compared with [m/s].
    liftoff_thrust_to_weight, apogee_m, max_mach, burnout_time_s, optimal_delay_s : ndarray
        As in :class:`~motorlib.flight.results.FlightResults` (apogee above the pad [m], times from ignition [s]).
    chosen_delay_s, ejection_speed_m_s : ndarray
        The delay the charge fires at [s] (NaN: none, the motor is plugged or its delays are unknown) and the
        air-relative speed then [m/s] (NaN: the rocket lands first).
    uses_charge, devices_listed, delays_known, constant_drag : ndarray of bool
        The motor's charge deploys recovery (or is all there is); the airframe lists recovery devices; the
        motor record states its delays; the airframe flies one drag coefficient at every Mach number.
    landing_descent_rate_m_s, landing_distance_m : ndarray
        Descent rate under the device(s) at landing [m/s]; landing distance from the pad [m].
    deployment_time_s, deployment_speed_m_s, opening_load_n : ndarray, shape (n_flights, n_devices)
        Each device's opening: time from ignition [s], air-relative speed [m/s], load estimate [N]
        (NaN: it never opens, or unknown).
    device_kinds : tuple of str, length n_devices
        Each device's kind (``parachute``, ``drogue``, ...), which sets its deployment-speed limit.
    device_triggers : tuple of str, length n_devices (or empty: not known)
        What opens each device (``ejection``, ``apogee``, ``altitude``, ``after``), for the advice of a device that
        opens too low.
    recovery_sequence : bool
        The devices are ``[[recovery]]`` entries (their height key is ``altitude``), not one ``[recovery]`` table
        (``deploy_altitude``).
    recovery_none : bool
        The airframe has a ``[recovery]`` table that says ``device = "none"``, so the advice of ``no-recovery`` is to
        change it, not to add one.
    shortest_delay_s, longest_delay_s : ndarray
        The shortest and longest delay the motor offers, drilled ones included [s] (NaN: none, or not known), so
        that the advice never asks for a delay the motor does not come with.
    delay_adjustable : ndarray of bool
        The motor's delay can be drilled shorter (its offered delays include the drilled ones).
    ejection_altitude_m : ndarray
        Height above the pad when the chosen delay fires [m] (NaN: not known, or the rocket lands first).
    deployment_altitude_m : ndarray, shape (n_flights, n_devices)
        Each device's opening height above the pad [m] (NaN: it never opens, or not known).
    """

    status: np.ndarray
    rail_exit_speed_m_s: np.ndarray
    wind_speed_m_s: np.ndarray
    liftoff_thrust_to_weight: np.ndarray
    apogee_m: np.ndarray
    max_mach: np.ndarray
    burnout_time_s: np.ndarray
    optimal_delay_s: np.ndarray
    chosen_delay_s: np.ndarray
    ejection_speed_m_s: np.ndarray
    uses_charge: np.ndarray
    devices_listed: np.ndarray
    delays_known: np.ndarray
    constant_drag: np.ndarray
    landing_descent_rate_m_s: np.ndarray
    landing_distance_m: np.ndarray
    deployment_time_s: np.ndarray
    deployment_speed_m_s: np.ndarray
    opening_load_n: np.ndarray
    device_kinds: tuple[str, ...] = ()
    ejection_altitude_m: np.ndarray | float = math.nan
    deployment_altitude_m: np.ndarray | tuple = ()
    device_triggers: tuple[str, ...] = ()
    recovery_sequence: bool = False
    recovery_none: bool = False
    shortest_delay_s: np.ndarray | float = math.nan
    longest_delay_s: np.ndarray | float = math.nan
    delay_adjustable: np.ndarray | bool = False

    def __post_init__(self) -> None:
        n = np.size(self.status)
        kinds = {"status": np.int64, "uses_charge": bool, "devices_listed": bool, "delays_known": bool,
                 "constant_drag": bool, "delay_adjustable": bool}
        for f in fields(self):
            if f.name in _PER_BOOK:
                continue
            values = np.array(getattr(self, f.name), dtype=kinds.get(f.name, float))  # our own copy, frozen below
            if f.name.startswith(("deployment_", "opening_")):
                values = values.reshape(n, -1) if values.size else np.full((n, len(self.device_kinds)), np.nan)
                if values.shape[1] < len(self.device_kinds):  # columns for devices that never open
                    values = np.hstack([values, np.full((n, len(self.device_kinds) - values.shape[1]), np.nan)])
            else:
                values = np.broadcast_to(values, (n,)).copy()
            values.flags.writeable = False
            object.__setattr__(self, f.name, values)
        object.__setattr__(self, "device_kinds", tuple(str(k) for k in self.device_kinds))
        object.__setattr__(self, "device_triggers", tuple(str(k) for k in self.device_triggers))
        object.__setattr__(self, "recovery_sequence", bool(self.recovery_sequence))
        object.__setattr__(self, "recovery_none", bool(self.recovery_none))

    @property
    def n_flights(self) -> int:
        return int(self.status.size)

    def take(self, index: np.ndarray | list[int] | int) -> RuleInputs:
        """The flights at ``index`` (an int gives one flight), in that order."""
        rows = np.atleast_1d(np.asarray(index, dtype=np.int64))
        return RuleInputs(**{f.name: getattr(self, f.name) if f.name in _PER_BOOK else getattr(self, f.name)[rows]
                             for f in fields(self)})


def flown_rule_inputs(frame: Airframe, results: FlightResults, *, chosen_delay_s: np.ndarray | None = None,
                      ejection_speed_m_s: np.ndarray | None = None, landing_descent_rate_m_s: np.ndarray | None = None,
                      landing_distance_m: np.ndarray | None = None, deployment_speed_m_s: np.ndarray | None = None,
                      delays_known: np.ndarray | bool = True, wind_speed_m_s: np.ndarray | None = None,
                      ejection_altitude_m: np.ndarray | None = None, offered_delays_s: np.ndarray | None = None,
                      delay_adjustable: np.ndarray | bool = False) -> RuleInputs:
    """The rule inputs of ``frame`` flown as ``results``: the flown figures unless an estimate is given.

    Parameters
    ----------
    frame : Airframe
    results : FlightResults
    chosen_delay_s : ndarray, optional
        The delay each charge fires at [s]; default :meth:`FlightResults.chosen_delay_s` (the delay deployed,
        else the listed one closest to the optimal delay).
    ejection_speed_m_s : ndarray, optional
        Speed at the chosen delay [m/s]; default the flown one at that delay.
    ejection_altitude_m : ndarray, optional
        Height above the pad at the chosen delay [m]; default the flown one at that delay.
    landing_descent_rate_m_s, landing_distance_m, deployment_speed_m_s : ndarray, optional
        Estimates where the descent was not flown (``match`` without a field radius); default the flown ones:
        the descent rate at landing, the distance of the landing point, each device's opening speed.
    delays_known : bool or ndarray of bool
        Whether each motor record states its delays.
    wind_speed_m_s : ndarray, optional
        Each flight's surface wind [m/s at 10 m] where the flights were flown in different winds (sampled
        flights); default the frame's :attr:`~motorlib.flight.airframe.Launch.surface_wind_m_s` for every flight.
    offered_delays_s : ndarray, shape (n_flights, n_delays), optional
        Every delay each motor offers [s], NaN-padded (:func:`~motorlib.flight.delays.offered_delays_s`); default
        the delays flown (``results.ejection_delay_s``), which are the offered ones unless one delay was asked for.
    delay_adjustable : bool or ndarray of bool
        Whether each motor's delay can be drilled shorter.
    """
    n = results.n_flights
    devices = frame.recovery_devices
    if chosen_delay_s is None:
        chosen_delay_s = np.array([results.chosen_delay_s(i) for i in range(n)])
    hit = results.ejection_delay_s == np.asarray(chosen_delay_s, dtype=float)[:, None]
    column = np.argmax(hit, axis=1)
    if ejection_speed_m_s is None:
        ejection_speed_m_s = np.where(hit.any(axis=1), results.ejection_speed_m_s[np.arange(n), column], np.nan)
    if ejection_altitude_m is None:
        ejection_altitude_m = np.where(hit.any(axis=1), results.ejection_altitude_m[np.arange(n), column], np.nan)
    if landing_distance_m is None:
        landing_distance_m = np.hypot(results.landing_east_m, results.landing_north_m)
    offered = np.atleast_2d(np.asarray(results.ejection_delay_s if offered_delays_s is None else offered_delays_s,
                                       dtype=float)).reshape(n, -1)
    some = np.isfinite(offered).any(axis=1)
    filled = np.where(np.isfinite(offered), offered, np.nan)
    shortest = np.full(n, np.nan)
    longest = np.full(n, np.nan)
    if some.any():
        shortest[some] = np.nanmin(filled[some], axis=1)
        longest[some] = np.nanmax(filled[some], axis=1)
    k = len(devices)
    return RuleInputs(
        status=results.status, rail_exit_speed_m_s=results.rail_exit_speed_m_s,
        wind_speed_m_s=np.full(n, frame.launch.surface_wind_m_s) if wind_speed_m_s is None else wind_speed_m_s,
        liftoff_thrust_to_weight=results.liftoff_thrust_to_weight, apogee_m=results.apogee_m, max_mach=results.max_mach,
        burnout_time_s=results.burnout_time_s, optimal_delay_s=results.optimal_delay_s, chosen_delay_s=chosen_delay_s,
        ejection_speed_m_s=ejection_speed_m_s,
        uses_charge=np.full(n, frame.recovery is None or frame.recovery.deploy == "ejection"),
        devices_listed=np.full(n, bool(devices)), delays_known=delays_known,
        constant_drag=np.full(n, not frame.drag_table),
        landing_descent_rate_m_s=(results.landing_descent_rate_m_s if landing_descent_rate_m_s is None
                                  else landing_descent_rate_m_s),
        landing_distance_m=landing_distance_m,
        deployment_time_s=results.deployment_time_s[:, :k],
        deployment_speed_m_s=(results.deployment_speed_m_s[:, :k] if deployment_speed_m_s is None
                              else np.asarray(deployment_speed_m_s, dtype=float)[:, :k]),
        opening_load_n=results.opening_load_n[:, :k], device_kinds=tuple(d.device for d in devices),
        device_triggers=tuple(d.deploy for d in devices), recovery_sequence=bool(frame.recovery_sequence),
        recovery_none=not frame.recovery_sequence and frame.recovery is not None and frame.recovery.device == "none",
        shortest_delay_s=shortest, longest_delay_s=longest, delay_adjustable=delay_adjustable,
        ejection_altitude_m=ejection_altitude_m, deployment_altitude_m=results.deployment_altitude_m[:, :k])


def broken_rules(inputs: RuleInputs, rules: LaunchRules | None = None, *, ceiling_m: float | None = None
                 ) -> dict[str, np.ndarray]:
    """Which flights break which rule: code -> bool array of shape (n_flights,), or (n_flights, n_devices) for
    ``deployment-fast``, ``deployment-low`` and ``deployment-while-burning``; every rule evaluated for all flights
    at once.

    A flight that failed (status) or ended before apogee breaks only that: its other figures are not judged.
    ``ceiling_m`` [m above the pad] adds the ceiling rule.
    """
    r = rules or LaunchRules()
    x = inputs
    failed = x.status != OK
    incomplete = ~failed & ~(np.isfinite(x.rail_exit_speed_m_s) & np.isfinite(x.apogee_m))
    judged = ~failed & ~incomplete

    def past(values: np.ndarray, limit: float) -> np.ndarray:  # above the limit; NaN is not
        return judged & (values > limit)

    needed = np.maximum(r.min_rail_exit_speed_m_s, r.rail_exit_wind_ratio * np.where(x.wind_speed_m_s > 0.0,
                                                                                      x.wind_speed_m_s, 0.0))
    charge = judged & x.uses_charge
    has_delay = np.isfinite(x.chosen_delay_s)
    no_delay = charge & ~has_delay
    lands_first = charge & has_delay & ~np.isfinite(x.ejection_speed_m_s)
    limits = np.array([r.deployment_limit_m_s(kind) for kind in x.device_kinds])
    opened = np.isfinite(x.deployment_time_s).any(axis=1) if x.device_kinds else np.zeros(x.n_flights, bool)
    t_open = r.deployment_opening_time_s  # LaunchRules.deployment_height_needed_m, for every flight at once
    out = {
        "not-flown": failed,
        "flight-incomplete": incomplete,
        "rail-exit-slow": judged & (x.rail_exit_speed_m_s < needed),
        "thrust-to-weight-low": judged & (x.liftoff_thrust_to_weight < r.min_liftoff_thrust_to_weight),
        "over-ceiling": past(x.apogee_m, math.inf if ceiling_m is None else ceiling_m),
        "delays-unknown": no_delay & ~x.delays_known,
        "no-ejection-charge": no_delay & x.delays_known,
        "ejection-far-from-apogee": charge & (np.abs(x.chosen_delay_s - x.optimal_delay_s) > r.max_delay_error_s),
        # a device the charge opens is checked as deployment-fast; a charge that opens nothing listed is checked here
        "ejection-fast": charge & ~x.devices_listed & (x.ejection_speed_m_s > r.max_ejection_speed_m_s),
        # too near the ground to open and slow the rocket: the height covered at its speed while it opens
        "ejection-low": charge & ~x.devices_listed & (x.ejection_altitude_m < x.ejection_speed_m_s * t_open),
        "lands-before-ejection": lands_first,
        # under a device: a rocket that opens none falls ballistically, and the rules above say why
        "descent-fast": past(x.landing_descent_rate_m_s, r.max_landing_speed_m_s) & opened,
        "constant-cd-past-mach": judged & x.constant_drag & (x.max_mach > r.max_constant_cd_mach),
        "deployment-fast": judged[:, None] & (x.deployment_speed_m_s > limits),
        "deployment-low": judged[:, None] & (x.deployment_altitude_m < x.deployment_speed_m_s * t_open),
        "deployment-while-burning": judged[:, None] & (x.deployment_time_s < x.burnout_time_s[:, None]),
        "lands-outside-field": past(x.landing_distance_m, math.inf if r.field_radius_m is None else r.field_radius_m),
        # nothing opens, and no rule above says why
        "no-deployment": judged & x.devices_listed & ~opened & ~no_delay & ~lands_first,
        # every rocket needs a recovery system that brings all its parts down safely (_NO_RECOVERY); a charge that
        # opens nothing listed is also judged above (ejection-fast, ejection-low), but no device means a ballistic fall
        "no-recovery": judged & ~x.devices_listed,
        # electronics deploy (the flight leaves the charge out), but a charge left in would open the rocket at
        # speed before apogee; after apogee, or within the delay tolerance, it is a backup
        "live-charge-before-apogee": judged & ~x.uses_charge & (x.chosen_delay_s < x.optimal_delay_s
                                                                 - r.max_delay_error_s),
    }
    return out


def code_masks(inputs: RuleInputs, rules: LaunchRules | None = None, *, ceiling_m: float | None = None
               ) -> dict[str, np.ndarray]:
    """The flights that get each code: code -> bool array of shape (n_flights,), keys :data:`FLIGHT_CODES`.

    Flight i gets a code here exactly when :func:`evaluate_rules` lists a finding with that code for it: a failed
    status gets its own code (``no-liftoff``, ``stuck-on-rail``, else ``not-flown``) and a device rule counts
    when any device breaks it. Notes (:data:`~motorlib.flight.rules.NOTE_CODES`) are included; a caller
    counting failures leaves them out.

    >>> import numpy as np
    >>> x = RuleInputs(status=[0, 1], rail_exit_speed_m_s=[14.0, np.nan], wind_speed_m_s=0.0,
    ...                liftoff_thrust_to_weight=8.0, apogee_m=300.0, max_mach=0.3, burnout_time_s=1.5,
    ...                optimal_delay_s=6.0, chosen_delay_s=6.0, ejection_speed_m_s=3.0, uses_charge=True,
    ...                devices_listed=False, delays_known=True, constant_drag=True, landing_descent_rate_m_s=np.nan,
    ...                landing_distance_m=np.nan, deployment_time_s=[], deployment_speed_m_s=[], opening_load_n=[])
    >>> {code: mask.tolist() for code, mask in code_masks(x).items() if mask.any()}
    {'no-liftoff': [False, True], 'rail-exit-slow': [True, False], 'no-recovery': [True, False]}
    """
    broken = broken_rules(inputs, rules, ceiling_m=ceiling_m)
    failed = broken.pop("not-flown")
    for status, code in _STATUS_CODES.items():
        broken[code] = failed & (inputs.status == status)
    broken["not-flown"] = failed & ~np.isin(inputs.status, list(_STATUS_CODES))
    return {code: broken[code].any(axis=1) if broken[code].ndim == 2 else broken[code] for code in FLIGHT_CODES}


def evaluate_rules(inputs: RuleInputs, rules: LaunchRules | None = None, *, ceiling_m: float | None = None
                   ) -> list[list[Finding]]:
    """Every rule each flight breaks, as findings (code and SI message) in the order of the rule book.

    Parameters
    ----------
    inputs : RuleInputs
        The figures of ``n_flights`` flights.
    rules : LaunchRules, optional
        The thresholds (default :class:`LaunchRules`).
    ceiling_m : float, optional
        The field's altitude limit [m above the pad]; None: no ceiling rule.

    Returns
    -------
    list of list of Finding
        One list per flight, empty for a flight that breaks no rule; severity ``warning``, or ``note`` for a code
        about the model (:data:`~motorlib.flight.rules.NOTE_CODES`).

    Examples
    --------
    >>> import numpy as np
    >>> nan = np.nan
    >>> x = RuleInputs(status=[0, 0], rail_exit_speed_m_s=[15.0, 14.9], wind_speed_m_s=0.0,
    ...                liftoff_thrust_to_weight=8.0, apogee_m=300.0, max_mach=0.3, burnout_time_s=1.5,
    ...                optimal_delay_s=6.0, chosen_delay_s=6.0, ejection_speed_m_s=3.0, uses_charge=True,
    ...                devices_listed=False, delays_known=True, constant_drag=True, landing_descent_rate_m_s=nan,
    ...                landing_distance_m=nan, deployment_time_s=[], deployment_speed_m_s=[], opening_load_n=[])
    >>> [[f.code for f in flight] for flight in evaluate_rules(x)]
    [['no-recovery'], ['rail-exit-slow', 'no-recovery']]
    """
    return [[Finding(*entry) for entry in flight] for flight in rule_entries(inputs, rules, ceiling_m=ceiling_m)]


def rule_entries(inputs: RuleInputs, rules: LaunchRules | None = None, *, ceiling_m: float | None = None
                 ) -> list[list[tuple[str, str, str]]]:
    """:func:`evaluate_rules` as (severity, code, message) triples, without a :class:`Finding` record per broken
    rule: for the ranking, which reads them once for thousands of flights."""
    return [[entry[:3] for entry in flight] for flight in device_rule_entries(inputs, rules, ceiling_m=ceiling_m)]


def device_rule_entries(inputs: RuleInputs, rules: LaunchRules | None = None, *, ceiling_m: float | None = None
                        ) -> list[list[tuple[str, str, str, int | None]]]:
    """:func:`rule_entries` with the device each finding is about: (severity, code, message, device), ``device``
    the index of the device in the airframe's order (``deployment-fast``, ``deployment-low``,
    ``deployment-while-burning``), None for a finding about the whole flight; so that a flight card puts each
    device's findings under that device."""
    r = rules or LaunchRules()
    broken = broken_rules(inputs, r, ceiling_m=ceiling_m)
    n = inputs.n_flights
    out: list[list[tuple[str, str, str, int | None]]] = [[] for _ in range(n)]
    for code, mask in broken.items():
        flights, columns = np.nonzero(mask.reshape(n, -1))
        severity = "note" if code in NOTE_CODES else "warning"
        message = _MESSAGES[code]
        for i, column in zip(flights.tolist(), columns.tolist()):
            code_i = _STATUS_CODES.get(int(inputs.status[i]), code) if code == "not-flown" else code
            out[i].append((severity, code_i, message(inputs, i, column, r, ceiling_m),
                           int(column) if mask.ndim == 2 else None))
    return out


def _rail(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    wind = float(x.wind_speed_m_s[i])
    need = r.rail_exit_needed_m_s(wind)
    why = "" if need == r.min_rail_exit_speed_m_s else f" ({r.rail_exit_wind_ratio:g} x the {wind:g} m/s wind)"
    return (f"rail exit too slow: {x.rail_exit_speed_m_s[i]:.1f} m/s, below {need:g} m/s{why}: the rocket may not fly "
            "straight; use a longer rail or a stronger motor")


def _delay(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    chosen, optimal = float(x.chosen_delay_s[i]), float(x.optimal_delay_s[i])
    # below 0 no motor has it: say so as the flight card does (no_optimal_delay), not "optimal delay -0.1 s"
    shown = no_optimal_delay(optimal) or f"{optimal:.1f} s"
    return (f"the {chosen:g} s delay fires {abs(chosen - optimal):.1f} s {'before' if chosen < optimal else 'after'} "
            f"apogee (optimal delay {shown}; limit {r.max_delay_error_s:g} s)")


def _past(value: float, limit: float, decimals: int) -> str:
    """``value`` with the fewest decimals from ``decimals`` (up to 3 more) that show it above ``limit``."""
    for extra in range(4):
        if round(float(value), decimals + extra) > limit:
            return f"{float(value):.{decimals + extra}f}"
    return f"{float(value):.{decimals + 3}f}"


def _deployment_fast(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    # the speed never reads as its limit ("25 m/s (limit 25 m/s)"); present.messages re-words it in display units
    kind, load = x.device_kinds[k], x.opening_load_n[i, k]
    speed = _past(x.deployment_speed_m_s[i, k], r.deployment_limit_m_s(kind), 0)
    return (f"the {kind} opens too fast: {speed} m/s (limit {r.deployment_limit_m_s(kind):g} "
            f"m/s for a {kind}" + ("" if not np.isfinite(load) else f"; opening load up to {float(load):,.0f} N")
            + "): risk of a torn canopy, a zipper or a broken harness")


def _what_to_do(x: RuleInputs, i: int, k: int | None = None) -> str:
    """What brings an opening higher: for the charge (``k`` None, or a device it opens) a delay nearer the optimal
    one; for device ``k`` opened by electronics, what its own trigger offers, named by the key the airframe file
    uses (``altitude`` in a ``[[recovery]]`` entry, ``deploy_altitude`` in the ``[recovery]`` table)."""
    trigger = x.device_triggers[k] if k is not None and k < len(x.device_triggers) else None
    if trigger not in (None, "ejection"):
        table = "its [[recovery]] entry" if x.recovery_sequence else "the [recovery] table"
        if trigger == "altitude":
            # the height it opens at is the one asked for: a stronger motor changes only how fast it falls there
            key = "altitude" if x.recovery_sequence else "deploy_altitude"
            return f"deploy it higher (a higher {key} in {table})"
        if trigger == "apogee":
            return ("open it sooner after apogee (a shorter delay in its [[recovery]] entry) or fly a stronger motor"
                    if x.recovery_sequence else "fly a stronger motor (it opens at apogee, which is too low)")
        return f"open it sooner (a shorter delay in {table}) or fly a stronger motor"
    chosen, optimal = float(x.chosen_delay_s[i]), float(x.optimal_delay_s[i])
    if bool(x.uses_charge[i]) and math.isfinite(chosen) and math.isfinite(optimal) and optimal >= 0.0:
        shorter = chosen > optimal
        # the offered delay nearest the optimal one on that side: when it is the one flown, no offered delay
        # gets nearer, and asking for one would ask for a delay the motor does not come with
        end = float(x.shortest_delay_s[i] if shorter else x.longest_delay_s[i])
        if math.isfinite(end) and (chosen <= end + 1e-9 if shorter else chosen >= end - 1e-9):
            listed = "no delay, even drilled," if bool(x.delay_adjustable[i]) else "no listed delay"
            if shorter:  # a stronger motor coasts longer, which lengthens the optimal delay
                return (f"{listed} is short enough: the shortest is {end:g} s and the optimal one is {optimal:.1f} s; "
                        "fly a stronger motor or one with a shorter delay")
            return (f"{listed} is long enough: the longest is {end:g} s and the optimal one is {optimal:.1f} s; "
                    "fly a motor with a longer delay")
        delay = (f"a shorter delay (the optimal one is {optimal:.1f} s)" if shorter
                 else f"a longer delay (the optimal one is {optimal:.1f} s)")
        return f"choose {delay} or a stronger motor"
    if bool(x.uses_charge[i]):
        return "choose a stronger motor (apogee comes before burnout: no delay fires at apogee)"
    return "deploy it higher (an earlier trigger or a higher deploy_altitude) or fly a stronger motor"


def _low(height_m: float, speed_m_s: float, r: LaunchRules) -> str:
    """"3 m above the ground at 19.4 m/s: it needs about 19 m ..." (present.messages re-words it in display units);
    the height never reads as the height needed ("19 m ..., it needs about 19 m")."""
    height, needed = max(float(height_m), 0.0), r.deployment_height_needed_m(speed_m_s)
    decimals = next((d for d in range(4) if round(height, d) < round(needed, d)), 3)
    return (f"{height:.{decimals}f} m above the ground at {float(speed_m_s):.1f} m/s: it needs about "
            f"{needed:.{decimals}f} m to open and slow the rocket ({r.deployment_opening_time_s:g} s at that speed)")


def _descent_fix(x: RuleInputs, i: int, r: LaunchRules) -> str:
    """What slows a fast landing: a larger device, unless a device opened too low to slow the rocket to its descent
    rate before the ground (deployment-low), where opening it higher is the fix and a larger one may not help."""
    # plain floats: a ranking words this for thousands of flights, a device or two each (the rows are (n, n_devices))
    heights, speeds = x.deployment_altitude_m[i].tolist(), x.deployment_speed_m_s[i].tolist()
    if any(h < r.deployment_height_needed_m(v) for h, v in zip(heights, speeds)):  # deployment-low's test
        return "the device opened too low to slow to its descent rate before landing: open it higher (see its own finding)"
    return "use a larger recovery device"


def _deployment_low(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    kind = x.device_kinds[k]
    return (f"the {kind} opens too low: {_low(x.deployment_altitude_m[i, k], x.deployment_speed_m_s[i, k], r)}; "
            + _what_to_do(x, i, k))


def _ejection_low(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    return (f"the {float(x.chosen_delay_s[i]):g} s delay fires too low: {_low(x.ejection_altitude_m[i], x.ejection_speed_m_s[i], r)}; "
            + _what_to_do(x, i))


# The model and high-power rocket safety codes each require a recovery system that returns every part of the
# rocket safely (their "Recovery System" rules; from memory: not in tests/reference/check_values.md).
_NO_RECOVERY: Final = ("no recovery device: every rocket needs a recovery system that brings all its parts down "
                       "safely (the model and high-power rocket safety codes require one); ")


def _no_recovery(x: RuleInputs, i: int, k: int, r: LaunchRules, ceiling_m: float | None) -> str:
    """What to do: change the ``[recovery]`` table that says ``device = "none"``, or add one where there is none."""
    if x.recovery_none:
        return _NO_RECOVERY + "set a device kind other than none in [recovery] (or add [[recovery]] entries)"
    return _NO_RECOVERY + "add a [recovery] table to the airframe file"

_Message = Callable[[RuleInputs, int, int, LaunchRules, "float | None"], str]
_MESSAGES: dict[str, _Message] = {
    "not-flown": lambda x, i, k, r, c: MESSAGES[int(x.status[i])],
    "flight-incomplete": lambda x, i, k, r, c: "the flight ends before a rail exit or an apogee",
    "rail-exit-slow": _rail,
    "thrust-to-weight-low": lambda x, i, k, r, c: (f"thrust-to-weight too low: {x.liftoff_thrust_to_weight[i]:.1f}, "
                                                   f"below {r.min_liftoff_thrust_to_weight:g}"),
    "over-ceiling": lambda x, i, k, r, c: f"over the ceiling: apogee {x.apogee_m[i]:.0f} m above {c:.0f} m",
    "delays-unknown": lambda x, i, k, r, c: ("the motor's ejection delays are not given (add them to its record) and "
                                             "the airframe file has no electronics deployment"),
    "no-ejection-charge": lambda x, i, k, r, c: ("no ejection charge (plugged or booster) and no electronics deployment "
                                                 "in the airframe file: nothing deploys recovery"),
    "ejection-far-from-apogee": _delay,
    "ejection-fast": lambda x, i, k, r, c: (f"ejection too fast: {x.ejection_speed_m_s[i]:.0f} m/s at the "
                                            f"{x.chosen_delay_s[i]:g} s delay (limit {r.max_ejection_speed_m_s:g} m/s): "
                                            "risk of damage or a torn canopy"),
    "ejection-low": _ejection_low,
    "lands-before-ejection": lambda x, i, k, r, c: f"lands before the {x.chosen_delay_s[i]:g} s delay fires",
    "descent-fast": lambda x, i, k, r, c: (f"descent too fast: {x.landing_descent_rate_m_s[i]:.1f} m/s under the device "
                                           f"(limit {r.max_landing_speed_m_s:g} m/s): " + _descent_fix(x, i, r)),
    "constant-cd-past-mach": lambda x, i, k, r, c: (f"the rocket reaches Mach {x.max_mach[i]:.2f} with a constant drag "
                                                    "coefficient, which ignores the transonic drag rise and overstates "
                                                    "apogee and the optimal delay; give a drag_table, or a [geometry] without "
                                                    "a drag_coefficient (the shape's estimate then applies)"),
    "deployment-fast": _deployment_fast,
    "deployment-low": _deployment_low,
    "deployment-while-burning": lambda x, i, k, r, c: (f"the {x.device_kinds[k]} opens at {x.deployment_time_s[i, k]:.2f} s, "
                                                       f"while the motor still burns (burnout {x.burnout_time_s[i]:.2f} s)"),
    "lands-outside-field": lambda x, i, k, r, c: (f"lands outside the field: about {x.landing_distance_m[i]:,.0f} m from "
                                                  f"the pad (field radius {r.field_radius_m:,.0f} m)"),
    "no-deployment": lambda x, i, k, r, c: ("nothing deploys recovery on this flight (the device never opens): it would "
                                            "fall ballistically"),
    "no-recovery": _no_recovery,
    "live-charge-before-apogee": lambda x, i, k, r, c: (
        f"electronics deploy recovery, but the motor's {float(x.chosen_delay_s[i]):g} s delay would fire its charge "
        f"{float(x.optimal_delay_s[i] - x.chosen_delay_s[i]):.1f} s before apogee, at speed: remove the charge or plug "
        "the motor (this flight leaves the charge out)"),
}
