"""Rich renderings of library results, in display units (mm, g, N, N·s, s).

No click here, and no arithmetic beyond unit conversion for display.
"""

from __future__ import annotations

from pathlib import Path

from rich import box
from rich.console import Group
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from ..files.curvefiles import CheckReport
from ..motor.classes import class_impulse_text, impulse_class_for

__all__ = ["SAFETY_CAUTION", "check_details", "check_summary_table", "findings_text", "impulse_text"]

SAFETY_CAUTION = (
    "Caution: predictions are estimates. Follow your national rocketry association's safety code, local law "
    "and the launch site's rules; the range safety officer decides; fly only motors within your certification."
)

_SEVERITY_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan", "unreadable": "bold red"}


def _fmt(value: object, digits: int = 4, scale: float = 1.0, unit: str = "") -> str:
    if value is None:
        return "-"
    number = float(value) * scale  # type: ignore[arg-type]
    return f"{number:.{digits}g}{(' ' + unit) if unit else ''}"


def impulse_text(total_impulse_ns: float, digits: int = 4) -> str:
    """A total impulse [N·s] to ``digits`` significant figures, or as classified where that would mislead.

    Classes are decided on the impulse rounded to 0.01 N·s (``motor/classes.py``); a shorter
    figure that reads as another class (160.006 N·s, class H, printed "160") is replaced by the
    classified figure ("160.01"), so a printed impulse never contradicts the class beside it.
    """
    value = float(total_impulse_ns)
    text = f"{value:.{digits}g}"
    shown, verdict = impulse_class_for(float(text)), impulse_class_for(value)
    if (shown.letter if shown else None) != (verdict.letter if verdict else None):
        text = class_impulse_text(value)
    return text


def _impulse(value: object, digits: int = 4, unit: str = "") -> str:
    if value is None:
        return "-"
    return impulse_text(float(value), digits) + (f" {unit}" if unit else "")  # type: ignore[arg-type]


def _delays(m: dict) -> str:
    """Delays of a record's metrics or a catalog row, in words: listed, no charge, or unknown."""
    adjustable = " (adjustable)" if m["delay_adjustable"] else ""
    if m["delays_s"]:
        return ", ".join(f"{d:g}" for d in m["delays_s"]) + " s" + adjustable
    if m.get("ejection") == "no-charge":
        return "none (no ejection charge: plugged or booster)"
    return "unknown (not given)" + adjustable


def _status(report: CheckReport) -> Text:
    if not report.readable:
        return Text("unreadable", style="bold red")
    if not report.ok:
        return Text("errors", style="bold red")
    if any(f.severity == "warning" for f in report.findings):
        return Text("warnings", style="yellow")
    return Text("sound", style="green")


def check_summary_table(reports: list[CheckReport]) -> Table:
    """One row per checked file; ``--details`` shows the rest (peak, masses, delays)."""
    table = Table(title="Curve check", header_style="bold")
    table.add_column("file", overflow="fold", ratio=1)
    for name in ("label", "class"):
        table.add_column(name, no_wrap=True)
    for name in ("impulse N·s", "avg N", "burn s"):
        table.add_column(name, justify="right", no_wrap=True)
    table.add_column("result", no_wrap=True)
    for report in reports:
        m = report.metrics or {}
        cls = f"{m['impulse_class']} {m['class_percent']:.0f}%" if m.get("impulse_class") else "-"
        table.add_row(
            escape(Path(report.source).stem), escape(str(m.get("designation", "-"))), cls,
            _impulse(m.get("total_impulse_ns")), _fmt(m.get("average_thrust_n")), _fmt(m.get("burn_time_s"), 3),
            _status(report),
        )
    return table


def findings_text(report: CheckReport, *, include_notes: bool = True) -> Text:
    """The findings of one report, one line each: ``severity code: message``."""
    text = Text()
    for finding in report.findings:
        if finding.severity == "note" and not include_notes:
            continue
        where = f" (line {finding.line})" if finding.line else ""
        text.append(f"  {finding.severity:<7} ", style=_SEVERITY_STYLE.get(finding.severity, ""))
        text.append(f"{finding.code}{where}: ", style="bold")
        text.append(finding.message + "\n")
    return text


def check_details(report: CheckReport) -> Group:
    """Metrics table and findings of one file."""
    parts: list[object] = [Text.assemble(("File ", "bold"), escape(report.source), "  ", _status(report))]
    m = report.metrics
    if m:
        table = Table(show_header=False, box=None, pad_edge=False)
        table.add_column(style="bold")
        table.add_column()
        rows = [
            ("label / maker", f"{m['designation']}  ({m['maker'] or 'maker unknown'})"),
            ("computed designation", str(m["computed_designation"])),
            ("total impulse", _impulse(m["total_impulse_ns"], 5, unit="N·s")),
            ("impulse class", f"{m['impulse_class']} ({m['class_percent']:.1f} % into class)"
             if m["impulse_class"] else "above O"),
            ("average thrust", _fmt(m["average_thrust_n"], unit="N")),
            ("peak thrust", f"{_fmt(m['peak_thrust_n'], unit='N')} at {_fmt(m['peak_time_s'], unit='s')}"),
            ("burn time", f"{_fmt(m['burn_time_s'], unit='s')} ({_fmt(m['burn_start_s'])}-{_fmt(m['burn_end_s'])} s, "
                          f"thrust above {100 * float(m['burn_threshold']):g} % of peak)"),
            ("samples", str(m["n_samples"])),
            ("diameter x length", f"{_fmt(m['diameter_m'], scale=1e3, unit='mm')} x {_fmt(m['length_m'], scale=1e3, unit='mm')}"),
            ("total / propellant mass", f"{_fmt(m['total_mass_kg'], scale=1e3, unit='g')} / "
                                        f"{_fmt(m['propellant_mass_kg'], scale=1e3, unit='g')}"),
            ("specific impulse", _fmt(m["specific_impulse_s"], unit="s")),
            ("delays", _delays(m)),
        ]
        for key, value in rows:
            table.add_row(key, escape(value))
        parts.append(table)
    if report.findings:
        parts.append(Text("Findings:", style="bold"))
        parts.append(findings_text(report))
    else:
        parts.append(Text("No findings.", style="green"))
    return Group(*parts)  # type: ignore[arg-type]


# ----------------------------------------------------------------------------- flights
_DISPLAY = {
    "si": {"length": ("m", 1.0), "speed": ("m/s", 1.0), "acceleration": ("m/s²", 1.0), "mass": ("g", 1e-3),
           "pressure": ("kPa", 1e3)},
    "imperial": {"length": ("ft", 0.3048), "speed": ("ft/s", 0.3048), "acceleration": ("ft/s²", 0.3048),
                 "mass": ("oz", 0.028349523125), "pressure": ("psi", 6894.757293168)},
}


def display(value: object, kind: str, units: str, digits: int = 4) -> str:
    """An SI value in the display unit of ``kind`` for the ``si`` or ``imperial`` system."""
    unit, factor = _DISPLAY[units][kind]
    if value is None:
        return "-"
    return f"{float(value) / factor:.{digits}g} {unit}"  # type: ignore[arg-type]


def flight_card_table(card) -> Group:
    """The flight card (:func:`motorlib.present.flightcard.flight_card`): phase by phase, each figure with its
    verdict mark (✓ within the rule, ! a rule of thumb broken, ✗ failed, · no rule) and the rule it was checked
    against; a phase's warnings follow its figures."""
    from .palette import VERDICT_MARKS

    styles = {"ok": "bold blue", "caution": "bold yellow", "fail": "bold red", "info": "dim"}
    parts: list[object] = [Text.assemble((escape(card.title), "bold"), "  ",
                                         (VERDICT_MARKS[card.verdict][0], styles[card.verdict]), " ", card.result)]
    label_width = max((len(f.label) + 3 for p in card.phases for f in p.figures), default=10)
    for phase in card.phases:
        parts.append(Text.assemble((VERDICT_MARKS[phase.verdict][0], styles[phase.verdict]), " ",
                                   (phase.title, "bold underline")))
        table = Table(show_header=False, box=None, pad_edge=False, collapse_padding=True)
        table.add_column(no_wrap=True, min_width=label_width)
        table.add_column(overflow="fold")
        table.add_column(style="dim", no_wrap=True)
        for figure in phase.figures:
            mark = "" if figure.verdict == "info" else VERDICT_MARKS[figure.verdict][0]
            table.add_row(Text(f"  {mark or ' '} ", style=styles[figure.verdict]) + Text(figure.label),
                          escape(figure.value), escape(figure.rule) if figure.verdict != "info" else "")
        for code, message in phase.warnings:
            table.add_row(Text("    warning", style="yellow"), Text(f"{code}: {message}"), "")
        parts.append(table)
    if card.general_warnings:
        parts.append(warnings_text(list(card.general_warnings)))
    return Group(*parts)  # type: ignore[arg-type]


def warnings_text(warnings: list[tuple[str, str]]) -> Text:
    text = Text()
    for code, message in warnings:
        text.append("  warning ", style="yellow")
        text.append(f"{code}: ", style="bold")
        text.append(message + "\n")
    return text


# ----------------------------------------------------------------------------- catalog
def catalog_table(rows: list[dict], title: str = "Catalog") -> Table:
    """One row per motor: id, label, class, impulse, average thrust, burn, diameter, delays, checks.

    Delays marked * are adjustable (the longest is listed); P means no ejection charge, ? not known.
    """
    table = Table(title=escape(title), header_style="bold", box=box.SIMPLE_HEAD, pad_edge=False, collapse_padding=True)
    table.add_column("id", no_wrap=True, style="dim")
    table.add_column("motor", overflow="fold", min_width=8)
    table.add_column("class", no_wrap=True)
    table.add_column("I N·s", justify="right", no_wrap=True)
    table.add_column("avg N", justify="right", no_wrap=True)
    table.add_column("burn s", justify="right", no_wrap=True)
    table.add_column("Ø mm", justify="right", no_wrap=True)
    table.add_column("delay s", no_wrap=True)
    table.add_column("check", no_wrap=True)
    for r in rows:
        cls = f"{r['impulse_class']} {r['class_percent']:.0f}%" if r["impulse_class"] else ">O"
        size = _fmt(r["diameter_m"], 3, 1e3)
        delays = (",".join(f"{d:g}" for d in r["delays_s"]) if r["delays_s"]
                  else "P" if r.get("ejection") == "no-charge" else "?") + ("*" if r["delay_adjustable"] else "")
        checks = Text("errors", style="bold red") if r["n_errors"] else (
            Text("warn", style="yellow") if r["n_warnings"] else Text("ok", style="green"))
        table.add_row(r["motor_id"][:6], escape(r["designation"]), cls, _impulse(r["total_impulse_ns"]),
                      _fmt(r["average_thrust_n"]), _fmt(r["burn_time_s"], 3), size, delays, checks)
    return table


_BARS = " ▁▂▃▄▅▆▇█"


def sparkline(time_s, thrust_n, width: int = 60) -> str:
    """The thrust curve as one line of block characters, sampled evenly over the burn."""
    import numpy as np

    t = np.linspace(float(time_s[0]), float(time_s[-1]), width)
    f = np.interp(t, time_s, thrust_n)
    peak = float(np.max(f)) or 1.0
    return "".join(_BARS[int(round(v / peak * (len(_BARS) - 1)))] for v in f)


def add_results_table(results: list) -> Table:
    """What ``catalog add`` did with each offered file that was not simply added."""
    table = Table(title="Catalog add", header_style="bold")
    table.add_column("file", overflow="fold", ratio=1)
    table.add_column("result", no_wrap=True)
    table.add_column("details", overflow="fold", ratio=2)
    styles = {"added": "green", "duplicate": "cyan", "refused": "bold red", "unreadable": "bold red"}
    for r in results:
        if r.status == "added" and not r.near_duplicates:
            continue
        status = "added (near-duplicate)" if r.status == "added" else r.status
        table.add_row(escape(Path(r.source).name), Text(status, style=styles[r.status]), escape(r.message))
    return table


# ----------------------------------------------------------------------------- matching
def _number(value: object, kind: str, units: str, digits: int = 4) -> str:
    if value is None:
        return "-"
    unit, factor = _DISPLAY[units][kind]
    return f"{float(value) / factor:.{digits}g}"  # type: ignore[arg-type]


def _unit(kind: str, units: str) -> str:
    return _DISPLAY[units][kind][0]


def match_table(result, units: str = "si", top: int | None = None, show_rejected: bool = False,
                ballast: bool = False) -> Table:
    """The ranking: passing motors first; failing ones show short reason codes (details below the table)."""
    c_all = result.candidates
    shown = [c for c in c_all if c["fits"] or show_rejected]
    if top is not None:
        shown = shown[:top]
    target = result.conditions.get("target_m")
    title = f"{result.airframe['name']}: {sum(c['passes'] for c in c_all)} of {len(c_all)} motors pass"
    if target:
        title += f", target {display(target, 'length', units)}"
    table = Table(title=escape(title), header_style="bold", box=box.SIMPLE_HEAD, pad_edge=False, collapse_padding=True)
    table.add_column("#", justify="right", no_wrap=True)
    table.add_column("motor", no_wrap=True)
    table.add_column(f"apogee {_unit('length', units)}", justify="right", no_wrap=True)
    table.add_column(f"rail {_unit('speed', units)}", justify="right", no_wrap=True)
    table.add_column("T/W", justify="right", no_wrap=True)
    table.add_column("delay s", justify="right", no_wrap=True)
    table.add_column(f"eject {_unit('speed', units)}", justify="right", no_wrap=True)
    if ballast:
        table.add_column(f"+mass {_unit('mass', units)}", justify="right", no_wrap=True)
    table.add_column("result", overflow="fold", min_width=9)
    for rank, c in enumerate(shown, 1):
        if c["apogee_m"] is None:
            cells = ["-"] * 5
        else:
            delay = "-" if c["chosen_delay_s"] is None else (
                f"{c['chosen_delay_s']:g}{'d' if c['delay_adjusted'] else ''}/{c['optimal_delay_s']:.1f}")
            cells = [_number(c["apogee_m"], "length", units), _number(c["rail_exit_speed_m_s"], "speed", units, 3),
                     f"{c['liftoff_thrust_to_weight']:.1f}", delay, _number(c["ejection_speed_m_s"], "speed", units, 2)]
        if ballast:
            cells.append(_number(c.get("ballast_kg"), "mass", units, 3))
        verdict = Text("pass", style="green") if c["passes"] else Text(", ".join(dict.fromkeys(c["reason_codes"])),
                                                                        style="red")
        table.add_row(str(rank), escape(c["designation"]), *cells, verdict)
    return table


def match_reasons(result, top: int | None = None, show_rejected: bool = False) -> Text:
    """Why each shown candidate fails (and what ballast changes), one line per reason."""
    shown = [c for c in result.candidates if c["fits"] or show_rejected]
    if top is not None:
        shown = shown[:top]
    text = Text()
    for rank, c in enumerate(shown, 1):
        for reason in c["reasons"]:
            text.append(f"  #{rank} {c['designation']}: ", style="bold")
            text.append(reason + "\n", style="red")
        if c.get("ballast_kg") is not None:
            text.append(f"  #{rank} {c['designation']}: ", style="bold")
            text.append(f"with {c['ballast_kg'] * 1e3:.0f} g of ballast: apogee {c['ballast_apogee_m']:.0f} m, rail exit "
                        f"{c['ballast_rail_exit_speed_m_s']:.1f} m/s, T/W {c['ballast_liftoff_thrust_to_weight']:.1f}"
                        + ("" if not c["ballast_reasons"] else " but " + "; ".join(c["ballast_reasons"])) + "\n",
                        style="yellow" if c["ballast_reasons"] else "green")
        elif c.get("ballast_reasons"):
            text.append(f"  #{rank} {c['designation']}: ", style="bold")
            text.append("; ".join(c["ballast_reasons"]) + "\n", style="yellow")
    return text


def conditions_text(result) -> Text:
    c = result.conditions
    text = Text("Assumptions: ", style="bold")
    text.append(f"{c['drag']}; {c['atmosphere']}; wind {c['wind']}; rail {c['rail']}; recovery {c['recovery']}. ")
    text.append(f"Rules: rail exit >= {c['min_rail_exit_speed_m_s']:g} m/s, liftoff T/W >= "
                f"{c['min_liftoff_thrust_to_weight']:g}, delay within {c['delay_slack_s']:g} s of optimal, ejection "
                f"<= {c['max_ejection_speed_m_s']:g} m/s, descent <= {c['max_landing_speed_m_s']:g} m/s"
                + (f", ceiling {c['ceiling_m']:g} m" if c.get("ceiling_m") else "")
                + (f", classes up to {c['max_class']}" if c.get("max_class") else "") + ". ")
    text.append("Delay column: chosen/optimal; 'd' = drilled (adjustable motor).", style="dim")
    return text
