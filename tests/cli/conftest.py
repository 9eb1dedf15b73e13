"""Shared by the CLI tests: ``run`` drives the ``motorlib`` group through click's CliRunner."""

from __future__ import annotations

from click.testing import CliRunner

from motorlib.cli.main import main

from ..conftest import SAMPLE_DIR

AIRFRAMES = SAMPLE_DIR / "airframes"


def run(*args: str) -> tuple[int, str]:
    result = CliRunner().invoke(main, list(args))
    return result.exit_code, result.output
