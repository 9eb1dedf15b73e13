"""Catalog queries: filters, sorting, class ranges, the DataFrame, and a motor pack built from the index."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from motorlib.catalog import Catalog, CatalogFilter, parse_class_range
from motorlib.flight import MotorPack, simulate
from motorlib.motor import ROW_COLUMNS, CatalogRow


def test_filters_and_sorting(tmp_catalog: Catalog) -> None:
    f = CatalogFilter(impulse_range_ns=(40.0, 160.0), burn_range_s=(1.0, 2.0), maker="bramble")
    rows = tmp_catalog.rows(f, sort="average_thrust_n", descending=True)
    thrusts = [r.average_thrust_n for r in rows]
    assert thrusts == sorted(thrusts, reverse=True) and len(rows) == 4
    assert all(40 <= r.total_impulse_ns <= 160 and 1 <= r.burn_time_s <= 2 for r in rows)
    delays = tmp_catalog.rows(CatalogFilter(delay_s=6.0))
    # listed 6 s, or adjustable with a longest delay of 6 s or more
    assert {r.designation for r in delays} >= {"B5-2,4,6", "E9-4,6,8", "G59-10"}
    assert "C6-3,5,7" not in {r.designation for r in delays}
    # one delay rule with the flight (issue 17): an adjustable delay is drilled in whole 1 s steps, so 5.5 s is
    # offered by no adjustable motor, though G59-10's 10 s reaches it
    assert "G59-10" not in {r.designation for r in tmp_catalog.rows(CatalogFilter(delay_s=5.5))}
    assert tmp_catalog.rows(CatalogFilter(text="boost-sustain"))  # notes are searched
    assert parse_class_range("d..g") == ("D", "G") and parse_class_range("1/2a") == ("1/2A", "1/2A")
    with pytest.raises(ValueError, match="class range"):
        parse_class_range("Q..Z")
    frame = tmp_catalog.query(CatalogFilter(class_range=("M", "M")))
    assert list(frame["designation"]) == ["M2158-P", "M2578-P"]


def test_pack_from_the_index_flies_like_the_records(tmp_catalog: Catalog) -> None:
    rows = tmp_catalog.rows(CatalogFilter(diameter_m=0.029))
    pack = tmp_catalog.motor_pack(rows)
    records = [tmp_catalog.get(r.motor_id) for r in rows]
    frames, _ = __import__("tests.synthetic", fromlist=["x"]).synthetic_flights(1)
    a = simulate(frames[0], pack, descent=False)
    b = simulate(frames[0], MotorPack.from_records(records), descent=False)
    np.testing.assert_array_equal(a.apogee_m, b.apogee_m)


def test_rows_are_typed_records_that_survive_the_index(tmp_catalog: Catalog) -> None:
    # Issue 17: rows were dicts with JSON-decoded fields; a row read back from SQLite equals the one built from
    # the record itself, findings included.
    rows = tmp_catalog.rows()
    assert rows and all(isinstance(r, CatalogRow) for r in rows)
    for row in rows:
        rebuilt = CatalogRow.from_record(tmp_catalog.get(row.motor_id), row.motor_id, path=row.path,
                                         settings=tmp_catalog.settings)
        assert row == rebuilt
    frame = tmp_catalog.query()
    assert list(frame.columns) == [c for c in ROW_COLUMNS if c != "motor_id"] and len(frame) == len(rows)


def test_rows_without_findings_are_the_same_rows(tmp_catalog: Catalog) -> None:
    # The ranking reads rows without their findings (speed, issue 16): the same rows, in the same order, through
    # the same filters, with findings None and the counts kept.
    for where in (None, CatalogFilter(diameter_m=0.029), CatalogFilter(delay_s=6.0)):
        full = tmp_catalog.rows(where)
        light = tmp_catalog.rows(where, findings=False)
        assert full and [replace(r, findings=None) for r in full] == light


@pytest.mark.parametrize("share", [0, 10**9], ids=["looked-up-by-id", "one-pass-over-the-table"])
def test_samples_and_packs_are_the_same_however_the_blobs_are_read(
        tmp_catalog: Catalog, share: int, monkeypatch: pytest.MonkeyPatch) -> None:
    # Issue 16: most of the catalog is read in one pass over the table, a few motors by id; either gives each
    # motor its own samples, in the order of the rows.
    from motorlib.catalog import query

    rows = tmp_catalog.rows()
    few = rows[::7]
    monkeypatch.setattr(query, "_SCAN_ABOVE_SHARE", share)
    for chosen in (rows, few):
        samples = tmp_catalog.samples([r.motor_id for r in chosen])
        assert set(samples) == {r.motor_id for r in chosen}
        for row in chosen:
            record = tmp_catalog.get(row.motor_id)
            np.testing.assert_array_equal(samples[row.motor_id][0], record.time_s)
            np.testing.assert_array_equal(samples[row.motor_id][1], record.thrust_n)
        pack = tmp_catalog.motor_pack(chosen)
        expected = MotorPack.from_records([tmp_catalog.get(r.motor_id) for r in chosen])
        np.testing.assert_array_equal(pack.time_s, expected.time_s)
        np.testing.assert_array_equal(pack.thrust_n, expected.thrust_n)
