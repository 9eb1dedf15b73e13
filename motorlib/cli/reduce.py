"""``motorlib reduce``: raw load-cell logs from a test stand to a checked thrust curve."""

from __future__ import annotations

import math
from typing import Any

import click

from .options import _Finite, _metadata_for, _metadata_options, _units_option, display_units
from .group import _Command
from .output import STDOUT_HELP, STDOUT_PATH, _OVERWRITE_HINT, _check_outputs, _report_console, _strict_json


@click.command(cls=_Command)
@click.argument("logs", nargs=-1, required=True, type=click.Path(exists=True, dir_okay=False))
@click.option("-o", "--output", type=click.Path(dir_okay=False), help=f"Motor-record XML file to write (atomically); {STDOUT_HELP}.")
@click.option("--overwrite", is_flag=True, help="Replace OUTPUT, the --plot and --report files if they exist.")
@click.option("--force", is_flag=True, help="Write OUTPUT even when the checks find errors.")
@click.option("--combine", is_flag=True, help="Several firings of one motor: write their mean curve and report the spread.")
@click.option("--scale", type=_Finite(min=0.0, min_open=True), help="Calibration for a raw-count column: newtons per count.")
@click.option("--offset", type=_Finite(), default=0.0, show_default=True, help="Zero reading of a raw-count column, in counts.")
@click.option("--cutoff", default=None, metavar="HZ|none",
              help="-3 dB frequency of the zero-phase low-pass filter (default: 100 Hz or a quarter of the sample rate); "
                   "'none' disables it.")
@click.option("--detrend", is_flag=True, help="Remove linear load-cell drift between the pre- and post-burn levels.")
@click.option("--points", type=click.IntRange(8, 500), default=48, show_default=True,
              help="Most points in the reduced curve.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), help="Write raw, filtered and reduced curves to this PNG.")
@click.option("--report", "report_path", type=click.Path(dir_okay=False),
              help="Write a printable report of the test series (firings, overlay, mean and spread, label check) "
                   "as one self-contained HTML file.")
@_units_option
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
@_metadata_options
def reduce(logs: tuple[str, ...], output: str | None, overwrite: bool, force: bool, combine: bool, scale: float | None,
           offset: float, cutoff: str | None, detrend: bool, points: int, plot_path: str | None, report_path: str | None,
           units: str | None,
           as_json: bool, **opts: Any) -> None:
    """Turn raw load-cell logs from a test stand into a checked thrust curve.

    A log is a CSV with a time column and a force column, in any unit the
    header names (N, lbf, kgf, gf, or kg and g as a load cell reports mass:
    force = m·g0), or raw counts with --scale and --offset. The baseline is
    tared from the readings before ignition, the data filtered, ignition and
    burnout found, and the curve reduced to at most --points points; the
    result is checked against --designation when given. The provenance kind
    defaults to own-firing. Several logs give a table of the firings and a
    check of each log; --plot then overlays them with their mean. The exit
    status is 1 when any check finds an error.

    \b
    Example:
      motorlib reduce firing-1.csv --designation F30-6 --diameter 24mm \\
          --length 70mm --total-mass 48g --propellant-mass 22g --delays 6 \\
          -o F30-6.xml --plot firing-1.png
      motorlib reduce f1.csv f2.csv f3.csv --combine --designation F30-6 \\
          -o F30-6-mean.xml --report series.html
    """
    from pathlib import Path

    from ..errors import CurveDataError
    from ..files.stand_logs import read_stand_logs, settings_note, stand_series
    from ..motor.reduction import ReductionSettings

    if len(logs) > 1 and not combine and output:
        raise click.UsageError("several logs with --output: add --combine to write their mean curve")
    _check_outputs({"--output": output, "--plot": plot_path, "--report": report_path}, overwrite, logs,
                   printing="--json" if as_json else None)
    settings = ReductionSettings(cutoff_hz=_cutoff_hz(cutoff), detrend=detrend, max_points=points)
    if report_path:
        from .output import _write_report

        _write_report(None, report_path, overwrite, list(logs) + ([output] if output not in (None, STDOUT_PATH) else []),
                      check_only=True)
    # a log from our own stand, unless the option or the side file says otherwise
    meta = _metadata_for(opts, list(logs), default_kind="own-firing")
    meta = meta(logs[0]) if callable(meta) else meta  # a series is one motor: the first log's entry
    try:
        reductions = read_stand_logs(logs, settings, time_unit=opts["time_unit"], thrust_unit=opts["thrust_unit"],
                                     scale=scale, offset=offset)
    except CurveDataError as exc:
        raise click.ClickException(str(exc)) from None
    series = stand_series(reductions, meta, combine=combine, max_points=points,
                          settings_text=settings_note(settings, scale=scale, offset=offset),
                          source=None if output == STDOUT_PATH else output)
    record, report, spread, first = series.record, series.report, series.spread, reductions[0][1]
    written = []
    if output:
        written.append(_write_checked(record, report, output, overwrite, force))
    if plot_path and len(reductions) > 1:
        from ..present.plots import series_plot

        written.append(series_plot([(Path(p).name, r) for p, r in reductions],
                                   f"{record.designation}: {len(reductions)} firings", plot_path))
    elif plot_path:
        from ..present.plots import reduction_plot

        written.append(reduction_plot(first, f"{record.designation}: {Path(logs[0]).name}", plot_path))
    if report_path:
        from .fly import _command_line
        from .output import _write_report
        from ..present.report_content import reduce_report

        inputs = list(logs) + ([output] if output not in (None, STDOUT_PATH) else [])
        report_doc = reduce_report(reductions, record, report, spread, inputs=list(logs), command=_command_line())
        written.append(_write_report(report_doc, report_path, overwrite, inputs))
    summary = _log_summary(reductions)
    for entry, row, log_report in zip(summary, series.table, series.log_reports or [None] * len(summary)):
        entry.update(row)
        if log_report is not None:
            entry.update(ok=log_report.ok, findings=[f.as_dict() for f in log_report.findings])
    if as_json:
        click.echo(_strict_json({"logs": summary, "combined": spread,
                                 "series_findings": [f.as_dict() for f in series.series_findings],
                                 **report.as_dict(), "written": [str(p) for p in written if p is not None]}, indent=2, default=float))
    else:
        _print_reduction(summary, spread, report, written, display_units(units), series.log_reports, combine,
                         to_stderr=output == STDOUT_PATH)
    if series.failed:
        raise SystemExit(1)  # the report is printed; the status tells scripts that a check found errors


def _cutoff_hz(cutoff: str | None) -> float | None:
    """The ``--cutoff`` frequency in Hz: None for the default, 0.0 for 'none' (no filter)."""
    try:
        text = None if cutoff is None else cutoff.strip().lower().removesuffix("hz").strip()
        value = None if text is None else (0.0 if text == "none" else float(text))
    except ValueError:
        value = -1.0
    if value is not None and not (math.isfinite(value) and value >= 0.0):
        raise click.BadParameter(f"expected a frequency above 0 Hz or 'none', got {cutoff!r}", param_hint="--cutoff")
    return value


def _write_checked(record: Any, report: Any, output: str, overwrite: bool, force: bool) -> Any:
    """Write ``record`` to ``output`` unless its checks found errors (and not ``force``); the path written (None
    for standard output, ``-o -``)."""
    if not report.ok and not force:
        raise click.ClickException(_findings_message(report))
    from ..files.motor_xml import readable_record_bytes
    from .output import _write_output

    try:
        shown = "standard output" if output == STDOUT_PATH else output
        return _write_output(output, readable_record_bytes(record, shown), overwrite)
    except FileExistsError as exc:
        raise click.ClickException(f"{exc}; {_OVERWRITE_HINT}") from exc


def _log_summary(reductions: list[tuple[str, Any]]) -> list[dict[str, Any]]:
    """One JSON-ready dict per log: rate, baseline, noise, filter, events and reduction errors (SI)."""
    return [{"file": p, "rows": int(r.raw_time_s.size), "sample_rate_hz": r.sample_rate_hz,
             "baseline_n": r.baseline_n, "noise_n": r.noise_n, "drift_n_per_s": r.drift_n_per_s,
             "cutoff_hz": r.cutoff_hz, "ignition_time_s": r.ignition_time_s, "burnout_time_s": r.burnout_time_s,
             "event_threshold_n": r.threshold_n, "points": int(r.time_s.size),
             "reduction_impulse_error": r.impulse_error, "reduction_peak_error": r.peak_error} for p, r in reductions]


def _print_reduction(summary: list[dict[str, Any]], spread: dict[str, Any] | None, report: Any,
                     written: list[Any], units: Any, log_reports: list[Any] = (), combine: bool = False,
                     to_stderr: bool = False) -> None:
    """The report for people: one line per log, the table of firings and a check block per log of a series,
    the spread of several firings, the checks of the record, the files written; on standard error when the
    record has standard output (``to_stderr``)."""
    from ..present import tables as render

    console = _report_console(STDOUT_PATH if to_stderr else None)
    console.print(render.reduction_text(summary, spread, units), end="")
    if len(summary) > 1:
        console.print(render.firings_table(summary, units))
        for log_report in log_reports:
            console.print(_log_check_block(log_report, render))
    if len(summary) > 1 and not combine:
        console.print(f"The record below is the first firing's; --combine writes the mean of all {len(summary)}.")
    console.print(render.check_details(report, units, report.record))
    for path in written:
        if path is not None:  # None: standard output
            console.print(f"Wrote {render.escape(str(path))}")


def _log_check_block(log_report: Any, render: Any) -> Any:
    """``firing-2.csv  sound`` or its status and findings: the check block of one log of a series."""
    from rich.console import Group

    head = render.check_status_line(log_report)
    return Group(head, render.findings_text(log_report)) if log_report.findings else head


def _findings_message(report: Any) -> str:
    errors = [f"{f.code}: {f.message}" for f in report.findings if f.severity == "error"]
    return (f"{report.source}: the reduced curve has errors ({'; '.join(errors)}); nothing was written "
            "(use --force to write it anyway)")
