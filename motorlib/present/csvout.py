"""CSV for people and spreadsheets: every column names its unit in its header.

With metric display units the columns stay in SI under their library names (``apogee_m``, ``total_mass_kg``),
exactly as the JSON output; with imperial units each column is converted and renamed after its new unit
(``apogee_ft``, ``rail_exit_speed_m_s`` -> ``rail_exit_speed_ft_s``, ``total_mass_kg`` -> ``total_mass_oz``).
Motor sizes become mm and thrust and impulse stay in N and N·s (see :mod:`.display`).
"""

from __future__ import annotations

import csv
import io
import math
from typing import Any, Callable, Sequence

from .display import DisplayUnits

__all__ = ["rows_csv"]

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
