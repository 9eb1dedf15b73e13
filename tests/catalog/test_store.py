"""The catalog store: adding, duplicates, refusals, safe paths, read-only folders, concurrency and crashes."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from motorlib import MotorRecord, read_record, record_to_bytes, write_record
from motorlib.catalog import Catalog, CatalogFilter, motor_id_for, store
from motorlib.files import motor_xml
from motorlib.files.fsio import slug
from motorlib.errors import CatalogError, MotorNotFoundError

from ..conftest import FIXTURE_DIR, ROOT, SAMPLE_DIR
from ..synthetic import synthetic_motors


def _write_synthetic(folder: Path, n: int, seed: int) -> list[Path]:
    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for i, motor in enumerate(synthetic_motors(n, seed)):
        paths.append(write_record(motor, folder / f"m{seed}-{i}.xml"))
    return paths


def test_add_list_get(tmp_catalog: Catalog) -> None:
    assert len(tmp_catalog) == 27
    rows = tmp_catalog.rows(CatalogFilter(class_range=("D", "G"), diameter_m=0.029))
    assert [r.designation for r in rows] == ["F51-10", "G59-10", "G25-4,7,10", "G99-14"]
    assert all(29 == round(r.diameter_m * 1e3) for r in rows)
    record = tmp_catalog.get("G59-10")
    assert record == read_record(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")
    motor_id = tmp_catalog.resolve("G59-10")
    assert tmp_catalog.resolve(motor_id[:6]) == motor_id
    assert tmp_catalog.resolve("bramblewick-propulsion-fictional/g59-10") == motor_id
    assert motor_id == motor_id_for(record_to_bytes(record))


def test_duplicates_and_near_duplicates(tmp_catalog: Catalog) -> None:
    again = tmp_catalog.add_files([SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"])
    assert again[0].status == "duplicate" and len(tmp_catalog) == 27
    original = tmp_catalog.get("G59-10")
    own_test = MotorRecord(**{**{f: getattr(original, f) for f in original.__dataclass_fields__},
                              "thrust_n": original.thrust_n * 1.01})
    result = tmp_catalog.add(own_test)
    assert result.status == "added" and result.near_duplicates == ("bramblewick-propulsion-fictional/g59-10",)
    assert result.handle == "bramblewick-propulsion-fictional/g59-10-2"
    with pytest.raises(MotorNotFoundError, match="several motors match"):
        tmp_catalog.resolve("G59-10")


def test_errors_refused_unless_forced(tmp_path: Path) -> None:
    catalog = Catalog(tmp_path / "c")
    bad = read_record(FIXTURE_DIR / "class_mismatch.xml")
    assert catalog.add(bad).status == "refused" and len(catalog) == 0
    forced = catalog.add(bad, force=True)
    assert forced.status == "added"
    assert "[added despite errors: class-mismatch]" in catalog.get(forced.motor_id).provenance.notes
    assert catalog.rows()[0].n_errors == 1
    results = catalog.add_files([FIXTURE_DIR / "bad_time_order.xml", FIXTURE_DIR / "billion_laughs.xml"])
    assert [r.status for r in results] == ["refused", "unreadable"]


def test_paths_never_escape_the_catalog(tmp_path: Path) -> None:
    catalog = Catalog(tmp_path / "c")
    record = MotorRecord("../../../etc/x", [0.0, 0.5, 1.0], [0.0, 5.0, 0.0], maker="../../evil")
    result = catalog.add(record)
    path = (catalog.root / (result.handle + ".xml")).resolve()
    assert catalog.root.resolve() in path.parents
    assert slug("../../x") == "x" and slug("...") == "unknown"


def test_read_only_catalog_of_the_bundled_samples() -> None:
    catalog = Catalog(SAMPLE_DIR)  # the READ_ONLY marker file makes it read-only without asking
    assert catalog.read_only
    assert len(catalog) == 27 and not (SAMPLE_DIR / ".motorlib").exists()
    with pytest.raises(CatalogError, match="read-only"):
        catalog.tag(["G59-10"], "x")


_ADDER = textwrap.dedent("""
    import sys
    sys.path.insert(0, {root!r})
    from motorlib.catalog import Catalog
    paths = sys.argv[2:]
    catalog = Catalog(sys.argv[1])
    for path in paths:  # one file at a time, so that writers interleave
        catalog.add_files([path])
""")


def test_four_concurrent_writers_lose_nothing(tmp_path: Path) -> None:
    root = tmp_path / "shared"
    Catalog(root).close()
    batches = [_write_synthetic(tmp_path / f"in{k}", 15, seed=100 + k) for k in range(4)]
    script = _ADDER.format(root=str(ROOT))
    procs = [subprocess.Popen([sys.executable, "-c", script, str(root), *map(str, batch)]) for batch in batches]
    assert [p.wait(timeout=120) for p in procs] == [0, 0, 0, 0]
    catalog = Catalog(root)
    assert len(catalog) == 60
    assert len(list(root.rglob("*.xml"))) == 60
    assert not catalog.problems


def test_two_processes_creating_one_new_catalog_both_open_it(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # Issue 16: writers racing on a catalog folder that does not exist yet. Each saw no folder and made it; the
    # one that came second failed with FileExistsError. Reproduced deterministically: another process makes the
    # folder between this one's check and its mkdir.
    root = tmp_path / "new" / "catalog"
    make_folder = Path.mkdir

    def the_other_process_wins(self: Path, *args: object, **kwargs: object) -> None:
        if self == root and not root.exists():
            os.makedirs(root)  # the other writer, a moment earlier
        make_folder(self, *args, **kwargs)

    monkeypatch.setattr(Path, "mkdir", the_other_process_wins)
    catalog = Catalog(root)
    assert len(catalog) == 0 and (root / ".motorlib" / "index.sqlite").is_file()
    catalog.close()


def test_killed_import_leaves_whole_curves_and_a_consistent_index(tmp_path: Path) -> None:
    root = tmp_path / "crash"
    Catalog(root).close()
    paths = _write_synthetic(tmp_path / "in", 400, seed=7)
    script = _ADDER.format(root=str(ROOT))
    proc = subprocess.Popen([sys.executable, "-c", script, str(root), *map(str, paths)])
    deadline = time.time() + 60
    while time.time() < deadline and len(list(root.rglob("*.xml"))) < 40:
        time.sleep(0.02)
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    written = sorted(root.rglob("*.xml"))
    assert 0 < len(written) < 400
    for path in written:
        read_record(path)  # every curve file is complete and valid
    catalog = Catalog(root)
    assert len(catalog) == len(written) and not catalog.problems
    results = catalog.add_files(paths)
    assert sum(r.status == "duplicate" for r in results) == len(written)
    assert len(catalog) == 400


def _variant(record: MotorRecord, factor: float) -> MotorRecord:
    """The same maker and designation with another curve (a near duplicate)."""
    return MotorRecord(**{**{f: getattr(record, f) for f in record.__dataclass_fields__},
                          "thrust_n": record.thrust_n * factor})


def test_batched_add_catches_duplicates_within_a_batch_and_indexes_what_it_wrote(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # Issue 16: adding in durable batches (one flush and one index commit per batch) changes no outcome.
    monkeypatch.setattr(store, "BATCH_SIZE", 4)
    paths = _write_synthetic(tmp_path / "in", 9, seed=3)
    first = read_record(paths[0])
    paths.insert(2, write_record(first, tmp_path / "in" / "again.xml"))  # same batch as paths[0]
    paths.insert(3, write_record(_variant(first, 1.01), tmp_path / "in" / "near.xml"))
    paths.append(FIXTURE_DIR / "bad_time_order.xml")
    ticks = []
    catalog = Catalog(tmp_path / "c")
    results = catalog.add_files(paths, progress=ticks.append)
    assert ticks == [1] * len(paths)
    assert [r.status for r in results].count("added") == 10
    assert results[2].status == "duplicate" and results[2].handle == results[0].handle
    assert results[3].near_duplicates == (results[0].handle,) and results[3].handle == results[0].handle + "-2"
    assert results[-1].status == "refused"
    assert len(catalog) == 10 and len(list(catalog.root.rglob("*.xml"))) == 10
    assert not list((catalog.root / ".motorlib" / "staging").iterdir())
    catalog.close()
    reopened = Catalog(tmp_path / "c")  # sizes and times stored while staging match the files: nothing re-read
    assert reopened.refresh() == 0 and not reopened.problems
    assert {r.motor_id for r in reopened.rows()} == {r.motor_id for r in results if r.status == "added"}


def test_a_failed_batch_leaves_neither_files_nor_rows(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(store, "BATCH_SIZE", 3)
    paths = _write_synthetic(tmp_path / "in", 5, seed=4)
    calls = []

    def fail_on_the_fifth(record: MotorRecord, source: str = "", **kwargs: object) -> bytes:
        calls.append(record)
        if len(calls) == 5:
            raise OSError(28, "No space left on device")
        return record_to_bytes(record)

    monkeypatch.setattr(motor_xml, "readable_record_bytes", fail_on_the_fifth)  # the store imports it when adding
    catalog = Catalog(tmp_path / "c")
    with pytest.raises(OSError, match="No space"):
        catalog.add_files(paths)
    assert len(catalog) == 3 and len(list(catalog.root.rglob("*.xml"))) == 3  # the first batch only
    assert not list((catalog.root / ".motorlib" / "staging").iterdir())
    assert Catalog(tmp_path / "c").refresh() == 0


def test_the_duplicate_name_lookup_uses_an_index(tmp_catalog: Catalog) -> None:
    # Issue 16: it ran once per added curve and scanned the whole table, so adding grew faster than linearly.
    plan = tmp_catalog._db.execute("EXPLAIN QUERY PLAN " + store._SAME_NAME_SQL, ("a", "b")).fetchall()
    assert "USING INDEX motors_lower_name" in plan[0][-1]


_BATCH_ADDER = textwrap.dedent("""
    import sys
    sys.path.insert(0, {root!r})
    from motorlib.catalog import Catalog, store
    store.BATCH_SIZE = 25
    Catalog(sys.argv[1]).add_files(sys.argv[2:])  # one call: batches of 25 files
""")


def test_killed_batched_import_leaves_whole_curves_and_the_next_writer_cleans_up(tmp_path: Path) -> None:
    root = tmp_path / "crash"
    Catalog(root).close()
    paths = _write_synthetic(tmp_path / "in", 400, seed=8)
    proc = subprocess.Popen([sys.executable, "-c", _BATCH_ADDER.format(root=str(ROOT)), str(root), *map(str, paths)])
    deadline = time.time() + 60
    while time.time() < deadline and len(list(root.rglob("*.xml"))) < 60:
        time.sleep(0.02)
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    written = sorted(root.rglob("*.xml"))
    assert 0 < len(written) < 400
    for path in written:
        read_record(path)  # every curve file is complete and valid
    catalog = Catalog(root)
    assert len(catalog) == len(written) and not catalog.problems
    results = catalog.add_files(paths)
    assert sum(r.status == "duplicate" for r in results) == len(written)
    assert len(catalog) == 400
    assert not list((root / ".motorlib" / "staging").iterdir())  # staged files of the killed batch are gone


def test_a_writer_waiting_for_another_says_so(tmp_path) -> None:
    # A second `catalog add` waited 31 s on the writer lock without a word: the catalog calls on_lock_wait once
    # when another process holds the lock, then waits as before.
    catalog = Catalog(tmp_path / "cat")
    release = tmp_path / "release"
    holder = subprocess.Popen([sys.executable, "-c", textwrap.dedent(f"""
        import fcntl, os, sys, time
        with open({str(tmp_path / "cat" / ".motorlib" / "lock")!r}, "a+b") as lock:
            fcntl.flock(lock.fileno(), fcntl.LOCK_EX)
            print("held", flush=True)
            start = time.monotonic()
            while not os.path.exists({str(release)!r}) and time.monotonic() - start < 5.0:  # lets go within 5 s
                time.sleep(0.01)
    """)], stdout=subprocess.PIPE, text=True)
    assert holder.stdout.readline().strip() == "held"
    told = []

    def waiting() -> None:  # told while the other writer still holds the lock; then it lets go
        told.append(holder.poll() is None)
        release.touch()

    catalog.on_lock_wait = waiting
    (result,) = catalog.add_files([SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"])
    holder.wait(timeout=30)
    holder.stdout.close()
    assert told == [True] and result.status == "added" and len(catalog) == 1


def test_a_copied_read_only_marker_is_named_in_the_refusal(tmp_path: Path) -> None:
    # a copy of the bundled samples keeps their READ_ONLY file: the refusal says so and how to lift it
    import shutil

    shutil.copytree(SAMPLE_DIR, tmp_path / "mine")
    catalog = Catalog(tmp_path / "mine")
    with pytest.raises(CatalogError, match=r"READ_ONLY.*delete"):
        catalog.tag(["G59-10"], "x")
    (tmp_path / "mine" / "READ_ONLY").unlink()
    with pytest.raises(CatalogError, match="opened read-only") as caught:
        Catalog(tmp_path / "mine", read_only=True).tag(["G59-10"], "x")
    assert "READ_ONLY" not in str(caught.value)
