"""``motorlib fly`` with an airframe shape (issue 11): the ``stability`` and ``drag_source`` JSON contract, the
stability warnings and --min-stability, the drag estimated from the shape when the file gives no Cd, the card
and the report."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from motorlib.files.airframe_toml import load_airframe
from motorlib.flight.rules import RULE_CODES
from motorlib.files.motor_xml import read_record
from motorlib.flight.stability import stability_for_records

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES, run

QUIBBLE = AIRFRAMES / "quibble-41.toml"
G59 = SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"
STABILITY_KEYS = {"cp_m", "cg_liftoff_m", "cg_burnout_m", "margin_liftoff_cal", "margin_rail_exit_cal",
                  "margin_burnout_cal", "min_margin_cal"}


def _fly_json(*args: str) -> dict:
    code, out = run("fly", *args, "--json")
    data = json.loads(out)
    # flown either way; status 1 exactly when a launch rule is broken
    assert code == (1 if any(w["code"] in RULE_CODES for w in data["warnings"]) else 0), out
    return data


def test_fly_json_carries_the_stability_contract() -> None:
    data = _fly_json(str(QUIBBLE), "--motor", str(G59))
    st = data["stability"]
    assert set(st) == STABILITY_KEYS and data["drag_source"] == "given"
    # the same figures as the library's, rail exit at the flight's own rail exit time
    lib = stability_for_records(load_airframe(QUIBBLE), [read_record(G59)],
                                rail_exit_time_s=np.array([data["rail_exit_time_s"]]))
    assert st == pytest.approx(lib.as_dict(0), rel=1e-12)
    assert st["min_margin_cal"] == min(st["margin_liftoff_cal"], st["margin_rail_exit_cal"], st["margin_burnout_cal"])
    # rail exit lies between liftoff and burnout: the CG moves one way as the propellant burns
    assert st["margin_liftoff_cal"] <= st["margin_rail_exit_cal"] <= st["margin_burnout_cal"]
    assert not any(w["code"].startswith("stability") for w in data["warnings"])


def test_min_stability_warns_and_marks_the_card() -> None:
    data = _fly_json(str(QUIBBLE), "--motor", str(G59), "--min-stability", "1.6")
    assert data["min_stability_cal"] == 1.6
    low = [w for w in data["warnings"] if w["code"] == "stability-low"]
    assert low and "below 1.6 cal" in low[0]["message"]
    code, out = run("fly", str(QUIBBLE), "--motor", str(G59), "--min-stability", "1.6")
    words = " ".join(out.split())  # the card wraps long lines
    assert code == 1 and "1.6 to 3 cal" in words and "stability margin 1.50 cal is below 1.6 cal" in words


def test_ballast_counts_in_the_margin() -> None:
    bare = _fly_json(str(QUIBBLE), "--motor", str(G59))["stability"]["margin_liftoff_cal"]
    weighted = _fly_json(str(QUIBBLE), "--motor", str(G59), "--ballast", "30g")["stability"]["margin_liftoff_cal"]
    assert weighted > bare  # counted at half the nose length: ahead of the CG


def test_no_geometry_no_stability(tmp_path: Path) -> None:
    data = _fly_json(str(AIRFRAMES / "fennelwick-24.toml"), "--motor", str(SAMPLE_DIR / "teakettle-thrust-co_c6-3-5-7.xml"))
    assert data["stability"] is None and data["drag_source"] == "given" and data["drag"]["cd_estimated"] is None


def test_a_file_without_cd_flies_the_estimate(tmp_path: Path) -> None:
    text = QUIBBLE.read_text().replace("drag_coefficient = 0.55   # constant\n", "")
    assert text != QUIBBLE.read_text()
    shaped = tmp_path / "shaped.toml"
    shaped.write_text(text)
    estimated = _fly_json(str(shaped), "--motor", str(G59))
    given = _fly_json(str(QUIBBLE), "--motor", str(G59))
    assert estimated["drag_source"] == "estimated" and estimated["apogee_m"] > given["apogee_m"]  # Cd 0.47 < 0.55
    code, out = run("fly", str(shaped), "--motor", str(G59))
    assert code == 0 and "estimated from the shape" in " ".join(out.split())
    code, out = run("fly", str(QUIBBLE), "--motor", str(G59))
    assert "shape estimate 0.47" in " ".join(out.split())


def test_the_report_has_a_stability_section_only_with_a_shape(tmp_path: Path) -> None:
    with_shape, without = tmp_path / "a.html", tmp_path / "b.html"
    assert run("fly", str(QUIBBLE), "--motor", str(G59), "--report", str(with_shape))[0] == 0
    assert run("fly", str(AIRFRAMES / "fennelwick-24.toml"), "--motor", str(SAMPLE_DIR / "teakettle-thrust-co_c6-3-5-7.xml"), "--report", str(without))[0] == 0  # flies cleanly: written, status 0
    html = with_shape.read_text()
    assert "<h2>Stability</h2>" in html and "margin off the rail" in html and "Barrowman" in html
    assert "<h2>Stability</h2>" not in without.read_text()
