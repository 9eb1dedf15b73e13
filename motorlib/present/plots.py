"""Charts as PNG files (matplotlib, imported only when a plot is asked for). Files are written atomically."""

from __future__ import annotations

import io
import os
from pathlib import Path

import numpy as np

from ..files.fsio import write_atomic
from .display import DisplayUnits

__all__ = ["airframe_plot", "curves_plot", "flight_plot", "match_plot", "reduction_plot"]

_METRIC = DisplayUnits()


def _figure():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    return plt


def _save(fig, path: str | os.PathLike[str], *, overwrite: bool = True) -> Path:
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=110, bbox_inches="tight")
    return write_atomic(path, buffer.getvalue(), overwrite=overwrite)


def flight_plot(trajectory: dict[str, np.ndarray], summary: dict[str, object], title: str,
                path: str | os.PathLike[str], units: DisplayUnits = _METRIC) -> Path:
    """Altitude, speed and acceleration against time, with rail exit, burnout, apogee and deployment marked."""
    plt = _figure()
    t = trajectory["time_s"]
    speed = np.hypot(trajectory["vx_m_s"], trajectory["vz_m_s"])
    accel = np.hypot(trajectory["ax_m_s2"], trajectory["az_m_s2"])
    fig, axes = plt.subplots(3, 1, sharex=True, figsize=(8, 8))
    panels = ((axes[0], trajectory["altitude_m"], "altitude", "length"), (axes[1], speed, "speed", "speed"),
              (axes[2], accel, "acceleration", "acceleration"))
    for ax, values, label, kind in panels:
        unit = units.unit(kind)
        ax.plot(t, np.asarray(values) * units.convert(1.0, kind, unit), color="tab:blue")  # linear kinds only
        ax.set_ylabel(f"{label} ({unit})")
        ax.grid(alpha=0.3)
        for key, name, colour in (("rail_exit_time_s", "rail exit", "tab:green"), ("burnout_time_s", "burnout", "tab:orange"),
                                  ("time_to_apogee_s", "apogee", "tab:red"), ("deploy_time_s", "deployment", "tab:purple")):
            value = summary.get(key)
            if value is not None:
                ax.axvline(float(value), color=colour, linestyle="--", linewidth=1, label=name)
    axes[0].legend(loc="upper right", fontsize=8)
    axes[2].set_xlabel("time from ignition (s)")
    axes[0].set_title(title)
    fig.text(0.01, 0.005, "Predictions are estimates; the range safety officer decides.", fontsize=7, color="gray")
    out = _save(fig, path)
    plt.close(fig)
    return out


def curves_plot(records, path: str | os.PathLike[str], threshold: float = 0.05) -> Path:
    """Thrust curves overlaid on one chart, each with its burn window marked."""
    plt = _figure()
    fig, ax = plt.subplots(figsize=(8, 4.5))
    for record in records:
        line, = ax.plot(record.time_s, record.thrust_n, label=f"{record.designation} ({record.maker})")
        start, end = record.burn_window_s(threshold)
        ax.axvspan(start, end, color=line.get_color(), alpha=0.06)
        ax.axhline(threshold * record.peak_thrust_n, color=line.get_color(), linestyle=":", linewidth=0.8)
    ax.set_xlabel("time (s)")
    ax.set_ylabel("thrust (N)")
    ax.grid(alpha=0.3)
    ax.legend(fontsize=8)
    ax.set_title(f"Thrust curves (shaded: burn window, thrust above {100 * threshold:g} % of peak)")
    out = _save(fig, path)
    plt.close(fig)
    return out


def match_plot(result, path: str | os.PathLike[str], units: DisplayUnits = _METRIC) -> Path:
    """Apogee of every flown candidate against the target and ceiling bands (pass green, fail red).

    Target and ceiling are labelled as the user gave them; the axis is in the display unit of length.
    """
    plt = _figure()
    flown = [c for c in result.candidates if c["apogee_m"] is not None]
    fig, ax = plt.subplots(figsize=(max(6.0, 0.35 * len(flown) + 2), 4.8))
    unit = units.unit("length")
    scale = units.convert(1.0, "length", unit)
    names = [c["designation"] for c in flown]
    colours = ["tab:green" if c["passes"] else "tab:red" for c in flown]
    ax.bar(range(len(flown)), [c["apogee_m"] * scale for c in flown], color=colours)
    target = result.conditions.get("target_m")
    ceiling = result.conditions.get("ceiling_m")
    if target:
        ax.axhline(target * scale, color="tab:blue", linewidth=1.5, label=f"target {units.given(target, 'length')}")
        ax.axhspan(0.95 * target * scale, 1.05 * target * scale, color="tab:blue", alpha=0.12, label="target ± 5 %")
    if ceiling:
        ax.axhline(ceiling * scale, color="black", linestyle="--", linewidth=1.2,
                   label=f"ceiling {units.given(ceiling, 'length')}")
        top = max([c["apogee_m"] for c in flown] + [ceiling]) * 1.05 * scale
        ax.axhspan(ceiling * scale, top, color="black", alpha=0.07)
    ax.set_xticks(range(len(flown)))
    ax.set_xticklabels(names, rotation=60, ha="right", fontsize=8)
    ax.set_ylabel(f"apogee ({unit} above the pad)")
    ax.set_title(f"{result.airframe['name']}: apogee per motor (green passes every rule)")
    if target or ceiling:
        ax.legend(fontsize=8)
    ax.grid(axis="y", alpha=0.3)
    fig.text(0.01, -0.06, "Predictions are estimates; the range safety officer decides.", fontsize=7, color="gray")
    out = _save(fig, path)
    plt.close(fig)
    return out


def reduction_plot(reduction, title: str, path: str | os.PathLike[str], burn_threshold: float = 0.05) -> Path:
    """Raw (tared), filtered and reduced thrust on one chart, with ignition, burnout and burn-time thresholds."""
    plt = _figure()
    fig, ax = plt.subplots(figsize=(9, 4.8))
    ax.plot(reduction.raw_time_s, reduction.raw_thrust_n, color="0.7", linewidth=0.6, label="raw (tared)")
    ax.plot(reduction.filtered_time_s, reduction.filtered_thrust_n, color="tab:blue", linewidth=1.0,
            label="filtered" if reduction.cutoff_hz else "resampled (no filter)")
    ax.plot(reduction.time_s, reduction.thrust_n, "o-", color="tab:red", markersize=3, linewidth=1.0,
            label=f"reduced ({reduction.time_s.size} points)")
    ax.axhline(reduction.threshold_n, color="tab:green", linestyle="--", linewidth=0.8, label="ignition/burnout threshold")
    burn_level = burn_threshold * float(np.max(reduction.thrust_n))
    ax.axhline(burn_level, color="tab:purple", linestyle=":", linewidth=0.8, label=f"burn-time threshold ({100 * burn_threshold:g} % of peak)")
    ax.axvline(0.0, color="tab:green", linewidth=0.8)
    ax.axvline(reduction.burnout_time_s - reduction.ignition_time_s, color="tab:green", linewidth=0.8)
    ax.set_xlabel("time from ignition (s)")
    ax.set_ylabel("thrust (N)")
    ax.set_title(title)
    ax.grid(alpha=0.3)
    ax.legend(fontsize=8)
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


def airframe_plot(airframe, summary: dict, path: str | os.PathLike[str], *, overwrite: bool = False) -> Path:
    """The rocket's side profile to scale with its CG and CP marked, and the estimated Cd against Mach.

    ``summary`` is :func:`motorlib.flight.summary.airframe_summary`. CG and CP carry our own markers and text
    labels; the palette is grey levels with distinct line styles, so the chart survives greyscale printing.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is False.
    """
    from ..flight.drag import drag_table_for
    from ..flight.geometry import outline_m

    plt = _figure()
    g = airframe.geometry
    mm = 1e3
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
        ax.annotate(f"{label}\n{position * mm:.0f} mm", xy=(position * mm, 0.0), xytext=((spot + shift) * mm, y_row),
                    ha="center", va="bottom", fontsize=8, color=_INK, zorder=6,
                    arrowprops={"arrowstyle": "-", "color": edge, "linewidth": 0.7, "linestyle": ":",
                                "shrinkA": 0, "shrinkB": 6})
    marker, face, edge = _CP_MARK
    cp = summary["cp_m"]
    ax.plot([cp * mm], [0.0], marker=marker, markersize=10, markerfacecolor=face, markeredgecolor=edge,
            linestyle="none", zorder=5)
    ax.annotate(f"CP (subsonic)\n{cp * mm:.0f} mm", xy=(cp * mm, 0.0), xytext=(cp * mm, -y_row), ha="center",
                va="top", fontsize=8, color=_INK, zorder=6,
                arrowprops={"arrowstyle": "-", "color": edge, "linewidth": 0.7, "linestyle": ":", "shrinkA": 0,
                            "shrinkB": 2})

    ax.set_xlim(-0.03 * g.length_m * mm, (g.length_m + max(g.motor_offset_m, 0.0) + 0.03 * g.length_m) * mm)
    ax.set_ylim(-y_row - reach * 1.2 * mm, y_row + reach * 1.2 * mm)
    ax.set_aspect("equal")
    ax.set_xlabel("distance from the nose tip (mm)")
    ax.set_ylabel("mm")
    margin = stab.get("min_margin_cal") if stab else summary["margin_empty_cal"]
    what = f"with {motor['designation']}, smallest powered margin" if stab else "margin without motor"
    ax.set_title(f"{summary['airframe']}: side profile to scale; {what} "
                 + ("unknown" if margin is None else f"{margin:.2f} cal"), fontsize=10)

    mach, powered, coasting = drag_table_for(airframe)
    ax_cd.plot(mach, powered, color=_INK, linewidth=1.8, linestyle="-", label="estimate, motor burning")
    ax_cd.plot(mach, coasting, color=_MID, linewidth=1.8, linestyle="--", label="estimate, coasting")
    given = summary["drag_given"]
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
    fig.tight_layout()
    fig.text(0.01, 0.002, "Predictions are estimates; the range safety officer decides.", fontsize=7, color=_MID)
    try:
        out = _save(fig, path, overwrite=overwrite)
    finally:
        plt.close(fig)
    return out
