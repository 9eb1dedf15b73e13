"""Catalog tags: tags.json round trips, survives a reindex, and loses removed motors."""

from __future__ import annotations

from pathlib import Path

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


def _edit_by_hand(catalog: Catalog, motor: str, **changes: object) -> tuple[str, Path]:
    """Rewrite a motor's file in place with ``changes`` (as a user editing it would); its old id and its path.

    Without ``changes`` the thrust values are scaled by 1.01: the same motor (maker and designation), measured anew.
    """
    import dataclasses

    from motorlib import read_record, write_record

    row = next(r for r in catalog.rows() if r.designation == motor)
    path = catalog.root / row.path
    record = read_record(path)
    write_record(dataclasses.replace(record, **(changes or {"thrust_n": record.thrust_n * 1.01})), path)
    return row.motor_id, path


def test_a_curve_file_edited_in_place_keeps_its_tags(tmp_catalog: Catalog) -> None:
    # new-user trial: a motor's id is the hash of its file, so editing the file by hand gave it a new id and its
    # tags (kept by id in tags.json) silently no longer named it
    tmp_catalog.tag(["G59-10", "F29-8"], "in-stock")
    tmp_catalog.tag(["G59-10"], "club-box")
    old_id, path = _edit_by_hand(tmp_catalog, "G59-10")
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    new_id = reopened.resolve("G59-10")
    assert new_id != old_id
    assert sorted(r.designation for r in reopened.rows(CatalogFilter(tag="in-stock"))) == ["F29-8", "G59-10"]
    assert [r.designation for r in reopened.rows(CatalogFilter(tag="club-box"))] == ["G59-10"]
    assert all(old_id not in ids for ids in reopened.tags().values())  # the old id is gone from tags.json
    assert reopened.orphan_tags() == {}
    notes = [n for n in reopened.notices if old_id in n]
    assert len(notes) == 1 and new_id in notes[0] and str(path) in notes[0] and "club-box" in notes[0]
    again = Catalog(tmp_catalog.root)  # applied once: nothing more to say
    assert not [n for n in again.notices if old_id in n]
    assert again.tags() == reopened.tags()


def test_a_file_edited_while_the_catalog_is_open_keeps_its_tags(tmp_catalog: Catalog) -> None:
    tmp_catalog.tag(["F29-8"], "in-stock")
    _edit_by_hand(tmp_catalog, "F29-8")
    tmp_catalog.tag(["G59-10"], "in-stock")  # the write refreshes the index first, under the writer lock
    assert sorted(r.designation for r in tmp_catalog.rows(CatalogFilter(tag="in-stock"))) == ["F29-8", "G59-10"]


def test_a_file_replaced_by_a_copy_of_another_motor_leaves_its_tags_behind(tmp_catalog: Catalog) -> None:
    # new-user trial: `cp f29-8.xml e25-7.xml` (both tagged) moved E25-7's tag onto F29-8, a motor never given it.
    # Tags describe a motor ("in-stock"): a file that now holds another motor does not take its old tags along
    tmp_catalog.tag(["E25-7"], "in-stock")
    tmp_catalog.tag(["F29-8"], "club-box")
    rows = {r.designation: r for r in tmp_catalog.rows()}
    kept, replaced = rows["F29-8"], rows["E25-7"]
    (tmp_catalog.root / replaced.path).write_bytes((tmp_catalog.root / kept.path).read_bytes())
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    assert reopened.tags() == {"club-box": [kept.motor_id], "in-stock": [replaced.motor_id]}  # nothing moved
    assert not reopened.rows(CatalogFilter(tag="in-stock"))
    assert reopened.orphan_tags() == {"in-stock": [replaced.motor_id]}  # for catalog verify to report
    note = next(n for n in reopened.notices if replaced.motor_id in n)
    assert kept.motor_id in note and "E25-7" in note and "F29-8" in note and "in-stock" in note
    assert "not carried over" in note and "catalog verify" in note
    assert not [n for n in Catalog(tmp_catalog.root).notices if replaced.motor_id in n]  # said once


@pytest.mark.parametrize("changes", [{"maker": "Edited By Hand (fictional)"}, {"designation": "G60-10"}])
def test_a_file_edited_into_another_motor_leaves_its_tags_behind(changes: dict[str, str],
                                                                 tmp_catalog: Catalog) -> None:
    tmp_catalog.tag(["G59-10"], "in-stock")
    old_id, path = _edit_by_hand(tmp_catalog, "G59-10", **changes)
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    assert reopened.tags() == {"in-stock": [old_id]} and reopened.orphan_tags() == {"in-stock": [old_id]}
    note = next(n for n in reopened.notices if old_id in n)
    assert str(path) in note and "another motor" in note and "not carried over" in note


def test_a_maker_written_in_another_case_is_the_same_motor(tmp_catalog: Catalog) -> None:
    # the catalog compares makers and designations without regard to case (as its near-duplicate check does)
    tmp_catalog.tag(["G59-10"], "in-stock")
    row = next(r for r in tmp_catalog.rows() if r.designation == "G59-10")
    _edit_by_hand(tmp_catalog, "G59-10", maker=row.maker.upper())
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    assert [r.designation for r in reopened.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]
    assert reopened.orphan_tags() == {}


def test_the_index_remembers_which_motor_an_orphaned_id_was(tmp_catalog: Catalog) -> None:
    ids = tmp_catalog.tag(["G59-10", "F29-8"], "in-stock")
    gone = next(r for r in tmp_catalog.rows() if r.motor_id == ids[0])
    (tmp_catalog.root / gone.path).unlink()  # deleted by hand
    tmp_catalog.reindex()
    assert tmp_catalog.orphan_tags() == {"in-stock": [ids[0]]}
    assert tmp_catalog.former_motors([ids[0]]) == {ids[0]: f"G59-10 by {gone.maker}"}
    assert tmp_catalog.former_motors(["0123456789abcdef"]) == {}  # never seen: not known


def test_a_moved_file_keeps_its_tags(tmp_catalog: Catalog) -> None:
    ids = tmp_catalog.tag(["G59-10"], "in-stock")
    row = next(r for r in tmp_catalog.rows() if r.motor_id == ids[0])
    (tmp_catalog.root / row.path).rename(tmp_catalog.root / "moved-g59.xml")
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    assert reopened.tags() == {"in-stock": ids}
    assert [r.path for r in reopened.rows(CatalogFilter(tag="in-stock"))] == ["moved-g59.xml"]


def test_an_edit_under_a_damaged_tags_file_waits_for_it_to_be_mended(tmp_catalog: Catalog) -> None:
    tmp_catalog.tag(["G59-10"], "in-stock")
    good = (tmp_catalog.root / "tags.json").read_bytes()
    damaged = b'{"in-stock": ["abc"'
    (tmp_catalog.root / "tags.json").write_bytes(damaged)
    old_id, _ = _edit_by_hand(tmp_catalog, "G59-10")
    tmp_catalog.close()
    reopened = Catalog(tmp_catalog.root)
    assert (tmp_catalog.root / "tags.json").read_bytes() == damaged  # never written over
    assert str(tmp_catalog.root / "tags.json") in [where for where, _ in reopened.problems]
    assert any(old_id in n and "mended" in n for n in reopened.notices)
    reopened.close()
    (tmp_catalog.root / "tags.json").write_bytes(good)  # mended: the id change is carried over now
    mended = Catalog(tmp_catalog.root)
    assert [r.designation for r in mended.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]
    assert mended.orphan_tags() == {}


def test_an_id_change_left_by_a_killed_process_is_carried_over_next_time(tmp_catalog: Catalog,
                                                                          monkeypatch: pytest.MonkeyPatch) -> None:
    # the index notes the change of id in the transaction that indexes the new content; a process killed before
    # it moved the tags leaves the note, and the next open moves them
    tmp_catalog.tag(["G59-10"], "in-stock")
    _edit_by_hand(tmp_catalog, "G59-10")
    tmp_catalog.close()
    with monkeypatch.context() as patch:
        patch.setattr(Catalog, "_carry_tags", lambda self: None)  # killed after the index committed
        Catalog(tmp_catalog.root).close()
    reopened = Catalog(tmp_catalog.root)
    assert [r.designation for r in reopened.rows(CatalogFilter(tag="in-stock"))] == ["G59-10"]
    assert reopened.orphan_tags() == {}
