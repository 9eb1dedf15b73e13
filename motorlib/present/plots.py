"""Charts as PNG files (matplotlib, imported only when a plot is asked for), in motorlib's own look.

Colours, line styles, hatching and event shapes come from :mod:`.palette` (three inks of different lightness,
so a grayscale print or a colour-blind reader loses nothing); every line, band and shaded region has a legend
entry. Files are written atomically.

The module runs a little past 500 lines on purpose: every PNG chart shares one look (palette, marks,
caution line, safe writing); each function draws one chart.
"""

from __future__ import annotations

import io
import os
from dataclasses import replace
from pathlib import Path
from typing import Final

import numpy as np

from ..files.fsio import write_atomic
from ..safety import CHART_CAUTION as _CAUTION
from .display import DisplayUnits
from .messages import VERDICT_LEGEND, short_code
from .palette import BLUE, BLUE_TINT, INK, MUTED, ORANGE, ORANGE_TINT, RULE

__all__ = ["airframe_plot", "calibration_plot", "curves_plot", "flight_plot", "match_plot", "reduction_plot",
           "scatter_plot"]

_MARKERS = {"rail exit": "^", "burnout": "s", "apogee": "o", "deployment": "D", "ejection": "D", "landing": "v"}
_CYCLE = [(INK, "-"), (BLUE, "--"), (ORANGE, "-"), (INK, ":"), (BLUE, "-."), (ORANGE, "--"), (MUTED, "-")]
_METRIC = DisplayUnits()


def _figure():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    plt.rcParams.update({"axes.edgecolor": MUTED, "axes.labelcolor": INK, "xtick.color": MUTED, "ytick.color": MUTED,
                         "axes.spines.top": False, "axes.spines.right": False, "grid.color": RULE,
                         "hatch.linewidth": 0.8, "font.size": 9})
    return plt


def _save(fig, path: str | os.PathLike[str], *, overwrite: bool = True) -> Path:
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=110, bbox_inches="tight")
    return write_atomic(path, buffer.getvalue(), overwrite=overwrite)


def _finish(plt, fig, path: str | os.PathLike[str], *, overwrite: bool = True) -> Path:
    """Add the caution line, write ``fig`` as PNG to ``path`` and close it."""
    fig.text(0.01, 0.005, _CAUTION, fontsize=7, color="gray")
    try:
        return _save(fig, path, overwrite=overwrite)
    finally:
        plt.close(fig)


def _event_times(summary: dict[str, object]) -> list[tuple[str, float]]:
    out = []
    deployments = summary.get("deployments") or []
    keys = (("rail exit", "rail_exit_time_s"), ("burnout", "burnout_time_s"), ("apogee", "time_to_apogee_s"))
    if not deployments:  # the first opening is also the first of the deployments: label it once
        keys += (("deployment", "deploy_time_s"),)
    for name, key in keys:
        if summary.get(key) is not None:
            out.append((name, float(summary[key])))  # type: ignore[arg-type]
    for event in deployments:  # type: ignore[union-attr]
        out.append((str(event.get("name") or "deployment"), float(event["time_s"])))
    return sorted(out, key=lambda e: e[1])


def _phase_labels(burnout_s: float, apogee_s: float, deploy_s: float | None, end_s: float
                  ) -> list[tuple[float, float, str]]:
    """The flight chart's band labels (start [s], end [s], word): boost, coast (only when burnout comes before
    apogee: an apogee under thrust has no coast) and recovery, each only where its band is wide enough to hold it
    (over 6 % of the time shown, ``end_s``)."""
    bands = [(0.0, burnout_s, "boost")]
    if burnout_s < apogee_s:
        bands.append((burnout_s, deploy_s if deploy_s is not None else end_s, "coast"))
    if deploy_s is not None:
        bands.append((deploy_s, end_s, "recovery"))
    return [(x0, x1, name) for x0, x1, name in bands if x1 - x0 > 0.06 * end_s]


def flight_plot(trajectory: dict[str, np.ndarray], summary: dict[str, object], title: str,
                path: str | os.PathLike[str], units: DisplayUnits = _METRIC) -> Path:
    """The flight in two panels side by side: altitude against time with the phases as labelled bands and the
    events marked on the curve (speed dashed on its own scale), and the path seen from the side with the wind."""
    plt = _figure()
    t = np.asarray(trajectory["time_s"], dtype=float)
    z = np.asarray(trajectory["altitude_m"], dtype=float)
    speed = np.sqrt(sum(np.square(trajectory[k]) for k in ("vx_m_s", "vy_m_s", "vz_m_s") if k in trajectory))
    x = np.asarray(trajectory["x_m"], dtype=float) if "x_m" in trajectory else np.hypot(trajectory["east_m"],
                                                                                      trajectory["north_m"])
    lu, su = units.unit("length"), units.unit("speed")
    z, x, speed = z * units.convert(1.0, "length", lu), x * units.convert(1.0, "length", lu), speed * units.convert(1.0, "speed", su)
    descent = np.asarray(trajectory.get("descent", np.zeros(t.size, dtype=bool)), dtype=bool)
    fig, (ax, side) = plt.subplots(1, 2, figsize=(11, 4.6), gridspec_kw={"width_ratios": [1.5, 1]})
    events = _event_times(summary)
    burnout = float(summary["burnout_time_s"]) if summary.get("burnout_time_s") is not None else t[-1]  # type: ignore[arg-type]
    deploy = next((s for n, s in events if n not in ("rail exit", "burnout", "apogee")), None)
    apogee_t = float(summary.get("time_to_apogee_s") or t[-1])  # type: ignore[arg-type]
    # up to a little past the first deployment: the descent is long and is shown in the side view
    end = min(float(t[-1]), max([apogee_t * 1.3] + [s + 0.15 * apogee_t for _, s in events if s < 3 * apogee_t]))
    ax.axvspan(0, burnout, color=ORANGE_TINT, label="boost: motor burning")
    if deploy is not None:
        ax.axvspan(deploy, end, facecolor=BLUE_TINT, hatch="..", edgecolor=BLUE, linewidth=0, label="under recovery device")
    top = float(z.max()) * 1.2 or 1.0
    for x0, x1, name in _phase_labels(burnout, apogee_t, deploy, end):
        ax.text((x0 + x1) / 2, top * 0.96, name, ha="center", va="top", fontsize=9, fontweight="bold", color=INK)
    ax.plot(t, z, color=INK, linewidth=2.2, label="altitude (left scale)")
    ax.set_ylim(0, top)
    ax.set_xlim(0, end)
    ax.set_xlabel("time from ignition (s)")
    ax.set_ylabel(f"altitude above the pad ({lu})")
    ax.grid(axis="y")
    ax2 = ax.twinx()
    ax2.plot(t, speed, color=BLUE, linestyle="--", linewidth=1.4, label="speed over the ground (right scale)")
    ax2.set_ylabel(f"speed ({su})", color=BLUE)
    ax2.set_ylim(0, float(speed.max()) * 1.1 or 1.0)
    ax2.spines["right"].set_visible(True)
    placed: list[list[float]] = []  # label rows: the times already labelled on each
    near_s = 0.12 * end  # a label is about this wide on the time axis shown
    for name, when in events:
        height = float(np.interp(when, t, z))
        ax.plot([when], [height], marker=_MARKERS.get(name, "D"), markersize=7, markerfacecolor="white",
                markeredgecolor=INK, markeredgewidth=1.4, linestyle="none", zorder=5)
        row = next((i for i, times in enumerate(placed) if all(abs(when - x) >= near_s for x in times)), len(placed))
        if row == len(placed):
            placed.append([])
        placed[row].append(when)  # events close in time stack their labels below the curve, not on each other
        ax.annotate(f"{name} {when:.1f} s", (when, height), xytext=(8, 8 if row == 0 else -6 - 14 * row), textcoords="offset points",
                    fontsize=8, color=INK, bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "none", "alpha": 0.8})
    handles, labels = ax.get_legend_handles_labels()
    h2, l2 = ax2.get_legend_handles_labels()
    from matplotlib.lines import Line2D

    marks = [Line2D([], [], marker=_MARKERS[n], markerfacecolor="white", markeredgecolor=INK, linestyle="none",
                    label=n) for n in ("rail exit", "burnout", "apogee", "deployment")]
    ax.legend(handles + h2 + marks, labels + l2 + [m.get_label() for m in marks], fontsize=7.5, loc="upper center",
              bbox_to_anchor=(0.5, -0.14), ncol=4, frameon=False)
    ax.set_title(f"{title}: altitude by phase (descent: see the side view)", loc="left", fontsize=10, color=INK)
    side.plot(x[~descent], z[~descent], color=INK, linewidth=2.2, label="climb")
    if descent.any():
        side.plot(x[descent], z[descent], color=BLUE, linestyle="--", linewidth=1.6, label="descent")
    side.plot([0], [0], marker="^", color=INK, markerfacecolor="white", markersize=8, linestyle="none", label="pad")
    i_top = int(np.argmax(z))
    side.plot([x[i_top]], [z[i_top]], marker="o", color=INK, markerfacecolor="white", linestyle="none", label="apogee")
    side.plot([x[-1]], [z[-1]], marker="v", color=INK, markerfacecolor="white", markersize=8, linestyle="none",
              label=f"landing, {abs(x[-1]):.0f} {lu} away")
    wind = summary.get("wind_speed_m_s")
    span = max(float(x.max() - min(x.min(), 0.0)), 1.0)
    side.annotate("", xy=(float(x.min()) + 0.35 * span, top * 0.93), xytext=(float(x.min()), top * 0.93),
                  arrowprops={"arrowstyle": "-|>", "color": BLUE, "linewidth": 2})
    side.text(float(x.min()), top * 0.97, "wind" + (f" {units.quantity(float(wind), 'speed')}" if wind else "") + ", blowing this way",
              color=BLUE, fontsize=8, va="bottom")
    side.set_ylim(0, top)
    side.set_xlabel(f"distance along the wind from the pad ({lu}; + downwind)")
    side.set_ylabel(f"altitude ({lu})")
    side.grid(True)
    side.legend(fontsize=7.5, loc="upper center", bbox_to_anchor=(0.5, -0.14), ncol=3, frameon=False)
    side.set_title("Side view, with the wind", loc="left", fontsize=10, color=INK)
    fig.tight_layout()
    fig.text(0.01, -0.1, _CAUTION, fontsize=7, color=MUTED)
    out = _save(fig, path)
    plt.close(fig)
    return out


def curves_plot(records, path: str | os.PathLike[str], threshold: float = 0.05) -> Path:
    """Thrust curves overlaid on one chart, each with its burn window; every line and band is in the legend."""
    plt = _figure()
    fig, ax = plt.subplots(figsize=(8, 4.5))
    for k, record in enumerate(records):
        colour, style = _CYCLE[k % len(_CYCLE)]
        ax.plot(record.time_s, record.thrust_n, color=colour, linestyle=style, linewidth=1.8,
                label=f"{record.designation} ({record.maker or 'maker unknown'})")
        start, end = record.burn_window_s(threshold)
        ax.axvspan(start, end, color=colour, alpha=0.07, label=f"{record.designation}: burn window")
        ax.axhline(threshold * record.peak_thrust_n, color=colour, linestyle=":", linewidth=0.8,
                   label=f"{record.designation}: {100 * threshold:g} % of peak")
    ax.set_xlabel("time (s)")
    ax.set_ylabel("thrust (N)")
    ax.grid(True)
    ax.legend(fontsize=7.5, ncol=2 if len(records) > 2 else 1)
    ax.set_title(f"Thrust curves (burn window: thrust above {100 * threshold:g} % of peak)", loc="left", fontsize=10)
    out = _save(fig, path)
    plt.close(fig)
    return out


# Verdict -> (bar fill, hatch, mark); any other verdict is a failure: hatched orange, a cross and its reasons.
_VERDICT_BARS = {"pass": (BLUE, None, "✓"), "pass with ballast": (BLUE, "..", "✓ pass with ballast"),
                 "off target": ("white", "..", "off target")}


MATCH_PLOT_MOTORS: Final = 60  # bars a match chart draws at most (about 30 inches wide): the best, in rank order


def match_plot(result, path: str | os.PathLike[str], units: DisplayUnits = _METRIC) -> Path:
    """Apogee per flown motor in rank order: passing bars plain blue with a tick, failing bars hatched orange with a
    cross and their reason; values on the bars; target, tolerance band, ceiling and the region above it explained.

    At most :data:`MATCH_PLOT_MOTORS` motors, the first in rank order; the footnote says how many more were flown
    (a chart one bar per motor of a large catalog would be tens of thousands of pixels wide)."""
    plt = _figure()
    from matplotlib.patches import Patch

    every = [c for c in result.candidates if c.apogee_m is not None]
    flown = every[:MATCH_PLOT_MOTORS]
    fig, ax = plt.subplots(figsize=(max(6.5, 0.45 * len(flown) + 2.5), 5.0))
    unit = units.unit("length")
    scale = units.convert(1.0, "length", unit)
    flown = [replace(c, apogee_m=c.apogee_m * scale) for c in flown]  # shown in the display unit from here on
    target = result.conditions.get("target_m")
    ceiling = result.conditions.get("ceiling_m")
    target_at = target * scale if target else None  # where the lines go on the axis (display unit)
    ceiling_at = ceiling * scale if ceiling else None
    apogees = [c.apogee_m for c in flown]
    tolerance = result.conditions.get("target_tolerance", 0.05)
    top = max(apogees + [ceiling_at or 0.0, (target_at or 0.0) * (1 + tolerance), 1.0]) * 1.15
    handles = []
    if target:
        ax.axhspan((1 - tolerance) * target_at, (1 + tolerance) * target_at, color=BLUE_TINT, zorder=0)
        handles.append(Patch(facecolor=BLUE_TINT, label=f"within {tolerance * 100:g} % of the target"))
    if ceiling:
        ax.axhspan(ceiling_at, top, facecolor=ORANGE_TINT, hatch="xx", edgecolor=RULE, linewidth=0, zorder=0)
        handles.append(Patch(facecolor=ORANGE_TINT, hatch="xx", edgecolor=RULE, label="above the ceiling: not allowed"))
    for i, c in enumerate(flown):
        passes = c.passes
        fill, hatch, mark = _VERDICT_BARS.get(c.verdict, (ORANGE, "///", None))
        mark = mark or "✗ " + " ".join(dict.fromkeys(short_code(code, text)[0]  # the table's letters
                                                     for code, text in zip(c.reason_codes, c.reasons)))
        ax.bar(i, c.apogee_m, color=fill, hatch=hatch, edgecolor=INK, linewidth=0.8, zorder=2)
        ax.text(i, c.apogee_m + top * 0.01, f"{c.apogee_m:.0f}", ha="center", va="bottom", fontsize=7.5, color=INK)
        tall = c.apogee_m > top * (0.012 * len(mark) + 0.04)
        ax.text(i, (top * 0.015) if tall else c.apogee_m + top * 0.06, mark, ha="center", va="bottom",
                rotation=0 if passes else 90, fontsize=8, fontweight="bold", color="white" if passes else INK,
                zorder=3, bbox=None if passes else {"boxstyle": "square,pad=0.1", "fc": "white", "ec": "none", "alpha": 0.75})
    if target:
        ax.axhline(target_at, color=INK, linewidth=1.6, zorder=1)
        handles.append(plt.Line2D([], [], color=INK, linewidth=1.6, label=f"target {units.given(target, 'length')}"))
    if ceiling:
        ax.axhline(ceiling_at, color=INK, linestyle=":", linewidth=2.0, zorder=1)
        handles.append(plt.Line2D([], [], color=INK, linestyle=":", linewidth=2.0, label=f"ceiling {units.given(ceiling, 'length')}"))
    shown = {c.verdict for c in flown}
    for verdict, label in VERDICT_LEGEND.items():  # the verdict words of the table, report and JSON
        if verdict in shown or verdict in ("pass", "fail"):
            fill, hatch, _ = _VERDICT_BARS.get(verdict, (ORANGE, "///", None))
            handles.append(Patch(facecolor=fill, hatch=hatch, edgecolor=INK, label=f"{verdict}: {label}"))
    ax.set_xticks(range(len(flown)))
    ax.set_xticklabels([c.designation for c in flown], rotation=55, ha="right", fontsize=8)
    ax.set_ylim(0, top)
    ax.set_xlim(-0.6, len(flown) - 0.4)
    ax.set_ylabel(f"apogee above the pad ({unit})")
    order = "closeness to the target" if target else "apogee"
    ax.set_title(f"{result.airframe['name']}: apogee per motor, in rank order (passing first, then by {order})",
                 loc="left", fontsize=10)
    ax.legend(handles=handles, fontsize=7.5, loc="upper left", framealpha=0.95)
    ax.grid(axis="y")
    letters = dict(short_code(code, text) for c in flown if not c.passes
                   for code, text in zip(c.reason_codes, c.reasons))
    reasons = "; ".join(f"{letter} {meaning}" for letter, meaning in letters.items())
    more = len(every) - len(flown)
    fig.text(0.01, -0.09, f"Numbers: apogee in {unit}." + (f" Fail codes: {reasons}." if reasons else "")
             + (f" The {len(flown)} best of {len(every)} motors flown; the rest are in the table." if more else "")
             + " " + _CAUTION, fontsize=7, color=MUTED, wrap=True, va="top")
    out = _save(fig, path)
    plt.close(fig)
    return out


def reduction_plot(reduction, title: str, path: str | os.PathLike[str], burn_threshold: float = 0.05) -> Path:
    """Raw (tared), filtered and reduced thrust on one chart, with the ignition/burnout threshold, the burn-time
    threshold and the burn between ignition and burnout; every line and shaded region is in the legend."""
    plt = _figure()
    fig, ax = plt.subplots(figsize=(9, 4.8))
    ignition, burnout = 0.0, reduction.burnout_time_s - reduction.ignition_time_s
    ax.axvspan(ignition, burnout, color=ORANGE_TINT, zorder=0, label="between ignition and burnout")
    ax.plot(reduction.raw_time_s, reduction.raw_thrust_n, color=MUTED, linewidth=0.6, label="raw log (tared)")
    ax.plot(reduction.filtered_time_s, reduction.filtered_thrust_n, color=INK, linewidth=1.4,
            label="filtered" if reduction.cutoff_hz else "resampled (no filter)")
    ax.plot(reduction.time_s, reduction.thrust_n, "o--", color=BLUE, markersize=3, linewidth=1.0,
            label=f"reduced curve ({reduction.time_s.size} points)")
    ax.axhline(reduction.threshold_n, color=INK, linestyle=":", linewidth=1.0, label="ignition and burnout threshold")
    burn_level = burn_threshold * float(np.max(reduction.thrust_n))
    ax.axhline(burn_level, color=ORANGE, linestyle="-.", linewidth=1.2,
               label=f"burn-time threshold ({100 * burn_threshold:g} % of peak)")
    ax.set_xlabel("time from ignition (s)")
    ax.set_ylabel("thrust (N)")
    ax.set_title(title, loc="left", fontsize=10)
    ax.grid(True)
    ax.legend(fontsize=7.5)
    out = _save(fig, path)
    plt.close(fig)
    return out


def series_plot(reductions: list, title: str, path: str | os.PathLike[str]) -> Path:
    """Every firing of a test series from its own ignition (each its own line style), their mean and the band of
    ±1 standard deviation around it; every line and the band are in the legend."""
    plt = _figure()
    fig, ax = plt.subplots(figsize=(9, 4.8))
    end = max(float(r.filtered_time_s[-1]) for _, r in reductions)
    grid = np.linspace(0.0, end, 600)
    curves = np.array([np.interp(grid, r.filtered_time_s, r.filtered_thrust_n, left=0.0, right=0.0)
                       for _, r in reductions])
    mean, std = curves.mean(axis=0), curves.std(axis=0, ddof=1)
    ax.fill_between(grid, np.maximum(mean - std, 0.0), mean + std, color=BLUE_TINT, zorder=0,
                    label="mean ± 1 standard deviation")
    styles = ["-", "--", "-.", ":"]
    for k, (name, r) in enumerate(reductions):
        ax.plot(r.filtered_time_s, r.filtered_thrust_n, color=MUTED, linewidth=1.0, linestyle=styles[k % len(styles)],
                label=name)
    ax.plot(grid, mean, color=INK, linewidth=2.0, label=f"mean of {len(reductions)} firings")
    ax.set_xlabel("time from ignition (s)")
    ax.set_ylabel("thrust (N)")
    ax.set_title(title + " (each from its own ignition)", loc="left", fontsize=10)
    ax.set_xlim(0.0, end * 1.03)
    ax.set_ylim(0.0, float(curves.max()) * 1.12)
    ax.grid(True)
    ax.legend(fontsize=7.5)
    out = _save(fig, path)
    plt.close(fig)
    return out


# Grey levels (0 black, 1 white) that stay apart when printed in greyscale; line styles carry the rest.
_INK, _MID, _LIGHT, _FILL = "0.1", "0.45", "0.65", "0.88"
# Our own position markers: CG a diamond (filled at liftoff, hollow at burnout, a cross without motor), CP a
# downward triangle; each carries a text label, so the figure reads without a legend.
_CG_MARKS = {"no motor": ("X", _MID, _MID), "liftoff": ("D", _INK, _INK), "burnout": ("D", "white", _INK)}
_CP_MARK = ("v", _LIGHT, _INK)


def _fins_polygons(geometry, diameter_m: float) -> list[np.ndarray]:
    """Each fin's outline in the side view, (x, y) in m, fins projected onto the drawing plane."""
    from ..flight.geometry import diameter_at_m

    fins = geometry.fins
    if fins is None:
        return []
    x_le = geometry.fin_root_leading_edge_m
    root_r = float(diameter_at_m(geometry, diameter_m, x_le + fins.root_chord_m / 2.0)) / 2.0
    shapes = []
    for k in range(fins.count):
        lean = np.sin(np.pi / 2.0 + 2.0 * np.pi * k / fins.count)  # first fin straight up
        if abs(lean) < 0.05:  # edge-on to the viewer: a line along the body, not drawn
            continue
        inner, outer = root_r * lean, (root_r + fins.span_m) * lean
        shapes.append(np.array([(x_le, inner), (x_le + fins.root_chord_m, inner),
                                (x_le + fins.sweep_m + fins.tip_chord_m, outer), (x_le + fins.sweep_m, outer)]))
    return shapes


def _drag_panel(ax_cd, airframe, given: dict) -> None:
    """The lower panel of :func:`airframe_plot`: the estimated Cd against Mach, powered and coasting, beside
    the drag the airframe file gives (held constant beyond a table's ends, as the flight uses it)."""
    from ..flight.drag import drag_table_for

    mach, powered, coasting = drag_table_for(airframe)
    ax_cd.plot(mach, powered, color=_INK, linewidth=1.8, linestyle="-", label="estimate, motor burning")
    ax_cd.plot(mach, coasting, color=_MID, linewidth=1.8, linestyle="--", label="estimate, coasting")
    if given["drag_table"]:
        table = np.array(given["drag_table"])
        # held constant beyond the table's ends, as the flight uses it
        ax_cd.plot(np.concatenate(([0.0], table[:, 0], [mach[-1]])),
                   np.concatenate(([table[0, 1]], table[:, 1], [table[-1, 1]])), color=_LIGHT, linewidth=1.4,
                   linestyle=":", label="given in the airframe file")
        ax_cd.plot(table[:, 0], table[:, 1], color=_LIGHT, linestyle="none", marker="s", markersize=3)
    else:
        ax_cd.axhline(given["drag_coefficient"], color=_LIGHT, linewidth=1.4, linestyle=":",
                      label=f"given in the airframe file (Cd {given['drag_coefficient']:g})")
    ax_cd.set_xlabel("Mach number")
    ax_cd.set_ylabel("Cd (on the reference area)")
    ax_cd.set_xlim(0.0, float(mach[-1]))
    ax_cd.set_ylim(bottom=0.0)
    ax_cd.grid(alpha=0.3, color=_MID)
    ax_cd.legend(fontsize=8, loc="upper right")


def airframe_plot(airframe, summary: dict, path: str | os.PathLike[str], *, overwrite: bool = False,
                  units: DisplayUnits = _METRIC) -> Path:
    """The rocket's side profile to scale with its CG and CP marked, and the estimated Cd against Mach.

    ``summary`` is :func:`motorlib.flight.summary.airframe_summary`. CG and CP carry our own markers and text
    labels; the palette is grey levels with distinct line styles, so the chart survives greyscale printing.
    Lengths are drawn in ``units``' airframe size unit (mm, or inches in imperial; default metric).

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is False.
    """
    from ..flight.geometry import outline_m

    plt = _figure()
    g = airframe.geometry
    size_unit = units.unit("size")
    mm = units.convert(1.0, "size", size_unit)  # drawing units per metre (1000 for mm)
    places = 0 if size_unit == "mm" else 1
    x, r = outline_m(g, airframe.diameter_m)
    fig, (ax, ax_cd) = plt.subplots(2, 1, figsize=(10, 7.5), gridspec_kw={"height_ratios": [1.0, 1.3]})

    fins = _fins_polygons(g, airframe.diameter_m)
    for shape in fins:
        ax.fill(shape[:, 0] * mm, shape[:, 1] * mm, facecolor=_LIGHT, edgecolor=_INK, linewidth=1.0, zorder=1)
    ax.fill_between(x * mm, -r * mm, r * mm, facecolor=_FILL, edgecolor=_INK, linewidth=1.2, zorder=2)
    ax.plot([x[-1] * mm] * 2, [-r[-1] * mm, r[-1] * mm], color=_INK, linewidth=1.2, zorder=2)
    ax.axhline(0.0, color=_MID, linewidth=0.6, linestyle=(0, (8, 3, 2, 3)), zorder=3)
    motor = summary.get("motor")
    if motor and motor.get("length_m") and motor.get("diameter_m"):
        aft = g.length_m + g.motor_offset_m
        ax.add_patch(plt.Rectangle(((aft - motor["length_m"]) * mm, -motor["diameter_m"] / 2 * mm), motor["length_m"] * mm,
                                   motor["diameter_m"] * mm, facecolor="none", edgecolor=_MID, hatch="////",
                                   linewidth=0.8, zorder=3))

    reach = max([float(np.max(r))] + [float(np.max(np.abs(shape[:, 1]))) for shape in fins])  # body or fin tip
    marks: list[tuple[float, str, tuple[str, str, str]]] = [(summary["cg_empty_m"], "CG, no motor", _CG_MARKS["no motor"])]
    stab = summary.get("stability")
    if stab and stab.get("cg_liftoff_m") is not None:
        marks += [(stab["cg_liftoff_m"], "CG liftoff", _CG_MARKS["liftoff"]),
                  (stab["cg_burnout_m"], "CG burnout", _CG_MARKS["burnout"])]
    # labels: the CGs in one row above the rocket, spread apart along it and joined to their markers by
    # thin leaders; the CP below
    y_row = reach * 1.6 * mm
    gap = 0.13 * g.length_m
    marks.sort(key=lambda m: m[0])
    spots: list[float] = []
    for position, *_ in marks:
        spots.append(position if not spots else max(position, spots[-1] + gap))
    shift = (sum(m[0] for m in marks) - sum(spots)) / len(spots)  # keep the row centred on its markers
    for (position, label, (marker, face, edge)), spot in zip(marks, spots):
        ax.plot([position * mm], [0.0], marker=marker, markersize=9, markerfacecolor=face, markeredgecolor=edge,
                linestyle="none", zorder=5)
        ax.annotate(f"{label}\n{position * mm:.{places}f} {size_unit}", xy=(position * mm, 0.0), xytext=((spot + shift) * mm, y_row),
                    ha="center", va="bottom", fontsize=8, color=_INK, zorder=6,
                    arrowprops={"arrowstyle": "-", "color": edge, "linewidth": 0.7, "linestyle": ":",
                                "shrinkA": 0, "shrinkB": 6})
    marker, face, edge = _CP_MARK
    cp = summary["cp_m"]
    ax.plot([cp * mm], [0.0], marker=marker, markersize=10, markerfacecolor=face, markeredgecolor=edge,
            linestyle="none", zorder=5)
    ax.annotate(f"CP (subsonic)\n{cp * mm:.{places}f} {size_unit}", xy=(cp * mm, 0.0), xytext=(cp * mm, -y_row), ha="center",
                va="top", fontsize=8, color=_INK, zorder=6,
                arrowprops={"arrowstyle": "-", "color": edge, "linewidth": 0.7, "linestyle": ":", "shrinkA": 0,
                            "shrinkB": 2})

    ax.set_xlim(-0.03 * g.length_m * mm, (g.length_m + max(g.motor_offset_m, 0.0) + 0.03 * g.length_m) * mm)
    ax.set_ylim(-y_row - reach * 1.2 * mm, y_row + reach * 1.2 * mm)
    ax.set_aspect("equal")
    ax.set_xlabel(f"distance from the nose tip ({size_unit})")
    ax.set_ylabel(size_unit)
    margin = stab.get("min_margin_cal") if stab else summary["margin_empty_cal"]
    what = f"with {motor['designation']}, smallest powered margin" if stab else "margin without motor"
    ax.set_title(f"{summary['airframe']}: side profile to scale; {what} "
                 + ("unknown" if margin is None else f"{margin:.2f} cal"), fontsize=10)

    _drag_panel(ax_cd, airframe, summary["drag_given"])
    fig.tight_layout()
    fig.text(0.01, 0.002, _CAUTION, fontsize=7, color=_MID)
    try:
        out = _save(fig, path, overwrite=overwrite)
    finally:
        plt.close(fig)
    return out


# Our own palette for dispersion charts: ink for data, a warm accent for limits, a cool one for targets.
_INK = "#2f3e46"
_POINTS = "#52796f"
_LIMIT = "#bc4749"
_TARGET = "#386fa4"
_ZONE = "#84a98c"
_LENGTH_UNITS = {"metric": ("m", 1.0), "si": ("m", 1.0), "imperial": ("ft", 0.3048)}  # international foot, exact


def scatter_plot(summary: dict, flights: dict[str, np.ndarray], title: str, path: str | os.PathLike[str],
                 units: DisplayUnits | str = _METRIC) -> Path:
    """Apogee histogram with target and ceiling; landing map with the pad, field circle, points and 95 % ellipse."""
    plt = _figure()
    unit, factor = _LENGTH_UNITS[getattr(units, "system", units)]
    fig, (hist, ground) = plt.subplots(1, 2, figsize=(12, 5.2))
    apogee = flights["apogee_m"][np.isfinite(flights["apogee_m"])] / factor
    if apogee.size:
        hist.hist(apogee, bins=min(60, max(10, apogee.size // 40)), color=_POINTS, alpha=0.85, edgecolor="white")
    a = summary["apogee_m"]
    for key, style in (("p5", ":"), ("p50", "-"), ("p95", ":")):
        if a.get(key) is not None:
            hist.axvline(a[key] / factor, color=_INK, linestyle=style, linewidth=1,
                         label="median" if key == "p50" else ("5 % / 95 %" if key == "p5" else None))
    if summary.get("target_m") is not None:
        hist.axvline(summary["target_m"] / factor, color=_TARGET, linewidth=2, label="target")
    if summary.get("ceiling_m") is not None:
        hist.axvline(summary["ceiling_m"] / factor, color=_LIMIT, linewidth=2, label="ceiling")
    hist.set_xlabel(f"apogee ({unit})")
    hist.set_ylabel("flights")
    hist.legend(fontsize=8)
    hist.grid(alpha=0.25)
    east, north = flights["landing_east_m"] / factor, flights["landing_north_m"] / factor
    ok = np.isfinite(east) & np.isfinite(north)
    ground.scatter(east[ok], north[ok], s=4, color=_POINTS, alpha=0.4, linewidths=0, label="landing points")
    ground.plot([0.0], [0.0], marker="^", color=_INK, markersize=9, linestyle="none", label="pad")
    radius = summary.get("field_radius_m")
    if radius is not None:
        angle = np.linspace(0.0, 2.0 * np.pi, 361)
        ground.plot(radius / factor * np.sin(angle), radius / factor * np.cos(angle), color=_LIMIT, linewidth=1.5,
                    label="field")
    e = summary["landing"]["ellipse95"]
    if e:
        angle = np.linspace(0.0, 2.0 * np.pi, 361)
        theta = np.radians(e["orientation_deg"])  # major axis azimuth, clockwise from north
        along, across = e["semi_major_m"] * np.cos(angle), e["semi_minor_m"] * np.sin(angle)
        ground.plot((e["east_m"] + along * np.sin(theta) + across * np.cos(theta)) / factor,
                    (e["north_m"] + along * np.cos(theta) - across * np.sin(theta)) / factor,
                    color=_ZONE, linewidth=2, label="95 % ellipse")
    ground.set_aspect("equal", adjustable="datalim")
    ground.set_xlabel(f"east ({unit})")
    ground.set_ylabel(f"north ({unit})")
    ground.legend(fontsize=8, loc="best")
    ground.grid(alpha=0.25)
    fig.suptitle(f"{title}: {summary['n_flights']} sampled flights")
    return _finish(plt, fig, path)


def calibration_plot(result: dict, kind: str, title: str, path: str | os.PathLike[str],
                     track: tuple[np.ndarray, np.ndarray] | None = None) -> Path:
    """Measured against simulated: a log with the fitted coast and the whole simulated flight, or apogees per flight."""
    plt = _figure()
    label = "drag scale" if kind == "drag_scale" else "Cd"
    fit_text = f"fitted {label} {result[kind]:.4g} ± {result['uncertainty']:.2g}"
    if "measured" in result:
        fig, (top, bottom) = plt.subplots(2, 1, sharex=True, figsize=(9, 7), gridspec_kw={"height_ratios": [3, 1]})
        top.plot(result["measured"]["time_s"], result["measured"]["altitude_m"], ".", color=_POINTS, markersize=2,
                 label="altimeter log")
        if track is not None:
            top.plot(track[0], track[1], color=_TARGET, linewidth=1, label="simulated flight, fitted drag")
        top.plot(result["model_time_s"], result["model_altitude_m"], color=_LIMIT, linewidth=2, label="fitted coast")
        for key, colour in (("liftoff_time_s", _INK), ("burnout_time_s", _ZONE), ("apogee_time_s", _LIMIT)):
            top.axvline(result["events"][key], color=colour, linestyle=":", linewidth=1)
        measured_t = result["measured"]["time_s"]
        top.set_xlim(float(measured_t[0]), float(measured_t[-1]))  # the simulated descent may outlast the log
        top.set_ylabel("height above the pad (m)")
        top.legend(fontsize=8)
        top.grid(alpha=0.25)
        top.set_title(f"{title}: {fit_text}")
        bottom.plot(result["model_time_s"], result["residuals_m"], ".", color=_INK, markersize=2)
        bottom.axhline(0.0, color=_LIMIT, linewidth=1)
        bottom.set_ylabel("residual (m)")
        bottom.set_xlabel("time (s, log clock)")
        bottom.grid(alpha=0.25)
    else:
        fig, ax = plt.subplots(figsize=(8, 5))
        x = np.arange(len(result["measured_m"]))
        ax.errorbar(x, result["measured_m"], yerr=result["apogee_std_m"], fmt="o", color=_POINTS, label="measured")
        ax.plot(x, result["simulated_m"], "x", color=_LIMIT, markersize=9, label="simulated, fitted drag")
        ax.set_xticks(x, result["labels"], rotation=30, ha="right")
        ax.set_ylabel("apogee (m)")
        ax.legend(fontsize=8)
        ax.grid(alpha=0.25)
        ax.set_title(f"{title}: {fit_text}")
    return _finish(plt, fig, path)
