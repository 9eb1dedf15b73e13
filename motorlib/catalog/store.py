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
name and skipped. Every write goes to a temporary file that is flushed to disk
before it gets its name; a writer killed at any moment (or a machine crashing)
leaves each curve either fully present or absent, and the next open brings the
index back in step.

Adding is done in batches of up to :data:`BATCH_SIZE` curves, each one durable
unit: the new files are staged in ``.motorlib/staging``
(:class:`~motorlib.files.fsio.NewFileBatch`) while their rows go into one open
index transaction; at the end of the batch the disk is flushed, the files are
linked to their names, the disk is flushed again, and only then does the index
transaction commit. So the guarantees of a per-file fsync still hold at two
flushes per batch: a curve's name never appears before its bytes are on disk; the
committed index never lists a file a crash could lose; a writer killed mid-batch
leaves its batch's curves absent (their staged copies are removed by the next
writer), the files of earlier batches complete and indexed, and at worst files
linked but not yet indexed, which the next open indexes like any file added
behind the catalog's back.

A motor's id is the first 16 hex digits of the SHA-256 of its file (files are
always written in canonical form, so equal records have equal ids). A file edited
in place therefore gets a new id: the refresh that finds it notes the change in the
index (in the transaction that indexes the new content), and its tags then follow
to the new id in tags.json, under the writer lock, with a notice naming both ids,
while it holds the same motor (maker and designation); a file that became another
motor leaves its tags with the old id, orphaned, and the notice says so (see
:meth:`Catalog.refresh`). Its handle
is its path without ``.xml`` (``bramblewick-propulsion/g59-10``), with a ``-2``,
``-3`` suffix where one maker and designation have several curves.

This module owns the files, the writer lock, adding, removing and looking
motors up; :class:`Catalog` delegates the index to :mod:`.index`, queries to
:mod:`.query` and tags to :mod:`.tags`. It is over 500 lines because the lock,
the batches and the refresh that carries tags over are one protocol on one folder.
"""

from __future__ import annotations

import contextlib
import os
import re
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Callable, Iterator, Sequence

import numpy as np

from ..errors import CatalogError, CurveDataError, CurveError, MotorlibError, MotorNotFoundError
from ..files.fsio import NewFileBatch, slug
from ..motor.checks import CheckSettings, Finding, check_record, findings_from_problems
from ..flight.pack import MotorPack
from ..motor.listing import CatalogRow
from ..motor.record import MotorRecord
from . import query as _query
from .index import INDEX_DIR, CatalogIndex, file_stamp
from .query import CatalogFilter
from .tags import TagFile, check_tag_name
from ..flight.delays import DEFAULT_DRILL_STEP_S

__all__ = ["AddResult", "Catalog", "motor_id_for"]

READ_ONLY_MARKER = "READ_ONLY"  # a file of this name makes a catalog folder read-only (the bundled samples)
# Curves per durable batch when adding files: two disk flushes and one index commit each. Large enough that
# the flushes cost little per curve (about 0.3 s for 5,000 curves on the reference machine), small enough that
# a writer killed mid-add loses little work (about a second of it).
BATCH_SIZE = 500
# Handles with the same maker and designation as a new curve; the index has an index on exactly these expressions
_SAME_NAME_SQL = "SELECT handle FROM motors WHERE lower(maker) = lower(?) AND lower(designation) = lower(?)"


def motor_id_for(data: bytes) -> str:
    """The id of a catalog file: the first 16 hex digits of its SHA-256."""
    import hashlib  # here and below, not at the top: opening a catalog for a ranking hashes nothing

    return hashlib.sha256(data).hexdigest()[:16]


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


def _remove_temporary_files(root: str) -> None:
    """Remove ``.name.*.tmp`` files (left by a killed :func:`~motorlib.files.fsio.write_atomic`) from ``root`` and
    its maker folders (not hidden, not links).

    Names only (``os.scandir``, ``os.listdir``): a file is looked at only when its name is a temporary one, so
    that opening a catalog of thousands of curves costs a listing, not a status call per file. A folder that
    cannot be listed is left alone (the file scan reports it).
    """
    try:
        with os.scandir(root) as entries:
            folders = [root, *(e.path for e in entries
                               if not e.name.startswith(".") and e.is_dir(follow_symlinks=False))]
    except OSError:
        return
    for folder in folders:
        try:
            names = os.listdir(folder)
        except OSError:
            continue
        for name in names:
            if name.startswith(".") and name.endswith(".tmp"):
                path = os.path.join(folder, name)
                if os.path.isfile(path):
                    with contextlib.suppress(FileNotFoundError):
                        os.unlink(path)


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
    on_lock_wait : callable or None
        Called (no arguments) when a write (opening's index refresh included) finds another process writing the
        catalog, before it waits for it: the command line says "waiting for ...". Also a keyword of the
        constructor.
    """

    def __init__(self, root: str | os.PathLike[str], *, read_only: bool = False, create: bool = True,
                 settings: CheckSettings | None = None, on_lock_wait: Callable[[], None] | None = None) -> None:
        self.root = Path(root)
        self.read_only = read_only or (self.root / READ_ONLY_MARKER).is_file()
        self.settings = settings or CheckSettings()
        self.notices: list[str] = []
        self.problems: list[tuple[str, str]] = []
        self.on_lock_wait = on_lock_wait  # called when a write must wait for another writer (opening may write)
        self._safe_folders: set[str] = set()  # maker folders checked (and created) in the current batch
        self._lock_depth = 0  # how many times this object holds the writer lock (it is taken once per process)
        if not self.root.exists():
            if read_only or not create:
                raise CatalogError(f"{self.root}: no such catalog folder")
            self.root.mkdir(parents=True, exist_ok=True)  # another writer may make it between the check and here
        if not self.root.is_dir():
            raise CatalogError(f"{self.root}: not a folder")
        self._index = CatalogIndex(self.root, read_only=self.read_only, settings=self.settings, lock=self._lock,
                                   notices=self.notices)
        self._db = self._index.db  # lookups below read it; the index module owns its schema
        self._tags = TagFile(self.root, self._db)
        self._remove_leftovers()
        self.refresh(report=True)
        self.refresh_tags()

    # ------------------------------------------------------------------ plumbing
    @property
    def index_path(self) -> Path:
        return self._index.path

    @contextlib.contextmanager
    def _lock(self) -> Iterator[None]:
        """An exclusive lock between writer processes (fcntl where available)."""
        if self.read_only:
            marker = self.root / READ_ONLY_MARKER
            raise CatalogError(f"{self.root}: the catalog is read-only" + (
                f" (its {READ_ONLY_MARKER} file makes it so, as in the bundled samples; delete {marker} to change "
                "this copy)" if marker.is_file() else " (opened read-only)"))
        if self._lock_depth:  # held already (a refresh inside a write): flock would wait for ourselves
            self._lock_depth += 1
            try:
                yield
            finally:
                self._lock_depth -= 1
            return
        path = self.root / INDEX_DIR / "lock"
        path.parent.mkdir(exist_ok=True)
        with open(path, "a+b") as handle:
            try:
                import fcntl
            except ImportError:  # pragma: no cover - not POSIX: rely on SQLite's own locking
                yield
                return
            try:
                fcntl.flock(handle.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
            except BlockingIOError:  # another process is writing: say so (once), then wait for it
                if self.on_lock_wait is not None:
                    self.on_lock_wait()
                fcntl.flock(handle.fileno(), fcntl.LOCK_EX)
            self._lock_depth += 1
            try:
                yield
            finally:
                self._lock_depth -= 1
                fcntl.flock(handle.fileno(), fcntl.LOCK_UN)

    def _remove_leftovers(self) -> None:
        """Remove temporary files a killed writer left (staged curves, ``.name.*.tmp``), if no writer is at work.

        Only when the writer lock is free at once: a live writer holds it while its temporary files exist.
        """
        if self.read_only:
            return
        try:
            import fcntl
        except ImportError:  # pragma: no cover - not POSIX: leave them; they are hidden and never read
            return
        path = self.root / INDEX_DIR / "lock"
        with open(path, "a+b") as handle:
            try:
                fcntl.flock(handle.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
            except OSError:
                return  # a writer is at work
            try:
                staging = self.root / INDEX_DIR / "staging"
                if staging.is_dir():
                    NewFileBatch(staging).clear_staging()
                _remove_temporary_files(str(self.root))
            finally:
                fcntl.flock(handle.fileno(), fcntl.LOCK_UN)

    def close(self) -> None:
        self._index.close()

    def __enter__(self) -> Catalog:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # ------------------------------------------------------------------ the index
    def refresh(self, *, report: bool = False) -> int:
        """Bring the index in step with the files; returns how many files were (re)read.

        Only files whose size or modification time differ from the index are read,
        and a content hash confirms the change before any parsing. ``problems`` is
        rebuilt; with ``report`` a notice says what changed.
        """
        self.problems = []
        n_read, n_removed, had_files = self._index.refresh(self.problems)
        if report and had_files and (n_read or n_removed):
            self.notices.append(f"{self.root}: index refreshed ({n_read} file(s) read, {n_removed} removed)")
        if not self.read_only and self._index.pending_id_changes():
            self._carry_tags()
        return n_read

    def _carry_tags(self) -> None:
        """Move the tags of files edited in place to their new ids, in tags.json, under the writer lock.

        The changes were noted by the refresh that indexed the new content, in the same transaction, so a process
        killed before this runs leaves them for the next one. A file that still holds the same motor (maker and
        designation: a hand edit of its thrust values, say) adds the new id to every tag that names the old one
        and drops the old id, unless another file still holds that motor. A file that now holds a different motor
        (edited into another, or replaced by a copy of another motor's file) takes no tags along: tags describe a
        motor ("in-stock"), and the new one was never given them. Its old id's tags stay as they are, orphaned
        (:meth:`orphan_tags`, reported by ``catalog verify``), and the notice says so. tags.json is written once,
        atomically, and only then are the changes forgotten; applying one twice changes nothing. A tags.json that
        cannot be read is never written over: the changes wait until it is mended, and each open says so.
        """
        with self._lock():
            changes = self._index.pending_id_changes()  # again under the lock: another writer may have done them
            if not changes:
                return
            try:
                tags = self._tags.read()
            except CatalogError:
                for path, old_id, new_id, other in changes:
                    if other is None:
                        self.notices.append(f"{self.root / path}: changed since it was indexed, so its motor id "
                                            f"changed from {old_id} to {new_id}; its tags will follow once "
                                            f"{self._tags.path} is mended")
                    else:  # nothing to wait for: its tags stay where they are
                        self.notices.append(self._left_behind(path, old_id, new_id, other, None))
                if any(other is not None for *_, other in changes):
                    self._index.forget_id_changes([c for c in changes if c[3] is not None])
                return
            moved_any = False
            for path, old_id, new_id, other in changes:
                names = sorted(name for name, ids in tags.items() if old_id in ids)
                if other is not None:
                    self.notices.append(self._left_behind(path, old_id, new_id, other, names))
                    continue
                moved_any = moved_any or bool(names)
                still_there = self._db.execute("SELECT 1 FROM motors WHERE motor_id = ?", (old_id,)).fetchone()
                for name in names:
                    tags[name].add(new_id)
                    if not still_there:
                        tags[name].discard(old_id)
                moved = f"its tags moved to the new id: {', '.join(names)}" if names else "it had no tags"
                self.notices.append(f"{self.root / path}: changed since it was indexed, so its motor id changed "
                                    f"from {old_id} to {new_id}; {moved}")
            if moved_any:
                self._tags.write(tags)  # atomically (write_atomic), and copied into the index
            self._index.forget_id_changes(changes)

    def _left_behind(self, path: str, old_id: str, new_id: str, other: str, names: list[str] | None) -> str:
        """The notice for a file that now holds another motor (``other``: "E25-7 by ... to F29-8 by ...")."""
        said = (f"its tags ({', '.join(names)}) stay with the old id, not carried over to a motor never given them: "
                "`motorlib catalog verify` lists them; tag the new motor if they apply to it" if names else
                "it had no tags" if names is not None else
                "its tags, if any, stay with the old id, not carried over to a motor never given them")
        return (f"{self.root / path}: now holds another motor ({other}), so its motor id changed from {old_id} to "
                f"{new_id}; {said}")

    def stale_files(self) -> list[str]:
        """Re-read every file whose content no longer matches the index; returns their full paths.

        Opening trusts a file's size and modification time; a file replaced with both kept (``touch -r``,
        coarse network shares, some checkouts) is caught here, by hashing every file.
        """
        paths = self._index.stale_paths()
        if paths:
            with self._lock():
                self._index.mark_changed(paths)
                self.refresh()
        return [str(self.root / p) for p in paths]

    def reindex(self) -> int:
        """Rebuild the whole index from the files (tags come back from tags.json)."""
        with self._lock():
            self._index.clear()
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
            with self._batch() as batch:
                return self._add_locked(record, source or record.designation, force, batch)

    @contextlib.contextmanager
    def _batch(self) -> Iterator[NewFileBatch]:
        """One durable batch of new curve files and their index rows (see the module docstring); lock held."""
        batch = NewFileBatch(self.root / INDEX_DIR / "staging")
        batch.clear_staging()  # left by a writer killed mid-batch; we hold the lock, so nobody else is staging
        self._safe_folders = set()
        self._batch_paths: set[str] = set()  # the catalog paths of the batch's new files
        try:
            with self._index.transaction():
                yield batch
                batch.commit()  # the files are on disk under their names before the index commits
                # linking a file to its name changed its status-change time
                root = str(self.root)
                self._index.restamp_all([(path, file_stamp(os.stat(os.path.join(root, path))))
                                         for path in self._batch_paths])
        finally:
            batch.discard()  # after an error: drop the staged files that never got their names

    def _add_locked(self, record: MotorRecord, source: str, force: bool, batch: NewFileBatch,
                    read_from: bytes | None = None) -> AddResult:
        """Add one record inside ``batch``; ``read_from``: the bytes of the file it was read from, if any."""
        import hashlib

        from ..files.motor_xml import readable_record_bytes  # here: opening a catalog imports no file reader

        findings = tuple(check_record(record, self.settings))
        errors = [f for f in findings if f.severity == "error"]
        if errors and not force:
            return AddResult(source, "refused", message="; ".join(f"{f.code}: {f.message}" for f in errors),
                             findings=findings)
        if errors:
            note = f"[added despite errors: {', '.join(sorted({f.code for f in errors}))}]"
            notes = f"{record.provenance.notes} {note}".strip()
            record = replace(record, provenance=replace(record.provenance, notes=notes))
        try:
            # never write a file the catalog could not read back (bytes as read were checked on reading)
            data = readable_record_bytes(record, source, read_from=read_from)
        except CurveError as exc:
            return AddResult(source, "refused", message=str(exc), findings=findings)
        sha256 = hashlib.sha256(data).hexdigest()
        motor_id = sha256[:16]  # motor_id_for(data), without hashing the bytes twice
        # the open transaction shows the rows of this batch too, so duplicates within a batch are caught
        twin = self._db.execute("SELECT handle FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
        if twin is not None:
            return AddResult(source, "duplicate", motor_id, twin[0], f"already in the catalog as {twin[0]}",
                             findings=findings)
        near = tuple(h for (h,) in self._db.execute(_SAME_NAME_SQL, (record.maker, record.designation)))
        path = self._free_path(record)
        st = batch.write(self.root / path, data)
        self._index.insert_file(path, file_stamp(st), sha256, record, findings)
        self._batch_paths.add(path)
        message = f"same maker and designation as {', '.join(near)}" if near else ""
        return AddResult(source, "added", motor_id, path[:-4], message, near, findings)

    def _free_path(self, record: MotorRecord) -> str:
        """A file name for ``record`` taken neither on disk nor by the batch; creates its maker folder."""
        folder = slug(record.maker or "unknown-maker")
        stem = slug(record.designation)
        if folder not in self._safe_folders:
            # slugs cannot contain separators; belt and braces against a maker folder linked elsewhere
            full = (self.root / folder).resolve()
            if self.root.resolve() not in full.parents:
                raise CatalogError(f"{folder}/{stem}.xml: would leave the catalog folder")
            full.mkdir(exist_ok=True)
            self._safe_folders.add(folder)
        candidate = f"{folder}/{stem}.xml"
        n = 1
        root = str(self.root)  # strings, not Paths: this runs once per curve added
        while candidate in self._batch_paths or os.path.exists(os.path.join(root, candidate)):
            n += 1
            candidate = f"{folder}/{stem}-{n}.xml"
        return candidate

    def add_files(self, paths: Sequence[str | os.PathLike[str]], *, metadata: Any = None, force: bool = False,
                  progress: Callable[[int], None] | None = None, time_unit: str | None = None,
                  thrust_unit: str | None = None) -> list[AddResult]:
        """Add curve files (XML, or CSV with ``metadata``); bad files are reported, never fatal.

        ``metadata`` is one :class:`~motorlib.files.motor_csv.CurveMetadata` for every CSV file, or a function
        ``metadata(path)`` giving each file its own (a metadata side file).

        Files are added in durable batches of :data:`BATCH_SIZE` (see the module
        docstring); ``progress(1)`` is called after each file is handled.
        """
        from ..files.curvefiles import load_curve_file_and_bytes

        paths = list(paths)
        results = []
        with self._lock():
            self.refresh()  # once: while we hold the lock nobody else writes
            for start in range(0, len(paths), BATCH_SIZE):
                with self._batch() as batch:
                    for path in paths[start:start + BATCH_SIZE]:
                        try:
                            meta = metadata(path) if callable(metadata) else metadata
                            record, data = load_curve_file_and_bytes(path, meta, time_unit=time_unit,
                                                                     thrust_unit=thrust_unit)
                        except CurveDataError as exc:
                            results.append(AddResult(str(path), "refused", message=str(exc),
                                                     findings=tuple(findings_from_problems(exc))))
                        except (MotorlibError, OSError) as exc:
                            results.append(AddResult(str(path), "unreadable", message=str(exc)))
                        else:
                            results.append(self._add_locked(record, str(path), force, batch, data))
                        if progress is not None:
                            progress(1)
        return results

    def remove(self, ref: str) -> str:
        """Delete a motor's file and its index rows and tags; returns its handle.

        The reference is resolved under the writer lock, after a refresh: a motor another process removed
        meanwhile is not found (MotorNotFoundError), never half-removed.
        """
        with self._lock():
            self.refresh()
            motor_id = self.resolve(ref)
            path, handle = self._db.execute("SELECT path, handle FROM motors WHERE motor_id = ?", (motor_id,)).fetchone()
            with contextlib.suppress(FileNotFoundError):
                os.unlink(self.root / path)
            self._index.delete_motor(motor_id, path)
            self._tags.forget(motor_id)
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
        from ..files.motor_xml import read_record

        return read_record(self.root / path)

    def __len__(self) -> int:
        return self._index.n_motors()

    # ------------------------------------------------------------------ queries (see .query)
    def rows(self, where: CatalogFilter | None = None, *, sort: str = "total_impulse_ns",
             descending: bool = False, findings: bool = True) -> list[CatalogRow]:
        """Metadata and metrics of the motors that pass ``where`` (no samples), sorted by ``sort``;
        ``findings=False``: without their check findings (None), quicker where they are not read."""
        return _query.select_rows(self._db, where, sort=sort, descending=descending, findings=findings)

    def query(self, where: CatalogFilter | None = None, **kwargs: Any) -> Any:
        """The rows of :meth:`rows` as a pandas DataFrame (pandas is imported only here)."""
        return _query.query(self._db, where, **kwargs)

    def samples(self, ids: Sequence[str]) -> dict[str, tuple[np.ndarray, np.ndarray]]:
        """Time [s] and thrust [N] arrays of the given motors, straight from the index (no XML parsing)."""
        return _query.load_samples(self._db, ids)

    def motor_pack(self, rows: Sequence[CatalogRow], drill_step_s: float = DEFAULT_DRILL_STEP_S) -> MotorPack:
        """A :class:`~motorlib.flight.MotorPack` for ``rows`` (from :meth:`rows`), built from the index."""
        return _query.motor_pack(self._db, rows, drill_step_s)

    # ------------------------------------------------------------------ tags (see .tags)
    def tag(self, refs: Sequence[str], name: str) -> list[str]:
        """Attach tag ``name`` (e.g. ``in-stock``) to motors; returns their ids."""
        check_tag_name(name)
        with self._lock():  # resolved under the lock: a motor removed meanwhile is not found, never tagged
            self.refresh()
            ids = [self.resolve(r) for r in refs]
            self._tags.attach(name, ids)
        return ids

    def untag(self, refs: Sequence[str], name: str) -> list[str]:
        """Remove tag ``name`` from motors; returns their ids."""
        with self._lock():
            self.refresh()
            ids = [self.resolve(r) for r in refs]
            self._tags.detach(name, ids)
        return ids

    def tags(self) -> dict[str, list[str]]:
        """Tag name -> motor ids (as stored in tags.json)."""
        return self._tags.as_lists()

    def former_motors(self, ids: Sequence[str]) -> dict[str, str]:
        """Motor id -> "designation by maker" for those of ``ids`` that the index remembers as tagged motors that
        left it (a file deleted or edited into another motor); ids it never saw, or saw before it was rebuilt from
        nothing, are left out."""
        known = self._index.former_motors()
        return {i: known[i] for i in ids if i in known}

    def orphan_tags(self) -> dict[str, list[str]]:
        """Tag name -> the ids it names that are no longer in the catalog (a curve file deleted by hand);
        only tags that name at least one such id."""
        known = {row.motor_id for row in self.rows()}
        orphans = {name: [i for i in ids if i not in known] for name, ids in self.tags().items()}
        return {name: ids for name, ids in orphans.items() if ids}

    def refresh_tags(self) -> None:
        """Load tags.json into the index when it changed since the index last saw it (checked on open)."""
        if self.read_only:
            return
        try:
            self._tags.refresh()
        except CatalogError as exc:  # reported and skipped, as an unusable curve file: never fatal to the catalog
            problem = str(exc).removeprefix(f"{self._tags.path}: ")
            self.problems.append((str(self._tags.path), f"{problem}; its tags are ignored until it is mended, and "
                                                        "tag changes refuse to write over it"))
