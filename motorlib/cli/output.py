"""Consoles (rich, imported on first use), JSON output, and the safety caution every flight prediction ends with."""

from __future__ import annotations

import functools
import json
import sys
from typing import Any, Sequence

from ..safety import SAFETY_CAUTION as _EPILOG

# what to do about an output that exists (every command that writes a file says it alike)
_OVERWRITE_HINT = "choose another name or use --overwrite to replace it"

# An output path of '-' means standard output, as is usual on the command line; a file of that name is './-'.
STDOUT_PATH = "-"
STDOUT_HELP = "'-' prints it on standard output (the command's own report then goes to standard error)"

# The output options whose content cannot go to standard output, and what to say: a PNG is binary, and an HTML
# report is a document to open or print, mixed with nothing else (``--report -`` in a terminal is a page of markup).
_FILE_ONLY = {"--plot": "a PNG chart", "--report": "an HTML report"}


@functools.lru_cache(maxsize=None)  # one subclass, made when first needed (rich stays off the start-up path)
def _console_class() -> Any:
    """rich's Console, except that a closed pipe raises BrokenPipeError (rich ends the process with status 1 by
    itself); :mod:`.group` then ends every command alike (status 141, see its docstring); and that a table wider
    than the console is printed whole (see ``print``)."""
    from rich.console import Console

    class _Console(Console):
        def print(self, *objects: Any, **kwargs: Any) -> None:
            """A table that needs more columns than the console has (its ``min_width``: tables._lock_widths) is
            printed whole, that wide, instead of with cut cells."""
            needed = max((o.min_width for o in objects  # a Table, or present.tables.LongTable
                          if isinstance(getattr(o, "min_width", None), int)), default=0)
            if needed <= self.width:
                return super().print(*objects, **kwargs)
            width = self.width
            self.width = needed
            try:
                return super().print(*objects, **kwargs)
            finally:
                self.width = width

        def on_broken_pipe(self) -> None:
            self.quiet = True  # nothing more to write
            import errno

            raise BrokenPipeError(errno.EPIPE, "Broken pipe")

    return _Console


def _console() -> Any:
    return _console_class()(highlight=False)


def _err_console() -> Any:
    return _console_class()(stderr=True, highlight=False)


def _json_text(data: Any) -> str:
    """``data`` as JSON: indented for a person at a terminal, compact for a pipe or a file.

    Indenting costs: at 5,000 match candidates it switches ``json`` from its C
    encoder to the pure-Python one, about 2.5 times the time (120 ms more).
    """
    return _strict_json(data, indent=2 if sys.stdout.isatty() else None)


def _echo_json(data: Any) -> None:
    """Print ``data`` as JSON (:func:`_json_text`) and a newline on standard output.

    Written to ``sys.stdout``, not through ``click.echo``: to a pipe or a file, echo runs its ANSI-stripping
    regular expression over the whole text (``json`` escapes the escape character, so it can never match) and
    appends the newline by copying the text; for the 9 MB of a 5,000-motor ``match --json`` that was about 50
    million instructions (1 % of the command). The text is ASCII, so the stream's encoding never matters.
    """
    stream = sys.stdout
    if stream is None:  # no standard output attached (as click.echo, print nothing)
        return
    stream.write(_json_text(data))
    stream.write("\n")
    stream.flush()


def _strict_json(data: Any, **kwargs: Any) -> str:
    """``json.dumps`` that always gives JSON: a non-finite number (which Python writes as ``Infinity`` or
    ``NaN``, which no JSON reader takes) becomes ``null``. Costs nothing when every number is finite."""
    try:
        return json.dumps(data, allow_nan=False, **kwargs)
    except ValueError:
        return json.dumps(_finite_or_none(data), allow_nan=False, **kwargs)


def _finite_or_none(data: Any) -> Any:
    import math

    if isinstance(data, float):
        return data if math.isfinite(data) else None
    if isinstance(data, dict):
        return {k: _finite_or_none(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [_finite_or_none(v) for v in data]
    if hasattr(data, "dtype") and hasattr(data, "tolist"):  # numpy scalars and arrays
        return _finite_or_none(data.tolist())
    return data


def _caution(console: Any) -> None:
    console.print(f"[bold yellow]Caution:[/bold yellow] [dim]{_EPILOG}[/dim]")  # as match's table ends


def _write_report(report: Any, path: str, overwrite: bool, inputs: list[str], *, check_only: bool = False) -> Any:
    """Write an HTML report: never over an existing file without ``--overwrite``, never over an input.

    With ``check_only`` nothing is written: a command calls it first, so that a refused report path stops it
    before it writes anything else.
    """

    from ..present.report import check_report_target, write_report

    try:
        if check_only:
            return check_report_target(path, overwrite=overwrite, inputs=inputs)
        return write_report(report, path, overwrite=overwrite, inputs=inputs)
    except FileExistsError as exc:
        raise _report_error(f"{exc}; {_OVERWRITE_HINT}") from exc
    except ValueError as exc:
        raise _report_error(str(exc)) from exc


def _check_outputs(outputs: dict[str, str | None], overwrite: bool, inputs: Sequence[Any] = (), *,
                   printing: str | None = None) -> None:
    """Refuse, before any work, output paths a command must not write: the one check every output option uses.

    ``outputs`` maps an option (``--plot``) to its path or None. Refused: a path that is one of ``inputs``
    (even with ``--overwrite``), two options naming one file, an existing file without ``--overwrite``,
    a folder, and a parent folder that does not exist. Raises an input error (exit status 2, as for every unusable input).

    A path of ``-`` (:data:`STDOUT_PATH`) is standard output: refused for a PNG chart or an HTML report, for a
    second option, and when ``printing`` (the flag that prints the command's results, e.g. ``--json``) was given.
    """
    import os

    from .group import _InputError

    def same(a: str, b: Any) -> bool:
        try:
            if os.path.exists(a) and os.path.exists(b) and os.path.samefile(a, b):
                return True
        except OSError:
            pass
        return os.path.realpath(a) == os.path.realpath(b)

    claimed: dict[str, str] = {}
    for option, path in outputs.items():
        if not path:
            continue
        if path == STDOUT_PATH:
            _check_stdout(option, claimed, printing)
            claimed[option] = path
            continue
        if any(same(path, source) for source in inputs if source):
            raise _InputError(f"{option} {path}: is an input of this command; choose another file name")
        for other, taken in claimed.items():
            if taken != STDOUT_PATH and same(path, taken):
                raise _InputError(f"{option} {path}: also given to {other}; choose another file name")
        claimed[option] = path
        if os.path.isdir(path):
            raise _InputError(f"{option} {path}: is a folder; give a file name")
        if os.path.lexists(path) and not overwrite and _is_regular(path):
            raise _InputError(f"{option} {path}: already exists; {_OVERWRITE_HINT}")
        parent = os.path.dirname(path) or "."
        if not os.path.isdir(parent):
            raise _InputError(f"{option} {path}: folder {parent} does not exist")


def _check_stdout(option: str, claimed: dict[str, str], printing: str | None) -> None:
    """Refuse ``OPTION -`` when standard output cannot take it: a chart or report, or already in use."""
    from .group import _InputError

    if option in _FILE_ONLY:
        raise _InputError(f"{option} -: {_FILE_ONLY[option]} cannot be written to standard output; give a file name")
    taken = printing or next((other for other, path in claimed.items() if path == STDOUT_PATH), None)
    if taken:
        raise _InputError(f"{option} -: {taken} prints to standard output too; give {option} a file name, "
                          f"or leave out {taken}")


def _write_output(path: str, data: bytes, overwrite: bool) -> Any:
    """Write an output option's ``data``: to standard output for ``-``, else atomically to the file ``path``.

    Returns the path written, or None for standard output (there is no file to name in a 'Wrote ...' line).
    """
    if path == STDOUT_PATH:
        stream = sys.stdout
        if stream is None:  # no standard output attached (as click.echo, print nothing)
            return None
        stream.flush()  # anything printed before goes first
        binary = getattr(stream, "buffer", None)
        if binary is not None:
            binary.write(data)
            binary.flush()
        else:
            stream.write(data.decode("utf-8"))
            stream.flush()
        return None
    from ..files.fsio import write_atomic

    return write_atomic(path, data, overwrite=overwrite)


def _report_console(*paths: str | None) -> Any:
    """The console for the command's own report: standard error when one of ``paths`` is ``-`` (the data has
    standard output), else standard output."""
    return _err_console() if STDOUT_PATH in paths else _console()


def _is_regular(path: str) -> bool:
    """Whether ``path`` is a regular file (or a link to none): a pipe or device such as /dev/null is written into."""
    import os
    import stat

    try:
        return stat.S_ISREG(os.stat(path).st_mode)
    except OSError:
        return True


def _card_units(units: Any) -> str:
    """The system name the flight card and the reports take ("si" or "imperial") from the display setting."""
    system = getattr(units, "system", units)
    return "imperial" if system == "imperial" else "si"


def _report_error(message: str) -> Exception:
    """An unusable --report path: exit status 2."""
    from .group import _InputError

    return _InputError(message)
