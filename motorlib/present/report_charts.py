"""The charts of the reports, as inline SVG (:mod:`.svgcharts`) in the palette of :mod:`.palette`.

* :func:`thrust_chart`: the motor's curve with its burn window and average thrust.
* :func:`flight_chart`: altitude and speed against time, the phases as labelled bands, the events marked on the
  curve (up to a little past the first deployment; the descent is in the side view).
* :func:`side_chart`: the path seen from the side along the wind, with pad, apogee, landing and the wind.
* :func:`match_chart`: apogee per motor in rank order; pass/fail told by fill, hatching, a tick or a cross and
  the reason, not by hue alone; target band, ceiling and the region above it in the legend.
* :func:`overlay_chart`, :func:`mean_chart`: firings of a test series, and their mean with its spread.

Each returns a :class:`~.report.ChartBlock` whose SVG has a ``<title>``, a ``<desc>`` and an ``aria-label`` that
states the chart's key figures.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any, Sequence

import numpy as np

from .display import DisplayUnits
from .messages import VERDICT_LEGEND, match_count, short_code
from .palette import BLUE, BLUE_TINT, EVENT_MARKS, INK, MUTED, ORANGE, ORANGE_TINT, PAPER, RULE
from .report import ChartBlock
from .svgcharts import SvgChart, thin

if TYPE_CHECKING:
    from ..matching.candidate import Candidate
    from ..matching.rank import MatchResult
    from ..motor.record import MotorRecord

__all__ = ["flight_chart", "match_chart", "mean_chart", "overlay_chart", "side_chart", "thrust_chart"]

_LINE_STYLES = [(INK, "solid"), (BLUE, "dashed"), (ORANGE, "solid"), (INK, "dotted"), (BLUE, "dashdot"),
                (ORANGE, "dashed"), (MUTED, "solid"), (BLUE, "dotted")]


def thrust_chart(motor: MotorRecord, key: str = "thrust") -> ChartBlock:
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


def flight_chart(trajectory: dict[str, np.ndarray], summary: dict[str, Any], key: str = "flight",
                 units: DisplayUnits | None = None) -> ChartBlock:
    """Altitude and speed against time up to just past deployment, phases as bands, events marked on the curve;
    heights and speeds in the display ``units``."""
    u = units or DisplayUnits()
    lu, su = u.unit("length"), u.unit("speed")
    t = np.asarray(trajectory["time_s"], dtype=float)
    z = np.asarray(trajectory["altitude_m"], dtype=float) * u.convert(1.0, "length", lu)
    v = _speed(trajectory) * u.convert(1.0, "speed", su)
    events = _events(summary)
    apogee_t = float(summary["time_to_apogee_s"])
    end = max([apogee_t * 1.3] + [e[1] + 0.15 * apogee_t for e in events if e[1] < 3 * apogee_t])
    end = min(end, float(t[-1]))
    shown = t <= end
    tt, zz = thin(t[shown], z[shown])
    tv, vv = thin(t[shown], v[shown])
    apogee = u.convert(float(summary["apogee_m"]), "length", lu)
    chart = SvgChart(title="Altitude and speed through the flight",
                     description=(f"Altitude rises to {u.quantity(summary['apogee_m'], 'length')} at {apogee_t:.1f} s; "
                                  f"top speed {u.quantity(summary['max_speed_m_s'], 'speed', 0)} near burnout at "
                                  f"{float(summary['burnout_time_s']):.2f} s. Events: "
                                  + ", ".join(f"{n} at {s:.1f} s" for n, s in events) + "."),
                     x_label="time from ignition (s)", y_label=f"altitude above the pad ({lu})", x_range=(0.0, end),
                     y_range=(0.0, apogee * 1.18), y2_label=f"speed ({su})", y2_range=(0.0, max(vv, default=0.0) * 1.1 or 1.0),
                     width=520, height=320, key=key)
    burnout = float(summary["burnout_time_s"])
    deploy = next((s for n, s in events if n not in ("rail exit", "burnout", "apogee")), None)
    chart.band_x(0.0, min(burnout, end), "boost: motor burning", fill=ORANGE_TINT, caption="boost")
    coasts = burnout < apogee_t  # an apogee under thrust has no coast to draw
    if coasts:
        coast_end = deploy if deploy is not None else end
        chart.band_x(burnout, coast_end, "coast: unpowered climb", fill="#ffffff", caption="coast", legend=False)
    if deploy is not None:
        chart.band_x(deploy, end, "under recovery device", fill=BLUE_TINT, hatch="dots", caption="recovery")
    chart.line(tt, zz, "altitude (left scale)", colour=INK, width=2.4)
    chart.line(tv, vv, "speed over the ground (right scale)", colour=BLUE, dash="dashed", width=1.6, axis="y2")
    last_x, lift = -1e9, 0.0
    for name, when in events:
        shape = EVENT_MARKS.get(name, ("diamond", name))[0]
        lift = lift + 14.0 if when - last_x < 0.12 * end else 0.0  # stack labels of events close in time
        last_x = when
        height = u.convert(_interp(trajectory, "altitude_m", when), "length", lu)
        text = {"apogee": f"apogee {u.quantity(summary['apogee_m'], 'length')}, {when:.1f} s",
                "burnout": f"burnout {when:.2f} s",
                "rail exit": f"off the rail {u.quantity(summary['rail_exit_speed_m_s'], 'speed')}"}.get(
                    name, f"{name} {when:.1f} s")
        below = name in ("rail exit",)
        chart.mark(when, height, shape, text, dy=14 if below else -8 - lift,
                   anchor="start" if when < 0.6 * end else "end", dx=7 if when < 0.6 * end else -7)
    chart.legend_entry("events: ▲ rail exit, ■ burnout, ● apogee, ◆ deployment", kind="mark", shape="circle")
    return ChartBlock(chart.render(), "Bands: orange boost, " + ("white coast, " if coasts else "")
                      + "dotted blue under the recovery device. "
                      + ("" if coasts else "Apogee comes before burnout: there is no coast. ")
                      + "The descent to the ground is in the side view.")


def side_chart(trajectory: dict[str, np.ndarray], summary: dict[str, Any], wind_m_s: float,
               key: str = "side", units: DisplayUnits | None = None) -> ChartBlock:
    """The path seen from the side, along the wind: ascent solid, descent dashed, with pad, apogee and landing;
    distances in the display ``units``."""
    u = units or DisplayUnits()
    lu = u.unit("length")
    x = _downrange(trajectory) * u.convert(1.0, "length", lu)
    z = np.asarray(trajectory["altitude_m"], dtype=float) * u.convert(1.0, "length", lu)
    wind = u.quantity(wind_m_s, "speed")
    descent = np.asarray(trajectory.get("descent", np.zeros(z.size, dtype=bool)), dtype=bool)
    lo, hi = float(min(x.min(), 0.0)), float(max(x.max(), 0.0))
    pad = 0.12 * max(hi - lo, 0.25 * float(z.max()), 1.0)
    chart = SvgChart(title="Side view of the path, with the wind",
                     description=(f"The rocket climbs to {u.quantity(summary['apogee_m'], 'length')} and lands "
                                  f"{abs(float(x[-1])):,.0f} {lu} {'downwind' if x[-1] >= 0 else 'upwind'} of the pad; "
                                  f"wind {wind} at {u.quantity(10.0, 'length')}, blowing to the right."),
                     x_label=f"distance along the wind from the pad ({lu}; + downwind)", y_label=f"altitude ({lu})",
                     x_range=(lo - pad, hi + pad), y_range=(0.0, float(z.max()) * 1.18), width=520, height=320, key=key)
    up = ~descent
    xa, za = thin(x[up], z[up])
    chart.line(xa, za, "climb", colour=INK, width=2.4)
    if descent.any():
        xd, zd = thin(x[descent], z[descent])
        chart.line(xd, zd, "descent", colour=BLUE, dash="dashed", width=1.8)
    chart.mark(0.0, 0.0, "triangle-up", "pad", dy=-8, label=None)
    i_top = int(np.argmax(z))
    chart.mark(float(x[i_top]), float(z[i_top]), "circle", f"apogee {float(z[i_top]):,.0f} {lu}", dy=-9,
               anchor="middle", dx=0)
    if z[-1] <= max(1.0, 0.01 * float(z.max())):
        chart.mark(float(x[-1]), float(z[-1]), "triangle-down", f"lands {abs(float(x[-1])):,.0f} {lu} away",
                   anchor="end" if x[-1] > 0 else "start", dx=-8 if x[-1] > 0 else 8, dy=-10)
    if wind_m_s > 0:
        chart.arrow((lo + hi) / 2, float(z.max()) * 1.1, 60.0, f"wind {wind}, blowing this way")
    chart.legend_entry("▲ pad, ● apogee, ▼ landing", kind="mark", shape="triangle-up")
    return ChartBlock(chart.render(), "Scales differ: the horizontal axis is stretched to show the drift.", wide=False)


# verdict word -> (fill, hatch) of its bars
_VERDICT_FILL = {"pass": (BLUE, None), "pass with ballast": (BLUE, "dots"), "off target": (PAPER, "dots"),
                 "fail": (ORANGE, "diagonal")}


def match_chart(result: MatchResult, key: str = "match", units: DisplayUnits | None = None,
                candidates: Sequence[Candidate] | None = None) -> ChartBlock | None:
    """Apogee of every flown candidate in rank order (or of ``candidates``, those a report lists): plain blue bars
    with a tick pass, hatched orange bars with a cross and the reason codes fail; the target, its tolerance band,
    the ceiling and the region above it explained; heights in the display ``units``."""
    u = units or DisplayUnits()
    unit = u.unit("length")
    scale = u.convert(1.0, "length", unit)  # display units per metre: every height below is drawn in them
    flown = [c for c in (result.candidates if candidates is None else candidates) if c.apogee_m is not None]
    if not flown:
        return None
    target = result.conditions.get("target_m")
    ceiling = result.conditions.get("ceiling_m")
    tolerance = result.conditions.get("target_tolerance", 0.05)
    apogee = {c.designation: c.apogee_m * scale for c in flown}
    top = max(list(apogee.values()) + [(ceiling or 0.0) * scale, (target or 0.0) * scale * (1 + tolerance)]) * 1.12
    order = "by closeness to the target" if target else "by apogee"
    chart = SvgChart(title=f"Apogee per motor, in rank order (passing first, then {order})",
                     description=(f"{match_count(result)} ({len(flown)} shown). "
                                  + (f"Target {u.given(target, 'length')}. " if target else "")
                                  + (f"Ceiling {u.given(ceiling, 'length')}. " if ceiling else "")
                                  + "; ".join(f"{c.designation} {u.quantity(c.apogee_m, 'length')} {c.verdict if c.verdict != 'fail' else 'fail: ' + ', '.join(dict.fromkeys(c.reason_codes))}"
                                              for c in flown[:12]) + ("; ..." if len(flown) > 12 else ".")),
                     x_label="motor", y_label=f"apogee above the pad ({unit})", x_range=(-0.5, len(flown) - 0.5),
                     y_range=(0.0, top), width=max(640, 34 * len(flown) + 110), height=400, key=key,
                     x_categories=[c.designation for c in flown])
    if target:
        chart.band_y((1 - tolerance) * target * scale, (1 + tolerance) * target * scale,
                     f"within {tolerance * 100:g} % of the target", fill=BLUE_TINT)
    if ceiling:
        chart.band_y(ceiling * scale, top, "above the ceiling: not allowed", fill=ORANGE_TINT, hatch="cross")
    letters: dict[str, str] = {}
    for i, c in enumerate(flown):
        codes = dict(short_code(code, text) for code, text in zip(c.reason_codes, c.reasons))
        height = apogee[c.designation]
        if c.passes:
            chart.bar(i, height, fill=BLUE, top_text=f"{height:.0f}", inside_text="✓")
        elif c.verdict == "pass with ballast":
            chart.bar(i, height, fill=BLUE, hatch="dots", top_text=f"{height:.0f}", inside_text="✓ pass with ballast")
        elif c.verdict == "off target":
            chart.bar(i, height, fill=PAPER, hatch="dots", top_text=f"{height:.0f}", inside_text="off target")
        else:
            letters.update(codes)
            chart.bar(i, height, fill=ORANGE, hatch="diagonal", top_text=f"{height:.0f}",
                      inside_text=f"✗ {' '.join(codes)}")
    if target:
        chart.hline(target * scale, f"target {u.given(target, 'length')}", colour=INK, dash="solid", width=1.8)
    if ceiling:
        chart.hline(ceiling * scale, f"ceiling {u.given(ceiling, 'length')}", colour=INK, dash="dotted", width=2.0)
    for verdict, words in VERDICT_LEGEND.items():  # the verdict words of the table, report and JSON
        if verdict == "pass" or verdict == "fail" or verdict in {c.verdict for c in flown}:
            fill, hatch = _VERDICT_FILL[verdict]
            chart.legend_entry(f"{verdict}: {words}", kind="fill", fill=fill, hatch=hatch)
    # the letters the bars carry, as the match table's legend names them (the caption named other marks before)
    return ChartBlock(chart.render(), f"Numbers above the bars are apogees in {unit}."
                      + (" Fail codes: " + "; ".join(f"{k} {v}" for k, v in letters.items()) + "." if letters else ""))


def overlay_chart(reductions: Sequence[tuple[str, Any]], key: str = "overlay") -> ChartBlock:
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


def mean_chart(reductions: Sequence[tuple[str, Any]], record: Any, key: str = "mean") -> ChartBlock:
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
