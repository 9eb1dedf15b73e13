"""Test-stand logs to one checked motor record: what ``motorlib reduce`` does, as library calls.

Steps: read every log (:func:`read_stand_logs`: a CSV of time and force, see :mod:`.motor_csv`) and reduce it
(:func:`motorlib.motor.reduction.reduce_log`); then :func:`stand_series` makes the record, the mean curve of a
combined series or else the first log's, with its metadata and a provenance note that says which logs and
which settings made it (:func:`provenance_note`, :func:`settings_note`), and checks it. A series of several
logs also gets a table of firings, findings of its own, and a check of each log. Nothing here writes a file.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Sequence

import numpy as np

from ..motor.checks import Finding, check_record, metrics
from ..motor.reduction import (Reduction, ReductionSettings, combine_reductions, firing_spread, firing_table,
                               reduce_log, series_findings)
from ..motor.record import MotorRecord
from .curvefiles import CheckReport
from .motor_csv import CurveMetadata, read_csv_curve

__all__ = ["StandSeries", "provenance_note", "read_stand_logs", "settings_note", "stand_series"]


@dataclass(frozen=True)
class StandSeries:
    """The outcome of reducing one or more test-stand logs of one motor.

    Attributes
    ----------
    reductions : tuple of (str, Reduction)
        Each log's path and reduction, in the order given.
    record : MotorRecord
        The record: the mean curve of a combined series, else the first log's curve.
    report : CheckReport
        The record's checks, with the findings of the logs it comes from and of the series.
    log_reports : tuple of CheckReport
        One check per log of a series of two or more (each log's own curve); empty for one log.
    table : tuple of dict
        One row per firing (:func:`~motorlib.motor.reduction.firing_table`).
    series_findings : tuple of Finding
        Findings about the series as a whole (none for one log).
    spread : dict or None
        The combined series' spread (:func:`~motorlib.motor.reduction.combine_reductions`); None uncombined.
    """

    reductions: tuple[tuple[str, Reduction], ...]
    record: MotorRecord
    report: CheckReport
    log_reports: tuple[CheckReport, ...]
    table: tuple[dict[str, Any], ...]
    series_findings: tuple[Finding, ...]
    spread: dict[str, Any] | None

    @property
    def failed(self) -> list[CheckReport]:
        """The checks that found errors: logs of the series, then the record."""
        return [r for r in self.log_reports if not r.ok] + ([] if self.report.ok else [self.report])


def read_stand_logs(paths: Sequence[str], settings: ReductionSettings, *, time_unit: str | None = None,
                    thrust_unit: str | None = None, scale: float | None = None, offset: float = 0.0
                    ) -> list[tuple[str, Reduction]]:
    """Read and reduce every log; pairs of (path, reduction). A units assumption the reader made becomes a
    ``units-assumed`` note first among the reduction's findings (said, never silent).

    Raises
    ------
    CsvFormatError
        A log that is not a readable time and force CSV.
    CurveDataError
        A log that cannot be reduced (too few rows, time not increasing, no firing in it).
    """
    reductions = []
    for path in paths:
        curve = read_csv_curve(path, time_unit=time_unit, thrust_unit=thrust_unit, scale=scale, offset=offset)
        reduction = reduce_log(curve.time_s, curve.thrust_n, settings, lines=np.asarray(curve.lines), source=path)
        if curve.assumption():
            note = Finding("note", "units-assumed", f"{path}: {curve.assumption()}")
            reduction = replace(reduction, findings=(note, *reduction.findings))
        reductions.append((path, reduction))
    return reductions


def _figure(value: float, significant: int) -> str:
    """``value`` with at least ``significant`` significant digits, at least one decimal and no exponent."""
    if value == 0.0 or not math.isfinite(value):
        return f"{value:.1f}"
    return f"{value:.{max(1, min(significant - 1 - math.floor(math.log10(abs(value))), 4))}f}"


def settings_note(settings: ReductionSettings, *, scale: float | None = None, offset: float = 0.0) -> str:
    """The reduction settings, for the record's provenance (so that the reduction can be repeated).

    ``scale`` [N/count] and ``offset`` [counts] calibrate a raw-count column.

    >>> settings_note(ReductionSettings(cutoff_hz=80.0, detrend=True))
    'Settings: cut-off 80 Hz, detrend on, at most 48 points.'
    """
    cutoff = ("default" if settings.cutoff_hz is None else "none" if settings.cutoff_hz == 0.0
              else f"{settings.cutoff_hz:g} Hz")
    parts = [f"cut-off {cutoff}", "detrend on" if settings.detrend else "detrend off",
             f"at most {settings.max_points} points"]
    if scale is not None:
        parts.append(f"scale {scale:g} N/count, offset {offset:g} counts")
    return "Settings: " + ", ".join(parts) + "."


def provenance_note(reductions: Sequence[tuple[str, Reduction]], combined: bool, settings_text: str = "") -> str:
    """The provenance note of a reduced record: the logs by file name, how the first one was reduced
    (baseline and noise [N], sample rate, filter, event threshold [N]), whether it is a mean, and the settings."""
    first = reductions[0][1]
    return (f"Reduced by motorlib from {', '.join(Path(p).name for p, _ in reductions)}: baseline "
            f"{_figure(first.baseline_n, 3)} N, noise {_figure(first.noise_n, 2)} N, {first.sample_rate_hz:g} Hz, "
            + (f"low-pass {first.cutoff_hz:g} Hz" if first.cutoff_hz else "no filter")
            + f", events at {_figure(first.threshold_n, 2)} N."
            + (f" Mean of {len(reductions)} firings." if combined else "")
            + (f" {settings_text}" if settings_text else ""))


def stand_series(reductions: Sequence[tuple[str, Reduction]], metadata: CurveMetadata, *, combine: bool = False,
                 max_points: int = 48, settings_text: str = "", source: str | None = None) -> StandSeries:
    """The record of reduced logs of one motor, its checks, and the checks of a series.

    Parameters
    ----------
    reductions : sequence of (str, Reduction)
        From :func:`read_stand_logs`; the first log names the record when the metadata gives no designation.
    metadata : CurveMetadata
        What the logs do not say; the provenance note is added to its notes.
    combine : bool
        Make the record of the series' mean curve, with its measured spread; else the first log's curve.
    max_points : int
        Most points in a combined curve.
    settings_text : str
        The settings as :func:`settings_note` gives them, for the provenance.
    source : str, optional
        What the record's check report names (the output file); default the first log.
    """
    pairs = tuple(reductions)
    runs = [r for _, r in pairs]
    if combine:
        time_s, thrust_n, spread = combine_reductions(runs, max_points)
    else:
        time_s, thrust_n, spread = runs[0].time_s, runs[0].thrust_n, None
    note = provenance_note(pairs if combine else pairs[:1], combine, settings_text)
    meta = replace(metadata, provenance=replace(metadata.provenance,
                                                notes=f"{metadata.provenance.notes} {note}".strip()))
    name = Path(pairs[0][0]).stem
    record = meta.record(time_s, thrust_n, default_designation=name)
    if combine:
        record = replace(record, firing_spread=firing_spread(runs))
    table = firing_table(runs)
    series = series_findings(table) if len(pairs) > 1 else []
    log_reports = _log_reports(pairs, meta, name) if len(pairs) > 1 else []
    log_findings = [f for r in runs for f in r.findings] if combine or len(pairs) == 1 else list(runs[0].findings)
    findings = log_findings + series + check_record(record)
    report = CheckReport(source or pairs[0][0], True, record, tuple(findings), metrics(record))
    return StandSeries(pairs, record, report, tuple(log_reports), tuple(table), tuple(series), spread)


def _log_reports(reductions: Sequence[tuple[str, Reduction]], meta: CurveMetadata,
                 default_designation: str) -> list[CheckReport]:
    """One check per log of a series: its own reduction findings and the record checks of its own curve."""
    reports = []
    for path, r in reductions:
        record = meta.record(r.time_s, r.thrust_n, default_designation=default_designation)
        findings = [f for f in (*r.findings, *check_record(record)) if f.code != "hardware-incomplete"]
        reports.append(CheckReport(path, True, record, tuple(findings), metrics(record)))
    return reports
