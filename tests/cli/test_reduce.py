"""``motorlib reduce`` through click's CliRunner: options that set the record's metadata; a test series (issue 14):
a table of firings, a check per log, an honest exit status."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from motorlib import read_record
from motorlib.files.curvefiles import load_curve_file

from ..conftest import SAMPLE_DIR
from ..motor.test_reduction import synthetic_log
from .conftest import run

G59 = SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"  # about 110 N·s, class G (80.00-160.00 N·s)


def _logs(tmp_path: Path, scales: list[float]) -> list[str]:
    known = read_record(G59)
    paths = []
    for i, scale in enumerate(scales):
        t, f = synthetic_log(known, 1000.0, noise_n=0.3, offset_n=5.0, seed=i)
        path = tmp_path / f"firing-{i + 1}.csv"
        np.savetxt(path, np.c_[t, (f - 5.0) * scale + 5.0], delimiter=",", header="time_s,thrust_n", comments="",
                   fmt="%.5f")
        paths.append(str(path))
    return paths


def test_every_log_is_checked_and_a_bad_one_fails_the_run(tmp_path: Path) -> None:
    # Issue 14: without --combine only the first log was checked and the exit status was 0 despite errors.
    logs = _logs(tmp_path, [1.0, 0.97, 1.5])  # the third reaches about 165 N·s: class H under a G label
    code, out = run("reduce", *logs, "--designation", "G59-10")
    assert code == 1, out
    for name in ("firing-1.csv", "firing-2.csv", "firing-3.csv"):
        assert f"Log {name}" in out
    assert "Log firing-3.csv  errors" in out and "Log firing-1.csv  sound" in out
    assert "series-straddles-class" in out
    code, out = run("reduce", *logs[:2], "--designation", "G59-10")
    assert code == 0, out


def test_table_of_firings_in_text_and_json(tmp_path: Path) -> None:
    known = read_record(G59)
    logs = _logs(tmp_path, [1.0, 0.9])
    code, out = run("reduce", *logs, "--designation", "G59-10")
    assert code == 0 and "2 firings" in out and "impulse N·s" in out and "G 38%" in out
    code, out = run("reduce", *logs, "--designation", "G59-10", "--json")
    data = json.loads(out)
    for entry, scale in zip(data["logs"], [1.0, 0.9]):
        assert abs(entry["total_impulse_ns"] / (known.total_impulse_ns * scale) - 1) < 0.01
        assert entry["impulse_class"] == "G" and entry["ok"] is True
        # percent into class G, 80.00-160.00 N·s (NFPA 1122 §4.9.2)
        assert abs(entry["class_percent"] - (entry["total_impulse_ns"] - 80.0) / 80.0 * 100.0) < 0.02
    assert data["series_findings"] == []


def test_series_plot_and_provenance(tmp_path: Path) -> None:
    logs = _logs(tmp_path, [1.0, 0.97, 1.03])
    plot, xml = tmp_path / "series.png", tmp_path / "mean.xml"
    code, out = run("reduce", *logs, "--combine", "--designation", "G59-10", "--cutoff", "80", "--detrend",
                    "--plot", str(plot), "-o", str(xml))
    assert code == 0, out
    assert plot.read_bytes()[:4] == b"\x89PNG"
    notes = read_record(xml).provenance.notes
    assert "firing-1.csv, firing-2.csv, firing-3.csv" in notes
    assert "cut-off 80" in notes and "detrend on" in notes and "at most 48 points" in notes
    code, out = run("reduce", *logs, "--designation", "G59-10", "-o", str(tmp_path / "one.xml"))
    assert code == 2 and "--combine" in out  # several logs and one output: the mean needs --combine


def _log(path: Path) -> Path:
    """A raw stand log: 0.5 s of baseline, an F30-like burn with a 2 N offset, 1 kHz, a little noise."""
    t = np.arange(-0.5, 2.7, 1e-3)
    f = np.interp(t, [0.0, 0.1, 2.0, 2.1], [0.0, 36.0, 26.0, 0.0], left=0.0, right=0.0)
    f = f + 2.0 + np.random.default_rng(3).normal(0.0, 0.05, t.size)
    path.write_text("time_s,thrust_n\n" + "".join(f"{a:.4f},{b:.4f}\n" for a, b in zip(t, f)))
    return path


@pytest.mark.parametrize(("args", "kind"), [((), "own-firing"), (("--source-kind", "other"), "other"),
                                             (("--source-kind", "maker-published"), "maker-published")])
def test_the_provenance_kind_defaults_to_own_firing_and_an_explicit_choice_is_kept(
        tmp_path: Path, args: tuple[str, ...], kind: str) -> None:
    out_path = tmp_path / "f30.xml"
    code, out = run("reduce", str(_log(tmp_path / "firing.csv")), "-o", str(out_path), *args)
    assert code == 0, out
    assert load_curve_file(out_path).provenance.kind == kind


def test_a_side_file_sets_the_kind_and_an_option_still_wins(tmp_path: Path) -> None:
    log = _log(tmp_path / "firing.csv")
    side = tmp_path / "motors.toml"
    side.write_text('[files."firing.csv"]\ndesignation = "F30-6"\nsource_kind = "maker-published"\n')
    code, out = run("reduce", str(log), "-o", str(tmp_path / "a.xml"), "--meta", str(side))
    assert code == 0, out
    record = load_curve_file(tmp_path / "a.xml")
    assert record.provenance.kind == "maker-published" and record.designation == "F30-6"
    code, out = run("reduce", str(log), "-o", str(tmp_path / "b.xml"), "--meta", str(side), "--source-kind", "other")
    assert code == 0 and load_curve_file(tmp_path / "b.xml").provenance.kind == "other"
