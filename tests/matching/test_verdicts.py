"""Issue 14: verdicts that mean what they say; ballast for every motor too strong; target tolerance; adapters."""

from __future__ import annotations

import json
import math
from dataclasses import replace

import pytest
from click.testing import CliRunner
from hypothesis import given, strategies as st

from motorlib.catalog import Catalog
from motorlib.cli.main import main
from motorlib.files.airframe_toml import load_airframe
from motorlib.flight import simulate
from motorlib.matching import Candidate, MatchSettings, rank
from motorlib.matching.adapters import STANDARD_MOTOR_DIAMETERS_M, adapter_steps
from motorlib.matching.verdicts import VERDICTS

from ..conftest import SAMPLE_DIR

QUIBBLE = SAMPLE_DIR / "airframes" / "quibble-41.toml"
TOLLGATE = SAMPLE_DIR / "airframes" / "tollgate-98.toml"


@pytest.fixture(scope="module")
def catalog() -> Catalog:
    return Catalog(SAMPLE_DIR, read_only=True)


def _rank(catalog: Catalog, frame=None, **kwargs):
    return rank(frame or load_airframe(QUIBBLE), catalog, MatchSettings(**kwargs))


def _by_name(result, designation: str) -> Candidate:
    return next(c for c in result.candidates if c.designation == designation)


def _landing_speed_m_s(frame, mass_kg: float) -> float:
    # Terminal descent rate where drag equals weight, v = sqrt(2 m g / (rho (CdA_device + CdA_body))) (textbook
    # closed form); air density at the pad from the U.S. Standard Atmosphere 1976 pressure at 120 m with the
    # airframe file's 15 degC, rho = p / (R T) with R = 287.05287 J/(kg K) (USSA 1976, table constants).
    p = 101325.0 * (1.0 - 0.0065 * 120.0 / 288.15) ** 5.255877
    rho = p / (287.05287 * 288.15)
    device = 0.8 * math.pi * 0.3 ** 2          # quibble-41.toml: parachute Cd 0.8, 0.6 m across
    body = 0.55 * math.pi * 0.0208 ** 2        # body Cd 0.55 on 41.6 mm
    return math.sqrt(2.0 * mass_kg * 9.80665 / (rho * (device + body)))


# ---------------------------------------------------------------- ballast for every motor too strong
def test_a_motor_over_the_ceiling_gets_ballast_and_is_rechecked(catalog: Catalog) -> None:
    # Issue 14: the demo's F at 706 m over a 600 m ceiling got no nose weight.
    frame = load_airframe(QUIBBLE)
    result = _rank(catalog, target_m=400.0, ceiling_m=600.0, allow_smaller_motors=True, ballast=True)
    f51 = _by_name(result, "F51-10")
    assert f51.apogee_m > 600.0 and "over-ceiling" in f51.reason_codes
    assert f51.ballast_kg is not None and f51.ballast_kg > 0
    alone = simulate(frame, [catalog.get(f51.motor_id)], added_mass_kg=f51.ballast_kg, descent=False)
    assert alone.apogee_m[0] == pytest.approx(400.0, rel=1e-3)  # the single flight with the mass, to 0.1 %
    assert "over-ceiling" not in f51.ballast_reason_codes
    # The descent rule is re-checked with the added mass (closed form above).
    burnt_kg = float(alone.liftoff_mass_kg[0]) - catalog.get(f51.motor_id).propellant_mass_kg
    landing = _landing_speed_m_s(frame, burnt_kg)
    assert f51.ballast_landing_speed_m_s == pytest.approx(landing, rel=2e-3)
    assert ("descent-fast" in f51.ballast_reason_codes) == (landing > 6.5)
    assert f51.ballast_passes == (not f51.ballast_reason_codes)
    assert f51.verdict == ("pass with ballast" if f51.ballast_passes else "fail")


def test_a_too_strong_motor_that_passes_with_ballast_says_so(catalog: Catalog) -> None:
    # The flyer: 500 m target under a 700 m ceiling; an F that overshoots passes once ballasted.
    result = _rank(catalog, target_m=500.0, ceiling_m=700.0, allow_smaller_motors=True, ballast=True,
                   rules=replace(MatchSettings().rules, max_landing_speed_m_s=8.0))
    f51 = _by_name(result, "F51-10")  # about 706 m without ballast: over the ceiling
    assert "over-ceiling" in f51.reason_codes and f51.reasons  # the failure without ballast stays listed
    assert f51.ballast_passes is True and f51.verdict == "pass with ballast"
    assert f51 in result.with_ballast and f51 not in result.passing
    order = [c.verdict for c in result.candidates]
    assert order.index("pass with ballast") < order.index("fail")


def test_without_ballast_no_motor_is_solved(catalog: Catalog) -> None:
    result = _rank(catalog, target_m=400.0, ceiling_m=600.0, allow_smaller_motors=True)
    assert all(c.ballast_kg is None and c.ballast_passes is None for c in result.candidates)
    assert "pass with ballast" not in {c.verdict for c in result.candidates}


# ---------------------------------------------------------------- the target as a tolerance band
def test_a_safe_motor_far_below_the_target_is_off_target_not_pass(catalog: Catalog) -> None:
    # Issue 14: a motor at 126 m "passed" a 500 m target.
    result = _rank(catalog, target_m=400.0, allow_smaller_motors=True)
    e25 = _by_name(result, "E25-7")  # about 297 m, breaks no rule
    assert e25.reasons == () and e25.verdict == "off target" and not e25.passes
    assert e25 not in result.passing
    assert "below target" in e25.note_codes
    assert any("below the 400 m target" in n for n in e25.notes)
    for c in result.candidates:  # notes never count as failures, failures never hide in notes
        assert not set(c.note_codes) & set(c.reason_codes)
        if c.passes:
            assert abs(c.apogee_m - 400.0) <= 0.05 * 400.0


def test_tolerance_is_an_option(catalog: Catalog) -> None:
    e25 = _by_name(_rank(catalog, target_m=400.0, allow_smaller_motors=True), "E25-7")
    miss = abs(e25.apogee_m - 400.0) / 400.0
    wide = _by_name(_rank(catalog, target_m=400.0, allow_smaller_motors=True, target_tolerance=miss + 1e-6), "E25-7")
    narrow = _by_name(_rank(catalog, target_m=400.0, allow_smaller_motors=True, target_tolerance=miss - 1e-6), "E25-7")
    assert wide.verdict == "pass" and narrow.verdict == "off target"


def test_count_of_passes_counts_only_good_choices(catalog: Catalog) -> None:
    result = _rank(catalog, target_m=400.0, allow_smaller_motors=True, target_tolerance=0.3)
    assert [c.verdict for c in result.passing] == ["pass"] * len(result.passing)
    assert {c.designation for c in result.passing} == {
        c.designation for c in result.candidates
        if not c.reasons and c.apogee_m is not None and abs(c.apogee_m - 400.0) <= 120.0}


@pytest.mark.parametrize("bad", [0.0, 1.0, -0.1])
def test_tolerance_is_validated(bad: float) -> None:
    with pytest.raises(ValueError, match="target_tolerance"):
        MatchSettings(target_m=400.0, target_tolerance=bad)


# ---------------------------------------------------------------- words a user reads at a glance
def test_stopped_flights_and_misfits_have_their_own_words(catalog: Catalog) -> None:
    result = _rank(catalog, target_m=400.0, allow_smaller_motors=True)
    words = {c.verdict for c in result.candidates}
    assert {"stuck on rail", "no fit"} <= words
    heavy = replace(load_airframe(QUIBBLE), mass_kg=5.0)  # a C6's ~15 N peak never lifts 5 kg
    c6 = _by_name(_rank(catalog, heavy, allow_smaller_motors=True), "C6-3,5,7")
    assert c6.verdict == "no liftoff" and c6.reason_codes == ("no-liftoff",)
    for c in result.candidates:
        assert set(c.verdict.split()) <= set(" ".join(VERDICTS).split())
        assert "fit" not in c.reason_codes and "flight" not in c.reason_codes
        if not c.fits:
            assert c.verdict in ("no fit", "above class", "no masses")


def test_class_limit_has_its_own_word(catalog: Catalog) -> None:
    g59 = _by_name(_rank(catalog, target_m=400.0, max_class="F"), "G59-10")
    assert g59.verdict == "above class" and g59.reason_codes == ("above-class",)


def test_show_rejected_never_labels_a_misfit_fit(catalog: Catalog) -> None:
    out = CliRunner().invoke(main, ["match", str(QUIBBLE), "--catalog", str(SAMPLE_DIR), "--target", "400",
                                    "--show-rejected"], env={"COLUMNS": "80"})
    assert out.exit_code == 0, out.output
    rows = [line for line in out.output.splitlines() if "M2578-P" in line and line.strip()[:1].isdigit()]
    assert rows and rows[0].rstrip().endswith("no fit")
    assert "off target" in out.output
    for line in out.output.splitlines():
        if len(line) > 80:
            pytest.fail(f"wider than 80 columns: {line!r}")


# ---------------------------------------------------------------- adapters
def test_standard_sizes_are_the_trade_sizes() -> None:
    # Common practice (no published source): motors, cases and adapters are sold in these diameters.
    assert [round(d * 1e3, 1) for d in STANDARD_MOTOR_DIAMETERS_M] == [10.5, 13, 18, 24, 29, 38, 54, 75, 98, 152]


@given(st.integers(0, 9), st.integers(0, 9))
def test_adapter_steps_count_standard_sizes(motor: int, mount: int) -> None:
    d = STANDARD_MOTOR_DIAMETERS_M
    assert adapter_steps(d[motor], d[mount]) == max(mount - motor, 0)


def test_adapters_limited_to_two_sizes_down_by_default(catalog: Catalog) -> None:
    # Issue 14: --allow-smaller-motors put 10.5 mm motors in a 98 mm airframe.
    result = _rank(catalog, load_airframe(TOLLGATE), allow_smaller_motors=True)
    fitting = {round(c.diameter_m * 1e3) for c in result.candidates if c.fits}
    assert fitting == {54, 75, 98}
    assert _by_name(result, "1/4A2-2,3").verdict == "no fit"
    assert "8 standard sizes down" in _by_name(result, "1/4A2-2,3").reasons[0]
    one = _rank(catalog, load_airframe(TOLLGATE), allow_smaller_motors=True, adapter_steps=1)
    assert {round(c.diameter_m * 1e3) for c in one.candidates if c.fits} == {75, 98}


def test_each_motor_says_which_adapter_it_needs(catalog: Catalog) -> None:
    result = _rank(catalog, target_m=400.0, allow_smaller_motors=True)
    assert _by_name(result, "F29-8").adapter == "24 to 29 mm"
    assert _by_name(result, "C6-3,5,7").adapter == "18 to 29 mm"
    assert _by_name(result, "F51-10").adapter is None
    assert "needs a 24 to 29 mm adapter" in _by_name(result, "F29-8").notes
    assert _by_name(result, "1/2A3-2,4").adapter is None  # 13 mm: three sizes down, does not fit


def test_match_json_carries_verdicts_and_options() -> None:
    out = CliRunner().invoke(main, ["match", str(QUIBBLE), "--catalog", str(SAMPLE_DIR), "--target", "400",
                                    "--target-tolerance", "30%", "--allow-smaller-motors", "--adapter-steps", "1",
                                    "--json"])
    assert out.exit_code == 0, out.output
    data = json.loads(out.output)
    assert data["conditions"]["target_tolerance"] == pytest.approx(0.30)
    assert data["conditions"]["adapter_steps"] == 1
    c6 = next(c for c in data["candidates"] if c["designation"] == "C6-3,5,7")
    assert c6["verdict"] == "no fit"
    for c in data["candidates"]:
        assert c["verdict"] in VERDICTS and isinstance(c["notes"], list)
    metres = CliRunner().invoke(main, ["match", str(QUIBBLE), "--catalog", str(SAMPLE_DIR), "--target", "400",
                                       "--target-tolerance", "120m", "--json"])
    assert json.loads(metres.output)["conditions"]["target_tolerance"] == pytest.approx(0.30)
    bare = CliRunner().invoke(main, ["match", str(QUIBBLE), "--catalog", str(SAMPLE_DIR), "--target", "400",
                                     "--target-tolerance", "5"])
    assert bare.exit_code != 0 and "5%" in bare.output


def test_charts_draw_the_tolerance_asked_for(catalog: Catalog, tmp_path) -> None:
    from motorlib.present.plots import match_plot
    from motorlib.present.report_charts import match_chart

    result = _rank(catalog, target_m=400.0, allow_smaller_motors=True, target_tolerance=0.3)
    svg = match_chart(result).svg
    assert "within 30 % of the target" in svg and "within 5 %" not in svg
    assert match_plot(result, tmp_path / "m.png").read_bytes()[:4] == b"\x89PNG"


def test_verdict_order_is_the_legend_order() -> None:
    from motorlib.matching.verdicts import verdict_order

    assert [verdict_order(word) for word in VERDICTS] == list(range(len(VERDICTS)))
    with pytest.raises(ValueError, match="'passes' is not a verdict"):
        verdict_order("passes")
