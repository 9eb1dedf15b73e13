"""Shared by the CLI tests: ``run`` drives the ``motorlib`` group through click's CliRunner at 80 columns."""

from __future__ import annotations

from click.testing import CliRunner

from motorlib.cli.main import main

from ..conftest import SAMPLE_DIR

AIRFRAMES = SAMPLE_DIR / "airframes"


def run(*args: str, env: dict[str, str] | None = None) -> tuple[int, str]:
    """Exit code and output of ``motorlib ARGS``; rich sees an 80-column terminal unless ``env`` says otherwise."""
    result = CliRunner().invoke(main, list(args), env={"COLUMNS": "80", **(env or {})})
    return result.exit_code, result.output
