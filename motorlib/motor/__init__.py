"""One motor: its record and provenance, impulse classes and labels, checks, and static-test reduction.

numpy only (scipy.signal is imported inside the reduction's filter); no file formats, no terminal.
"""

from .checks import CheckSettings, Finding, check_record, findings_from_problems, metrics
from .classes import (
    CLASS_LETTERS,
    Designation,
    ImpulseClass,
    class_bounds_ns,
    format_designation,
    impulse_class_for,
    parse_designation,
)
from .record import DEFAULT_BURN_THRESHOLD, PROVENANCE_KINDS, MotorRecord, Provenance
from .reduction import Reduction, ReductionSettings, combine_reductions, lowpass_design_hz, reduce_log

__all__ = [
    "CLASS_LETTERS",
    "CheckSettings",
    "DEFAULT_BURN_THRESHOLD",
    "Designation",
    "Finding",
    "ImpulseClass",
    "MotorRecord",
    "PROVENANCE_KINDS",
    "Provenance",
    "Reduction",
    "ReductionSettings",
    "check_record",
    "class_bounds_ns",
    "combine_reductions",
    "findings_from_problems",
    "format_designation",
    "impulse_class_for",
    "lowpass_design_hz",
    "metrics",
    "parse_designation",
    "reduce_log",
]
