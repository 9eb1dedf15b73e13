"""One motor: its record and provenance, impulse classes and labels, checks, and static-test reduction.

numpy only (scipy.signal is imported inside the reduction's filter); no file formats, no terminal.
"""

import typing as _typing

from .checks import CheckSettings, Finding, check_record, findings_from_problems, metrics
from .classes import (
    CLASS_LETTERS,
    CLASS_RESOLUTION_NS,
    FRACTIONAL_CLASS_RESOLUTION_NS,
    Designation,
    ImpulseClass,
    class_bounds_ns,
    class_impulse_text,
    format_designation,
    impulse_class_for,
    parse_designation,
    rounded_impulse_ns,
)
from .listing import ROW_COLUMNS, CatalogRow
from .record import (
    DEFAULT_BURN_THRESHOLD,
    EJECTION_STATES,
    FORMER_PROVENANCE_KINDS,
    PROVENANCE_KINDS,
    FiringSpread,
    MotorRecord,
    Provenance,
)
# The static-test reduction (``reduce``, ``calibrate``) is imported on first use (PEP 562, as in flight/), so that
# the commands that only read records (a cold ``match``) do not build its records.
_REDUCTION = ("Reduction", "ReductionSettings", "combine_reductions", "firing_spread", "lowpass_design_hz",
              "reduce_log")

if _typing.TYPE_CHECKING:
    from .reduction import (
        Reduction,
        ReductionSettings,
        combine_reductions,
        firing_spread,
        lowpass_design_hz,
        reduce_log,
    )


def __getattr__(name: str) -> object:
    if name not in _REDUCTION:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    from . import reduction

    value = getattr(reduction, name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_REDUCTION))


__all__ = [
    "CLASS_LETTERS",
    "CLASS_RESOLUTION_NS",
    "CatalogRow",
    "CheckSettings",
    "DEFAULT_BURN_THRESHOLD",
    "Designation",
    "EJECTION_STATES",
    "FORMER_PROVENANCE_KINDS",
    "FRACTIONAL_CLASS_RESOLUTION_NS",
    "Finding",
    "FiringSpread",
    "ImpulseClass",
    "MotorRecord",
    "PROVENANCE_KINDS",
    "Provenance",
    "ROW_COLUMNS",
    "Reduction",
    "ReductionSettings",
    "check_record",
    "class_bounds_ns",
    "class_impulse_text",
    "combine_reductions",
    "findings_from_problems",
    "firing_spread",
    "format_designation",
    "impulse_class_for",
    "lowpass_design_hz",
    "metrics",
    "parse_designation",
    "reduce_log",
    "rounded_impulse_ns",
]
