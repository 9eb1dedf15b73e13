"""The ranked candidate record: frozen, typed, a dict only at the JSON edge (issue 17)."""

from __future__ import annotations

import dataclasses
import json

import pytest

from motorlib.files.airframe_toml import load_airframe
from motorlib.files.motor_xml import read_record
from motorlib.matching import Candidate, MatchSettings, rank

from ..conftest import SAMPLE_DIR


def _candidate(**kwargs) -> Candidate:
    base = dict(motor_id="m", handle="h", designation="F10-4", maker="", impulse_class="F", total_impulse_ns=60.0,
                diameter_m=0.024, length_m=0.07, fits=True, adapter=None)
    return Candidate(**{**base, **kwargs})


def test_a_candidate_is_frozen_and_owns_its_sequences() -> None:
    reasons = ["ejection too fast"]
    c = _candidate(reasons=reasons, reason_codes=["ejection-fast"])
    reasons.append("later")
    assert c.reasons == ("ejection too fast",) and c.reason_codes == ("ejection-fast",)
    with pytest.raises(dataclasses.FrozenInstanceError):
        c.apogee_m = 1.0  # type: ignore[misc]


def test_every_reason_and_note_needs_its_code() -> None:
    with pytest.raises(ValueError, match="F10-4: every reason and note needs its code"):
        _candidate(reasons=("a", "b"), reason_codes=("x",))
    with pytest.raises(ValueError, match="needs its code"):
        _candidate(notes=("n",))



def test_from_columns_builds_the_records_the_constructor_builds() -> None:
    # issue 16: the ranking builds its candidates column by column; each must be the constructor's record, in
    # field order (the JSON layout), with its own tuples, and refuse what the constructor refuses
    kinds = [dict(), dict(apogee_m=410.0, delay_adjusted=True, reasons=["too fast"], reason_codes=["ejection-fast"],
                          ballast_reasons=["x"], ballast_reason_codes=("y",), notes=("n",), note_codes=["c"]),
             dict(fits=False, adapter="24-18 mm", verdict="no fit", ballast_passes=False)]
    base = dict(motor_id="m", handle="h", designation="F10-4", maker="", impulse_class="F", total_impulse_ns=60.0,
                diameter_m=0.024, length_m=0.07, fits=True, adapter=None)
    given = [{**base, **kind} for kind in kinds]
    names = sorted({name for values in given for name in values})
    defaults = {f.name: f.default for f in dataclasses.fields(Candidate)}
    columns = {name: [values.get(name, defaults[name]) for values in given] for name in names}
    fast = Candidate.from_columns(columns)
    slow = [Candidate(**values) for values in given]
    assert fast == slow and [c.as_dict() for c in fast] == [c.as_dict() for c in slow]
    assert all(list(c.__dict__) == list(defaults) for c in fast)
    assert all(type(c.reasons) is tuple and type(c.note_codes) is tuple for c in fast)
    assert type(fast[1].ballast_reasons) is tuple and fast[0].ballast_reasons is None
    with pytest.raises(TypeError, match="has no field 'colour'"):
        Candidate.from_columns({**columns, "colour": ["red"] * 3})
    with pytest.raises(TypeError, match="needs field 'maker'"):
        Candidate.from_columns({k: v for k, v in columns.items() if k != "maker"})
    with pytest.raises(ValueError, match="needs its code"):
        Candidate.from_columns({**columns, "reason_codes": [(), (), ()]})
    assert Candidate.from_columns({name: [] for name in base}) == []

def test_as_dict_is_plain_json_with_the_notes_where_the_output_had_them() -> None:
    fits = _candidate(notes=("needs an adapter",), note_codes=("adapter",), verdict="pass", passes=True)
    data = fits.as_dict()
    assert data["notes"] == ["needs an adapter"] and json.loads(json.dumps(data)) == data
    keys = list(data)
    assert keys.index("notes") < keys.index("verdict") and keys[-1] == "ballast_passes"
    rejected = list(_candidate(fits=False, reasons=("too wide",), reason_codes=("motor-does-not-fit",)).as_dict())
    assert rejected[-2:] == ["notes", "note_codes"] and set(rejected) == set(keys)


def test_rank_returns_records_whose_figures_match_their_flight() -> None:
    # the record carries what the flight gave: apogee from the same batched simulation, not a copy of a dict
    from motorlib.flight import simulate

    frame = load_airframe(SAMPLE_DIR / "airframes" / "quibble-41.toml")
    motor = read_record(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")
    (c,) = rank(frame, [motor], settings=MatchSettings(target_m=400.0)).candidates
    assert isinstance(c, Candidate) and c.fits and c.designation == motor.designation
    alone = simulate(frame, [motor], descent=False)
    assert c.apogee_m == pytest.approx(float(alone.apogee_m[0]), rel=1e-12)
    assert c.verdict in ("pass", "off target", "fail") and c.passes == (c.verdict == "pass")


def _identity(**kwargs) -> dict:
    return {**dict(motor_id="m", handle="h", designation="F10-4", maker="", impulse_class="F",
                   total_impulse_ns=60.0, diameter_m=0.024, length_m=0.07, fits=True, adapter=None), **kwargs}


@pytest.mark.parametrize("extra", [
    {},
    dict(apogee_m=412.5, chosen_delay_s=6.0, reasons=["ejection too fast"], reason_codes=["ejection-fast"],
         verdict="fail"),
    dict(fits=False, notes=("n",), note_codes=("adapter",), ballast_reasons=["x"], ballast_reason_codes=["y"],
         ballast_kg=0.1, ballast_passes=False),
])
def test_one_row_of_columns_builds_the_same_record_as_the_constructor(extra) -> None:
    values = _identity(**extra)
    fast, slow = _one(values), Candidate(**values)
    assert fast == slow and type(fast) is Candidate
    assert list(fast.__dict__) == [f.name for f in dataclasses.fields(Candidate)]  # the JSON key order
    assert fast.as_dict() == slow.as_dict() and list(fast.as_dict()) == list(slow.as_dict())
    assert all(type(getattr(fast, name)) is tuple for name in ("reasons", "reason_codes", "notes", "note_codes"))
    with pytest.raises(dataclasses.FrozenInstanceError):
        fast.apogee_m = 1.0  # type: ignore[misc]


def _one(values: dict) -> Candidate:
    """The candidate of one row of columns (Candidate.from_columns)."""
    (candidate,) = Candidate.from_columns({name: [value] for name, value in values.items()})
    return candidate


def test_columns_refuse_what_the_constructor_refuses() -> None:
    with pytest.raises(TypeError, match="no field 'apogee'"):
        _one(_identity(apogee=1.0))
    values = _identity()
    del values["maker"]
    with pytest.raises(TypeError, match="needs field 'maker'"):
        _one(values)
    with pytest.raises(ValueError, match="F10-4: every reason and note needs its code"):
        _one(_identity(reasons=("a",)))


def test_json_dicts_write_the_text_of_as_dict() -> None:
    fits = _candidate(reasons=("ejection too fast",), reason_codes=("ejection-fast",), notes=("n",), note_codes=("c",),
                      ballast_reasons=("a",), ballast_reason_codes=("b",))
    no_fit = _candidate(fits=False, reasons=("does not fit",), reason_codes=("motor-does-not-fit",), notes=("n",),
                        note_codes=("c",))
    for indent in (None, 2):
        assert (json.dumps(Candidate.json_dicts([fits, no_fit]), indent=indent)
                == json.dumps([fits.as_dict(), no_fit.as_dict()], indent=indent))
