"""Charts as PNG files (matplotlib, imported only when a plot is asked for). Files are written atomically."""

from __future__ import annotations

import io
import os
from pathlib import Path

import numpy as np

from ..files.fsio import write_atomic
from .display import DisplayUnits

__all__ = ["curves_plot", "flight_plot", "match_plot", "reduction_plot"]

_METRIC = DisplayUnits()


def _figure():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    return plt


def _save(fig, path: str | os.PathLike[str]) -> Path:
    buffer = io.BytesIO()
    fig.savefig(buffer, format="png", dpi=110, bbox_inches="tight")
    return write_atomic(path, buffer.getvalue())


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
