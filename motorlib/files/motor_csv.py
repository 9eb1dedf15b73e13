"""Reading a thrust curve from a generic CSV file (time and thrust columns).

Accepted: comma, semicolon or tab separated (or plain white space); a header row
or none; ``#`` comments (whole lines or after the data); a decimal comma when
the separator is ``;`` or a tab. Units come from the header (``time_ms``,
``t (s)``, ``Thrust [lbf]``, ``force kgf``) or from the caller; a file without
either is taken as seconds and newtons. A unit given both ways must agree.
Errors name the file, the line and the column.
"""

from __future__ import annotations

import os
import re
from dataclasses import dataclass, field
from typing import Final

import numpy as np

from ..motor.record import MotorRecord, Provenance
from ..errors import CsvFormatError, CurveDataError, Problem, QuantityError
from ..units import STANDARD_GRAVITY_M_S2, _canonical_unit, known_units, to_si
from .fsio import read_text_bounded

__all__ = ["CsvCurve", "CurveMetadata", "read_csv_curve", "record_from_csv"]

DEFAULT_MAX_BYTES: Final = 64 * 1024 * 1024  # a long 10 kHz log is a few MB; refuse what cannot be a log
_TIME_NAME = re.compile(r"^(t|time|zeit|temps|tiempo)(?![a-z])", re.IGNORECASE)
_THRUST_NAME = re.compile(r"^(thrust|force|f|load|schub|weight|mass|counts|raw|adc)(?![a-z])", re.IGNORECASE)
_UNIT_IN_NAME = re.compile(r"(?:\(([^)]*)\)|\[([^\]]*)\]|([_\s])([^\s_()\[\]]+))\s*$")
# Words after an underscore that name no unit ("time_stamp"); any other word there is a unit, known or refused
_NOT_UNITS = frozenset({"stamp", "value", "data", "reading", "filtered", "measured"})
_COUNT_NAMES = re.compile(r"^(counts|raw|adc)$", re.IGNORECASE)


@dataclass(frozen=True)
class CurveMetadata:
    """What a CSV file does not say about its motor (all optional but the label).

    Lengths in m, masses in kg, delays in s: SI, like the record. No delays and
    ``no_ejection_charge`` False mean the delays are unknown, not that the motor is plugged.
    """

    designation: str = ""
    maker: str = ""
    diameter_m: float | None = None
    length_m: float | None = None
    total_mass_kg: float | None = None
    propellant_mass_kg: float | None = None
    delays_s: tuple[float, ...] = ()
    delay_adjustable: bool = False
    provenance: Provenance = field(default_factory=Provenance)
    no_ejection_charge: bool = False

    def record(self, time_s: np.ndarray, thrust_n: np.ndarray, *, default_designation: str = "") -> MotorRecord:
        """A :class:`MotorRecord` of these samples with this metadata (raises CurveDataError like it)."""
        return MotorRecord(
            designation=self.designation or default_designation, maker=self.maker, time_s=time_s, thrust_n=thrust_n,
            diameter_m=self.diameter_m, length_m=self.length_m, total_mass_kg=self.total_mass_kg,
            propellant_mass_kg=self.propellant_mass_kg, delays_s=self.delays_s,
            delay_adjustable=self.delay_adjustable, provenance=self.provenance,
            no_ejection_charge=self.no_ejection_charge,
        )


@dataclass(frozen=True)
class CsvCurve:
    """Samples read from a CSV file, converted to SI, with the file line of each row."""

    time_s: np.ndarray
    thrust_n: np.ndarray
    lines: tuple[int, ...]
    time_unit: str
    thrust_unit: str
    header: tuple[str, ...] | None
    assumed: tuple[str, ...] = ()  # the columns ("time", "thrust") whose unit nothing gave: read as s and N

    def assumption(self) -> str | None:
        """What was assumed about units, as a sentence for output and JSON; None when the units were given."""
        if not self.assumed:
            return None
        units = " and ".join("s" if kind == "time" else "N" for kind in self.assumed)
        return (f"no unit for the {' and '.join(self.assumed)} column(s) in the header or options: read as "
                f"{units} (name units in the header, e.g. time_ms, thrust_lbf)")


def _split(row: str, delimiter: str | None) -> list[str]:
    return [c.strip() for c in (row.split(delimiter) if delimiter else row.split())]


def _is_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def _load_unit(token: str) -> str | None:
    """A thrust column's unit: a force unit, a mass unit as a load cell reports it (force = m·g0), or counts."""
    force = _canonical_unit("force", token)
    if force is not None:
        return force
    if token.lower() in ("counts", "count", "raw", "adc"):
        return "counts"
    mass = _canonical_unit("mass", token)
    return f"mass:{mass}" if mass is not None else None


def _unit_for(kind: str, token: str) -> str | None:
    return _load_unit(token) if kind == "force" else _canonical_unit(kind, token)


def _header_unit(name: str, kind: str, source: str, line: int) -> str | None:
    match = _UNIT_IN_NAME.search(name)
    if not match:
        return None
    token = (match.group(1) or match.group(2) or match.group(4) or "").strip()
    if not token:
        return None
    if match.group(4) and _unit_for(kind, token) is None and (match.group(3) != "_" or token.lower() in _NOT_UNITS):
        # "thrust value" or "time_stamp": a trailing word, not a unit ("thrust_ozf" names a unit: read or refused)
        return None
    unit = _unit_for(kind, token)
    if unit is None:
        extra = ", or a mass unit (kg, g) for a load cell, or counts" if kind == "force" else ""
        raise CsvFormatError(source, f"unknown {kind} unit {token!r} in header {name!r}; expected one of "
                             f"{', '.join(known_units(kind))}{extra}", field=f"header {name!r}", line=line)
    return unit


def _thrust_to_newtons(values: np.ndarray, unit: str, scale: float | None, offset: float) -> np.ndarray:
    if unit == "counts":
        if scale is None:
            raise QuantityError("thrust unit", "the thrust column holds raw counts: give the calibration "
                                "(scale in N per count, and the zero offset in counts)")
        return (values - offset) * scale
    if scale is not None:
        raise QuantityError("scale", f"a calibration scale applies to raw counts, but the column is in {unit}")
    if unit.startswith("mass:"):
        return np.array([to_si(v, unit[5:], "mass") for v in values]) * STANDARD_GRAVITY_M_S2
    return np.array([to_si(v, unit, "force") for v in values])


def read_csv_curve(
    path: str | os.PathLike[str],
    *,
    time_unit: str | None = None,
    thrust_unit: str | None = None,
    scale: float | None = None,
    offset: float = 0.0,
    max_bytes: int = DEFAULT_MAX_BYTES,
) -> CsvCurve:
    """Read the time and thrust columns of a CSV file, converted to s and N.

    Parameters
    ----------
    path : path-like
    time_unit, thrust_unit : str, optional
        Units of the columns (``s``/``ms``; ``N``/``lbf``/``kgf``/``gf``, or ``kg``/``g`` as a load
        cell reports a mass, meaning force = m·g0, or ``counts``), when the header does not give
        them or to confirm it.
    scale, offset : float, optional
        Calibration of a raw-count column: force [N] = (counts − offset) · scale.

    Raises
    ------
    CsvFormatError
        Unreadable text, no data, a ragged or non-numeric row, conflicting units.
    """
    source = str(path)
    text = read_text_bounded(path, max_bytes, error=CsvFormatError, hint="save the file as UTF-8 CSV")
    rows: list[tuple[int, str]] = []
    for number, raw in enumerate(text.splitlines(), start=1):
        row = raw.split("#", 1)[0].strip()
        if row:
            rows.append((number, row))
    if not rows:
        raise CsvFormatError(source, "no data rows (only blank lines or # comments)")
    first = rows[0][1]
    delimiter = "\t" if "\t" in first else ";" if ";" in first else "," if "," in first else None
    decimal_comma = delimiter in ("\t", ";")
    header: tuple[str, ...] | None = None
    header_line = None
    cells = _split(first, delimiter)
    if not all(_is_number(c.replace(",", ".") if decimal_comma else c) for c in cells):
        header, header_line = tuple(cells), rows[0][0]
        rows = rows[1:]
    time_col, thrust_col = 0, 1
    header_units: list[str | None] = [None, None]
    if header is not None:
        if len(header) > 2:
            time_col = next((i for i, n in enumerate(header) if _TIME_NAME.match(n)), -1)
            thrust_col = next((i for i, n in enumerate(header) if _THRUST_NAME.match(n)), -1)
            if time_col < 0 or thrust_col < 0:
                raise CsvFormatError(source, f"{len(header)} columns, but no header names a time column "
                                     "('time', 't') and a thrust column ('thrust', 'force')",
                                     field="header", line=header_line)
        elif len(header) < 2:
            raise CsvFormatError(source, "expected two columns (time, thrust) in the header", field="header",
                                 line=header_line)
        header_units = [_header_unit(header[time_col], "time", source, header_line),
                        _header_unit(header[thrust_col], "force", source, header_line)]
        if header_units[1] is None and _COUNT_NAMES.match(header[thrust_col]):
            header_units[1] = "counts"  # a column named "counts" is raw counts, never newtons
    units, assumed = [], []
    for given, from_header, kind, default in ((time_unit, header_units[0], "time", "s"),
                                              (thrust_unit, header_units[1], "force", "N")):
        if given is not None:
            canonical = _unit_for(kind, given)
            if canonical is None:
                raise QuantityError(f"{kind} unit", f"unknown unit {given!r}; expected one of "
                                    f"{', '.join(known_units(kind))}")
            if from_header is not None and from_header != canonical:
                raise CsvFormatError(source, f"the header gives {kind} in {from_header} but {canonical} was "
                                     "requested; remove one of them", field="header", line=header_line)
            units.append(canonical)
        elif kind == "force" and scale is not None and from_header is None:
            units.append("counts")
        else:
            units.append(from_header or default)
            if from_header is None:
                assumed.append("time" if kind == "time" else "thrust")
    if not rows:
        raise CsvFormatError(source, "a header but no data rows")
    width = len(header) if header is not None else len(_split(rows[0][1], delimiter))
    if header is None and width != 2:
        raise CsvFormatError(source, f"expected two columns (time, thrust), found {width}; add a header "
                             "naming the time and thrust columns", line=rows[0][0])
    times, thrusts, lines = [], [], []
    for number, row in rows:
        cells = _split(row, delimiter)
        if len(cells) != width:
            raise CsvFormatError(source, f"expected {width} columns, found {len(cells)}", line=number)
        values = []
        for column, name in ((time_col, "time"), (thrust_col, "thrust")):
            cell = cells[column].replace(",", ".") if decimal_comma else cells[column]
            try:
                values.append(float(cell))
            except ValueError:
                raise CsvFormatError(source, f"expected a number, got {cells[column]!r}",
                                     field=f"column {column + 1} ({name})", line=number) from None
        times.append(values[0])
        thrusts.append(values[1])
        lines.append(number)
    time_s = np.array([to_si(t, units[0], "time") for t in times])
    thrust_n = _thrust_to_newtons(np.array(thrusts, dtype=float), units[1], scale, offset)
    return CsvCurve(time_s, thrust_n, tuple(lines), units[0], units[1], header, tuple(assumed))


def record_from_csv(
    path: str | os.PathLike[str],
    metadata: CurveMetadata | None = None,
    *,
    time_unit: str | None = None,
    thrust_unit: str | None = None,
    notes: list[str] | None = None,
) -> MotorRecord:
    """Build a motor record from a CSV curve and the metadata the file lacks.

    Without a designation the file's stem stands in for it. What was assumed about units
    (:meth:`CsvCurve.assumption`) is appended to ``notes`` when given.

    Raises
    ------
    CsvFormatError, CurveDataError
        Errors name the file and the CSV line of the offending row.
    """
    meta = metadata or CurveMetadata()
    curve = read_csv_curve(path, time_unit=time_unit, thrust_unit=thrust_unit)
    if notes is not None and curve.assumption():
        notes.append(curve.assumption())
    try:
        return meta.record(curve.time_s, curve.thrust_n,
                           default_designation=os.path.splitext(os.path.basename(path))[0])
    except CurveDataError as exc:
        located = [Problem(p.code, p.field, p.message, p.index,
                           curve.lines[p.index] if p.index is not None else p.line) for p in exc.problems]
        raise CurveDataError(str(path), located) from None
