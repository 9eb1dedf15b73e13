"""Issue 13: a bug reaches the user as one clear line with a hint; ``--debug`` shows the traceback."""

from __future__ import annotations

import pytest
from click.testing import CliRunner

from motorlib.cli import descent as descent_module
from motorlib.cli.main import main


def _broken(*args: object, **kwargs: object) -> float:
    raise RuntimeError("simulated bug")


def test_a_bug_is_an_internal_error_with_a_hint(monkeypatch: pytest.MonkeyPatch) -> None:
    import motorlib.flight.descent as physics

    monkeypatch.setattr(physics, "pad_terminal_speed_m_s", _broken)
    result = CliRunner().invoke(main, ["descent", "--mass", "100g", "--drag-area", "0.1"])
    assert result.exit_code == 3  # a bug: neither findings (1) nor unusable input (2)
    assert "internal error (RuntimeError: simulated bug)" in result.output and "--debug" in result.output
    assert "Traceback" not in result.output
    assert descent_module is not None


def test_debug_shows_the_traceback(monkeypatch: pytest.MonkeyPatch) -> None:
    import motorlib.flight.descent as physics

    monkeypatch.setattr(physics, "pad_terminal_speed_m_s", _broken)
    result = CliRunner().invoke(main, ["--debug", "descent", "--mass", "100g", "--drag-area", "0.1"])
    assert isinstance(result.exception, RuntimeError)


def test_an_os_error_names_the_path(tmp_path) -> None:
    result = CliRunner().invoke(main, ["new-airframe", str(tmp_path / "missing" / "x.toml")])
    assert result.exit_code == 2
    assert "missing" in result.output and "Traceback" not in result.output


def test_json_output_is_always_json() -> None:
    """Python writes Infinity and NaN, which no JSON reader takes: every JSON output goes through one helper."""
    import json
    import math

    import numpy as np

    from motorlib.cli.output import _strict_json

    text = _strict_json({"a": math.inf, "b": [1.0, math.nan, {"c": -math.inf}], "d": np.float64("nan"), "e": 2})
    assert json.loads(text) == {"a": None, "b": [1.0, None, {"c": None}], "d": None, "e": 2}
    assert "Infinity" not in text and "NaN" not in text
