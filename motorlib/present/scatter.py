"""Rich renderings of dispersion results (``scatter``, ``match --robust``) and drag calibrations, in display units."""

from __future__ import annotations

from typing import Any

from rich.console import Group
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from .display import DisplayUnits
from .messages import motor_names, short_code

__all__ = ["calibration_text", "robust_key", "robust_table", "scatter_text"]


def _percent(p: float | None, se: float | None = None) -> str:
    if p is None:
        return "-"
    return f"{100 * p:.1f} %" + (f" ± {100 * se:.1f}" if se is not None else "")


def _units(units: DisplayUnits | str) -> DisplayUnits:
    return units if isinstance(units, DisplayUnits) else DisplayUnits(units)


def _offset(u: DisplayUnits, value_m: float, positive: str, negative: str) -> str:
    """A signed offset in words: ``373 m south`` rather than ``-373 m north``."""
    return f"{u.quantity(abs(value_m), 'length')} {positive if value_m >= 0 else negative}"


def _triple(block: dict[str, Any], kind: str, u: DisplayUnits) -> list[str]:
    return [u.quantity(block.get(k), kind) for k in ("p5", "p50", "p95")]


def scatter_text(summary: dict[str, Any], units: DisplayUnits | str = "metric", *, devices_listed: bool = True
                 ) -> Group:
    """Percentile table, probabilities and the landing ellipse of one ``scatter`` run; ``devices_listed`` False (the
    airframe lists no recovery device) leaves out the opening figures, since nothing opens (the charge's speed is
    still judged by the rule book, and a broken rule is listed with the others)."""
    u = _units(units)
    from .tables import _table

    table = _table(f"{summary['airframe']} with {summary['motor']}")
    for name in ("", "5 %", "50 %", "95 %"):
        table.add_column(name, justify="right" if name else "left")
    a = summary["apogee_m"]
    table.add_row("apogee", *_triple(a, "length", u))
    if devices_listed:
        table.add_row("opening air speed", *_triple(summary["deploy_speed_m_s"], "speed", u))
    table.add_row("descent rate at landing", *_triple(summary["landing_speed_m_s"], "speed", u))
    table.add_row("landing distance", *_triple(summary["landing"]["distance_m"], "length", u))
    table.add_row("flight duration", *[u.quantity(summary["flight_duration_s"].get(k), "time", 1)
                                       for k in ("p5", "p50", "p95")])
    stability = summary.get("stability")
    if stability:  # margins with two decimals, as fly and match give them
        table.add_row("stability margin", *[f"{v:.2f} cal" if v is not None else "-"
                                            for v in (stability["margin_cal"].get(k) for k in ("p5", "p50", "p95"))])
    lines = Text()
    lines.append(f"{summary['n_flights']} sampled flights (seed {summary['seed']}). ")
    lines.append(f"Mean apogee {u.quantity(a['mean'], 'length')} ± {u.precise(a['standard_error'], 'length', 2)} "
                 f"(standard error), standard deviation {u.quantity(a['std'], 'length')}; nominal "
                 f"{u.quantity(summary.get('nominal_apogee_m'), 'length')}.\n")
    if summary.get("delay_s") is not None:
        lines.append(f"Ejection delay {summary['delay_s']:g} s, fitted before the flight.\n")
    if summary.get("ceiling_m") is not None:
        lines.append(f"Over the ceiling ({u.quantity(summary['ceiling_m'], 'length')}): "
                     f"{_percent(summary['p_over_ceiling'], summary['p_over_ceiling_standard_error'])}\n")
    limit = summary.get("max_deploy_speed_m_s")
    if not devices_listed:
        lines.append("No recovery device listed: nothing opens, and the rocket falls ballistically.\n", style="yellow")
    else:
        lines.append(f"Deployment above {u.quantity(limit, 'speed') if limit is not None else 'its device kind' + chr(39) + 's limit'}: "
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
        lines.append(f"95 % landing ellipse: centre {_offset(u, e['east_m'], 'east', 'west')}, "
                     f"{_offset(u, e['north_m'], 'north', 'south')} of the pad; semi-axes "
                     f"{u.quantity(e['semi_major_m'], 'length')}"
                     f" × {u.quantity(e['semi_minor_m'], 'length')}, major axis at {e['orientation_deg']:.0f} deg "
                     "from north.\n")
    if summary.get("firing_spread"):
        f = summary["firing_spread"]
        lines.append(f"Motor spread measured over {f['n_firings']} firings ({f['source']}): impulse "
                     f"{100 * f['total_impulse_relative_std']:.1f} %, burn time {100 * f['burn_time_relative_std']:.1f} %.\n")
    broken = [(short_code(code, "")[1], share) for code, share in (summary.get("failures") or {}).items() if share > 0]
    if broken:  # the rule book's failures, as fly would warn of them flight by flight
        lines.append("Launch rules broken (share of the flights): "
                     + "; ".join(f"{meaning} {_percent(share)}" for meaning, share in broken) + ".\n")
    if summary["n_failed"]:
        lines.append(f"{summary['n_failed']} sampled flight(s) failed (no liftoff, stuck on the rail, step limit).\n",
                     style="yellow")
    spread = uncertainty_text(summary.get("uncertainty") or {}, u)
    if spread:
        lines.append(f"Sampled spreads (one standard deviation): {spread}.\n", style="dim")
    lines.append(f"Landing model: {summary.get('landing_model', '')}.\n", style="dim")
    return Group(table, lines)


def uncertainty_text(spreads: dict[str, float], u: DisplayUnits) -> str:
    """The non-zero spreads of a sampled experiment (the ``uncertainty`` of its JSON), in the display units:
    ``impulse 3 %, ..., wind 1 m/s, wind direction 20 deg, CG 10 mm``. Empty when none is set."""
    import math

    words = {"total_impulse_relative_std": "impulse", "burn_time_relative_std": "burn time",
             "airframe_mass_relative_std": "airframe mass", "motor_mass_relative_std": "motor mass",
             "drag_relative_std": "drag", "wind_speed_std_m_s": "wind", "wind_direction_std_rad": "wind direction",
             "rail_angle_std_rad": "rail angle", "rail_azimuth_std_rad": "rail azimuth",
             "pad_temperature_std_k": "pad temperature", "cg_std_m": "CG", "deploy_altitude_std_m": "deployment altitude"}
    parts = []
    for key, word in words.items():
        value = spreads.get(key)
        if not value:
            continue
        if key.endswith("_relative_std"):
            text = f"{100 * value:.3g} %"
        elif key.endswith("_rad"):
            text = f"{math.degrees(value):.3g} deg"
        elif key == "pad_temperature_std_k":
            text = f"{value:.3g} K"
        else:  # as given: three significant digits at most, in the display unit
            kind = "size" if key == "cg_std_m" else "speed" if key.endswith("_m_s") else "length"
            text = f"{u.convert(value, kind):.3g} {u.unit(kind)}"
        parts.append(f"{word} {text}")
    return ", ".join(parts)


def robust_table(result: dict[str, Any], units: DisplayUnits | str = "metric", top: int | None = None,
                 width: int = 80) -> Table:
    """Candidates by their probability of meeting every rule and window (``match --robust``).

    In the one table style of :mod:`.tables`; the maker column appears from ``WIDE`` columns on, and only it
    gives way on a narrow terminal.
    """
    from .tables import WIDE, _lock_widths, _table

    u = _units(units)
    rows = result["candidates"][:top] if top else result["candidates"]
    table = _table(f"{result['airframe'] + ': r' if result.get('airframe') else 'R'}obust ranking: "
                   f"{result['n_samples']} sampled flights per motor (seed {result['seed']})")
    wide = width >= WIDE
    table.add_column("#", justify="right", no_wrap=True)
    table.add_column("motor", no_wrap=True)
    if wide:
        table.add_column("maker", no_wrap=True, overflow="ellipsis", min_width=8)
    table.add_column("success\n(%)", justify="right", no_wrap=True)
    table.add_column("±\n(s.e.)", justify="right", no_wrap=True)
    table.add_column(f"apogee 5-95 %\n({u.unit('length')})", justify="right", no_wrap=True)
    table.add_column("delay\n(s)", justify="right", no_wrap=True)
    table.add_column("most failed", no_wrap=True)
    names = motor_names([(c["designation"], c["maker"]) for c in rows], wide,
                        among=[(c["designation"], c["maker"]) for c in result["candidates"]])
    for i, (c, name) in enumerate(zip(rows, names), start=1):
        a = c["apogee_m"]
        spread = "-" if a["p5"] is None else f"{u.number(a['p5'], 'length', 0)}-{u.number(a['p95'], 'length', 0)}"
        worst = _most_failed(c)
        failure = f"{short_code(worst[0], '')[0]} {100 * worst[1]:.0f} %" if worst[1] > 0 else ""
        se = c["p_success_standard_error"]
        cells = [str(i), escape(name)] + ([escape(c["maker"] or "")] if wide else [])
        p = c["p_success"]
        certain = p is not None and p in (0.0, 1.0)  # every sample alike: a standard error of 0 says nothing
        cells += [f"{100 * p:.1f}" if p is not None else "-",
                  "*" if certain else f"{100 * se:.1f}" if se is not None else "-", spread,
                  f"{c['delay_s']:g}" if c["delay_s"] is not None else "-", escape(failure)]
        table.add_row(*cells)
    return _lock_widths(table, "maker" if wide else None, width)


def robust_key(result: dict[str, Any], top: int | None = None) -> str:
    """The words under the robust ranking: what success means and what each failure name stands for (for the
    motors the table shows: its ``top``)."""
    shown = result["candidates"][:top] if top else result["candidates"]
    codes = sorted({_most_failed(c)[0] for c in shown if _most_failed(c)[1] > 0})
    legend = dict(short_code(code, "") for code in codes)  # the one-letter codes the table shows, as in match's
    windows, conditions = result.get("windows") or {}, result.get("conditions") or {}
    limits = [w for w, on in (("the ceiling", conditions.get("ceiling_m") is not None),
                              ("the altitude window", windows.get("altitude_m") is not None),
                              ("the flight-duration window", windows.get("duration_s") is not None),
                              ("the field radius", windows.get("field_radius_m") is not None)) if on]
    text = ("success: the share of sampled flights that meet every launch rule"
            + (" and " + ", ".join(limits) if limits else "; no ceiling or window was given, so apogee is not "
               "judged") + ".")
    if conditions.get("target_m") is not None and windows.get("altitude_m") is None:
        text += (" --target only orders motors of equal success (the median apogee nearest it first); give "
                 "--altitude-window (e.g. 380m..420m) to count apogee in success.")
    if legend:
        text += " most failed: the rule the motor failed most often, with its share: " + "; ".join(
            f"{letter} {meaning}" for letter, meaning in sorted(legend.items())) + "."
    n = result.get("n_samples")
    if n and any(c["p_success"] in (0.0, 1.0) for c in shown):
        text += (f" *: all {n} sampled flights alike; the chance of the other outcome is then below about "
                 f"{300 / n:.2g} % (3/n, the 95 % 'rule of three': Hanley and Lippman-Hand, JAMA 1983), not zero.")
    need = conditions.get("min_stability_cal")
    if need is not None:
        names = motor_names([(c["designation"], c["maker"]) for c in shown], False,
                            among=[(c["designation"], c["maker"]) for c in result["candidates"]])
        below = [f"{name}: {c['n_below_min_stability']}" for c, name in zip(shown, names)
                 if c.get("n_below_min_stability")]
        text += (f" Stability is judged on every sampled flight, with its own CG and masses: samples under "
                 f"{need:g} cal of margin fail" + (" (" + ", ".join(below) + f" of {result['n_samples']} each)"
                                                     if below else "; none is under it") + ".")
    return text


def _most_failed(candidate: dict[str, Any]) -> tuple[str, float]:
    """The rule a robust candidate fails most often and its share ("", 0 when it fails none)."""
    failures = candidate["failures"]
    return max(failures.items(), key=lambda kv: kv[1]) if failures else ("", 0.0)


def calibration_text(result: dict[str, Any], units: DisplayUnits | str = "metric") -> Text:
    """The fitted drag with its uncertainty and the residuals (in display units)."""
    u = _units(units)
    text = Text()
    before = result.get("file_value")
    if "drag_scale" in result:
        text.append(f"Drag scale on the Cd(Mach) table: {result['drag_scale']:.4f} ± {result['uncertainty']:.4f}"
                    + (f" (the file flies {before:.4g})" if before is not None else "") + "\n")
    else:
        text.append(f"Drag coefficient: {result['drag_coefficient']:.4f} ± {result['uncertainty']:.4f}"
                    + (f" (the file gives {before:.4g})" if before is not None else "") + "\n")
    for label, r in zip(result.get("labels", []), result["residuals_m"]):
        text.append(f"  {escape(str(label))}: residual {'+' if r >= 0 else '-'}{u.quantity(abs(r), 'length', 2)}\n")
    if result.get("rms_residual_m") is not None:
        text.append(f"RMS residual {u.quantity(result['rms_residual_m'], 'length', 2)} over {result.get('n_points', len(result['residuals_m']))} "
                    "point(s).\n")
    for note in result.get("notes", []):
        text.append(note + "\n", style="dim")
    return text
