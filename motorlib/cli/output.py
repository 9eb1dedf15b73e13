"""Consoles (rich, imported on first use) and the safety caution every flight prediction ends with."""

from __future__ import annotations

from typing import Any

_EPILOG = ("Predictions are estimates. Follow your national rocketry association's safety code, local law and "
           "the launch site's rules; the range safety officer decides; fly only motors within your certification.")


def _console() -> Any:
    from rich.console import Console

    return Console(highlight=False)


def _err_console() -> Any:
    from rich.console import Console

    return Console(stderr=True, highlight=False)


def _caution(console: Any) -> None:
    console.print(f"[dim]{_EPILOG}[/dim]")
