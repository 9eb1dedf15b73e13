"""Static-test reduction: a raw load-cell log to a clean thrust curve, with the problems found on the way.

Steps (each documented where it is done):

1. Sanity: time must strictly increase (rows named otherwise), at least
   ``min_samples`` rows.
2. Baseline (tare): the median of a pre-ignition window, the samples before
   thrust first exceeds 10 % of the log's range, less a safety margin; its
   noise level is 1.4826 × the median absolute deviation (a robust σ). With
   ``detrend`` a post-burnout window gives a second level and the line through
   both is removed (load-cell drift).
3. Filter: a zero-phase Butterworth low-pass (``scipy.signal.butter`` +
   ``sosfiltfilt``) on the log resampled to a uniform grid at its median step.
   Filtering forward and backward squares the magnitude response, so the
   design frequency is raised to put the *combined* −3 dB point exactly at the
   stated cut-off (:func:`lowpass_design_hz`). Default cut-off:
   100 Hz or a quarter of the sample rate, whichever is lower.
4. Ignition and burnout: where the filtered thrust first rises above, and
   last falls below, ``max(event_fraction × peak, 5 σ)`` (defaults 2 % of peak),
   by linear interpolation. The curve is trimmed to that window and t = 0 is
   set at ignition.
5. Point reduction to at most ``max_points``: greedy largest-deviation insertion
   (a Douglas–Peucker-style refinement). Start from the first, last and peak
   samples, then repeatedly add the filtered sample farthest (in thrust) from
   the current piecewise-linear curve. The peak sample is always kept, so peak
   thrust is exact; the impulse error is reported and warned about above 0.2 %.

Findings (warnings about the log) carry row numbers where rows are involved.

A test series (several firings of one motor) gets a table of firings
(:func:`firing_table`) and findings of its own (:func:`series_findings`: the
firings straddle a class boundary).

The module runs a little past 500 lines on purpose: the steps of one reduction read in order, one helper
each, and the series tools use the same figures.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from typing import Any

from .checks import Finding
from .classes import CLASS_LETTERS, class_bounds_ns, impulse_class_for
from .record import DEFAULT_BURN_THRESHOLD, FiringSpread, MotorRecord, freeze_arrays, threshold_window_s
from ..errors import CurveDataError, Problem

__all__ = ["ReductionSettings", "Reduction", "combine_reductions", "firing_spread", "firing_table", "lowpass_design_hz",
           "reduce_log", "series_findings"]

# A reading that stands above both neighbours by more than 10 σ of the baseline noise plus 20 % of the
# (glitch-free) peak is an electrical glitch when the logger samples at 500 Hz or faster: a real motor's
# ignition spike lasts 10 ms or more (common practice, no published source) and so spans several readings.
GLITCH_MIN_RATE_HZ = 500.0
GLITCH_PEAK_FRACTION = 0.2


@dataclass(frozen=True)
class ReductionSettings:
    """Settings of :func:`reduce_log`. No published source gives any of these defaults; each says why it is chosen.

    Attributes
    ----------
    cutoff_hz : float or None
        −3 dB frequency of the zero-phase low-pass; None for the default, 0 for no filter. Default
        min(100 Hz, rate / 4): measured with the default order, a 10 ms half-sine ignition spike keeps 97 % of
        its height and a 20 ms one stays within 0.2 %, the impulse unchanged (at 1, 2 and 10 kHz); a quarter of
        the sample rate keeps the design frequency clear of the Nyquist frequency at slow rates.
    filter_order : int
        Butterworth order of one pass (the zero-phase filter is twice as steep). 4: common practice, no
        published source.
    event_fraction : float
        Ignition/burnout threshold as a fraction of peak thrust (raised to 5 σ of the noise if larger). 0.02:
        a linear rise and tail-off lose the fraction f² of the impulse outside the window (0.04 % at 2 %, below
        ``impulse_tolerance``; 0.25 % at the 5 % of the burn-time rule, above it).
    max_points : int
        Most points in the reduced curve. 48: short enough to read a curve file by eye; the impulse and peak
        errors are measured after the reduction and warned about, so a log that needs more points says so.
    detrend : bool
        Remove a linear drift fitted between the pre-ignition and post-burnout levels.
    min_samples : int
        Fewest rows a log may have. 20: common practice, no published source; fewer leave too few rows for a
        pre-ignition baseline (median and MAD of at least 5 rows) and a burn.
    impulse_tolerance, peak_tolerance : float
        Reduction goals checked after the fact (0.2 % and 1 %). 0.2 % moves a 5 N·s motor by 0.01 N·s, the
        resolution of the published class lists (tests/reference/check_values.md#impulse-classes); 1 % of peak:
        common practice, no published source.
    """

    cutoff_hz: float | None = None
    filter_order: int = 4
    event_fraction: float = 0.02
    max_points: int = 48
    detrend: bool = False
    min_samples: int = 20
    impulse_tolerance: float = 0.002
    peak_tolerance: float = 0.01

    def __post_init__(self) -> None:
        if self.max_points < 8:
            raise ValueError("`max_points` must be at least 8")
        if not 0.0 < self.event_fraction < 0.5:
            raise ValueError("`event_fraction` must lie in (0, 0.5)")


@dataclass(frozen=True, eq=False)
class Reduction:
    """The result of reducing one log. Times [s] of the trimmed curves start at ignition (0 s).

    ``raw_*`` keep the tared log on its own time axis (ignition at 0 s too) from 20 % of the burn
    time before ignition to 20 % after burnout (the margin a chart shows around the burn), ``filtered_*``
    the filtered uniform series, ``time_s``/``thrust_n`` the reduced curve.
    """

    time_s: np.ndarray
    thrust_n: np.ndarray
    raw_time_s: np.ndarray
    raw_thrust_n: np.ndarray
    filtered_time_s: np.ndarray
    filtered_thrust_n: np.ndarray
    baseline_n: float
    noise_n: float
    drift_n_per_s: float
    cutoff_hz: float | None
    sample_rate_hz: float
    ignition_time_s: float
    burnout_time_s: float
    threshold_n: float
    filtered_impulse_ns: float
    impulse_error: float
    peak_error: float
    findings: tuple[Finding, ...] = field(default=())

    def __post_init__(self) -> None:
        freeze_arrays(self)  # a record, not a workspace: its arrays are our own read-only copies


def lowpass_design_hz(cutoff_hz: float, order: int, rate_hz: float) -> float:
    """Design frequency of one digital Butterworth pass so that forward-backward filtering is −3 dB at ``cutoff_hz``.

    scipy's ``butter`` uses the bilinear transform with pre-warping, so one pass has
    |H|² = 1 / (1 + (tan(πf/fs) / tan(πf_d/fs))^(2n)); the squared response of the
    forward-backward pass is 1/√2 where (tan(πf_c/fs) / tan(πf_d/fs))^(2n) = √2 − 1.
    """
    ratio = (math.sqrt(2.0) - 1.0) ** (1.0 / (2 * order))
    return rate_hz / math.pi * math.atan(math.tan(math.pi * cutoff_hz / rate_hz) / ratio)


def _robust_sigma(values: np.ndarray) -> float:
    """σ of normal noise from the median absolute deviation: 1.4826 = 1/Φ⁻¹(3/4), Φ the standard normal CDF.

    Unlike the standard deviation it ignores the burn and single glitches in a window. Successive differences
    of noise with σ have σ·√2, hence the ``/ math.sqrt(2.0)`` where they are used.
    """
    return float(1.4826 * np.median(np.abs(values - np.median(values))))


def _rows(lines: np.ndarray, mask: np.ndarray) -> str:
    hits = lines[mask]
    if hits.size == 0:
        return ""
    if hits.size == 1:
        return f"row {hits[0]}"
    return f"rows {hits[0]}-{hits[-1]} ({hits.size} rows)"


def reduce_log(time_s: np.ndarray, force_n: np.ndarray, settings: ReductionSettings | None = None, *,
               lines: np.ndarray | None = None, source: str = "log") -> Reduction:
    """Reduce a raw log (time [s], force [N]) to a thrust curve.

    Each step of the module docstring is one helper below, called in order;
    findings are collected in the order the steps run.

    Parameters
    ----------
    time_s, force_n : array, shape (n_rows,)
    settings : ReductionSettings, optional
    lines : array of int, optional
        File line of each row, for messages.
    source : str
        Name used in error messages.

    Raises
    ------
    CurveDataError
        Codes ``log-too-short``, ``log-time-backwards``, ``log-time-gap``, ``log-no-baseline``, ``log-no-ignition``, with rows.
    """
    s = settings or ReductionSettings()
    t = np.asarray(time_s, dtype=float)
    f = np.asarray(force_n, dtype=float)
    rows = np.asarray(lines if lines is not None else np.arange(1, t.size + 1))
    _check_rows(t, f, rows, s.min_samples, source)
    f, glitch_findings = _remove_glitches(t, f, rows)
    span = _firing_span(f, source)
    baseline, noise, pre_end = _tare(t, f, rows, span, source)
    tared, drift, findings = _correct_drift(t, f - baseline, span, noise, pre_end, s.detrend)
    peak_raw = _raw_peak(tared, noise, source)
    findings = glitch_findings + findings + _log_problems(f, tared, rows, noise, peak_raw)
    grid, uniform, rate, resample_findings = _resample(t, tared)
    filtered, cutoff, filter_findings = _lowpass(uniform, rate, s.cutoff_hz, s.filter_order)
    findings += resample_findings + filter_findings + _rate_findings(rate)
    t_ign, t_out, threshold, event_findings = _find_events(grid, filtered, noise, s.event_fraction)
    findings += event_findings
    burn_t, burn_f = _trim(grid, filtered, t_ign, t_out, rate, source)
    red_t, red_f, impulse, impulse_error, peak_error, reduce_findings = _reduce_curve(burn_t, burn_f, s)
    findings += reduce_findings
    raw_mask = (t >= t_ign - 0.2 * (t_out - t_ign)) & (t <= t_out + 0.2 * (t_out - t_ign))
    return Reduction(
        time_s=red_t, thrust_n=red_f, raw_time_s=t[raw_mask] - t_ign, raw_thrust_n=tared[raw_mask],
        filtered_time_s=burn_t, filtered_thrust_n=burn_f, baseline_n=baseline, noise_n=noise,
        drift_n_per_s=drift, cutoff_hz=cutoff, sample_rate_hz=rate, ignition_time_s=t_ign, burnout_time_s=t_out,
        threshold_n=threshold, filtered_impulse_ns=impulse, impulse_error=impulse_error, peak_error=peak_error,
        findings=tuple(findings),
    )


MAX_GRID_PER_ROW = 20  # grid points per log row at most: resampling fills gaps, it does not invent a log


def _check_rows(t: np.ndarray, f: np.ndarray, rows: np.ndarray, min_samples: int, source: str) -> None:
    """Step 1: enough rows, all finite, time strictly increasing; raise CurveDataError naming the rows otherwise."""
    if t.size < min_samples:
        raise CurveDataError(source, [Problem("log-too-short", "samples",
                                              f"{t.size} rows; at least {min_samples} are needed")])
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(f))):
        bad = ~(np.isfinite(t) & np.isfinite(f))
        raise CurveDataError(source, [Problem("log-not-finite", "samples", f"non-numeric values at {_rows(rows, bad)}",
                                              line=int(rows[bad][0]))])
    backwards = np.diff(t) <= 0.0
    if backwards.any():
        where = np.concatenate(([False], backwards))
        raise CurveDataError(source, [Problem("log-time-backwards", "time_s",
                                              f"time does not increase at {_rows(rows, where)}", line=int(rows[where][0]))])
    # The uniform grid of step 3 has (span / median step) points: bound it by the rows, so that one wrong
    # timestamp cannot ask for 1e8 points (gigabytes); a log with gaps this large needs its times fixed first.
    steps = np.diff(t)
    median_step = float(np.median(steps))
    if (t[-1] - t[0]) / median_step > MAX_GRID_PER_ROW * t.size + 1000:
        i = int(np.argmax(steps)) + 1
        raise CurveDataError(source, [Problem(
            "log-time-gap", "time_s", f"time jumps by {float(steps[i - 1]):.6g} s at row {int(rows[i])} "
            f"({float(steps[i - 1]) / median_step:.3g} times the usual step of {median_step:.3g} s); "
            "a wrong timestamp?", line=int(rows[i]))])


def _firing_span(f: np.ndarray, source: str) -> float:
    """The range of the readings [N]; raise ``log-no-ignition`` when it is within 10x the sample noise.

    The noise comes from successive differences, which ignore slow trends. Normal noise exceeds 10 σ with a
    probability of about 1e-23 per reading (closed form), so a wider span is a firing, not noise.
    """
    span = float(np.max(f) - np.min(f))
    sample_noise = _robust_sigma(np.diff(f)) / math.sqrt(2.0)
    if span <= 10.0 * sample_noise:
        raise CurveDataError(source, [Problem("log-no-ignition", "samples",
                                              f"no ignition found: the readings span {span:.3g}, within 10x the "
                                              f"sample noise ({sample_noise:.3g})")])
    return span


def _tare(t: np.ndarray, f: np.ndarray, rows: np.ndarray, span: float, source: str) -> tuple[float, float, int]:
    """Step 2: baseline [N] and noise σ [N] of the pre-ignition window, and the window's end (exclusive index).

    Raises ``log-no-baseline`` when thrust rises too early for a window, or the
    window is not flat (the log seems to start after ignition).
    """
    # The rise is where the readings first pass 10 % of their span (at least 1 σ above the noise, as the span
    # exceeds 10 σ); the window stops at 80 % of the time before it, so that the start of a slow rise stays out
    # of the baseline. Both fractions: common practice, no published source.
    first_high = int(np.argmax(f - np.median(f[: max(3, t.size // 50)]) > 0.1 * span))
    pre_end = int(first_high * 0.8)
    if pre_end < 5:
        raise CurveDataError(source, [Problem("log-no-baseline", "samples",
                                              f"thrust rises at {_rows(rows, np.arange(t.size) == first_high)}, too early "
                                              "for a pre-ignition baseline: start logging at least a few tenths of a second "
                                              "before ignition", line=int(rows[first_high]))])
    baseline = float(np.median(f[:pre_end]))
    noise = _robust_sigma(f[:pre_end])
    window_noise = _robust_sigma(np.diff(f[:pre_end])) / math.sqrt(2.0)
    # A window whose spread is 5 times its sample-to-sample noise holds a trend (a ramp, not a baseline): for white
    # noise the two estimate the same σ. 5: common practice, no published source; 1e-9 of the span guards a
    # noiseless (synthetic) log.
    if noise > 5.0 * window_noise + 1e-9 * span:
        raise CurveDataError(source, [Problem("log-no-baseline", "samples",
                                              f"the readings before {_rows(rows, np.arange(t.size) == first_high)} are "
                                              "not flat: the log seems to start after ignition; start logging at least "
                                              "a few tenths of a second before ignition", line=int(rows[0]))])
    return baseline, noise, pre_end


def _correct_drift(t: np.ndarray, tared: np.ndarray, span: float, noise: float, pre_end: int,
                   detrend: bool) -> tuple[np.ndarray, float, list[Finding]]:
    """Step 2, drift: the tared log, the drift removed [N/s] (0 without ``detrend``) and findings.

    The post-burnout window starts a quarter of the remaining rows (at least 5)
    after thrust last exceeds 10 % of the span. With ``detrend`` the line
    through the pre- and post-window medians is removed; without it, a
    post-burnout level well away from 0 N is reported as ``log-drift``.
    """
    findings: list[Finding] = []
    drift = 0.0
    last_high = t.size - 1 - int(np.argmax((tared > 0.1 * span)[::-1]))
    post_start = last_high + max(5, int(0.25 * (t.size - last_high)))
    if detrend:
        if t.size - post_start < 5:
            findings.append(Finding("warning", "log-no-post-window",
                                    "no post-burnout window to measure drift: the log ends too soon after burnout"))
        else:
            post = float(np.median(tared[post_start:]))
            t_pre, t_post = float(np.median(t[:pre_end])), float(np.median(t[post_start:]))
            drift = post / (t_post - t_pre)
            tared = tared - drift * (t - t_pre)
    elif t.size - post_start >= 5:
        post_level = float(np.median(tared[post_start:]))
        # 5 σ: normal noise on a median of 5 or more rows stays far below it; 1 % of the span: a drift smaller than
        # that changes the impulse by less than the reduction's own goals. Common practice, no published source.
        if abs(post_level) > max(5 * noise, 0.01 * span):
            findings.append(Finding("warning", "log-drift",
                                    f"the load cell reads {post_level:.3g} N after burnout against 0 N before ignition; "
                                    "use the drift correction (detrend)"))
    return tared, drift, findings


def _raw_peak(tared: np.ndarray, noise: float, source: str) -> float:
    """The largest tared reading [N]; raise ``log-no-ignition`` when it is within 10x the baseline noise."""
    peak_raw = float(np.max(tared))
    if peak_raw <= max(10.0 * noise, 1e-12):
        raise CurveDataError(source, [Problem("log-no-ignition", "samples",
                                              f"no ignition found: the largest reading, {peak_raw:.3g} N above the "
                                              f"baseline, is within 10x the noise ({noise:.3g} N)")])
    return peak_raw


def _log_problems(f: np.ndarray, tared: np.ndarray, rows: np.ndarray, noise: float, peak_raw: float) -> list[Finding]:
    """Clipping (3+ consecutive readings at the maximum) and dips far below the baseline, with their rows."""
    findings: list[Finding] = []
    top = float(np.max(f))
    at_top = np.isclose(f, top, rtol=0.0, atol=max(1e-9 * abs(top), 1e-12))
    run = _longest_run(at_top)
    if run >= 3:
        findings.append(Finding("warning", "log-clipped",
                                f"{run} consecutive readings sit at the maximum {top:.6g} ({_rows(rows, at_top)}): the "
                                "sensor or logger was probably at full scale, so peak thrust and impulse are too low"))
    # Far below the tare: 10 σ (never normal noise, see _firing_span) plus 5 % of the peak, so that a little
    # ringing after a hard start passes. 5 %: common practice, no published source.
    dips = tared < -(10.0 * noise + 0.05 * peak_raw)
    if dips.any():
        findings.append(Finding("warning", "log-negative-spike",
                                f"readings far below the baseline at {_rows(rows, dips)} (lowest {float(np.min(tared)):.3g} N)"))
    return findings


def _remove_glitches(t: np.ndarray, f: np.ndarray, rows: np.ndarray) -> tuple[np.ndarray, list[Finding]]:
    """Step 1b: single readings far above both neighbours (loggers at :data:`GLITCH_MIN_RATE_HZ` or faster only)
    are replaced by the median of each with its two neighbours, before anything reads the log.

    A glitch left in would raise the peak, the impulse and the burn window, and can fake a drift. The limit is
    10 σ of the sample noise (from successive differences) plus :data:`GLITCH_PEAK_FRACTION` of the firing's
    rise above its lowest reading, both on the 3-point median, which a lone spike does not survive but a ramp or
    a real peak does.
    """
    if f.size < 3 or 1.0 / float(np.median(np.diff(t))) < GLITCH_MIN_RATE_HZ:
        return f, []
    middle = f[1:-1]
    median3 = np.median(np.stack([f[:-2], middle, f[2:]]), axis=0)
    noise = _robust_sigma(np.diff(f)) / math.sqrt(2.0)
    limit = 10.0 * noise + GLITCH_PEAK_FRACTION * float(np.max(median3) - np.min(median3))
    spikes = np.zeros(f.size, dtype=bool)
    spikes[1:-1] = (middle - median3) > limit
    if not spikes.any():
        return f, []
    cleaned = f.copy()
    cleaned[1:-1] = np.where(spikes[1:-1], median3, middle)
    worst = int(np.argmax(np.where(spikes, f - cleaned, -np.inf)))
    return cleaned, [Finding("warning", "log-glitch",
                             f"{int(spikes.sum())} single reading(s) stand far above both neighbours "
                             f"({_rows(rows, spikes)}; the largest {float(f[worst]):.4g} N where its neighbours "
                             f"read about {float(cleaned[worst]):.4g} N): electrical glitches, not thrust. Each was "
                             "replaced by the median of it and its two neighbours before the reduction; check the "
                             "wiring of the load cell")]


def _resample(t: np.ndarray, tared: np.ndarray) -> tuple[np.ndarray, np.ndarray, float, list[Finding]]:
    """Step 3, grid: the log interpolated onto a uniform grid at its median step; returns grid, values, rate [Hz]."""
    dt = float(np.median(np.diff(t)))
    rate = 1.0 / dt
    grid = np.arange(t[0], t[-1] + 0.5 * dt, dt)
    uniform = np.interp(grid, t, tared)
    findings: list[Finding] = []
    if np.max(np.abs(np.diff(t) - dt)) > 0.01 * dt:  # a note only; 1 % timing jitter: common practice
        findings.append(Finding("note", "log-resampled",
                                f"time steps vary from {1e3 * float(np.min(np.diff(t))):.3g} to "
                                f"{1e3 * float(np.max(np.diff(t))):.3g} ms; the log was resampled at {rate:.4g} Hz"))
    return grid, uniform, rate, findings


def _lowpass(uniform: np.ndarray, rate: float, cutoff_hz: float | None,
             order: int) -> tuple[np.ndarray, float | None, list[Finding]]:
    """Step 3, filter: the zero-phase Butterworth low-pass; returns the series, the cut-off used (None: unfiltered).

    ``cutoff_hz`` None means the default, min(100 Hz, rate / 4); 0 means no filter.
    A cut-off too close to Nyquist leaves the log unfiltered, with a warning.
    """
    cutoff = cutoff_hz if cutoff_hz is not None else min(100.0, 0.25 * rate)
    if not (cutoff and cutoff > 0):
        return uniform, None, []
    from scipy.signal import butter, sosfiltfilt

    design = lowpass_design_hz(cutoff, order, rate) if cutoff < 0.5 * rate else 0.5 * rate
    if design >= 0.49 * rate:  # butter needs a design frequency below Nyquist; closer than 2 % it barely filters
        return uniform, None, [Finding("warning", "log-filter-skipped",
                                       f"the cut-off {cutoff:g} Hz is too close to the Nyquist frequency "
                                       f"{0.5 * rate:g} Hz; the log was not filtered")]
    sos = butter(order, design, btype="low", fs=rate, output="sos")
    return sosfiltfilt(sos, uniform), cutoff, []


def _rate_findings(rate: float) -> list[Finding]:
    """A note when the log samples below 200 Hz: an ignition spike of 10 ms (the shortest, see
    :data:`GLITCH_MIN_RATE_HZ`) then gets fewer than two readings."""
    if rate < 200.0:
        return [Finding("note", "log-slow", f"the log samples at {rate:.4g} Hz; fast ignition spikes may be "
                                            "missed below about 200 Hz")]
    return []


def _find_events(grid: np.ndarray, filtered: np.ndarray, noise: float,
                 event_fraction: float) -> tuple[float, float, float, list[Finding]]:
    """Step 4: ignition and burnout times [s] where the filtered thrust crosses the threshold [N], interpolated."""
    peak = float(np.max(filtered))
    # 5 σ: normal noise passes it with a probability of about 3e-7 per reading (closed form), so a quiet log
    # cannot fake ignition; on a noisy log it raises the threshold above event_fraction.
    threshold = max(event_fraction * peak, 5.0 * noise)
    t_ign, t_out = threshold_window_s(grid, filtered, threshold)
    findings: list[Finding] = []
    if filtered[-1] >= threshold:
        findings.append(Finding("warning", "log-ends-burning", "the log ends while the motor still burns"))
    return t_ign, t_out, threshold, findings


def _trim(grid: np.ndarray, filtered: np.ndarray, t_ign: float, t_out: float, rate: float,
          source: str) -> tuple[np.ndarray, np.ndarray]:
    """Step 4, trim: the filtered burn from ignition to burnout, t = 0 s at ignition, thrust clipped at 0 N."""
    inner = (grid > t_ign) & (grid < t_out)
    burn_t = np.concatenate(([t_ign], grid[inner], [t_out])) - t_ign
    burn_f = np.concatenate(([np.interp(t_ign, grid, filtered)], filtered[inner], [np.interp(t_out, grid, filtered)]))
    burn_f = np.maximum(burn_f, 0.0)  # a filtered curve may ring a little below zero at a steep edge
    if burn_t.size < 8:
        raise CurveDataError(source, [Problem("log-too-short", "samples",
                                              f"only {burn_t.size} samples during the burn at {rate:.3g} Hz; log faster")])
    if not np.any(burn_f > 0.0):  # a lone spike the filter spread below zero: nothing is left to integrate
        raise CurveDataError(source, [Problem("log-no-ignition", "samples",
                                              "no thrust is left between ignition and burnout after filtering "
                                              "(a single spike, not a firing?)")])
    return burn_t, burn_f


def _reduce_curve(burn_t: np.ndarray, burn_f: np.ndarray,
                  s: ReductionSettings) -> tuple[np.ndarray, np.ndarray, float, float, float, list[Finding]]:
    """Step 5: the reduced curve, the filtered impulse [N·s] and the relative impulse and peak errors."""
    keep = _reduce_points(burn_t, burn_f, s.max_points)
    red_t, red_f = burn_t[keep], burn_f[keep]
    impulse = float(np.trapezoid(burn_f, burn_t))
    impulse_error = abs(float(np.trapezoid(red_f, red_t)) / impulse - 1.0)
    peak_error = abs(float(np.max(red_f)) / float(np.max(burn_f)) - 1.0)
    findings: list[Finding] = []
    if impulse_error > s.impulse_tolerance or peak_error > s.peak_tolerance:
        findings.append(Finding("warning", "log-reduction-coarse",
                                f"with {len(keep)} points the reduced curve is off by {100 * impulse_error:.2f} % in "
                                f"impulse and {100 * peak_error:.2f} % in peak thrust; allow more points"))
    return red_t, red_f, impulse, impulse_error, peak_error, findings


def _longest_run(mask: np.ndarray) -> int:
    best = current = 0
    for value in mask:
        current = current + 1 if value else 0
        best = max(best, current)
    return best


def _reduce_points(t: np.ndarray, f: np.ndarray, max_points: int) -> np.ndarray:
    """Indices of at most ``max_points`` samples: greedy largest-deviation insertion, peak always kept."""
    keep = sorted({0, t.size - 1, int(np.argmax(f))})
    while len(keep) < min(max_points, t.size):
        approx = np.interp(t, t[keep], f[keep])
        error = np.abs(f - approx)
        error[keep] = -1.0
        worst = int(np.argmax(error))
        if error[worst] <= 1e-12 * max(float(np.max(f)), 1.0):
            break
        keep = sorted(keep + [worst])
    return np.array(keep)


def combine_reductions(reductions: list[Reduction], max_points: int = 48) -> tuple[np.ndarray, np.ndarray, dict]:
    """Mean curve of several firings of one motor, and the spread of total impulse and burn time.

    The filtered curves (each from its own ignition) are averaged on a common
    time grid; a curve counts as 0 N after its own burnout.
    """
    if not reductions:
        raise ValueError("`reductions` must not be empty")
    end = max(float(r.filtered_time_s[-1]) for r in reductions)
    step = min(float(np.median(np.diff(r.filtered_time_s))) for r in reductions)
    grid = np.arange(0.0, end + 0.5 * step, step)
    mean = np.mean([np.interp(grid, r.filtered_time_s, r.filtered_thrust_n, left=0.0, right=0.0) for r in reductions],
                   axis=0)
    keep = _reduce_points(grid, mean, max_points)
    impulses = np.array([float(np.trapezoid(r.filtered_thrust_n, r.filtered_time_s)) for r in reductions])
    burns = np.array([r.burnout_time_s - r.ignition_time_s for r in reductions])
    spread = {
        "n_firings": len(reductions),
        "total_impulse_ns": {"mean": float(impulses.mean()), "std": float(impulses.std(ddof=1)) if impulses.size > 1 else 0.0,
                             "min": float(impulses.min()), "max": float(impulses.max())},
        "event_burn_time_s": {"mean": float(burns.mean()), "std": float(burns.std(ddof=1)) if burns.size > 1 else 0.0,
                              "min": float(burns.min()), "max": float(burns.max())},
    }
    return grid[keep], mean[keep], spread


def firing_table(reductions: list[Reduction], threshold: float = DEFAULT_BURN_THRESHOLD) -> list[dict[str, Any]]:
    """One row per firing: total impulse [N·s], peak [N], burn time [s], average thrust [N], class, % into class.

    Figures of each firing's filtered curve (as :func:`firing_spread` uses), burn time and average thrust over
    the threshold burn window of :meth:`MotorRecord.burn_time_s`; class and percent as
    :func:`~motorlib.motor.classes.impulse_class_for` gives them.
    """
    out = []
    for r in reductions:
        firing = MotorRecord("firing", r.filtered_time_s, r.filtered_thrust_n)
        cls = impulse_class_for(r.filtered_impulse_ns)
        out.append({"total_impulse_ns": r.filtered_impulse_ns, "peak_thrust_n": firing.peak_thrust_n,
                    "burn_time_s": firing.burn_time_s(threshold), "average_thrust_n": firing.average_thrust_n(threshold),
                    "impulse_class": cls.letter if cls else None, "class_percent": cls.percent if cls else None})
    return out


def series_findings(table: list[dict[str, Any]]) -> list[Finding]:
    """Findings about a test series as a whole: a warning when its firings fall in more than one class."""
    classes = sorted({row["impulse_class"] for row in table if row["impulse_class"]}, key=CLASS_LETTERS.index)
    if len(classes) < 2:
        return []
    impulses = [row["total_impulse_ns"] for row in table]
    bounds = ", ".join(f"{class_bounds_ns(c)[1]:.2f}" for c in classes[:-1])
    return [Finding("warning", "series-straddles-class",
                    f"the {len(table)} firings fall in classes {', '.join(classes)} (total impulse "
                    f"{min(impulses):.2f}-{max(impulses):.2f} N·s across the {bounds} N·s class boundary): "
                    "one class letter does not describe every motor of this series", "total_impulse_ns")]


def firing_spread(reductions: list[Reduction], threshold: float = DEFAULT_BURN_THRESHOLD) -> FiringSpread | None:
    """The measured spread of several firings of one motor, for the record of their mean curve.

    Each firing's total impulse [N·s] is that of its filtered curve (as in
    :func:`combine_reductions`); its burn time [s] is the threshold burn time of
    the same curve (``threshold`` of peak, as :meth:`MotorRecord.burn_time_s`),
    so that the spread describes the figures the record itself reports. The
    standard deviations are sample ones (n - 1 in the denominator).

    Returns
    -------
    FiringSpread or None
        None for fewer than two firings: one firing has no spread.
    """
    if len(reductions) < 2:
        return None
    firings = [MotorRecord("firing", r.filtered_time_s, r.filtered_thrust_n) for r in reductions]
    impulses = np.array([r.filtered_impulse_ns for r in reductions])
    burns = np.array([f.burn_time_s(threshold) for f in firings])
    return FiringSpread(n_firings=len(reductions),
                        total_impulse_mean_ns=float(impulses.mean()), total_impulse_std_ns=float(impulses.std(ddof=1)),
                        burn_time_mean_s=float(burns.mean()), burn_time_std_s=float(burns.std(ddof=1)))
