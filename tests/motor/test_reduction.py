"""Static-test reduction on synthetic logs built from known curves (noise, offset, drift, rates, clipping)."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner
from scipy.signal import butter, sosfreqz

from motorlib import CurveDataError, MotorRecord, check_file, read_record
from motorlib.catalog import Catalog
from motorlib.cli.main import main
from motorlib.motor.reduction import (
    ReductionSettings,
    combine_reductions,
    firing_spread,
    lowpass_design_hz,
    reduce_log,
)

from ..conftest import SAMPLE_DIR

SAMPLES = ["bramblewick-propulsion_g59-10.xml", "teakettle-thrust-co_c6-3-5-7.xml",
           "marmalade-moon-motors_1800k694-14.xml", "bramblewick-propulsion_g25-4-7-10.xml",
           "teakettle-thrust-co_1-2a3-2-4.xml"]


def synthetic_log(record: MotorRecord, rate_hz: float, *, noise_n: float, offset_n: float = 0.0,
                  drift_n_s: float = 0.0, jitter: float = 0.0, seed: int = 0) -> tuple[np.ndarray, np.ndarray]:
    """A load-cell log of ``record``: 0.5 s before ignition, 0.6 s after burnout, known noise and offset."""
    rng = np.random.default_rng(seed)
    t = np.arange(-0.5, record.time_s[-1] + 0.6, 1.0 / rate_hz)
    if jitter:
        t = t + rng.uniform(-jitter, jitter, t.size) / rate_hz
    f = record.thrust_at_n(t) + offset_n + drift_n_s * (t + 0.5) + rng.normal(0.0, noise_n, t.size)
    return t, f


@pytest.mark.parametrize("name", SAMPLES)
@pytest.mark.parametrize("rate", [500.0, 2000.0, 10000.0])
def test_reduced_curve_matches_the_known_one(name: str, rate: float) -> None:
    # Goals of the reduction issue: total impulse within 1 %, burn time within 2 % of the known curve.
    known = read_record(SAMPLE_DIR / name)
    t, f = synthetic_log(known, rate, noise_n=0.005 * known.peak_thrust_n, offset_n=0.3 * known.peak_thrust_n + 5.0)
    reduction = reduce_log(t, f)
    curve = MotorRecord("reduced", reduction.time_s, reduction.thrust_n)
    assert curve.total_impulse_ns == pytest.approx(known.total_impulse_ns, rel=0.01)
    assert curve.burn_time_s() == pytest.approx(known.burn_time_s(), rel=0.02)
    assert curve.n_samples <= 48
    assert reduction.impulse_error <= 0.002 and reduction.peak_error <= 0.01  # against the filtered data
    assert reduction.noise_n == pytest.approx(0.005 * known.peak_thrust_n, rel=0.2)  # robust σ of the baseline
    assert reduction.baseline_n == pytest.approx(0.3 * known.peak_thrust_n + 5.0, abs=3 * 0.005 * known.peak_thrust_n)


def test_a_slow_50_hz_logger_still_works() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])  # 1.9 s burn: about 95 samples at 50 Hz
    t, f = synthetic_log(known, 50.0, noise_n=0.2, offset_n=4.0)
    reduction = reduce_log(t, f)
    curve = MotorRecord("reduced", reduction.time_s, reduction.thrust_n)
    assert curve.total_impulse_ns == pytest.approx(known.total_impulse_ns, rel=0.01)
    assert curve.burn_time_s() == pytest.approx(known.burn_time_s(), rel=0.02)
    assert "log-slow" in [x.code for x in reduction.findings]


def test_drift_is_reported_and_removed() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.2, offset_n=10.0, drift_n_s=2.0)
    plain = reduce_log(t, f)
    assert "log-drift" in [x.code for x in plain.findings]
    fixed = reduce_log(t, f, ReductionSettings(detrend=True))
    assert fixed.drift_n_per_s == pytest.approx(2.0, rel=0.05)
    impulse = float(np.trapezoid(fixed.thrust_n, fixed.time_s))
    assert impulse == pytest.approx(known.total_impulse_ns, rel=0.01)


def test_non_uniform_time_stamps_are_resampled() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 1000.0, noise_n=0.2, jitter=0.3, seed=4)
    reduction = reduce_log(t, f)
    assert "log-resampled" in [x.code for x in reduction.findings]
    assert float(np.trapezoid(reduction.thrust_n, reduction.time_s)) == pytest.approx(known.total_impulse_ns, rel=0.01)


def test_clipping_is_reported_with_rows() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.2, offset_n=3.0)
    full_scale = 0.9 * float(np.max(f))
    clipped = np.minimum(f, full_scale)
    reduction = reduce_log(t, clipped, lines=np.arange(2, t.size + 2))
    finding = next(x for x in reduction.findings if x.code == "log-clipped")
    assert "rows" in finding.message and finding.severity == "warning"


def test_negative_spike_is_reported() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.2, offset_n=3.0)
    f[500] -= 40.0  # before ignition
    reduction = reduce_log(t, f, lines=np.arange(2, t.size + 2))
    assert "row 502" in next(x.message for x in reduction.findings if x.code == "log-negative-spike")


@pytest.mark.parametrize(("mutate", "code"), [
    (lambda t, f: (t[:10], f[:10]), "log-too-short"),
    (lambda t, f: (np.concatenate((t[:100], t[99:98:-1], t[101:])), f), "log-time-backwards"),
    (lambda t, f: (t, np.full(t.size, 5.0) + np.random.default_rng(0).normal(0, 0.2, t.size)), "log-no-ignition"),
    (lambda t, f: (t[1000:], f[1000:]), "log-no-baseline"),
])
def test_bad_logs_give_clear_errors(mutate, code: str) -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.2, offset_n=3.0)
    t2, f2 = mutate(t, f)
    with pytest.raises(CurveDataError) as info:
        reduce_log(t2, f2[: t2.size], lines=np.arange(2, t2.size + 2), source="stand.csv")
    assert info.value.problems[0].code == code
    assert str(info.value).startswith("stand.csv")


@pytest.mark.parametrize("order", [2, 4, 6])
@pytest.mark.parametrize("cutoff", [20.0, 100.0, 400.0])
def test_zero_phase_filter_is_minus_3_db_at_the_cutoff(order: int, cutoff: float) -> None:
    # Reference: scipy.signal's documented Butterworth response (sosfreqz); forward-backward filtering squares it.
    rate = 2000.0
    sos = butter(order, lowpass_design_hz(cutoff, order, rate), btype="low", fs=rate, output="sos")
    _, h = sosfreqz(sos, worN=[cutoff], fs=rate)
    assert abs(h[0]) ** 2 == pytest.approx(1 / math.sqrt(2), rel=1e-6)  # combined magnitude: -3.0103 dB


def test_filter_attenuates_a_sine_at_the_cutoff_as_stated() -> None:
    rate, cutoff = 2000.0, 100.0
    t = np.arange(-0.5, 3.0, 1 / rate)
    burn = (t > 0.5) & (t < 2.5)
    signal = np.where(burn, 100.0 + 5.0 * np.sin(2 * np.pi * cutoff * t), 0.0)
    reduction = reduce_log(t, signal, ReductionSettings(cutoff_hz=cutoff))
    middle = (reduction.filtered_time_s > 0.5) & (reduction.filtered_time_s < 1.5)
    ripple = reduction.filtered_thrust_n[middle] - 100.0
    amplitude = (np.max(ripple) - np.min(ripple)) / 2
    assert amplitude == pytest.approx(5.0 / math.sqrt(2), rel=0.03)


def test_combined_firings_give_mean_and_spread() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    reductions = []
    for k, gain in enumerate((0.98, 1.0, 1.02)):
        t, f = synthetic_log(known, 2000.0, noise_n=0.2, seed=k)
        reductions.append(reduce_log(t, gain * f))
    time_s, thrust_n, spread = combine_reductions(reductions)
    assert float(np.trapezoid(thrust_n, time_s)) == pytest.approx(known.total_impulse_ns, rel=0.01)
    ti = spread["total_impulse_ns"]
    assert ti["min"] < ti["mean"] < ti["max"] and ti["std"] == pytest.approx(0.02 * known.total_impulse_ns, rel=0.15)


def test_the_spread_of_several_firings_becomes_a_record_field() -> None:
    # Issue 12: a team's own firings feed the Monte Carlo; the spread is kept in the record.
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    reductions = []
    for k, (gain, stretch) in enumerate(((0.98, 1.0), (1.0, 1.03), (1.02, 0.97))):
        t, f = synthetic_log(known, 2000.0, noise_n=0.2, seed=k)
        reductions.append(reduce_log(t * stretch, gain * f))
    spread = firing_spread(reductions)
    _, _, summary = combine_reductions(reductions)
    assert spread.n_firings == 3
    assert spread.total_impulse_mean_ns == pytest.approx(summary["total_impulse_ns"]["mean"], rel=1e-12)
    assert spread.total_impulse_std_ns == pytest.approx(summary["total_impulse_ns"]["std"], rel=1e-12)
    burns = [MotorRecord("firing", r.filtered_time_s, r.filtered_thrust_n).burn_time_s() for r in reductions]
    assert spread.burn_time_mean_s == pytest.approx(np.mean(burns), rel=1e-12)
    assert spread.burn_time_std_s == pytest.approx(np.std(burns, ddof=1), rel=1e-12)
    assert spread.burn_time_relative_std == pytest.approx(0.03, rel=0.25)
    assert firing_spread(reductions[:1]) is None  # one firing has no spread


def _write_log(path: Path, t: np.ndarray, f: np.ndarray, unit: str = "lbf", factor: float = 4.4482216152605) -> Path:
    with open(path, "w") as handle:
        handle.write(f"# stand log\ntime_ms,force_{unit}\n")
        for a, b in zip(t, f):
            handle.write(f"{a * 1000:.4f},{b / factor:.6f}\n")
    return path


def test_reduce_command_makes_a_catalog_ready_file(tmp_path: Path) -> None:
    # Done-means: a noisy 2 kHz log becomes a file that `check` accepts and `catalog add` stores.
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.3, offset_n=12.0)
    log = _write_log(tmp_path / "firing-1.csv", t, f)
    out = tmp_path / "G59-10.xml"
    plot = tmp_path / "firing.png"
    result = CliRunner().invoke(main, ["reduce", str(log), "--designation", "G59-10", "--maker", "Stand team (fictional)",
                                       "--diameter", "29mm", "--length", "124mm", "--total-mass", "150g",
                                       "--propellant-mass", "62g", "--delays", "10", "-o", str(out), "--plot", str(plot)])
    assert result.exit_code == 0, result.output
    assert check_file(out).ok and plot.exists()
    record = read_record(out)
    assert record.provenance.kind == "own-firing" and "Reduced by motorlib" in record.provenance.notes
    assert record.firing_spread is None
    assert record.total_impulse_ns == pytest.approx(known.total_impulse_ns, rel=0.01)
    catalog = Catalog(tmp_path / "cat")
    assert catalog.add_files([out])[0].status == "added"


def test_reduce_command_mass_units_and_counts(tmp_path: Path) -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 1000.0, noise_n=0.2, offset_n=2.0)
    kg_log = _write_log(tmp_path / "kg.csv", t, f, unit="kg", factor=9.80665)  # a load cell reporting kg
    data = json.loads(CliRunner().invoke(main, ["reduce", str(kg_log), "--designation", "G59-10", "--json"]).output)
    assert data["total_impulse_ns"] == pytest.approx(known.total_impulse_ns, rel=0.01)
    counts = tmp_path / "counts.csv"
    with open(counts, "w") as handle:
        handle.write("t_s,force (counts)\n")
        for a, b in zip(t, f):
            handle.write(f"{a:.5f},{round(b / 0.05 + 8000)}\n")
    data = json.loads(CliRunner().invoke(main, ["reduce", str(counts), "--scale", "0.05", "--offset", "8000",
                                                "--json"]).output)
    assert data["total_impulse_ns"] == pytest.approx(known.total_impulse_ns, rel=0.01)
    result = CliRunner().invoke(main, ["reduce", str(counts)])
    assert result.exit_code == 2 and "calibration" in result.output


def test_reduce_command_refuses_a_label_it_does_not_honour(tmp_path: Path) -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.3)
    log = _write_log(tmp_path / "f.csv", t, f)
    result = CliRunner().invoke(main, ["reduce", str(log), "--designation", "H59-10", "-o", str(tmp_path / "x.xml")])
    assert result.exit_code == 1 and "class-mismatch" in result.output and not (tmp_path / "x.xml").exists()
    bad = tmp_path / "bad.csv"
    bad.write_text("time_s,force_n\n" + "".join(f"{i / 100},{1.0}\n" for i in range(30)) + "0.1,5\n")
    result = CliRunner().invoke(main, ["reduce", str(bad)])
    assert result.exit_code == 1 and "time does not increase at row 32" in result.output


def test_reduce_combine_writes_the_firing_spread(tmp_path: Path) -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    logs = []
    for k, gain in enumerate((0.98, 1.0, 1.02)):
        t, f = synthetic_log(known, 2000.0, noise_n=0.3, seed=k)
        logs.append(str(_write_log(tmp_path / f"firing-{k + 1}.csv", t, gain * f)))
    out = tmp_path / "G59-10-mean.xml"
    result = CliRunner().invoke(main, ["reduce", *logs, "--combine", "--designation", "G59-10", "--delays", "10",
                                       "-o", str(out)])
    assert result.exit_code == 0, result.output
    spread = read_record(out).firing_spread
    assert spread.n_firings == 3
    assert spread.total_impulse_relative_std == pytest.approx(0.02, rel=0.2)


# ------------------------------------------------------------------ issue 14: test series
def _series(scales: list[float], rate: float = 2000.0) -> list:
    known = read_record(SAMPLE_DIR / SAMPLES[0])  # G59-10, about 110 N·s
    out = []
    for i, scale in enumerate(scales):
        t, f = synthetic_log(known, rate, noise_n=0.2, offset_n=5.0, seed=i)
        out.append(reduce_log(t, (f - 5.0) * scale + 5.0))
    return out


def test_firing_table_gives_each_firings_figures() -> None:
    from motorlib.motor.reduction import firing_table

    known = read_record(SAMPLE_DIR / SAMPLES[0])
    scales = [0.95, 1.0, 1.05]
    table = firing_table(_series(scales))
    assert len(table) == 3
    for row, scale in zip(table, scales):
        impulse = known.total_impulse_ns * scale
        assert row["total_impulse_ns"] == pytest.approx(impulse, rel=0.01)
        assert row["peak_thrust_n"] == pytest.approx(known.peak_thrust_n * scale, rel=0.02)
        assert row["burn_time_s"] == pytest.approx(known.burn_time_s(), rel=0.02)
        assert row["average_thrust_n"] == pytest.approx(known.average_thrust_n() * scale, rel=0.02)
        # Class G spans 80.00-160.00 N·s (NFPA 1122 §4.9.2; tests/reference/check_values.md#impulse-classes):
        # percent into class by hand.
        assert row["impulse_class"] == "G"
        assert row["class_percent"] == pytest.approx(100.0 * (row["total_impulse_ns"] - 80.0) / 80.0, abs=0.02)


def test_a_series_across_a_class_boundary_warns() -> None:
    from motorlib.motor.reduction import firing_table, series_findings

    # 110 N·s x 1.40 and x 1.50: about 154 and 165 N·s, either side of the G/H boundary at 160.00 N·s (NFPA 1122).
    straddling = series_findings(firing_table(_series([1.40, 1.50])))
    assert [f.code for f in straddling] == ["series-straddles-class"]
    assert "G, H" in straddling[0].message and "160.00" in straddling[0].message
    assert series_findings(firing_table(_series([0.95, 1.05]))) == []


def test_a_single_reading_glitch_is_found_and_named_by_row() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 2000.0, noise_n=0.2, offset_n=5.0)
    assert "log-glitch" not in [x.code for x in reduce_log(t, f).findings]
    f[1500] += 3.0 * known.peak_thrust_n  # one reading, 1.5 ms: no motor does that
    glitch = [x for x in reduce_log(t, f, lines=np.arange(2, t.size + 2)).findings if x.code == "log-glitch"]
    assert len(glitch) == 1 and "row 1502" in glitch[0].message  # index 1500, lines counted from 2


@pytest.mark.parametrize("name", SAMPLES)
def test_real_ignition_spikes_are_not_glitches(name: str) -> None:
    known = read_record(SAMPLE_DIR / name)
    for rate in (500.0, 10000.0):
        t, f = synthetic_log(known, rate, noise_n=0.005 * known.peak_thrust_n)
        assert "log-glitch" not in [x.code for x in reduce_log(t, f).findings]


def test_a_cutoff_at_or_above_nyquist_warns() -> None:
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, 1000.0, noise_n=0.2)
    for cutoff in (500.0, 800.0):  # Nyquist of a 1000 Hz log is 500 Hz
        assert "log-filter-skipped" in [x.code for x in reduce_log(t, f, ReductionSettings(cutoff_hz=cutoff)).findings]


@pytest.mark.parametrize("rate", [1000.0, 5000.0])
def test_a_glitch_is_replaced_so_the_curve_equals_the_clean_one(rate: float) -> None:
    # A lone reading at 8x the peak (an electrical glitch) must not reach the curve: the reduced peak, impulse
    # and burn time equal those of the same log without it, and no drift is reported that the log does not have.
    known = read_record(SAMPLE_DIR / SAMPLES[0])
    t, f = synthetic_log(known, rate, noise_n=0.2, offset_n=5.0)
    clean = reduce_log(t, f)
    i = int(np.argmin(np.abs(t - 0.9)))
    f[i] += 8.0 * known.peak_thrust_n
    spiky = reduce_log(t, f)
    clean_curve = MotorRecord("clean", clean.time_s, clean.thrust_n)
    spiky_curve = MotorRecord("spiky", spiky.time_s, spiky.thrust_n)
    assert spiky_curve.peak_thrust_n == pytest.approx(clean_curve.peak_thrust_n, rel=0.01)
    assert spiky_curve.total_impulse_ns == pytest.approx(clean_curve.total_impulse_ns, rel=0.002)
    assert spiky_curve.burn_time_s() == pytest.approx(clean_curve.burn_time_s(), rel=0.01)
    codes = [x.code for x in spiky.findings]
    assert "log-glitch" in codes and [c for c in codes if c != "log-glitch"] == [x.code for x in clean.findings]
    glitch = next(x for x in spiky.findings if x.code == "log-glitch")
    assert "replaced" in glitch.message


def test_the_robust_noise_estimate_is_the_normal_sigma() -> None:
    # The baseline noise is 1.4826 x the median absolute deviation: 1.4826 = 1/Φ⁻¹(3/4) makes it σ for normal
    # noise (closed form; scipy.stats.norm.ppf(0.75) = 0.6745). 400 000 readings estimate σ to about 0.2 %.
    from motorlib.motor.reduction import _robust_sigma

    noise = np.random.default_rng(3).normal(7.0, 2.5, 400_000)
    assert _robust_sigma(noise) == pytest.approx(2.5, rel=6e-3)
