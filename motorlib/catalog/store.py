"""A local motor catalog: a folder of curve files (the truth) plus an SQLite index (a cache).

Layout::

    <root>/<maker-slug>/<designation-slug>[-n].xml   one motor record each, our XML format
    <root>/tags.json                                  tag name -> motor ids (the truth for tags)
    <root>/.motorlib/index.sqlite                     metadata, metrics, findings and samples (float64 blobs)
    <root>/.motorlib/lock                             writers hold an exclusive lock on it
    <root>/READ_ONLY                                  optional marker: open read-only, index in memory

The index is rebuilt or refreshed whenever it is missing, corrupt or stale:
opening compares every file's size and modification time with the index and
parses only what changed (a content hash confirms a change), so a current index
opens without parsing any curve. Unreadable or invalid files are reported by
name and skipped. Every write goes to a temporary file that is fsynced and
renamed; a writer killed at any moment leaves each curve either fully present or
absent, and the next open brings the index back in step.

A motor's id is the first 16 hex digits of the SHA-256 of its file (files are
always written in canonical form, so equal records have equal ids). Its handle
is its path without ``.xml`` (``bramblewick-propulsion/g59-10``), with a ``-2``,
``-3`` suffix where one maker and designation have several curves.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import re
import sqlite3
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Callable, Iterator, Sequence

import numpy as np

from ..motor.checks import CheckSettings, Finding, check_record, findings_from_problems, metrics
from ..motor.classes import CLASS_LETTERS
from ..motor.record import MotorRecord
from ..errors import CatalogError, CurveDataError, MotorlibError, MotorNotFoundError
from ..files.fsio import slug, write_atomic
from ..files.motor_xml import record_from_bytes, record_to_bytes

__all__ = ["AddResult", "Catalog", "CatalogFilter", "motor_id_for"]

SCHEMA_VERSION = "1"
READ_ONLY_MARKER = "READ_ONLY"  # a file of this name makes a catalog folder read-only (the bundled samples)
_INDEX_DIR = ".motorlib"
_COLUMNS = ("motor_id", "handle", "path", "maker", "designation", "computed_designation", "impulse_class",
            "class_index", "class_percent", "total_impulse_ns", "average_thrust_n", "peak_thrust_n", "burn_time_s",
            "diameter_m", "length_m", "total_mass_kg", "propellant_mass_kg", "specific_impulse_s", "delays_s",
            "delay_adjustable", "provenance_kind", "provenance_date", "notes", "n_samples", "n_errors",
            "n_warnings", "findings")
SORT_KEYS = tuple(c for c in _COLUMNS if c not in ("findings", "notes", "delays_s", "path"))


def motor_id_for(data: bytes) -> str:
    """The id of a catalog file: the first 16 hex digits of its SHA-256."""
    return hashlib.sha256(data).hexdigest()[:16]


@dataclass(frozen=True)
class CatalogFilter:
    """Which motors a query returns; every criterion is optional and they combine with AND.

    Lengths in m, impulses in N·s, times in s (SI, like the rest of the library).
    """

    class_range: tuple[str, str] | None = None
    diameter_m: float | None = None
    diameter_tolerance_m: float = 0.0005
    max_diameter_m: float | None = None
    max_length_m: float | None = None
    maker: str | None = None
    impulse_range_ns: tuple[float | None, float | None] = (None, None)
    burn_range_s: tuple[float | None, float | None] = (None, None)
    delay_s: float | None = None
    text: str | None = None
    tag: str | None = None
    ids: tuple[str, ...] | None = None
    hide_errors: bool = False

    def __post_init__(self) -> None:
        if self.class_range is not None:
            for letter in self.class_range:
                if letter not in CLASS_LETTERS:
                    raise ValueError(f"class {letter!r} is not one of {', '.join(CLASS_LETTERS)}")


@dataclass(frozen=True)
class AddResult:
    """What happened to one curve offered to the catalog.

    ``status`` is ``added``, ``duplicate`` (already there, nothing written),
    ``refused`` (checks found errors, nothing written) or ``unreadable``.
    ``near_duplicates`` lists handles with the same maker and designation.
    """

    source: str
    status: str
    motor_id: str | None = None
    handle: str | None = None
    message: str = ""
    near_duplicates: tuple[str, ...] = ()
    findings: tuple[Finding, ...] = ()


def parse_class_range(text: str) -> tuple[str, str]:
    """``"D..G"`` or ``"D"`` -> (lowest, highest) class letters."""
    parts = [p.strip().upper() for p in text.split("..")]
    if len(parts) == 1:
        parts = parts * 2
    if len(parts) != 2 or any(p not in CLASS_LETTERS for p in parts):
        raise ValueError(f"class range {text!r}: expected a class such as D or a range such as D..G")
    low, high = sorted(parts, key=CLASS_LETTERS.index)
    return low, high


class Catalog:
    """A motor catalog in ``root`` (see the module docstring).

    Parameters
    ----------
    root : path-like
        The catalog folder; created when ``create`` and it does not exist.
    read_only : bool
        Never write inside ``root``: the index is built in memory. A folder
        holding a ``READ_ONLY`` file is always opened this way (the bundled
        sample curves are).
    settings : CheckSettings, optional
        The rules used for findings stored in the index.

    Attributes
    ----------
    notices : list of str
        What opening did (index built, refreshed, rebuilt after corruption).
    problems : list of (str, str)
        Files skipped as unreadable or invalid, with the reason.
    """

    def __init__(self, root: str | os.PathLike[str], *, read_only: bool = False, create: bool = True,
                 settings: CheckSettings | None = None) -> None:
        self.root = Path(root)
        self.read_only = read_only or (self.root / READ_ONLY_MARKER).is_file()
        self.settings = settings or CheckSettings()
        self.notices: list[str] = []
        self.problems: list[tuple[str, str]] = []
        if not self.root.exists():
            if read_only or not create:
                raise CatalogError(f"{self.root}: no such catalog folder")
            self.root.mkdir(parents=True)
        if not self.root.is_dir():
            raise CatalogError(f"{self.root}: not a folder")
        self._db = self._connect()
        self.refresh(report=True)
        self.refresh_tags()

    # ------------------------------------------------------------------ index plumbing
    @property
    def index_path(self) -> Path:
        return self.root / _INDEX_DIR / "index.sqlite"

    def _connect(self) -> sqlite3.Connection:
        if self.read_only:
            db = sqlite3.connect(":memory:", isolation_level=None)
            self._create_schema(db)
            self.notices.append(f"{self.root}: read-only catalog, index kept in memory")
            return db
        (self.root / _INDEX_DIR).mkdir(exist_ok=True)
        existed = self.index_path.exists()
        try:
            db = self._open_db()
            version = db.execute("SELECT value FROM meta WHERE key = 'schema'").fetchone()
            if version is None or version[0] != SCHEMA_VERSION:
                raise sqlite3.DatabaseError("schema version mismatch")
            db.execute("SELECT count(*) FROM motors").fetchone()
            return db
        except sqlite3.DatabaseError as exc:
            with contextlib.suppress(NameError):
                db.close()
            if existed:
                with self._lock():
                    aside = self.index_path.with_suffix(".corrupt")
                    if self.index_path.exists():
                        os.replace(self.index_path, aside)
                    for extra in ("-wal", "-shm"):
                        with contextlib.suppress(FileNotFoundError):
                            os.unlink(str(self.index_path) + extra)
                self.notices.append(f"{self.index_path}: index unusable ({exc}); moved aside and rebuilt from the files")
            else:
                self.notices.append(f"{self.root}: building the catalog index")
            db = self._open_db()
            with db:
                self._create_schema(db)
            return db

    def _open_db(self) -> sqlite3.Connection:
        db = sqlite3.connect(self.index_path, timeout=60.0, isolation_level=None)
        db.execute("PRAGMA busy_timeout = 60000")
        db.execute("PRAGMA journal_mode = WAL")
        db.execute("PRAGMA synchronous = NORMAL")
        return db

    @staticmethod
    def _create_schema(db: sqlite3.Connection) -> None:
        db.execute("CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT)")
        db.execute("CREATE TABLE IF NOT EXISTS files (path TEXT PRIMARY KEY, size INTEGER, mtime_ns INTEGER, "
                   "sha256 TEXT, motor_id TEXT, error TEXT)")
        cols = ", ".join(f"{c} {'TEXT PRIMARY KEY' if c == 'motor_id' else ''}" for c in _COLUMNS)
        db.execute(f"CREATE TABLE IF NOT EXISTS motors ({cols}, time_blob BLOB, thrust_blob BLOB)")
        db.execute("CREATE INDEX IF NOT EXISTS motors_class ON motors (class_index)")
        db.execute("CREATE INDEX IF NOT EXISTS motors_name ON motors (maker, designation)")
        db.execute("CREATE TABLE IF NOT EXISTS tags (motor_id TEXT, tag TEXT, PRIMARY KEY (motor_id, tag))")
        db.execute("INSERT OR REPLACE INTO meta VALUES ('schema', ?)", (SCHEMA_VERSION,))

    @contextlib.contextmanager
    def _lock(self) -> Iterator[None]:
        """An exclusive lock between writer processes (fcntl where available)."""
        if self.read_only:
            raise CatalogError(f"{self.root}: the catalog is read-only")
        path = self.root / _INDEX_DIR / "lock"
        path.parent.mkdir(exist_ok=True)
        with open(path, "a+b") as handle:
            try:
                import fcntl
            except ImportError:  # pragma: no cover - not POSIX: rely on SQLite's own locking
                yield
                return
            fcntl.flock(handle.fileno(), fcntl.LOCK_EX)
            try:
                yield
            finally:
                fcntl.flock(handle.fileno(), fcntl.LOCK_UN)

    def close(self) -> None:
        self._db.close()

    def __enter__(self) -> Catalog:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # ------------------------------------------------------------------ refresh from the files
    def _scan(self) -> dict[str, tuple[int, int]]:
        found: dict[str, tuple[int, int]] = {}
        root = str(self.root)
        for folder, dirs, files in os.walk(root):
            dirs[:] = [d for d in dirs if not d.startswith(".")]
            for name in files:
                if name.endswith(".xml") and not name.startswith("."):
                    full = os.path.join(folder, name)
                    st = os.stat(full)
                    found[os.path.relpath(full, root).replace(os.sep, "/")] = (st.st_size, st.st_mtime_ns)
        return found

    def refresh(self, *, report: bool = False) -> int:
        """Bring the index in step with the files; returns how many files were (re)read.

        Only files whose size or modification time differ from the index are read,
        and a content hash confirms the change before any parsing. ``problems`` is
        rebuilt; with ``report`` a notice says what changed.
        """
        self.problems = []
        on_disk = self._scan()
        known = {row[0]: row[1:] for row in self._db.execute("SELECT path, size, mtime_ns, sha256, error FROM files")}
        removed = [p for p in known if p not in on_disk]
        changed = [p for p, stat in on_disk.items() if p not in known or tuple(known[p][:2]) != stat]
        for path, row in known.items():  # files that failed before stay reported, without re-reading
            if path in on_disk and path not in changed and row[3]:
                self.problems.append((str(self.root / path), row[3]))
        if not removed and not changed:
            return 0
        self._db.execute("BEGIN IMMEDIATE")
        try:
            for path in removed:
                self._db.execute("DELETE FROM motors WHERE path = ?", (path,))
                self._db.execute("DELETE FROM files WHERE path = ?", (path,))
            for path in changed:
                self._index_file(path, on_disk[path], known.get(path))
            self._db.execute("COMMIT")
        except BaseException:
            self._db.execute("ROLLBACK")
            raise
        if report and known:
            self.notices.append(f"{self.root}: index refreshed ({len(changed)} file(s) read, {len(removed)} removed)")
        return len(changed)

    def _index_file(self, path: str, stat: tuple[int, int], old: tuple | None) -> None:
        full = self.root / path
        try:
            data = full.read_bytes()
        except OSError as exc:
            self.problems.append((str(full), exc.strerror or str(exc)))
            return
        digest = hashlib.sha256(data).hexdigest()
        if old is not None and old[2] == digest and not old[3]:
            self._db.execute("UPDATE files SET size = ?, mtime_ns = ? WHERE path = ?", (*stat, path))
            return
        motor_id = digest[:16]
        self._db.execute("DELETE FROM motors WHERE path = ?", (path,))
        try:
            record = record_from_bytes(data, str(full))
        except MotorlibError as exc:
            self._db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, NULL, ?)", (path, *stat, digest, str(exc)))
            self.problems.append((str(full), str(exc)))
            return
        twin = self._db.execute("SELECT path FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
        if twin is not None:
            message = f"an exact copy of {twin[0]}; skipped"
            self._db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, NULL, ?)", (path, *stat, digest, message))
            self.problems.append((str(full), message))
            return
        self._db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, NULL)", (path, *stat, digest, motor_id))
        self._insert_motor(motor_id, path, record)

    def _insert_motor(self, motor_id: str, path: str, record: MotorRecord) -> None:
        m = metrics(record, self.settings.burn_threshold)
        findings = check_record(record, self.settings)
        cls = m["impulse_class"]
        row = {
            "motor_id": motor_id, "handle": path[:-4], "path": path, "maker": record.maker,
            "designation": record.designation, "computed_designation": m["computed_designation"],
            "impulse_class": cls, "class_index": CLASS_LETTERS.index(cls) if cls else len(CLASS_LETTERS),
            "class_percent": m["class_percent"], "total_impulse_ns": m["total_impulse_ns"],
            "average_thrust_n": m["average_thrust_n"], "peak_thrust_n": m["peak_thrust_n"],
            "burn_time_s": m["burn_time_s"], "diameter_m": record.diameter_m, "length_m": record.length_m,
            "total_mass_kg": record.total_mass_kg, "propellant_mass_kg": record.propellant_mass_kg,
            "specific_impulse_s": record.specific_impulse_s, "delays_s": json.dumps(list(record.delays_s)),
            "delay_adjustable": int(record.delay_adjustable), "provenance_kind": record.provenance.kind,
            "provenance_date": record.provenance.date.isoformat() if record.provenance.date else None,
            "notes": record.provenance.notes, "n_samples": record.n_samples,
            "n_errors": sum(f.severity == "error" for f in findings),
            "n_warnings": sum(f.severity == "warning" for f in findings),
            "findings": json.dumps([f.as_dict() for f in findings]),
        }
        values = [row[c] for c in _COLUMNS] + [record.time_s.astype("<f8").tobytes(),
                                               record.thrust_n.astype("<f8").tobytes()]
        marks = ", ".join("?" * len(values))
        self._db.execute(f"INSERT OR REPLACE INTO motors VALUES ({marks})", values)

    def reindex(self) -> int:
        """Rebuild the whole index from the files (tags come back from tags.json)."""
        with self._lock():
            self._db.execute("BEGIN IMMEDIATE")
            self._db.execute("DELETE FROM motors")
            self._db.execute("DELETE FROM files")
            self._db.execute("COMMIT")
        self.problems.clear()
        return self.refresh()

    # ------------------------------------------------------------------ adding and removing
    def add(self, record: MotorRecord, *, source: str = "", force: bool = False) -> AddResult:
        """Add one record: refused with errors unless ``force``; exact duplicates are not written again.

        With ``force``, the error codes are appended to the record's provenance
        notes, so the file itself says it was accepted despite them.
        """
        with self._lock():
            self.refresh()  # another process may have added files since we opened
            return self._add_locked(record, source or record.designation, force)

    def _add_locked(self, record: MotorRecord, source: str, force: bool) -> AddResult:
        findings = tuple(check_record(record, self.settings))
        errors = [f for f in findings if f.severity == "error"]
        if errors and not force:
            return AddResult(source, "refused", message="; ".join(f"{f.code}: {f.message}" for f in errors),
                             findings=findings)
        if errors:
            note = f"[added despite errors: {', '.join(sorted({f.code for f in errors}))}]"
            notes = f"{record.provenance.notes} {note}".strip()
            record = replace(record, provenance=replace(record.provenance, notes=notes))
        data = record_to_bytes(record)
        motor_id = motor_id_for(data)
        twin = self._db.execute("SELECT handle FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
        if twin is not None:
            return AddResult(source, "duplicate", motor_id, twin[0], f"already in the catalog as {twin[0]}",
                             findings=findings)
        near = tuple(h for (h,) in self._db.execute(
            "SELECT handle FROM motors WHERE lower(maker) = lower(?) AND lower(designation) = lower(?)",
            (record.maker, record.designation)))
        path = self._free_path(record)
        write_atomic(self.root / path, data, overwrite=False)
        st = os.stat(self.root / path)
        self._db.execute("BEGIN IMMEDIATE")
        try:
            self._db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, NULL)",
                             (path, st.st_size, st.st_mtime_ns, hashlib.sha256(data).hexdigest(), motor_id))
            self._insert_motor(motor_id, path, record)
            self._db.execute("COMMIT")
        except BaseException:
            self._db.execute("ROLLBACK")
            raise
        message = f"same maker and designation as {', '.join(near)}" if near else ""
        return AddResult(source, "added", motor_id, path[:-4], message, near, findings)

    def _free_path(self, record: MotorRecord) -> str:
        folder = slug(record.maker or "unknown-maker")
        stem = slug(record.designation)
        candidate = f"{folder}/{stem}.xml"
        n = 1
        while (self.root / candidate).exists():
            n += 1
            candidate = f"{folder}/{stem}-{n}.xml"
        full = (self.root / candidate).resolve()
        if self.root.resolve() not in full.parents:  # slugs cannot contain separators; belt and braces
            raise CatalogError(f"{candidate}: would leave the catalog folder")
        full.parent.mkdir(parents=True, exist_ok=True)
        return candidate

    def add_files(self, paths: Sequence[str | os.PathLike[str]], *, metadata: Any = None, force: bool = False,
                  progress: Callable[[int], None] | None = None, time_unit: str | None = None,
                  thrust_unit: str | None = None) -> list[AddResult]:
        """Add curve files (XML, or CSV with ``metadata``); bad files are reported, never fatal."""
        from ..files.curvefiles import load_curve_file

        results = []
        with self._lock():
            self.refresh()  # once: while we hold the lock nobody else writes
            for path in paths:
                try:
                    record = load_curve_file(path, metadata, time_unit=time_unit, thrust_unit=thrust_unit)
                except CurveDataError as exc:
                    results.append(AddResult(str(path), "refused", message=str(exc),
                                             findings=tuple(findings_from_problems(exc))))
                except (MotorlibError, OSError) as exc:
                    results.append(AddResult(str(path), "unreadable", message=str(exc)))
                else:
                    results.append(self._add_locked(record, str(path), force))
                if progress is not None:
                    progress(1)
        return results

    def remove(self, ref: str) -> str:
        """Delete a motor's file and its index rows and tags; returns its handle."""
        motor_id = self.resolve(ref)
        with self._lock():
            path, handle = self._db.execute("SELECT path, handle FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
            with contextlib.suppress(FileNotFoundError):
                os.unlink(self.root / path)
            self._db.execute("BEGIN IMMEDIATE")
            self._db.execute("DELETE FROM motors WHERE motor_id = ?", (motor_id,))
            self._db.execute("DELETE FROM files WHERE path = ?", (path,))
            self._db.execute("COMMIT")
            self._write_tags({t: ids - {motor_id} for t, ids in self._read_tags().items()})
        return handle

    # ------------------------------------------------------------------ lookup
    def resolve(self, ref: str) -> str:
        """The motor id for an id (or a prefix of 6+ digits), a handle, a file path or a unique designation.

        Raises
        ------
        MotorNotFoundError
            Nothing matches, or several motors do (the message lists them).
        """
        text = ref.strip()
        hits = self._db.execute("SELECT motor_id FROM motors WHERE motor_id = ? OR handle = ? OR path = ?",
                                (text.lower(), text.removesuffix(".xml"), text)).fetchall()
        if not hits and len(text) >= 6 and re.fullmatch(r"[0-9a-fA-F]+", text):
            hits = self._db.execute("SELECT motor_id FROM motors WHERE motor_id LIKE ?", (text.lower() + "%",)).fetchall()
        if not hits:
            hits = self._db.execute("SELECT motor_id FROM motors WHERE lower(designation) = lower(?) OR "
                                    "lower(computed_designation) = lower(?)", (text, text)).fetchall()
        if len(hits) == 1:
            return hits[0][0]
        if not hits:
            raise MotorNotFoundError(f"{ref!r}: no motor with that id, handle or designation in {self.root}")
        handles = [self._db.execute("SELECT handle FROM motors WHERE motor_id = ?", h).fetchone()[0] for h in hits]
        raise MotorNotFoundError(f"{ref!r}: several motors match ({', '.join(sorted(handles))}); give a handle or id")

    def get(self, ref: str) -> MotorRecord:
        """The full record of a motor, read from its file."""
        motor_id = self.resolve(ref)
        (path,) = self._db.execute("SELECT path FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
        return record_from_bytes((self.root / path).read_bytes(), str(self.root / path))

    def __len__(self) -> int:
        return int(self._db.execute("SELECT count(*) FROM motors").fetchone()[0])

    def rows(self, where: CatalogFilter | None = None, *, sort: str = "total_impulse_ns",
             descending: bool = False) -> list[dict[str, Any]]:
        """Metadata and metrics of the motors that pass ``where`` (no samples), sorted by ``sort``."""
        if sort not in SORT_KEYS:
            raise ValueError(f"`sort` must be one of {', '.join(SORT_KEYS)}, got {sort!r}")
        f = where or CatalogFilter()
        clauses, args = [], []
        if f.class_range:
            clauses.append("class_index BETWEEN ? AND ?")
            args += [CLASS_LETTERS.index(f.class_range[0]), CLASS_LETTERS.index(f.class_range[1])]
        if f.diameter_m is not None:
            clauses.append("abs(diameter_m - ?) <= ?")
            args += [f.diameter_m, f.diameter_tolerance_m]
        if f.max_diameter_m is not None:
            clauses.append("diameter_m <= ?")
            args.append(f.max_diameter_m + f.diameter_tolerance_m)
        if f.max_length_m is not None:
            clauses.append("length_m <= ?")
            args.append(f.max_length_m)
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
        if f.hide_errors:
            clauses.append("n_errors = 0")
        sql = f"SELECT {', '.join(_COLUMNS)} FROM motors"
        if clauses:
            sql += " WHERE " + " AND ".join(clauses)
        sql += f" ORDER BY {sort} {'DESC' if descending else 'ASC'}, motor_id"
        out = []
        for values in self._db.execute(sql, args):
            row = dict(zip(_COLUMNS, values))
            row["delays_s"] = json.loads(row["delays_s"])
            row["delay_adjustable"] = bool(row["delay_adjustable"])
            row["findings"] = json.loads(row["findings"])
            if f.delay_s is not None and not _offers_delay(row, f.delay_s):
                continue
            out.append(row)
        return out

    def query(self, where: CatalogFilter | None = None, **kwargs: Any) -> Any:
        """The rows of :meth:`rows` as a pandas DataFrame (pandas is imported only here)."""
        import pandas as pd

        return pd.DataFrame(self.rows(where, **kwargs), columns=list(_COLUMNS)).set_index("motor_id")

    def samples(self, ids: Sequence[str]) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Time [s] and thrust [N] arrays of the given motors, straight from the index (no XML parsing)."""
        out: dict[str, tuple[np.ndarray, np.ndarray]] = {}
        wanted = list(ids)
        for start in range(0, len(wanted), 900):  # SQLite's limit on bound parameters
            chunk = wanted[start:start + 900]
            sql = f"SELECT motor_id, time_blob, thrust_blob FROM motors WHERE motor_id IN ({', '.join('?' * len(chunk))})"
            for motor_id, t, f in self._db.execute(sql, chunk):
                out[motor_id] = (np.frombuffer(t, dtype="<f8"), np.frombuffer(f, dtype="<f8"))
        return out

    def motor_pack(self, rows: Sequence[dict[str, Any]], drill_step_s: float = 1.0) -> Any:
        """A :class:`~motorlib.flight.MotorPack` for ``rows`` (from :meth:`rows`), built from the index."""
        from ..flight.pack import MotorPack

        data = self.samples([r["motor_id"] for r in rows])
        return MotorPack.from_samples(
            [data[r["motor_id"]] for r in rows],
            total_mass_kg=[r["total_mass_kg"] for r in rows],
            propellant_mass_kg=[r["propellant_mass_kg"] for r in rows],
            delays_s=[tuple(r["delays_s"]) for r in rows],
            delay_adjustable=[r["delay_adjustable"] for r in rows],
            drill_step_s=drill_step_s,
        )

    # ------------------------------------------------------------------ tags
    def _tags_path(self) -> Path:
        return self.root / "tags.json"

    def _read_tags(self) -> dict[str, set[str]]:
        path = self._tags_path()
        if not path.exists():
            return {}
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
            return {str(k): set(map(str, v)) for k, v in data.items()}
        except (ValueError, AttributeError, TypeError) as exc:
            raise CatalogError(f"{path}: not a valid tags file ({exc}); expected an object of tag -> list of ids") from exc

    def _write_tags(self, tags: dict[str, set[str]]) -> None:
        clean = {k: sorted(v) for k, v in sorted(tags.items()) if v}
        write_atomic(self._tags_path(), (json.dumps(clean, indent=2) + "\n").encode())
        self._sync_tags(clean)

    def _sync_tags(self, tags: dict[str, Sequence[str]] | None = None) -> None:
        tags = tags if tags is not None else {k: sorted(v) for k, v in self._read_tags().items()}
        self._db.execute("BEGIN IMMEDIATE")
        self._db.execute("DELETE FROM tags")
        self._db.executemany("INSERT OR IGNORE INTO tags VALUES (?, ?)",
                             [(i, t) for t, ids in tags.items() for i in ids])
        self._db.execute("COMMIT")

    def tag(self, refs: Sequence[str], name: str) -> list[str]:
        """Attach tag ``name`` (e.g. ``in-stock``) to motors; returns their ids."""
        if not re.fullmatch(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,40}", name):
            raise CatalogError(f"tag {name!r}: use letters, digits, '-', '_' or '.', at most 41 characters")
        ids = [self.resolve(r) for r in refs]
        with self._lock():
            tags = self._read_tags()
            tags.setdefault(name, set()).update(ids)
            self._write_tags(tags)
        return ids

    def untag(self, refs: Sequence[str], name: str) -> list[str]:
        ids = [self.resolve(r) for r in refs]
        with self._lock():
            tags = self._read_tags()
            tags[name] = tags.get(name, set()) - set(ids)
            self._write_tags(tags)
        return ids

    def tags(self) -> dict[str, list[str]]:
        """Tag name -> motor ids (as stored in tags.json)."""
        return {k: sorted(v) for k, v in self._read_tags().items()}

    def refresh_tags(self) -> None:
        """Load tags.json into the index when it changed since the index last saw it (checked on open)."""
        if self.read_only:
            return
        path = self._tags_path()
        stamp = f"{path.stat().st_size}:{path.stat().st_mtime_ns}" if path.exists() else "none"
        seen = self._db.execute("SELECT value FROM meta WHERE key = 'tags'").fetchone()
        if seen is None or seen[0] != stamp:
            self._sync_tags()
            self._db.execute("INSERT OR REPLACE INTO meta VALUES ('tags', ?)", (stamp,))


def _offers_delay(row: dict[str, Any], delay_s: float) -> bool:
    delays = row["delays_s"]
    if any(abs(d - delay_s) < 1e-9 for d in delays):
        return True
    return bool(row["delay_adjustable"]) and bool(delays) and delay_s <= max(delays)
