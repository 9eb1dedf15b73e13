"""The catalog row record: typed, frozen, built from a record, a dict only at the output edge (issue 17)."""

from __future__ import annotations

import dataclasses
import json

import pytest

from motorlib import MotorRecord, read_record
from motorlib.motor import ROW_COLUMNS, CatalogRow, CheckSettings, check_record
from motorlib.motor.classes import CLASS_LETTERS

from ..conftest import SAMPLE_DIR

G59 = SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"


def test_a_row_outside_a_catalog_is_named_by_its_designation() -> None:
    record = read_record(G59)
    row = CatalogRow.from_record(record, "record-0")
    assert (row.motor_id, row.handle, row.path) == ("record-0", record.designation, None)
    assert row.impulse_class == "G" and row.class_index == CLASS_LETTERS.index("G")
    assert row.total_impulse_ns == record.total_impulse_ns and row.delays_s == record.delays_s
    assert row.findings == tuple(check_record(record)) and row.n_errors == 0


def test_a_row_in_a_catalog_takes_its_handle_from_the_path() -> None:
    row = CatalogRow.from_record(read_record(G59), "abc", path="maker/g59-10.xml", findings=())
    assert (row.handle, row.path, row.findings, row.n_warnings) == ("maker/g59-10", "maker/g59-10.xml", (), 0)


def test_the_burn_threshold_comes_from_the_settings() -> None:
    # a 20 % threshold cuts more of the ramps than the default 5 %: a shorter burn and a higher average thrust
    record = MotorRecord("T", [0.0, 0.5, 1.5, 2.0], [0.0, 10.0, 10.0, 0.0], total_mass_kg=0.1,
                         propellant_mass_kg=0.05)
    low = CatalogRow.from_record(record, "a", findings=())
    high = CatalogRow.from_record(record, "a", settings=CheckSettings(burn_threshold=0.2), findings=())
    # closed form for this trapezoid: the window runs from 0.5·f to 2 - 0.5·f, f the threshold
    assert low.burn_time_s == pytest.approx(2.0 - 0.05, rel=1e-12)
    assert high.burn_time_s == pytest.approx(2.0 - 0.2, rel=1e-12)
    assert high.average_thrust_n > low.average_thrust_n


def test_a_row_is_frozen_and_owns_immutable_sequences() -> None:
    delays = [4.0, 6.0]
    row = dataclasses.replace(CatalogRow.from_record(read_record(G59), "x", findings=()), delays_s=delays)
    delays.append(8.0)
    assert row.delays_s == (4.0, 6.0)
    with pytest.raises(dataclasses.FrozenInstanceError):
        row.diameter_m = 0.024  # type: ignore[misc]


def test_as_dict_is_plain_json_in_column_order() -> None:
    record = read_record(G59)
    data = CatalogRow.from_record(record, "x", path="g.xml").as_dict()
    assert tuple(data) == ROW_COLUMNS
    assert data["delays_s"] == list(record.delays_s) and isinstance(data["findings"], list)
    assert json.loads(json.dumps(data)) == data


@pytest.mark.parametrize("findings", [None, "listed"])
def test_from_columns_builds_the_same_rows_as_the_constructor(findings) -> None:
    # issue 16: the catalog's batch builder, pinned to the constructor field by field and in type
    record = read_record(G59)
    rows = [CatalogRow.from_record(record, "abc", path="maker/g59-10.xml"), CatalogRow.from_record(record, "def")]
    columns = [[1 if name == "delay_adjustable" else "unread" if name in ("delays_s", "findings") else value
                for name, value in row.__dict__.items()] for row in rows]  # as the index's columns give them
    delays = [[int(d) for d in row.delays_s] for row in rows]
    found = [None if findings is None else list(row.findings) for row in rows]
    fast = CatalogRow.from_columns(columns, delays, found)
    slow = [CatalogRow(**dict(row.__dict__, delays_s=d, delay_adjustable=1, findings=f))
            for row, d, f in zip(rows, delays, found)]
    assert fast == slow and [r.as_dict() for r in fast] == [r.as_dict() for r in slow]
    for row in fast:
        assert list(row.__dict__) == list(ROW_COLUMNS)
        assert type(row.delays_s) is tuple and all(type(d) is float for d in row.delays_s)
        assert row.delay_adjustable is True and (row.findings is None or type(row.findings) is tuple)
        with pytest.raises(dataclasses.FrozenInstanceError):
            row.maker = "x"  # type: ignore[misc]

