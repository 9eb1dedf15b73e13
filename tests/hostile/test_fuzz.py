"""Issue 13: hypothesis fuzzing of the three readers and of unit parsing; counterexamples found are pinned.

The property: a reader given anything either returns a valid result or raises a MotorlibError (which the
command line prints as ``Error: ...``); no other exception, so no traceback, whatever the input.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from motorlib.errors import MotorlibError, QuantityError
from motorlib.files.airframe_toml import load_airframe
from motorlib.files.motor_csv import read_csv_curve
from motorlib.files.motor_xml import record_from_bytes
from motorlib.units import UNITS, parse_quantity

from .conftest import AIRFRAME, SAMPLE_DIR

GOOD_XML = (SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml").read_bytes()
GOOD_TOML = AIRFRAME.read_text(encoding="utf-8")
FUZZ = settings(max_examples=int(__import__("os").environ.get("FUZZ_EXAMPLES", "150")), deadline=None)


def _mutate(base: bytes, position: float, insert: bytes, cut: int) -> bytes:
    at = int(position * len(base))
    return base[:at] + insert + base[at + cut:]


@FUZZ
@given(st.floats(0, 1), st.binary(max_size=40), st.integers(0, 40))
@example(0.5, "2026-12-01Z".encode(), 0)  # pinned: a time-zoned date once raised ValueError
@example(0.0, b"\xff\xfe", 0)  # pinned: a UTF-16 byte-order mark
def test_the_xml_reader_never_raises_anything_else(position: float, insert: bytes, cut: int) -> None:
    _read_or_refuse(_mutate(GOOD_XML, position, insert, cut))


def _read_or_refuse(data: bytes) -> None:
    """The property: a record with a finite impulse, or a MotorlibError."""
    try:
        record = record_from_bytes(data, "fuzz.xml")
    except MotorlibError:
        return
    assert math.isfinite(record.total_impulse_ns)


@FUZZ
@given(st.lists(st.sampled_from(["date=\"2026-12-01Z\"", "1e308", "1e400", "NaN", "-0", "\n", " ", "<", "&",
                                 "unit=\"in\"", "0.1 5", "9" * 30]), max_size=4), st.floats(0, 1))
@example(["1e308"], 0.93)  # pinned: a huge finite thrust once gave an infinite impulse and broke the catalog
def test_the_xml_reader_on_plausible_tokens(tokens: list[str], position: float) -> None:
    _read_or_refuse(_mutate(GOOD_XML, position, " ".join(tokens).encode(), 0))


@FUZZ
@given(text=st.text(alphabet=st.sampled_from(list("0123456789.,;\t -+eE#\nabtimeshrunzN_()[]µ")), max_size=200))
@example(text="time_us,thrust_ozf\n0,0\n1,2\n2,0\n")  # pinned: units once ignored
@example(text="time_s,thrust_furlongs\n0,0\n1,2\n")  # pinned: an unknown unit once read as newtons
@example(text="t,counts\n0,0\n1,2\n")  # pinned: counts once read as newtons
def test_the_csv_reader_never_raises_anything_else(text: str, tmp_path_factory: pytest.TempPathFactory) -> None:
    path = tmp_path_factory.mktemp("csv") / "fuzz.csv"
    path.write_text(text, encoding="utf-8")
    try:
        curve = read_csv_curve(path)
    except MotorlibError:
        return
    assert curve.time_s.shape == curve.thrust_n.shape


@FUZZ
@given(line=st.integers(0, 40), text=st.text(max_size=30))
@example(line=4, text="mass = \"1e400 g\"\n")  # pinned: a quantity over the float range
@example(line=0, text="\udc80")  # pinned: a byte that is not UTF-8
def test_the_airframe_reader_never_raises_anything_else(line: int, text: str,
                                                        tmp_path_factory: pytest.TempPathFactory) -> None:
    lines = GOOD_TOML.splitlines()
    lines.insert(min(line, len(lines)), text)
    path = tmp_path_factory.mktemp("toml") / "fuzz.toml"
    path.write_bytes("\n".join(lines).encode("utf-8", "surrogateescape"))
    try:
        load_airframe(path)
    except MotorlibError:
        return


@FUZZ
@given(st.text(max_size=20), st.sampled_from(sorted(UNITS)))
@example("1e400 m", "length")  # pinned: parsed as inf
@example("-1e400 kg", "mass")
def test_unit_parsing_gives_a_finite_value_or_a_quantity_error(text: str, kind: str) -> None:
    try:
        value = parse_quantity(text, kind)
    except QuantityError:
        return
    assert math.isfinite(value)


def test_a_quantity_over_the_float_range_is_refused() -> None:
    with pytest.raises(QuantityError, match="finite"):
        parse_quantity("1e400 m", "length")


def test_pinned_utf16_record_with_doctype_is_refused() -> None:
    doc = '<?xml version="1.0" encoding="UTF-16"?>\n<!DOCTYPE m [<!ENTITY x "y">]>\n<motor-record/>'
    with pytest.raises(MotorlibError, match="UTF-8"):
        record_from_bytes(doc.encode("utf-16"), "u16.xml")


def test_pinned_tmp_path(tmp_path: Path) -> None:
    """A time-zoned date is a date (xs:date allows the zone)."""
    record = record_from_bytes(GOOD_XML.replace(b'date="2026-12-01"', b'date="2026-12-01-05:00"'), "tz.xml")
    assert record.provenance.date.isoformat() == "2026-12-01"


@FUZZ
@given(n=st.integers(0, 400), seed=st.integers(0, 2**32 - 1), shape=st.sampled_from(
    ["flat", "spike", "step-at-end", "ramp", "noise", "burst", "two-rows", "negative"]))
@example(n=154, seed=1172, shape="spike")  # pinned: ZeroDivisionError, no thrust left after filtering
def test_the_log_reduction_never_raises_anything_else(n: int, seed: int, shape: str) -> None:
    """Degenerate stand logs (issue 13 class 11): a reduction or a MotorlibError, never a numpy error."""
    import numpy as np

    from motorlib.motor.reduction import reduce_log

    rng = np.random.default_rng(seed)
    n = 2 if shape == "two-rows" else n
    t = np.cumsum(rng.uniform(1e-4, 2e-3, n))
    centre = float(t.mean()) if n else 0.0
    f = {"flat": np.full(n, 5.0), "spike": np.where(np.arange(n) == n // 2, 1e3, 0.0),
         "step-at-end": np.where(np.arange(n) > n - 3, 50.0, 0.0), "ramp": np.linspace(0, 100, n),
         "noise": rng.normal(0, 1, n), "burst": np.where((t > centre - 0.01) & (t < centre + 0.01), 40.0, 0.2),
         "two-rows": np.array([0.0, 5.0])[:n], "negative": -np.abs(rng.normal(0, 30, n))}[shape]
    try:
        reduction = reduce_log(t, f)
    except MotorlibError:
        return
    assert np.all(np.isfinite(reduction.thrust_n))
