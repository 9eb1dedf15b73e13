"""Rich renderings of dispersion results (``scatter``, ``match --robust``) and drag calibrations, in display units."""

from __future__ import annotations

from typing import Any

from rich.console import Group
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from .display import DisplayUnits

__all__ = ["calibration_text", "robust_table", "scatter_text"]


def _percent(p: float | None, se: float | None = None) -> str:
    if p is None:
        return "-"
    return f"{100 * p:.1f} %" + (f" ± {100 * se:.1f}" if se is not None else "")


def _units(units: DisplayUnits | str) -> DisplayUnits:
    return units if isinstance(units, DisplayUnits) else DisplayUnits(units)


def _triple(block: dict[str, Any], kind: str, u: DisplayUnits) -> list[str]:
    return [u.quantity(block.get(k), kind) for k in ("p5", "p50", "p95")]


def scatter_text(summary: dict[str, Any], units: DisplayUnits | str = "metric") -> Group:
    """Percentile table, probabilities and the landing ellipse of one ``scatter`` run."""
    u = _units(units)
    title = f"{summary['airframe']} with {summary['motor']}: {summary['n_flights']} sampled flights (seed {summary['seed']})"
    table = Table(title=escape(title), title_justify="left")
    for name in ("", "5 %", "50 %", "95 %"):
        table.add_column(name, justify="right" if name else "left")
    a = summary["apogee_m"]
    table.add_row("apogee", *_triple(a, "length", u))
    table.add_row("deployment speed", *_triple(summary["deploy_speed_m_s"], "speed", u))
    table.add_row("landing speed", *_triple(summary["landing_speed_m_s"], "speed", u))
    table.add_row("landing distance", *_triple(summary["landing"]["distance_m"], "length", u))
    table.add_row("flight duration (s)", *[f"{v:.4g}" if v is not None else "-"
                                           for v in (summary["flight_duration_s"].get(k) for k in ("p5", "p50", "p95"))])
    stability = summary.get("stability")
    if stability:
        table.add_row("stability margin (cal)", *[f"{v:.3g}" if v is not None else "-"
                                                  for v in (stability["margin_cal"].get(k) for k in ("p5", "p50", "p95"))])
    lines = Text()
    lines.append(f"Mean apogee {u.quantity(a['mean'], 'length')} ± {u.quantity(a['standard_error'], 'length')} "
                 f"(standard error), standard deviation {u.quantity(a['std'], 'length')}; nominal "
                 f"{u.quantity(summary.get('nominal_apogee_m'), 'length')}.\n")
    if summary.get("delay_s") is not None:
        lines.append(f"Ejection delay {summary['delay_s']:g} s, fitted before the flight.\n")
    if summary.get("ceiling_m") is not None:
        lines.append(f"Over the ceiling ({u.quantity(summary['ceiling_m'], 'length')}): "
                     f"{_percent(summary['p_over_ceiling'], summary['p_over_ceiling_standard_error'])}\n")
    lines.append(f"Deployment above {u.quantity(summary['max_deploy_speed_m_s'], 'speed')}: "
                 + (_percent(summary["p_deploy_too_fast"], summary["p_deploy_too_fast_standard_error"])
                    if summary["p_deploy_too_fast"] is not None else "not known for this deployment") + "\n")
    if summary.get("field_radius_m") is not None:
        lines.append(f"Landing outside the field ({u.quantity(summary['field_radius_m'], 'length')} radius): "
                     f"{_percent(summary['p_outside_field'], summary['p_outside_field_standard_error'])}\n")
    if stability:
        lines.append(f"Stability margin under {stability['min_margin_cal']:g} cal: "
                     f"{_percent(stability['p_under_min_margin'], stability['p_under_min_margin_standard_error'])}\n")
    e = summary["landing"]["ellipse95"]
    if e:
        lines.append(f"95 % landing ellipse: centre {u.quantity(e['east_m'], 'length')} east, "
                     f"{u.quantity(e['north_m'], 'length')} north; semi-axes {u.quantity(e['semi_major_m'], 'length')}"
                     f" × {u.quantity(e['semi_minor_m'], 'length')}, major axis at {e['orientation_deg']:.0f} deg "
                     "from north.\n")
    if summary.get("firing_spread"):
        f = summary["firing_spread"]
        lines.append(f"Motor spread measured over {f['n_firings']} firings ({f['source']}): impulse "
                     f"{100 * f['total_impulse_relative_std']:.1f} %, burn time {100 * f['burn_time_relative_std']:.1f} %.\n")
    if summary["n_failed"]:
        lines.append(f"{summary['n_failed']} sampled flight(s) failed (no liftoff, stuck on the rail, step limit).\n",
                     style="yellow")
    lines.append(f"Landing model: {summary.get('landing_model', '')}.\n", style="dim")
    return Group(table, lines)


def robust_table(result: dict[str, Any], units: DisplayUnits | str = "metric", top: int | None = None) -> Table:
    """Candidates by their probability of meeting every rule and window (``match --robust``)."""
    rows = result["candidates"][:top] if top else result["candidates"]
    table = Table(title=f"Robust ranking: {result['n_samples']} sampled flights per motor (seed {result['seed']})",
                  title_justify="left")
    u = _units(units)
    length = u.unit("length")
    for name in ("#", "motor", "maker", "P(success)", "± s.e.", f"apogee 5-95 % ({length})", "delay (s)", "main failure"):
        table.add_column(name, justify="left" if name in ("motor", "maker", "main failure") else "right")
    for i, c in enumerate(rows, start=1):
        a = c["apogee_m"]
        spread = "-" if a["p5"] is None else f"{u.number(a['p5'], 'length', 0)}-{u.number(a['p95'], 'length', 0)}"
        failure = max(c["failures"].items(), key=lambda kv: kv[1])[0] if c["failures"] and max(c["failures"].values()) > 0 else ""
        table.add_row(str(i), escape(c["designation"]), escape(c["maker"] or ""), _percent(c["p_success"]),
                      f"{100 * c['p_success_standard_error']:.1f}" if c["p_success_standard_error"] is not None else "-",
                      spread, f"{c['delay_s']:g}" if c["delay_s"] is not None else "-", failure)
    return table


def calibration_text(result: dict[str, Any]) -> Text:
    """The fitted drag with its uncertainty and the residuals."""
    text = Text()
    if "drag_scale" in result:
        text.append(f"Drag scale on the Cd(Mach) table: {result['drag_scale']:.4f} ± {result['uncertainty']:.4f}\n")
    else:
        text.append(f"Drag coefficient: {result['drag_coefficient']:.4f} ± {result['uncertainty']:.4f}\n")
    for label, r in zip(result.get("labels", []), result["residuals_m"]):
        text.append(f"  {escape(str(label))}: residual {r:+.2f} m\n")
    if result.get("rms_residual_m") is not None:
        text.append(f"RMS residual {result['rms_residual_m']:.2f} m over {result.get('n_points', len(result['residuals_m']))} "
                    "point(s).\n")
    for note in result.get("notes", []):
        text.append(note + "\n", style="dim")
    return text
