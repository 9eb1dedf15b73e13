"""Atomic file writing: a temporary file in the target's folder, fsync, then rename.

A reader never sees a half-written file, and a crash leaves either the old file
or the new one (POSIX ``rename`` is atomic within one file system).
"""

from __future__ import annotations

import os
import re
import tempfile
from pathlib import Path

__all__ = ["slug", "write_atomic"]


def write_atomic(path: str | os.PathLike[str], data: bytes, *, overwrite: bool = True) -> Path:
    """Write ``data`` to ``path`` atomically and return the path.

    Raises
    ------
    FileExistsError
        When ``overwrite`` is False and ``path`` exists.
    """
    target = Path(path)
    if not overwrite and target.exists():
        raise FileExistsError(f"{target}: already exists (choose another name or allow overwriting)")
    folder = target.parent if str(target.parent) else Path(".")
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    try:
        # mkstemp creates 0600; give the file the mode a plain open() would (or keep the old file's mode)
        os.fchmod(fd, _existing_mode(target))
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        if not overwrite:
            # link() fails if the target appeared meanwhile, so we never replace someone else's file
            os.link(tmp_name, target)
            os.unlink(tmp_name)
        else:
            os.replace(tmp_name, target)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
    _fsync_folder(folder)
    return target


def _existing_mode(target: Path) -> int:
    try:
        return os.stat(target).st_mode & 0o777
    except FileNotFoundError:
        mask = os.umask(0)
        os.umask(mask)
        return 0o666 & ~mask


def _fsync_folder(folder: Path) -> None:
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:  # some platforms cannot open folders; the rename is still atomic
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def slug(text: str) -> str:
    """A file-name-safe, lower-case slug: letters, digits and single hyphens only ('../../x' -> 'x')."""
    cleaned = re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-")
    return cleaned[:60].strip("-") or "unknown"
