"""Every check's tolerance, just inside and just outside its default (the defaults name their sources)."""

from __future__ import annotations

import numpy as np
import pytest

from motorlib import CheckSettings, MotorRecord, check_record

G0 = 9.80665  # m/s², standard gravity (exact by definition, 3rd CGPM 1901); Isp = I / (m_p g0)


def _codes(record: MotorRecord, settings: CheckSettings | None = None) -> set[str]:
    return {f.code for f in check_record(record, settings)}


def _flat(n_samples: int = 10, first_n: float = 0.0, last_n: float = 0.0, burn_s: float = 1.0,
          level_n: float = 8.0, designation: str = "C8-5", **kwargs: object) -> MotorRecord:
    """A flat curve at ``level_n`` with ramps at both ends; class C near 8 N·s for the defaults."""
    inner = np.linspace(0.02 * burn_s, 0.98 * burn_s, n_samples - 2)
    t = np.concatenate(([0.0], inner, [burn_s]))
    f = np.concatenate(([first_n], np.full(n_samples - 2, level_n), [last_n]))
    return MotorRecord(designation, t, f, delays_s=(5.0,), **kwargs)


def test_the_defaults_are_the_sourced_values() -> None:
    s = CheckSettings()
    assert s.burn_threshold == 0.05 and s.average_thrust_tolerance == 0.20  # NFPA 1125 via secondary sources
    assert s.total_impulse_tolerance == 0.10 and s.edge_fraction == 0.05  # common practice, no published source
    assert s.min_samples == 8 and s.isp_range_s == (50.0, 300.0)  # common practice, no published source
    assert s.burn_time_range_s == (0.02, 30.0)  # common practice, no published source


def test_few_samples_below_eight() -> None:
    assert "few-samples" not in _codes(_flat(8))
    assert "few-samples" in _codes(_flat(7))


@pytest.mark.parametrize(("edge", "code"), [("first_n", "start-not-near-zero"), ("last_n", "end-not-near-zero")])
def test_edges_must_be_within_five_percent_of_peak(edge: str, code: str) -> None:
    assert code not in _codes(_flat(**{edge: 0.05 * 8.0}))  # exactly 5 % of the 8 N peak
    assert code in _codes(_flat(**{edge: 0.051 * 8.0}))


def test_burn_time_range() -> None:
    assert "burn-time-implausible" not in _codes(_flat(burn_s=25.0, level_n=0.3, designation="C0.3"))
    assert "burn-time-implausible" in _codes(_flat(burn_s=40.0, level_n=0.2, designation="C0.2"))
    assert "burn-time-implausible" in _codes(_flat(burn_s=0.01, level_n=800.0, designation="C800"))


def test_specific_impulse_range() -> None:
    motor = _flat()
    impulse = motor.total_impulse_ns
    at_300 = impulse / (300.0 * G0)
    assert "isp-implausible" not in _codes(_flat(total_mass_kg=0.05, propellant_mass_kg=at_300 * 1.0001))
    assert "isp-implausible" in _codes(_flat(total_mass_kg=0.05, propellant_mass_kg=at_300 * 0.999))
    at_50 = impulse / (50.0 * G0)
    assert "isp-implausible" not in _codes(_flat(total_mass_kg=0.05, propellant_mass_kg=at_50 * 0.9999))
    assert "isp-implausible" in _codes(_flat(total_mass_kg=0.05, propellant_mass_kg=at_50 * 1.001))


def test_average_thrust_within_twenty_percent_of_the_label() -> None:
    motor = _flat()
    average = motor.average_thrust_n()
    inside = _flat(designation=f"C{average * 1.19:.3f}-5")
    outside = _flat(designation=f"C{average * 1.21:.3f}-5")
    assert "average-thrust-mismatch" not in _codes(inside)
    assert "average-thrust-mismatch" in _codes(outside)
    below = _flat(designation=f"C{average * 0.81:.3f}-5")
    assert "average-thrust-mismatch" not in _codes(below)


def test_a_leading_total_impulse_within_ten_percent() -> None:
    impulse = _flat().total_impulse_ns
    assert "total-impulse-mismatch" not in _codes(_flat(designation=f"{impulse * 1.09:.2f}C8-5"))
    assert "total-impulse-mismatch" in _codes(_flat(designation=f"{impulse * 1.11:.2f}C8-5"))
    assert "total-impulse-mismatch" in _codes(_flat(designation=f"{impulse * 0.89:.2f}C8-5"))


def test_high_power_triggers() -> None:
    # NFPA 1127 as secondary sources summarise it (tests/reference/check_values.md#high-power): above 160 N·s,
    # above 80 N average thrust, or above 62.5 g of propellant
    assert "high-power" not in _codes(_flat(total_mass_kg=0.1, propellant_mass_kg=0.0625))
    assert "high-power" in _codes(_flat(total_mass_kg=0.1, propellant_mass_kg=0.0626))
    def box(level_n: float) -> MotorRecord:  # vertical edges within 10 µs: the average is the level
        return MotorRecord(f"C{level_n:g}", [0.0, 1e-5, 0.1 - 1e-5, 0.1], [0.0, level_n, level_n, 0.0])

    assert "high-power" not in _codes(box(80.0))
    assert "high-power" in _codes(box(80.1))


@pytest.mark.parametrize("name", ["average_thrust_tolerance", "total_impulse_tolerance", "edge_fraction"])
def test_a_zero_tolerance_is_refused(name: str) -> None:
    with pytest.raises(ValueError, match=name):
        CheckSettings(**{name: 0.0})
    assert getattr(CheckSettings(**{name: 1e-9}), name) == 1e-9


def test_settings_and_findings_are_frozen() -> None:
    import dataclasses

    with pytest.raises(dataclasses.FrozenInstanceError):
        CheckSettings().edge_fraction = 0.5  # type: ignore[misc]
    finding = check_record(_flat(7))[0]
    with pytest.raises(dataclasses.FrozenInstanceError):
        finding.code = "other"  # type: ignore[misc]
