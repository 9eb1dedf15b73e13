"""Test-stand logs to one checked record (files/stand_logs.py): the library side of ``motorlib reduce``."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from motorlib import read_record
from motorlib.files.motor_csv import CurveMetadata
from motorlib.files.stand_logs import provenance_note, read_stand_logs, settings_note, stand_series
from motorlib.motor.reduction import ReductionSettings

from ..conftest import SAMPLE_DIR
from ..motor.test_reduction import synthetic_log

G59 = SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"  # about 110 N·s: class G (80.00-160.00 N·s)


def _logs(tmp_path: Path, scales: list[float], header: str = "time_s,thrust_n") -> list[str]:
    known = read_record(G59)
    paths = []
    for i, scale in enumerate(scales):
        t, f = synthetic_log(known, 1000.0, noise_n=0.3, offset_n=5.0, seed=i)
        path = tmp_path / f"firing-{i + 1}.csv"
        np.savetxt(path, np.c_[t, (f - 5.0) * scale + 5.0], delimiter=",", header=header, comments="", fmt="%.5f")
        paths.append(str(path))
    return paths


def test_one_log_gives_its_own_curve_and_no_series(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0])
    reductions = read_stand_logs(logs, ReductionSettings())
    series = stand_series(reductions, CurveMetadata(designation="G59-10"))
    assert series.record.n_samples == reductions[0][1].time_s.size and series.record.firing_spread is None
    assert series.log_reports == () and series.series_findings == () and series.spread is None
    assert series.report.source == logs[0] and series.report.ok and series.failed == []
    assert series.record.total_impulse_ns == pytest.approx(read_record(G59).total_impulse_ns, rel=0.01)


def test_a_combined_series_is_the_mean_with_its_spread_and_a_check_per_log(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0, 0.9, 1.1])
    series = stand_series(read_stand_logs(logs, ReductionSettings()), CurveMetadata(designation="G59-10"),
                          combine=True, source="mean.xml")
    # the mean of 100 %, 90 % and 110 % of the same firing is that firing
    assert series.record.total_impulse_ns == pytest.approx(read_record(G59).total_impulse_ns, rel=0.01)
    assert series.record.firing_spread is not None and series.record.firing_spread.n_firings == 3
    assert series.spread["n_firings"] == 3 and len(series.table) == 3 and len(series.log_reports) == 3
    assert series.report.source == "mean.xml"
    assert "Mean of 3 firings" in series.record.provenance.notes


def test_a_firing_in_another_class_fails_its_log_and_warns_for_the_series(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0, 1.5])  # the second reaches about 165 N·s: class H under a G label
    series = stand_series(read_stand_logs(logs, ReductionSettings()), CurveMetadata(designation="G59-10"))
    assert [r.source for r in series.failed] == [logs[1]]
    assert [f.code for f in series.series_findings] == ["series-straddles-class"]
    assert series.report.ok  # uncombined: the record is the first firing's, which is sound


def test_a_units_assumption_is_said(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0], header="time,force")
    reduction = read_stand_logs(logs, ReductionSettings())[0][1]
    assert reduction.findings[0].code == "units-assumed"


def test_provenance_names_the_logs_the_filter_and_the_settings(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0, 0.95])
    reductions = read_stand_logs(logs, ReductionSettings(cutoff_hz=0.0))
    note = provenance_note(reductions, True, "Settings: x.")
    assert note.startswith("Reduced by motorlib from firing-1.csv, firing-2.csv: baseline ")
    assert "no filter" in note and note.endswith("Mean of 2 firings. Settings: x.")
    assert "Mean of" not in provenance_note(reductions[:1], False)
    filtered = read_stand_logs(logs[:1], ReductionSettings(cutoff_hz=80.0))
    assert "low-pass 80 Hz" in provenance_note(filtered, False)


@pytest.mark.parametrize(("settings", "scale", "expected"), [
    (ReductionSettings(), None, "Settings: cut-off default, detrend off, at most 48 points."),
    (ReductionSettings(cutoff_hz=0.0, max_points=20), None, "Settings: cut-off none, detrend off, at most 20 points."),
    (ReductionSettings(cutoff_hz=62.5, detrend=True), 0.05,
     "Settings: cut-off 62.5 Hz, detrend on, at most 48 points, scale 0.05 N/count, offset 8000 counts."),
])
def test_settings_note(settings: ReductionSettings, scale: float | None, expected: str) -> None:
    assert settings_note(settings, scale=scale, offset=8000.0) == expected
