"""The class check names the unit mix-up that would explain a curve off by a unit factor."""

from __future__ import annotations

import pint
import pytest

from motorlib import MotorRecord, check_record, read_record

from ..conftest import SAMPLE_DIR

UREG = pint.UnitRegistry()


def _scaled(time_factor: float, thrust_factor: float) -> MotorRecord:
    known = read_record(SAMPLE_DIR / "teakettle-thrust-co_c6-3-5-7.xml")  # class C, about 8.8 N·s
    return MotorRecord(known.designation, known.time_s * time_factor, known.thrust_n * thrust_factor,
                       total_mass_kg=known.total_mass_kg, propellant_mass_kg=known.propellant_mass_kg,
                       delays_s=known.delays_s)


# Factors from pint's unit registry: seconds written down but read as milliseconds shrink every time by 1 s / 1 ms.
S_PER_MS = UREG.Quantity(1, "millisecond").to("second").magnitude
N_PER_LBF = UREG.Quantity(1, "force_pound").to("newton").magnitude
N_PER_KGF = UREG.Quantity(1, "force_kilogram").to("newton").magnitude


@pytest.mark.parametrize(("time_factor", "thrust_factor", "cause"), [
    (S_PER_MS, 1.0, "time recorded in s but read as ms"),
    (1.0 / S_PER_MS, 1.0, "time recorded in ms but read as s"),
    (1.0, 1.0 / N_PER_LBF, "thrust recorded in lbf but read as N"),
    (1.0, 1.0 / N_PER_KGF, "thrust recorded in kgf but read as N"),
    (1.0, N_PER_LBF, "thrust recorded in N but read as lbf"),
])
def test_the_mix_up_that_restores_the_labelled_class_is_named(time_factor: float, thrust_factor: float,
                                                              cause: str) -> None:
    findings = check_record(_scaled(time_factor, thrust_factor))
    codes = [f.code for f in findings]
    assert "class-mismatch" in codes
    mix_up = [f.message for f in findings if f.code == "likely-unit-mix-up"]
    assert len(mix_up) == 1 and mix_up[0].endswith(f"{cause}?")
