"""CSV for people and spreadsheets: every column names its unit in its header.

With metric display units the columns stay in SI under their library names (``apogee_m``, ``total_mass_kg``),
exactly as the JSON output; with imperial units each column is converted and renamed after its new unit
(``apogee_ft``, ``rail_exit_speed_m_s`` -> ``rail_exit_speed_ft_s``, ``total_mass_kg`` -> ``total_mass_oz``).
Motor sizes become mm and thrust and impulse stay in N and N·s (see :mod:`.display`).

The three tables the commands write, one function each: a flight's trajectory (:func:`trajectory_csv`, ``fly
--csv``), the ranked candidates (:func:`candidates_csv`, ``match --csv``) and catalog rows (:func:`catalog_csv`,
``catalog list --csv``). Their column names are a contract (``tests/cli/test_csv_headers.py`` pins them).

The trajectory's last column, ``phase``, says where each row is in the flight (:data:`TRAJECTORY_PHASES`):
``ascent`` from the pad to apogee, ``freefall`` after apogee with no recovery device open (a ballistic fall, or
the fall before the first device opens), ``descent`` with a device open.
"""

from __future__ import annotations

import csv
import io
import math
from typing import TYPE_CHECKING, Any, Callable, Mapping, Sequence

from ..matching.candidate import Candidate
from ..motor.listing import ROW_COLUMNS, CatalogRow
from .display import DisplayUnits

if TYPE_CHECKING:
    import numpy as np

__all__ = ["TRAJECTORY_COLUMNS", "TRAJECTORY_PHASES", "candidates_csv", "catalog_csv", "rows_csv", "trajectory_csv",
           "trajectory_phases"]

# fly --csv: the trajectory's columns in order, then ``phase`` (one of TRAJECTORY_PHASES)
TRAJECTORY_COLUMNS = ("time_s", "x_m", "y_m", "altitude_m", "east_m", "north_m", "vx_m_s", "vy_m_s", "vz_m_s",
                      "ax_m_s2", "ay_m_s2", "az_m_s2")
TRAJECTORY_PHASES = {
    "ascent": "from the pad up to apogee, no recovery device open",
    "freefall": "after apogee, falling with no recovery device open (before the first opens, or none ever does)",
    "descent": "a recovery device is open",
}
"""The values of ``fly --csv``'s ``phase`` column and what each means."""
# match --csv: the candidate keys left out (codes and texts as lists), their texts given as two columns instead
_CANDIDATE_LISTS = ("reasons", "reason_codes", "ballast_reasons", "ballast_reason_codes", "notes", "note_codes",
                    "nose_weight_reasons", "nose_weight_reason_codes")

_MOTOR_SIZE_KEYS = frozenset({"diameter_m", "length_m", "mount_diameter_m", "mount_length_m"})
# name suffix -> kind, longest suffix first
_SUFFIX_KINDS = (("_m_s2", "acceleration"), ("_m_s", "speed"), ("_m2", "area"), ("_m", "length"),
                 ("_kg", "mass"), ("_pa", "pressure"))


def _column(name: str, values: Sequence[Any], units: DisplayUnits) -> tuple[str, Callable[[Any], Any]]:
    """The header of column ``name`` and the function that converts its cells."""
    if units.system == "metric":
        return name, lambda v: v
    for suffix, kind in _SUFFIX_KINDS:
        if name.endswith(suffix):
            kind = "motor_size" if name in _MOTOR_SIZE_KEYS else kind
            numbers = [v for v in values if isinstance(v, (int, float)) and not isinstance(v, bool)]
            unit = units.column_unit(numbers, kind)

            def convert(v: Any, kind: str = kind, unit: str = unit) -> Any:
                if not isinstance(v, (int, float)) or isinstance(v, bool) or not math.isfinite(v):
                    return v
                return float(f"{units.convert(v, kind, unit):.10g}")  # ten digits: no conversion noise

            return name[: -len(suffix)] + "_" + units.suffix(unit), convert
    return name, lambda v: v


def rows_csv(rows: Sequence[dict[str, Any]], columns: Sequence[str], units: DisplayUnits) -> str:
    """``rows`` (dicts) as CSV text with ``columns`` in order, converted to ``units``; lists become ``a b c``."""
    converters = [_column(name, [r.get(name) for r in rows], units) for name in columns]
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([header for header, _ in converters])
    for row in rows:
        cells = []
        for name, (_, convert) in zip(columns, converters):
            value = row.get(name)
            if isinstance(value, (list, tuple)):
                value = " ".join(f"{v:g}" if isinstance(v, float) else str(v) for v in value)
            cells.append("" if value is None else convert(value))
        writer.writerow(cells)
    return buffer.getvalue()


def trajectory_phases(altitude_m: Sequence[float], under_device: Sequence[bool]) -> list[str]:
    """The ``phase`` of each trajectory row (:data:`TRAJECTORY_PHASES`), from its altitude [m] and whether a
    recovery device is open: ``descent`` under a device, else ``ascent`` up to apogee (the last of the highest
    rows, so a rocket that never climbs is never said to fall) and ``freefall`` after it.

    >>> trajectory_phases([0.0, 50.0, 40.0, 10.0, 0.0], [False, False, False, True, True])
    ['ascent', 'ascent', 'freefall', 'descent', 'descent']
    """
    heights = [float(z) for z in altitude_m]
    top = max(heights, default=0.0)
    apogee_row = max((k for k, z in enumerate(heights) if z == top), default=-1)
    return ["descent" if device else "ascent" if k <= apogee_row else "freefall"
            for k, device in enumerate(under_device)]


def trajectory_csv(trajectory: Mapping[str, np.ndarray], units: DisplayUnits) -> str:
    """One flown trajectory (``FlightResults.trajectories[i]``) as CSV: :data:`TRAJECTORY_COLUMNS` and ``phase``
    (:data:`TRAJECTORY_PHASES`, from :func:`trajectory_phases`)."""
    phases = trajectory_phases(trajectory["altitude_m"], trajectory["descent"])
    rows = [{**{name: float(trajectory[name][row]) for name in TRAJECTORY_COLUMNS}, "phase": phases[row]}
            for row in range(len(trajectory["time_s"]))]
    return rows_csv(rows, [*TRAJECTORY_COLUMNS, "phase"], units)


def candidates_csv(candidates: Sequence[Candidate], conditions: dict[str, Any], units: DisplayUnits) -> str:
    """Ranked candidates (``MatchResult.candidates``) as CSV: every figure, then the reasons and notes as text
    in the display units, each list joined with ``; ``."""
    from .messages import note_text, reason_text

    columns = ([k for k in candidates[0].as_dict() if k not in _CANDIDATE_LISTS] + ["reasons", "notes"]
               if candidates else [])
    rows = [{**c.as_dict(), "reasons": "; ".join(reason_text(code, text, c, conditions, units)
                                                 for code, text in zip(c.reason_codes, c.reasons)),
             "notes": "; ".join(note_text(code, text, c, conditions, units)
                                for code, text in zip(c.note_codes, c.notes))}
            for c in candidates]
    return rows_csv(rows, columns, units)


def catalog_csv(rows: Sequence[CatalogRow], units: DisplayUnits) -> str:
    """Catalog rows (``Catalog.rows()``) as CSV: every column but the findings."""
    return rows_csv([r.as_dict() for r in rows], [c for c in ROW_COLUMNS if c != "findings"] if rows else [], units)
