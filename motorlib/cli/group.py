"""The click group class behind ``motorlib`` and ``motorlib catalog``: every failure becomes ``Error: ...``.

The one place an error reaches the terminal:

* a :class:`~motorlib.errors.MotorlibError` as ``Error: path:line: field: problem``;
* an ``OSError`` (a missing folder, no permission, a name too long) as ``Error: PATH: what went wrong``;
* anything else is a bug in motorlib: ``Error: internal error (...)`` with a one-line hint, and the
  traceback only with ``motorlib --debug`` (or ``MOTORLIB_DEBUG=1``).

Exit statuses, the same for every command: 0 done; 1 a check found errors or a flight failed a rule (the
command says so and has printed its results); 2 unusable input: a bad option (as click does), a file that
cannot be read or is not what it should be, an output that cannot be written; 3 an internal error (a bug).
"""

from __future__ import annotations

import errno

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


class _InputError(click.ClickException):
    """Unusable input: ``Error: ...`` with exit status 2."""

    exit_code = 2


class _InternalError(click.ClickException):
    """A bug in motorlib: ``Error: internal error ...`` with exit status 3."""

    exit_code = 3


# The flags that print to standard output. An output path of '-' means standard output (the usual convention, and
# what `fly --csv -` does), so `match --csv -` and `--json -` say the same as the flag alone rather than failing on
# an "unexpected extra argument".
_PRINTING_FLAGS = ("--csv", "--json")


class _Command(click.Command):
    """A command whose printing flags (``--csv``, ``--json``) also accept ``-`` (standard output) after them."""

    def parse_args(self, ctx: click.Context, args: list[str]) -> list[str]:
        flags = {name for param in self.params if isinstance(param, click.Option) and param.is_flag
                 for name in param.opts if name in _PRINTING_FLAGS}
        kept: list[str] = []
        previous = None
        for i, arg in enumerate(args):
            if arg == "--":  # everything after it is an argument, never an option
                kept += args[i:]
                break
            if arg == "-" and previous in flags:
                continue  # `--csv -`: the flag alone says it
            previous = arg
            kept.append(arg[:-2] if arg in {f"{flag}=-" for flag in flags} else arg)
        return super().parse_args(ctx, kept)


class _Group(click.Group):
    """Turns library errors, OSErrors and bugs into a clean ``Error: ...`` message (exit 2, or 3 for a bug)."""

    command_class = _Command  # the subcommands made by ``@group.command`` (``catalog list --csv -``)

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except MotorlibError as exc:
            raise _InputError(str(exc)) from exc
        except (click.exceptions.ClickException, click.exceptions.Exit, click.exceptions.Abort):
            raise
        except OSError as exc:
            if exc.errno == errno.EPIPE:  # the reader of standard output stopped (`| head`): click ends quietly
                raise
            raise _InputError(os_error_text(exc)) from exc
        except MemoryError as exc:
            raise _InputError("out of memory: the input is far larger than motorlib can handle") from exc
        except Exception as exc:
            if _debug(ctx):
                raise
            raise _InternalError(
                f"internal error ({type(exc).__name__}: {exc}); this is a bug in motorlib. Run again with "
                "'motorlib --debug ...' to see where it happened, and please report it") from exc
