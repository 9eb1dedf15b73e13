"""``motorlib new-airframe``: write a commented airframe file to start from."""

from __future__ import annotations

import click

from .group import _InputError
from .options import _units_option, display_units
from .output import STDOUT_PATH, _OVERWRITE_HINT, _console, _write_output


@click.command("new-airframe")
@click.argument("path", type=click.Path(dir_okay=False))
@click.option("--overwrite", is_flag=True, help="Replace PATH if it exists.")
@_units_option
def new_airframe(path: str, overwrite: bool, units: str | None) -> None:
    """Write a commented airframe file (TOML) to PATH, to edit and then fly or match.

    PATH '-' prints it on standard output.

    Every key is explained in the file; the example values are a 41.6 mm
    sport model, in metric or imperial units (--units). An existing file is
    never replaced without --overwrite.

    \b
    Example:
      motorlib new-airframe rocket.toml
      motorlib new-airframe rocket.toml --units imperial --overwrite
    """
    from pathlib import Path

    from ..files.airframe_template import airframe_template
    name = "rocket.toml" if path == STDOUT_PATH else Path(path).name
    text = airframe_template(display_units(units).system, name)
    try:
        written = _write_output(path, text.encode(), overwrite)
    except FileExistsError as exc:
        raise _InputError(f"{exc}; {_OVERWRITE_HINT}") from None
    if written is None:  # standard output: the file alone, nothing else
        return
    from rich.markup import escape

    # named as the user wrote it: the file './-' is not standard output in the command suggested
    _console().print(f"Wrote {escape(path)}: edit the values, then try 'motorlib fly {escape(path)} --motor F29-8'.")
