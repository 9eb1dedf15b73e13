"""The index notices every change to a curve file, and keeps reporting files that fail to read."""

from __future__ import annotations

import os
from pathlib import Path

from motorlib import MotorRecord, write_record
from motorlib.catalog import Catalog, CatalogFilter


def _catalog_with(tmp_path: Path, maker: str) -> tuple[Path, Path]:
    root = tmp_path / "catalog"
    root.mkdir()
    path = root / "d10.xml"
    write_record(MotorRecord("D10-3", [0.0, 0.1, 1.6, 1.7], [0.0, 12.0, 10.0, 0.0], maker=maker), path)
    Catalog(root).close()
    return root, path


def test_a_change_that_keeps_the_file_size_is_noticed(tmp_path: Path) -> None:
    # An edit that keeps the size (one maker name for another of the same length) changes the modification
    # time; size alone would miss it.
    root, path = _catalog_with(tmp_path, "Aaaa Motors (fictional)")
    before = path.stat()
    data = path.read_bytes().replace(b"Aaaa Motors", b"Bbbb Motors")
    path.write_bytes(data)
    os.utime(path, ns=(before.st_atime_ns, before.st_mtime_ns + 2_000_000_000))
    assert path.stat().st_size == before.st_size
    reopened = Catalog(root)
    assert [r.maker for r in reopened.rows()] == ["Bbbb Motors (fictional)"]
    assert reopened.rows(CatalogFilter(maker="aaaa")) == []


def test_a_touched_but_unchanged_file_keeps_its_motor(tmp_path: Path) -> None:
    root, path = _catalog_with(tmp_path, "Aaaa Motors (fictional)")
    first = Catalog(root).rows()[0].motor_id
    stat = path.stat()
    os.utime(path, ns=(stat.st_atime_ns, stat.st_mtime_ns + 2_000_000_000))
    assert Catalog(root).rows()[0].motor_id == first


def test_a_broken_file_is_reported_on_every_opening_until_fixed(tmp_path: Path) -> None:
    root, path = _catalog_with(tmp_path, "Aaaa Motors (fictional)")
    (root / "broken.xml").write_text("<motor-record", encoding="utf-8")
    for _ in range(3):  # read once, then remembered: reported each time without re-reading
        catalog = Catalog(root)
        assert [Path(p).name for p, _ in catalog.problems] == ["broken.xml"]
        catalog.close()
    (root / "broken.xml").unlink()
    assert Catalog(root).problems == []
