"""values.py and check_values.md say the same: every number a test imports is written, with its status, in its entry."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from .values import ENTRIES, STATUSES, CheckValues

CHECK_VALUES = Path(__file__).resolve().parent / "check_values.md"
_KEY_COLUMNS = ("quantity", "unit")
_NUMBER = re.compile(r"(?<![\w.])[-−]?\d+(?:\.\d+)?(?:[eE][-−]?\d+)?(?![\w.]*\d)")


def _sections(text: str) -> dict[str, str]:
    """The text of every entry: from its ``### name`` heading to the next heading."""
    parts = re.split(r"^#{2,3} +(.+?) *$", text, flags=re.MULTILINE)
    return {name: body for name, body in zip(parts[1::2], parts[2::2])}


SECTIONS = _sections(CHECK_VALUES.read_text(encoding="utf-8"))


def _numbers(text: str) -> set[float]:
    return {float(m.replace("−", "-")) for m in _NUMBER.findall(text)}


def test_the_number_reader_reads_what_the_file_writes() -> None:
    # The consistency check below is only as good as this reader: unicode minus, exponents, trailing zeros.
    assert _numbers("L = −6.5 K/km, β = 1.458e-6, p = 101325.00 Pa, x ≈ 4.2e−3") == {-6.5, 1.458e-6, 101325.0, 4.2e-3}
    assert _numbers("§7.4.3, NFPA 1122 §4.9.2") == {1122.0}  # a clause number is not a value


@pytest.mark.parametrize("entry", ENTRIES, ids=lambda e: f"{e.entry}:{e.columns[0]}")
def test_every_value_is_written_in_its_entry(entry: CheckValues) -> None:
    assert entry.entry in SECTIONS, f"{entry.cite}: no such heading in check_values.md"
    body = SECTIONS[entry.entry]
    written = _numbers(body)
    for row in entry.rows:
        for column, value in zip(entry.columns, row):
            if column in _KEY_COLUMNS:  # names for Python, not values: "g0_m_s2"
                continue
            if isinstance(value, str):
                assert f"| {value} |" in body, f"{entry.cite}: {value!r} is not a cell there"
            else:
                assert float(value) in written, f"{entry.cite}: {value!r} is not written there"


@pytest.mark.parametrize("entry", ENTRIES, ids=lambda e: f"{e.entry}:{e.columns[0]}")
def test_every_entry_states_its_status_and_source(entry: CheckValues) -> None:
    body = SECTIONS[entry.entry]
    assert entry.status in body, f"{entry.cite}: status {entry.status!r} not stated"
    assert "Used by:" in body and re.search(r"\bSources?\b", body), f"{entry.cite}: source or users not stated"


def test_the_status_words_are_the_files_own() -> None:
    table = SECTIONS["Status words"]
    assert [s for s in STATUSES if f"| {s} |" in table] == list(STATUSES)


def test_every_entry_of_the_file_says_what_uses_it() -> None:
    entries = [name for name in SECTIONS if re.fullmatch(r"[a-z0-9-]+", name)]
    assert len(entries) >= 20
    for name in entries:
        assert "Used by:" in SECTIONS[name], name
        assert any(status in SECTIONS[name] for status in STATUSES), name
