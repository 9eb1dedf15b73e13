"""Tables wider than the terminal are printed whole, never cut (second new-user trial of issue 16): a delay list
cut from '7,12,14' to '7,12,1' reads as a 1 s delay, a title cut from 'target 400 m' to 'target 40' as another
target, a verdict 'pass with balla'; the line runs past 80 columns instead (the terminal wraps it)."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from motorlib import MotorRecord, write_record

from .conftest import AIRFRAMES, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")


def _catalog(folder: Path) -> Path:
    """Invented motors: long designations (three delays each), a 1/2A and a K beside 29 mm F motors that the
    demo airframe flies, two of them sharing a designation so that the maker is added to the name."""
    folder.mkdir()
    shapes = [("1/2A0.36-4,10,14", 0.36, 1.0, 0.013, "Zorblat Aerospace (fictional)"),
              ("K1825-7,12,14", 1825.07, 2300.0, 0.054, "Quokka Thrust Works (fictional)"),
              ("F33-6,12,14", 33.0, 55.0, 0.029, "Zorblat Aerospace (fictional)"),
              ("F33-6,12,14", 33.0, 56.0, 0.029, "Quokka Thrust Works (fictional)"),
              ("F29-4,5,8", 29.0, 52.0, 0.029, "Drumlin Propulsion (fictional)")]
    for k, (label, average_n, impulse_ns, diameter_m, maker) in enumerate(shapes):
        burn = impulse_ns / average_n
        t = np.array([0.0, 0.05, 0.5, 1.0]) * burn
        f = np.array([0.0, 1.0, 1.0, 0.0])
        f = f * impulse_ns / np.trapezoid(f, t)
        delays = tuple(float(d) for d in label.split("-")[1].split(","))
        write_record(MotorRecord(label, t, f, maker=maker, diameter_m=diameter_m, length_m=0.12,
                                 total_mass_kg=0.08 * max(1.0, impulse_ns / 60.0) ** 0.8,
                                 propellant_mass_kg=0.04 * max(1.0, impulse_ns / 60.0) ** 0.8, delays_s=delays),
                     folder / f"m{k}.xml")
    return folder


def test_catalog_list_never_cuts_a_cell(tmp_path: Path) -> None:
    cat = _catalog(tmp_path / "cat")
    code, out = run("catalog", "list", "--catalog", str(cat))
    assert code == 0, out
    assert "check" in out and "7,12,14" in out and "4,10,14" in out and "1,874.90" in out, out
    assert max(map(len, out.splitlines())) > 80  # wider than the terminal, whole: the terminal wraps it


def test_match_table_never_cuts_a_cell(tmp_path: Path) -> None:
    cat = _catalog(tmp_path / "cat")
    code, out = run("match", QUIBBLE, "--catalog", str(cat), "--target", "400", "--ballast", "--show-rejected")
    assert code == 0, out
    flat = " ".join(out.split())
    assert "target 400 m ±5 %" in flat, out
    rows = [line for line in out.splitlines() if " pass with" in line and line.strip()[:1].isdigit()]
    assert len(rows) == 3 and all(line.rstrip().endswith("pass with ballast") for line in rows), out


def test_show_rejected_footer_counts_ranked_and_rejected_apart(tmp_path: Path) -> None:
    # new-user trial: with --show-rejected and --top, the motors that do not fit come after the ranked ones, and
    # the footer called all of those below the cut "ranked"
    cat = _catalog(tmp_path / "cat")
    code, out = run("match", QUIBBLE, "--catalog", str(cat), "--target", "400", "--show-rejected", "--top", "2")
    assert code == 0, out
    flat = " ".join(out.split())
    assert "1 more ranked motor(s) and 2 that do not fit below #2 are not shown" in flat, out
