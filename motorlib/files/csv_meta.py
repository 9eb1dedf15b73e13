"""Metadata side files: what many CSV curves do not say about their motors, in one TOML file.

Nine firings need not be nine command lines of thirteen options each: one file
gives defaults for every curve and a table per CSV file (matched by file name)::

    # motors.toml
    [defaults]                      # every CSV below
    maker = "Our team"
    diameter = "24 mm"
    source_kind = "own-firing"

    [files."stand-03.csv"]
    designation = "F30-6"
    total_mass = "48 g"
    propellant_mass = "22 g"
    delays = [4, 6, 8]              # seconds; or "4,6,8"
    test_date = 2026-11-14

Keys (the command-line option names with ``_`` for ``-``): designation, maker,
diameter, length, total_mass, propellant_mass, delays, plugged,
adjustable_delay, source_kind, test_date, notes. Sizes and masses need a unit,
as their command-line options do (``"24"`` could be mm or m). A key motorlib
does not know is refused, so a typo never passes silently. A file's table
overrides the defaults; options given on the command line override both.

stdlib only (tomllib).
"""

from __future__ import annotations

import datetime as _dt
import os
import tomllib
from dataclasses import replace
from pathlib import Path
from typing import Any, Final

from ..errors import CsvFormatError, QuantityError
from ..motor.record import PROVENANCE_KINDS
from ..units import is_bare_number, parse_quantity
from .motor_csv import CurveMetadata

__all__ = ["META_KEYS", "CsvMetadataFile", "read_csv_metadata"]

# key -> quantity kind (None: not a quantity)
META_KEYS: Final = {"designation": None, "maker": None, "diameter": "length", "length": "length",
                    "total_mass": "mass", "propellant_mass": "mass", "delays": None, "plugged": None,
                    "adjustable_delay": None, "source_kind": None, "test_date": None, "notes": None}


class CsvMetadataFile:
    """A parsed side file: ``defaults`` and one table per CSV file name, values already in SI."""

    def __init__(self, source: str, defaults: dict[str, Any], files: dict[str, dict[str, Any]]) -> None:
        self.source, self.defaults, self.files = source, defaults, files

    def entry(self, csv_path: str | os.PathLike[str]) -> dict[str, Any]:
        """The keys for one CSV file: its table over the defaults (SI values, ``test_date`` a date)."""
        return {**self.defaults, **self.files.get(Path(csv_path).name, {})}

    def unused(self, csv_paths: list[str | os.PathLike[str]]) -> list[str]:
        """Tables naming no file among ``csv_paths`` (a misspelt file name)."""
        names = {Path(p).name for p in csv_paths}
        return sorted(set(self.files) - names)

    def metadata(self, csv_path: str | os.PathLike[str], over: CurveMetadata | None = None,
                 given: set[str] = frozenset()) -> CurveMetadata:
        """:class:`CurveMetadata` for ``csv_path``: this file's keys, with the keys in ``given`` taken from ``over``.

        ``given`` names the keys (of :data:`META_KEYS`) the caller set itself (command-line options).
        """
        meta = over or CurveMetadata()
        values = {k: v for k, v in self.entry(csv_path).items() if k not in given}
        simple = {"designation": "designation", "maker": "maker", "diameter": "diameter_m", "length": "length_m",
                  "total_mass": "total_mass_kg", "propellant_mass": "propellant_mass_kg", "delays": "delays_s",
                  "plugged": "no_ejection_charge", "adjustable_delay": "delay_adjustable"}
        meta = replace(meta, **{simple[k]: v for k, v in values.items() if k in simple})
        provenance = meta.provenance
        if "source_kind" in values:
            provenance = replace(provenance, kind=values["source_kind"])
        if "test_date" in values:
            provenance = replace(provenance, date=values["test_date"])
        if "notes" in values:
            provenance = replace(provenance, notes=values["notes"])
        if meta.no_ejection_charge and meta.delays_s:
            raise CsvFormatError(self.source, f"{Path(csv_path).name}: plugged and delays exclude each other",
                                 field="plugged")
        return replace(meta, provenance=provenance)


def read_csv_metadata(path: str | os.PathLike[str]) -> CsvMetadataFile:
    """Read a metadata side file (module docstring).

    Raises
    ------
    CsvFormatError
        Not TOML, an unknown key or section, a size or mass without a unit, a bad date or delay list; the
        message names the file and the key.
    """
    source = str(path)
    try:
        with open(path, "rb") as handle:
            data = tomllib.load(handle)
    except tomllib.TOMLDecodeError as exc:
        raise CsvFormatError(source, f"not valid TOML: {exc}") from exc
    unknown = sorted(set(data) - {"defaults", "files"})
    if unknown:
        raise CsvFormatError(source, "unknown section; expected [defaults] and [files.\"NAME.csv\"]", field=unknown[0])
    defaults = _entry(source, "defaults", data.get("defaults", {}))
    files = data.get("files", {})
    if not isinstance(files, dict):
        raise CsvFormatError(source, "expected tables [files.\"NAME.csv\"]", field="files")
    return CsvMetadataFile(source, defaults, {name: _entry(source, f"files.{name}", table)
                                              for name, table in files.items()})


def _entry(source: str, where: str, table: Any) -> dict[str, Any]:
    """One table's keys checked and converted to SI."""
    if not isinstance(table, dict):
        raise CsvFormatError(source, "expected a table of keys", field=where)
    out: dict[str, Any] = {}
    for key, value in table.items():
        name = f"{where}.{key}"
        if key not in META_KEYS:
            raise CsvFormatError(source, f"unknown key; expected one of {', '.join(META_KEYS)}", field=name)
        kind = META_KEYS[key]
        if kind is not None:
            # a bare number is refused, as on the command line: 24 could be mm or m
            if not isinstance(value, str) or is_bare_number(value):
                raise CsvFormatError(source, f"{value!r} has no unit; give one, e.g. \"24 mm\" or \"48 g\"",
                                     field=name)
            try:
                out[key] = parse_quantity(value, kind, field=name)
            except QuantityError as exc:
                raise CsvFormatError(source, exc.problem, field=name) from None
        elif key == "delays":
            out[key] = _delays(source, name, value)
        elif key in ("plugged", "adjustable_delay"):
            if not isinstance(value, bool):
                raise CsvFormatError(source, f"expected true or false, got {value!r}", field=name)
            out[key] = value
        elif key == "test_date":
            out[key] = _date(source, name, value)
        elif key == "source_kind":
            if value not in PROVENANCE_KINDS:
                raise CsvFormatError(source, f"expected one of {', '.join(PROVENANCE_KINDS)}, got {value!r}",
                                     field=name)
            out[key] = value
        else:
            if not isinstance(value, str):
                raise CsvFormatError(source, f"expected text, got {value!r}", field=name)
            out[key] = value
    return out


def _delays(source: str, name: str, value: Any) -> tuple[float, ...]:
    items = value.replace("/", ",").split(",") if isinstance(value, str) else value
    try:
        delays = tuple(float(str(v).strip().removesuffix("s")) for v in items)
    except (TypeError, ValueError):
        raise CsvFormatError(source, f"expected delays in seconds, e.g. [4, 6, 8] or \"4,6,8\"; got {value!r}",
                             field=name) from None
    if not delays or any(d <= 0 for d in delays):
        raise CsvFormatError(source, f"delays must be above 0 s, got {value!r}", field=name)
    return delays


def _date(source: str, name: str, value: Any) -> _dt.date:
    if isinstance(value, _dt.datetime):
        return value.date()
    if isinstance(value, _dt.date):
        return value
    try:
        return _dt.date.fromisoformat(str(value))
    except ValueError:
        raise CsvFormatError(source, f"expected a date YYYY-MM-DD, got {value!r}", field=name) from None

