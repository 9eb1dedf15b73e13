"""Export to CSV and JSON reads back as the same curve: time first, thrust second, as the header says."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from motorlib import read_csv_curve, read_record
from motorlib.files.export import export_records

from ..conftest import SAMPLE_DIR

NAMES = ["bramblewick-propulsion_g59-10.xml", "teakettle-thrust-co_1-2a3-2-4.xml"]


@pytest.mark.parametrize("name", NAMES)
def test_csv_export_reads_back_as_the_same_curve(tmp_path: Path, name: str) -> None:
    record = read_record(SAMPLE_DIR / name)
    [written] = export_records([("maker/" + name[:-4], record)], tmp_path, "csv")
    assert written.read_text(encoding="utf-8").splitlines()[1] == "time_s,thrust_n"
    curve = read_csv_curve(written)
    np.testing.assert_array_equal(curve.time_s, record.time_s)  # repr() of a float reads back exactly
    np.testing.assert_array_equal(curve.thrust_n, record.thrust_n)


def test_json_export_keeps_the_samples_and_their_integral(tmp_path: Path) -> None:
    record = read_record(SAMPLE_DIR / NAMES[0])
    [written] = export_records([("a/g59", record)], tmp_path, "json")
    [data] = json.loads(written.read_text(encoding="utf-8"))
    t, f = np.array(data["samples"]["time_s"]), np.array(data["samples"]["thrust_n"])
    # total impulse by the trapezoidal rule written out here (exact for a piecewise-linear curve)
    assert data["total_impulse_ns"] == pytest.approx(float(np.sum(0.5 * (f[1:] + f[:-1]) * np.diff(t))), rel=1e-12)
    assert data["handle"] == "a/g59" and data["designation"] == record.designation
