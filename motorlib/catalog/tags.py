"""Catalog tags: ``<root>/tags.json`` (tag name -> motor ids) is the truth; the index's ``tags`` table a copy.

Every write goes through :func:`~motorlib.files.fsio.write_atomic` and then
replaces the ``tags`` table, so queries by tag see the file's content. A file
edited behind the catalog's back is loaded again on open, detected by its
size and modification time (kept in the index's ``meta`` table).
"""

from __future__ import annotations

import json
import re
import sqlite3
from pathlib import Path
from typing import Iterable, Sequence

from ..errors import CatalogError
from ..files.fsio import write_atomic

__all__ = ["TagFile", "check_tag_name"]

_TAG_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,40}")


def check_tag_name(name: str) -> None:
    """Raise CatalogError unless ``name`` is letters, digits, '-', '_' or '.', starting with a letter or digit."""
    if not _TAG_NAME.fullmatch(name):
        raise CatalogError(f"tag {name!r}: use letters, digits, '-', '_' or '.', at most 41 characters")


class TagFile:
    """The tags of the catalog in ``root``, mirrored into the index connection ``db``.

    Callers that change tags hold the catalog's writer lock.
    """

    def __init__(self, root: Path, db: sqlite3.Connection) -> None:
        self.path = root / "tags.json"
        self._db = db

    def read(self) -> dict[str, set[str]]:
        """Tag name -> motor ids, as stored in tags.json (empty when there is no file)."""
        if not self.path.exists():
            return {}
        try:
            data = json.loads(self.path.read_text(encoding="utf-8"))
            return {str(k): set(map(str, v)) for k, v in data.items()}
        except (ValueError, AttributeError, TypeError) as exc:
            raise CatalogError(f"{self.path}: not a valid tags file ({exc}); "
                               "expected an object of tag -> list of ids") from exc

    def write(self, tags: dict[str, set[str]]) -> None:
        """Write tags.json atomically (empty tags dropped, names and ids sorted) and copy it into the index."""
        clean = {k: sorted(v) for k, v in sorted(tags.items()) if v}
        write_atomic(self.path, (json.dumps(clean, indent=2) + "\n").encode())
        self.sync(clean)

    def sync(self, tags: dict[str, Sequence[str]]) -> None:
        """Replace the index's ``tags`` table with ``tags`` (tag name -> motor ids)."""
        self._db.execute("BEGIN IMMEDIATE")
        self._db.execute("DELETE FROM tags")
        self._db.executemany("INSERT OR IGNORE INTO tags VALUES (?, ?)",
                             [(i, t) for t, ids in tags.items() for i in ids])
        self._db.execute("COMMIT")

    def refresh(self) -> None:
        """Load tags.json into the index when it changed since the index last saw it.

        A tags.json that cannot be read counts as no tags: the index's copy is emptied and the error raised (for
        the catalog to report), on every open until the file is mended; it is never written over, since every
        change reads it first (:meth:`read` raises)."""
        stamp = f"{self.path.stat().st_size}:{self.path.stat().st_mtime_ns}" if self.path.exists() else "none"
        seen = self._db.execute("SELECT value FROM meta WHERE key = 'tags'").fetchone()
        if seen is None or seen[0] != stamp:
            try:
                tags = {k: sorted(v) for k, v in self.read().items()}
            except CatalogError:
                self.sync({})
                self._db.execute("INSERT OR REPLACE INTO meta VALUES ('tags', 'damaged')")
                raise
            self.sync(tags)
            self._db.execute("INSERT OR REPLACE INTO meta VALUES ('tags', ?)", (stamp,))

    def attach(self, name: str, ids: Iterable[str]) -> None:
        """Add ``ids`` to tag ``name``."""
        tags = self.read()
        tags.setdefault(name, set()).update(ids)
        self.write(tags)

    def detach(self, name: str, ids: Iterable[str]) -> None:
        """Remove ``ids`` from tag ``name`` (a tag left empty disappears)."""
        tags = self.read()
        tags[name] = tags.get(name, set()) - set(ids)
        self.write(tags)

    def forget(self, motor_id: str) -> None:
        """Remove a motor from every tag (it has left the catalog)."""
        self.write({t: ids - {motor_id} for t, ids in self.read().items()})

    def as_lists(self) -> dict[str, list[str]]:
        """Tag name -> sorted motor ids."""
        return {k: sorted(v) for k, v in self.read().items()}
