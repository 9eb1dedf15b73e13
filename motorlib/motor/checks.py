"""Soundness and label checks of a motor record: findings with severity and a stable code.

A finding is data, not an exception: ``check_record`` returns every finding it
can make, and the caller decides what to do with errors. Records that break a
hard invariant (time not increasing, negative thrust, ...) cannot be built at
all; :func:`findings_from_problems` turns the resulting
:class:`~motorlib.errors.CurveDataError` into error findings so that ``check``
reports those too.

Tolerances are settings (:class:`CheckSettings`), each default with its source.
Codes (stable; tests trigger every one):

=========================  ========  ==================================================
code                       severity  meaning
=========================  ========  ==================================================
(record invariants)        error     see :func:`motorlib.curve.sample_problems` and MotorRecord
class-mismatch             error     computed impulse class (at 0.01 N·s) differs from the labelled one
average-thrust-mismatch    error     labelled average thrust off by more than the tolerance
likely-unit-mix-up         warning   impulse would match the label after a lbf/kgf/gf/ms factor
total-impulse-mismatch     warning   leading impulse in the label (``120G40``) off by > tolerance
designation-unreadable     warning   label does not parse, so it cannot be checked
delays-differ-from-label   warning   a labelled delay is not among the listed ones, or charge/no charge disagree
beyond-class-o             warning   impulse above 40 960.00 N·s, outside the class table
few-samples                warning   too few samples to describe the curve's shape
start-not-near-zero        warning   first sample well above zero thrust
late-ignition              warning   thrust rises long after the first sample (a raw log's run-up kept)
end-not-near-zero          warning   last sample well above zero thrust (curve cut off)
isp-implausible            warning   specific impulse outside the range of hobby propellants
burn-time-implausible      warning   burn time outside the range of hobby motors
hardware-incomplete        note      diameter, length or masses missing: cannot fit or fly
high-power                 note      a high-power trigger fires (certification needed)
=========================  ========  ==================================================

numpy only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Final

from .classes import (
    Designation,
    class_bounds_ns,
    class_impulse_text,
    impulse_class_for,
    parse_designation,
    rounded_impulse_ns,
)
from .record import DEFAULT_BURN_THRESHOLD, MotorRecord
from ..errors import CurveDataError, DesignationError
from ..units import KILOGRAM_FORCE_N, POUND_FORCE_N, miss_percent

__all__ = ["CheckSettings", "Finding", "SEVERITIES", "check_record", "findings_from_problems", "metrics"]

SEVERITIES: Final = ("error", "warning", "note")

# High-power triggers as secondary sources summarise NFPA 1127 (tests/reference/check_values.md#high-power).
HIGH_POWER_IMPULSE_NS: Final = 160.0
HIGH_POWER_AVERAGE_THRUST_N: Final = 80.0
HIGH_POWER_PROPELLANT_KG: Final = 0.0625

# Factors by which a curve recorded in one unit and read in another is off.
_UNIT_MIX_UPS: Final = (
    (POUND_FORCE_N, "thrust recorded in lbf but read as N"),
    (KILOGRAM_FORCE_N, "thrust recorded in kgf but read as N"),
    (1000.0, "time recorded in s but read as ms"),
    (1.0 / 1000.0, "time recorded in ms but read as s"),
    (1.0 / POUND_FORCE_N, "thrust recorded in N but read as lbf"),
    (1.0 / KILOGRAM_FORCE_N, "thrust recorded in N but read as kgf"),
    (1.0 / (1e-3 * KILOGRAM_FORCE_N), "thrust recorded in gf but read as N"),
)


@dataclass(frozen=True)
class CheckSettings:
    """Tolerances of :func:`check_record`; every default names its source.

    Attributes
    ----------
    burn_threshold : float
        Burn-time threshold as a fraction of peak thrust. 0.05: NFPA 1125 as
        summarised by secondary sources (tests/reference/check_values.md#motor-testing).
    average_thrust_tolerance : float
        Allowed relative difference between labelled and computed average
        thrust. 0.20: NFPA 1125 via the same secondary sources (same entry).
    total_impulse_tolerance : float
        Allowed relative difference to a leading labelled impulse (``120G40``).
        0.10: common practice, no published source (no source gives a tolerance on the
        labelled impulse: tests/reference/check_values.md#motor-testing).
    edge_fraction : float
        First/last sample must not exceed this fraction of peak thrust.
        0.05: common practice, no published source; the same 5 % as the burn-time
        threshold, so a curve that starts or ends above it is cut inside its own burn.
    min_samples : int
        Fewer samples draw a warning. 8: common practice, no published source (a rise,
        a peak, a plateau and a tail-off need a few points each).
    max_ignition_delay_s : float
        Longest time from the first sample to the start of the burn window [s] before the curve is taken for a
        raw log whose run-up was kept (time 0 of a thrust curve is ignition, and a simulation counts the
        liftoff and the delay from it). 0.1 s: common practice, no published source.
    isp_range_s : (float, float)
        Plausible specific impulse of hobby propellants [s]. 50-300 s: common
        practice, no published source (tests/reference/check_values.md#specific-impulse: black
        powder about 80 s from memory, composite 180-260 s from a secondary copy). Chosen so
        that a thrust unit mix-up leaves it: lbf read as N divides Isp by 4.45 (200 s to 45 s),
        N read as lbf multiplies it (80 s to 356 s).
    burn_time_range_s : (float, float)
        Plausible burn time of hobby motors [s]. 0.02-30 s: common practice, no published
        source. Chosen so that a time unit mix-up leaves it: a typical 0.1-10 s burn scaled
        by 1000 either way (s and ms confused) lasts 100 s or more, or 0.01 s or less.
    """

    burn_threshold: float = DEFAULT_BURN_THRESHOLD
    average_thrust_tolerance: float = 0.20
    total_impulse_tolerance: float = 0.10
    edge_fraction: float = 0.05
    min_samples: int = 8
    max_ignition_delay_s: float = 0.1
    isp_range_s: tuple[float, float] = (50.0, 300.0)
    burn_time_range_s: tuple[float, float] = (0.02, 30.0)

    def __post_init__(self) -> None:
        if not 0.0 < self.burn_threshold < 1.0:
            raise ValueError(f"`burn_threshold` must lie in (0, 1), got {self.burn_threshold!r}")
        for name in ("average_thrust_tolerance", "total_impulse_tolerance", "edge_fraction"):
            if not getattr(self, name) > 0.0:
                raise ValueError(f"`{name}` must be positive, got {getattr(self, name)!r}")


@dataclass(frozen=True)
class Finding:
    """One result of a check: ``severity`` in :data:`SEVERITIES`, a stable ``code`` and a message."""

    severity: str
    code: str
    message: str
    field: str | None = None
    line: int | None = None

    def as_dict(self) -> dict[str, object]:
        out: dict[str, object] = {"severity": self.severity, "code": self.code, "message": self.message}
        if self.field is not None:
            out["field"] = self.field
        if self.line is not None:
            out["line"] = self.line
        return out


def findings_from_problems(error: CurveDataError) -> list[Finding]:
    """Error findings for every invariant a record broke."""
    return [Finding("error", p.code, p.message, p.field, p.line) for p in error.problems]


def metrics(record: MotorRecord, threshold: float = DEFAULT_BURN_THRESHOLD) -> dict[str, object]:
    """The derived figures of a record, SI, keyed with unit-bearing names."""
    cls = record.impulse_class
    start_s, end_s = record.burn_window_s(threshold)
    return {
        "designation": record.designation,
        "maker": record.maker,
        "computed_designation": record.computed_designation(threshold),
        "total_impulse_ns": record.total_impulse_ns,
        "impulse_class": cls.letter if cls else None,
        "class_percent": cls.percent if cls else None,
        "average_thrust_n": record.average_thrust_n(threshold),
        "peak_thrust_n": record.peak_thrust_n,
        "peak_time_s": record.peak_time_s,
        "burn_time_s": end_s - start_s,
        "burn_start_s": start_s,
        "burn_end_s": end_s,
        "burn_threshold": threshold,
        "n_samples": record.n_samples,
        "specific_impulse_s": record.specific_impulse_s,
        "propellant_mass_fraction": record.propellant_mass_fraction,
        "diameter_m": record.diameter_m,
        "length_m": record.length_m,
        "total_mass_kg": record.total_mass_kg,
        "propellant_mass_kg": record.propellant_mass_kg,
        "delays_s": list(record.delays_s),
        "delay_adjustable": record.delay_adjustable,
        "ejection": record.ejection,
    }


def check_record(record: MotorRecord, settings: CheckSettings | None = None) -> list[Finding]:
    """All findings for a (structurally valid) record, most severe first.

    Parameters
    ----------
    record : MotorRecord
    settings : CheckSettings, optional
        Tolerances; the defaults name their sources.

    Returns
    -------
    list of Finding
    """
    s = settings or CheckSettings()
    findings: list[Finding] = []
    findings += _shape_findings(record, s)
    findings += _label_findings(record, s)
    findings += _mass_findings(record, s)
    order = {sev: i for i, sev in enumerate(SEVERITIES)}
    return sorted(findings, key=lambda f: order[f.severity])


def _shape_findings(record: MotorRecord, s: CheckSettings) -> list[Finding]:
    out: list[Finding] = []
    peak = record.peak_thrust_n
    if record.n_samples < s.min_samples:
        out.append(Finding("warning", "few-samples",
                           f"only {record.n_samples} samples; at least {s.min_samples} are needed to show "
                           "the ignition, sustain and tail-off of a curve", "samples"))
    if record.thrust_n[0] > s.edge_fraction * peak:
        out.append(Finding("warning", "start-not-near-zero",
                           f"the first sample is {record.thrust_n[0]:.4g} N, {100 * record.thrust_n[0] / peak:.0f} % "
                           f"of peak; a curve should start near 0 N (add a sample at ignition)", "samples"))
    start_s = record.burn_window_s(s.burn_threshold)[0] - float(record.time_s[0])
    if start_s > s.max_ignition_delay_s:
        out.append(Finding("warning", "late-ignition",
                           f"thrust first reaches {100 * s.burn_threshold:.0f} % of peak {start_s:.3g} s after the "
                           f"first sample; time 0 of a thrust curve is ignition. Trim the run-up (motorlib reduce "
                           "does this for raw stand logs)", "samples"))
    if record.thrust_n[-1] > s.edge_fraction * peak:
        out.append(Finding("warning", "end-not-near-zero",
                           f"the last sample is {record.thrust_n[-1]:.4g} N, {100 * record.thrust_n[-1] / peak:.0f} % "
                           "of peak; the curve looks cut off before burnout", "samples"))
    burn = record.burn_time_s(s.burn_threshold)
    low, high = s.burn_time_range_s
    if not low <= burn <= high:
        out.append(Finding("warning", "burn-time-implausible",
                           f"burn time {burn:.4g} s is outside {low:g}-{high:g} s, unusual for a hobby motor; "
                           "check the time unit (s or ms)", "samples"))
    return out


def _label_findings(record: MotorRecord, s: CheckSettings) -> list[Finding]:
    out: list[Finding] = []
    impulse = record.total_impulse_ns
    shown = f"{class_impulse_text(impulse)} N·s"  # the figure that was classified (classes.py)
    computed = record.impulse_class
    if computed is None:
        out.append(Finding("warning", "beyond-class-o",
                           f"total impulse {shown} is above class O (40 960.00 N·s), outside the standard "
                           "class table and the FAA Class 2 limit", "samples"))
    try:
        label = parse_designation(record.designation)
    except DesignationError as exc:
        out.append(Finding("warning", "designation-unreadable",
                           f"{exc}; the label cannot be checked against the curve", "designation"))
        return out
    lower, upper = class_bounds_ns(label.impulse_class)
    if computed is None or computed.letter != label.impulse_class:
        have = computed.letter if computed else "beyond O"
        out.append(Finding("error", "class-mismatch",
                           f"labelled class {label.impulse_class} needs {lower:g} < I <= {upper:g} N·s, but the "
                           f"curve's total impulse is {shown} (class {have})", "designation"))
        for factor, cause in _UNIT_MIX_UPS:
            fixed = impulse_class_for(impulse * factor)
            if fixed is not None and fixed.letter == label.impulse_class:
                out.append(Finding("warning", "likely-unit-mix-up",
                                   f"the impulse would fit class {label.impulse_class} if multiplied by "
                                   f"{factor:.6g}: {cause}?", "samples"))
                break
    average = record.average_thrust_n(s.burn_threshold)
    if abs(label.average_thrust_n - average) > s.average_thrust_tolerance * average:
        out.append(Finding("error", "average-thrust-mismatch",
                           f"labelled average thrust {label.average_thrust_n:g} N differs from the computed "
                           f"{average:.4g} N by "
                           f"{miss_percent(label.average_thrust_n / average - 1, s.average_thrust_tolerance)} % "
                           f"(tolerance {100 * s.average_thrust_tolerance:.0f} %, burn threshold "
                           f"{100 * s.burn_threshold:g} % of peak)", "designation"))
    if label.total_impulse_ns is not None and abs(label.total_impulse_ns - impulse) > s.total_impulse_tolerance * impulse:
        out.append(Finding("warning", "total-impulse-mismatch",
                           f"labelled total impulse {label.total_impulse_ns:g} N·s differs from the curve's "
                           f"{impulse:.6g} N·s by more than {100 * s.total_impulse_tolerance:.0f} %", "designation"))
    out += _delay_findings(record, label)
    return out


def _delay_findings(record: MotorRecord, label: Designation) -> list[Finding]:
    """A record lists the delays of a motor *type*; a label carrying any one of them is consistent.

    An adjustable delay can be shortened, so any labelled delay up to the longest listed one is
    consistent. Unknown delays (not given) are never called plugged and cannot disagree with a label.
    """
    if label.delays_s and record.delays_s:
        offered = set(record.delays_s)
        longest = max(record.delays_s)
        missing = [d for d in label.delays_s
                   if d not in offered and not (record.delay_adjustable and d <= longest)]
        if missing:
            offer = (f"is adjustable up to {longest:g} s" if record.delay_adjustable
                     else f"lists {_seconds(record.delays_s)}")
            return [Finding("warning", "delays-differ-from-label",
                            f"the label gives the delay {_seconds(tuple(missing))} but the record {offer}",
                            "delays_s")]
    elif (label.plugged or label.booster) and record.delays_s:
        kind = "plugged" if label.plugged else "a booster"
        return [Finding("warning", "delays-differ-from-label",
                        f"the label marks the motor {kind} (no ejection charge) but the record lists delays "
                        f"{_seconds(record.delays_s)}", "delays_s")]
    elif label.delays_s and record.no_ejection_charge:
        return [Finding("warning", "delays-differ-from-label",
                        f"the label gives delays {_seconds(label.delays_s)} but the record says the motor has "
                        "no ejection charge", "delays_s")]
    return []


def _mass_findings(record: MotorRecord, s: CheckSettings) -> list[Finding]:
    out: list[Finding] = []
    isp = record.specific_impulse_s
    low, high = s.isp_range_s
    if isp is not None and not low <= isp <= high:
        out.append(Finding("warning", "isp-implausible",
                           f"specific impulse {isp:.4g} s is outside {low:g}-{high:g} s, the range of hobby "
                           "propellants; check the propellant mass and its unit", "propellant_mass_kg"))
    missing = [name for name, value in (("diameter", record.diameter_m), ("length", record.length_m),
                                        ("total mass", record.total_mass_kg),
                                        ("propellant mass", record.propellant_mass_kg)) if value is None]
    if missing:
        out.append(Finding("note", "hardware-incomplete",
                           f"no {', '.join(missing)}: the motor cannot be fitted to a mount or flown", "hardware"))
    triggers = []
    if rounded_impulse_ns(record.total_impulse_ns) > HIGH_POWER_IMPULSE_NS:  # compared as the class is
        triggers.append(f"total impulse above {HIGH_POWER_IMPULSE_NS:g} N·s")
    if record.average_thrust_n(s.burn_threshold) > HIGH_POWER_AVERAGE_THRUST_N:
        triggers.append(f"average thrust above {HIGH_POWER_AVERAGE_THRUST_N:g} N")
    if record.propellant_mass_kg is not None and record.propellant_mass_kg > HIGH_POWER_PROPELLANT_KG:
        triggers.append(f"propellant above {HIGH_POWER_PROPELLANT_KG * 1e3:g} g")
    if triggers:
        out.append(Finding("note", "high-power",
                           "high-power motor (" + "; ".join(triggers) + "): fly it only with the matching "
                           "certification and under the high-power safety code", None))
    return out


def _seconds(values: tuple[float, ...]) -> str:
    return ", ".join(f"{v:g}" for v in values) + " s"
