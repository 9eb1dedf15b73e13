"""The catalog's SQLite index: a cache of every curve file's metadata, metrics, findings and samples.

The index lives in ``<root>/.motorlib/index.sqlite`` (in memory for a
read-only catalog) and can always be rebuilt from the files. The file readers
(lxml) and hashlib are imported only where a file is read: opening a current
index and reading rows and samples from it imports neither. Opening checks
the schema version and that the tables can be read; an unusable index is
moved aside to ``index.corrupt`` and rebuilt (a folder or anything but a file in its place is the user's: it is
refused with a :class:`~motorlib.errors.CatalogError` naming it, never moved), and an index of the previous
version is brought up to this one in place (the tables it lacks are added). :meth:`CatalogIndex.refresh`
compares every file's size and modification time with the ``files`` table and
parses only what changed; a content hash confirms a change before any parsing.

Tables::

    meta    key -> value        schema version; the size:mtime stamp of tags.json last loaded; the id changes
                                of files edited in place whose tags are still to follow (``id_changes``, JSON);
                                the motors that tagged ids named when they left the index (``former_motors``,
                                JSON id -> "designation by maker"), so that an orphaned tag can say what it was
    files   path, size, mtime_ns, ctime_ns, sha256, motor_id, error   one row per curve file seen
    motors  COLUMNS, time_blob, thrust_blob                 one row per motor (samples as float64 blobs)
    tags    motor_id, tag                                   a copy of tags.json, for queries
    curves  motor_ids, counts, time_blob, thrust_blob       every motor's samples end to end, in one row (a cache)
    row_cache  format, data                                 every motor's row, ready to use, in one row (a cache)

The ``curves`` row lets a ranking read the samples of thousands of motors as one blob
(:func:`.query.motor_pack`), the ``row_cache`` row their rows (:func:`.query.select_rows`, for
every motor in the default order, without findings). Triggers on ``motors`` delete both in the
same transaction as any insert, update or delete of a motor, so they never outlive the rows they
were built from, whatever process (or version of this module) writes them; the next ranking builds
them again.

Over 500 lines: opening, refreshing and the notes the refresh keeps for the tags (id changes, former
motors) all work on the same tables in the same transactions.
"""

from __future__ import annotations

import contextlib
import json
import os
import sqlite3
from operator import itemgetter
from stat import S_ISDIR, S_ISFIFO, S_ISREG
from pathlib import Path
from typing import Callable, ContextManager, Iterator, Sequence

from ..errors import CatalogError, CurveError, CurveSyntaxError, MotorlibError
from ..files.fsio import read_bounded
from ..motor.checks import CheckSettings, Finding
from ..motor.listing import ROW_COLUMNS, CatalogRow
from ..motor.record import MotorRecord

__all__ = ["COLUMNS", "INDEX_DIR", "SCHEMA_VERSION", "CatalogIndex", "create_schema", "scan_files"]

SCHEMA_VERSION = "6"  # 2: ejection column, classes at 0.01 N·s, format 1.1 kinds; 3: indexes on the duplicate-name
# lookup and on path; 4: files.ctime_ns (a file replaced with its old size and modification time changes it);
# 5: the curves cache and its triggers; 6: the row cache and its triggers (each added in place to an index of an
# earlier version listed here: create_schema adds what is missing)
_UPGRADABLE_FROM = ("4", "5")
INDEX_DIR = ".motorlib"
COLUMNS = ROW_COLUMNS  # the motors table has one column per CatalogRow field, in order


def create_schema(db: sqlite3.Connection) -> None:
    """Create the tables (if missing) and stamp the schema version."""
    db.execute("CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT)")
    db.execute("CREATE TABLE IF NOT EXISTS files (path TEXT PRIMARY KEY, size INTEGER, mtime_ns INTEGER, "
               "ctime_ns INTEGER, sha256 TEXT, motor_id TEXT, error TEXT)")
    cols = ", ".join(f"{c} {'TEXT PRIMARY KEY' if c == 'motor_id' else ''}" for c in COLUMNS)
    db.execute(f"CREATE TABLE IF NOT EXISTS motors ({cols}, time_blob BLOB, thrust_blob BLOB)")
    db.execute("CREATE INDEX IF NOT EXISTS motors_class ON motors (class_index)")
    # the store's near-duplicate lookup compares names case-insensitively; without this index it scans every row
    db.execute("CREATE INDEX IF NOT EXISTS motors_lower_name ON motors (lower(maker), lower(designation))")
    db.execute("CREATE INDEX IF NOT EXISTS motors_path ON motors (path)")  # refresh deletes and replaces by path
    db.execute("CREATE TABLE IF NOT EXISTS tags (motor_id TEXT, tag TEXT, PRIMARY KEY (motor_id, tag))")
    db.execute("CREATE TABLE IF NOT EXISTS curves (motor_ids TEXT, counts BLOB, time_blob BLOB, thrust_blob BLOB)")
    db.execute("CREATE TABLE IF NOT EXISTS row_cache (format TEXT, data BLOB)")
    for event in ("INSERT", "UPDATE", "DELETE"):  # any change to a motor drops the caches, in its own transaction
        db.execute(f"CREATE TRIGGER IF NOT EXISTS motors_{event.lower()}_drops_curves AFTER {event} ON motors "
                   "BEGIN DELETE FROM curves; END")
        db.execute(f"CREATE TRIGGER IF NOT EXISTS motors_{event.lower()}_drops_rows AFTER {event} ON motors "
                   "BEGIN DELETE FROM row_cache; END")
    db.execute("INSERT OR REPLACE INTO meta VALUES ('schema', ?)", (SCHEMA_VERSION,))


def scan_files(root: Path, problems: list[tuple[str, str]] | None = None) -> dict[str, tuple[int, int, int]]:
    """Every curve file under ``root`` (hidden files and folders skipped): relative path -> its stamp.

    A stamp is (size, mtime_ns, ctime_ns): the status-change time moves whenever a file is written or
    replaced, even when its size and modification time are put back (``touch -r``, some checkouts).

    Symbolic links to folders are not followed; links to files are (as ``os.walk`` does). Entries named
    ``*.xml`` that are not regular files (a dangling link, a pipe, a device) are appended to ``problems`` as
    (full path, reason) and left out, so that no reader ever opens them.
    """
    found: dict[str, tuple[int, int, int]] = {}
    pending = [(str(root), "")]  # (folder, its path relative to root with a trailing "/")
    while pending:
        folder, prefix = pending.pop()
        try:
            entries = list(os.scandir(folder))
        except OSError as exc:
            if problems is not None:
                problems.append((folder, f"folder cannot be read: {exc.strerror or exc}"))
            continue
        for entry in entries:
            name = entry.name
            if name.startswith("."):
                continue
            try:
                if entry.is_dir():
                    if not entry.is_symlink():
                        pending.append((entry.path, f"{prefix}{name}/"))
                    continue
                if not name.endswith(".xml"):
                    continue
                st = entry.stat()
            except OSError as exc:
                if problems is not None:
                    problems.append((entry.path, f"cannot be read: {exc.strerror or exc}"
                                     + (" (a link to a missing file)" if entry.is_symlink() else "")))
                continue
            if not S_ISREG(st.st_mode):
                if problems is not None:
                    problems.append((entry.path, "not a regular file (a pipe, device or socket); skipped"))
                continue
            found[prefix + name] = (st.st_size, st.st_mtime_ns, st.st_ctime_ns)  # file_stamp(st), inlined
    return found


def file_stamp(st: os.stat_result) -> tuple[int, int, int]:
    """(size, mtime_ns, ctime_ns) of a file status: what :meth:`CatalogIndex.refresh` compares."""
    return (st.st_size, st.st_mtime_ns, st.st_ctime_ns)


def motor_row(motor_id: str, path: str, record: MotorRecord, settings: CheckSettings,
              findings: Sequence[Finding] | None = None) -> list[object]:
    """The values of one ``motors`` row: :data:`COLUMNS`, then the time and thrust blobs (little-endian float64).

    ``findings`` are ``check_record(record, settings)`` when the caller has them already.
    """
    row = CatalogRow.from_record(record, motor_id, path=path, settings=settings, findings=findings).as_dict()
    row["delays_s"] = json.dumps(row["delays_s"])
    row["delay_adjustable"] = int(record.delay_adjustable)
    row["findings"] = json.dumps(row["findings"])
    return [row[c] for c in COLUMNS] + [record.time_s.astype("<f8").tobytes(), record.thrust_n.astype("<f8").tobytes()]


class _PreviousSchema(sqlite3.DatabaseError):
    """An undamaged index of an earlier version (one of ``_UPGRADABLE_FROM``): upgraded in place, under the writer
    lock."""


# (path, old id, new id, other): a file whose motor id changed; other is None for the same motor (its tags follow)
IdChange = tuple[str, str, str, "str | None"]


def _same_motor(a: Sequence[object], b: Sequence[object]) -> bool:
    """Whether two (designation, maker) pairs name one motor: equal without regard to case or spacing."""
    def norm(value: object) -> str:
        return " ".join(str(value or "").split()).casefold()

    return all(norm(x) == norm(y) for x, y in zip(a, b))


def _motor_label(designation: object, maker: object) -> str:
    """A motor as people name it: ``E25-7 by Bramblewick Propulsion`` (the designation alone without a maker)."""
    return f"{designation} by {maker}" if maker else str(designation)


class CatalogIndex:
    """The SQLite index of the catalog folder ``root``.

    Parameters
    ----------
    root : Path
        The catalog folder.
    read_only : bool
        Keep the index in memory and never write inside ``root``.
    settings : CheckSettings
        The rules used for the findings stored per motor.
    lock : callable
        Returns the catalog's writer lock (a context manager); held while a corrupt index is moved aside.
    notices : list of str
        Opening appends what it did (built, rebuilt after corruption, kept in memory).

    Attributes
    ----------
    db : sqlite3.Connection
        In autocommit mode; writers open their own ``BEGIN IMMEDIATE`` transactions.
    """

    def __init__(self, root: Path, *, read_only: bool, settings: CheckSettings,
                 lock: Callable[[], ContextManager[None]], notices: list[str]) -> None:
        self.root = root
        self.settings = settings
        self._lock = lock
        self.db = self._connect(read_only, notices)

    @property
    def path(self) -> Path:
        return self.root / INDEX_DIR / "index.sqlite"

    def close(self) -> None:
        self.db.close()

    # ------------------------------------------------------------------ opening
    def _connect(self, read_only: bool, notices: list[str]) -> sqlite3.Connection:
        if read_only:
            db = sqlite3.connect(":memory:", isolation_level=None)
            create_schema(db)
            notices.append(f"{self.root}: read-only catalog, index kept in memory")
            return db
        self._check_places()
        (self.root / INDEX_DIR).mkdir(exist_ok=True)
        with contextlib.suppress(sqlite3.DatabaseError):
            return self._open_checked(create=False)  # only a process holding the lock creates the file
        # Missing, half-built by another process, or damaged: decide under the writer lock, so that a process
        # never takes an index another one is building for a corrupt one (and moves it aside under it).
        with self._lock():
            existed = self.path.exists()
            try:
                return self._open_checked(create=False)
            except _PreviousSchema:
                db = self._open_file()  # sound, of an earlier version: add what it lacks, keep every row
                db.execute("BEGIN IMMEDIATE")
                create_schema(db)
                db.execute("COMMIT")
                return db
            except sqlite3.DatabaseError as exc:
                if existed and self.path.exists():
                    self._move_aside()
                    notices.append(f"{self.path}: index unusable ({exc}); moved aside and rebuilt from the files")
                else:
                    notices.append(f"{self.root}: building the catalog index")
                db = self._open_file()
                db.execute("BEGIN IMMEDIATE")
                create_schema(db)
                db.execute("COMMIT")
                return db

    def _check_places(self) -> None:
        """Refuse a ``.motorlib`` that is not a folder, or an ``index.sqlite`` that is not a file.

        A link to nothing in either place, or one this user may not read and write, is refused the same way.

        Something else in their place is the user's (a damaged index is a file, and is moved aside and rebuilt):
        it is named and left as it is, never moved or deleted.

        Raises
        ------
        CatalogError
            Naming the path, what is there, what motorlib expects, and what to do.
        """
        places = ((self.root / INDEX_DIR, S_ISDIR, "a folder", "the catalog's index folder (its index, lock and "
                   "staging files)"),
                  (self.path, S_ISREG, "a file", "the catalog's index (a cache motorlib builds from the curve files)"))
        for path, wanted, kind, role in places:
            try:
                mode = os.stat(path).st_mode  # through a link: a link to the right kind of thing is fine
            except FileNotFoundError:
                if os.path.islink(path):  # a link to nothing: SQLite (or mkdir) would fail with no word of it
                    raise CatalogError(f"{path}: is a link to {os.readlink(path)}, which does not exist, where "
                                       f"motorlib expects {kind}: {role}; remove the link or make its target, "
                                       f"then run the command again") from None
                continue  # made when needed
            if not wanted(mode):
                found = ("a folder" if S_ISDIR(mode) else "a file" if S_ISREG(mode) else
                         "a pipe" if S_ISFIFO(mode) else "a device or socket")
                raise CatalogError(f"{path}: is {found}, where motorlib expects {kind}: {role}; remove or rename "
                                   f"it (motorlib never deletes it), then run the command again")
            if not os.access(path, os.R_OK | os.W_OK | (os.X_OK if kind == "a folder" else 0)):
                # SQLite would say only "unable to open database file" or "attempt to write a readonly database"
                raise CatalogError(f"{path}: motorlib may not read and write it ({kind}: {role}); give this user "
                                   f"permission to read and write it, then run the command again")

    def _open_checked(self, *, create: bool) -> sqlite3.Connection:
        """The index, opened and checked: schema version, and every page readable (``PRAGMA quick_check``).

        Raises
        ------
        sqlite3.DatabaseError
            No file (unless ``create``), missing tables, another schema version, or damage anywhere in the file;
            :class:`_PreviousSchema` for an undamaged index of the version before this one.
        """
        db = self._open_file(create=create)
        try:
            version = db.execute("SELECT value FROM meta WHERE key = 'schema'").fetchone()
            if version is None or version[0] not in (SCHEMA_VERSION, *_UPGRADABLE_FROM):
                raise sqlite3.DatabaseError("schema version mismatch")
            # a damaged page the queries of one command never touch would break the next command: check them all
            verdict = db.execute("PRAGMA quick_check(1)").fetchone()[0]
            if verdict != "ok":
                raise sqlite3.DatabaseError(f"damaged: {verdict}")
            if version[0] != SCHEMA_VERSION:
                raise _PreviousSchema("schema of an earlier version")
            return db
        except BaseException:
            db.close()
            raise

    def _open_file(self, *, create: bool = True) -> sqlite3.Connection:
        target = self.path if create else f"{self.path.resolve().as_uri()}?mode=rw"
        db = sqlite3.connect(target, timeout=60.0, isolation_level=None, uri=not create)
        db.execute("PRAGMA busy_timeout = 60000")
        db.execute("PRAGMA journal_mode = WAL")
        db.execute("PRAGMA synchronous = NORMAL")
        return db

    def _move_aside(self) -> None:
        """Rename an unusable index to ``index.corrupt`` and drop its WAL files (the caller holds the writer lock)."""
        aside = self.path.with_suffix(".corrupt")
        if self.path.exists():
            os.replace(self.path, aside)
        for extra in ("-wal", "-shm"):
            with contextlib.suppress(FileNotFoundError):
                os.unlink(str(self.path) + extra)

    @contextlib.contextmanager
    def transaction(self) -> Iterator[None]:
        """One write transaction (``BEGIN IMMEDIATE``), committed on success and rolled back on any exception."""
        self.db.execute("BEGIN IMMEDIATE")
        try:
            yield
            self.db.execute("COMMIT")
        except BaseException:
            self.db.execute("ROLLBACK")
            raise

    # ------------------------------------------------------------------ refresh from the files
    def refresh(self, problems: list[tuple[str, str]]) -> tuple[int, int, bool]:
        """Bring the index in step with the files.

        Files that failed before, and files that fail now, are appended to
        ``problems`` as (full path, reason).

        Returns
        -------
        n_read, n_removed : int
            Files (re)read and files gone since the last refresh.
        had_files : bool
            Whether the index knew any file before (False for a new index).
        """
        on_disk = scan_files(self.root, problems)
        # the stamps alone (a current index compares them and reads nothing else); hashes only for changed files
        rows = self.db.execute("SELECT path, size, mtime_ns, ctime_ns FROM files").fetchall()
        known = dict(zip(map(itemgetter(0), rows), map(itemgetter(1, 2, 3), rows)))  # path -> file_stamp
        if known == on_disk:
            removed: list[str] = []
            changed: list[str] = []
        else:
            removed = [p for p in known if p not in on_disk]
            changed = [p for p, stamp in on_disk.items() if known.get(p) != stamp]
        failed = self.db.execute("SELECT path, error FROM files WHERE error IS NOT NULL").fetchall()
        if failed:  # files that failed before stay reported, without re-reading
            again = set(changed)
            problems += [(str(self.root / path), error) for path, error in failed
                         if path in on_disk and path not in again]
        if not removed and not changed:
            return 0, 0, bool(known)
        with self.transaction():
            for path in removed:
                self._remember_former("WHERE path = ?", (path,))
                self.db.execute("DELETE FROM motors WHERE path = ?", (path,))
                self.db.execute("DELETE FROM files WHERE path = ?", (path,))
            for path in changed:
                old = self.db.execute("SELECT sha256, error, motor_id FROM files WHERE path = ?", (path,)).fetchone()
                self._index_file(path, on_disk[path], old, problems)
        return len(changed), len(removed), bool(known)

    def _index_file(self, path: str, stat: tuple[int, int, int], old: tuple[str, str | None, str | None] | None,
                    problems: list[tuple[str, str]]) -> None:
        """(Re)index one file whose stamp changed; ``old`` is its former (sha256, error, motor_id) row, if any.

        A file that held a motor and now holds another (edited in place: its id is the hash of its content) has
        its change of id noted (:meth:`pending_id_changes`) in the same transaction, for its tags to follow; so
        does one that became an exact copy of another motor. The note says whether the file still holds the same
        motor (maker and designation, without regard to case): only then do its tags follow."""
        import hashlib  # here and not at the top: opening a current index reads no file

        from ..files.motor_xml import DEFAULT_MAX_BYTES, record_from_bytes

        full = self.root / path
        try:
            data = read_bounded(full, DEFAULT_MAX_BYTES, error=CurveSyntaxError)
        except MotorlibError as exc:
            problems.append((str(full), exc.problem if isinstance(exc, CurveError) else str(exc)))
            return
        digest = hashlib.sha256(data).hexdigest()
        if old is not None and old[0] == digest and not old[1]:  # touched, not changed
            self.restamp(path, stat)
            return
        motor_id = digest[:16]
        former = self.db.execute("SELECT designation, maker FROM motors WHERE path = ?", (path,)).fetchone()
        self._remember_former("WHERE path = ?", (path,))
        self.db.execute("DELETE FROM motors WHERE path = ?", (path,))
        try:
            record = record_from_bytes(data, str(full))
            row = motor_row(motor_id, path, record, self.settings)
        except Exception as exc:  # noqa: BLE001 - one bad file, even one that trips a bug, must not break the catalog
            if not isinstance(exc, MotorlibError):
                exc = MotorlibError(f"{full}: internal error while reading this file ({type(exc).__name__}: {exc}); "
                                    "please report it")
            self.db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, NULL, ?)", (path, *stat, digest, str(exc)))
            problems.append((str(full), str(exc)))
            return
        if old is not None and old[2] and old[2] != motor_id:
            now = (record.designation, record.maker)
            self._note_id_change(path, old[2], motor_id,
                                 None if former is not None and _same_motor(former, now) else
                                 f"{_motor_label(*former) if former else 'a motor'} to {_motor_label(*now)}")
        twin = self.db.execute("SELECT path FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
        if twin is not None:
            message = f"an exact copy of {twin[0]}; skipped"
            self.db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, NULL, ?)", (path, *stat, digest, message))
            problems.append((str(full), message))
            return
        self.db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, ?, NULL)", (path, *stat, digest, motor_id))
        self._insert_row(row)

    def _note_id_change(self, path: str, old_id: str, new_id: str, other: str | None) -> None:
        """Add (path, old id, new id, other) to the changes whose tags are still to follow (inside the caller's
        transaction, so that the change of id and the note of it are committed together)."""
        self._set_id_changes([*self.pending_id_changes(), (path, old_id, new_id, other)])

    def pending_id_changes(self) -> list[IdChange]:
        """(path, old id, new id, other) of every file edited in place whose tags have not yet been dealt with,
        oldest first. ``other`` is None when the file still holds the same motor (its tags follow), else what it
        became ("E25-7 by Maker to F29-8 by Maker": its tags stay with the old id). A note written before this
        distinction (three items) counts as the same motor, as it was then taken to be."""
        row = self.db.execute("SELECT value FROM meta WHERE key = 'id_changes'").fetchone()
        if row is None:
            return []
        return [(str(p), str(a), str(b), None if not rest or rest[0] is None else str(rest[0]))
                for p, a, b, *rest in json.loads(row[0])]

    def forget_id_changes(self, done: Sequence[IdChange]) -> None:
        """Drop the changes ``done`` (their tags have been dealt with), keeping any noted since they were read."""
        with self.transaction():
            left = [change for change in self.pending_id_changes() if change not in set(done)]
            self._set_id_changes(left)

    def _remember_former(self, where: str, params: tuple[object, ...]) -> None:
        """Keep "designation by maker" of the motors selected by ``where`` that a tag names (in the caller's
        transaction, before they leave the index), so that an orphaned tag can say what it named; entries no tag
        names any longer are dropped."""
        tagged = {str(i) for (i,) in self.db.execute("SELECT DISTINCT motor_id FROM tags")}
        known = self.former_motors()
        leaving = {str(i): _motor_label(d, m) for i, d, m in
                   self.db.execute(f"SELECT motor_id, designation, maker FROM motors {where}", params)
                   if str(i) in tagged}
        if not leaving:
            return
        kept = {i: label for i, label in {**known, **leaving}.items() if i in tagged}
        self.db.execute("INSERT OR REPLACE INTO meta VALUES ('former_motors', ?)", (json.dumps(kept, sort_keys=True),))

    def former_motors(self) -> dict[str, str]:
        """Motor id -> "designation by maker" of the tagged motors that have left the index (as far as it knows:
        a rebuilt index file knows none)."""
        row = self.db.execute("SELECT value FROM meta WHERE key = 'former_motors'").fetchone()
        return {} if row is None else {str(k): str(v) for k, v in json.loads(row[0]).items()}

    def _set_id_changes(self, changes: Sequence[IdChange]) -> None:
        if changes:
            self.db.execute("INSERT OR REPLACE INTO meta VALUES ('id_changes', ?)", (json.dumps([*changes]),))
        else:
            self.db.execute("DELETE FROM meta WHERE key = 'id_changes'")

    def restamp(self, path: str, stat: tuple[int, int, int]) -> None:
        """Record a file's new stamp (its content is unchanged: touched, or linked to its name by the store)."""
        self.restamp_all([(path, stat)])

    def restamp_all(self, stamps: Sequence[tuple[str, tuple[int, int, int]]]) -> None:
        """:meth:`restamp` for many (path, stamp) pairs, in one statement."""
        self.db.executemany("UPDATE files SET size = ?, mtime_ns = ?, ctime_ns = ? WHERE path = ?",
                            [(*stat, path) for path, stat in stamps])

    def stale_paths(self) -> list[str]:
        """Indexed files whose content no longer matches the index (hashed: changed without a new size or time)."""
        import hashlib

        from ..files.motor_xml import DEFAULT_MAX_BYTES

        stale = []
        for path, sha256 in self.db.execute("SELECT path, sha256 FROM files WHERE error IS NULL").fetchall():
            try:
                data = read_bounded(self.root / path, DEFAULT_MAX_BYTES, error=CurveSyntaxError)
            except MotorlibError:
                continue  # gone or unreadable: the next refresh reports it
            if hashlib.sha256(data).hexdigest() != sha256:
                stale.append(path)
        return stale

    def mark_changed(self, paths: Sequence[str]) -> None:
        """Make the next :meth:`refresh` re-read ``paths`` (their stamps no longer match any file)."""
        with self.transaction():
            self.db.executemany("UPDATE files SET size = -1 WHERE path = ?", [(p,) for p in paths])

    def _insert_motor(self, motor_id: str, path: str, record: MotorRecord,
                      findings: Sequence[Finding] | None = None) -> None:
        self._insert_row(motor_row(motor_id, path, record, self.settings, findings))

    def _insert_row(self, values: list[object]) -> None:
        marks = ", ".join("?" * len(values))
        self.db.execute(f"INSERT OR REPLACE INTO motors VALUES ({marks})", values)

    def clear(self) -> None:
        """Forget every file and motor (tags stay); the next :meth:`refresh` reads everything again."""
        self.db.execute("BEGIN IMMEDIATE")
        self._remember_former("", ())
        self.db.execute("DELETE FROM motors")
        self.db.execute("DELETE FROM files")
        self.db.execute("COMMIT")

    # ------------------------------------------------------------------ rows written by the store
    def insert_file(self, path: str, stat: tuple[int, int, int], sha256: str, record: MotorRecord,
                    findings: Sequence[Finding]) -> None:
        """Index a file the store is writing, inside the store's :meth:`transaction`.

        ``stat`` is its :func:`file_stamp`, ``sha256`` the hex digest of its bytes
        and ``findings`` its checks: the store has them already, so nothing is
        read, hashed or checked again.
        """
        motor_id = sha256[:16]
        self.db.execute("INSERT OR REPLACE INTO files VALUES (?, ?, ?, ?, ?, ?, NULL)", (path, *stat, sha256, motor_id))
        self._insert_motor(motor_id, path, record, findings)

    def delete_motor(self, motor_id: str, path: str) -> None:
        """Drop a motor and its file row (the store has deleted the file)."""
        self.db.execute("BEGIN IMMEDIATE")
        self.db.execute("DELETE FROM motors WHERE motor_id = ?", (motor_id,))
        self.db.execute("DELETE FROM files WHERE path = ?", (path,))
        self.db.execute("COMMIT")

    def n_motors(self) -> int:
        return int(self.db.execute("SELECT count(*) FROM motors").fetchone()[0])
