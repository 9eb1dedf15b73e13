"""The click group class behind ``motorlib`` and ``motorlib catalog``: every failure becomes ``Error: ...``.

The one place an error reaches the terminal:

* a :class:`~motorlib.errors.MotorlibError` as ``Error: path:line: field: problem``;
* an ``OSError`` (a missing folder, no permission, a name too long) as ``Error: PATH: what went wrong``;
* anything else is a bug in motorlib: ``Error: internal error (...)`` with a one-line hint, and the
  traceback only with ``motorlib --debug`` (or ``MOTORLIB_DEBUG=1``).

All three exit with status 1; a usage error (a bad option) exits with 2, as click does.
"""

from __future__ import annotations

import os
from typing import Any

import click

from ..errors import MotorlibError


def os_error_text(exc: OSError) -> str:
    """``PATH: reason`` for an OSError, e.g. ``out/x.png: No such file or directory``."""
    reason = exc.strerror or str(exc) or type(exc).__name__
    names = [str(n) for n in (exc.filename, exc.filename2) if n is not None]
    return f"{' -> '.join(names)}: {reason}" if names else reason


def _debug(ctx: click.Context) -> bool:
    return bool(ctx.find_root().params.get("debug")) or os.environ.get("MOTORLIB_DEBUG", "") not in ("", "0")


class _Group(click.Group):
    """Turns library errors, OSErrors and bugs into a clean ``Error: ...`` message with exit status 1."""

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except MotorlibError as exc:
            raise click.ClickException(str(exc)) from exc
        except (click.exceptions.ClickException, click.exceptions.Exit, click.exceptions.Abort):
            raise
        except OSError as exc:
            raise click.ClickException(os_error_text(exc)) from exc
        except MemoryError as exc:
            raise click.ClickException("out of memory: the input is far larger than motorlib can handle") from exc
        except Exception as exc:
            if _debug(ctx):
                raise
            raise click.ClickException(
                f"internal error ({type(exc).__name__}: {exc}); this is a bug in motorlib. Run again with "
                "'motorlib --debug ...' to see where it happened, and please report it") from exc
