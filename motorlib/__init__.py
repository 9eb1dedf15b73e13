"""motorlib: thrust curves, checks, a local catalog, flight simulation and motor matching for rocketry.

The public API is re-exported here; the command line lives in :mod:`motorlib.cli`
and is never imported by this module.  Layout: ``motor/`` (one motor), ``flight/`` (physics), ``matching/``,
``files/`` (formats), ``catalog/``, ``present/`` (tables, charts), ``cli/``; DEVELOPERS.md describes each module.
"""

from __future__ import annotations

__version__ = "0.1.0"

from .flight.airframe import Airframe, Launch, Recovery
from .files.airframe_toml import load_airframe
from .flight.atmosphere import Site
from .catalog.store import Catalog, CatalogFilter
from .motor.checks import CheckSettings, Finding, check_record, metrics
from .motor.classes import (
    CLASS_LETTERS,
    Designation,
    ImpulseClass,
    class_bounds_ns,
    format_designation,
    impulse_class_for,
    parse_designation,
)
from .files.motor_csv import CurveMetadata, read_csv_curve, record_from_csv
from .motor.record import DEFAULT_BURN_THRESHOLD, MotorRecord, Provenance
from .files.curvefiles import CheckReport, check_file, load_curve_file
from .errors import (
    CatalogError,
    CsvFormatError,
    CurveDataError,
    CurveError,
    CurveSyntaxError,
    DesignationError,
    MotorlibError,
    MotorNotFoundError,
    MotorlibWarning,
    QuantityError,
    SchemaValidationError,
    SimulationInputError,
)
from .flight.integrate import FlightSettings, simulate
from .flight.pack import MotorPack
from .flight.results import FlightResults
from .matching.rank import MatchResult, MatchSettings, rank
from .motor.reduction import Reduction, ReductionSettings, reduce_log
from .flight.rules import LaunchRules
from .units import parse_quantity
from .files.motor_xml import read_record, record_from_bytes, record_to_bytes, write_record

__all__ = [
    "Airframe",
    "CLASS_LETTERS",
    "Catalog",
    "CatalogError",
    "CatalogFilter",
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
    "FlightResults",
    "FlightSettings",
    "ImpulseClass",
    "Launch",
    "LaunchRules",
    "MatchResult",
    "MatchSettings",
    "MotorNotFoundError",
    "MotorPack",
    "MotorRecord",
    "MotorlibError",
    "MotorlibWarning",
    "Provenance",
    "QuantityError",
    "Recovery",
    "Reduction",
    "ReductionSettings",
    "SchemaValidationError",
    "SimulationInputError",
    "Site",
    "__version__",
    "check_file",
    "check_record",
    "class_bounds_ns",
    "format_designation",
    "impulse_class_for",
    "load_airframe",
    "load_curve_file",
    "metrics",
    "parse_designation",
    "parse_quantity",
    "rank",
    "read_csv_curve",
    "read_record",
    "record_from_bytes",
    "record_from_csv",
    "record_to_bytes",
    "reduce_log",
    "simulate",
    "write_record",
]
