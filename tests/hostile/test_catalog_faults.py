"""Issue 13, classes 5, 7 and 8: the index is a cache that damage, races and sly file changes cannot break."""

from __future__ import annotations

import json
import multiprocessing
import os
import shutil
from pathlib import Path

import pytest

from motorlib.catalog import Catalog

from .conftest import SAMPLE_DIR, run

SAMPLES = sorted(SAMPLE_DIR.glob("*.xml"))


def _built(tmp: Path) -> Path:
    root = tmp / "cat"
    Catalog(root).add_files(SAMPLES).__class__  # noqa: B018 - build, then let it close
    return root


def _damage_pages(index: Path) -> None:
    """Overwrite every page after the first (the header, which the open check reads) with garbage."""
    data = bytearray(index.read_bytes())
    page = int.from_bytes(data[16:18], "big") or 65536
    for start in range(page, len(data), page):
        data[start + 8:start + 64] = os.urandom(56)
    index.write_bytes(bytes(data))


@pytest.mark.parametrize("damage", ["pages", "truncated", "garbage"])
@pytest.mark.parametrize("command", [["catalog", "list"], ["catalog", "verify"], ["catalog", "reindex"],
                                     ["catalog", "show", "F29-8"]])
def test_a_damaged_index_is_rebuilt_from_the_files(tmp_path: Path, damage: str, command: list[str]) -> None:
    root = _built(tmp_path)
    index = root / ".motorlib" / "index.sqlite"
    for extra in ("-wal", "-shm"):
        Path(str(index) + extra).unlink(missing_ok=True)
    if damage == "pages":
        _damage_pages(index)
    elif damage == "truncated":
        with open(index, "r+b") as handle:
            handle.truncate(index.stat().st_size // 2)
    else:
        index.write_bytes(b"SQLite format 3\x00" + os.urandom(8192))
    result = run(*command[:2], "--catalog", root, *command[2:])
    assert result.exit_code == 0, result.output
    result = run("catalog", "list", "--catalog", root, "--json")
    assert len(json.loads(result.stdout)) == len(SAMPLES)


def test_a_file_replaced_with_the_same_size_and_time_is_noticed(tmp_path: Path) -> None:
    root = tmp_path / "cat"
    root.mkdir()
    shutil.copy(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml", root / "m.xml")
    first = json.loads(run("catalog", "list", "--catalog", root, "--json").stdout)[0]
    path = root / "m.xml"
    stat = path.stat()
    text = path.read_text(encoding="utf-8")
    changed = text.replace("F29-8", "F29-6")  # same length
    assert len(changed.encode()) == len(text.encode()) and changed != text
    path.write_text(changed, encoding="utf-8")
    os.utime(path, ns=(stat.st_atime_ns, stat.st_mtime_ns))
    second = json.loads(run("catalog", "list", "--catalog", root, "--json").stdout)[0]
    assert first["designation"] == "F29-8" and second["designation"] == "F29-6"


def _writer(root: str, files: list[str], queue: "multiprocessing.Queue[str]") -> None:
    try:
        results = Catalog(root).add_files(files)
        queue.put(",".join(r.status for r in results))
    except BaseException as exc:  # noqa: BLE001 - report anything to the parent
        queue.put(f"error: {type(exc).__name__}: {exc}")


@pytest.mark.parametrize("trial", range(3))  # tests/benchmarks/bench_catalog_races.py runs 20
def test_writers_racing_on_a_new_catalog_lose_nothing(tmp_path: Path, trial: int) -> None:
    root = tmp_path / "new"
    n_writers = 8
    context = multiprocessing.get_context("fork")
    queue = context.Queue()
    chunks = [[str(p) for p in SAMPLES[i::n_writers]] for i in range(n_writers)]
    processes = [context.Process(target=_writer, args=(str(root), chunk, queue)) for chunk in chunks]
    for process in processes:
        process.start()
    outcomes = [queue.get(timeout=120) for _ in processes]
    for process in processes:
        process.join(timeout=60)
    assert not [o for o in outcomes if o.startswith("error")], outcomes
    assert not (root / ".motorlib" / "index.corrupt").exists()
    assert len(Catalog(root)) == len(SAMPLES)


def _remover(root: str, ref: str, queue: "multiprocessing.Queue[str]") -> None:
    try:
        queue.put(Catalog(root).remove(ref))
    except BaseException as exc:  # noqa: BLE001
        queue.put(f"{type(exc).__name__}")


def test_racing_removes_of_one_motor_fail_cleanly(tmp_path: Path) -> None:
    root = _built(tmp_path)
    context = multiprocessing.get_context("fork")
    queue = context.Queue()
    processes = [context.Process(target=_remover, args=(str(root), "F29-8", queue)) for _ in range(6)]
    for process in processes:
        process.start()
    outcomes = [queue.get(timeout=120) for _ in processes]
    for process in processes:
        process.join(timeout=60)
    assert sum(o.endswith("f29-8") for o in outcomes) == 1, outcomes
    assert set(outcomes) - {o for o in outcomes if o.endswith("f29-8")} <= {"MotorNotFoundError"}, outcomes
