"""Consoles (rich, imported on first use), JSON output, and the safety caution every flight prediction ends with."""

from __future__ import annotations

import json
import sys
from typing import Any

from ..safety import SAFETY_CAUTION as _EPILOG


def _console() -> Any:
    from rich.console import Console

    return Console(highlight=False)


def _err_console() -> Any:
    from rich.console import Console

    return Console(stderr=True, highlight=False)


def _json_text(data: Any) -> str:
    """``data`` as JSON: indented for a person at a terminal, compact for a pipe or a file.

    Indenting costs: at 5,000 match candidates it switches ``json`` from its C
    encoder to the pure-Python one, about 2.5 times the time (120 ms more).
    """
    return json.dumps(data, indent=2 if sys.stdout.isatty() else None)


def _caution(console: Any) -> None:
    console.print(f"[dim]{_EPILOG}[/dim]")


def _write_report(report: Any, path: str, overwrite: bool, inputs: list[str], *, check_only: bool = False) -> Any:
    """Write an HTML report: never over an existing file without ``--overwrite``, never over an input.

    With ``check_only`` nothing is written: a command calls it first, so that a refused report path stops it
    before it writes anything else.
    """
    import click

    from ..present.report import check_report_target, write_report

    try:
        if check_only:
            return check_report_target(path, overwrite=overwrite, inputs=inputs)
        return write_report(report, path, overwrite=overwrite, inputs=inputs)
    except FileExistsError as exc:
        raise click.ClickException(f"{exc}; use --overwrite to replace it") from exc
    except ValueError as exc:
        raise click.ClickException(str(exc)) from exc


def _card_units(units: Any) -> str:
    """The system name the flight card and the reports take ("si" or "imperial") from the display setting."""
    system = getattr(units, "system", units)
    return "imperial" if system == "imperial" else "si"
