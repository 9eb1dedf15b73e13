"""What goes into each report: library results turned into the section records of :mod:`.report`.

* :func:`fly_report`: rocket, motor and where its curve came from, delay, conditions, the flight card, the
  flight chart (altitude and speed against time, phases as labelled bands, events marked on the curve), the
  side view of the path with the wind, the thrust curve, stability and recovery events when the summary has
  them, landing, warnings, assumptions; the cautions and the signature line are added by the layout.
* :func:`match_report`: the ranking with a mark and reasons per motor, the apogee chart, the conditions.
* :func:`reduce_report`: the firings table, their overlay, the mean curve with its spread, the label check.

Every figure is formatted here for people (units in the labels); the charts come from :mod:`.report_charts`.
No physics is done here.
"""

from __future__ import annotations

import datetime as _dt
import math
from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence

import numpy as np

from ..matching.candidate import Candidate
from .flightcard import FlightCard, delay_pair, flight_card, liftoff_masses, no_optimal_delay, quantity
from .report import (Facts, FlyReport, MatchReport, Notes, ReduceReport, TableBlock, Trace,
                     file_sha256)
from .display import DisplayUnits
from .messages import (assumption_texts, deployment_column, deployment_rule, match_count, motor_names, note_text,
                       reason_text, small_mass)
from .report_charts import flight_chart, match_chart, mean_chart, overlay_chart, side_chart, thrust_chart

if TYPE_CHECKING:
    from ..flight.airframe import Airframe, Recovery
    from ..matching.rank import MatchResult
    from ..motor.record import MotorRecord

__all__ = ["fly_report", "match_report", "reduce_report", "trace_for"]

_PROVENANCE_WORDS = {
    "approval-firing": "fired for approval by a testing body, as that body published it",
    "maker-published": "published by the motor's maker",
    "own-firing": "fired on a test stand by the record's author or their team",
    "demo": "invented for demonstration: never use it for a real flight",
    "other": "source not stated",
}


def trace_for(inputs: Sequence[str], command: str, made_at: str | None = None) -> Trace:
    """The trace block: motorlib's version, the command and the SHA-256 of every input file that exists."""
    from importlib import metadata

    try:  # the installed distribution's version (present/ does not import the package top)
        version = metadata.version("motorlib")
    except metadata.PackageNotFoundError:
        version = "unknown (not installed)"
    files = tuple((str(p), file_sha256(p)) for p in inputs if Path(p).is_file())
    when = made_at if made_at is not None else _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    return Trace(version, command, files, when)


# ----------------------------------------------------------------------------- fly

def _recovery_words(devices: Sequence[Recovery], u: str) -> str:
    """Each device, what opens it and its drag area, in the report's units ``u`` (``si`` or ``imperial``): "main, opened at 300 m on the way down,
    Cd·A 5.00 m²; ..." (a trigger's name alone, "opened at altitude", left out the height)."""
    du = _display(u)
    words = []
    for k, d in enumerate(devices):
        if d.deploy == "altitude" and d.deploy_altitude_m is not None:
            when = f"at {quantity(d.deploy_altitude_m, 'length', u)} on the way down"
        elif d.deploy == "apogee":
            when = f"{d.delay_s:g} s after apogee" if d.delay_s else "at apogee"
        elif d.deploy == "after":
            when = f"{d.delay_s:g} s after " + ("liftoff" if k == 0 else "the device before it")
        elif d.deploy == "ejection":
            when = "by the motor's delay charge"
        else:  # a trigger without its figure (the airframe file requires one): its name
            when = f"at {d.deploy}"
        words.append(f"{d.device}, opened {when}, Cd·A {du.precise(d.drag_area_m2, 'area')}")
    return "; ".join(words)

def fly_report(frame: Airframe, motor: MotorRecord, summary: dict[str, Any], warnings: Sequence[tuple[str, str]],
               trajectory: dict[str, np.ndarray] | None, *, inputs: Sequence[str], command: str, units: str = "si",
               made_at: str | None = None, warning_devices: Sequence[int | None] | None = None,
               ballast_kg: float = 0.0, charge_deploys: bool = True) -> FlyReport:
    """The pre-flight report of one flight (``fly --json`` summary, its warnings and trajectory); ``warning_devices``
    places each device's warnings under that device on the card (:func:`~.flightcard.flight_card`); ``ballast_kg``
    [kg], the ballast flown, is shown in the Rocket section with the masses it makes, as on the card."""
    u = units
    du = _display(u)
    launch = frame.launch
    card: FlightCard = flight_card(summary, warnings, title="", units=u, wind_speed_m_s=launch.surface_wind_m_s,
                                   warning_devices=warning_devices, empty_mass_kg=frame.mass_kg,
                                   ballast_kg=ballast_kg, charge_deploys=charge_deploys)
    # the masses the rocket is weighed against: empty, ballast, without and with the motor (a safety officer
    # weighing a ballasted rocket against "empty mass" alone would find it kilograms off)
    masses = liftoff_masses(summary.get("liftoff_mass_kg"), frame.mass_kg, ballast_kg, u)
    if not ballast_kg:
        masses.insert(0, ("empty mass", quantity(frame.mass_kg, "mass", u)))
    rocket = Facts("Rocket", (
        ("name", frame.name),
        *masses,
        ("diameter", du.given(frame.diameter_m, "size")),
        ("drag", _drag_words(frame, summary)),
        ("motor mount", "-" if frame.mount_diameter_m is None else f"{frame.mount_diameter_m * 1e3:.0f} mm"
         + ("" if frame.mount_length_m is None else f", up to {frame.mount_length_m * 1e3:.0f} mm long")),
        ("recovery", "none given" if not frame.recovery_devices else _recovery_words(frame.recovery_devices, u)),
    ))
    prov = motor.provenance
    cls = motor.impulse_class
    motor_facts = Facts("Motor", (
        ("label", f"{motor.designation} ({motor.maker or 'maker unknown'})"),
        ("class", "-" if cls is None else f"{cls.letter} ({cls.percent:.0f} % into the class)"),
        ("total impulse", f"{motor.total_impulse_ns:.1f} N·s"),
        ("masses", f"{quantity(motor.total_mass_kg, 'mass', u)} loaded, "
                   f"{quantity(motor.propellant_mass_kg, 'mass', u)} propellant"),
        ("curve from", f"{prov.kind}: {_PROVENANCE_WORDS.get(prov.kind, prov.kind)}"
         + (f", {prov.date.isoformat()}" if prov.date else "")),
    ) + ((("notes", prov.notes[:90] + ("..." if len(prov.notes) > 90 else "")),) if prov.notes else ()))
    chosen, optimal = summary.get("chosen_delay_s"), summary.get("optimal_delay_s")
    offered = (", ".join(f"{d:g}" for d in motor.delays_s) + " s" if motor.delays_s else
               "none (no ejection charge)" if motor.ejection == "no-charge" else "not given")
    delay = Facts("Delay", (
        ("offered", offered + (" (adjustable)" if motor.delay_adjustable else "")),
        ("chosen", "-" if chosen is None else f"{float(chosen):g} s"),
        ("optimal", "-" if optimal is None
         else no_optimal_delay(optimal) or f"{float(optimal):.1f} s (burnout to apogee)"),
        ("deployment", "motor's delay charge" if frame.recovery is None or frame.recovery.deploy == "ejection"
         else f"electronics ({frame.recovery.deploy})"),
    ))
    site = launch.site
    conditions = Facts("Conditions", (
        ("rail", f"{du.given(launch.rail_length_m, 'length')}, {math.degrees(launch.rail_angle_rad):g}° from "
                 "vertical, leaning " + ("downwind" if launch.rail_azimuth_rad is None else
                                        f"toward {math.degrees(launch.rail_azimuth_rad) % 360:03.0f}°")),
        ("wind", "measured profile" if launch.wind_profile is not None else
         f"{du.given(launch.wind_speed_m_s, 'speed')} at {du.quantity(10.0, 'length')} from "
         f"{math.degrees(launch.wind_direction_rad) % 360:03.0f}°, stronger aloft (power law, held above "
         f"{du.quantity(1000.0, 'length')})"),
        ("site", f"{du.given(site.elevation_m, 'length')} above sea level"),
        ("air", ("standard" if site.temperature_k is None else du.given(site.temperature_k, "temperature"))
         + ("" if site.pressure_pa is None else f", {du.given(site.pressure_pa, 'air_pressure')}") + " at the pad"),
    ))
    flight = side = None
    if trajectory is not None and summary.get("apogee_m") is not None:
        flight = flight_chart(trajectory, summary, units=du)
        side = side_chart(trajectory, summary, launch.wind_speed_m_s, units=du)
    stability = None
    st = summary.get("stability")
    if st:
        def place(value: Any) -> str:  # a position along the airframe: mm, or inches
            return "-" if value is None else du.quantity(float(value), "size", 0 if du.system == "metric" else 1)

        rows = [("centre of pressure", place(st.get("cp_m")) + " from the nose tip"),
                ("centre of gravity", f"{place(st.get('cg_liftoff_m'))} at liftoff, {place(st.get('cg_burnout_m'))} "
                                      "at burnout")]
        for label, k in (("margin at liftoff", "margin_liftoff_cal"), ("margin off the rail", "margin_rail_exit_cal"),
                         ("margin at burnout", "margin_burnout_cal"), ("least margin", "min_margin_cal")):
            if st.get(k) is not None:
                rows.append((label, f"{float(st[k]):.2f} calibers"))
        need = summary.get("min_stability_cal")
        stability = Facts("Stability", tuple(rows), "Margin in body diameters of CP behind CG; "
                          + (f"at least {float(need):g} asked for, " if need is not None else "")
                          + "1 to 3 is the usual range (common practice).")
    recovery = _recovery_table(summary, u)
    landing = _landing_facts(summary, u)
    notes = [m for _, m in warnings]
    assumptions = Notes("Assumptions", (
        ("Drag estimated from the shape, smaller base drag while the motor burns"
         if frame.drag_source == "estimated" else "Drag from the airframe's Cd")
        + "; the motor burns as its curve says; propellant mass falls with impulse delivered.",
        *_stability_assumptions(summary),
        "Standard atmosphere shifted to the pad's measured air; "
        + ("the wind as the measured profile gives it at each height." if launch.wind_profile is not None
           else "wind grows with height by a power law."),
        "Recovery device fully open the moment it deploys; no gusts, no weathercocking beyond the model's.",
        "Times count from motor ignition; altitudes are above the pad.",
    ))
    return FlyReport(
        title=f"{frame.name} with {motor.designation}", subtitle=f"Pre-flight prediction: {card.headline}",
        rocket=rocket, motor=motor_facts, delay=delay, conditions=conditions, card=card,
        thrust_chart=thrust_chart(motor), trace=trace_for(inputs, command, made_at), flight_chart=flight,
        side_chart=side, stability=stability, recovery=recovery, landing=landing,
        warnings=Notes("Warnings", tuple(notes), "warning") if notes else Notes("Warnings", ("None from the rules of thumb.",)),
        assumptions=assumptions)


def _drag_words(frame: Airframe, summary: dict[str, Any]) -> str:
    """The rocket's drag as the report states it: given or estimated, with the shape's estimate beside a given Cd."""
    drag = summary.get("drag") or {}
    if frame.drag_source == "estimated":
        return f"estimated from the shape: Cd {float(drag['cd_flown']):.2f} at Mach {float(drag['mach']):g}, " \
               f"Cd(Mach) powered and coasting" if drag else "estimated from the shape"
    text = (f"Cd table over Mach {frame.drag_machs[0]:g}-{frame.drag_machs[-1]:g}" if frame.drag_table
            else f"Cd {frame.drag_coefficient:g}")
    if drag.get("cd_estimated") is not None:
        text += f" (shape estimate {float(drag['cd_estimated']):.2f} at Mach {float(drag['mach']):g})"
    return text


def _stability_assumptions(summary: dict[str, Any]) -> tuple[str, ...]:
    """The stability model's assumptions, when the report has a stability section."""
    if not summary.get("stability"):
        return ()
    return ("Stability: Barrowman's subsonic centre of pressure (small angle of attack); the motor's case and "
            "propellant centred in the motor; ballast counted at half the nose length.",)


def _recovery_table(summary: dict[str, Any], u: str) -> TableBlock | None:
    """Each recovery event with its time, height and speed, marked against its limit: a device's opening by its
    air speed against its kind's limit, a charge that opens no listed device by its ground speed against the
    ejection limit (the speeds compared in SI, before they are rounded for display)."""
    rows: list[tuple[str, str, str, str]] = []
    speeds: list[float | None] = []  # [m/s] of each row, None where there is none to judge
    deployments = summary.get("deployments") or []
    for e in deployments:
        rows.append((str(e.get("name") or e.get("event") or e.get("device") or "deployment"),
                     quantity(e.get("time_s"), "time"), quantity(e.get("altitude_m"), "length", u),
                     quantity(e.get("speed_m_s"), "speed", u)))
        speeds.append(e.get("speed_m_s"))
    if not deployments:
        for ej in summary.get("ejections") or []:
            chosen = ej["delay_s"] == summary.get("chosen_delay_s")
            rows.append((f"ejection, {ej['delay_s']:g} s delay" + (" (chosen)" if chosen else ""),
                         "-" if ej.get("altitude_m") is None else quantity(
                             float(summary["burnout_time_s"]) + ej["delay_s"], "time"),
                         "after landing" if ej.get("altitude_m") is None else quantity(ej["altitude_m"], "length", u),
                         quantity(ej.get("speed_m_s"), "speed", u)))
            speeds.append(ej.get("speed_m_s"))
        fired = [float(summary["burnout_time_s"]) + ej["delay_s"] for ej in summary.get("ejections") or []
                 if ej["delay_s"] == summary.get("chosen_delay_s") and summary.get("burnout_time_s") is not None]
        deploy = summary.get("deploy_time_s")
        if deploy is not None and any(abs(float(deploy) - f) < 1e-6 for f in fired):
            k = next(i for i, row in enumerate(rows) if row[0].endswith("(chosen)"))
            rows[k] = (rows[k][0] + ", opens the device",) + rows[k][1:]  # ejection and deployment are one event
        elif deploy is not None:
            rows.append(("recovery device opens", quantity(summary["deploy_time_s"], "time"),
                         quantity(summary.get("deploy_altitude_m"), "length", u), "-"))
            speeds.append(None)
    if not rows:
        return None
    from ..flight.rules import LaunchRules

    rules = LaunchRules()
    kinds = [str(e.get("device") or "parachute") for e in deployments]
    limits = [rules.deployment_limit_m_s(kind) for kind in kinds] or [rules.max_ejection_speed_m_s] * len(rows)
    marks = ["info" if speed is None else ("ok" if float(speed) <= limit else "caution")
             for speed, limit in zip(speeds, limits)]
    what = ("Air speed (relative to the wind) when each device opens, against its kind's limit: "
            + ", ".join(f"{kind} {quantity(rules.deployment_limit_m_s(kind), 'speed', u)}" for kind in dict.fromkeys(kinds))
            if deployments else
            f"Ground speed when each delay fires, against the ejection limit "
            f"{quantity(rules.max_ejection_speed_m_s, 'speed', u)}")
    return TableBlock("Recovery events", ("event", "time", "height", "speed"), tuple(rows), (False, True, True, True),
                      tuple(marks), what + " (common practice).")


def _landing_facts(summary: dict[str, Any], u: str) -> Facts | None:
    landing = summary.get("landing")
    if isinstance(landing, dict):
        rows = [("descent rate", quantity(summary.get("landing_descent_rate_m_s"), "speed", u)),
                ("touchdown speed", quantity(landing.get("speed_m_s"), "speed", u) + " with the wind's drift"),
                ("lands at", quantity(landing.get("time_s"), "time")),
                ("distance from the pad", quantity(landing.get("distance_m"), "length", u))]
        if landing.get("bearing_deg") is not None:
            rows.append(("bearing from the pad", f"{float(landing['bearing_deg']):03.0f}° (0° north, 90° east)"))
        return Facts("Landing", tuple(rows))
    if summary.get("landing_speed_m_s") is None:
        return None
    return Facts("Landing", (
        ("descent rate", quantity(summary.get("landing_descent_rate_m_s"), "speed", u)),
        ("descent time", quantity(summary.get("descent_time_s"), "time")),
        ("distance from the pad", quantity(summary.get("drift_m"), "length", u) + " downwind"),
        ("bearing", "downwind (the model flies in the plane of the wind)"),
    ))


# ----------------------------------------------------------------------------- match
_VERDICT_MARK = {"pass": "ok", "pass with ballast": "ok", "off target": "caution"}
# The ranking's share of two printed pages (A4 or Letter, with the chart, conditions, cautions and trace): about
# this many lines of its widest column, the reasons, at about this many characters a line (measured in Chromium's
# print of tests/present/test_report_browser.py's large ranking). Rows past it are left out, in rank order.
_RANKING_LINES = 60
_REASON_CHARS_PER_LINE = 70


def match_report(result: MatchResult, *, inputs: Sequence[str], command: str, catalog: str, units: str = "si",
                 made_at: str | None = None, frame: Airframe | None = None) -> MatchReport:
    """The ranking report: every fitting motor with a mark and its reasons, the chart and the conditions.

    Reasons, notes and assumptions are worded in the display units (:mod:`.messages`), as ``match`` prints them;
    ``frame`` (the airframe ranked) lets the assumptions echo the airframe file's own numbers."""
    u = units
    du = _display(u)
    c = result.conditions
    fitting = [cand for cand in result.candidates if cand.fits]
    speed = deployment_column(result.candidates, result.conditions)
    rows, marks, lines = [], [], 0
    names = motor_names([(cand.designation, cand.maker) for cand in fitting], False,
                        among=[(cand.designation, cand.maker) for cand in result.candidates])
    for rank, (cand, name) in enumerate(zip(fitting, names), 1):
        delay = "-" if cand.chosen_delay_s is None else delay_pair(cand.chosen_delay_s, cand.optimal_delay_s,
                                                                    " drilled" if cand.delay_adjusted else "")
        rows.append((str(rank), name, quantity(cand.apogee_m, "length", u),
                     quantity(cand.rail_exit_speed_m_s, "speed", u),
                     "-" if cand.liftoff_thrust_to_weight is None else f"{cand.liftoff_thrust_to_weight:.1f}",
                     delay, quantity(getattr(cand, speed.field), "speed", u),
                     "; ".join([cand.verdict]
                               + [reason_text(code, text, cand, c, du)
                                  for code, text in zip(cand.reason_codes, cand.reasons)]
                               + [f"note: {note_text(code, text, cand, c, du)}"
                                  for code, text in zip(cand.note_codes, cand.notes)]
                               + _extra_mass_words(cand, c, du))))
        lines += -(-len(rows[-1][-1]) // _REASON_CHARS_PER_LINE)  # ceil: the lines its reasons wrap to
        if lines > _RANKING_LINES and len(rows) > 1:  # the two printed pages are full: the rest is in --csv/--json
            rows.pop()
            break
        marks.append(_VERDICT_MARK.get(cand.verdict, "fail"))
    shown = fitting[: len(rows)]
    left = len(fitting) - len(shown)
    ranking = TableBlock(
        f"Ranking: {match_count(result)}",
        ("#", "motor", "apogee", "rail exit", "T/W", "delay s", speed.report_name, "verdict and reasons"),
        tuple(rows), (True, False, True, True, True, True, True, False), tuple(marks),
        f"Delay: chosen / optimal, 'drilled' when an adjustable delay is shortened; optimal 'none': apogee "
        f"before burnout. "
        f"{speed.report_name.capitalize()}{speed.legend[len(speed.table_name):]}. "
        + (f"The next {left} motor(s) that fit, ranked below these, are left out to keep the report to two pages "
           "(motorlib match lists them all, with --csv or --json in full). " if left else "")
        + f"{len(result.candidates) - len(fitting)} motor(s) do not fit the mount or the class limit and are not "
          "listed.",
        nowrap=(False, True, False, False, False, False, False, False), breakable=True)
    conditions = Facts("Conditions and rules", (
        ("airframe", f"{result.airframe['name']}, {quantity(result.airframe['mass_kg'], 'mass', u)} empty"),
        ("target", "-" if not c.get("target_m") else
         f"{quantity(c['target_m'], 'length', u)} ±{c.get('target_tolerance', 0.05) * 100:g} %"),
        ("ceiling", "-" if not c.get("ceiling_m") else quantity(c["ceiling_m"], "length", u)),
        ("class limit", c.get("max_class") or "none"),
        ("rail exit", f">= {quantity(c.get('rail_exit_needed_m_s', c['min_rail_exit_speed_m_s']), 'speed', u)}"
                      + ("" if c.get("rail_exit_needed_m_s", 0.0) <= c["min_rail_exit_speed_m_s"]
                         else f" ({c.get('rail_exit_wind_ratio', 4):g} x the wind)")),
        ("thrust-to-weight", f">= {c['min_liftoff_thrust_to_weight']:g} at liftoff"),
        ("delay", f"within {c['delay_slack_s']:g} s of the optimal"),
        ("deployment speed", deployment_rule(speed, c, None if frame is None else
                                             [d.device for d in frame.recovery_devices],
                                             lambda v: quantity(v, "speed", u))),
        ("descent rate", f"<= {quantity(c['max_landing_speed_m_s'], 'speed', u)}"),
        *_stability_rule(c),
        ("catalog", catalog),
    ))
    words = assumption_texts(c, du, frame)
    assumptions = Notes("Assumptions", tuple(f"{key.capitalize()}: {text}." for key, text in words.items())
                        + ("Landing speed is the descent rate under the device at landing.",))
    return MatchReport(title=f"Motors for {result.airframe['name']}",
                       subtitle="Every motor that fits, flown with the same airframe and conditions",
                       ranking=ranking, chart=match_chart(result, units=du, candidates=shown), conditions=conditions,
                       trace=trace_for(inputs, command, made_at), assumptions=assumptions)


def _stability_rule(conditions: dict[str, Any]) -> tuple[tuple[str, str], ...]:
    """The stability rule of a ranking, or that it was not checked (no shape to check it with)."""
    need = conditions.get("min_stability_cal")
    if need is None:
        return (("stability", "not checked: the airframe file has no [geometry]"),)
    return (("stability", f">= {float(need):g} calibers over the powered flight"),)


def _extra_mass_words(cand: Candidate, conditions: dict[str, Any], shown: DisplayUnits) -> list[str]:
    """What added mass does for a candidate: the ballast solved for the target, the nose weight for stability
    (the rules it still breaks worded in the display units, as ``match`` prints them)."""
    out = []
    if cand.ballast_kg is not None:
        later = [reason_text(code, text, cand, conditions, shown, "ballast_")
                 for code, text in zip(cand.ballast_reason_codes or (), cand.ballast_reasons or ())]
        out.append(f"with {small_mass(shown, cand.ballast_kg)} of ballast: apogee "
                   f"{shown.quantity(cand.ballast_apogee_m, 'length')}, delay "
                   + ("-" if cand.ballast_chosen_delay_s is None else f"{cand.ballast_chosen_delay_s:g} s")
                   + (", every rule met" if not later else " but " + ", ".join(later)))
    if cand.nose_weight_for_stability_kg:
        later = [reason_text(code, text, cand, conditions, shown, "nose_weight_")
                 for code, text in zip(cand.nose_weight_reason_codes or (), cand.nose_weight_reasons or ())]
        out.append(f"with {small_mass(shown, cand.nose_weight_for_stability_kg)} of nose weight: stability "
                   + ("-" if cand.nose_weight_stability_margin_cal is None
                      else f"{cand.nose_weight_stability_margin_cal:.2f} cal")
                   + (", every rule met" if not later else " but " + ", ".join(later)))
    return out


def _display(units: str) -> DisplayUnits:
    """The display units of a report's ``si`` or ``imperial`` setting (the flight card's names)."""
    return DisplayUnits("imperial" if units == "imperial" else "metric")


# ----------------------------------------------------------------------------- reduce
def reduce_report(reductions: Sequence[tuple[str, Any]], record: Any, check: Any, spread: dict[str, Any] | None, *,
                  inputs: Sequence[str], command: str, made_at: str | None = None) -> ReduceReport:
    """The test-series report: the firings, their overlay, the mean and its spread, the label check."""
    rows = []
    for path, r in reductions:
        impulse = float(np.trapezoid(r.filtered_thrust_n, r.filtered_time_s))
        rows.append((Path(path).name, f"{r.sample_rate_hz:.0f}", f"{r.baseline_n:.2f}", f"{r.noise_n:.2f}",
                     f"{r.cutoff_hz:g} Hz" if r.cutoff_hz else "none", f"{r.burnout_time_s - r.ignition_time_s:.2f}",
                     f"{impulse:.1f}", f"{float(np.max(r.filtered_thrust_n)):.1f}", str(r.time_s.size),
                     f"{100 * r.impulse_error:.2f}"))
    firings = TableBlock(f"Firings ({len(reductions)})",
                         ("log", "rate Hz", "baseline N", "noise N", "low-pass", "burn s", "impulse N·s", "peak N",
                          "points", "impulse kept %"),
                         tuple(rows), (False, True, True, True, False, True, True, True, True, True),
                         note="Burn from the ignition to the burnout event; impulse of the filtered curve; "
                              "'impulse kept' is the reduced curve's error against it.")
    spread_facts = None
    if spread:
        ti, bt = spread["total_impulse_ns"], spread["event_burn_time_s"]
        spread_facts = Facts("Spread between firings", (
            ("firings", str(spread["n_firings"])),
            ("total impulse", f"{ti['mean']:.1f} ± {ti['std']:.1f} N·s ({ti['min']:.1f} to {ti['max']:.1f})"),
            ("burn time", f"{bt['mean']:.2f} ± {bt['std']:.2f} s ({bt['min']:.2f} to {bt['max']:.2f})"),
            ("impulse spread", f"{100 * ti['std'] / ti['mean']:.1f} % of the mean" if ti["mean"] else "-"),
        ), "± is one sample standard deviation.")
    m = check.metrics or {}
    label = Facts("Label check", (
        ("label", f"{record.designation} ({record.maker or 'maker not given'})"),
        ("from the curve", str(m.get("computed_designation", "-"))),
        ("class", "-" if not m.get("impulse_class") else f"{m['impulse_class']} ({m['class_percent']:.0f} % into the class)"),
        ("total impulse", f"{record.total_impulse_ns:.1f} N·s"),
        ("average thrust", f"{record.average_thrust_n():.1f} N over {record.burn_time_s():.2f} s"),
        ("result", "no errors" if check.ok else "errors: the curve contradicts its label or an invariant"),
    ))
    findings = tuple((f.severity, f.code, f.message) for f in check.findings)
    marks = tuple({"error": "fail", "warning": "caution"}.get(f.severity, "info") for f in check.findings)
    label_check = TableBlock("Findings", ("severity", "check", "finding"), findings, (), marks) if findings else None
    mean = mean_chart(reductions, record) if len(reductions) > 1 else None
    return ReduceReport(
        title=f"Test-stand series: {record.designation}", subtitle=f"{len(reductions)} log(s) reduced to one curve",
        firings=firings, overlay=overlay_chart(reductions), trace=trace_for(inputs, command, made_at),
        mean_chart=mean, spread=spread_facts, label_check=label_check, label_facts=label,
        assumptions=Notes("How the logs were reduced", (
            "Baseline tared from the readings before ignition; noise is the robust spread of that baseline.",
            "Zero-phase low-pass filter; ignition and burnout where thrust crosses the event threshold.",
            "The reduced curve keeps the points that hold the filtered impulse and peak.")))
