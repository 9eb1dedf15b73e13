"""What goes into each report: library results turned into the section records of :mod:`.report`, and its charts.

* :func:`fly_report`: rocket, motor and where its curve came from, delay, conditions, the flight card, the
  flight chart (altitude and speed against time, phases as labelled bands, events marked on the curve), the
  side view of the path with the wind, the thrust curve, stability and recovery events when the summary has
  them, landing, warnings, assumptions; the cautions and the signature line are added by the layout.
* :func:`match_report`: the ranking with a mark and reasons per motor, the apogee chart, the conditions.
* :func:`reduce_report`: the firings table, their overlay, the mean curve with its spread, the label check.

Every figure is formatted here for people (units in the labels); no physics is done, only selection,
thinning of long series for the charts and the statistics of a few curves on a common time grid.
"""

from __future__ import annotations

import datetime as _dt
import math
from pathlib import Path
from typing import Any, Sequence

import numpy as np

from .flightcard import FlightCard, flight_card, quantity
from .palette import BLUE, BLUE_TINT, EVENT_MARKS, INK, MUTED, ORANGE, ORANGE_TINT, RULE
from .report import (ChartBlock, Facts, FlyReport, MatchReport, Notes, ReduceReport, TableBlock, Trace,
                     file_sha256)
from .svgcharts import SvgChart, thin

__all__ = ["flight_chart", "fly_report", "match_chart", "match_report", "reduce_report", "side_chart",
           "thrust_chart", "trace_for"]

_PROVENANCE_WORDS = {
    "approval-firing": "fired for approval by a testing body, as that body published it",
    "maker-published": "published by the motor's maker",
    "own-firing": "fired on a test stand by the record's author or their team",
    "demo": "invented for demonstration: never use it for a real flight",
    "other": "source not stated",
}
_LINE_STYLES = [(INK, "solid"), (BLUE, "dashed"), (ORANGE, "solid"), (INK, "dotted"), (BLUE, "dashdot"),
                (ORANGE, "dashed"), (MUTED, "solid"), (BLUE, "dotted")]


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


# ----------------------------------------------------------------------------- charts
def thrust_chart(motor: Any, key: str = "thrust") -> ChartBlock:
    """The motor's thrust curve with its average thrust and burn window."""
    t, f = np.asarray(motor.time_s, dtype=float), np.asarray(motor.thrust_n, dtype=float)
    start, end = motor.burn_window_s()
    average = motor.average_thrust_n()
    chart = SvgChart(title=f"Thrust curve: {motor.designation}",
                     description=(f"Thrust against time for {motor.designation}: peak {motor.peak_thrust_n:.0f} N at "
                                  f"{motor.peak_time_s:.2f} s, average {average:.0f} N over a {end - start:.2f} s burn, "
                                  f"total impulse {motor.total_impulse_ns:.1f} N·s."),
                     x_label="time from ignition (s)", y_label="thrust (N)", x_range=(0.0, float(t[-1]) * 1.05 or 1.0),
                     y_range=(0.0, float(f.max()) * 1.15 or 1.0), width=460, height=260, key=key)
    chart.band_x(start, end, "burn window (above 5 % of peak)", fill=ORANGE_TINT)
    chart.line(t, f, "thrust", colour=INK, width=2.2, points=t.size <= 60)
    chart.hline(average, f"average over the burn, {average:.1f} N", colour=BLUE, dash="dashed")
    return ChartBlock(chart.render(), f"{motor.n_samples} samples; total impulse {motor.total_impulse_ns:.1f} N·s.",
                      wide=False)


def _events(summary: dict[str, Any]) -> list[tuple[str, float]]:
    """(event name, time from ignition) of the flight's marked events, in time order."""
    out = []
    for name, key in (("rail exit", "rail_exit_time_s"), ("burnout", "burnout_time_s"), ("apogee", "time_to_apogee_s")):
        if summary.get(key) is not None:
            out.append((name, float(summary[key])))
    if summary.get("deployments"):
        for event in summary["deployments"]:
            if event.get("time_s") is not None:
                out.append((str(event.get("name") or event.get("event") or "deployment"), float(event["time_s"])))
    elif summary.get("deploy_time_s") is not None:
        out.append(("deployment", float(summary["deploy_time_s"])))
    return sorted(out, key=lambda e: e[1])


def _interp(trajectory: dict[str, np.ndarray], key: str, time_s: float) -> float:
    return float(np.interp(time_s, trajectory["time_s"], trajectory[key]))


def _downrange(trajectory: dict[str, np.ndarray]) -> np.ndarray:
    if "x_m" in trajectory:
        return np.asarray(trajectory["x_m"], dtype=float)
    return np.hypot(trajectory["east_m"], trajectory["north_m"])  # 3-D: distance from the pad


def _speed(trajectory: dict[str, np.ndarray]) -> np.ndarray:
    parts = [trajectory[k] for k in ("vx_m_s", "vy_m_s", "vz_m_s", "v_east_m_s", "v_north_m_s", "v_up_m_s")
             if k in trajectory]
    return np.sqrt(np.sum(np.square(parts), axis=0))


def flight_chart(trajectory: dict[str, np.ndarray], summary: dict[str, Any], key: str = "flight") -> ChartBlock:
    """Altitude and speed against time up to just past deployment, phases as bands, events marked on the curve."""
    t = np.asarray(trajectory["time_s"], dtype=float)
    z = np.asarray(trajectory["altitude_m"], dtype=float)
    v = _speed(trajectory)
    events = _events(summary)
    apogee_t = float(summary["time_to_apogee_s"])
    end = max([apogee_t * 1.3] + [e[1] + 0.15 * apogee_t for e in events if e[1] < 3 * apogee_t])
    end = min(end, float(t[-1]))
    shown = t <= end
    tt, zz = thin(t[shown], z[shown])
    tv, vv = thin(t[shown], v[shown])
    apogee = float(summary["apogee_m"])
    chart = SvgChart(title="Altitude and speed through the flight",
                     description=(f"Altitude rises to {apogee:.0f} m at {apogee_t:.1f} s; top speed "
                                  f"{float(summary['max_speed_m_s']):.0f} m/s near burnout at "
                                  f"{float(summary['burnout_time_s']):.2f} s. Events: "
                                  + ", ".join(f"{n} at {s:.1f} s" for n, s in events) + "."),
                     x_label="time from ignition (s)", y_label="altitude above the pad (m)", x_range=(0.0, end),
                     y_range=(0.0, apogee * 1.18), y2_label="speed (m/s)", y2_range=(0.0, max(vv, default=0.0) * 1.1 or 1.0),
                     width=520, height=320, key=key)
    burnout = float(summary["burnout_time_s"])
    deploy = next((s for n, s in events if n not in ("rail exit", "burnout", "apogee")), None)
    chart.band_x(0.0, burnout, "boost: motor burning", fill=ORANGE_TINT, caption="boost")
    coast_end = deploy if deploy is not None else end
    chart.band_x(burnout, coast_end, "coast: unpowered climb", fill="#ffffff", caption="coast", legend=False)
    if deploy is not None:
        chart.band_x(deploy, end, "under recovery device", fill=BLUE_TINT, hatch="dots", caption="recovery")
    chart.line(tt, zz, "altitude (left scale)", colour=INK, width=2.4)
    chart.line(tv, vv, "speed (right scale)", colour=BLUE, dash="dashed", width=1.6, axis="y2")
    last_x, lift = -1e9, 0.0
    for name, when in events:
        shape = EVENT_MARKS.get(name, ("diamond", name))[0]
        lift = lift + 14.0 if when - last_x < 0.12 * end else 0.0  # stack labels of events close in time
        last_x = when
        height = _interp(trajectory, "altitude_m", when)
        text = {"apogee": f"apogee {apogee:.0f} m, {when:.1f} s", "burnout": f"burnout {when:.2f} s",
                "rail exit": f"off the rail {float(summary['rail_exit_speed_m_s']):.1f} m/s"}.get(
                    name, f"{name} {when:.1f} s")
        below = name in ("rail exit",)
        chart.mark(when, height, shape, text, dy=14 if below else -8 - lift,
                   anchor="start" if when < 0.6 * end else "end", dx=7 if when < 0.6 * end else -7)
    chart.legend_entry("events: ▲ rail exit, ■ burnout, ● apogee, ◆ deployment", kind="mark", shape="circle")
    return ChartBlock(chart.render(), "Bands: orange boost, white coast, dotted blue under the recovery device. "
                                      "The descent to the ground is in the side view.")


def side_chart(trajectory: dict[str, np.ndarray], summary: dict[str, Any], wind_m_s: float,
               key: str = "side") -> ChartBlock:
    """The path seen from the side, along the wind: ascent solid, descent dashed, with pad, apogee and landing."""
    x = _downrange(trajectory)
    z = np.asarray(trajectory["altitude_m"], dtype=float)
    descent = np.asarray(trajectory.get("descent", np.zeros(z.size, dtype=bool)), dtype=bool)
    lo, hi = float(min(x.min(), 0.0)), float(max(x.max(), 0.0))
    pad = 0.12 * max(hi - lo, 0.25 * float(z.max()), 1.0)
    chart = SvgChart(title="Side view of the path, with the wind",
                     description=(f"The rocket climbs to {float(summary['apogee_m']):.0f} m and lands "
                                  f"{abs(float(x[-1])):.0f} m {'downwind' if x[-1] >= 0 else 'upwind'} of the pad; "
                                  f"wind {wind_m_s:g} m/s at 10 m, blowing to the right."),
                     x_label="distance along the wind from the pad (m; + downwind)", y_label="altitude (m)",
                     x_range=(lo - pad, hi + pad), y_range=(0.0, float(z.max()) * 1.18), width=520, height=320, key=key)
    up = ~descent
    xa, za = thin(x[up], z[up])
    chart.line(xa, za, "climb", colour=INK, width=2.4)
    if descent.any():
        xd, zd = thin(x[descent], z[descent])
        chart.line(xd, zd, "descent", colour=BLUE, dash="dashed", width=1.8)
    chart.mark(0.0, 0.0, "triangle-up", "pad", dy=-8, label=None)
    i_top = int(np.argmax(z))
    chart.mark(float(x[i_top]), float(z[i_top]), "circle", f"apogee {float(z[i_top]):.0f} m", dy=-9,
               anchor="middle", dx=0)
    if z[-1] <= max(1.0, 0.01 * float(z.max())):
        chart.mark(float(x[-1]), float(z[-1]), "triangle-down", f"lands {abs(float(x[-1])):.0f} m away",
                   anchor="end" if x[-1] > 0 else "start", dx=-8 if x[-1] > 0 else 8, dy=-10)
    if wind_m_s > 0:
        chart.arrow((lo + hi) / 2, float(z.max()) * 1.1, 60.0, f"wind {wind_m_s:g} m/s, blowing this way")
    chart.legend_entry("▲ pad, ● apogee, ▼ landing", kind="mark", shape="triangle-up")
    return ChartBlock(chart.render(), "Scales differ: the horizontal axis is stretched to show the drift.", wide=False)


# ----------------------------------------------------------------------------- fly
def fly_report(frame: Any, motor: Any, summary: dict[str, Any], warnings: Sequence[tuple[str, str]],
               trajectory: dict[str, np.ndarray] | None, *, inputs: Sequence[str], command: str, units: str = "si",
               made_at: str | None = None) -> FlyReport:
    """The pre-flight report of one flight (``fly --json`` summary, its warnings and trajectory)."""
    u = units
    launch = frame.launch
    card: FlightCard = flight_card(summary, warnings, title="", units=u, wind_speed_m_s=launch.wind_speed_m_s)
    rocket = Facts("Rocket", (
        ("name", frame.name),
        ("empty mass", quantity(frame.mass_kg, "mass", u)),
        ("diameter", f"{frame.diameter_m * 1e3:.1f} mm"),
        ("drag", f"Cd table over Mach {frame.drag_machs[0]:g}-{frame.drag_machs[-1]:g}" if frame.drag_table
         else f"Cd {frame.drag_coefficient:g}"),
        ("motor mount", "-" if frame.mount_diameter_m is None else f"{frame.mount_diameter_m * 1e3:.0f} mm"
         + ("" if frame.mount_length_m is None else f", up to {frame.mount_length_m * 1e3:.0f} mm long")),
        ("recovery", "none given" if frame.recovery is None else
         f"{frame.recovery.device}, deployed at {frame.recovery.deploy}, Cd·A {frame.recovery.drag_area_m2:.3g} m²"),
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
        ("optimal", "-" if optimal is None else f"{float(optimal):.1f} s (burnout to apogee)"),
        ("deployment", "motor's delay charge" if frame.recovery is None or frame.recovery.deploy == "ejection"
         else f"electronics ({frame.recovery.deploy})"),
    ))
    site = launch.site
    conditions = Facts("Conditions", (
        ("rail", f"{quantity(launch.rail_length_m, 'length', u) if u == 'imperial' else f'{launch.rail_length_m:g} m'}"
                 f", {math.degrees(launch.rail_angle_rad):g}° from vertical, tilted downwind"),
        ("wind", f"{quantity(launch.wind_speed_m_s, 'speed', u)} at 10 m, stronger aloft (power law)"),
        ("site", f"{quantity(site.elevation_m, 'length', u)} above sea level"),
        ("air", ("standard" if site.temperature_k is None else f"{site.temperature_k - 273.15:.1f} °C")
         + ("" if site.pressure_pa is None else f", {site.pressure_pa / 100:.0f} hPa") + " at the pad"),
    ))
    flight = side = None
    if trajectory is not None and summary.get("apogee_m") is not None:
        flight = flight_chart(trajectory, summary)
        side = side_chart(trajectory, summary, launch.wind_speed_m_s)
    stability = None
    st = summary.get("stability")
    if st:
        rows = [("centre of pressure", _mm(st.get("cp_m")) + " from the nose tip"),
                ("centre of gravity", f"{_mm(st.get('cg_liftoff_m'))} at liftoff, {_mm(st.get('cg_burnout_m'))} at burnout")]
        for label, k in (("margin at liftoff", "margin_liftoff_cal"), ("margin off the rail", "margin_rail_exit_cal"),
                         ("margin at burnout", "margin_burnout_cal"), ("least margin", "min_margin_cal")):
            if st.get(k) is not None:
                rows.append((label, f"{float(st[k]):.2f} calibers"))
        stability = Facts("Stability", tuple(rows), "Margin in body diameters of CP behind CG; 1 to 3 is the usual range.")
    recovery = _recovery_table(summary, u)
    landing = _landing_facts(summary, u)
    notes = [m for _, m in warnings]
    assumptions = Notes("Assumptions", (
        "Drag from the airframe's Cd; the motor burns as its curve says; propellant mass falls with impulse delivered.",
        "Standard atmosphere shifted to the pad's measured air; wind grows with height by a power law.",
        "Recovery device fully open the moment it deploys; no gusts, no weathercocking beyond the model's.",
        "Times count from motor ignition; altitudes are above the pad.",
    ))
    return FlyReport(
        title=f"{frame.name} with {motor.designation}", subtitle=f"Pre-flight prediction: {summary.get('message', '')}",
        rocket=rocket, motor=motor_facts, delay=delay, conditions=conditions, card=card,
        thrust_chart=thrust_chart(motor), trace=trace_for(inputs, command, made_at), flight_chart=flight,
        side_chart=side, stability=stability, recovery=recovery, landing=landing,
        warnings=Notes("Warnings", tuple(notes), "warning") if notes else Notes("Warnings", ("None from the rules of thumb.",)),
        assumptions=assumptions)


def _mm(value: Any) -> str:
    return "-" if value is None else f"{float(value) * 1e3:.0f} mm"


def _recovery_table(summary: dict[str, Any], u: str) -> TableBlock | None:
    rows: list[tuple[str, str, str, str]] = []
    if summary.get("deployments"):
        for e in summary["deployments"]:
            rows.append((str(e.get("name") or e.get("event") or e.get("device") or "deployment"),
                         quantity(e.get("time_s"), "time"), quantity(e.get("altitude_m"), "length", u),
                         quantity(e.get("speed_m_s"), "speed", u)))
    else:
        for ej in summary.get("ejections") or []:
            chosen = ej["delay_s"] == summary.get("chosen_delay_s")
            rows.append((f"ejection, {ej['delay_s']:g} s delay" + (" (chosen)" if chosen else ""),
                         "-" if ej.get("altitude_m") is None else quantity(
                             float(summary["burnout_time_s"]) + ej["delay_s"], "time"),
                         "after landing" if ej.get("altitude_m") is None else quantity(ej["altitude_m"], "length", u),
                         quantity(ej.get("speed_m_s"), "speed", u)))
        fired = [float(summary["burnout_time_s"]) + ej["delay_s"] for ej in summary.get("ejections") or []
                 if ej["delay_s"] == summary.get("chosen_delay_s") and summary.get("burnout_time_s") is not None]
        deploy = summary.get("deploy_time_s")
        if deploy is not None and any(abs(float(deploy) - f) < 1e-6 for f in fired):
            k = next(i for i, row in enumerate(rows) if row[0].endswith("(chosen)"))
            rows[k] = (rows[k][0] + ", opens the device",) + rows[k][1:]  # ejection and deployment are one event
        elif deploy is not None:
            rows.append(("recovery device opens", quantity(summary["deploy_time_s"], "time"),
                         quantity(summary.get("deploy_altitude_m"), "length", u), "-"))
    if not rows:
        return None
    from ..flight.rules import LaunchRules

    limit = LaunchRules().max_ejection_speed_m_s
    marks = ["info" if row[3] == "-" else ("ok" if _speed_ok(row[3], limit, u) else "caution") for row in rows]
    return TableBlock("Recovery events", ("event", "time", "height", "speed"), tuple(rows), (False, True, True, True),
                      tuple(marks), f"Speed at each event against {quantity(limit, 'speed', u)} (common practice).")


def _speed_ok(text: str, limit_m_s: float, u: str) -> bool:
    number = float(text.split()[0].replace(",", ""))
    return number * (0.3048 if u == "imperial" else 1.0) <= limit_m_s


def _landing_facts(summary: dict[str, Any], u: str) -> Facts | None:
    landing = summary.get("landing")
    if isinstance(landing, dict):
        rows = [("touchdown speed", quantity(landing.get("speed_m_s"), "speed", u)),
                ("lands at", quantity(landing.get("time_s"), "time")),
                ("distance from the pad", quantity(landing.get("distance_m"), "length", u))]
        if landing.get("bearing_deg") is not None:
            rows.append(("bearing from the pad", f"{float(landing['bearing_deg']):03.0f}° (0° north, 90° east)"))
        return Facts("Landing", tuple(rows))
    if summary.get("landing_speed_m_s") is None:
        return None
    return Facts("Landing", (
        ("descent rate", quantity(summary.get("landing_descent_rate_m_s"), "speed", u)),
        ("speed over ground", quantity(summary.get("landing_speed_m_s"), "speed", u)),
        ("descent time", quantity(summary.get("descent_time_s"), "time")),
        ("distance from the pad", quantity(summary.get("drift_m"), "length", u) + " downwind"),
        ("bearing", "downwind (the model flies in the plane of the wind)"),
    ))


# ----------------------------------------------------------------------------- match
def match_chart(result: Any, key: str = "match") -> ChartBlock | None:
    """Apogee of every flown candidate in rank order: plain blue bars with a tick pass, hatched orange bars with a
    cross and the reason fail; the target, its tolerance band, the ceiling and the region above it explained."""
    flown = [c for c in result.candidates if c["apogee_m"] is not None]
    if not flown:
        return None
    target = result.conditions.get("target_m")
    ceiling = result.conditions.get("ceiling_m")
    top = max([c["apogee_m"] for c in flown] + [ceiling or 0.0, (target or 0.0) * 1.05]) * 1.12
    order = "by closeness to the target" if target else "by apogee"
    chart = SvgChart(title=f"Apogee per motor, in rank order (passing first, then {order})",
                     description=(f"{sum(c['passes'] for c in flown)} of {len(flown)} flown motors pass every rule. "
                                  + (f"Target {target:.0f} m. " if target else "") + (f"Ceiling {ceiling:.0f} m. " if ceiling else "")
                                  + "; ".join(f"{c['designation']} {c['apogee_m']:.0f} m {'pass' if c['passes'] else 'fail: ' + ', '.join(dict.fromkeys(c['reason_codes']))}"
                                              for c in flown[:12]) + ("; ..." if len(flown) > 12 else ".")),
                     x_label="motor", y_label="apogee above the pad (m)", x_range=(-0.5, len(flown) - 0.5),
                     y_range=(0.0, top), width=max(640, 34 * len(flown) + 110), height=400, key=key,
                     x_categories=[c["designation"] for c in flown])
    if target:
        chart.band_y(0.95 * target, 1.05 * target, f"within 5 % of the target", fill=BLUE_TINT)
    if ceiling:
        chart.band_y(ceiling, top, "above the ceiling: not allowed", fill=ORANGE_TINT, hatch="cross")
    for i, c in enumerate(flown):
        codes = ", ".join(dict.fromkeys(c["reason_codes"]))
        if c["passes"]:
            chart.bar(i, c["apogee_m"], fill=BLUE, top_text=f"{c['apogee_m']:.0f}", inside_text="✓")
        else:
            chart.bar(i, c["apogee_m"], fill=ORANGE, hatch="diagonal", top_text=f"{c['apogee_m']:.0f}",
                      inside_text=f"✗ {codes}")
    if target:
        chart.hline(target, f"target {target:.0f} m", colour=INK, dash="solid", width=1.8)
    if ceiling:
        chart.hline(ceiling, f"ceiling {ceiling:.0f} m", colour=INK, dash="dotted", width=2.0)
    chart.legend_entry("passes every rule (✓)", kind="fill", fill=BLUE)
    chart.legend_entry("fails a rule (✗ and its reason)", kind="fill", fill=ORANGE, hatch="diagonal")
    return ChartBlock(chart.render(), "Numbers above the bars are apogees in m. Reason marks: rail = rail exit too slow, "
                                      "T/W = thrust-to-weight, delay, eject = ejection speed, descent, ceiling.")


def match_report(result: Any, *, inputs: Sequence[str], command: str, catalog: str, units: str = "si",
                 made_at: str | None = None) -> MatchReport:
    """The ranking report: every fitting motor with a mark and its reasons, the chart and the conditions."""
    u = units
    c = result.conditions
    shown = [cand for cand in result.candidates if cand["fits"]]
    rows, marks = [], []
    for rank, cand in enumerate(shown, 1):
        delay = "-" if cand["chosen_delay_s"] is None else (
            f"{cand['chosen_delay_s']:g}{' drilled' if cand['delay_adjusted'] else ''}/{cand['optimal_delay_s']:.1f}")
        rows.append((str(rank), cand["designation"], quantity(cand["apogee_m"], "length", u),
                     quantity(cand["rail_exit_speed_m_s"], "speed", u),
                     "-" if cand["liftoff_thrust_to_weight"] is None else f"{cand['liftoff_thrust_to_weight']:.1f}",
                     delay, quantity(cand["ejection_speed_m_s"], "speed", u),
                     "passes" if cand["passes"] else "; ".join(cand["reasons"])))
        marks.append("ok" if cand["passes"] else "fail")
    n_pass = sum(cand["passes"] for cand in result.candidates)
    ranking = TableBlock(
        f"Ranking: {n_pass} of {len(result.candidates)} motors pass",
        ("#", "motor", "apogee", "rail exit", "T/W", "delay s", "ejection", "verdict and reasons"),
        tuple(rows), (True, False, True, True, True, True, True, False), tuple(marks),
        f"Delay: chosen / optimal, 'drilled' when an adjustable delay is shortened. "
        f"{len(result.candidates) - len(shown)} motor(s) do not fit the mount or the class limit and are not listed.",
        nowrap=(False, True, False, False, False, False, False, False))
    conditions = Facts("Conditions and rules", (
        ("airframe", f"{result.airframe['name']}, {quantity(result.airframe['mass_kg'], 'mass', u)} empty"),
        ("target", "-" if not c.get("target_m") else quantity(c["target_m"], "length", u)),
        ("ceiling", "-" if not c.get("ceiling_m") else quantity(c["ceiling_m"], "length", u)),
        ("class limit", c.get("max_class") or "none"),
        ("rail exit", f">= {quantity(c['min_rail_exit_speed_m_s'], 'speed', u)}"),
        ("thrust-to-weight", f">= {c['min_liftoff_thrust_to_weight']:g} at liftoff"),
        ("delay", f"within {c['delay_slack_s']:g} s of the optimal"),
        ("ejection speed", f"<= {quantity(c['max_ejection_speed_m_s'], 'speed', u)}"),
        ("descent rate", f"<= {quantity(c['max_landing_speed_m_s'], 'speed', u)}"),
        ("catalog", catalog),
    ))
    assumptions = Notes("Assumptions", (f"Drag: {c['drag']}.", f"Atmosphere: {c['atmosphere']}.", f"Wind: {c['wind']}.",
                                        f"Rail: {c['rail']}.", f"Recovery: {c['recovery']}.",
                                        "Landing speed is the terminal descent rate under the device at the pad."))
    return MatchReport(title=f"Motors for {result.airframe['name']}",
                       subtitle="Every motor that fits, flown with the same airframe and conditions",
                       ranking=ranking, chart=match_chart(result), conditions=conditions,
                       trace=trace_for(inputs, command, made_at), assumptions=assumptions)


# ----------------------------------------------------------------------------- reduce
def _overlay_chart(reductions: Sequence[tuple[str, Any]], key: str = "overlay") -> ChartBlock:
    """Every firing's filtered curve from its own ignition, each in its own colour and dash; one firing adds its
    raw log, reduced points and thresholds."""
    end = max(float(r.filtered_time_s[-1]) for _, r in reductions)
    peak = max(float(np.max(r.filtered_thrust_n)) for _, r in reductions)
    single = len(reductions) == 1
    chart = SvgChart(title="Firings overlaid" if not single else "Raw, filtered and reduced thrust",
                     description=(f"{len(reductions)} firing(s) from ignition: "
                                  + "; ".join(f"{Path(p).name} peak {float(np.max(r.filtered_thrust_n)):.0f} N, burnout "
                                              f"{r.burnout_time_s - r.ignition_time_s:.2f} s" for p, r in reductions) + "."),
                     x_label="time from ignition (s)", y_label="thrust (N)", x_range=(min(0.0, *(float(r.raw_time_s[0]) for _, r in reductions)) if single else 0.0, end * 1.04),
                     y_range=(min(0.0, min(float(np.min(r.raw_thrust_n)) for _, r in reductions)) if single else 0.0, peak * 1.15),
                     width=520, height=300, key=key)
    if single:
        path, r = reductions[0]
        xs, ys = thin(r.raw_time_s, r.raw_thrust_n, 600)
        chart.line(xs, ys, "raw log (tared)", colour=MUTED, width=0.8)
        chart.line(*thin(r.filtered_time_s, r.filtered_thrust_n), "filtered" if r.cutoff_hz else "resampled",
                   colour=INK, width=1.8)
        chart.line(r.time_s, r.thrust_n, f"reduced curve ({r.time_s.size} points)", colour=ORANGE, width=1.4, points=True)
        chart.hline(r.threshold_n, "ignition and burnout threshold", colour=BLUE, dash="dotted")
        chart.vline(0.0, None, colour=BLUE, dash="dotted")
        chart.vline(r.burnout_time_s - r.ignition_time_s, None, colour=BLUE, dash="dotted")
    else:
        for k, (path, r) in enumerate(reductions):
            colour, dash = _LINE_STYLES[k % len(_LINE_STYLES)]
            chart.line(*thin(r.filtered_time_s, r.filtered_thrust_n), Path(path).name, colour=colour, dash=dash, width=1.6)
    return ChartBlock(chart.render(), "Each firing starts at its own ignition.", wide=False)


def _mean_chart(reductions: Sequence[tuple[str, Any]], record: Any, key: str = "mean") -> ChartBlock:
    """The mean curve with ±1 standard deviation and the lowest-to-highest envelope of the firings."""
    end = max(float(r.filtered_time_s[-1]) for _, r in reductions)
    step = min(float(np.median(np.diff(r.filtered_time_s))) for _, r in reductions)
    grid = np.linspace(0.0, end, min(400, max(50, int(end / step))))
    curves = np.array([np.interp(grid, r.filtered_time_s, r.filtered_thrust_n, left=0.0, right=0.0) for _, r in reductions])
    mean, std = curves.mean(axis=0), curves.std(axis=0, ddof=1)
    chart = SvgChart(title=f"Mean of {len(reductions)} firings, with their spread",
                     description=(f"Mean thrust curve of {len(reductions)} firings of {record.designation}, peak "
                                  f"{float(mean.max()):.0f} N; the largest spread between firings is "
                                  f"{float((curves.max(axis=0) - curves.min(axis=0)).max()):.0f} N."),
                     x_label="time from ignition (s)", y_label="thrust (N)", x_range=(0.0, end * 1.04),
                     y_range=(0.0, float(curves.max()) * 1.15), width=520, height=300, key=key)
    chart.spread(grid, curves.min(axis=0), curves.max(axis=0), "lowest to highest firing", fill=RULE)
    chart.spread(grid, np.maximum(mean - std, 0.0), mean + std, "mean ± 1 standard deviation", fill=BLUE_TINT,
                 hatch="dots")
    chart.line(grid, mean, "mean curve", colour=INK, width=2.2)
    chart.line(record.time_s, record.thrust_n, f"written record ({record.n_samples} points)", colour=ORANGE,
               dash="dashed", width=1.4, points=True)
    return ChartBlock(chart.render(), "A firing counts as 0 N after its own burnout.", wide=False)


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
    mean = _mean_chart(reductions, record) if len(reductions) > 1 else None
    return ReduceReport(
        title=f"Test-stand series: {record.designation}", subtitle=f"{len(reductions)} log(s) reduced to one curve",
        firings=firings, overlay=_overlay_chart(reductions), trace=trace_for(inputs, command, made_at),
        mean_chart=mean, spread=spread_facts, label_check=label_check, label_facts=label,
        assumptions=Notes("How the logs were reduced", (
            "Baseline tared from the readings before ignition; noise is the robust spread of that baseline.",
            "Zero-phase low-pass filter; ignition and burnout where thrust crosses the event threshold.",
            "The reduced curve keeps the points that hold the filtered impulse and peak.")))
