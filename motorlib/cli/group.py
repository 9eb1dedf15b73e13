"""The click group class behind ``motorlib`` and ``motorlib catalog``: library errors become ``Error: ...``.

The one place a :class:`~motorlib.errors.MotorlibError` reaches the terminal, as
``Error: path:line: field: problem`` with exit status 1.
"""

from __future__ import annotations

from typing import Any

import click

from ..errors import MotorlibError


class _Group(click.Group):
    """Turns any MotorlibError into a clean ``Error: ...`` message with exit status 1."""

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except MotorlibError as exc:
            raise click.ClickException(str(exc)) from exc
