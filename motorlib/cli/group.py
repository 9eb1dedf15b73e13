"""The click group class behind ``motorlib`` and ``motorlib catalog``: every failure becomes ``Error: ...``.

The one place an error reaches the terminal:

* a :class:`~motorlib.errors.MotorlibError` as ``Error: path:line: field: problem``;
* an ``OSError`` (a missing folder, no permission, a name too long) as ``Error: PATH: what went wrong``;
* anything else is a bug in motorlib: ``Error: internal error (...)`` with a one-line hint, and the
  traceback only with ``motorlib --debug`` (or ``MOTORLIB_DEBUG=1``).

Exit statuses, the same for every command: 0 done; 1 a check found errors or a flight failed a rule (the
command says so and has printed its results); 2 unusable input: a bad option (as click does), a file that
cannot be read or is not what it should be, an output that cannot be written; 3 an internal error (a bug);
141 the reader of standard output stopped before motorlib had written all of it (``motorlib catalog list | head -1``
on a catalog whose listing is larger than the pipe buffer).

A closed pipe: when the program reading motorlib's output stops (``head``, a pager quit early), the next write
to standard output fails with EPIPE. motorlib then ends at once, quietly (no message: the reader asked for no
more), with status 141 = 128 + SIGPIPE (13), the status a shell reports for any program stopped by a closed pipe
(``yes | head -1``), so ``set -o pipefail`` scripts and ``$PIPESTATUS`` see motorlib as every other tool. Not 0:
the command did not finish (``motorlib check DIR | head`` must not claim that every curve was checked), and not
1, which says that a check found errors. It is the same whether the pipe breaks during the command, before it
writes anything, or when the interpreter flushes standard output at exit (:func:`run_guarded`); whatever status
the command was about to give, its output was cut short, and 141 says so. Output that fits in the pipe buffer
(64 KiB on Linux: a short listing, ``--help``) is all written before the reader stops, so no write fails and
motorlib cannot know that the reader read only part of it: that run ends with its usual status (0 for
``motorlib --help | head -1``), as for any other program. That is inherent to pipes, and motorlib does not fake a
141 it cannot observe.
"""

from __future__ import annotations

import errno
import io
import os
import sys
from typing import Any, Callable, NoReturn

import click

from ..errors import MotorlibError


def os_error_text(exc: OSError) -> str:
    """``PATH: reason`` for an OSError, e.g. ``out/x.png: No such file or directory``."""
    reason = exc.strerror or str(exc) or type(exc).__name__
    names = [str(n) for n in (exc.filename, exc.filename2) if n is not None]
    return f"{' -> '.join(names)}: {reason}" if names else reason


# 128 + SIGPIPE (13): what a shell reports for a program ended by a closed pipe (see the module docstring)
BROKEN_PIPE_STATUS = 141


def _quiet_standard_output() -> None:
    """Point standard output's file descriptor at the null device, so that nothing written or flushed later (the
    interpreter flushes standard output at exit) meets the closed pipe again: Python's documented recipe (the
    library reference, ``signal``, "Note on SIGPIPE"). Standard error too when it is the same pipe (``2>&1 |``)."""
    try:
        out_fd = sys.stdout.fileno()
    except (AttributeError, OSError, ValueError):  # no real stream (a test's CliRunner): nothing reaches a pipe
        return
    try:
        err_fd = sys.stderr.fileno()
        same = os.path.samestat(os.fstat(out_fd), os.fstat(err_fd))
    except (AttributeError, OSError, ValueError):
        err_fd, same = -1, False
    devnull = os.open(os.devnull, os.O_WRONLY)
    try:
        os.dup2(devnull, out_fd)
        if same:
            os.dup2(devnull, err_fd)
    finally:
        os.close(devnull)


def _end_on_broken_pipe() -> NoReturn:
    """End the command quietly with :data:`BROKEN_PIPE_STATUS`: the reader of standard output stopped."""
    _quiet_standard_output()
    raise click.exceptions.Exit(BROKEN_PIPE_STATUS)


def _buffered_stdout() -> None:
    """Give an unbuffered standard output (``python -u``, ``PYTHONUNBUFFERED``) a buffer that it flushes at every
    line: written straight to the file, a long text that a closing pipe takes only in part was cut short with
    no error at all (the text layer ignores a short write), so the command ended with status 0."""
    stream = sys.stdout
    raw = getattr(stream, "buffer", None)
    if not isinstance(stream, io.TextIOWrapper) or not isinstance(raw, io.FileIO):
        return
    sys.stdout = io.TextIOWrapper(io.BufferedWriter(raw), encoding=stream.encoding, errors=stream.errors,
                                  line_buffering=True, write_through=True)


def run_guarded(main: Callable[[], Any]) -> NoReturn:
    """Run the ``motorlib`` group ``main`` (click's standalone mode, which always ends in SystemExit), then flush
    standard output; a closed pipe there too ends with :data:`BROKEN_PIPE_STATUS`, never with Python's "Exception
    ignored ... BrokenPipeError" and status 120."""
    _buffered_stdout()
    try:
        main()
    except SystemExit as exc:
        ending = exc
    else:
        ending = SystemExit(0)
    try:
        if sys.stdout is not None:
            sys.stdout.flush()
    except OSError as exc:
        if exc.errno != errno.EPIPE:
            raise
        _quiet_standard_output()
        ending = SystemExit(BROKEN_PIPE_STATUS)
    raise ending


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
    """A command whose printing flags (``--csv``, ``--json``) also accept ``-`` (standard output) after them.

    Two printing flags given together are refused naming both: they would share standard output, and one of them
    used to win without a word (``match --csv --json`` printed the JSON alone). A file name after a printing flag
    (``match AIRFRAME --csv rank.csv``, ``--csv=rank.csv``) is refused saying that the flag prints to standard
    output and how to redirect it, not as an "unexpected extra argument". The flag takes no optional file name:
    ``match --json AIRFRAME`` would then read the airframe file as the output's name.
    """

    def parse_args(self, ctx: click.Context, args: list[str]) -> list[str]:
        printing = {name: param.name for param in self.params if isinstance(param, click.Option) and param.is_flag
                    for name in param.opts if name in _PRINTING_FLAGS}
        flags = set(printing)
        kept: list[str] = []
        previous = None
        for i, arg in enumerate(args):
            if arg == "--":  # everything after it is an argument, never an option
                kept += args[i:]
                break
            if arg == "-" and previous in flags:
                continue  # `--csv -`: the flag alone says it
            previous = arg
            flag, equals, value = arg.partition("=")
            if equals and flag in flags and value != "-":
                _refuse_file_name(ctx, flag, value)
            kept.append(arg[:-2] if arg in {f"{flag}=-" for flag in flags} else arg)
        followers = {word: flag for flag, word in zip(kept, kept[1:]) if flag in flags}
        allowed, ctx.allow_extra_args = ctx.allow_extra_args, True  # the extra arguments are judged below
        try:
            rest = super().parse_args(ctx, kept)
        finally:
            ctx.allow_extra_args = allowed
        if rest and not allowed and not ctx.resilient_parsing:
            named = next((word for word in rest if word in followers), None)
            if named is not None:
                _refuse_file_name(ctx, followers[named], named)
            s = "s" if len(rest) > 1 else ""  # click's own wording for anything else
            ctx.fail(f"Got unexpected extra argument{s} ({' '.join(rest)})")
        given = [flag for flag, name in printing.items() if ctx.params.get(name)]
        if len(given) > 1:
            raise click.UsageError(f"{' and '.join(given)}: each prints to standard output, and only one can; "
                                   f"leave out one of them (run the command once for each)", ctx)
        return rest


def _refuse_file_name(ctx: click.Context, flag: str, name: str) -> NoReturn:
    """``FLAG NAME``: a flag that prints was given a file name; say where its output goes and how to save it."""
    raise click.UsageError(f"{flag} {name}: {flag} prints to standard output and takes no file name; to save it in "
                           f"a file, redirect standard output: {ctx.command_path} ... {flag} > {name}", ctx)


class _Group(click.Group):
    """Turns library errors, OSErrors and bugs into a clean ``Error: ...`` message (exit 2, or 3 for a bug)."""

    command_class = _Command  # the subcommands made by ``@group.command`` (``catalog list --csv -``)

    def make_context(self, info_name: str | None, args: list[str], parent: click.Context | None = None,
                     **extra: Any) -> click.Context:
        try:  # the group's own --help and --version print here, before any command runs
            return super().make_context(info_name, args, parent=parent, **extra)
        except OSError as exc:
            if exc.errno == errno.EPIPE:
                _end_on_broken_pipe()
            raise

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except MotorlibError as exc:
            raise _InputError(str(exc)) from exc
        except (click.exceptions.ClickException, click.exceptions.Exit, click.exceptions.Abort):
            raise
        except OSError as exc:
            if exc.errno == errno.EPIPE:  # the reader of standard output stopped (`| head`): see the docstring
                _end_on_broken_pipe()
            raise _InputError(os_error_text(exc)) from exc
        except MemoryError as exc:
            raise _InputError("out of memory: the input is far larger than motorlib can handle") from exc
        except Exception as exc:
            if _debug(ctx):
                raise
            raise _InternalError(
                f"internal error ({type(exc).__name__}: {exc}); this is a bug in motorlib. Run again with "
                "'motorlib --debug ...' to see where it happened, and please report it") from exc
