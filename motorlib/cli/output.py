"""Consoles (rich, imported on first use), JSON output, and the safety caution every flight prediction ends with."""

from __future__ import annotations

import json
import sys
from typing import Any

_EPILOG = ("Predictions are estimates. Follow your national rocketry association's safety code, local law and "
           "the launch site's rules; the range safety officer decides; fly only motors within your certification.")


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
