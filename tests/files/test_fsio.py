"""Atomic writes: a batch of new files appears whole or not at all, and keeps the times it was staged with."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from motorlib.files import fsio
from motorlib.files.fsio import NewFileBatch, write_atomic


def test_batch_files_appear_only_on_commit(tmp_path: Path) -> None:
    batch = NewFileBatch(tmp_path / "staging")
    targets = [tmp_path / "a" / f"{k}.xml" for k in range(3)]
    (tmp_path / "a").mkdir()
    stats = [batch.write(t, f"curve {k}".encode()) for k, t in enumerate(targets)]
    assert targets[0] in batch and len(batch) == 3
    assert not any(t.exists() for t in targets)
    batch.commit()
    assert [t.read_bytes() for t in targets] == [b"curve 0", b"curve 1", b"curve 2"]
    assert [(s.st_size, s.st_mtime_ns) for s in stats] == [(t.stat().st_size, t.stat().st_mtime_ns) for t in targets]
    assert not list((tmp_path / "staging").iterdir()) and len(batch) == 0


def test_batch_files_get_the_mode_of_a_plain_open(tmp_path: Path) -> None:
    batch = NewFileBatch(tmp_path / "staging")
    batch.write(tmp_path / "new.xml", b"x")
    batch.commit()
    (tmp_path / "plain.xml").write_bytes(b"x")
    assert (tmp_path / "new.xml").stat().st_mode == (tmp_path / "plain.xml").stat().st_mode


def test_discard_and_clear_staging_leave_no_file(tmp_path: Path) -> None:
    batch = NewFileBatch(tmp_path / "staging")
    batch.write(tmp_path / "gone.xml", b"x")
    batch.discard()
    assert not (tmp_path / "gone.xml").exists() and not list((tmp_path / "staging").iterdir())
    batch.write(tmp_path / "left.xml", b"x")  # as if the writer were killed before its commit
    NewFileBatch(tmp_path / "staging").clear_staging()
    assert not list((tmp_path / "staging").iterdir())


def test_commit_never_replaces_a_file_that_appeared_meanwhile(tmp_path: Path) -> None:
    batch = NewFileBatch(tmp_path / "staging")
    batch.write(tmp_path / "first.xml", b"ours")
    batch.write(tmp_path / "taken.xml", b"ours")
    with pytest.raises(FileExistsError, match="already written"):
        batch.write(tmp_path / "taken.xml", b"twice")
    write_atomic(tmp_path / "taken.xml", b"theirs")
    with pytest.raises(FileExistsError):
        batch.commit()
    batch.discard()
    assert (tmp_path / "taken.xml").read_bytes() == b"theirs"
    assert (tmp_path / "first.xml").read_bytes() == b"ours"  # linked before the clash, complete
    assert not list((tmp_path / "staging").iterdir())


def test_commit_without_syncfs_fsyncs_every_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # Platforms without syncfs(2) fall back to one fsync per file and per folder.
    monkeypatch.setattr(fsio, "_syncfs", lambda: None)
    synced = []
    real_fsync = os.fsync
    monkeypatch.setattr(os, "fsync", lambda fd: synced.append(fd) or real_fsync(fd))
    batch = NewFileBatch(tmp_path / "staging")
    for k in range(3):
        batch.write(tmp_path / f"{k}.xml", b"x")
    batch.commit()
    assert len(synced) >= 3 + 1 and all((tmp_path / f"{k}.xml").exists() for k in range(3))


def test_a_no_overwrite_write_never_clobbers_a_file_that_appears_while_it_writes(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # The check "does the target exist?" and the write are two steps; another process can create the target in
    # between. Simulate that by creating it right after the temporary file is made (POSIX link(2) fails with
    # EEXIST on an existing target, rename(2) would replace it).
    import tempfile

    target = tmp_path / "motor.xml"
    real_mkstemp = tempfile.mkstemp

    def mkstemp_then_race(*args, **kwargs):
        made = real_mkstemp(*args, **kwargs)
        target.write_bytes(b"theirs")
        return made

    monkeypatch.setattr(tempfile, "mkstemp", mkstemp_then_race)
    with pytest.raises(FileExistsError):
        write_atomic(target, b"ours", overwrite=False)
    assert target.read_bytes() == b"theirs"
    assert [p.name for p in tmp_path.iterdir()] == ["motor.xml"]  # no temporary file left behind


def test_a_size_limit_is_written_as_people_state_it() -> None:
    # "larger than the 8388608-byte limit" where FORMAT.md says 8 MiB
    from motorlib.files.fsio import size_text

    assert size_text(8 * 1024 * 1024) == "8 MiB"  # IEC 80000-13 binary prefix: 1 MiB = 2**20 bytes
    assert size_text(64 * 1024) == "64 KiB" and size_text(1500) == "1,500 bytes"
