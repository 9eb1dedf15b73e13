"""motorlib: thrust curves, checks, a local catalog, flight simulation and motor matching for rocketry.

The public API is re-exported here; the command line lives in :mod:`motorlib.cli`
and is never imported by this module.  Layout: ``motor/`` (one motor), ``flight/`` (physics), ``matching/``,
``files/`` (formats), ``catalog/``, ``present/`` (tables, charts), ``cli/``; DEVELOPERS.md describes each module.
"""

from __future__ import annotations

import importlib as _importlib
import typing as _typing

__version__ = "0.1.0"

# Each public name and the module that defines it, imported on first use (PEP 562 module ``__getattr__``), so
# that ``import motorlib`` and the command line's start-up (``motorlib --version``, ``--help``) load no numpy
# or lxml; a command imports what it needs when it runs.
_EXPORTS = {
    "Airframe": ".flight.airframe",
    "Body": ".flight.geometry",
    "CLASS_LETTERS": ".motor.classes",
    "Candidate": ".matching.candidate",
    "Catalog": ".catalog",
    "CatalogError": ".errors",
    "CatalogFilter": ".catalog",
    "CatalogRow": ".motor.listing",
    "CheckReport": ".files.curvefiles",
    "CheckSettings": ".motor.checks",
    "CsvFormatError": ".errors",
    "CurveDataError": ".errors",
    "CurveError": ".errors",
    "CurveMetadata": ".files.motor_csv",
    "CurveSyntaxError": ".errors",
    "DEFAULT_BURN_THRESHOLD": ".motor.record",
    "Designation": ".motor.classes",
    "DesignationError": ".errors",
    "DispersionSettings": ".flight.dispersion",
    "Finding": ".motor.checks",
    "Finish": ".flight.geometry",
    "Fins": ".flight.geometry",
    "FiringSpread": ".motor.record",
    "FlightResults": ".flight",
    "FlightSettings": ".flight",
    "Geometry": ".flight.geometry",
    "ImpulseClass": ".motor.classes",
    "Launch": ".flight.airframe",
    "LaunchRules": ".flight.rules",
    "MatchResult": ".matching.rank",
    "MatchSettings": ".matching.rank",
    "MotorNotFoundError": ".errors",
    "MotorPack": ".flight",
    "MotorRecord": ".motor.record",
    "MotorlibError": ".errors",
    "Nose": ".flight.geometry",
    "Provenance": ".motor.record",
    "QuantityError": ".errors",
    "Recovery": ".flight.airframe",
    "Reduction": ".motor.reduction",
    "ReductionSettings": ".motor.reduction",
    "RobustSettings": ".matching.robust",
    "SchemaValidationError": ".errors",
    "SimulationInputError": ".errors",
    "Site": ".flight.atmosphere",
    "Stability": ".flight.stability",
    "Transition": ".flight.geometry",
    "Uncertainty": ".flight.dispersion",
    "airframe_summary": ".flight.summary",
    "check_file": ".files.curvefiles",
    "check_record": ".motor.checks",
    "class_bounds_ns": ".motor.classes",
    "drag_summary": ".flight.summary",
    "drag_table_for": ".flight.drag",
    "fit_apogees": ".flight.calibration",
    "fit_log": ".flight.calibration",
    "flight_stability": ".flight.stability",
    "format_designation": ".motor.classes",
    "impulse_class_for": ".motor.classes",
    "load_airframe": ".files.airframe_toml",
    "load_curve_file": ".files.curvefiles",
    "load_uncertainty": ".files.uncertainty_toml",
    "metrics": ".motor.checks",
    "nose_weight_kg": ".flight.stability",
    "parse_designation": ".motor.classes",
    "parse_quantity": ".units",
    "rank": ".matching.rank",
    "read_altimeter_csv": ".files.altimeter_csv",
    "read_csv_curve": ".files.motor_csv",
    "read_record": ".files.motor_xml",
    "record_from_bytes": ".files.motor_xml",
    "record_from_csv": ".files.motor_csv",
    "record_to_bytes": ".files.motor_xml",
    "reduce_log": ".motor.reduction",
    "robust_rank": ".matching.robust",
    "rounded_impulse_ns": ".motor.classes",
    "run_scatter": ".flight.dispersion",
    "simulate": ".flight",
    "stability_for": ".flight.stability",
    "stability_for_records": ".flight.stability",
    "write_record": ".files.motor_xml",
}
# Subpackages reachable as attributes after ``import motorlib``, as when the re-exports were eager.
_SUBMODULES = frozenset({"catalog", "errors", "files", "flight", "matching", "motor", "units"})

if _typing.TYPE_CHECKING:  # the same names, for type checkers and editors
    from .flight.airframe import Airframe, Launch, Recovery
    from .flight.drag import drag_table_for
    from .flight.geometry import Body, Finish, Fins, Geometry, Nose, Transition
    from .flight.stability import Stability, flight_stability, nose_weight_kg, stability_for, stability_for_records
    from .flight.summary import airframe_summary, drag_summary
    from .files.airframe_toml import load_airframe
    from .flight.atmosphere import Site
    from .catalog import Catalog, CatalogFilter
    from .motor.checks import CheckSettings, Finding, check_record, metrics
    from .motor.listing import CatalogRow
    from .motor.classes import (
        CLASS_LETTERS,
        Designation,
        ImpulseClass,
        class_bounds_ns,
        format_designation,
        impulse_class_for,
        parse_designation,
        rounded_impulse_ns,
    )
    from .files.motor_csv import CurveMetadata, read_csv_curve, record_from_csv
    from .motor.record import DEFAULT_BURN_THRESHOLD, FiringSpread, MotorRecord, Provenance
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
        QuantityError,
        SchemaValidationError,
        SimulationInputError,
    )
    from .flight import FlightResults, FlightSettings, MotorPack, simulate
    from .matching.candidate import Candidate
    from .matching.rank import MatchResult, MatchSettings, rank
    from .motor.reduction import Reduction, ReductionSettings, reduce_log
    from .flight.rules import LaunchRules
    from .flight.calibration import fit_apogees, fit_log
    from .flight.dispersion import DispersionSettings, Uncertainty, run_scatter
    from .matching.robust import RobustSettings, robust_rank
    from .files.uncertainty_toml import load_uncertainty
    from .files.altimeter_csv import read_altimeter_csv
    from .units import parse_quantity
    from .files.motor_xml import read_record, record_from_bytes, record_to_bytes, write_record


def __getattr__(name: str) -> object:
    if name in _EXPORTS:
        value = getattr(_importlib.import_module(_EXPORTS[name], __name__), name)
    elif name in _SUBMODULES:
        value = _importlib.import_module(f".{name}", __name__)
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value  # later look-ups bypass __getattr__
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))


__all__ = [
    "Airframe",
    "Body",
    "CLASS_LETTERS",
    "Candidate",
    "Catalog",
    "CatalogError",
    "CatalogFilter",
    "CatalogRow",
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
    "DispersionSettings",
    "Finding",
    "Finish",
    "Fins",
    "FiringSpread",
    "FlightResults",
    "FlightSettings",
    "Geometry",
    "ImpulseClass",
    "Launch",
    "LaunchRules",
    "MatchResult",
    "MatchSettings",
    "MotorNotFoundError",
    "MotorPack",
    "MotorRecord",
    "MotorlibError",
    "Nose",
    "Provenance",
    "QuantityError",
    "Recovery",
    "Reduction",
    "ReductionSettings",
    "RobustSettings",
    "SchemaValidationError",
    "SimulationInputError",
    "Site",
    "Stability",
    "Transition",
    "Uncertainty",
    "__version__",
    "airframe_summary",
    "check_file",
    "check_record",
    "class_bounds_ns",
    "drag_summary",
    "drag_table_for",
    "fit_apogees",
    "fit_log",
    "flight_stability",
    "format_designation",
    "impulse_class_for",
    "load_airframe",
    "load_curve_file",
    "load_uncertainty",
    "metrics",
    "nose_weight_kg",
    "parse_designation",
    "parse_quantity",
    "rank",
    "read_altimeter_csv",
    "read_csv_curve",
    "read_record",
    "record_from_bytes",
    "record_from_csv",
    "record_to_bytes",
    "reduce_log",
    "robust_rank",
    "rounded_impulse_ns",
    "run_scatter",
    "simulate",
    "stability_for",
    "stability_for_records",
    "write_record",
]
