"""Every finding code, triggered by a fixture named for its defect; tolerances are settings."""

from __future__ import annotations

from pathlib import Path

import pytest

from motorlib import CheckSettings, CurveMetadata, MotorRecord, check_file, check_record

# fixture file -> the code it must produce (and, for valid records, the only non-note codes it produces)
RECORD_INVARIANTS = {
    "bad_time_order.xml": "time-not-increasing", "negative_time.xml": "time-negative",
    "negative_thrust.xml": "thrust-negative", "nan_thrust.xml": "thrust-not-finite",
    "one_sample.xml": "too-few-samples", "zero_thrust.xml": "no-thrust", "bad_sample_row.xml": "sample-row",
    "propellant_over_total.xml": "propellant-exceeds-total-mass", "negative_diameter.xml": "hardware-not-positive",
    "negative_delay.xml": "delay-not-positive", "repeated_delay.xml": "delay-repeated",
    "nan_time.xml": "time-not-finite", "blank_designation.xml": "designation-missing",
}
CHECK_FINDINGS = {
    "class_mismatch.xml": ("error", "class-mismatch"),
    "average_thrust_mismatch.xml": ("error", "average-thrust-mismatch"),
    "total_impulse_mismatch.xml": ("warning", "total-impulse-mismatch"),
    "designation_unreadable.xml": ("warning", "designation-unreadable"),
    "delays_differ_from_label.xml": ("warning", "delays-differ-from-label"),
    "few_samples.xml": ("warning", "few-samples"),
    "start_not_near_zero.xml": ("warning", "start-not-near-zero"),
    "end_not_near_zero.xml": ("warning", "end-not-near-zero"),
    "isp_implausible.xml": ("warning", "isp-implausible"),
    "burn_time_implausible.xml": ("warning", "burn-time-implausible"),
    "beyond_class_o.xml": ("warning", "beyond-class-o"),
    "hardware_incomplete.xml": ("note", "hardware-incomplete"),
    "high_power.xml": ("note", "high-power"),
}
UNREADABLE = ["not_well_formed.xml", "billion_laughs.xml", "external_entity.xml", "wrong_root.xml",
              "future_major_version.xml", "missing_designation.xml", "bad_length_unit.xml", "unknown_element.xml",
              "ragged_row.csv", "not_a_number.csv"]


def test_the_sound_fixture_has_no_findings(fixture_dir: Path) -> None:
    report = check_file(fixture_dir / "sound_d12.xml")
    assert report.ok and report.findings == ()


@pytest.mark.parametrize(("name", "code"), RECORD_INVARIANTS.items())
def test_record_invariants_become_error_findings_with_lines(fixture_dir: Path, name: str, code: str) -> None:
    report = check_file(fixture_dir / name)
    assert report.readable and not report.ok and report.record is None
    assert [f.code for f in report.findings] == [code]
    assert report.findings[0].severity == "error"
    assert report.findings[0].line is not None and report.findings[0].line > 1


@pytest.mark.parametrize(("name", "expected"), CHECK_FINDINGS.items())
def test_each_check_code_is_triggered(fixture_dir: Path, name: str, expected: tuple[str, str]) -> None:
    report = check_file(fixture_dir / name)
    assert report.readable
    assert (expected[0], expected[1]) in [(f.severity, f.code) for f in report.findings]
    assert report.ok == (expected[0] != "error" and not any(f.severity == "error" for f in report.findings))


@pytest.mark.parametrize("name", UNREADABLE)
def test_unreadable_files_are_reported_not_raised(fixture_dir: Path, name: str) -> None:
    report = check_file(fixture_dir / name)
    assert not report.readable and not report.ok
    assert report.findings[0].code == "unreadable"
    assert name in report.findings[0].message


def test_missing_file_is_unreadable(tmp_path: Path) -> None:
    report = check_file(tmp_path / "absent.xml")
    assert not report.readable and "absent.xml" in report.findings[0].message


def test_unit_mix_up_is_diagnosed(fixture_dir: Path) -> None:
    # The D12 fixture exported in lbf and read as N: impulse low by 4.448 (lbf = 4.4482216152605 N, pint).
    report = check_file(fixture_dir / "unit_mix_up_lbf.csv", metadata=CurveMetadata(designation="D12-5"))
    codes = [f.code for f in report.findings]
    assert "class-mismatch" in codes and "likely-unit-mix-up" in codes
    assert "lbf" in next(f.message for f in report.findings if f.code == "likely-unit-mix-up")
    fixed = check_file(fixture_dir / "unit_mix_up_lbf.csv", metadata=CurveMetadata(designation="D12-5"),
                       thrust_unit="lbf")
    assert "class-mismatch" not in [f.code for f in fixed.findings]


def test_average_thrust_tolerance_is_a_setting(demo_record: MotorRecord) -> None:
    # Label says 12 N; the computed average is about 11.9 N with the 5 % rule.
    average = demo_record.average_thrust_n()
    tight = CheckSettings(average_thrust_tolerance=abs(12.0 / average - 1) / 2)
    assert "average-thrust-mismatch" in [f.code for f in check_record(demo_record, tight)]
    assert "average-thrust-mismatch" not in [f.code for f in check_record(demo_record)]


def test_twenty_percent_rule_boundary() -> None:
    # NFPA 1125 as summarised by secondary sources (C2): labelled average within 20 % of measured.
    record = MotorRecord("C10-3", [0.0, 1e-9, 0.75, 0.75 + 1e-9], [0.0, 10.0, 10.0, 0.0])  # 7.5 N·s, 10 N
    assert "average-thrust-mismatch" not in [f.code for f in check_record(record)]
    assert "average-thrust-mismatch" in [f.code for f in check_record(
        MotorRecord("C13-3", record.time_s, record.thrust_n))]  # 30 % high
    assert "average-thrust-mismatch" not in [f.code for f in check_record(
        MotorRecord("C11.9-3", record.time_s, record.thrust_n))]  # 19 % high: allowed
    assert "average-thrust-mismatch" in [f.code for f in check_record(
        MotorRecord("C12.1-3", record.time_s, record.thrust_n))]  # 21 % high: refused


def test_findings_are_sorted_by_severity(fixture_dir: Path) -> None:
    report = check_file(fixture_dir / "beyond_class_o.xml")
    order = {"error": 0, "warning": 1, "note": 2}
    ranks = [order[f.severity] for f in report.findings]
    assert ranks == sorted(ranks)


def test_settings_refuse_nonsense() -> None:
    with pytest.raises(ValueError, match="burn_threshold"):
        CheckSettings(burn_threshold=0.0)
    with pytest.raises(ValueError, match="average_thrust_tolerance"):
        CheckSettings(average_thrust_tolerance=-0.1)


def test_sample_motors_pass_and_hp_motors_get_the_note(sample_curve_paths: list[Path]) -> None:
    for path in sample_curve_paths:
        report = check_file(path)
        assert report.ok, (path, report.findings)
        assert not [f for f in report.findings if f.severity == "warning"], (path, report.findings)
        high_power = report.record.total_impulse_ns > 160.0 or report.record.average_thrust_n() > 80.0
        assert ("high-power" in [f.code for f in report.findings]) == (
            high_power or report.record.propellant_mass_kg > 0.0625)
