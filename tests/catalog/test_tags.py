"""Catalog tags: tags.json round trips, survives a reindex, and loses removed motors."""

from __future__ import annotations

import pytest

from motorlib.catalog import Catalog, CatalogFilter
from motorlib.errors import CatalogError


def test_tags_round_trip_and_survive_reindex(tmp_catalog: Catalog) -> None:
    tmp_catalog.tag(["G59-10", "F29-8"], "in-stock")
    tmp_catalog.untag(["F29-8"], "in-stock")
    assert tmp_catalog.reindex() == 27
    assert [r.designation for r in tmp_catalog.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]
    assert list(tmp_catalog.tags()) == ["in-stock"]
    with pytest.raises(CatalogError, match="tag"):
        tmp_catalog.tag(["G59-10"], "bad tag!")
    tmp_catalog.remove("G59-10")
    assert tmp_catalog.tags() == {} and len(tmp_catalog) == 26


def test_orphan_tags_name_the_ids_whose_files_are_gone(tmp_catalog: Catalog) -> None:
    ids = tmp_catalog.tag(["G59-10", "F29-8"], "in-stock")
    tmp_catalog.tag(["F29-8"], "club-box")
    assert tmp_catalog.orphan_tags() == {}
    gone = next(r for r in tmp_catalog.rows() if r.motor_id == ids[0])
    (tmp_catalog.root / gone.path).unlink()  # deleted by hand, not through remove()
    tmp_catalog.reindex()
    assert tmp_catalog.orphan_tags() == {"in-stock": [ids[0]]}


def test_a_damaged_tags_file_is_reported_not_fatal_and_never_written_over(tmp_catalog: Catalog) -> None:
    # new-user trial: a damaged tags.json stopped every command on the catalog (match, list, fly), against the
    # README's "a file motorlib cannot use is reported and skipped, never fatal to a catalog"
    tmp_catalog.tag(["G59-10"], "in-stock")
    damaged = b'{"in-stock": ["abc"'  # cut short
    (tmp_catalog.root / "tags.json").write_bytes(damaged)
    reopened = Catalog(tmp_catalog.root)
    assert [where for where, _ in reopened.problems] == [str(tmp_catalog.root / "tags.json")]
    assert "not a valid tags file" in reopened.problems[0][1] and "ignored" in reopened.problems[0][1]
    assert len(reopened.rows()) == 27 and not reopened.rows(CatalogFilter(tag="in-stock"))
    with pytest.raises(CatalogError, match="tags.json: not a valid tags file"):
        reopened.tag(["G59-10"], "spare")  # a change would write over what is left of the file
    assert (tmp_catalog.root / "tags.json").read_bytes() == damaged
    assert Catalog(tmp_catalog.root).problems  # still reported on the next open, until mended
