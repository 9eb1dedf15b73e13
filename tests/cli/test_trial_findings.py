"""Defects a first-time user met (new-user trial before closing issue 17): each test failed before its fix."""

from __future__ import annotations

import json

from .conftest import AIRFRAMES, SAMPLE_DIR, run

QUIBBLE = str(AIRFRAMES / "quibble-41.toml")
TOLLGATE = str(AIRFRAMES / "tollgate-98.toml")


def test_fly_exits_1_when_the_flight_breaks_a_launch_rule() -> None:
    # README, "When something goes wrong": status 1 when a flight breaks a rule (the results are printed first).
    # G99-14 on quibble-41 at a 3 s delay opens the parachute far above its 25 m/s limit.
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "G99-14", "--delay", "3", "--json")
    payload = json.loads(out)
    assert "deployment-fast" in [w["code"] for w in payload["warnings"]]
    assert code == 1


def test_fly_refuses_a_delay_for_a_plugged_motor() -> None:
    code, out = run("fly", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--motor", "H124-P", "--delay", "6")
    assert code == 2
    assert "H124-P" in out and "no ejection charge" in out


def test_fly_refuses_a_delay_when_electronics_open_the_recovery() -> None:
    code, out = run("fly", TOLLGATE, "--catalog", str(SAMPLE_DIR), "--motor", "600I296-14", "--delay", "14")
    assert code == 2
    assert "electronics" in out


def test_match_robust_refuses_the_options_it_does_not_use() -> None:
    # (--target stays: among motors equally likely to succeed, the robust ranking prefers the median nearest it)
    for extra in (("--ballast",), ("--csv",), ("--show-rejected",), ("--report", "r.html"), ("--plot", "r.png")):
        code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--robust", "--samples", "5", *extra)
        assert code == 2, (extra, out)
        assert extra[0] in out and "--robust" in out


def test_match_reports_no_descent_rate_where_nothing_opens() -> None:
    # fly gives null (stuck) or the ballistic fall; match's estimate under the device must not pretend it opened
    code, out = run("match", QUIBBLE, "--catalog", str(SAMPLE_DIR), "--allow-smaller-motors", "--show-rejected", "--json")
    assert code == 0, out
    by_name = {c["designation"]: c for c in json.loads(out)["candidates"]}
    for name in ("B6-0", "A8-3,5"):
        assert by_name[name]["landing_speed_m_s"] is None, (name, by_name[name]["landing_speed_m_s"])
