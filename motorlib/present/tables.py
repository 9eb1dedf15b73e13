"""Rich renderings of library results in display units (:mod:`.display`), in one table style.

Every table uses :func:`_table` (a rule under the header, no outer border, narrow padding) and puts the unit
on a second header line, so that everything fits 80 columns; cells never wrap mid-word (long verdicts are
short codes with a legend below the table). Wider terminals get extra columns (maker, length, the rocket's liftoff mass).
Messages that carry quantities are written here from the library's figures, so they follow the display
units and echo the user's own numbers; a reason code this module does not know keeps the library's text.

No click here, and no arithmetic beyond unit conversion for display. This module is longer than ~500 lines
would suggest because it holds every command's screen; each function renders one of them.
"""

from __future__ import annotations

import math
from itertools import islice
from operator import attrgetter

from pathlib import Path
from typing import TYPE_CHECKING, Any, Iterable

from rich import box
from rich.console import Group
from rich.markup import escape
from rich.table import Table
from rich.text import Text

from ..motor.classes import class_impulse_text, impulse_class_for
from ..motor.listing import CatalogRow
from .display import DisplayUnits
from .flightcard import delay_pair
from ..matching.candidate import Candidate
from ..matching.verdicts import VERDICTS
from .messages import (assumption_texts, deployment_column, deployment_rule, match_count, motor_names, note_text,
                       reason_text, short_code, small_mass, verdict_text)

if TYPE_CHECKING:  # annotations only: the table module loads no flight code
    from ..files.curvefiles import CheckReport
    from ..flight.airframe import Airframe
    from ..matching.rank import MatchResult
    from ..motor.record import MotorRecord

__all__ = ["WIDE", "airframe_report", "catalog_table", "check_details", "check_summary_table", "escape",
           "findings_text", "flight_table", "impulse_text", "match_table"]

WIDE = 110  # from this terminal width on, tables add their extra columns

_SEVERITY_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan", "unreadable": "bold red"}
_METRIC = DisplayUnits()


def _table(title: str | None = None, **kwargs: Any) -> Table:
    """The one table style of every command."""
    return Table(title=escape(title) if title else None, title_justify="left", title_style="bold",
                 header_style="bold", box=box.SIMPLE_HEAD, pad_edge=False, collapse_padding=True, **kwargs)


def _lock_widths(table: Table, flexible: str | None = None, width: int | None = None) -> Table:
    """Give every column but ``flexible`` the width of its widest cell, so that rich never cuts or wraps it.

    Only the flexible column (a file or maker name) gives way on a narrow terminal of ``width`` columns, and it
    is cut with an ellipsis. When the other columns need more than ``width`` even so, the table's ``min_width``
    says how much, and the CLI's console prints it that wide (the terminal wraps the long lines): a cut cell
    would misread, a delay list '7,12,14' as '7,12,1' or a title's 'target 400 m' as 'target 40'.
    """
    from rich.cells import cell_len

    others = 0
    for column in table.columns:
        cells = [str(column.header)] + [c.plain if isinstance(c, Text) else str(c) for c in column._cells]
        widest = max(cell_len(line) for cell in cells for line in cell.split("\n"))
        if column.header == flexible:
            column.max_width = widest
            continue
        column.min_width = widest
        column.width = widest  # fixed: rich then measures no cell of it again
        others += widest + 2  # the cell's padding and the column divider
    has_flexible = False
    for column in table.columns:
        if column.header == flexible and width is not None:
            has_flexible = True
            room = width - others - 3  # the flexible column's own padding and the table's edges
            column.max_width = max(column.min_width or 8, min(column.max_width or width, room))
    if width is not None:
        needed = others + (3 + 8 if has_flexible else 0)
        if needed > width:
            table.min_width = needed
    return table


class LongTable:
    """A locked table (:func:`_lock_widths`) of many rows, drawn as rich draws it, but each row as one line of
    text: rich renders every cell on its own (about 40 µs each), 1.1 s for a catalog list of 3,000 motors.

    The title, header and rule are rich's own (the table without its rows); each row is its cells justified to
    their columns' fixed widths (a flexible column's cut with an ellipsis), two spaces apart, with the
    column's and the cell's styles. ``min_width`` is the table's (the CLI's console prints a table that needs
    more than the terminal's width whole).
    """

    def __init__(self, table: Table) -> None:
        self.table = table
        self.min_width = table.min_width

    def __rich_console__(self, console: Any, options: Any) -> Iterable[Any]:
        from copy import copy

        from rich.segment import Segment

        table = self.table
        head = copy(table)
        # the flexible column (no fixed width) is as wide as rich makes it with its cells: its widest, cut at
        # its max_width, never under its min_width
        widths = [column.width if column.width is not None else max(column.min_width or 0, column.max_width or 0)
                  for column in table.columns]
        head.columns = [copy(column) for column in table.columns]
        for column, width in zip(head.columns, widths):
            column._cells = []
            column.width = width
        head.rows = []
        *top, bottom = console.render_lines(head, options, pad=False, new_lines=True)
        for line in top:
            yield from line
        last = len(widths) - 1
        for r in range(table.row_count):
            row = Text(" ", end="")  # the table's left edge
            for k, (column, width) in enumerate(zip(table.columns, widths)):
                cell = column._cells[r]
                text = cell.copy() if isinstance(cell, Text) else (
                    Text.from_markup(cell) if "[" in cell else Text(cell))
                if column.style:
                    text.stylize(column.style, 0, len(text))
                if text.cell_len > width:
                    text.truncate(width, overflow="ellipsis")
                text.align(column.justify if column.justify in ("left", "right", "center") else "left", width)
                row.append_text(text)
                # the cell's right padding (in the column's style), then the divider; the right edge after the last
                row.append(" ", style=column.style if k < last else None)
                if k < last:
                    row.append(" ")
            yield from row.render(console)
            yield Segment.line()
        yield from bottom


def _facts() -> Table:
    """A two-column list of facts (name, value), for one flight or one motor."""
    table = Table(show_header=False, box=None, pad_edge=False)
    table.add_column(style="bold", no_wrap=True)
    table.add_column()
    return table


def _right(table: Table, header: str, **kwargs: Any) -> None:
    table.add_column(header, justify="right", no_wrap=True, **kwargs)


def _cls(impulse_class: str | None, class_percent: float | None) -> str:
    return f"{impulse_class} {class_percent:.0f}%" if impulse_class else ">O"


def _delays(delays_s: Iterable[float], adjustable: bool, ejection: str | None = None) -> str:
    """Delays for a table cell: ``4,6,8``; ``*`` adjustable; ``P`` no ejection charge; ``?`` not known."""
    delays = list(delays_s)
    return (",".join(f"{d:g}" for d in delays) if delays
            else "P" if ejection == "no-charge" else "?") + ("*" if adjustable else "")


def _delays_words(m: dict[str, Any]) -> str:
    """Delays of a record's metrics or a catalog row, in words: listed, no charge, or unknown."""
    adjustable = " (adjustable)" if m["delay_adjustable"] else ""
    if m["delays_s"]:
        return ", ".join(f"{d:g}" for d in m["delays_s"]) + " s" + adjustable
    if m.get("ejection") == "no-charge":
        return "none (no ejection charge: plugged or booster)"
    return "unknown (not given)" + adjustable


def impulse_text(total_impulse_ns: float, digits: int = 4) -> str:
    """A total impulse [N·s] to ``digits`` significant figures, or as classified where that would mislead.

    Classes are decided on the impulse rounded to 0.01 N·s (``motor/classes.py``); a shorter
    figure that reads as another class (160.006 N·s, class H, printed "160") is replaced by the
    classified figure ("160.01"), so a printed impulse never contradicts the class beside it.
    """
    value = float(total_impulse_ns)
    text = f"{value:.{digits}g}"
    return _as_classified(value, text)


def _as_classified(value: float, text: str) -> str:
    """``text`` (a shown impulse), or the classified figure when ``text`` would read as another class."""
    shown, verdict = impulse_class_for(float(text.replace(",", ""))), impulse_class_for(value)
    if (shown.letter if shown else None) != (verdict.letter if verdict else None):
        return class_impulse_text(value)
    return text


def _impulse(u: DisplayUnits, value: float | None, decimals: int | None = None) -> str:
    """An impulse cell (fixed decimals, thousands separators) that never contradicts the class beside it."""
    if value is None:
        return "-"
    return _as_classified(float(value), u.number(value, "impulse", decimals))


# ----------------------------------------------------------------------------- checks
def _status(report: CheckReport) -> Text:
    if not report.readable:
        return Text("unreadable", style="bold red")
    if not report.ok:
        return Text("errors", style="bold red")
    if any(f.severity == "warning" for f in report.findings):
        return Text("warnings", style="yellow")
    return Text("sound", style="green")


def check_status_line(report: CheckReport) -> Text:
    """``Log firing-2.csv  warnings``: the head of one log's check block."""
    return Text.assemble(("Log ", "bold"), Path(report.source).name, "  ", _status(report))  # assemble reads no markup


def check_summary_table(reports: list[CheckReport], units: DisplayUnits = _METRIC, width: int = 80) -> Table:
    """One row per checked file; ``--details`` shows the rest (peak, masses, delays).

    A long file name is cut with an ellipsis rather than wrapped (the label column names the motor and the
    findings below the table give the full path).
    """
    table = _table("Curve check")
    table.add_column("file", no_wrap=True, overflow="ellipsis", min_width=10)
    table.add_column("label", no_wrap=True)
    table.add_column("class", no_wrap=True)
    metrics = [r.metrics or {} for r in reports]
    impulses = [m.get("total_impulse_ns") for m in metrics]
    thrusts = [m.get("average_thrust_n") for m in metrics]
    d_impulse, d_thrust = units.column_decimals(impulses, "impulse"), units.column_decimals(thrusts, "force")
    _right(table, units.header("impulse", units.unit("impulse")))
    _right(table, units.header("thrust", units.unit("force")))
    _right(table, units.header("burn", "s"))
    table.add_column("result", no_wrap=True)
    for report, m in zip(reports, metrics):
        table.add_row(
            escape(Path(report.source).stem), escape(str(m.get("designation", "-"))),
            _cls(m["impulse_class"], m["class_percent"]) if m else "-",
            _impulse(units, m.get("total_impulse_ns"), d_impulse),
            units.number(m.get("average_thrust_n"), "force", d_thrust), units.number(m.get("burn_time_s"), "time"),
            _status(report),
        )
    return _lock_widths(table, "file", width)


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


def check_details(report: CheckReport, units: DisplayUnits = _METRIC, record: MotorRecord | None = None) -> Group:
    """Metrics and findings of one file; with its ``record`` also where the curve comes from (provenance)."""
    parts: list[object] = [Text.assemble(("File ", "bold"), report.source, "  ", _status(report))]  # no markup read
    m = report.metrics
    if m:
        table = _facts()
        u = units
        masses = [m["total_mass_kg"], m["propellant_mass_kg"]]
        mass_unit = u.column_unit(masses, "mass")
        d_mass = u.column_decimals(masses, "mass", mass_unit)
        impulse = _impulse(u, m["total_impulse_ns"], u.column_decimals([m["total_impulse_ns"]], "impulse", significant=4))

        def size(key: str) -> str:  # 29 mm, 10.5 mm
            return u.quantity(m[key], "motor_size", u.exact_decimals([m[key]], "motor_size", 1))

        rows = [
            ("label / maker", f"{m['designation']}  ({m['maker'] or 'maker unknown'})"),
            ("computed designation", str(m["computed_designation"])),
            ("total impulse", f"{impulse} N·s"),
            ("impulse class", f"{m['impulse_class']} ({m['class_percent']:.1f} % into class)"
             if m["impulse_class"] else "above O"),
            ("average thrust", u.precise(m["average_thrust_n"], "force")),
            ("peak thrust", f"{u.precise(m['peak_thrust_n'], 'force')} at {u.quantity(m['peak_time_s'], 'time')}"),
            ("burn time", f"{u.quantity(m['burn_time_s'], 'time')} ({u.number(m['burn_start_s'], 'time')}-"
                          f"{u.number(m['burn_end_s'], 'time')} s, thrust above {100 * float(m['burn_threshold']):g} % "
                          "of peak)"),
            ("samples", str(m["n_samples"])),
            ("diameter x length", f"{size('diameter_m')} x {size('length_m')}"),
            ("total / propellant mass", f"{u.quantity(m['total_mass_kg'], 'mass', d_mass, mass_unit)} / "
                                        f"{u.quantity(m['propellant_mass_kg'], 'mass', d_mass, mass_unit)}"),
            ("specific impulse", u.quantity(m["specific_impulse_s"], "time", 0)),
            ("delays", _delays_words(m)),
        ]
        if record is not None:
            rows += _provenance_rows(record)
        for key, value in rows:
            table.add_row(key, escape(value))
        parts.append(table)
    if report.findings:
        parts.append(Text("Findings:", style="bold"))
        parts.append(findings_text(report))
    else:
        parts.append(Text("No findings.", style="green"))
    return Group(*parts)  # type: ignore[arg-type]


def _provenance_rows(record: MotorRecord) -> list[tuple[str, str]]:
    """Where a curve comes from: kind, date, notes, and the spread of the firings it was made from."""
    p = record.provenance
    rows = [("source", str(p.kind)), ("test date", p.date.isoformat() if p.date else "not given"),
            ("notes", p.notes or "none")]
    spread = getattr(record, "firing_spread", None)
    if spread is not None:
        rows.append(("firings", f"{spread.n_firings}: total impulse {spread.total_impulse_mean_ns:,.1f} ± "
                                f"{spread.total_impulse_std_ns:,.1f} N·s, burn {spread.burn_time_mean_s:.2f} ± "
                                f"{spread.burn_time_std_s:.2f} s"))
    return rows


# ----------------------------------------------------------------------------- flights
def flight_table(summary: dict[str, Any], title: str, units: DisplayUnits = _METRIC) -> Group:
    """The figures of one simulated flight (times from ignition), under a title line."""
    table = _facts()
    s, u = summary, units

    def sec(key: str) -> str:
        return u.quantity(s.get(key), "time")

    accel = s.get("max_acceleration_m_s2")
    rows = [
        ("result", str(s["message"])),
        ("liftoff", f"{sec('liftoff_time_s')}, mass {u.quantity(s['liftoff_mass_kg'], 'mass')}"),
        ("thrust-to-weight", f"liftoff {u.number(s['liftoff_thrust_to_weight'], 'ratio')}, "
                             f"average {u.number(s['average_thrust_to_weight'], 'ratio')}"),
        ("rail exit", f"{u.quantity(s['rail_exit_speed_m_s'], 'speed')} at {sec('rail_exit_time_s')}"),
        ("burnout", sec("burnout_time_s")),
        ("apogee", f"{u.quantity(s['apogee_m'], 'length')} at {sec('time_to_apogee_s')}, "
                   f"{u.quantity(s['apogee_downrange_m'], 'length')} downrange"),
        ("optimal delay", sec("optimal_delay_s")),
        ("max speed", f"{u.quantity(s['max_speed_m_s'], 'speed')} (Mach {u.number(s['max_mach'], 'ratio', 2)})"),
        ("max acceleration", f"{u.quantity(accel, 'acceleration')} "
                             f"({u.quantity(accel, 'acceleration', unit='g0').replace('g0', 'g')})"),
        ("max dynamic pressure", u.quantity(s["max_dynamic_pressure_pa"], "pressure")),
    ]
    for ej in s["ejections"]:
        mark = "  <- chosen" if ej["delay_s"] == s.get("chosen_delay_s") else ""
        rows.append((f"ejection at {ej['delay_s']:g} s delay",
                     f"{u.quantity(ej['altitude_m'], 'length')}, {u.quantity(ej['speed_m_s'], 'speed')}{mark}"
                     if ej["altitude_m"] is not None else "after landing"))
    if s.get("deploy_time_s") is not None:
        rows.append(("deployment", f"{sec('deploy_time_s')} at {u.quantity(s['deploy_altitude_m'], 'length')}"))
    if s.get("landing_speed_m_s") is not None and isinstance(s.get("landing"), dict):
        rows.append(("landing", f"descending at {u.quantity(s['landing_speed_m_s'], 'speed')} "
                                f"({u.quantity(s['landing']['speed_m_s'], 'speed')} over ground) after "
                                f"{sec('descent_time_s')} of descent, {u.quantity(s['drift_m'], 'length')} from the pad"))
    for key, value in rows:
        table.add_row(key, escape(value))
    return Group(Text(title, style="bold"), table)


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
    # title and verdict side by side: a long title wraps in its own column, the verdict never splits
    verdict = Text.assemble((VERDICT_MARKS[card.verdict][0], styles[card.verdict]), " ", card.headline)
    parts: list[object]
    if card.headline != card.result:  # a broken launch rule: a sentence of its own, under the title, wrapped
        verdict.stylize(styles[card.verdict], 2)
        parts = [Text(card.title, style="bold"), verdict]
    else:
        header = Table.grid(padding=(0, 2))
        header.add_column()
        header.add_column(no_wrap=True)
        header.add_row(Text(card.title, style="bold"), verdict)
        parts = [header]
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
    """Flight warnings, one a line (already in display units: :func:`.messages.reason_text`)."""
    text = Text()
    for code, message in warnings:
        text.append("  warning ", style="yellow")
        text.append(f"{code}: ", style="bold")
        text.append(message + "\n")
    return text


def descent_text(result: dict[str, float], units: DisplayUnits = _METRIC, *, elevation_m: float = 0.0,
                 height_m: float | None = None, fall_time_s: float | None = None,
                 drag_area_m2: float | None = None) -> Text:
    """The ``descent`` figures; values the user gave are echoed as typed."""
    u = units
    text = Text()
    text.append(f"Air density at the pad ({u.given(elevation_m, 'length')}, standard atmosphere): "
                f"{u.quantity(result['density_kg_m3'], 'density')}\n")
    v_t = result.get("terminal_speed_m_s")
    if v_t is None or not math.isfinite(v_t):
        text.append("Terminal speed: none (no drag)\n")
    else:
        text.append(f"Terminal speed: {u.quantity(v_t, 'speed')}\n")
    if "fall_time_s" in result:
        fall = u.given(fall_time_s, "time") if fall_time_s is not None else u.quantity(result["fall_time_s"], "time", 1)
        text.append(f"Fall of {u.given(height_m if height_m is not None else result['height_m'], 'length')} from rest "
                    "through the atmosphere: "
                    f"{fall}, landing at {u.quantity(result['landing_speed_m_s'], 'speed')}\n")
    if "drag_area_m2" in result:
        area = result["drag_area_m2"]
        shown = u.given(drag_area_m2, "area") if drag_area_m2 is not None and getattr(drag_area_m2, "text", None) \
            else u.precise(area, "area")
        text.append(f"Drag area Cd·A: {shown}\n")
    return text


# ----------------------------------------------------------------------------- catalog
# Header name (what --sort takes) -> catalog row key.
CATALOG_SORT = {"id": "motor_id", "motor": "designation", "maker": "maker", "class": "total_impulse_ns",
                "impulse": "total_impulse_ns", "thrust": "average_thrust_n", "burn": "burn_time_s",
                "dia": "diameter_m", "length": "length_m", "mass": "total_mass_kg", "check": "n_errors"}


def catalog_table(rows: list[CatalogRow], title: str = "Catalog", units: DisplayUnits = _METRIC,
                  width: int = 80) -> Table:
    """One row per motor; headers are the names ``catalog list --sort`` takes.

    Delays marked * are adjustable (the longest is listed); P means no ejection charge, ? not known. From :data:`WIDE`
    columns on, maker, length and the rocket's liftoff mass are added.
    """
    wide = width >= WIDE
    u = units
    table = _table(title)
    table.add_column("id", no_wrap=True, style="dim")
    table.add_column("motor", no_wrap=True)
    if wide:
        table.add_column("maker", no_wrap=True, overflow="ellipsis", min_width=8)
    table.add_column("class", no_wrap=True)
    d_impulse = u.column_decimals([r.total_impulse_ns for r in rows], "impulse")
    d_thrust = u.column_decimals([r.average_thrust_n for r in rows], "force")
    _right(table, u.header("impulse", u.unit("impulse")))
    _right(table, u.header("thrust", u.unit("force")))
    _right(table, u.header("burn", "s"))
    _right(table, u.header("dia", u.unit("motor_size")))
    mass_unit = u.column_unit([r.total_mass_kg for r in rows], "mass")
    d_dia = u.exact_decimals([r.diameter_m for r in rows], "motor_size", 1)
    d_length = u.exact_decimals([r.length_m for r in rows], "motor_size", 1)
    d_mass = u.column_decimals([r.total_mass_kg for r in rows], "mass", mass_unit)
    if wide:
        _right(table, u.header("length", u.unit("motor_size")))
        _right(table, u.header("mass", mass_unit))
    table.add_column(u.header("delays", "s"), no_wrap=True)
    table.add_column("check", no_wrap=True)
    for r, name in zip(rows, motor_names([(r.designation, r.maker) for r in rows], wide)):
        checks = Text("errors", style="bold red") if r.n_errors else (
            Text("warn", style="yellow") if r.n_warnings else Text("ok", style="green"))
        cells: list[Any] = [r.motor_id[:6], escape(name)]
        if wide:
            cells.append(escape(r.maker or "-"))
        cells += [_cls(r.impulse_class, r.class_percent), _impulse(u, r.total_impulse_ns, d_impulse),
                  u.number(r.average_thrust_n, "force", d_thrust), u.number(r.burn_time_s, "time"),
                  u.number(r.diameter_m, "motor_size", d_dia)]
        if wide:
            cells += [u.number(r.length_m, "motor_size", d_length),
                      u.number(r.total_mass_kg, "mass", d_mass, unit=mass_unit)]
        cells += [_delays(r.delays_s, r.delay_adjustable, r.ejection), checks]
        table.add_row(*cells)
    return _lock_widths(table, "maker", width)


def long_catalog_table(rows: list[CatalogRow], title: str = "Catalog", units: DisplayUnits = _METRIC,
                       width: int = 80) -> Table | LongTable:
    """:func:`catalog_table`, drawn a row a line (:class:`LongTable`) from :data:`LONG_TABLE_ROWS` rows on."""
    table = catalog_table(rows, title, units, width)
    return LongTable(table) if table.row_count >= LONG_TABLE_ROWS else table


LONG_TABLE_ROWS = 100  # from this many rows on, a catalog list is drawn a row a line (LongTable)


_BARS = " ▁▂▃▄▅▆▇█"


def sparkline(time_s: Any, thrust_n: Any, width: int = 60) -> str:
    """The thrust curve as one line of block characters, sampled evenly over the burn."""
    import numpy as np

    t = np.linspace(float(time_s[0]), float(time_s[-1]), width)
    f = np.interp(t, time_s, thrust_n)
    peak = float(np.max(f)) or 1.0
    return "".join(_BARS[int(round(v / peak * (len(_BARS) - 1)))] for v in f)


def forced_errors(result: Any) -> list:
    """The error findings of a curve that ``catalog add --force`` added despite them (empty otherwise)."""
    return [f for f in result.findings if f.severity == "error"] if result.status == "added" else []


# Exact duplicates listed by name up to this many; past it they are only counted (a folder added again listed
# every file: 2,859 rows for 3,000 curves). Our choice, no published source.
MAX_DUPLICATES_LISTED = 10


def add_results_table(results: list) -> Table | None:
    """What ``catalog add`` did with each offered file that was not simply added (None when nothing is left to
    list): refused, unreadable, forced and near-duplicate files always; exact duplicates, which the summary
    counts, only when there are at most :data:`MAX_DUPLICATES_LISTED` of them."""
    list_duplicates = sum(r.status == "duplicate" for r in results) <= MAX_DUPLICATES_LISTED
    table = _table("Catalog add")
    table.add_column("file", no_wrap=True, overflow="ellipsis", min_width=10, max_width=40)
    table.add_column("result", no_wrap=True)
    table.add_column("details", ratio=2, overflow="fold")
    styles = {"added": "green", "duplicate": "cyan", "refused": "bold red", "unreadable": "bold red",
              "forced": "bold yellow"}
    for r in results:
        errors = forced_errors(r)
        if (r.status == "added" and not r.near_duplicates and not errors) or (
                r.status == "duplicate" and not list_duplicates):
            continue
        status = "forced" if errors else "near-dup" if r.status == "added" else r.status
        message, source = r.message, str(r.source)
        if errors:  # added with --force despite these: say which
            message = "; ".join([f"{f.code}: {f.message}" for f in errors] + ([message] if message else []))
        if message.startswith(source):  # the file is in the first column already
            rest = message[len(source):].lstrip(":")
            line, sep, after = rest.partition(":")
            message = f"line {line}:{after}" if sep and line.isdigit() else rest.strip()
        table.add_row(escape(Path(r.source).name), Text(status, style=styles[status if errors else r.status]),
                      escape(message))
    return table if table.row_count else None  # the details column wraps at spaces: it holds sentences


# ----------------------------------------------------------------------------- matching
def _shown(result: MatchResult, top: int | None, show_rejected: bool) -> list[Candidate]:
    """The candidates listed: those that fit (every one with ``show_rejected``), the first ``top`` of them. With
    ``top`` the scan stops there: of 5,000 candidates a top ten reads a few dozen."""
    shown = result.candidates if show_rejected else filter(_FITS, result.candidates)
    return list(shown if top is None else islice(shown, top))


_FITS = attrgetter("fits")
_NAME = attrgetter("designation", "maker")


def match_table(result: MatchResult, units: DisplayUnits = _METRIC, top: int | None = None, show_rejected: bool = False,
                ballast: bool = False, width: int = 80) -> Table:
    """The ranking, good choices first; the result column holds the verdict word, and for ``fail`` one-letter
    reason codes (see :func:`match_legend`).

    A figure that breaks a rule is rounded so that it never reads as within the limit. From :data:`WIDE`
    columns on, the maker and the rocket's liftoff mass (motor included) are added.
    """
    u = units
    shown = _shown(result, top, show_rejected)
    cond = result.conditions
    wide = width >= WIDE
    target = cond.get("target_m")
    title = f"{result.airframe['name']}: {match_count(result)}"
    if target:
        title += f"; target {u.given(target, 'length')} ±{cond['target_tolerance'] * 100:g} %"
    table = _table(title)
    _right(table, "#")
    table.add_column("motor", no_wrap=True)
    if wide:
        table.add_column("maker", no_wrap=True, overflow="ellipsis", min_width=8)
    for name, kind in (("apogee", "length"), ("rail", "speed")):
        _right(table, u.header(name, u.unit(kind)))
    _right(table, "T/W")
    _right(table, u.header("delay", "s"))
    speed = deployment_column(result.candidates, result.conditions)
    _right(table, u.header(speed.table_name, u.unit("speed")))
    mass_unit = u.column_unit([c.liftoff_mass_kg for c in shown], "mass")
    if wide:
        _right(table, u.header("liftoff", mass_unit))
    ballast_unit = u.column_unit([c.ballast_kg for c in shown], "mass")
    if ballast:
        _right(table, u.header("+mass", ballast_unit))
    table.add_column("result", no_wrap=True)
    names = motor_names(list(map(_NAME, shown)), wide, among=list(map(_NAME, result.candidates)))
    for rank, (c, name) in enumerate(zip(shown, names), 1):
        codes = set(c.reason_codes)
        if c.apogee_m is None:
            cells = ["-"] * 5
        else:
            delay = "-" if c.chosen_delay_s is None else delay_pair(c.chosen_delay_s, c.optimal_delay_s,
                                                                     "d" if c.delay_adjusted else "")
            cells = [
                _cell(u, c.apogee_m, cond.get("ceiling_m"), "length", True, "over-ceiling" in codes),
                _cell(u, c.rail_exit_speed_m_s, cond.get("rail_exit_needed_m_s", cond["min_rail_exit_speed_m_s"]), "speed",
                      False, "rail-exit-slow" in codes),
                _cell(u, c.liftoff_thrust_to_weight, cond["min_liftoff_thrust_to_weight"], "ratio", False,
                      "thrust-to-weight-low" in codes),
                delay,
                _cell(u, getattr(c, speed.field), speed.limit_m_s(cond), "speed", True, speed.code in codes),
            ]
        row: list[Any] = [str(rank), escape(name)]
        if wide:
            row.append(escape(c.maker or "-"))
        row += cells
        if wide:
            row.append(u.number(c.liftoff_mass_kg, "mass", unit=mass_unit))
        if ballast:
            row.append(u.number(c.ballast_kg, "mass", unit=ballast_unit))
        word = verdict_text(c.verdict, c.reason_codes, c.reasons)
        table.add_row(*row, Text(word, style=_VERDICT_STYLE.get(c.verdict, "red")))
    return _lock_widths(table, "maker", width)


_VERDICT_STYLE = {"pass": "green", "pass with ballast": "green", "off target": "yellow"}


def _cell(u: DisplayUnits, value: float | None, limit: float | None, kind: str, above: bool, failing: bool) -> str:
    if value is None:
        return "-"
    if failing and limit is not None:
        return u.beyond(value, limit, kind, above=above, with_unit=False)[0]
    return u.number(value, kind)


def match_legend(result: MatchResult, top: int | None = None, show_rejected: bool = False) -> Text:
    """What the result words shown mean, and the one-letter codes after ``fail`` (only those shown)."""
    used: dict[str, str] = {}
    words: dict[str, str] = {}
    for c in _shown(result, top, show_rejected):
        if c.verdict != "fail":
            words.setdefault(verdict_text(c.verdict, [], []), VERDICTS[c.verdict])
            continue
        for code, text in zip(c.reason_codes, c.reasons):
            letter, meaning = short_code(code, text)
            used.setdefault(letter, meaning)
    text = Text()
    if words:
        text.append("Results: ", style="bold")
        text.append("; ".join(f"{word}: {meaning}" for word, meaning in words.items()) + ".", style="dim")
    if used:
        text.append("\n" if words else "")
        text.append("Fail codes: ", style="bold")
        text.append("; ".join(f"{letter} {meaning}" for letter, meaning in used.items()) + ".", style="dim")
    return text


def match_reasons(result: MatchResult, units: DisplayUnits = _METRIC, top: int | None = None,
                  show_rejected: bool = False) -> Text:
    """Why each shown candidate fails (and what ballast changes), one line per reason; then its notes on one
    line apart from the failures (an adapter, a missed target)."""
    u, cond = units, result.conditions
    text = Text()
    for rank, c in enumerate(_shown(result, top, show_rejected), 1):
        for code, message in zip(c.reason_codes, c.reasons):
            text.append(f"  #{rank} {c.designation}: ", style="bold")
            text.append(reason_text(code, message, c, cond, u) + "\n", style="red")
        notes = [note_text(code, message, c, cond, u) for code, message in zip(c.note_codes, c.notes)
                 if code != "adapter"]  # adapters are listed together below
        if notes:
            text.append(f"  #{rank} {c.designation}: ", style="bold")
            text.append("note: " + "; ".join(notes) + "\n", style="dim")
        ballast_reasons = c.ballast_reasons or []
        codes = c.ballast_reason_codes or [""] * len(ballast_reasons)
        later = [reason_text(code, message, c, cond, u, "ballast_") for code, message in zip(codes, ballast_reasons)]
        if c.ballast_kg is not None:
            text.append(f"  #{rank} {c.designation}: ", style="bold")
            text.append(f"with {u.quantity(c.ballast_kg, 'mass')} of ballast: apogee "
                        f"{u.quantity(c.ballast_apogee_m, 'length')}, rail exit "
                        f"{u.quantity(c.ballast_rail_exit_speed_m_s, 'speed')}, T/W "
                        f"{u.number(c.ballast_liftoff_thrust_to_weight, 'ratio')}"
                        + (": passes every rule" if not later else " but " + "; ".join(later)) + "\n",
                        style="yellow" if later else "green")
        elif later:
            text.append(f"  #{rank} {c.designation}: ", style="bold")
            text.append("; ".join(later) + "\n", style="yellow")
        _nose_weight_line(text, rank, c, cond, u)
    adapters: dict[str, list[str]] = {}
    for rank, c in enumerate(_shown(result, top, show_rejected), 1):
        if c.adapter and c.fits:
            adapters.setdefault(c.adapter, []).append(f"#{rank}")
    if adapters:
        text.append("Adapters: ", style="bold")
        text.append("; ".join(f"{size} for {', '.join(ranks)}" for size, ranks in adapters.items()) + ".\n")
    return text


def _nose_weight_line(text: Text, rank: int, c: Candidate, cond: dict[str, Any], u: DisplayUnits) -> None:
    """What the motor does re-flown with the nose weight that restores its stability margin (issue 11)."""
    if c.nose_weight_for_stability_kg is None:
        return
    later = [reason_text(code, message, c, cond, u, "nose_weight_")
             for code, message in zip(c.nose_weight_reason_codes or [], c.nose_weight_reasons or [])]
    text.append(f"  #{rank} {c.designation}: ", style="bold")
    text.append(f"with {small_mass(u, c.nose_weight_for_stability_kg)} of nose weight: stability "
                f"{c.nose_weight_stability_margin_cal:.2f} cal, apogee {u.quantity(c.nose_weight_apogee_m, 'length')}"
                + (" but " + "; ".join(later) if later else ", every rule met") + "\n",
                style="yellow" if later else "green")


def conditions_text(result: MatchResult, units: DisplayUnits = _METRIC, frame: Airframe | None = None) -> Text:
    """The assumptions and rules behind a ranking, echoing the airframe file's and the options' own numbers."""
    c, u = result.conditions, units
    text = Text("Assumptions: ", style="bold")
    a = assumption_texts(c, u, frame)
    text.append(f"{a['drag']}; {a['atmosphere']}; wind {a['wind']}; rail {a['rail']}; recovery {a['recovery']}. ")
    need = c.get("rail_exit_needed_m_s", c["min_rail_exit_speed_m_s"])
    rail_rule = u.limit(c["min_rail_exit_speed_m_s"], "speed") + (
        f" and {c.get('rail_exit_wind_ratio', 4):g} x the wind: {u.limit(need, 'speed')}" if need > c["min_rail_exit_speed_m_s"] else "")
    speed = deployment_column(result.candidates, result.conditions)
    kinds = None if frame is None else [d.device for d in frame.recovery_devices]
    text.append(f"Rules: rail exit >= {rail_rule}, liftoff T/W >= "
                f"{u.limit(c['min_liftoff_thrust_to_weight'], 'ratio')}, delay within {u.limit(c['delay_slack_s'], 'time')} "
                f"of optimal, {deployment_rule(speed, c, kinds, lambda v: u.limit(v, 'speed'))}, descent <= "
                f"{u.limit(c['max_landing_speed_m_s'], 'speed')}"
                + (f", ceiling {u.given(c['ceiling_m'], 'length')}" if c.get("ceiling_m") else "")
                + (f", classes up to {c['max_class']}" if c.get("max_class") else "")
                + (f", stability >= {c['min_stability_cal']:g} cal" if c.get("min_stability_cal") is not None
                   else "; stability not checked (the airframe file has no [geometry])")
                + ". ")
    text.append(f"Delay column: chosen/optimal; 'd' = drilled (adjustable motor); optimal 'none': apogee before "
                f"burnout. {speed.legend[0].upper()}"
                f"{speed.legend[1:]}.", style="dim")
    return text


# ----------------------------------------------------------------------------- static tests
def reduction_text(summary: list[dict[str, Any]], spread: dict[str, Any] | None,
                   units: DisplayUnits = _METRIC) -> Text:
    """One line per reduced log and the spread of several firings (thrust in N, as the label states it)."""
    u = units
    text = Text()
    for entry in summary:
        text.append(entry["file"], style="bold")  # Text.append reads no markup
        text.append(f": {u.plain(entry['sample_rate_hz'])} Hz, baseline {u.precise(entry['baseline_n'], 'force')}, "
                    f"noise {u.precise(entry['noise_n'], 'force', 2)}, "
                    + (f"low-pass {u.plain(entry['cutoff_hz'])} Hz, " if entry["cutoff_hz"] else "no filter, ")
                    + f"ignition at {u.quantity(entry['ignition_time_s'], 'time', 3)}, burnout at "
                      f"{u.quantity(entry['burnout_time_s'], 'time', 3)}, {entry['points']} points (impulse within "
                      f"{100 * entry['reduction_impulse_error']:.3f} %)\n")
    if spread:
        ti, bt = spread["total_impulse_ns"], spread["event_burn_time_s"]
        d = u.column_decimals([ti["mean"], ti["min"]], "impulse")
        text.append(f"{spread['n_firings']} firings: total impulse {u.number(ti['mean'], 'impulse', d)} ± "
                    f"{u.number(ti['std'], 'impulse', d)} N·s ({u.number(ti['min'], 'impulse', d)}-"
                    f"{u.number(ti['max'], 'impulse', d)}), burn {u.number(bt['mean'], 'time')} ± "
                    f"{u.number(bt['std'], 'time')} s\n")
    return text


def firings_table(summary: list[dict[str, Any]], units: DisplayUnits = _METRIC) -> Table:
    """One row per firing of a test series: impulse, peak, burn time, average thrust, class and percent into it."""
    u = units
    table = _table(f"{len(summary)} firings")
    table.add_column("firing", no_wrap=True, overflow="ellipsis", max_width=28)
    for name in ("impulse N·s", "peak N", "burn s", "average N", "class"):
        _right(table, name)
    impulses = [e["total_impulse_ns"] for e in summary]
    d = u.column_decimals(impulses, "impulse", significant=4)
    for e in summary:
        table.add_row(escape(Path(e["file"]).name), _impulse(u, e["total_impulse_ns"], d),
                      f"{e['peak_thrust_n']:,.1f}", f"{e['burn_time_s']:.2f}", f"{e['average_thrust_n']:,.1f}",
                      _cls(e["impulse_class"], e["class_percent"]))
    return _lock_widths(table, "firing", 80)


# ----------------------------------------------------------------------------- airframe
def _fmt(value: object, digits: int = 4, scale: float = 1.0, unit: str = "") -> str:
    """``value·scale`` to about ``digits`` significant figures, in fixed notation with thousands separators."""
    if value is None:
        return "-"
    number = float(value) * scale  # type: ignore[arg-type]
    if not math.isfinite(number):
        return "-"
    decimals = 0 if number == 0 else max(0, digits - 1 - math.floor(math.log10(abs(number))))
    return f"{number:,.{decimals}f}{(' ' + unit) if unit else ''}"


def _mm(value: object, digits: int = 4, u: DisplayUnits = _METRIC) -> str:
    """A length along or across the airframe, in mm (or inches with imperial units), about ``digits`` figures."""
    return _fmt(value, digits, u.convert(1.0, "size"), u.unit("size"))


def _cal(value: object) -> str:
    return "-" if value is None else f"{float(value):.2f} cal"  # type: ignore[arg-type]


def _shape_rows(s: dict, u: DisplayUnits = _METRIC) -> list[tuple[str, str]]:
    g = s["geometry"]
    nose = g["nose"]
    shape = nose["shape"] + (f" (exponent {nose['exponent']:g})" if nose["exponent"] is not None else "")
    rows = [("diameter", _mm(s["diameter_m"], u=u)),
            ("length", f"{_mm(g['length_m'], u=u)}: nose {_mm(nose['length_m'], u=u)} {shape}, "
                       f"body {_mm(g['body_length_m'], u=u)}")]
    f = g["fins"]
    rows.append(("fins", "none" if f is None else (
        f"{f['count']} x root {_mm(f['root_chord_m'], 3, u)}, tip {_mm(f['tip_chord_m'], 3, u)}, "
        f"span {_mm(f['span_m'], 3, u)}, "
        f"sweep {_mm(f['sweep_m'], 3, u)}, {_mm(f['thickness_m'], 2, u)} thick, {f['profile']}; root leading edge at "
        f"{_mm(f['root_leading_edge_m'], u=u)}")))
    for i, t in enumerate(g["transitions"], 1):
        kind = "shoulder" if t["aft_diameter_m"] > t["fore_diameter_m"] else "boattail"
        rows.append((f"transition {i}", f"{kind} {_mm(t['fore_diameter_m'], 3, u)} to "
                                        f"{_mm(t['aft_diameter_m'], 3, u)} over {_mm(t['length_m'], 3, u)}, "
                                        f"from {_mm(t['position_m'], u=u)}"))
    finish = g["finish"]
    rows.append(("finish", f"{finish['name'] or 'roughness'} ({finish['roughness_m'] * 1e6:.3g} µm), launch guide "
                           f"{g['launch_guide']}"))
    rows.append(("empty airframe", f"{u.quantity(s['mass_kg'], 'mass')}, CG at {_mm(s['cg_empty_m'], u=u)}"))
    rows.append(("CP (subsonic)", _mm(s["cp_m"], u=u)))
    rows.append(("margin, no motor", _cal(s["margin_empty_cal"])))
    return rows


def _heading(text: str) -> Text:
    """A bold line; ``text`` is shown as written (a Text reads no markup, so it needs no escaping)."""
    return Text(text, style="bold")


def _plain_table(*columns: str) -> Table:
    table = Table(header_style="bold", box=box.SIMPLE_HEAD, pad_edge=False)
    for name in columns:
        table.add_column(name, justify="right" if name and name not in ("part", "component") else "left", no_wrap=True)
    return table


def airframe_report(summary: dict, units: DisplayUnits = _METRIC) -> Group:
    """The derived airframe (``motorlib airframe``): shape, CP, CG and margins, drag build-up, Cd(Mach).

    ``summary`` is :func:`motorlib.flight.summary.airframe_summary`; positions from the nose tip, in mm (inches
    with imperial ``units``), masses in the display units. Fits 80 columns.
    """
    s, u = summary, units
    size, per_m = u.unit("size"), u.convert(1.0, "size")
    parts: list[object] = [_heading(f"{s['airframe']}: derived airframe (positions from the nose tip)")]
    shape = Table(show_header=False, box=box.SIMPLE, pad_edge=False)
    shape.add_column(style="bold", no_wrap=True)
    shape.add_column(overflow="fold")
    for key, value in _shape_rows(s, u):
        shape.add_row(key, escape(value))
    parts.append(shape)

    parts.append(_heading("Normal force by part (Barrowman, subsonic)"))
    forces = _plain_table("part", "CN_α (1/rad)", f"CP ({size})")
    for p in s["normal_force"]:
        forces.add_row(escape(p["part"]), f"{p['cn_alpha']:.3f}", _fmt(p["cp_m"], 4, per_m))
    parts.append(forces)

    motor, stab = s["motor"], s["stability"]
    if motor is not None:
        parts.append(_heading(f"Stability with {motor['designation']}"
                              + (f" ({motor['maker']})" if motor["maker"] else "")))
        table = _plain_table("", f"CG ({size})", f"CP ({size})", "margin")
        table.add_row("no motor", _fmt(s["cg_empty_m"], 4, per_m), _fmt(s["cp_m"], 4, per_m), _cal(s["margin_empty_cal"]))
        table.add_row("liftoff", _fmt(stab["cg_liftoff_m"], 4, per_m), _fmt(stab["cp_m"], 4, per_m),
                      _cal(stab["margin_liftoff_cal"]))
        table.add_row("burnout", _fmt(stab["cg_burnout_m"], 4, per_m), _fmt(stab["cp_m"], 4, per_m),
                      _cal(stab["margin_burnout_cal"]))
        table.add_row(Text("smallest, powered", style="bold"), "", "", Text(_cal(stab["min_margin_cal"]), style="bold"))
        parts.append(table)
        note = Text()
        weight = s["nose_weight_for_stability_kg"]
        if weight is not None:
            note.append(f"  Nose weight for {s['required_margin_cal']:g} cal: {small_mass(u, weight)} at "
                        f"{u.quantity(s['nose_weight_position_m'], 'size', 0 if u.system == 'metric' else 1)} "
                        "from the tip.\n", style="yellow")
        for w in s["warnings"]:
            note.append("  warning ", style="yellow")
            note.append(f"{w['code']}: ", style="bold")
            note.append(w["message"] + "\n")
        if note:
            parts.append(note)

    drag = s["drag"]
    build = _plain_table("component", "Cd")
    for name, value in drag["components"].items():
        build.add_row(escape(name), f"{value:.4f}")
    build.add_row(Text("total, powered", style="bold"), Text(f"{drag['cd_powered']:.4f}", style="bold"))
    build.add_row(Text("total, coasting", style="bold"), Text(f"{drag['cd_coasting']:.4f}", style="bold"))
    curve = _plain_table("Mach", "powered", "coasting")
    for row in s["drag_table"]:
        curve.add_row(f"{row['mach']:g}", f"{row['cd_powered']:.3f}", f"{row['cd_coasting']:.3f}")
    side = Table.grid(padding=(0, 6))
    side.add_column()
    side.add_column()
    side.add_row(_heading(f"Drag build-up at Mach {drag['mach']:g}"), _heading("Estimated Cd against Mach"))
    side.add_row(build, curve)
    parts.append(side)
    given = s["drag_given"]
    what = "a Cd table" if given["drag_table"] else f"Cd {given['drag_coefficient']:g}"
    parts.append(Text(f"Cd on the reference area (π·d²/4). The airframe file gives {what}: "
                      f"{given['cd_at_mach']:.3f} at Mach {drag['mach']:g}, beside the estimate "
                      f"{drag['cd_coasting']:.3f} coasting.", style="dim"))
    return Group(*parts)
