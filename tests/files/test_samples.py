"""The bundled demo catalog covers what the issue promises and every curve is sound."""

from __future__ import annotations

from pathlib import Path

from motorlib import CLASS_LETTERS, check_file, read_record


def test_at_least_24_motors_from_1_4A_to_M(sample_curve_paths: list[Path]) -> None:
    records = [read_record(p) for p in sample_curve_paths]
    assert len(records) >= 24
    classes = {r.impulse_class.letter for r in records}
    assert "1/4A" in classes and "M" in classes
    span = CLASS_LETTERS[CLASS_LETTERS.index("1/4A"):CLASS_LETTERS.index("M") + 1]
    assert set(span) <= classes  # every class in between too
    diameters_mm = sorted(round(r.diameter_m * 1e3, 1) for r in records)
    assert 10.0 <= diameters_mm[0] <= 13.0 and diameters_mm[-1] == 98.0


def test_makers_are_plainly_fictional_and_curves_are_demo(sample_curve_paths: list[Path]) -> None:
    for path in sample_curve_paths:
        record = read_record(path)
        assert record.maker.endswith("(fictional)")
        assert record.provenance.kind == "demo"


def test_every_sample_has_hardware_and_passes_check(sample_curve_paths: list[Path]) -> None:
    shapes = set()
    for path in sample_curve_paths:
        report = check_file(path)
        assert report.ok, report.findings
        r = report.record
        assert None not in (r.diameter_m, r.length_m, r.total_mass_kg, r.propellant_mass_kg)
        shapes.add(r.provenance.notes.rsplit("Shape: ", 1)[-1].rstrip("."))
    assert {"spike", "progressive", "regressive", "boost-sustain"} <= shapes
