"""The catalog index: it follows file changes made behind its back and rebuilds itself when corrupt."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Callable

import pytest

from motorlib import MotorRecord, read_record, write_record
from motorlib.catalog import Catalog, CatalogFilter


def test_index_follows_changes_behind_its_back(tmp_catalog: Catalog) -> None:
    root = tmp_catalog.root
    tmp_catalog.close()
    extra = MotorRecord("D10-3", [0.0, 0.1, 1.6, 1.7], [0.0, 12.0, 10.0, 0.0], maker="Hand Copied (fictional)")
    (root / "hand").mkdir()
    write_record(extra, root / "hand" / "d10.xml")
    victim = next(root.glob("marmalade*/*.xml"))
    victim.unlink()
    changed = next(root.glob("teakettle*/c6*.xml"))
    record = read_record(changed)
    write_record(MotorRecord(**{**{f: getattr(record, f) for f in record.__dataclass_fields__}, "maker": "Renamed Co"}),
                 changed)
    (root / "broken.xml").write_text("<motor-record")
    reopened = Catalog(root)
    assert len(reopened) == 27  # +1 new, -1 removed, broken one skipped
    assert any("refreshed" in n for n in reopened.notices)
    assert [Path(p).name for p, _ in reopened.problems] == ["broken.xml"]
    assert reopened.rows(CatalogFilter(maker="renamed"))[0].designation == "C6-3,5,7"
    assert reopened.resolve("D10-3")
    again = Catalog(root)
    assert not any("refreshed" in n for n in again.notices)  # nothing changed: no file re-read


def test_corrupt_index_is_rebuilt(tmp_catalog: Catalog) -> None:
    root = tmp_catalog.root
    tmp_catalog.tag(["G59-10"], "in-stock")
    tmp_catalog.close()
    index = root / ".motorlib" / "index.sqlite"
    for extra in ("-wal", "-shm"):
        Path(str(index) + extra).unlink(missing_ok=True)
    index.write_bytes(b"this is not a database" * 100)
    reopened = Catalog(root)
    assert len(reopened) == 27
    assert any("moved aside and rebuilt" in n for n in reopened.notices)
    assert [r.designation for r in reopened.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]  # tags survive


def test_scan_finds_curve_files_below_the_root_and_skips_hidden_and_linked_folders(tmp_path: Path) -> None:
    from motorlib.catalog.index import scan_files

    for name in ("a/one.xml", "a/b/two.xml", "top.xml", ".motorlib/staging/x.xml", "a/.hidden.xml", "a/notes.txt",
                 ".hidden/three.xml"):
        (tmp_path / name).parent.mkdir(parents=True, exist_ok=True)
        (tmp_path / name).write_bytes(b"12345")
    outside = tmp_path.parent / f"{tmp_path.name}-outside"
    outside.mkdir()
    (outside / "far.xml").write_bytes(b"1")
    (tmp_path / "linked").symlink_to(outside, target_is_directory=True)
    found = scan_files(tmp_path)
    assert sorted(found) == ["a/b/two.xml", "a/one.xml", "top.xml"]
    st = (tmp_path / "a" / "one.xml").stat()
    assert found["a/one.xml"] == (5, st.st_mtime_ns, st.st_ctime_ns)


def _pack_is_the_files(catalog: Catalog) -> None:
    """The pack of every row (from the index's curves cache) holds the samples of the curve files themselves."""
    from motorlib.flight import MotorPack

    rows = catalog.rows()
    pack = catalog.motor_pack(rows)
    expected = MotorPack.from_records([catalog.get(r.motor_id) for r in rows])
    for name in ("time_s", "thrust_n", "n_samples", "total_mass_kg", "delays_s"):
        assert getattr(pack, name).tobytes() == getattr(expected, name).tobytes(), name


def _stored_curves(catalog: Catalog) -> int:
    return catalog._db.execute("SELECT count(*) FROM curves").fetchone()[0]


def test_curves_cache_never_outlives_a_change(tmp_catalog: Catalog) -> None:
    # Issue 16: a ranking reads every curve from one cached blob. Any change to the motors, through the catalog
    # or behind its back (then seen by the next open's refresh), in this process or another, drops it in the
    # same transaction; the next pack builds and stores it again. A stale cache would fail _pack_is_the_files.
    root = tmp_catalog.root
    _pack_is_the_files(tmp_catalog)
    assert _stored_curves(tmp_catalog) == 1
    _after_each_change(tmp_catalog, _stored_curves, _pack_is_the_files)
    # behind its back: a file edited (new samples, same name), one deleted, one added; another process opens
    edited = next(root.glob("teakettle*/c6*.xml"))
    record = read_record(edited)
    write_record(MotorRecord(**{**{f: getattr(record, f) for f in record.__dataclass_fields__},
                                "thrust_n": record.thrust_n * 1.5}), edited)
    next(root.glob("marmalade*/*.xml")).unlink()
    write_record(MotorRecord("E7-4", [0.0, 0.2, 3.0, 3.1], [0.0, 9.0, 7.0, 0.0], maker="Hand Copied (fictional)"),
                 root / "e7.xml")
    other = Catalog(root)
    assert _stored_curves(other) == 0 and _stored_curves(tmp_catalog) == 0
    _pack_is_the_files(tmp_catalog)  # the first process packs again, from the rows the refresh wrote
    assert _stored_curves(other) == 1
    _pack_is_the_files(other)


def _stored_rows(catalog: Catalog) -> int:
    return catalog._db.execute("SELECT count(*) FROM row_cache").fetchone()[0]


def _rows_are_the_table(catalog: Catalog) -> None:
    """The rows of a ranking (every motor, no findings: from the row cache) are the rows read from the table."""
    from motorlib.catalog import query

    cached = catalog.rows(findings=False)
    assert cached == query._selected_rows(catalog._db, CatalogFilter(), "total_impulse_ns", False, False)
    assert cached == [dataclasses.replace(row, findings=None) for row in catalog.rows()]
    assert all(type(row.delays_s) is tuple and type(row.delay_adjustable) is bool for row in cached)


def test_row_cache_never_outlives_a_change(tmp_catalog: Catalog) -> None:
    # Issue 16: a ranking reads every row from one cached blob; as the curves cache, any change to the motors drops
    # it in the same transaction, whoever makes it.
    root = tmp_catalog.root
    _rows_are_the_table(tmp_catalog)
    assert _stored_rows(tmp_catalog) == 1
    _rows_are_the_table(tmp_catalog)  # read from the cache this time
    _after_each_change(tmp_catalog, _stored_rows, _rows_are_the_table)
    next(root.glob("marmalade*/*.xml")).unlink()  # behind its back; another process opens
    other = Catalog(root)
    assert _stored_rows(other) == 0
    _rows_are_the_table(tmp_catalog)
    _rows_are_the_table(other)


@pytest.mark.parametrize("blob", [b"", b"\x00garbage", "marshal of the wrong shape", "a row of the wrong length",
                                  "a list in a field", "an int among the delays"])
def test_a_row_cache_that_is_not_rows_is_built_again(tmp_catalog: Catalog, blob: object) -> None:
    import marshal

    from motorlib.catalog import query

    _rows_are_the_table(tmp_catalog)
    (data,) = tmp_catalog._db.execute("SELECT data FROM row_cache").fetchone()
    rows = marshal.loads(data)
    delays = query.ROW_COLUMNS.index("delays_s")
    bad = {"marshal of the wrong shape": marshal.dumps({"rows": rows}),
           "a row of the wrong length": marshal.dumps([row[:-1] for row in rows]),
           "a list in a field": marshal.dumps([row[:2] + ([1.0],) + row[3:] for row in rows]),
           "an int among the delays": marshal.dumps([row[:delays] + ((3,),) + row[delays + 1:] for row in rows]),
           }.get(blob, blob)  # type: ignore[call-overload]
    tmp_catalog._db.execute("UPDATE row_cache SET data = ?", (bad,))
    _rows_are_the_table(tmp_catalog)  # read from the table (and stored again)
    (again,) = tmp_catalog._db.execute("SELECT data FROM row_cache").fetchone()
    assert again == data


def test_row_cache_of_another_format_is_built_again(tmp_catalog: Catalog) -> None:
    _rows_are_the_table(tmp_catalog)
    tmp_catalog._db.execute("UPDATE row_cache SET format = 'marshal 1 python 2.7: motor_id'")
    _rows_are_the_table(tmp_catalog)
    assert tmp_catalog._db.execute("SELECT count(*), min(format) FROM row_cache").fetchone()[1].startswith("marshal 4")


def test_curves_cache_is_not_stored_while_another_process_writes(tmp_catalog: Catalog) -> None:
    import sqlite3

    writer = sqlite3.connect(tmp_catalog.index_path, isolation_level=None)
    writer.execute("BEGIN IMMEDIATE")  # another writer holds the index: the pack is read, not stored, not waited on
    try:
        _pack_is_the_files(tmp_catalog)
        _rows_are_the_table(tmp_catalog)
        assert _stored_curves(tmp_catalog) == 0 and _stored_rows(tmp_catalog) == 0
    finally:
        writer.execute("ROLLBACK")
        writer.close()
    (timeout,) = tmp_catalog._db.execute("PRAGMA busy_timeout").fetchone()
    assert timeout == 60000  # the connection waits for writers as before
    _pack_is_the_files(tmp_catalog)
    _rows_are_the_table(tmp_catalog)
    assert _stored_curves(tmp_catalog) == 1 and _stored_rows(tmp_catalog) == 1


@pytest.mark.parametrize("version", ["4", "5"])
def test_an_index_of_an_earlier_version_is_upgraded_in_place(tmp_catalog: Catalog, version: str) -> None:
    # Issue 16 added the curves cache (schema 5) and the row cache (schema 6): an index of version 4 or 5 keeps its
    # rows, tags and stamps (no file is read again, nothing is moved aside) and gains the caches and their triggers.
    import sqlite3

    from motorlib.catalog.index import SCHEMA_VERSION

    root = tmp_catalog.root
    tmp_catalog.tag(["G59-10"], "in-stock")
    before = tmp_catalog.rows()
    tmp_catalog.close()
    db = sqlite3.connect(root / ".motorlib" / "index.sqlite", isolation_level=None)
    for event in ("insert", "update", "delete"):
        db.execute(f"DROP TRIGGER motors_{event}_drops_rows")
        if version == "4":
            db.execute(f"DROP TRIGGER motors_{event}_drops_curves")
    db.execute("DROP TABLE row_cache")
    if version == "4":
        db.execute("DROP TABLE curves")
    db.execute("UPDATE meta SET value = ? WHERE key = 'schema'", (version,))
    db.close()
    reopened = Catalog(root)
    assert not reopened.notices and not (root / ".motorlib" / "index.corrupt").exists()
    assert reopened.rows() == before
    assert [r.designation for r in reopened.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]
    assert reopened._db.execute("SELECT value FROM meta WHERE key = 'schema'").fetchone() == (SCHEMA_VERSION,)
    _pack_is_the_files(reopened)
    _rows_are_the_table(reopened)
    reopened.remove("G59-10")  # the triggers came with the upgrade
    assert _stored_curves(reopened) == 0 and _stored_rows(reopened) == 0
    _pack_is_the_files(reopened)
    _rows_are_the_table(reopened)


def _after_each_change(catalog: Catalog, stored: Callable[[Catalog], int], check: Callable[[Catalog], None]) -> None:
    """A motor added, one removed, the index rebuilt: each drops the cache (``stored`` counts its rows), and the
    next read (``check``, which compares it with what it caches) stores it again."""
    changes = [
        lambda c: c.add(MotorRecord("D10-3", [0.0, 0.1, 1.6, 1.7], [0.0, 12.0, 10.0, 0.0], maker="Added (fictional)",
                                    delays_s=(3.0, 5.0))),
        lambda c: c.remove("G59-10"),
        lambda c: c.reindex(),
    ]
    for change in changes:
        change(catalog)
        assert stored(catalog) == 0
        check(catalog)
        assert stored(catalog) == 1


@pytest.mark.parametrize("kind", ["folder", "pipe"])
def test_a_folder_where_the_index_file_belongs_is_a_clear_error(kind: str, tmp_catalog: Catalog) -> None:
    # new-user trial: a folder named index.sqlite in the catalog's .motorlib folder was taken for a damaged index,
    # renamed to index.corrupt and replaced by a new index, without a word about the user's folder
    import os

    from motorlib.errors import CatalogError

    root = tmp_catalog.root
    tmp_catalog.close()
    index = root / ".motorlib" / "index.sqlite"
    index.unlink()
    if kind == "folder":
        index.mkdir()
        (index / "notes.txt").write_text("mine")
    else:
        os.mkfifo(index)
    with pytest.raises(CatalogError) as caught:
        Catalog(root)
    message = str(caught.value)
    assert message.startswith(f"{index}: is a {kind}")
    assert "a file" in message and "index" in message and "remove or rename" in message
    if kind == "folder":
        assert (index / "notes.txt").read_text() == "mine"  # never deleted, never moved
    assert not (root / ".motorlib" / "index.corrupt").exists()
    assert Catalog(root, read_only=True).resolve("G59-10")  # a read-only opening never uses the file


def test_a_file_where_the_index_folder_belongs_is_a_clear_error(tmp_path: Path) -> None:
    from motorlib.errors import CatalogError

    root = tmp_path / "catalog"
    root.mkdir()
    (root / ".motorlib").write_text("mine")
    with pytest.raises(CatalogError, match=r"\.motorlib: is a file.*folder.*remove or rename"):
        Catalog(root)
    assert (root / ".motorlib").read_text() == "mine"


@pytest.mark.parametrize("place", ["index", "folder"])
def test_a_dangling_link_where_the_index_belongs_is_a_clear_error(place: str, tmp_path: Path) -> None:
    # new-user trial: a link to a missing file at .motorlib/index.sqlite ended in
    # "internal error (OperationalError: unable to open database file)", exit 3
    from motorlib.errors import CatalogError

    root = tmp_path / "catalog"
    root.mkdir()
    missing = tmp_path / "nonexistent" / "x"
    if place == "index":
        (root / ".motorlib").mkdir()
        link = root / ".motorlib" / "index.sqlite"
    else:
        link = root / ".motorlib"
    link.symlink_to(missing)
    with pytest.raises(CatalogError) as caught:
        Catalog(root)
    message = str(caught.value)
    assert message.startswith(f"{link}: is a link to {missing}, which does not exist")
    assert "remove" in message
    assert link.is_symlink() and not missing.exists()  # left as it was: nothing made at the target either


def test_an_index_motorlib_cannot_read_or_write_is_a_clear_error(tmp_catalog: Catalog,
                                                                 monkeypatch: pytest.MonkeyPatch) -> None:
    # an index file without read or write permission for this user (simulated: the tests may run as root, whom
    # permissions do not stop) is named with what it lacks, not an internal error
    import os

    from motorlib.errors import CatalogError

    root = tmp_catalog.root
    tmp_catalog.close()
    index = root / ".motorlib" / "index.sqlite"
    real_access = os.access
    monkeypatch.setattr(os, "access", lambda path, mode, **kw: False if Path(path) == index
                        else real_access(path, mode, **kw))
    with pytest.raises(CatalogError, match=r"index\.sqlite: motorlib may not read and write it"):
        Catalog(root)
    assert index.is_file() and not (root / ".motorlib" / "index.corrupt").exists()
