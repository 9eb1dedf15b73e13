"""Defects a new-user trial met in recovery, the flight card and the report: each test failed before its fix."""

from __future__ import annotations

import json
import re
from pathlib import Path

from motorlib.flight.rulebook import FLIGHT_CODES
from motorlib.flight.rules import RULE_CODES
from motorlib.present.messages import REASON_CODES

from .conftest import AIRFRAMES, SAMPLE_DIR, run

QUIBBLE = AIRFRAMES / "quibble-41.toml"
CATALOG = ("--catalog", str(SAMPLE_DIR))


def _without_recovery(tmp_path: Path, how: str) -> str:
    text = QUIBBLE.read_text(encoding="utf-8")
    table = re.search(r"\[recovery\]\n(?:[^\[\n][^\n]*\n)*", text)
    assert table is not None
    text = text.replace(table.group(0), "" if how == "removed" else '[recovery]\ndevice = "none"\n')
    path = tmp_path / "norec.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


def test_a_rocket_without_recovery_fails_fly(tmp_path: Path) -> None:
    for how in ("removed", "none"):
        frame = _without_recovery(tmp_path, how)
        code, out = run("fly", frame, *CATALOG, "--motor", "F29-8", "--json")
        warnings = {w["code"]: w["message"] for w in json.loads(out)["warnings"]}
        assert "no-recovery" in warnings, (how, warnings)
        assert "recovery system" in warnings["no-recovery"]
        assert code == 1
        code, out = run("fly", frame, *CATALOG, "--motor", "F29-8")
        assert code == 1 and "recovery system" in " ".join(out.split()), out


def test_a_rocket_without_recovery_fails_every_motor_in_match(tmp_path: Path) -> None:
    frame = _without_recovery(tmp_path, "removed")
    code, out = run("match", frame, *CATALOG, "--allow-smaller-motors", "--json")
    assert code == 0, out
    candidates = json.loads(out)["candidates"]
    assert not [c["designation"] for c in candidates if c["verdict"].startswith("pass")]
    flown = [c for c in candidates if c.get("apogee_m") is not None]
    assert flown and all("no-recovery" in c["reason_codes"] for c in flown)
    code, out = run("match", frame, *CATALOG, "--allow-smaller-motors")
    assert re.search(r"\b0 of \d+ pass", out), out
    letter = REASON_CODES["no-recovery"][0]
    assert re.search(rf"G99-14 .*fail [A-Z ]*{letter}", out), out


def test_no_recovery_is_in_the_rule_book() -> None:
    assert "no-recovery" in FLIGHT_CODES and "no-recovery" in RULE_CODES
    letter = REASON_CODES["no-recovery"][0]
    # a letter of its own: no other code's legend shares it
    assert {code for code, (other, _) in REASON_CODES.items() if other == letter} == {"no-recovery"}


def test_every_caution_on_the_flight_card_has_a_warning(tmp_path: Path) -> None:
    # the card marked "! descent rate 74.2 m/s <= 6.5 m/s" on a ballistic fall while fly listed no warning
    frame = _without_recovery(tmp_path, "removed")
    code, out = run("fly", frame, *CATALOG, "--motor", "F29-8")
    landing = out[out.index("Landing"):]
    assert "descent rate" in landing
    assert code == 1
    # the landing phase tells why its descent rate is marked; the finding itself is the recovery phase's
    assert "(ballistic: no recovery device)" in " ".join(landing.split())
    assert "recovery system" in " ".join(out[out.index("Recovery"):out.index("Landing")].split())


TOLLGATE = AIRFRAMES / "tollgate-98.toml"
_DUAL = '''[[recovery]]
device = "drogue"
trigger = "apogee"
drag_coefficient = 0.8
diameter = "0.6 m"

[[recovery]]
device = "main"
trigger = "altitude"
altitude = "20 m"
drag_coefficient = 0.8
diameter = "2.4 m"

'''


def _dual_deploy(tmp_path: Path) -> str:
    text = TOLLGATE.read_text(encoding="utf-8")
    table = re.search(r"\[recovery\]\n(?:[^\[\n][^\n]*\n)*\n*", text)
    assert table is not None
    path = tmp_path / "dd.toml"
    path.write_text(text.replace(table.group(0), _DUAL), encoding="utf-8")
    return str(path)


def _sections(card: str) -> dict[str, str]:
    """The flight card's text by section title (each title starts a line with a mark and 'Recovery: ...')."""
    parts = re.split(r"^[✓!✗·] (.+)$", card, flags=re.M)
    return {parts[k].strip(): " ".join(parts[k + 1].split()) for k in range(1, len(parts) - 1, 2)}


def test_each_device_s_findings_sit_under_that_device(tmp_path: Path) -> None:
    frame = _dual_deploy(tmp_path)
    code, out = run("fly", frame, *CATALOG, "--motor", "L1275-P", env={"COLUMNS": "200"})
    sections = _sections(out)
    drogue = next(text for title, text in sections.items() if title.startswith("Recovery: drogue"))
    main = next(text for title, text in sections.items() if title.startswith("Recovery: main"))
    assert "deployment-fast" not in drogue and "deployment-low" not in drogue, drogue
    assert "deployment-fast: the main opens too fast" in main and "deployment-low: the main opens too low" in main
    # the key the [[recovery]] entry uses, and no stronger motor for a main that opens at a height asked for
    low = main[main.index("deployment-low"):]
    assert "a higher altitude in its [[recovery]] entry" in low and "deploy_altitude" not in low
    assert "stronger motor" not in low
    assert code == 1


def test_the_report_puts_each_device_s_findings_under_that_device(tmp_path: Path) -> None:
    frame = _dual_deploy(tmp_path)
    report = tmp_path / "dd.html"
    code, out = run("fly", frame, *CATALOG, "--motor", "L1275-P", "--report", str(report))
    html = report.read_text(encoding="utf-8")
    drogue_at, main_at = html.index("Recovery: drogue"), html.index("Recovery: main")
    assert main_at > drogue_at
    assert "opens too fast" not in html[drogue_at:main_at] and "opens too low" not in html[drogue_at:main_at]
    assert "the main opens too fast" in html[main_at:]


def test_a_single_recovery_table_names_deploy_altitude(tmp_path: Path) -> None:
    text = TOLLGATE.read_text(encoding="utf-8").replace('deploy = "apogee"', 'deploy = "altitude"\ndeploy_altitude = "5 m"')
    path = tmp_path / "alt.toml"
    path.write_text(text, encoding="utf-8")
    code, out = run("fly", str(path), *CATALOG, "--motor", "L1275-P", "--json")
    low = {w["code"]: w["message"] for w in json.loads(out)["warnings"]}.get("deployment-low", "")
    assert "a higher deploy_altitude in the [recovery] table" in low and "stronger motor" not in low, low


def test_the_report_and_the_card_show_the_ballast_and_the_liftoff_mass(tmp_path: Path) -> None:
    # a safety officer weighs the rocket against the sheet: "empty mass 310 g" alone hid 1.3 kg of ballast
    report = tmp_path / "heavy.html"
    code, out = run("fly", str(QUIBBLE), *CATALOG, "--motor", "F29-8", "--ballast", "1.3kg", "--report", str(report),
                    env={"COLUMNS": "200"})
    html = report.read_text(encoding="utf-8")
    rocket = html[html.index(">Rocket<"):html.index(">Motor<")]
    text = " ".join(re.sub(r"<[^>]+>", " ", rocket).split())
    assert "empty mass 310 g" in text and "ballast 1.30 kg" in text, text
    assert "without motor 1.61 kg" in text and "liftoff mass 1.68 kg" in text, text
    pad = " ".join(out[out.index("Pad and rail"):out.index("Boost")].split())
    assert "ballast 1.30 kg" in pad and "without motor 1.61 kg" in pad and "liftoff mass 1.68 kg" in pad, pad
    # without ballast the card is as before, and the report still gives the liftoff mass with the motor
    code, out = run("fly", str(QUIBBLE), *CATALOG, "--motor", "F29-8", "--report", str(tmp_path / "light.html"))
    assert "ballast" not in out[out.index("Pad and rail"):out.index("Boost")]
    light = re.sub(r"<[^>]+>", " ", (tmp_path / "light.html").read_text(encoding="utf-8"))
    assert "liftoff mass" in " ".join(light[light.index(" Rocket "):light.index(" Motor ")].split())


def _reasons(airframe: Path, designation: str) -> list[str]:
    code, out = run("match", str(airframe), *CATALOG, "--allow-smaller-motors", "--show-rejected", "--json")
    assert code == 0, out
    return next(c["reasons"] for c in json.loads(out)["candidates"] if c["designation"] == designation)


def test_no_impossible_delay_advice_when_the_shortest_listed_delay_is_flown() -> None:
    # C6-3,5,7 at its shortest delay (3 s, not drillable) opens the parachute 3 m up; "choose a shorter delay
    # (the optimal one is 1.1 s)" asked for a delay the motor does not come with
    for airframe, motor, shortest in ((QUIBBLE, "C6-3,5,7", "3 s"), (AIRFRAMES / "fennelwick-24.toml", "1/4A2-2,3", "2 s")):
        low = [r for r in _reasons(airframe, motor) if "opens too low" in r or "fires too low" in r]
        assert low, (motor, _reasons(airframe, motor))
        for reason in low:
            assert "choose a shorter delay" not in reason, reason
            assert f"no listed delay is short enough: the shortest is {shortest}" in reason, reason


def test_delay_advice_still_points_to_a_listed_shorter_delay() -> None:
    # fly at a longer listed delay than needed: a shorter listed one exists, so the advice stands
    code, out = run("fly", str(QUIBBLE), *CATALOG, "--motor", "D12-3,5,7", "--delay", "7", "--json")
    messages = [w["message"] for w in json.loads(out)["warnings"] if w["code"] in ("deployment-low", "ejection-low")]
    assert messages and all("choose a shorter delay" in m for m in messages), messages


def test_the_delay_warning_says_there_is_no_optimal_delay_as_the_card_does() -> None:
    # apogee comes 0.1 s before burnout: the card said "optimal delay none: ...", the warning "-0.1 s"
    code, out = run("fly", str(QUIBBLE), *CATALOG, "--motor", "G25-4,7,10", "--ballast", "1.3kg", "--json")
    payload = json.loads(out)
    delay = next(w["message"] for w in payload["warnings"] if w["code"] == "ejection-far-from-apogee")
    assert "-0.1 s" not in delay and "optimal delay none: apogee 0.1 s before burnout" in delay, delay
    assert payload["optimal_delay_s"] < 0  # the JSON figure stays


def test_electronics_deployment_leaves_the_motor_delay_unmarked_when_no_rule_judges_it(tmp_path: Path) -> None:
    # deploy = "apogee": the charge is a backup; the card marked "! chosen delay 4 s (4.1 s late)" with no warning
    path = tmp_path / "apogee.toml"
    path.write_text(QUIBBLE.read_text(encoding="utf-8").replace('deploy = "ejection"', 'deploy = "apogee"'),
                    encoding="utf-8")
    code, out = run("fly", str(path), *CATALOG, "--motor", "G25-4,7,10", "--ballast", "1.3kg", env={"COLUMNS": "200"})
    line = next(line for line in out.splitlines() if "chosen delay" in line)
    assert not line.lstrip().startswith("!"), line
    code, out = run("fly", str(path), *CATALOG, "--motor", "G25-4,7,10", "--ballast", "1.3kg", "--json")
    assert not [w for w in json.loads(out)["warnings"] if "delay" in w["code"] or w["code"].startswith("ejection")]
