"""The catalog index: it follows file changes made behind its back and rebuilds itself when corrupt."""

from __future__ import annotations

from pathlib import Path

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
