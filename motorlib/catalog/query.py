"""Catalog queries: filters, sorted rows, a pandas DataFrame, and samples for the batched flight.

Everything here reads the index (:mod:`.index`) and never parses a curve
file: rows come from the ``motors`` table, samples from its float64 blobs.
pandas is imported only inside :func:`query`, so the matcher's path
(rows, samples, motor pack) never loads it.
"""

from __future__ import annotations

import json
import marshal
import sqlite3
import sys
from dataclasses import dataclass
from itertools import chain
from operator import attrgetter, itemgetter
from typing import Any, Callable, Sequence, TypeVar

import numpy as np

from ..flight.delays import offers_delay
from ..flight.pack import MotorPack
from ..motor.checks import Finding
from ..motor.classes import CLASS_LETTERS
from ..motor.listing import ROW_COLUMNS, CatalogRow
from .index import COLUMNS
from ..flight.delays import DEFAULT_DRILL_STEP_S

__all__ = ["SORT_KEYS", "CatalogFilter", "load_samples", "motor_pack", "parse_class_range", "query", "select_rows"]

SORT_KEYS = tuple(c for c in COLUMNS if c not in ("findings", "notes", "delays_s", "path"))
_MAX_BOUND_PARAMETERS = 900  # below SQLite's default limit on bound parameters per statement (999)
# Blobs are read in one pass over the table when more than half the motors are wanted: measured on 5,000
# synthetic motors, a pass costs about as much as looking up 2,000 to 2,500 of them by id, and 0.7 times as
# much as looking up all of them.
_SCAN_ABOVE_SHARE = 2


@dataclass(frozen=True)
class CatalogFilter:
    """Which motors a query returns; every criterion is optional and they combine with AND.

    Lengths in m, impulses in N·s, times in s (SI, like the rest of the library).
    """

    class_range: tuple[str, str] | None = None
    diameter_m: float | None = None
    diameter_tolerance_m: float = 0.0005
    maker: str | None = None
    impulse_range_ns: tuple[float | None, float | None] = (None, None)
    burn_range_s: tuple[float | None, float | None] = (None, None)
    delay_s: float | None = None
    text: str | None = None
    tag: str | None = None
    ids: tuple[str, ...] | None = None

    def __post_init__(self) -> None:
        if self.class_range is not None:
            for letter in self.class_range:
                if letter not in CLASS_LETTERS:
                    raise ValueError(f"class {letter!r} is not one of {', '.join(CLASS_LETTERS)}")


def parse_class_range(text: str) -> tuple[str, str]:
    """``"D..G"`` or ``"D"`` -> (lowest, highest) class letters.

    >>> parse_class_range("g..d")
    ('D', 'G')
    """
    parts = [p.strip().upper() for p in text.split("..")]
    if len(parts) == 1:
        parts = parts * 2
    if len(parts) != 2 or any(p not in CLASS_LETTERS for p in parts):
        raise ValueError(f"class range {text!r}: expected a class such as D or a range such as D..G")
    low, high = sorted(parts, key=CLASS_LETTERS.index)
    return low, high


def _where(f: CatalogFilter) -> tuple[list[str], list[Any]]:
    """SQL conditions and their arguments for every criterion of ``f`` except ``delay_s`` (checked per row with
    the flight's rule: :func:`motorlib.flight.delays.offers_delay`)."""
    clauses: list[str] = []
    args: list[Any] = []
    if f.class_range:
        clauses.append("class_index BETWEEN ? AND ?")
        args += [CLASS_LETTERS.index(f.class_range[0]), CLASS_LETTERS.index(f.class_range[1])]
    if f.diameter_m is not None:
        clauses.append("abs(diameter_m - ?) <= ?")
        args += [f.diameter_m, f.diameter_tolerance_m]
    if f.maker:
        clauses.append("lower(maker) LIKE ?")
        args.append(f"%{f.maker.lower()}%")
    for column, (low, high) in (("total_impulse_ns", f.impulse_range_ns), ("burn_time_s", f.burn_range_s)):
        if low is not None:
            clauses.append(f"{column} >= ?")
            args.append(low)
        if high is not None:
            clauses.append(f"{column} <= ?")
            args.append(high)
    if f.text:
        clauses.append("(lower(designation) LIKE ? OR lower(maker) LIKE ? OR lower(notes) LIKE ? OR handle LIKE ?)")
        args += [f"%{f.text.lower()}%"] * 4
    if f.tag:
        clauses.append("motor_id IN (SELECT motor_id FROM tags WHERE tag = ?)")
        args.append(f.tag)
    if f.ids is not None:
        clauses.append(f"motor_id IN ({', '.join('?' * len(f.ids))})")
        args += list(f.ids)
    return clauses, args


def select_rows(db: sqlite3.Connection, where: CatalogFilter | None = None, *, sort: str = "total_impulse_ns",
                descending: bool = False, findings: bool = True) -> list[CatalogRow]:
    """Metadata and metrics of the motors that pass ``where`` (no samples), sorted by ``sort`` then id.

    ``findings=False`` leaves each row's check findings unread (``findings`` None; the counts ``n_errors`` and
    ``n_warnings`` stay): the ranking never reads them, and at 5,000 motors parsing them is a third of the time.
    Every motor in the default order without findings (a ranking of the whole catalog) comes from the index's
    row cache (:func:`_cached_rows`).
    """
    if sort not in SORT_KEYS:
        raise ValueError(f"`sort` must be one of {', '.join(SORT_KEYS)}, got {sort!r}")
    f = where or CatalogFilter()
    if not findings and f == _EVERY_MOTOR and sort == _DEFAULT_SORT and not descending:
        return _cached_rows(db, lambda: _selected_rows(db, f, sort, descending, findings))
    return _selected_rows(db, f, sort, descending, findings)


def _selected_rows(db: sqlite3.Connection, f: CatalogFilter, sort: str, descending: bool,
                   findings: bool) -> list[CatalogRow]:
    """:func:`select_rows` read from the ``motors`` table."""
    clauses, args = _where(f)
    names = COLUMNS if findings else tuple(c if c != "findings" else "NULL" for c in COLUMNS)
    sql = f"SELECT {', '.join(names)} FROM motors"
    if clauses:
        sql += " WHERE " + " AND ".join(clauses)
    sql += f" ORDER BY {sort} {'DESC' if descending else 'ASC'}, motor_id"
    values = db.execute(sql, args).fetchall()
    # the JSON of every row (its delays, its findings) in one parse: one call per row costs more than the parsing
    parsed = json.loads("[" + ",".join(f"[{v[_DELAYS]},{v[_FINDINGS] or 'null'}]" for v in values) + "]")
    rows = CatalogRow.from_columns(values, [delays for delays, _ in parsed],
                                   [None if entries is None else [Finding(**entry) for entry in entries]
                                    for _, entries in parsed])
    if f.delay_s is not None:
        rows = [row for row in rows if offers_delay(f.delay_s, row.delays_s, row.delay_adjustable)]
    return rows


_DELAYS = COLUMNS.index("delays_s")
_FINDINGS = COLUMNS.index("findings")
_EVERY_MOTOR = CatalogFilter()
_DEFAULT_SORT = "total_impulse_ns"
# What a row cache holds: marshal's format is Python's own (it may change between versions), the fields are
# CatalogRow's; a cache of another format is built again.
_ROW_CACHE_FORMAT = (f"marshal {marshal.version} python {sys.version_info[0]}.{sys.version_info[1]}: "
                     + ",".join(ROW_COLUMNS))
_FIELDS = attrgetter(*ROW_COLUMNS)
# The types a cached row's fields may hold (delays: a tuple of floats); anything else and the cache is not used
_CACHED_TYPES = frozenset({str, int, float, bool, tuple, type(None)})


def _cached_rows(db: sqlite3.Connection, read: Callable[[], list[CatalogRow]]) -> list[CatalogRow]:
    """Every motor's row in the default order without findings, from the ``row_cache`` row of the index (built by
    ``read`` and stored when missing, as :func:`_curves` stores its cache).

    The cache holds each row's fields, ready to use (delays as tuples of floats), as one marshal blob: loading it
    is about a fifth of the work of reading the columns of 5,000 motors from the ``motors`` table and parsing
    their delays (measured with callgrind: 40 against 215 million instructions; the rows of a cold 5,000-motor
    ``match``, records built, 328 -> 175 million; 15 to 20 ms less in-process). Marshal is Python's own format
    for trusted data, so what comes out is checked (a list of tuples of the row's length holding only numbers,
    text, None and tuples of floats) before it is used; anything else, or a blob marshal refuses, is treated as
    a missing cache.
    """
    found = db.execute("SELECT format, data FROM row_cache").fetchone()
    if found is not None and found[0] == _ROW_CACHE_FORMAT:
        values = _loaded_rows(found[1])
        if values is not None:
            return CatalogRow.from_fields(values)
    return _store_when_free(db, read, lambda rows: (
        db.execute("DELETE FROM row_cache"),
        db.execute("INSERT INTO row_cache VALUES (?, ?)",
                   (_ROW_CACHE_FORMAT, marshal.dumps([_FIELDS(row) for row in rows])))))


def _loaded_rows(data: bytes) -> list[tuple[Any, ...]] | None:
    """The row fields in a ``row_cache`` blob, or None if it is not a list of such rows (see :func:`_cached_rows`)."""
    try:
        values = marshal.loads(data)
    except (EOFError, ValueError, TypeError, OverflowError, MemoryError):  # (a damaged size can ask for gigabytes)
        return None
    if type(values) is not list or not set(map(type, values)) <= {tuple} or not set(map(len, values)) <= {_N_FIELDS}:
        return None
    types = list(map(type, chain.from_iterable(values)))
    if not set(types) <= _CACHED_TYPES or types.count(tuple) != len(values):  # one tuple a row: its delays
        return None
    delays = list(map(_DELAYS_OF, values))
    if not set(map(type, delays)) <= {tuple} or not set(map(type, chain.from_iterable(delays))) <= {float}:
        return None
    return values


_N_FIELDS = len(ROW_COLUMNS)
_DELAYS_OF = itemgetter(ROW_COLUMNS.index("delays_s"))
_T = TypeVar("_T")


def _store_when_free(db: sqlite3.Connection, read: Callable[[], _T], store: Callable[[_T], object]) -> _T:
    """What ``read`` returns, stored by ``store`` in the same write transaction when that cannot wait (a cache
    of the index: see :func:`_curves`).

    Storing is only tried outside any other transaction and while no other process writes the catalog
    (``BEGIN IMMEDIATE`` with no wait); otherwise what is committed is read, and stored by a later reader.
    Reading inside the write transaction means no change to a motor can fall between reading and storing (the
    triggers on ``motors`` drop the caches in the transaction of any change).
    """
    if db.in_transaction:
        return read()
    (timeout,) = db.execute("PRAGMA busy_timeout").fetchone()
    db.execute("PRAGMA busy_timeout = 0")
    try:
        db.execute("BEGIN IMMEDIATE")
    except sqlite3.OperationalError:  # another process is writing
        began = False
    else:
        began = True
    finally:
        db.execute(f"PRAGMA busy_timeout = {int(timeout)}")
    if not began:
        return read()
    try:
        value = read()
        store(value)
        db.execute("COMMIT")
    except BaseException:
        db.execute("ROLLBACK")
        raise
    return value


def query(db: sqlite3.Connection, where: CatalogFilter | None = None, **kwargs: Any) -> Any:
    """The rows of :func:`select_rows` as a pandas DataFrame indexed by motor id (pandas is imported only here)."""
    import pandas as pd

    rows = [row.as_dict() for row in select_rows(db, where, **kwargs)]
    return pd.DataFrame(rows, columns=list(COLUMNS)).set_index("motor_id")


def load_samples(db: sqlite3.Connection, ids: Sequence[str]) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """Time [s] and thrust [N] arrays of the given motors, straight from the index blobs (no XML parsing)."""
    return {motor_id: (np.frombuffer(t, dtype="<f8"), np.frombuffer(f, dtype="<f8"))
            for motor_id, (t, f) in _blobs(db, ids).items()}


def _blobs(db: sqlite3.Connection, ids: Sequence[str]) -> dict[str, tuple[bytes, bytes]]:
    """The time and thrust blobs of the given motors, by id.

    Most of the motors (a ranking of the whole catalog): one pass over the table, reading its pages in order;
    fewer: looked up by id, in chunks of bound parameters.
    """
    out: dict[str, tuple[bytes, bytes]] = {}
    wanted = list(ids)
    if len(wanted) * _SCAN_ABOVE_SHARE > db.execute("SELECT count(*) FROM motors").fetchone()[0]:
        chosen = set(wanted)
        for motor_id, t, f in db.execute("SELECT motor_id, time_blob, thrust_blob FROM motors"):
            if motor_id in chosen:
                out[motor_id] = (t, f)
        return out
    for start in range(0, len(wanted), _MAX_BOUND_PARAMETERS):
        chunk = wanted[start:start + _MAX_BOUND_PARAMETERS]
        sql = f"SELECT motor_id, time_blob, thrust_blob FROM motors WHERE motor_id IN ({', '.join('?' * len(chunk))})"
        out.update((motor_id, (t, f)) for motor_id, t, f in db.execute(sql, chunk))
    return out


def motor_pack(db: sqlite3.Connection, rows: Sequence[CatalogRow], drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack:
    """A :class:`~motorlib.flight.MotorPack` for ``rows`` (from :func:`select_rows`), built from the index: the
    samples of the rows, in order, taken from the ``curves`` cache (every motor's samples end to end, one blob;
    built and stored here when missing) and read as two arrays (no XML, no array per motor)."""
    ids, counts, time_s, thrust_n = _curves(db)
    position = dict(zip(ids, range(len(ids))))
    chosen = np.array([position[r.motor_id] for r in rows], dtype=np.int64)
    starts = (np.cumsum(counts) - counts)[chosen]
    wanted = counts[chosen]
    # the samples of chosen motor j sit at starts[j] ... starts[j] + wanted[j] - 1 of the flat arrays
    take = np.repeat(starts - (np.cumsum(wanted) - wanted), wanted) + np.arange(int(wanted.sum()))
    return MotorPack.from_flat(  # from_flat copies the samples into its own arrays
        time_s[take], thrust_n[take], wanted,
        total_mass_kg=[r.total_mass_kg for r in rows],
        propellant_mass_kg=[r.propellant_mass_kg for r in rows],
        delays_s=[r.delays_s for r in rows],
        delay_adjustable=[r.delay_adjustable for r in rows],
        drill_step_s=drill_step_s,
    )


def _curves(db: sqlite3.Connection) -> tuple[list[str], np.ndarray, np.ndarray, np.ndarray]:
    """Every motor's id, sample count, times [s] and thrusts [N] (the samples end to end), from the ``curves``
    cache of the index (:mod:`.index`).

    A missing cache is built from the ``motors`` table and stored, in one write transaction, so that no change
    to a motor can fall between reading the rows and storing what was read (the triggers on ``motors`` drop
    the cache in the transaction of any change). Storing is only tried where it cannot wait: inside another
    transaction, or while another process writes the catalog, the samples are read and not stored.
    """
    found = db.execute("SELECT motor_ids, counts, time_blob, thrust_blob FROM curves").fetchone()
    if found is None:
        found = _build_curves(db)
    motor_ids, counts, time_blob, thrust_blob = found
    return (motor_ids.split(",") if motor_ids else [], np.frombuffer(counts, dtype="<i8"),
            np.frombuffer(time_blob, dtype="<f8"), np.frombuffer(thrust_blob, dtype="<f8"))


def _build_curves(db: sqlite3.Connection) -> tuple[str, bytes, bytes, bytes]:
    """The ``curves`` row of the motors in the index now (see :func:`_curves`), stored when that cannot wait."""
    def read() -> tuple[str, bytes, bytes, bytes]:
        motors = db.execute("SELECT motor_id, time_blob, thrust_blob FROM motors").fetchall()
        return (",".join(m for m, _, _ in motors), np.array([len(t) // 8 for _, t, _ in motors], dtype="<i8").tobytes(),
                b"".join(t for _, t, _ in motors), b"".join(f for _, _, f in motors))

    return _store_when_free(db, read, lambda row: db.execute("INSERT INTO curves VALUES (?, ?, ?, ?)", row))
