"""Helpers for the hostile-input tests: run the CLI in-process and require a clean outcome (never a traceback)."""

from __future__ import annotations

import traceback
from pathlib import Path

from click.testing import CliRunner, Result

from motorlib.cli.main import main

ROOT = Path(__file__).resolve().parents[2]
SAMPLE_DIR = ROOT / "sample_curves"
AIRFRAME = SAMPLE_DIR / "airframes" / "quibble-41.toml"


def run(*args: str, cwd: Path | None = None) -> Result:
    """Run ``motorlib ARGS``; fail the test on any exception that is not a clean exit (a traceback for a user)."""
    runner = CliRunner()
    result = runner.invoke(main, [str(a) for a in args], catch_exceptions=True)
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        text = "".join(traceback.format_exception(result.exception))
        raise AssertionError(f"motorlib {' '.join(map(str, args))} raised:\n{text}\noutput:\n{result.output}")
    return result
