"""One rule book (issue 17): the same flight gives the same codes through ``fly`` and ``match``.

Before, fly's warnings and match's reasons were two implementations with different codes and meanings (match
had no wind rule, fly no ceiling rule; landing speed meant two things). Each case flies a sample airframe with
the bundled sample motors through ``match --json`` and every flown candidate again through ``fly --json``
under the same limits; the codes of the rule book must agree (stability and mount fit are checked by
their own modules, and match's target and adapter notes are not rules).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from motorlib.cli.main import main
from motorlib.flight.rules import RULE_CODES

SAMPLES = Path(__file__).resolve().parents[2] / "sample_curves"
NOT_FROM_THE_RULE_BOOK = {"motor-does-not-fit", "above-class", "no-masses", "stability-low", "unstable",
                          "stability-unknown", "over-stable"}


def _windy(tmp_path: Path, name: str, wind: str) -> Path:
    text = (SAMPLES / "airframes" / name).read_text()
    path = tmp_path / name
    path.write_text(text.replace('wind_speed = "3 m/s"', f'wind_speed = "{wind}"'))
    return path


@pytest.mark.parametrize(("airframe", "wind", "limits"), [
    # the small rocket in a stiff wind (the wind rule) under a ceiling; a field radius makes match fly the descent
    ("quibble-41.toml", "6 m/s", ["--ceiling", "500m", "--field-radius", "300m"]),
    # the same in light wind, without a field radius: match estimates the descent, fly flies it
    ("quibble-41.toml", "3 m/s", ["--ceiling", "700m"]),
    # a two-device high-power airframe (drogue and main, electronics)
    ("tollgate-98.toml", "3 m/s", ["--ceiling", "3000m", "--field-radius", "1500m"]),
    ("fennelwick-24.toml", "3 m/s", ["--field-radius", "250m"]),
])
def test_fly_and_match_give_the_same_codes(tmp_path: Path, airframe: str, wind: str, limits: list[str]) -> None:
    frame = _windy(tmp_path, airframe, wind)
    runner = CliRunner()
    result = runner.invoke(main, ["match", str(frame), "--catalog", str(SAMPLES), "--allow-smaller-motors",
                                  "--json", *limits])
    assert result.exit_code == 0, result.output
    flown = [c for c in json.loads(result.output)["candidates"] if c["fits"] and c["apogee_m"] is not None]
    assert flown, "the case flies no motor"
    compared = 0
    seen: set[str] = set()
    for c in flown:
        fly = runner.invoke(main, ["fly", str(frame), "--motor", c["designation"], "--catalog", str(SAMPLES),
                                   "--json", *limits])
        assert fly.exit_code in (0, 1), fly.output
        data = json.loads(fly.output)
        by_fly = {w["code"] for w in data["warnings"]} - NOT_FROM_THE_RULE_BOOK
        by_match = (set(c["reason_codes"]) | set(c["note_codes"])) & set(RULE_CODES) - NOT_FROM_THE_RULE_BOOK
        assert by_fly == by_match, (c["designation"], by_fly, by_match)
        # and one meaning of landing speed: the descent rate under the device
        if "--field-radius" in limits and c["landing_speed_m_s"] is not None:
            assert data["landing_speed_m_s"] == pytest.approx(c["landing_speed_m_s"], rel=1e-6)
        compared += 1
        seen |= by_fly
    assert compared >= 3 and seen, "the case exercises no rule"


_NO_UNCERTAINTY = ('\n[uncertainty]\n' + "".join(f'{key} = "0 %"\n' for key in (
    "total_impulse", "burn_time", "airframe_mass", "motor_mass", "drag"))
    + 'wind_speed = "0 m/s"\nwind_direction = "0 deg"\nrail_angle = "0 deg"\nrail_azimuth = "0 deg"\n'
    + 'temperature = "0 K"\ncg = "0 mm"\ndeploy_altitude = "0 m"\n')


@pytest.mark.parametrize(("airframe", "wind", "limits"), [
    # a stiff wind (the rail rule), a ceiling some motors pass, a field radius
    ("quibble-41.toml", "6 m/s", ["--ceiling", "450m", "--field-radius", "300m"]),
    # drogue and main opened by electronics: each device's opening and the descent rate under the main
    ("tollgate-98.toml", "3 m/s", ["--ceiling", "2500m", "--field-radius", "1500m"]),
])
def test_scatter_and_robust_give_the_codes_fly_gives(tmp_path: Path, airframe: str, wind: str,
                                                     limits: list[str]) -> None:
    # Issue 17: scatter and match --robust judged their samples with flags of their own ("rail", "T/W", a descent
    # rule on the touchdown speed). With every uncertainty zero each sample is the nominal flight, so the codes
    # every sample fails (share 1) must be fly's codes for that motor under the same limits, and no other code
    # may fail any sample.
    frame = _windy(tmp_path, airframe, wind)
    frame.write_text(frame.read_text() + _NO_UNCERTAINTY)
    runner = CliRunner()
    result = runner.invoke(main, ["match", str(frame), "--catalog", str(SAMPLES), "--allow-smaller-motors", "--robust",
                                  "--samples", "3", "--workers", "1", "--json", *limits])
    assert result.exit_code == 0, result.output
    candidates = json.loads(result.output)["candidates"]
    compared = 0
    seen: set[str] = set()
    from motorlib.files.airframe_toml import load_airframe

    lead = load_airframe(frame).recovery_devices[:1]
    by_charge = not lead or lead[0].deploy == "ejection"  # electronics: fly refuses a --delay that opens nothing
    for c in candidates[:6]:
        delay = ["--delay", f"{c['delay_s']}s"] if c["delay_s"] is not None and by_charge else []
        fly = runner.invoke(main, ["fly", str(frame), "--motor", c["designation"], "--catalog", str(SAMPLES),
                                   "--json", *delay, *limits])
        assert fly.exit_code in (0, 1), fly.output
        by_fly = {w["code"] for w in json.loads(fly.output)["warnings"]} - NOT_FROM_THE_RULE_BOOK
        by_fly -= {"constant-cd-past-mach"}  # a note on the model, never a failure
        assert all(share in (0.0, 1.0) for share in c["failures"].values()), c["failures"]
        by_robust = {code for code, share in c["failures"].items() if share == 1.0} - NOT_FROM_THE_RULE_BOOK
        assert by_robust == by_fly, (c["designation"], by_robust, by_fly)
        scatter = runner.invoke(main, ["scatter", str(frame), "--motor", c["designation"], "--catalog", str(SAMPLES),
                                       "-n", "2", "--workers", "1", "--no-uncertainty", "--json", *delay, *limits])
        assert scatter.exit_code == 0, scatter.output
        data = json.loads(scatter.output)
        assert {code for code, share in data["failures"].items() if share == 1.0} == by_fly, c["designation"]
        fly_rate = json.loads(fly.output)["landing_speed_m_s"]
        if fly_rate is not None:  # one meaning of landing speed: the descent rate under the device
            assert data["landing_speed_m_s"]["p50"] == pytest.approx(fly_rate, rel=1e-9)
        compared += 1
        seen |= by_fly
    assert compared >= 2 and seen, "the case exercises no rule"
