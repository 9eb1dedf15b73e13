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
