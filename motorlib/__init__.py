"""motorlib: thrust curves, impulse classes, an open curve format and checks for rocket motors.

The public API is re-exported here; the command line lives in :mod:`motorlib.cli`
and is never imported by this module.
"""

from __future__ import annotations

__version__ = "0.1.0"

from .checks import CheckSettings, Finding, check_record, metrics
from .classify import (
    CLASS_LETTERS,
    Designation,
    ImpulseClass,
    class_bounds_ns,
    format_designation,
    impulse_class_for,
    parse_designation,
)
from .csvio import CurveMetadata, read_csv_curve, record_from_csv
from .curve import DEFAULT_BURN_THRESHOLD, MotorRecord, Provenance
from .curvefiles import CheckReport, check_file, load_curve_file
from .errors import (
    CsvFormatError,
    CurveDataError,
    CurveError,
    CurveSyntaxError,
    DesignationError,
    MotorlibError,
    MotorlibWarning,
    QuantityError,
    SchemaValidationError,
    SimulationInputError,
)
from .units import parse_quantity
from .xmlio import read_record, record_from_bytes, record_to_bytes, write_record

__all__ = [
    "CLASS_LETTERS",
    "CheckReport",
    "CheckSettings",
    "CsvFormatError",
    "CurveDataError",
    "CurveError",
    "CurveMetadata",
    "CurveSyntaxError",
    "DEFAULT_BURN_THRESHOLD",
    "Designation",
    "DesignationError",
    "Finding",
    "ImpulseClass",
    "MotorRecord",
    "MotorlibError",
    "MotorlibWarning",
    "Provenance",
    "QuantityError",
    "SchemaValidationError",
    "SimulationInputError",
    "__version__",
    "check_file",
    "check_record",
    "class_bounds_ns",
    "format_designation",
    "impulse_class_for",
    "load_curve_file",
    "metrics",
    "parse_designation",
    "parse_quantity",
    "read_csv_curve",
    "read_record",
    "record_from_bytes",
    "record_from_csv",
    "record_to_bytes",
    "write_record",
]
