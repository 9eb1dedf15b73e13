"""Curve files of either kind (our XML, generic CSV) and the per-file check report.

Chooses the reader by file extension, runs the record checks, and turns every
way a file can fail into data a front end can print.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Final

from ..motor.checks import CheckSettings, Finding, check_record, findings_from_problems, metrics
from .motor_csv import CurveMetadata, record_from_csv
from ..motor.record import MotorRecord
from .bundled import bundled_dir
from ..errors import CurveDataError, CurveError, MotorlibError
from .motor_xml import read_record_and_bytes

__all__ = ["CURVE_SUFFIXES", "CheckReport", "check_file", "find_curve_files", "load_curve_file",
           "load_curve_file_and_bytes", "sample_catalog_dir"]

CURVE_SUFFIXES: Final = (".xml", ".csv")


def load_curve_file(
    path: str | os.PathLike[str],
    metadata: CurveMetadata | None = None,
    *,
    time_unit: str | None = None,
    thrust_unit: str | None = None,
    notes: list[str] | None = None,
) -> MotorRecord:
    """Read a motor record from ``.xml`` (our format) or ``.csv`` (with ``metadata``).

    ``notes`` receives what was assumed while reading (units a CSV file does not name).
    """
    return load_curve_file_and_bytes(path, metadata, time_unit=time_unit, thrust_unit=thrust_unit, notes=notes)[0]


def load_curve_file_and_bytes(
    path: str | os.PathLike[str],
    metadata: CurveMetadata | None = None,
    *,
    time_unit: str | None = None,
    thrust_unit: str | None = None,
    notes: list[str] | None = None,
) -> tuple[MotorRecord, bytes | None]:
    """:func:`load_curve_file`, and the bytes of an XML file (None for CSV): see
    :func:`~motorlib.files.motor_xml.read_record_and_bytes`."""
    suffix = Path(path).suffix.lower()
    if suffix == ".xml":
        return read_record_and_bytes(path)
    if suffix in (".csv", ".txt", ".tsv"):
        return record_from_csv(path, metadata, time_unit=time_unit, thrust_unit=thrust_unit, notes=notes), None
    raise CurveError(str(path), f"unknown file type {suffix!r}; expected .xml (motor record) or .csv")


def find_curve_files(paths: list[str]) -> list[Path]:
    """Expand folders into the curve files below them (sorted); files are kept as given."""
    found: list[Path] = []
    for item in paths:
        path = Path(item)
        if path.is_dir():
            found += sorted(p for p in path.rglob("*") if p.suffix.lower() in CURVE_SUFFIXES and p.is_file())
        else:
            found.append(path)
    return found


def sample_catalog_dir() -> Path:
    """The bundled demo curves: installed beside this module, or at the top of a source checkout."""
    return bundled_dir("sample_curves", must_contain="*.xml")


@dataclass(frozen=True)
class CheckReport:
    """The outcome of checking one file.

    ``record`` is None when the file could not be read (``readable`` False) or
    when its data broke a record invariant (``readable`` True, errors listed).
    """

    source: str
    readable: bool
    record: MotorRecord | None
    findings: tuple[Finding, ...]
    metrics: dict[str, object] | None

    @property
    def ok(self) -> bool:
        """True when the file was read and no finding is an error."""
        return self.readable and not any(f.severity == "error" for f in self.findings)

    def as_dict(self) -> dict[str, object]:
        keys = ("total_impulse_ns", "impulse_class", "class_percent", "average_thrust_n", "peak_thrust_n",
                "burn_time_s", "designation")
        out: dict[str, object] = {"file": self.source, "readable": self.readable, "ok": self.ok}
        out.update({k: None for k in keys})
        if self.metrics:
            out.update(self.metrics)
        out["findings"] = [f.as_dict() for f in self.findings]
        return out


def check_file(
    path: str | os.PathLike[str],
    settings: CheckSettings | None = None,
    metadata: CurveMetadata | None = None,
    *,
    time_unit: str | None = None,
    thrust_unit: str | None = None,
) -> CheckReport:
    """Read and check one curve file; never raises for a bad file."""
    source = str(path)
    settings = settings or CheckSettings()
    notes: list[str] = []
    try:
        record = load_curve_file(path, metadata, time_unit=time_unit, thrust_unit=thrust_unit, notes=notes)
    except CurveDataError as exc:
        return CheckReport(source, True, None, tuple(findings_from_problems(exc)), None)
    except (MotorlibError, OSError) as exc:
        message = str(exc) if isinstance(exc, MotorlibError) else f"{source}: {exc.strerror or exc}"
        return CheckReport(source, False, None, (Finding("error", "unreadable", message),), None)
    assumed = tuple(Finding("note", "units-assumed", note) for note in notes)
    return CheckReport(source, True, record, assumed + tuple(check_record(record, settings)),
                       metrics(record, settings.burn_threshold))
