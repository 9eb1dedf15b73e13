"""CLI output helpers: JSON is indented for a terminal and compact for a pipe (issue 16)."""

from __future__ import annotations

import io
import json
import sys
from pathlib import Path

import pytest

from motorlib.cli.output import _json_text

from .conftest import AIRFRAMES, run


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_json_is_indented_only_for_a_terminal(monkeypatch: pytest.MonkeyPatch) -> None:
    data = {"apogee_m": 412.5, "reasons": ["a", "b"]}
    monkeypatch.setattr("sys.stdout", io.StringIO())
    piped = _json_text(data)
    monkeypatch.setattr("sys.stdout", _Terminal())
    shown = _json_text(data)
    assert "\n" not in piped and shown.count("\n") >= 4
    assert json.loads(piped) == json.loads(shown) == data


@pytest.mark.parametrize("command", [["fly", "--motor", "F29-8"], ["match", "--target", "400"]])
def test_json_to_a_pipe_is_one_line(command: list[str]) -> None:
    code, out = run(command[0], str(AIRFRAMES / "quibble-41.toml"), *command[1:], "--json")
    assert code == 0, out
    assert out.count("\n") == 1 and json.loads(out)


def test_echo_json_prints_the_json_text_and_a_newline(monkeypatch: pytest.MonkeyPatch) -> None:
    from motorlib.cli.output import _echo_json

    data = {"name": "\x1b[1mbold\x1b[0m", "speed_m_s": float("inf")}  # escaped, never stripped; inf -> null
    monkeypatch.setattr("sys.stdout", io.StringIO())
    text = _json_text(data)
    _echo_json(data)
    assert sys.stdout.getvalue() == text + "\n"  # type: ignore[attr-defined]
    assert json.loads(text) == {"name": "\x1b[1mbold\x1b[0m", "speed_m_s": None}


def test_the_ranking_table_shows_forty_rows_unless_told(tmp_path: Path) -> None:
    # new-user trial: a 5,000-motor catalog printed whole was 33,000 lines and 4.5-6.7 s of drawing; the table stops
    # at 40 and says how many more fit, --top N shows more, --json lists every one
    from motorlib.catalog import Catalog

    from ..synthetic import synthetic_motors

    catalog = Catalog(tmp_path / "cat")
    for motor in [m for m in synthetic_motors(400, seed=3) if 0.5 < m.total_impulse_ns < 200.0][:60]:
        catalog.add(motor)
    airframe = str(AIRFRAMES / "quibble-41.toml")
    code, out = run("match", airframe, "--catalog", str(tmp_path / "cat"), "--json")
    listed = [c for c in json.loads(out)["candidates"] if c["fits"]]
    assert len(listed) > 45
    code, out = run("match", airframe, "--catalog", str(tmp_path / "cat"))
    assert f"{len(listed) - 40} more ranked motor(s) below #40 are not shown" in out
    code, out = run("match", airframe, "--catalog", str(tmp_path / "cat"), "--top", "45")
    assert f"{len(listed) - 45} more ranked motor(s) below #45 are not shown" in out


def test_every_command_labels_its_caution_alike() -> None:
    # new-user trial: match's table ended "Caution: Predictions are estimates...", match --robust (and fly, scatter)
    # the same sentence without the label
    from .conftest import AIRFRAMES, run

    quibble = str(AIRFRAMES / "quibble-41.toml")
    for args in (("match", quibble, "--robust", "--samples", "5", "--workers", "1", "--allow-smaller-motors"),
                 ("fly", quibble, "--motor", "F29-8")):
        code, out = run(*args)
        assert code in (0, 1), out
        assert "Caution: Predictions are estimates." in " ".join(out.split()), (args, out[-400:])
