"""Altimeter logs as CSV: a time column and an altitude or a pressure column.

The header names the columns and may carry units, in any of the usual spellings:
``time_s``, ``time (ms)``, ``t [s]``; ``altitude_m``, ``altitude (ft)``, ``height``;
``pressure_pa``, ``pressure (hPa)``, ``baro (mbar)``. Without a unit, time is in seconds,
altitude in metres and pressure in pascals. Pressures become heights above the pad with
the standard atmosphere and the pad reading (the median of the first half second), as an
altimeter computes them. Lines that start with ``#`` are comments.
"""

from __future__ import annotations

import csv
import io
import os
import re
from dataclasses import dataclass

import numpy as np

from ..errors import CsvFormatError
from .fsio import read_text_bounded
from ..flight.calibration import altitude_from_pressure_m
from ..units import FOOT_M, INCH_OF_MERCURY_PA

MAX_LOG_BYTES = 64 * 1024 * 1024  # an hour at 100 Hz is a few MB; refuse what cannot be an altimeter log

__all__ = ["AltimeterLog", "read_altimeter_csv"]

# factors to SI; ft and inHg are units.py's (international foot, exact; conventional inHg, its sources there)
_TIME_UNITS = {"s": 1.0, "ms": 1e-3, "us": 1e-6}
_LENGTH_UNITS = {"m": 1.0, "ft": FOOT_M, "km": 1000.0}
_PRESSURE_UNITS = {"pa": 1.0, "hpa": 100.0, "kpa": 1000.0, "mbar": 100.0, "bar": 1e5, "inhg": INCH_OF_MERCURY_PA}
_NAMES = {"time": ("time", "t", "seconds", "timestamp"), "altitude": ("altitude", "alt", "height", "agl"),
          "pressure": ("pressure", "baro", "p")}


@dataclass(frozen=True, eq=False)
class AltimeterLog:
    """Time [s] and height above the pad [m], shape (n_samples,); ``pad_pressure_pa`` when read from pressures."""

    time_s: np.ndarray
    altitude_m: np.ndarray
    source: str
    pad_pressure_pa: float | None = None


def _split(header: str) -> tuple[str, str | None]:
    """``altitude (ft)`` -> ("altitude", "ft"); ``time_ms`` -> ("time", "ms")."""
    text = header.strip().lower()
    match = re.fullmatch(r"([a-z ]+?)\s*[\(\[]\s*([a-z]+)\s*[\)\]]", text)
    if match:
        return match.group(1).strip(), match.group(2)
    if "_" in text:
        name, _, unit = text.rpartition("_")
        return name, unit
    return text, None


def read_altimeter_csv(path: str | os.PathLike[str]) -> AltimeterLog:
    """Read an altimeter log.

    Raises
    ------
    CsvFormatError
        Naming the file, the column and the line: no time column, no altitude or pressure column,
        an unknown unit, a value that is not a number, times not increasing.
    """
    source = str(path)
    text = read_text_bounded(path, MAX_LOG_BYTES, error=CsvFormatError, hint="save the log as UTF-8 CSV")
    lines = [(n, line) for n, line in enumerate(text.splitlines(), start=1) if line.strip() and not line.lstrip().startswith("#")]
    if len(lines) < 2:
        raise CsvFormatError(source, "expected a header line and data lines")
    header_line, header = lines[0]
    columns = next(csv.reader(io.StringIO(header)))
    found: dict[str, tuple[int, str | None]] = {}
    for i, column in enumerate(columns):
        name, unit = _split(column)
        for kind, names in _NAMES.items():
            if name in names and kind not in found:
                found[kind] = (i, unit)
    if "time" not in found:
        raise CsvFormatError(source, f"no time column among {columns}", field="time", line=header_line)
    if "altitude" not in found and "pressure" not in found:
        raise CsvFormatError(source, f"no altitude or pressure column among {columns}", field="altitude", line=header_line)
    kind = "altitude" if "altitude" in found else "pressure"
    units = {"time": _TIME_UNITS, "altitude": _LENGTH_UNITS, "pressure": _PRESSURE_UNITS}
    defaults = {"time": "s", "altitude": "m", "pressure": "pa"}
    factors = {}
    for which in ("time", kind):
        unit = found[which][1] or defaults[which]
        if unit not in units[which]:
            raise CsvFormatError(source, f"unknown unit {unit!r}; expected one of {', '.join(units[which])}",
                                 field=columns[found[which][0]], line=header_line)
        factors[which] = units[which][unit]
    t, v = [], []
    for number, line in lines[1:]:
        cells = next(csv.reader(io.StringIO(line)))
        try:
            t.append(float(cells[found["time"][0]]) * factors["time"])
            v.append(float(cells[found[kind][0]]) * factors[kind])
        except (ValueError, IndexError):
            raise CsvFormatError(source, "expected numbers in the time and altitude/pressure columns",
                                 field=columns[found[kind][0]], line=number) from None
    time_s, values = np.array(t), np.array(v)
    if not np.all(np.isfinite(time_s) & np.isfinite(values)):
        raise CsvFormatError(source, "values must be finite numbers", field=columns[found[kind][0]])
    bad = np.flatnonzero(np.diff(time_s) <= 0)
    if bad.size:
        raise CsvFormatError(source, "times must increase", field=columns[found["time"][0]], line=lines[bad[0] + 2][0])
    if kind == "altitude":
        return AltimeterLog(time_s, values, source)
    if np.any(values <= 0):
        raise CsvFormatError(source, "pressures must be positive", field=columns[found["pressure"][0]])
    rate = 1.0 / float(np.median(np.diff(time_s)))
    pad = float(np.median(values[: max(3, int(round(0.5 * rate)))]))
    return AltimeterLog(time_s, altitude_from_pressure_m(values, pad), source, pad)
