"""The flight card: one simulated flight told phase by phase, each phase with a few figures and a verdict mark.

Phases, in flight order: **pad and rail** (mass, thrust-to-weight, rail exit speed, stability margin when the
airframe has a shape), **boost** (burnout, top speed, Mach, acceleration, dynamic pressure), **coast** (apogee,
its time and place, the delay against the optimal one), **each recovery event** (ejection or deployment, its
height and speed), **landing** (descent rate, ground speed, distance and bearing from the pad). The descent rate is marked as the
rule book judges it: against its limit under a device that opened (``descent-fast``); a ballistic fall (nothing
opens) is marked with the finding that says why (a recovery finding). A rocket with no recovery device at all has
its recovery phase marked as failing, with ``no-recovery`` under it and no figure ticked (its charge opens nothing).

The headline is the simulation's message ("flight completed") only when no launch rule is broken; a flight that
breaks one (a warning code in :data:`~motorlib.flight.rules.RULE_CODES`, what makes ``fly`` exit with status 1)
is headlined as breaking N launch rules, named, and not to be flown as is, and its card is marked as failing.

A rocket that tops out while its motor still burns (a weak motor on a heavy airframe, a long burn) has no coast:
its apogee phase says "Apogee before burnout (no coast)", and burnout is an event of its own, told where it
happens in time (after apogee, between the recovery events), or, when the rocket lands first, a caution in the
landing phase ("still burning at touchdown").

Two speeds at recovery, labelled apart: a device's opening is its **air speed** (the rocket's speed relative to
the wind, what loads the device and what its kind's limit judges); a charge that opens no listed device shows
its **ground speed** (the speed over the ground when the delay fires). At the same instant they differ by about
the wind near apogee, where the rocket drifts with it.

A verdict is a mark that reads without colour (:data:`~.palette.VERDICT_MARKS`): ``ok`` (within the rule of
thumb), ``caution`` (a rule of thumb is broken: the warning is shown in the phase), ``fail`` (the flight
failed, or the rocket is unstable) and ``info`` (no rule applies). Figures come from the ``fly --json`` summary
(:meth:`motorlib.flight.FlightResults.summary`), optional ``stability``, ``deployments`` and ``landing``
entries (the 3-D flight and stability keys) included; a phase whose data are absent is left out.

Plain data only (no rich, no HTML): :func:`.tables.flight_card_table` and :mod:`.report` render it.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Final, Sequence

from ..flight.delays import no_optimal_delay
from ..units import FOOT_M, OUNCE_KG, POUND_KG, STANDARD_GRAVITY_M_S2

__all__ = ["CardFigure", "FlightCard", "Phase", "delay_pair", "flight_card", "liftoff_masses", "no_optimal_delay",
           "opened_device_positions", "quantity"]

_ORDER: Final = {"info": 0, "ok": 1, "caution": 2, "fail": 3}

# kind -> (metric unit, factor, decimals), (imperial unit, factor, decimals); factor = SI value of one unit
_UNITS: Final = {
    "length": (("m", 1.0, 0), ("ft", FOOT_M, 0)),
    "speed": (("m/s", 1.0, 1), ("ft/s", FOOT_M, 1)),
    "acceleration": (("m/s²", 1.0, 1), ("ft/s²", FOOT_M, 0)),
    "mass": (("g", 1e-3, 0), ("oz", OUNCE_KG, 1)),
    "big_mass": (("kg", 1.0, 2), ("lb", POUND_KG, 2)),
    "pressure": (("kPa", 1e3, 1), ("psi", 6894.757293168, 2)),  # psi: lbf per square inch
    "time": (("s", 1.0, 2), ("s", 1.0, 2)),
}

# Which phase a warning code belongs to; codes not listed go to the card's general warnings.
_PHASE_OF_WARNING: Final = {
    "rail-exit-slow": "pad", "thrust-to-weight-low": "pad",
    "unstable": "pad", "stability-low": "pad", "over-stable": "pad", "stability-unknown": "pad",
    "over-ceiling": "coast", "ejection-far-from-apogee": "coast", "delays-unknown": "coast",
    "no-ejection-charge": "recovery", "lands-before-ejection": "recovery",
    "ejection-fast": "recovery", "no-deployment": "recovery", "ejection-low": "recovery", "deployment-low": "recovery",
    "deployment-fast": "recovery", "descent-fast": "landing", "deployment-while-burning": "recovery",
    "lands-outside-field": "landing", "constant-cd-past-mach": "boost", "no-recovery": "recovery",
    "live-charge-before-apogee": "coast",
}
_FAILING_WARNINGS: Final = {"unstable", "no-liftoff", "stuck-on-rail", "not-flown", "flight-incomplete", "no-recovery"}


def quantity(value: Any, kind: str, units: str = "si") -> str:
    """An SI value shown in the ``si`` or ``imperial`` system, with its unit; "-" for None.

    >>> quantity(497.87, "length"), quantity(0.3773, "mass", "imperial"), quantity(2.0, "mass")
    ('498 m', '13.3 oz', '2.00 kg')
    """
    if value is None:
        return "-"
    number = float(value)
    if kind == "mass" and abs(number) >= (1.0 if units != "imperial" else POUND_KG):
        kind = "big_mass"
    unit, factor, decimals = _UNITS[kind][1 if units == "imperial" else 0]
    text = f"{number / factor:,.{decimals}f}"
    if text.startswith("-") and not text.strip("-0.,"):
        text = text[1:]
    return f"{text} {unit}"


@dataclass(frozen=True)
class CardFigure:
    """One figure of a phase: a name, its value as shown, and its verdict against a rule of thumb."""

    label: str
    value: str
    verdict: str = "info"
    rule: str = ""  # the rule it was checked against, e.g. ">= 15 m/s"


@dataclass(frozen=True)
class Phase:
    """One phase of the flight: ``key`` (pad, boost, coast, burnout, recovery, landing), a title, figures and
    warnings; ``time_s`` is when an event phase happens [s from ignition] (None: not known, or not an event)."""

    key: str
    title: str
    figures: tuple[CardFigure, ...]
    warnings: tuple[tuple[str, str], ...] = ()
    time_s: float | None = None

    @property
    def verdict(self) -> str:
        marks = [f.verdict for f in self.figures]
        marks += ["fail" if code in _FAILING_WARNINGS else "caution" for code, _ in self.warnings]
        return max(marks, key=_ORDER.__getitem__, default="info")


@dataclass(frozen=True)
class FlightCard:
    """The whole card: a title, the result line (the simulation's message), the phases in flight order, warnings of
    no one phase and the launch rules the flight breaks (:func:`~motorlib.flight.rules.broken_rule_codes`)."""

    title: str
    result: str
    completed: bool
    phases: tuple[Phase, ...]
    general_warnings: tuple[tuple[str, str], ...] = ()
    broken_rules: tuple[str, ...] = ()

    @property
    def verdict(self) -> str:
        marks = [p.verdict for p in self.phases] + ["caution" for _ in self.general_warnings]
        if not self.completed or self.broken_rules:
            marks.append("fail")
        return max(marks, key=_ORDER.__getitem__, default="info")

    @property
    def headline(self) -> str:
        """The result line, unless a completed flight breaks launch rules: then it says so, and not to fly it as is.

        >>> FlightCard("t", "flight completed", True, (), broken_rules=("no-recovery",)).headline
        'flight as predicted breaks 1 launch rule (no-recovery): do not fly it as is; see the warnings'
        """
        if not self.completed or not self.broken_rules:
            return self.result
        n = len(self.broken_rules)
        return (f"flight as predicted breaks {n} launch rule{'s' if n != 1 else ''} ({', '.join(self.broken_rules)}): "
                "do not fly it as is; see the warnings")


def _check(value: Any, limit: float, above: bool) -> str:
    if value is None:
        return "info"
    return "ok" if (float(value) >= limit if above else float(value) <= limit) else "caution"


def _bearing(east: float, north: float) -> float:
    """Compass bearing [deg, 0-360) of a point east/north of the pad."""
    import math

    return math.degrees(math.atan2(east, north)) % 360.0


def _seconds(value: Any) -> str:
    return quantity(value, "time")


def flight_card(summary: dict[str, Any], warnings: Sequence[tuple[str, str]], *, title: str, units: str = "si",
                rules: Any = None, wind_speed_m_s: float = 0.0,
                warning_devices: Sequence[int | None] | None = None, empty_mass_kg: float | None = None,
                ballast_kg: float = 0.0, charge_deploys: bool = True) -> FlightCard:
    """The flight card of one flight summary.

    Parameters
    ----------
    summary : dict
        ``fly --json`` figures (SI); optional keys ``stability`` (``margin_rail_exit_cal``,
        ``min_margin_cal``, ...), ``deployments`` (list of events with ``time_s``, ``altitude_m``,
        ``speed_m_s`` and a ``name`` or ``event``) and ``landing`` (``speed_m_s``, ``distance_m``,
        ``bearing_deg``, ...) are used when present.
    warnings : sequence of (code, message)
        From :func:`motorlib.flight.rulebook.evaluate_rules` (and stability warnings); each lands in its phase.
    title : str
    units : str
        ``si`` or ``imperial``.
    rules : LaunchRules, optional
        The thresholds the figures are marked against (defaults: :class:`~motorlib.flight.rules.LaunchRules`).
    wind_speed_m_s : float
        Wind at 10 m [m/s], for the rail-exit-to-wind rule.
    warning_devices : sequence of int or None, optional
        For each warning, the device it is about: its index among the devices that opened (the order of the
        summary's ``deployments``; :func:`opened_device_positions`), None for the whole flight; a device's
        warnings are shown under that device's event, the others under the first recovery event.
    empty_mass_kg, ballast_kg : float
        The airframe's empty mass and the ballast flown [kg]: with ballast, the pad phase gives both and the mass
        without the motor, so that the rocket can be weighed against the card (the liftoff mass includes both).
    charge_deploys : bool
        The motor's charge opens the recovery (or is all there is), so its delay is judged against the optimal
        one (``ejection-far-from-apogee``); False where electronics open it and the charge is a backup, judged
        only when it fires before apogee (``live-charge-before-apogee``).
    """
    from ..flight.rules import LaunchRules, broken_rule_codes

    r = rules or LaunchRules()
    broken = tuple(broken_rule_codes(code for code, _ in warnings))
    s = summary
    by_phase: dict[str, list[tuple[str, str]]] = {}
    general: list[tuple[str, str]] = []
    by_device: dict[int, list[tuple[str, str]]] = {}
    devices = list(warning_devices) if warning_devices is not None else [None] * len(warnings)
    for (code, message), device in zip(warnings, devices):
        phase = _PHASE_OF_WARNING.get(code)
        if phase == "recovery" and device is not None:
            by_device.setdefault(int(device), []).append((code, message))
            continue
        (by_phase.setdefault(phase, []) if phase else general).append((code, message))
    completed = s.get("status") == "ok"
    if not completed or s.get("apogee_m") is None:
        return FlightCard(title, str(s.get("message", "flight failed")), False, (), tuple(general), broken)
    u = units
    burnout_s, apogee_s = _number(s.get("burnout_time_s")), _number(s.get("time_to_apogee_s"))
    powered_apogee = burnout_s is not None and apogee_s is not None and apogee_s < burnout_s
    phases = [_pad(s, r, u, wind_speed_m_s, by_phase.get("pad", []), _mass_figures(s, u, empty_mass_kg, ballast_kg)),
              _boost(s, u, by_phase.get("boost", []), burnout_figure=not powered_apogee),
              _coast(s, r, u, by_phase.get("coast", []), powered=powered_apogee, charge_deploys=charge_deploys)]
    later = _recovery(s, r, u, by_phase.get("recovery", []), by_device)
    landing = _landing(s, r, u, by_phase.get("landing", []))
    if landing is not None:
        later.append(landing)
    elif by_phase.get("landing"):
        general += by_phase["landing"]
    if powered_apogee:
        later = _with_burnout(later, float(burnout_s), float(burnout_s) - float(apogee_s), u)  # type: ignore[arg-type]
    return FlightCard(title, str(s["message"]), True, tuple(phases + later), tuple(general), broken)


def _number(value: Any) -> float | None:
    return None if value is None else float(value)


def _with_burnout(later: list[Phase], burnout_s: float, after_apogee_s: float, u: str) -> list[Phase]:
    """The phases after apogee with burnout told where it happens: its own phase before the first event that
    comes after it, or, when the rocket lands first, a caution in the landing phase."""
    landing = next((k for k, p in enumerate(later) if p.key == "landing"), None)
    if landing is not None and later[landing].time_s is not None and later[landing].time_s < burnout_s:
        phase = later[landing]
        figure = CardFigure("motor", f"still burning at touchdown (burnout due at {_seconds(burnout_s)}, "
                                     f"{burnout_s - float(phase.time_s):.1f} s later)", "caution")  # type: ignore[arg-type]
        later[landing] = replace(phase, figures=phase.figures + (figure,))
        return later
    event = Phase("burnout", f"Burnout, {after_apogee_s:.1f} s after apogee",
                  (CardFigure("time", _seconds(burnout_s)),), time_s=burnout_s)
    # an event of unknown time (a charge that fires after landing) counts as later: charges fire after burnout
    at = next((k for k, p in enumerate(later) if p.time_s is None or p.time_s > burnout_s), len(later))
    return later[:at] + [event] + later[at:]


def liftoff_masses(liftoff_mass_kg: Any, empty_mass_kg: float | None, ballast_kg: float, units: str = "si"
                   ) -> list[tuple[str, str]]:
    """(label, value) of the masses a rocket is weighed against: with ballast, the empty mass, the ballast and the
    mass without the motor, then the liftoff mass with the motor (what the flight lifts); the card and the
    report's Rocket section show them alike.

    >>> liftoff_masses(1.677, 0.31, 1.3)
    [('empty mass', '310 g'), ('ballast', '1.30 kg'), ('without motor', '1.61 kg'), ('liftoff mass', '1.68 kg with motor')]
    """
    out = []
    if ballast_kg and empty_mass_kg is not None:
        out += [("empty mass", quantity(empty_mass_kg, "mass", units)), ("ballast", quantity(ballast_kg, "mass", units)),
                ("without motor", quantity(empty_mass_kg + ballast_kg, "mass", units))]
    out.append(("liftoff mass", quantity(liftoff_mass_kg, "mass", units) + ("" if liftoff_mass_kg is None
                                                                             else " with motor")))
    return out


def _mass_figures(s: dict[str, Any], u: str, empty_mass_kg: float | None, ballast_kg: float) -> list[CardFigure]:
    """The pad's masses: the liftoff mass, and with ballast what it is made of (:func:`liftoff_masses`)."""
    if not ballast_kg:
        return [CardFigure("liftoff mass", quantity(s.get("liftoff_mass_kg"), "mass", u))]  # (as it always read)
    return [CardFigure(label, value) for label, value in liftoff_masses(s.get("liftoff_mass_kg"), empty_mass_kg,
                                                                        ballast_kg, u)]


def _pad(s: dict[str, Any], r: Any, u: str, wind: float, warnings: list[tuple[str, str]],
         masses: list[CardFigure] | None = None) -> Phase:
    exit_speed = s.get("rail_exit_speed_m_s")
    need = r.rail_exit_needed_m_s(wind)
    figures = (masses or [CardFigure("liftoff mass", quantity(s.get("liftoff_mass_kg"), "mass", u))]) + [
        CardFigure("thrust-to-weight", "-" if s.get("liftoff_thrust_to_weight") is None
                   else f"{float(s['liftoff_thrust_to_weight']):.1f} at liftoff",
                   _check(s.get("liftoff_thrust_to_weight"), r.min_liftoff_thrust_to_weight, True),
                   f">= {r.min_liftoff_thrust_to_weight:g}"),
        CardFigure("rail exit", f"{quantity(exit_speed, 'speed', u)} at {_seconds(s.get('rail_exit_time_s'))}",
                   _check(exit_speed, need, True), f">= {quantity(need, 'speed', u)}"),
    ]
    stability = s.get("stability")
    if stability:
        figures.append(_stability_figure(stability, s.get("min_stability_cal")))
    return Phase("pad", "Pad and rail", tuple(figures), tuple(warnings))


def _stability_figure(stability: dict[str, Any], required_cal: Any) -> CardFigure:
    """The margin off the rail (else the least), marked against the required margin and the over-stable limit."""
    from ..flight.stability import MIN_STABILITY_CAL, OVERSTABLE_CAL

    need = MIN_STABILITY_CAL if required_cal is None else float(required_cal)
    margin = stability.get("margin_rail_exit_cal")
    if margin is None:
        margin = stability.get("min_margin_cal")
    low = stability.get("min_margin_cal")
    verdict = "info" if low is None else ("fail" if low < 0 else "caution" if low < need or low > OVERSTABLE_CAL else "ok")
    return CardFigure("stability", "unknown" if margin is None else
                      f"{margin:.2f} cal" + ("" if low is None else f" (least {low:.2f})"),
                      verdict, f"{need:g} to {OVERSTABLE_CAL:g} cal")


def _drag_figure(drag: dict[str, Any]) -> CardFigure:
    """Where the drag came from, with the shape's estimate beside a given Cd."""
    mach = f"Mach {float(drag['mach']):g}"
    if drag.get("drag_source") == "estimated":
        return CardFigure("drag", f"estimated from the shape, Cd {float(drag['cd_flown']):.2f} at {mach} "
                                  "(an estimate: expect 10-20 % either way; calibrate it with flown apogees)")
    text = f"given, Cd {float(drag['cd_flown']):.2f} at {mach}"
    if drag.get("cd_estimated") is not None:
        text += f" (shape estimate {float(drag['cd_estimated']):.2f})"
    return CardFigure("drag", text)


def _boost(s: dict[str, Any], u: str, warnings: list[tuple[str, str]], *, burnout_figure: bool = True) -> Phase:
    """The powered flight; burnout is left to its own phase when it comes after apogee (``burnout_figure``)."""
    accel = s.get("max_acceleration_m_s2")
    mach = s.get("max_mach")
    figures: tuple[CardFigure, ...] = (CardFigure("burnout", _seconds(s.get("burnout_time_s"))),) if burnout_figure else ()
    figures += (
        CardFigure("top speed", quantity(s.get("max_speed_m_s"), "speed", u)
                   + ("" if mach is None else f" (Mach {float(mach):.2f})")),
        CardFigure("peak acceleration", quantity(accel, "acceleration", u)
                   + ("" if accel is None else f" ({float(accel) / STANDARD_GRAVITY_M_S2:.1f} g)")),
        CardFigure("dynamic pressure", quantity(s.get("max_dynamic_pressure_pa"), "pressure", u)),
    )
    if s.get("drag"):
        figures += (_drag_figure(s["drag"]),)
    return Phase("boost", "Boost", figures, tuple(warnings))


def _coast(s: dict[str, Any], r: Any, u: str, warnings: list[tuple[str, str]], *, powered: bool = False,
           charge_deploys: bool = True) -> Phase:
    """Apogee and the delay; ``powered``: the apogee comes before burnout, so there is no coast to claim."""
    downrange = s.get("apogee_downrange_m")  # along the wind: words, not signs ("246 m upwind")
    where = "-" if downrange is None else (
        f"{quantity(abs(float(downrange)), 'length', u)} {'downwind' if float(downrange) >= 0 else 'upwind'} of the pad")
    east, north = s.get("apogee_east_m"), s.get("apogee_north_m")
    if east is not None and north is not None and float(east) ** 2 + float(north) ** 2 > 0.25:
        where += f", toward {_bearing(float(east), float(north)):03.0f}°"
    figures = [
        CardFigure("apogee", f"{quantity(s.get('apogee_m'), 'length', u)} at {_seconds(s.get('time_to_apogee_s'))}"),
        CardFigure("apogee position", where),
        _optimal_delay(s.get("optimal_delay_s"), charge_deploys),
    ]
    chosen, optimal = s.get("chosen_delay_s"), s.get("optimal_delay_s")
    if chosen is not None and optimal is not None:
        off = float(chosen) - float(optimal)
        text = f"{float(chosen):g} s ({abs(off):.1f} s {'early' if off < 0 else 'late'})"
        if charge_deploys:  # ejection-far-from-apogee
            figures.append(CardFigure("chosen delay", text, "ok" if abs(off) <= r.max_delay_error_s else "caution",
                                      f"within {r.max_delay_error_s:g} s"))
        else:  # electronics open the recovery: the charge is a backup, judged only before apogee (a note)
            early = off < -r.max_delay_error_s  # live-charge-before-apogee
            figures.append(CardFigure("chosen delay", text[:-1] + "; a backup: electronics open the recovery)",
                                      "caution" if early else "info",
                                      f"not over {r.max_delay_error_s:g} s early" if early else ""))
    title = "Apogee before burnout (no coast)" if powered else "Coast to apogee"
    return Phase("coast", title, tuple(figures), tuple(warnings), time_s=_number(s.get("time_to_apogee_s")))


def _optimal_delay(optimal_s: Any, charge_deploys: bool = True) -> CardFigure:
    """The delay that fires at apogee, marked where there is none (:func:`no_optimal_delay`) and the charge is
    what opens the recovery (with electronics it is only the backup's)."""
    none = no_optimal_delay(optimal_s)
    return (CardFigure("optimal delay", none, "caution" if charge_deploys else "info") if none
            else CardFigure("optimal delay", _seconds(optimal_s)))


def delay_pair(chosen_s: float, optimal_s: float, drilled: str = "") -> str:
    """A ranking's delay cell, chosen/optimal [s]: an optimal delay below 0 (apogee before burnout) reads "none",
    as the reason says it (:func:`no_optimal_delay`); ``drilled`` marks a drilled delay.

    >>> delay_pair(4.0, -1.2), delay_pair(6.0, 6.54, "d")
    ('4/none', '6d/6.5')
    """
    optimal = "none" if no_optimal_delay(optimal_s) else f"{float(optimal_s):.1f}"
    return f"{float(chosen_s):g}{drilled}/{optimal}"


def opened_device_positions(device_indices: Sequence[int | None], opened: Sequence[bool]) -> list[int | None]:
    """Each device index (the airframe's order; None: not about a device) as its position among the devices that
    opened (``opened[k]``), the order of a summary's ``deployments`` and so of the card's recovery events.

    >>> opened_device_positions([None, 2, 0], [True, False, True])
    [None, 1, 0]
    """
    return [None if k is None else int(sum(bool(o) for o in opened[:k])) for k in device_indices]


def _recovery(s: dict[str, Any], r: Any, u: str, warnings: list[tuple[str, str]],
              by_device: dict[int, list[tuple[str, str]]] | None = None) -> list[Phase]:
    """One phase per recovery event: the 3-D model's ``deployments`` list, else today's ejection and deployment;
    ``by_device`` holds the warnings about the k-th device that opened, shown under its own event."""
    by_device = dict(by_device or {})
    events: list[tuple[str, list[CardFigure], float | None]] = []  # (name, figures, time from ignition [s])
    if s.get("deployments"):
        for event in s["deployments"]:
            name = str(event.get("name") or event.get("event") or event.get("device") or "deployment")
            speed = event.get("speed_m_s")
            limit = r.deployment_limit_m_s(str(event.get("device") or "parachute"))  # each kind has its own
            figures = [CardFigure("time", _seconds(event.get("time_s"))),
                       _height_figure(event.get("altitude_m"), speed, r, u),
                       # through the air (relative to the wind): what loads the device, and what its limit judges
                       CardFigure("air speed", quantity(speed, "speed", u), _check(speed, limit, False),
                                  f"<= {quantity(limit, 'speed', u)}")]
            if event.get("opening_load_n") is not None:  # ½ρv²·CdA: no inflation model, so an upper bound
                figures.append(CardFigure("opening load", f"up to {float(event['opening_load_n']):,.0f} N"))
            events.append((name, figures, _number(event.get("time_s"))))
    else:
        chosen = s.get("chosen_delay_s")
        deploy_time = s.get("deploy_time_s")
        folded = False  # the deployment is the chosen ejection (deploy = "ejection"): one event, not two
        for ej in s.get("ejections") or []:
            if ej["delay_s"] != chosen:
                continue
            speed = ej.get("speed_m_s")
            if ej.get("altitude_m") is None:
                events.append((f"ejection ({ej['delay_s']:g} s delay)", [CardFigure("fires", "after landing", "caution")],
                               None))
                continue
            fired_s = None if s.get("burnout_time_s") is None else float(s["burnout_time_s"]) + float(ej["delay_s"])
            folded = deploy_time is not None and fired_s is not None and abs(float(deploy_time) - fired_s) < 1e-6
            events.append((f"ejection, {ej['delay_s']:g} s delay" + (" opens the device" if folded else ""), [
                CardFigure("time", _seconds(fired_s)),
                # judged as ejection-low where the charge opens no listed device (the rule book's case)
                _height_figure(ej.get("altitude_m"), speed, r, u) if not s.get("has_recovery")
                else CardFigure("height", quantity(ej.get("altitude_m"), "length", u)),
                # the charge's figure is over the ground (no device is listed to meet the air)
                CardFigure("ground speed", quantity(speed, "speed", u), _check(speed, r.max_ejection_speed_m_s, False),
                           f"<= {quantity(r.max_ejection_speed_m_s, 'speed', u)}")], fired_s))
        if deploy_time is not None and not folded:
            events.append(("device opens", [CardFigure("time", _seconds(s.get("deploy_time_s"))),
                                            CardFigure("height", quantity(s.get("deploy_altitude_m"), "length", u))],
                           _number(deploy_time)))
    if not s.get("deployments"):  # no device events to put a device's warnings under
        warnings = warnings + [w for k in sorted(by_device) for w in by_device[k]]
        by_device = {}
    elif any(k >= len(events) for k in by_device):  # (not expected: a device's finding is about its opening)
        warnings = warnings + [w for k in sorted(by_device) if k >= len(events) for w in by_device[k]]
    if not events and not warnings:
        return []
    if not events:
        return [Phase("recovery", "Recovery", (), tuple(warnings))]
    phases = []
    no_device = s.get("has_recovery") is False and not s.get("deployments")
    for k, (name, figures, time_s) in enumerate(events):
        own = (list(warnings) if k == 0 else []) + by_device.get(k, [])
        if no_device:  # a charge that opens nothing recovers nothing: no figure of it earns a tick
            figures = [replace(f, verdict="info") if f.verdict == "ok" else f for f in figures]
            name += " (no recovery device)"
        phases.append(Phase("recovery", f"Recovery: {name}", tuple(figures), tuple(own), time_s=time_s))
    return phases


def _height_figure(altitude_m: Any, speed_m_s: Any, r: Any, u: str) -> CardFigure:
    """An opening's height, marked against the height it needs to open and slow the rocket at its speed
    (:meth:`~motorlib.flight.rules.LaunchRules.deployment_height_needed_m`: ``deployment-low``, ``ejection-low``)."""
    if altitude_m is None or speed_m_s is None:
        return CardFigure("height", quantity(altitude_m, "length", u))
    need = r.deployment_height_needed_m(float(speed_m_s))
    return CardFigure("height", quantity(altitude_m, "length", u), _check(altitude_m, need, True),
                      f">= {quantity(need, 'length', u)}")


def _nothing_opened(s: dict[str, Any]) -> bool:
    """No recovery device opened on this flight (none listed, or none that opens): the fall is ballistic. A summary
    that says nothing about its devices counts as opened."""
    if "deployments" in s and (s["deployments"] or "has_recovery" in s):
        return not any(event.get("time_s") is not None for event in s["deployments"] or [])
    if "deploy_time_s" in s:
        return s["deploy_time_s"] is None
    return False


def _descent_rate_figure(s: dict[str, Any], rate: Any, r: Any, u: str) -> CardFigure:
    """The descent rate, marked as the rule book judges it: ``descent-fast`` judges the rate under an opened device;
    a ballistic fall (nothing opens) is marked with the finding that says why (``no-recovery`` in the recovery phase,
    ``no-deployment``, ``lands-before-ejection``, ``no-ejection-charge``, ``delays-unknown``), never with a mark of its own."""
    limit = f"<= {quantity(r.max_landing_speed_m_s, 'speed', u)}"
    if rate is not None and _nothing_opened(s):
        why = "no recovery device" if s.get("has_recovery") is False else "no recovery device opens"
        return CardFigure("descent rate", f"{quantity(rate, 'speed', u)} (ballistic: {why})", "caution", limit)
    return CardFigure("descent rate", quantity(rate, "speed", u), _check(rate, r.max_landing_speed_m_s, False), limit)


def _landing(s: dict[str, Any], r: Any, u: str, warnings: list[tuple[str, str]]) -> Phase | None:
    landing = s.get("landing")
    figures: list[CardFigure] = []
    if isinstance(landing, dict):
        speed = landing.get("speed_m_s")
        rate = s.get("landing_descent_rate_m_s")
        rate = speed if rate is None else rate
        # the rule is on the descent rate (as match checks it); the speed over the ground adds the wind's drift
        figures.append(_descent_rate_figure(s, rate, r, u))
        figures.append(CardFigure("touchdown speed", quantity(speed, "speed", u) + " (with the wind's drift)"))
        if landing.get("time_s") is not None:
            figures.append(CardFigure("lands at", _seconds(landing.get("time_s"))))
        if landing.get("distance_m") is not None:
            bearing = landing.get("bearing_deg")
            figures.append(CardFigure("lands", quantity(landing["distance_m"], "length", u) + " from the pad"
                                      + ("" if bearing is None else f" toward {float(bearing):03.0f}°")))
    elif s.get("landing_speed_m_s") is not None:
        rate = s.get("landing_descent_rate_m_s")
        figures += [
            _descent_rate_figure(s, rate, r, u),
            CardFigure("descent time", _seconds(s.get("descent_time_s"))),
            CardFigure("from the pad", f"{quantity(s.get('drift_m'), 'length', u)} downwind"),
        ]
    if not figures:
        return None
    return Phase("landing", "Landing", tuple(figures), tuple(warnings),
                 time_s=_number(landing.get("time_s")) if isinstance(landing, dict) else None)
