"""The matcher and the stability margin (issue 11): motors that leave the rocket under the margin fail with a
"stability-low" reason; the nose weight that restores it is flown again and every rule checked again.

The margins are checked against a hand computation written here: Barrowman's centre of pressure (nose CN_α = 2
at L − V/A, the tangent ogive's volume by scipy's quad; trapezoidal fins with the interference factor
1 + r/(s + r); J. S. Barrowman, M.S. thesis, Catholic University of America, 1967) and moments about the nose
tip for the centre of gravity (airframe at its balance point, motor case and propellant at the motor's middle).
"""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner
from scipy.integrate import quad

from motorlib import MotorRecord
from motorlib.cli.main import main
from motorlib.flight.airframe import Airframe
from motorlib.flight.geometry import Body, Fins, Geometry, Nose
from motorlib.flight.integrate import simulate
from motorlib.matching import Candidate, MatchSettings, rank

from ..conftest import SAMPLE_DIR

D_M, NOSE_M, BODY_M, CG_M, MASS_KG = 0.0416, 0.16, 0.74, 0.58, 0.31
ROOT_M, TIP_M, SPAN_M, SWEEP_M = 0.09, 0.04, 0.05, 0.06
NOSE_WEIGHT_AT_M = NOSE_M / 2  # the documented default position: half the nose length

STABILITY_CODES = ("stability-low", "unstable", "stability-unknown")  # the codes fly's stability warnings use too


def _fails_stability(codes: list[str]) -> bool:
    return any(code in STABILITY_CODES for code in codes)


def _stability_index(codes: list[str]) -> int:
    return next(k for k, code in enumerate(codes) if code in STABILITY_CODES)


def _frame(**extra) -> Airframe:
    shape = Geometry(CG_M, Nose("ogive", NOSE_M), Body(BODY_M), Fins(3, ROOT_M, TIP_M, SPAN_M, SWEEP_M, 0.003))
    return Airframe("demo", MASS_KG, D_M, drag_coefficient=0.5, mount_diameter_m=0.029, geometry=shape, **extra)


def _motor(name: str, total_kg: float, prop_kg: float, length_m: float | None, thrust_n: float,
           burn_s: float = 1.4) -> MotorRecord:
    t = np.array([0.0, 0.05, burn_s - 0.05, burn_s])
    return MotorRecord(name, t, np.array([0.0, thrust_n, thrust_n, 0.0]), maker="Test (fictional)", diameter_m=0.029,
                       length_m=length_m, total_mass_kg=total_kg, propellant_mass_kg=prop_kg, delays_s=(6.0,))


def _cp_by_hand() -> float:
    r = D_M / 2
    rho = (r * r + NOSE_M**2) / (2 * r)  # tangent ogive: circle radius

    def radius(x: float) -> float:
        return math.sqrt(rho**2 - (NOSE_M - x) ** 2) + r - rho

    volume = quad(lambda x: math.pi * radius(x) ** 2, 0.0, NOSE_M, epsabs=1e-14)[0]
    x_nose = NOSE_M - volume / (math.pi * r * r)
    a, b, s, xt = ROOT_M, TIP_M, SPAN_M, SWEEP_M
    lm = math.hypot(s, xt + b / 2 - a / 2)
    cn_fins = (1 + r / (s + r)) * 4 * 3 * (s / D_M) ** 2 / (1 + math.sqrt(1 + (2 * lm / (a + b)) ** 2))
    x_le = NOSE_M + BODY_M - a
    x_fins = x_le + xt / 3 * (a + 2 * b) / (a + b) + (a + b - a * b / (a + b)) / 6
    return (2 * x_nose + cn_fins * x_fins) / (2 + cn_fins)


def _margin_by_hand(motor: MotorRecord, burnt: float, weight_kg: float = 0.0) -> float:
    centre = NOSE_M + BODY_M - motor.length_m / 2
    propellant = motor.propellant_mass_kg * (1 - burnt)
    case = motor.total_mass_kg - motor.propellant_mass_kg
    moment = MASS_KG * CG_M + weight_kg * NOSE_WEIGHT_AT_M + (case + propellant) * centre
    cg = moment / (MASS_KG + weight_kg + case + propellant)
    return (_cp_by_hand() - cg) / D_M


LIGHT = _motor("LIGHT", 0.06, 0.03, 0.10, 45.0)
HEAVY = _motor("HEAVY", 0.45, 0.20, 0.20, 250.0)


def _candidate(result, name: str) -> Candidate:
    return next(c for c in result.candidates if c.designation == name)


def test_a_heavy_motor_behind_the_cp_fails_with_the_stability_reason() -> None:
    result = rank(_frame(), [LIGHT, HEAVY], settings=MatchSettings())
    heavy, light = _candidate(result, "HEAVY"), _candidate(result, "LIGHT")
    # the least margin of the powered flight is at liftoff or burnout (the CG moves one way as propellant burns)
    assert heavy.stability_margin_cal == pytest.approx(min(_margin_by_hand(HEAVY, 0), _margin_by_hand(HEAVY, 1)),
                                                          abs=1e-9)
    assert light.stability_margin_cal == pytest.approx(min(_margin_by_hand(LIGHT, 0), _margin_by_hand(LIGHT, 1)),
                                                          abs=1e-9)
    assert heavy.stability_margin_cal < 1.0 <= light.stability_margin_cal
    assert not heavy.passes and _fails_stability(heavy.reason_codes)
    text = heavy.reasons[_stability_index(heavy.reason_codes)]
    assert "stability margin" in text and "nose weight restores it" in text
    assert not _fails_stability(light.reason_codes) and light.nose_weight_for_stability_kg is None


def test_the_solved_nose_weight_restores_the_margin_when_flown_again() -> None:
    frame = _frame()
    heavy = _candidate(rank(frame, [LIGHT, HEAVY], settings=MatchSettings()), "HEAVY")
    weight = heavy.nose_weight_for_stability_kg
    assert weight > 0
    # hand moments: the weight brings both ends of the burn to at least 1 caliber, and it is no more than
    # 0.1 g above the least weight that does (it is rounded up to 0.1 g)
    assert min(_margin_by_hand(HEAVY, 0, weight), _margin_by_hand(HEAVY, 1, weight)) >= 1.0
    assert min(_margin_by_hand(HEAVY, 0, weight - 1e-4), _margin_by_hand(HEAVY, 1, weight - 1e-4)) < 1.0
    assert heavy.nose_weight_stability_margin_cal >= 1.0
    again = simulate(frame, [HEAVY], added_mass_kg=weight, descent=False)
    assert heavy.nose_weight_apogee_m == pytest.approx(float(again.apogee_m[0]), rel=1e-9)
    assert not _fails_stability(heavy.nose_weight_reason_codes)
    assert not heavy.passes  # the weight is advice: the motor as flown keeps its failed check


def test_every_rule_is_checked_again_with_the_nose_weight() -> None:
    # a heavy, weak motor: its thrust-to-weight passes bare and fails once the nose weight is added
    weak = _motor("WEAK", 0.45, 0.20, 0.20, 38.5)  # T/W 5.17 bare, 4.88 with 44 g more
    c = _candidate(rank(_frame(), [weak], settings=MatchSettings(min_stability_cal=1.0)), "WEAK")
    assert "thrust-to-weight-low" not in c.reason_codes and _fails_stability(c.reason_codes)
    assert c.nose_weight_for_stability_kg > 0 and "thrust-to-weight-low" in c.nose_weight_reason_codes


def test_the_required_margin_is_a_setting() -> None:
    light = _candidate(rank(_frame(), [LIGHT], settings=MatchSettings(min_stability_cal=3.5)), "LIGHT")
    assert light.stability_margin_cal < 3.5 and _fails_stability(light.reason_codes)
    with pytest.raises(ValueError, match="min_stability_cal"):
        MatchSettings(min_stability_cal=-1.0)


def test_unknown_length_fails_and_no_geometry_checks_nothing() -> None:
    unknown = _motor("NOLEN", 0.06, 0.03, None, 45.0)
    c = _candidate(rank(_frame(), [unknown]), "NOLEN")
    assert c.stability_margin_cal is None and _fails_stability(c.reason_codes)
    assert "stability unknown" in c.reasons[_stability_index(c.reason_codes)]
    plain = Airframe("plain", MASS_KG, D_M, drag_coefficient=0.5, mount_diameter_m=0.029)
    result = rank(plain, [HEAVY])
    assert result.candidates[0].stability_margin_cal is None and not _fails_stability(result.candidates[0].reason_codes)
    assert result.conditions["min_stability_cal"] is None


def test_no_nose_weight_can_help_when_the_cp_is_too_far_forward() -> None:
    # a required margin that puts the CG ahead of the nose weight's own position: out of reach
    far = (_cp_by_hand() - NOSE_WEIGHT_AT_M) / D_M + 0.5
    c = _candidate(rank(_frame(), [LIGHT], settings=MatchSettings(min_stability_cal=far)), "LIGHT")
    assert "no nose weight can restore it" in c.reasons[_stability_index(c.reason_codes)]
    assert c.nose_weight_for_stability_kg is None


def test_match_json_carries_the_keys_and_the_option() -> None:
    airframe = SAMPLE_DIR / "airframes" / "quibble-41.toml"
    out = CliRunner().invoke(main, ["match", str(airframe), "--catalog", str(SAMPLE_DIR), "--target", "400",
                                    "--min-stability", "1.6", "--json"])
    assert out.exit_code == 0, out.output
    data = json.loads(out.output)
    assert data["conditions"]["min_stability_cal"] == 1.6
    flown = [c for c in data["candidates"] if c["apogee_m"] is not None]
    assert all("stability_margin_cal" in c and "nose_weight_for_stability_kg" in c for c in data["candidates"])
    low = [c for c in flown if c["stability_margin_cal"] is not None and c["stability_margin_cal"] < 1.6]
    assert low and all(_fails_stability(c["reason_codes"]) and c["nose_weight_for_stability_kg"] > 0 for c in low)
    text = CliRunner(env={"COLUMNS": "100"}).invoke(main, ["match", str(airframe), "--catalog", str(SAMPLE_DIR),
                                                           "--target", "400", "--min-stability", "1.6"]).output
    assert "of nose weight: stability" in text and "stability >= 1.6 cal" in text


def test_robust_ranking_fails_every_sample_of_an_unstable_motor() -> None:
    from motorlib.flight.dispersion import Uncertainty
    from motorlib.matching.robust import RobustSettings, robust_rank

    result = robust_rank(_frame(), [LIGHT, HEAVY], MatchSettings(min_stability_cal=1.0), Uncertainty(),
                         RobustSettings(n_samples=8))
    by_name = {c["designation"]: c for c in result["candidates"]}
    assert by_name["HEAVY"]["failures"]["stability-low"] == 1.0 and by_name["HEAVY"]["p_success"] == 0.0
    assert by_name["LIGHT"]["failures"]["stability-low"] == 0.0


def test_the_match_report_states_the_stability_rule() -> None:
    from motorlib.present.report_content import match_report

    report = match_report(rank(_frame(), [LIGHT, HEAVY], settings=MatchSettings(min_stability_cal=1.2)), inputs=[],
                          command="test", catalog="records", made_at="2026-12-02 00:00 UTC")
    assert ("stability", ">= 1.2 calibers over the powered flight") in report.conditions.rows
    heavy = next(row for row in report.ranking.rows if row[1] == "HEAVY")
    assert "stability margin" in heavy[-1]


def test_match_says_when_the_drag_is_estimated(tmp_path) -> None:
    airframe = SAMPLE_DIR / "airframes" / "quibble-41.toml"
    shaped = tmp_path / "shaped.toml"
    shaped.write_text(airframe.read_text().replace("drag_coefficient = 0.55   # constant\n", ""))
    args = ["match", str(shaped), "--catalog", str(SAMPLE_DIR), "--target", "400"]
    data = json.loads(CliRunner().invoke(main, [*args, "--json"]).output)
    assert data["conditions"]["drag_source"] == "estimated" and "estimated from the shape" in data["conditions"]["drag"]
    text = " ".join(CliRunner().invoke(main, args).output.split())
    assert "Cd(Mach) estimated from the shape" in text
