"""Defects a second new-user trial met: each test failed before its fix.

A flight that breaks a launch rule (``fly`` exits 1) must not be headlined "flight completed" on the card or in the
report; a recovery phase with no device must not be ticked.
"""

from __future__ import annotations

import html
import re
from pathlib import Path

from .conftest import AIRFRAMES, SAMPLE_DIR, run

QUIBBLE = AIRFRAMES / "quibble-41.toml"
CATALOG = ("--catalog", str(SAMPLE_DIR))


def _airframe(tmp_path: Path, recovery: str | None, name: str = "norec.toml", **replace: str) -> str:
    """quibble-41 with its [recovery] table replaced by ``recovery`` (None: removed), and text replaced."""
    text = QUIBBLE.read_text(encoding="utf-8")
    table = re.search(r"\[recovery\]\n(?:[^\[\n][^\n]*\n)*", text)
    assert table is not None
    text = text.replace(table.group(0), recovery or "")
    for old, new in replace.items():
        text = text.replace(old, new)
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return str(path)


def _headline(out: str) -> str:
    return " ".join(out.split("✓ Pad")[0].split("! Pad")[0].split())


def test_a_rule_breaking_flight_is_not_headlined_completed(tmp_path: Path) -> None:
    frame = _airframe(tmp_path, None)
    report = tmp_path / "x.html"
    code, out = run("fly", frame, *CATALOG, "--motor", "F29-8", "--report", str(report))
    assert code == 1
    head = _headline(out)
    assert "flight completed" not in head, head
    assert "breaks 1 launch rule (no-recovery): do not fly it as is; see the warnings" in head, head
    assert head.startswith("Quibble 41 (demo) with F29-8"), head  # the title is not squeezed out
    page = html.unescape(report.read_text(encoding="utf-8"))
    subtitle = re.search(r'<div class="subtitle">(.*?)</div>', page).group(1)
    result = re.sub(r"<[^>]+>", "", re.search(r'<p class="result">(.*?)</p>', page).group(1))
    for text in (subtitle, result):
        assert "flight completed" not in text and "to look at" not in text, text
        assert "breaks 1 launch rule" in text and "do not fly" in text, text


def test_a_recovery_phase_with_no_device_fails_without_ticks(tmp_path: Path) -> None:
    code, out = run("fly", _airframe(tmp_path, None), *CATALOG, "--motor", "F29-8")
    recovery = out.split("Recovery")[1].split("Landing")[0]
    line = out.split("Recovery")[0].splitlines()[-1]
    assert line.strip().startswith("✗"), out  # the phase is marked as failing
    assert "✓" not in recovery, recovery
    assert "no-recovery" in recovery, recovery


def test_a_clean_flight_keeps_its_headline(tmp_path: Path) -> None:
    code, out = run("fly", str(QUIBBLE), *CATALOG, "--motor", "F29-8")
    assert code == 0 and "flight completed" in _headline(out) and "launch rule" not in out


def test_the_template_says_every_rocket_needs_recovery_and_lists_every_device_kind() -> None:
    from motorlib.files.airframe_template import airframe_template
    from motorlib.flight.airframe import RECOVERY_DEVICES

    for system in ("metric", "imperial"):
        text = airframe_template(system)
        table = text[text.index("[recovery]"):text.index("diameter", text.index("[recovery]"))]
        assert "leave this section out" not in table, table  # it invited the setup that fails every motor
        assert "every rocket needs" in table and "no-recovery" in table, table
        device_line = next(line for line in table.splitlines() if line.startswith("device ="))
        assert all(kind in device_line for kind in RECOVERY_DEVICES), device_line


def test_the_no_recovery_advice_fits_a_recovery_table_with_device_none(tmp_path: Path) -> None:
    import json

    advice = {}
    for how, table in (("removed", None), ("none", '[recovery]\ndevice = "none"\n')):
        code, out = run("fly", _airframe(tmp_path, table), *CATALOG, "--motor", "F29-8", "--json")
        advice[how] = {w["code"]: w["message"] for w in json.loads(out)["warnings"]}["no-recovery"]
    # the table exists: asking to add one sends the user looking for what is already there
    assert "add a [recovery] table" not in advice["none"], advice["none"]
    assert "set a device kind other than none in [recovery] (or add [[recovery]] entries)" in advice["none"]
    assert "add a [recovery] table to the airframe file" in advice["removed"], advice["removed"]


def test_match_shows_no_negative_optimal_delay(tmp_path: Path) -> None:
    import json

    frame = _airframe(tmp_path, '[recovery]\ndevice = "parachute"\ndeploy = "ejection"\ndrag_coefficient = 0.8\n'
                      'diameter = "0.6 m"\n', "heavyq.toml", **{'mass = "310 g"': 'mass = "780 g"'})
    args = ("match", frame, *CATALOG, "--allow-smaller-motors")
    code, out = run(*args, env={"COLUMNS": "120"})
    row = next(line for line in out.splitlines() if " E9-4,6,8 " in line)
    assert "/-" not in row and "4/none" in row, row  # the reason says "optimal delay none: apogee ... before burnout"
    report = tmp_path / "m.html"
    run(*args, "--report", str(report))
    page = html.unescape(report.read_text(encoding="utf-8"))
    cells = re.search(r"<tr>(?:(?!</tr>).)*E9-4,6,8(?:(?!</tr>).)*</tr>", page).group(0)  # its ranking row
    assert "/-1.2" not in cells and "4/none" in cells, cells
    code, out = run(*args, "--json")
    e9 = next(c for c in json.loads(out)["candidates"] if c["designation"] == "E9-4,6,8")
    assert e9["optimal_delay_s"] < 0  # the JSON keeps its number


def test_scatter_shows_no_opening_figures_without_a_device(tmp_path: Path) -> None:
    frame = _airframe(tmp_path, '[recovery]\ndevice = "none"\n', "none.toml")
    code, out = run("scatter", frame, *CATALOG, "--motor", "F29-8", "-n", "40")
    text = " ".join(out.split())
    assert "opening air speed" not in text and "Deployment above" not in text, out  # nothing opens
    assert "no recovery device" in text, out
    code, out = run("scatter", str(QUIBBLE), *CATALOG, "--motor", "F29-8", "-n", "40")
    assert "opening air speed" in out and "Deployment above" in " ".join(out.split())
