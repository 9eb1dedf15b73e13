"""The motor-record XML format: round trips to ten digits, safety, errors that name file, line and field."""

from __future__ import annotations

import os
from typing import Callable
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from lxml import etree

from motorlib import (
    CurveDataError,
    CurveSyntaxError,
    MotorRecord,
    SchemaValidationError,
    read_record,
    record_from_bytes,
    record_to_bytes,
    write_record,
)
from motorlib.files.motor_xml import FORMAT_VERSION
from motorlib.files.schema import schema_path
from motorlib.motor.record import FORMER_PROVENANCE_KINDS, PROVENANCE_KINDS

from ..conftest import full_records
from ..synthetic import synthetic_motors


@given(full_records())
@settings(max_examples=150, suppress_health_check=[HealthCheck.too_slow])
def test_round_trip_keeps_ten_digits_and_is_byte_stable(record: MotorRecord) -> None:
    data = record_to_bytes(record)
    again = record_from_bytes(data)
    assert again.designation == record.designation and again.provenance == record.provenance
    assert again.time_s == pytest.approx(record.time_s, rel=1e-9, abs=1e-300)
    assert again.thrust_n == pytest.approx(record.thrust_n, rel=1e-9, abs=1e-300)
    assert again.delays_s == pytest.approx(record.delays_s, rel=1e-9)
    # hardware values stay exact (mm and g when that is exact)
    assert (again.diameter_m, again.total_mass_kg) == (record.diameter_m, record.total_mass_kg)
    assert record_to_bytes(again) == data  # byte-stable
    assert record_from_bytes(data) == again


@given(full_records())
@settings(max_examples=60, suppress_health_check=[HealthCheck.too_slow])
def test_every_written_record_validates_against_the_xsd(record: MotorRecord) -> None:
    # Checked with lxml directly, independent of our reader: 1.1 items included.
    xsd = etree.XMLSchema(etree.parse(str(schema_path())))
    assert xsd.validate(etree.fromstring(record_to_bytes(record))), xsd.error_log


def test_round_trip_through_a_file(demo_record: MotorRecord, tmp_path: Path) -> None:
    path = write_record(demo_record, tmp_path / "d12.xml")
    assert read_record(path) == demo_record
    assert [p.name for p in tmp_path.iterdir()] == ["d12.xml"]  # no temporary file left


def test_awkward_floats_round_trip(tmp_path: Path) -> None:
    record = MotorRecord("C6", [0.0, 0.1 + 0.2, 1 / 3], [0.0, 1e-300, 5e-324 * 3],
                         diameter_m=0.1 + 0.2, total_mass_kg=1 / 3, propellant_mass_kg=1e-9)
    again = record_from_bytes(record_to_bytes(record))
    assert again.time_s == pytest.approx(record.time_s, rel=1e-9) and again.total_mass_kg == record.total_mass_kg


def test_written_numbers_have_sensible_precision() -> None:
    # Issue 14: a reduced curve was written with times like 0.0009999999999998899.
    record = MotorRecord("C6", [0.0, 1.001 - 1.0, 0.1 + 0.2, 1.5], [0.0, 3.0000000000000004, 12.0, 0.0],
                         delays_s=(0.1 + 0.2,))
    text = record_to_bytes(record).decode()
    assert "0.0009999999999998899" not in text and "\n    0.001 3.0\n" in text and "0.3 12.0" in text
    assert '<delays unit="s">0.3</delays>' in text


def test_ten_digits_never_merge_two_sample_times() -> None:
    times = [0.0, 1.0, 1.0 + 1e-11, 2.0]  # closer than ten digits can tell apart: written in full
    record = MotorRecord("C6", times, [0.0, 5.0, 5.0, 0.0])
    assert record_from_bytes(record_to_bytes(record)) == record


def test_written_files_use_mm_and_g_when_exact(demo_record: MotorRecord) -> None:
    text = record_to_bytes(demo_record).decode()
    assert '<diameter unit="mm">24.0</diameter>' in text
    assert '<total-mass unit="g">44.0</total-mass>' in text


def test_written_files_validate_against_the_xsd(demo_record: MotorRecord) -> None:
    # The XSD is checked with lxml directly, independent of our reader.
    xsd = etree.XMLSchema(etree.parse(str(schema_path())))
    assert xsd.validate(etree.fromstring(record_to_bytes(demo_record)))


def test_sample_files_are_stable_under_rewrite(sample_curve_paths: list[Path]) -> None:
    for path in sample_curve_paths:
        assert record_to_bytes(read_record(path)) == path.read_bytes(), path


@pytest.mark.parametrize("name", ["billion_laughs.xml", "external_entity.xml"])
def test_entity_tricks_are_refused(fixture_dir: Path, name: str) -> None:
    with pytest.raises(CurveSyntaxError, match=r"2: <!DOCTYPE> declarations are not allowed") as info:
        read_record(fixture_dir / name)
    assert name in str(info.value)


def test_entity_declaration_without_doctype_is_refused() -> None:
    with pytest.raises(CurveSyntaxError, match="ENTITY"):
        record_from_bytes(b'<?xml version="1.0"?>\n<!ENTITY x "y">\n<motor-record/>')


def test_size_cap(tmp_path: Path, demo_record: MotorRecord) -> None:
    path = write_record(demo_record, tmp_path / "big.xml")
    with pytest.raises(CurveSyntaxError, match="limit of 100 bytes"):
        read_record(path, max_bytes=100)


def test_not_well_formed_names_the_line(fixture_dir: Path) -> None:
    with pytest.raises(CurveSyntaxError, match=r"not_well_formed.xml:\d+: not well-formed XML") as info:
        read_record(fixture_dir / "not_well_formed.xml")
    assert info.value.line == 3


@pytest.mark.parametrize(("name", "field", "text"), [
    ("bad_length_unit.xml", "/motor-record/hardware/diameter", "'in' is not an element of the set"),
    ("missing_designation.xml", "/motor-record/identity", "designation"),
    ("unknown_element.xml", "/motor-record/colour", "not expected"),
    ("wrong_root.xml", "/thrust-table", "expected <motor-record>"),
    ("future_major_version.xml", "/motor-record", "format version 2"),
])
def test_schema_errors_name_line_and_field(fixture_dir: Path, name: str, field: str, text: str) -> None:
    with pytest.raises(SchemaValidationError, match=text) as info:
        read_record(fixture_dir / name)
    assert info.value.field == field
    assert info.value.line is not None
    assert str(info.value).startswith(f"{fixture_dir / name}:{info.value.line}: {field}: ")


def test_sample_errors_name_the_file_line(fixture_dir: Path) -> None:
    path = fixture_dir / "bad_time_order.xml"
    with pytest.raises(CurveDataError) as info:
        read_record(path)
    line = next(i for i, row in enumerate(path.read_text().splitlines(), 1) if row.strip() == "0.2 11.0")
    assert info.value.line == line
    assert str(info.value).startswith(f"{path}:{line}: time_s: ")


def test_hardware_errors_name_the_element_line(fixture_dir: Path) -> None:
    path = fixture_dir / "negative_diameter.xml"
    with pytest.raises(CurveDataError, match="diameter_m: must be a positive") as info:
        read_record(path)
    assert info.value.line == 4


def test_failed_write_leaves_the_old_file(demo_record: MotorRecord, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    path = write_record(demo_record, tmp_path / "d12.xml")
    before = path.read_bytes()

    def boom(*args: object) -> None:
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", boom)
    other = MotorRecord("E20", [0.0, 1.0, 2.0], [0.0, 20.0, 0.0])
    with pytest.raises(OSError, match="disk full"):
        write_record(other, path)
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["d12.xml"]


def test_refuses_to_overwrite_when_asked(demo_record: MotorRecord, tmp_path: Path) -> None:
    path = write_record(demo_record, tmp_path / "d12.xml")
    with pytest.raises(FileExistsError):
        write_record(demo_record, path, overwrite=False)


def test_written_files_get_ordinary_permissions(demo_record: MotorRecord, tmp_path: Path) -> None:
    mask = os.umask(0)
    os.umask(mask)
    path = write_record(demo_record, tmp_path / "d12.xml")
    assert os.stat(path).st_mode & 0o777 == 0o666 & ~mask  # not mkstemp's 0600
    os.chmod(path, 0o640)
    write_record(demo_record, path)
    assert os.stat(path).st_mode & 0o777 == 0o640  # an overwrite keeps the file's mode


# ------------------------------------------------------------------------------------ format 1.1
def test_new_files_declare_version_1_1(demo_record: MotorRecord) -> None:
    assert FORMAT_VERSION == "1.1"
    assert b'format-version="1.1"' in record_to_bytes(demo_record)


def test_provenance_kinds_are_our_own_words() -> None:
    assert PROVENANCE_KINDS == ("approval-firing", "maker-published", "own-firing", "demo", "other")
    assert FORMER_PROVENANCE_KINDS == {"certification-test": "approval-firing", "maker-data": "maker-published",
                                       "static-test": "own-firing"}


@pytest.mark.parametrize(("old", "new"), [("certification-test", "approval-firing"),
                                          ("maker-data", "maker-published"), ("static-test", "own-firing")])
def test_former_provenance_kinds_are_read_and_written_in_the_new_words(fixture_dir: Path, old: str, new: str) -> None:
    data = (fixture_dir / "v1_0_own_stand_kind.xml").read_bytes().replace(b'"static-test"', f'"{old}"'.encode())
    record = record_from_bytes(data)
    assert record.provenance.kind == new
    assert f'kind="{new}"'.encode() in record_to_bytes(record) and old.encode() not in record_to_bytes(record)


@pytest.mark.parametrize("kind", PROVENANCE_KINDS)
def test_each_provenance_kind_round_trips(demo_record: MotorRecord, kind: str) -> None:
    from dataclasses import replace

    record = replace(demo_record, provenance=replace(demo_record.provenance, kind=kind))
    assert record_from_bytes(record_to_bytes(record)).provenance.kind == kind


def test_an_unknown_provenance_kind_is_a_schema_error(fixture_dir: Path) -> None:
    with pytest.raises(SchemaValidationError, match="rumour") as info:
        read_record(fixture_dir / "bad_provenance_kind.xml")
    assert info.value.field == "/motor-record/provenance"


def test_a_1_0_file_without_ejection_still_means_no_charge(fixture_dir: Path) -> None:
    # The 1.0 meaning (FORMAT.md): an absent <ejection> is a motor without an ejection charge.
    record = read_record(fixture_dir / "v1_0_no_ejection.xml")
    assert record.ejection == "no-charge" and record.no_ejection_charge and record.delays_s == ()
    assert b'<ejection charge="none"/>' in record_to_bytes(record)  # said explicitly from 1.1 on


def test_a_1_0_ejection_without_delays_means_delays_not_given(fixture_dir: Path) -> None:
    record = read_record(fixture_dir / "v1_0_ejection_without_delays.xml")
    assert record.ejection == "unknown" and record.delay_adjustable


def test_a_1_0_file_keeps_its_values(fixture_dir: Path) -> None:
    old = read_record(fixture_dir / "sound_d12.xml")
    assert old.delays_s == (5.0,) and old.ejection == "delays" and old.firing_spread is None
    assert record_from_bytes(record_to_bytes(old)) == old


def test_a_1_1_file_says_no_charge_explicitly(fixture_dir: Path) -> None:
    record = read_record(fixture_dir / "v1_1_no_charge.xml")
    assert record.ejection == "no-charge"
    assert record_from_bytes(record_to_bytes(record)) == record


def test_a_1_1_file_without_ejection_has_unknown_delays(fixture_dir: Path) -> None:
    record = read_record(fixture_dir / "v1_1_unknown_delays.xml")
    assert record.ejection == "unknown" and not record.no_ejection_charge
    data = record_to_bytes(record)
    assert b"<ejection" not in data
    assert record_from_bytes(data).ejection == "unknown"


def test_no_charge_with_delays_is_refused_with_its_line(fixture_dir: Path) -> None:
    with pytest.raises(CurveDataError, match="without an ejection charge cannot list delays") as info:
        read_record(fixture_dir / "no_charge_with_delays.xml")
    assert info.value.line == 5


def test_the_firing_spread_is_read_and_round_trips(fixture_dir: Path) -> None:
    record = read_record(fixture_dir / "v1_1_firing_spread.xml")
    spread = record.firing_spread
    assert (spread.n_firings, spread.total_impulse_mean_ns, spread.total_impulse_std_ns) == (3, 16.6, 0.33)
    assert (spread.burn_time_mean_s, spread.burn_time_std_s) == (1.43, 0.029)
    assert record.provenance.kind == "own-firing"
    data = record_to_bytes(record)
    assert record_from_bytes(data) == record
    assert b'<firing-spread firings="3">' in data


def test_a_spread_of_one_firing_is_refused_with_its_line(fixture_dir: Path) -> None:
    with pytest.raises(CurveDataError, match="firing_spread") as info:
        read_record(fixture_dir / "single_firing_spread.xml")
    assert info.value.line == 7


@pytest.mark.parametrize("name", ["v1_1_no_charge.xml", "v1_1_unknown_delays.xml", "v1_1_firing_spread.xml",
                                  "v1_0_no_ejection.xml", "v1_0_ejection_without_delays.xml",
                                  "v1_0_own_stand_kind.xml", "sound_d12.xml"])
def test_written_1_1_files_validate_against_the_xsd(fixture_dir: Path, name: str) -> None:
    xsd = etree.XMLSchema(etree.parse(str(schema_path())))
    assert xsd.validate(etree.fromstring((fixture_dir / name).read_bytes()))
    assert xsd.validate(etree.fromstring(record_to_bytes(read_record(fixture_dir / name))))


def test_a_later_minor_version_is_read_like_1_1(fixture_dir: Path) -> None:
    data = (fixture_dir / "v1_1_unknown_delays.xml").read_bytes().replace(b'"1.1"', b'"1.7"')
    assert record_from_bytes(data).ejection == "unknown"


def _tree_record_to_bytes(record: MotorRecord) -> bytes:
    """The writer as it was before issue 16, through an lxml tree: the oracle the text writer must match byte
    for byte (every catalog id is a hash of these bytes)."""
    from motorlib.files.motor_xml import _Q, _NS, _exact_text, _sample_rows, _short

    root = etree.Element(_Q + "motor-record", nsmap={None: _NS})
    root.set("format-version", FORMAT_VERSION)
    identity = etree.SubElement(root, _Q + "identity")
    if record.maker:
        etree.SubElement(identity, _Q + "maker").text = record.maker
    etree.SubElement(identity, _Q + "designation").text = record.designation
    hardware_fields = (
        ("diameter", record.diameter_m, (("mm", 1e3), ("m", 1.0)), "length"),
        ("length", record.length_m, (("mm", 1e3), ("m", 1.0)), "length"),
        ("total-mass", record.total_mass_kg, (("g", 1e3), ("kg", 1.0)), "mass"),
        ("propellant-mass", record.propellant_mass_kg, (("g", 1e3), ("kg", 1.0)), "mass"),
    )
    if any(value is not None for _, value, _, _ in hardware_fields):
        hardware = etree.SubElement(root, _Q + "hardware")
        for name, value, choices, kind in hardware_fields:
            if value is not None:
                text, unit = _exact_text(value, choices, kind)
                etree.SubElement(hardware, _Q + name, unit=unit).text = text
    if record.no_ejection_charge:
        etree.SubElement(root, _Q + "ejection", charge="none")
    elif record.delays_s or record.delay_adjustable:
        ejection = etree.SubElement(root, _Q + "ejection", adjustable="true" if record.delay_adjustable else "false")
        if record.delays_s:
            etree.SubElement(ejection, _Q + "delays", unit="s").text = " ".join(_short(d) for d in record.delays_s)
    p = record.provenance
    provenance = etree.SubElement(root, _Q + "provenance", kind=p.kind)
    if p.date is not None:
        provenance.set("date", p.date.isoformat())
    if p.notes:
        etree.SubElement(provenance, _Q + "notes").text = p.notes
    if record.firing_spread is not None:
        f = record.firing_spread
        spread = etree.SubElement(root, _Q + "firing-spread", firings=str(f.n_firings))
        for name, value, unit in (("total-impulse-mean", f.total_impulse_mean_ns, "N.s"),
                                  ("total-impulse-standard-deviation", f.total_impulse_std_ns, "N.s"),
                                  ("burn-time-mean", f.burn_time_mean_s, "s"),
                                  ("burn-time-standard-deviation", f.burn_time_std_s, "s")):
            etree.SubElement(spread, _Q + name, unit=unit).text = _short(value)
    samples = etree.SubElement(root, _Q + "samples")
    samples.set("time-unit", "s")
    samples.set("thrust-unit", "N")
    etree.indent(root, space="  ")
    samples.text = "\n" + "\n".join(_sample_rows(record.time_s, record.thrust_n)) + "\n  "
    return etree.tostring(root, xml_declaration=True, encoding="UTF-8", pretty_print=True)


def _same_bytes_or_same_refusal(record: MotorRecord) -> None:
    try:
        expected = _tree_record_to_bytes(record)
    except ValueError:  # a character XML cannot carry (a control character, a lone surrogate)
        with pytest.raises(ValueError):
            record_to_bytes(record)
        return
    assert record_to_bytes(record) == expected


def test_the_writer_gives_the_bytes_of_the_tree_writer_for_every_sample_and_fixture(
        sample_curve_paths: list[Path], fixture_dir: Path) -> None:
    # Issue 16: the text writer replaced an lxml tree; a catalog id is the hash of these bytes, so not one may change.
    paths = [*sample_curve_paths, *sorted(fixture_dir.glob("*.xml"))]
    n_read = 0
    for path in paths:
        try:
            record = read_record(path)
        except (CurveSyntaxError, SchemaValidationError, CurveDataError):
            continue  # a fixture of a broken file
        _same_bytes_or_same_refusal(record)
        n_read += 1
    assert n_read >= len(sample_curve_paths) + 10
    for record in synthetic_motors(40, seed=16):  # the benchmark's curves: every shape, hardware and delay mix
        _same_bytes_or_same_refusal(record)


_AWKWARD = ["&", "<", ">", '"', "'", "]]>", "a & b < c > d", "\r", "a\r\nb", "\n", "\t", " x ", "   ", "\x7f",
            "\x85", "\u2028", "\u00e9\u00df\u4e2d", "\U0001f680", "&amp;", "<notes>", "\x01", "\x00", "\x0b", "\x1f",
            "\ud800", "\ufffe", "\uffff", "\ufffd", "\ue000", "\U0010ffff"]


def _written_or_refused(make: Callable[[], MotorRecord], text: str) -> None:
    """The record ``make()`` builds writes the tree writer's bytes; or, where ``text`` holds a character no curve
    file can carry, the record itself refuses it (a CurveDataError naming the field), before any writer."""
    from motorlib.motor.record import UNWRITABLE_CHARACTER

    try:
        record = make()
    except CurveDataError as exc:
        assert UNWRITABLE_CHARACTER.search(text) and "cannot carry" in str(exc)
        return
    assert not UNWRITABLE_CHARACTER.search(text)
    _same_bytes_or_same_refusal(record)


@pytest.mark.parametrize("text", _AWKWARD)
def test_the_writer_escapes_text_as_the_tree_writer_did(demo_record: MotorRecord, text: str) -> None:
    from dataclasses import replace

    _written_or_refused(lambda: replace(demo_record, maker=text), text)
    _written_or_refused(lambda: replace(demo_record, designation="D12 " + text), text)
    _written_or_refused(lambda: replace(demo_record, provenance=replace(demo_record.provenance, notes=text)), text)


@given(full_records(), st.text(max_size=12), st.text(max_size=12))
@settings(max_examples=200, suppress_health_check=[HealthCheck.too_slow])
def test_the_writer_gives_the_bytes_of_the_tree_writer(record: MotorRecord, maker: str, notes: str) -> None:
    from dataclasses import replace

    _same_bytes_or_same_refusal(record)
    _written_or_refused(lambda: replace(record, maker=maker, provenance=replace(record.provenance, notes=notes)),
                        maker + notes)


def test_bytes_already_read_are_not_parsed_again(demo_record: MotorRecord, tmp_path: Path,
                                                 monkeypatch: pytest.MonkeyPatch) -> None:
    # Issue 16: a catalog add read, parsed and validated each file, then parsed its own copy of the same bytes.
    from motorlib.files import motor_xml

    path = write_record(demo_record, tmp_path / "d12.xml")
    record, data = motor_xml.read_record_and_bytes(path)
    assert record == demo_record and data == path.read_bytes()
    parsed = []
    monkeypatch.setattr(motor_xml, "_valid_tree", lambda *args: parsed.append(args))
    assert motor_xml.readable_record_bytes(record, str(path), read_from=data) == data and not parsed
    motor_xml.readable_record_bytes(record, str(path), read_from=data.replace(b"  ", b" "))  # not canonical
    assert len(parsed) == 1


def test_bytes_read_elsewhere_do_not_spare_the_checks(demo_record: MotorRecord) -> None:
    from dataclasses import replace

    from motorlib.files.motor_xml import readable_record_bytes

    too_long = replace(demo_record, maker="M" * 501)  # over the schema's 500 characters
    with pytest.raises(SchemaValidationError, match="cannot be written"):
        readable_record_bytes(too_long, "m.xml", read_from=record_to_bytes(demo_record))
