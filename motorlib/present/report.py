"""Printable reports: one self-contained HTML file per report, built from plain records, one per section.

A report is a typed record (:class:`FlyReport`, :class:`MatchReport`, :class:`ReduceReport`) whose fields are
its sections; a section that has no data (stability without a shape, recovery without a device) is ``None``
and simply does not appear. Sections are made of a few building blocks: :class:`Facts` (name and value pairs),
:class:`TableBlock`, :class:`ChartBlock` (inline SVG from :mod:`.svgcharts`), the flight card
(:class:`~.flightcard.FlightCard`) and :class:`Notes`. :func:`render_html` lays them out.

The file holds everything it shows: CSS inline, charts as inline SVG with a text alternative, no script, no
link to anything outside the file, no web fonts. Print CSS (``@page``, small type, sections kept whole) keeps
a report to at most two A4 or Letter pages; the browser tests (``tests/present/test_report_browser.py``)
check that in a real browser. :func:`write_report` writes the file atomically, never over an existing file
without ``overwrite`` and never over one of the report's inputs.

Content (what goes into each section) is chosen in :mod:`.report_content`; this module only lays it out.
"""

from __future__ import annotations

import hashlib
import os
from dataclasses import dataclass
from html import escape
from pathlib import Path
from typing import Iterable, Sequence

from .flightcard import FlightCard
from .palette import BLUE, BLUE_TINT, INK, MUTED, ORANGE, ORANGE_TINT, RULE, VERDICT_MARKS
from ..safety import CAUTIONS  # the reports' "Before you fly" box; the words live in motorlib.safety

__all__ = ["CAUTIONS", "ChartBlock", "Facts", "FlyReport", "MatchReport", "Notes", "ReduceReport", "TableBlock",
           "Trace", "check_report_target", "file_sha256", "render_html", "write_report"]


@dataclass(frozen=True)
class Facts:
    """Name and value pairs under a heading."""

    title: str
    rows: tuple[tuple[str, str], ...]
    note: str = ""


@dataclass(frozen=True)
class TableBlock:
    """A table: ``columns``; ``rows`` of cells as shown; ``numeric`` columns are right-aligned.

    ``marks`` (one per row, optional) is a verdict key of :data:`~.palette.VERDICT_MARKS` shown as the first
    cell, so that pass and fail read without colour.
    """

    title: str
    columns: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    numeric: tuple[bool, ...] = ()
    marks: tuple[str, ...] = ()
    note: str = ""
    nowrap: tuple[bool, ...] = ()  # columns never broken inside a cell (motor names); numeric ones never are
    breakable: bool = False  # a long table may run on to the next printed page (between rows, its header repeated)


@dataclass(frozen=True)
class ChartBlock:
    """One chart (an ``<svg>`` element from :class:`~.svgcharts.SvgChart`) and a caption below it."""

    svg: str
    caption: str = ""
    wide: bool = True


@dataclass(frozen=True)
class Notes:
    """A list of sentences: warnings, assumptions or cautions (``kind``)."""

    title: str
    items: tuple[str, ...]
    kind: str = "assumption"


@dataclass(frozen=True)
class Trace:
    """What the report was made from: motorlib's version, the command, and each input file's SHA-256."""

    version: str
    command: str
    files: tuple[tuple[str, str], ...]  # (name as given, hex digest)
    made_at: str = ""


@dataclass(frozen=True)
class FlyReport:
    """The pre-flight report of ``motorlib fly``."""

    title: str
    subtitle: str
    rocket: Facts
    motor: Facts
    delay: Facts
    conditions: Facts
    card: FlightCard
    thrust_chart: ChartBlock
    trace: Trace
    flight_chart: ChartBlock | None = None
    side_chart: ChartBlock | None = None
    stability: Facts | None = None
    recovery: TableBlock | None = None
    landing: Facts | None = None
    warnings: Notes | None = None
    assumptions: Notes | None = None
    signature: bool = True


@dataclass(frozen=True)
class MatchReport:
    """The ranking report of ``motorlib match``."""

    title: str
    subtitle: str
    ranking: TableBlock
    chart: ChartBlock | None
    conditions: Facts
    trace: Trace
    reasons: Notes | None = None
    assumptions: Notes | None = None


@dataclass(frozen=True)
class ReduceReport:
    """The test-series report of ``motorlib reduce``."""

    title: str
    subtitle: str
    firings: TableBlock
    overlay: ChartBlock
    trace: Trace
    mean_chart: ChartBlock | None = None
    spread: Facts | None = None
    label_check: TableBlock | None = None
    label_facts: Facts | None = None
    assumptions: Notes | None = None


def file_sha256(path: str | os.PathLike[str]) -> str:
    """Hex SHA-256 of a file's bytes (read in chunks)."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 16), b""):
            digest.update(chunk)
    return digest.hexdigest()


# ----------------------------------------------------------------------------- HTML
_CSS = f"""
:root {{ --ink: {INK}; --blue: {BLUE}; --orange: {ORANGE}; --muted: {MUTED}; --rule: {RULE};
         --blue-tint: {BLUE_TINT}; --orange-tint: {ORANGE_TINT}; }}
* {{ box-sizing: border-box; }}
html {{ -webkit-text-size-adjust: 100%; }}
body {{ margin: 0; color: var(--ink); background: #fff; font: 14px/1.4 system-ui, "Segoe UI", "DejaVu Sans", Arial,
        sans-serif; overflow-wrap: anywhere; }}
main {{ max-width: 1080px; margin: 0 auto; padding: 16px; }}
header.top {{ border-bottom: 3px solid var(--ink); padding-bottom: 6px; margin-bottom: 10px; display: flex;
              flex-wrap: wrap; gap: 4px 16px; align-items: baseline; justify-content: space-between; }}
h1 {{ font-size: 1.35em; margin: 0; letter-spacing: .01em; }}
.subtitle {{ color: var(--muted); font-size: .95em; }}
.stamp {{ font-size: .85em; border: 1.5px solid var(--ink); padding: 1px 8px; border-radius: 3px; font-weight: 600; }}
h2 {{ font-size: 1em; margin: 0 0 4px; text-transform: uppercase; letter-spacing: .06em;
      border-bottom: 1px solid var(--rule); padding-bottom: 2px; }}
section {{ margin: 0 0 12px; break-inside: avoid; page-break-inside: avoid; min-width: 0; }}
section.breakable {{ break-inside: auto; page-break-inside: auto; }}
section.breakable h2 {{ break-after: avoid; page-break-after: avoid; }}
tr {{ break-inside: avoid; page-break-inside: avoid; }}
.grid {{ display: grid; grid-template-columns: repeat(auto-fit, minmax(230px, 1fr)); gap: 4px 18px; }}
.pair {{ display: grid; grid-template-columns: repeat(auto-fit, minmax(300px, 1fr)); gap: 6px 18px; }}
dl {{ display: grid; grid-template-columns: minmax(7em, max-content) 1fr; gap: 1px 10px; margin: 0; font-size: .92em; }}
dt {{ color: var(--muted); }} dd {{ margin: 0; }}
table {{ border-collapse: collapse; width: 100%; font-size: .88em; }}
th, td {{ text-align: left; padding: 2px 5px; border-bottom: 1px solid var(--rule); vertical-align: top; }}
th {{ border-bottom: 1.5px solid var(--ink); font-weight: 600; }}
td.num, th.num {{ text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }}
td.keep, th.keep {{ white-space: nowrap; }}
.scroll {{ overflow-x: auto; max-width: 100%; }}
.sr {{ position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); }}
.mark {{ font-weight: 700; display: inline-block; min-width: 1.3em; text-align: center; border-radius: 2px; }}
.mark.ok {{ color: #fff; background: var(--blue); }}
.mark.fail {{ color: var(--ink); background: repeating-linear-gradient(45deg, var(--orange) 0 3px,
              var(--orange-tint) 3px 6px); outline: 1px solid var(--ink); }}
.mark.caution {{ color: var(--ink); background: var(--orange-tint); outline: 1px solid var(--ink); }}
.mark.info {{ color: var(--muted); }}
.card {{ display: grid; grid-template-columns: repeat(auto-fit, minmax(240px, 1fr)); gap: 6px; }}
.phase {{ border: 1px solid var(--rule); border-top: 4px solid var(--ink); padding: 4px 7px 5px; min-width: 0; }}
.phase.caution {{ border-top-style: double; border-top-width: 5px; }}
.phase.fail {{ border-top-style: dashed; }}
.phase h3 {{ font-size: .9em; margin: 0 0 3px; display: flex; justify-content: space-between; gap: 6px; }}
.phase dl {{ grid-template-columns: minmax(6em, max-content) 1fr; font-size: .85em; }}
.phase .warn {{ font-size: .8em; margin: 3px 0 0; padding-left: 1.1em; }}
.result {{ font-size: .9em; margin: 0 0 4px; }}
figure {{ margin: 0; min-width: 0; }}
figcaption {{ font-size: .8em; color: var(--muted); margin-top: 2px; }}
svg.chart {{ width: 100%; height: auto; display: block; max-width: 100%; }}
ul.notes {{ margin: 0; padding-left: 1.2em; font-size: .88em; }}
ul.notes.warning li::marker {{ content: "! "; font-weight: 700; }}
.cautions {{ border: 1.5px solid var(--ink); padding: 5px 8px; background: var(--orange-tint); }}
.sign {{ display: grid; grid-template-columns: repeat(auto-fit, minmax(180px, 1fr)); gap: 4px 16px; margin-top: 8px;
         font-size: .88em; }}
.sign div {{ border-bottom: 1px solid var(--ink); padding-top: 20px; color: var(--muted); }}
.trace {{ font-size: .75em; color: var(--muted); }}
.trace code {{ font-family: ui-monospace, "DejaVu Sans Mono", monospace; word-break: break-all; }}
@page {{ margin: 10mm 11mm; }}
@media print {{
  body {{ font-size: 8.6pt; line-height: 1.28; }}
  main {{ max-width: none; padding: 0; }}
  section {{ margin-bottom: 5pt; }}
  .pair {{ grid-template-columns: 1fr 1fr; }}
  .pair.three {{ grid-template-columns: 1fr 1fr 1fr; }}
  .grid {{ grid-template-columns: 1fr 1fr 1fr 1fr; }}
  .card {{ grid-template-columns: repeat(3, 1fr); }}
  .scroll {{ overflow: visible; }}
  svg.chart {{ max-height: 62mm; }}
  figure.wide svg.chart {{ max-height: 92mm; }}
  .sign div {{ padding-top: 14pt; }}
}}
"""


def _facts(block: Facts | None, tag: str = "section") -> str:
    if block is None:
        return ""
    rows = "".join(f"<dt>{escape(k)}</dt><dd>{escape(v)}</dd>" for k, v in block.rows)
    note = f'<p class="trace">{escape(block.note)}</p>' if block.note else ""
    return f"<{tag}><h2>{escape(block.title)}</h2><dl>{rows}</dl>{note}</{tag}>"


def _mark(verdict: str) -> str:
    symbol, words = VERDICT_MARKS[verdict]
    return f'<span class="mark {verdict}" title="{escape(words)}" aria-label="{escape(words)}">{symbol}</span>'


def _table(block: TableBlock | None) -> str:
    if block is None:
        return ""
    numeric = block.numeric or (False,) * len(block.columns)
    keep = block.nowrap or (False,) * len(block.columns)
    classes = [" class=num" if n else " class=keep" if k else "" for n, k in zip(numeric, keep)]
    head = "".join(f'<th{c} scope="col">{escape(name)}</th>' for name, c in zip(block.columns, classes))
    if block.marks:
        head = '<th scope="col"><span class="sr">mark</span></th>' + head
    body = []
    for i, row in enumerate(block.rows):
        cells = "".join(f"<td{c}>{escape(text)}</td>" for text, c in zip(row, classes))
        if block.marks:
            cells = f"<td>{_mark(block.marks[i])}</td>" + cells
        body.append(f"<tr>{cells}</tr>")
    note = f'<p class="trace">{escape(block.note)}</p>' if block.note else ""
    section = '<section class="breakable">' if block.breakable else "<section>"
    return (f'{section}<h2>{escape(block.title)}</h2><div class="scroll"><table><thead><tr>{head}</tr></thead>'
            f'<tbody>{"".join(body)}</tbody></table></div>{note}</section>')


def _chart(block: ChartBlock | None) -> str:
    if block is None:
        return ""
    caption = f"<figcaption>{escape(block.caption)}</figcaption>" if block.caption else ""
    return f'<figure class="{"wide" if block.wide else "narrow"}">{block.svg}{caption}</figure>'


def _notes(block: Notes | None) -> str:
    if block is None or not block.items:
        return ""
    items = "".join(f"<li>{escape(i)}</li>" for i in block.items)
    cls = " cautions" if block.kind == "caution" else ""
    return f'<section class="{block.kind}{cls}"><h2>{escape(block.title)}</h2><ul class="notes {block.kind}">{items}</ul></section>'


def _card(card: FlightCard) -> str:
    phases = []
    for phase in card.phases:
        figures = "".join(
            f"<dt>{escape(f.label)}</dt><dd>{_mark(f.verdict) + ' ' if f.verdict != 'info' else ''}{escape(f.value)}"
            + (f' <span class="trace">({escape(f.rule)})</span>' if f.rule and f.verdict != "info" else "") + "</dd>"
            for f in phase.figures)
        warns = "".join(f"<li>{escape(m)}</li>" for _, m in phase.warnings)
        phases.append(f'<div class="phase {phase.verdict}"><h3><span>{escape(phase.title)}</span>{_mark(phase.verdict)}'
                      f'</h3><dl>{figures}</dl>{f"<ul class=warn>{warns}</ul>" if warns else ""}</div>')
    looks = sum(p.verdict in ("caution", "fail") for p in card.phases)
    tally = f"; {looks} phase{'s' if looks != 1 else ''} to look at" if looks else "; every checked figure within its rule"
    tallied = card.completed and not card.broken_rules  # a broken launch rule is the headline, not a tally
    result = f'<p class="result">{_mark(card.verdict)} {escape(card.headline + (tally if tallied else ""))}</p>'
    return (f'<section><h2>Flight card: phase by phase</h2>{result}<div class="card">{"".join(phases)}</div>'
            "</section>")


def _cautions() -> str:
    return _notes(Notes("Before you fly", CAUTIONS, "caution"))


def _signature() -> str:
    return ('<section><h2>Range safety officer</h2><div class="sign"><div>Name</div><div>Signature</div>'
            "<div>Date and time</div><div>Decision: fly / do not fly</div></div></section>")


def _trace(trace: Trace) -> str:
    files = "".join(f"<li>{escape(name)}: <code>sha256 {digest}</code></li>" for name, digest in trace.files)
    when = f" on {escape(trace.made_at)}" if trace.made_at else ""
    return (f'<section class="trace"><p>Made by motorlib {escape(trace.version)}{when}: <code>{escape(trace.command)}'
            f"</code></p>{f'<ul class=notes>{files}</ul>' if files else ''}</section>")


def _page(title: str, subtitle: str, stamp: str, body: Iterable[str]) -> str:
    return ("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
            '<meta name="viewport" content="width=device-width, initial-scale=1">'
            f"<title>{escape(title)}</title><style>{_CSS}</style></head><body><main>"
            f'<header class="top"><div><h1>{escape(title)}</h1><div class="subtitle">{escape(subtitle)}</div></div>'
            f'<span class="stamp">{escape(stamp)}</span></header>'
            + "".join(part for part in body if part) + "</main></body></html>\n")


def _row(cls: str, parts: Sequence[str]) -> str:
    present = [p for p in parts if p]
    if not present:
        return ""
    if len(present) == 1:
        return present[0]
    return f'<div class="{cls}">{"".join(present)}</div>'


def render_html(report: FlyReport | MatchReport | ReduceReport) -> str:
    """The report as one self-contained HTML document (a string)."""
    if isinstance(report, FlyReport):
        r = report
        return _page(r.title, r.subtitle, "Pre-flight report", [
            _row("grid", [_facts(r.rocket), _facts(r.motor), _facts(r.delay), _facts(r.conditions)]),
            _card(r.card),
            _row("pair", [_chart(r.flight_chart), _chart(r.side_chart)]),
            _row("pair", [_chart(r.thrust_chart), _facts(r.stability), _facts(r.landing)]),
            _table(r.recovery),
            _row("pair", [_notes(r.warnings), _notes(r.assumptions)]),
            _cautions(), _signature() if r.signature else "", _trace(r.trace),
        ])
    if isinstance(report, MatchReport):
        r = report
        return _page(r.title, r.subtitle, "Motor ranking", [
            _chart(r.chart), _table(r.ranking), _notes(r.reasons),
            _row("pair", [_facts(r.conditions), _notes(r.assumptions)]), _cautions(), _trace(r.trace),
        ])
    if isinstance(report, ReduceReport):
        r = report
        return _page(r.title, r.subtitle, "Test-stand series", [
            _table(r.firings), _row("pair", [_chart(r.overlay), _chart(r.mean_chart)]),
            _row("pair", [_facts(r.spread), _facts(r.label_facts)]), _table(r.label_check), _notes(r.assumptions),
            _trace(r.trace),
        ])
    raise TypeError(f"`report` must be a FlyReport, MatchReport or ReduceReport, got {type(report).__name__}")


def write_report(report: FlyReport | MatchReport | ReduceReport, path: str | os.PathLike[str], *,
                 overwrite: bool = False, inputs: Sequence[str | os.PathLike[str]] = ()) -> Path:
    """Write the report's HTML to ``path`` atomically and return the path.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is False.
    ValueError
        When ``path`` is one of ``inputs`` (a report never replaces the files it describes).
    """
    from ..files.fsio import write_atomic

    check_report_target(path, overwrite=overwrite, inputs=inputs)
    return write_atomic(Path(path), render_html(report).encode("utf-8"), overwrite=overwrite)


def check_report_target(path: str | os.PathLike[str], *, overwrite: bool = False,
                        inputs: Sequence[str | os.PathLike[str]] = ()) -> None:
    """Raise before any work is done if the report could not be written to ``path`` (see :func:`write_report`)."""
    target = Path(path)
    for source in inputs:
        try:
            same = target.exists() and os.path.samefile(target, source)
        except OSError:
            same = False
        if same or target.resolve() == Path(source).resolve():
            raise ValueError(f"{target}: is an input of this report; choose another file name")
    if target.exists() and not overwrite:
        raise FileExistsError(f"{target}: already exists")

