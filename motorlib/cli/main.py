"""The ``motorlib`` command line: parse options, call the library, render the result.

``cli/`` is the only package that imports click. This module holds the group :func:`main` (the console-script
entry point) with its version option and safety epilog, and registers the commands, one module each, imported only when the command runs or the help lists them:
``check``, ``import`` (:mod:`.importing`), ``fly``, ``airframe``, ``descent``, ``catalog``, ``match``, ``demo``,
``reduce``, ``new-airframe``, ``scatter`` and ``calibrate``.
Shared option types and catalog lookup live in :mod:`.options`, consoles and the caution in :mod:`.output`.
Library errors, OSErrors and bugs reach the terminal in one place, :class:`.group._Group`, as
``Error: path:line: field: problem`` with exit 1 (``--debug`` shows the traceback of a bug). Command modules import only click and the standard library at start-up; each command imports
the library modules it needs (numpy, lxml, rich, matplotlib behind them) when it runs.
"""

from __future__ import annotations

import gc
import os

import click

import importlib
from typing import Any

from .. import __version__
from .group import _Group, run_guarded
from .options import _units_option
from .output import _EPILOG

# Each command's name -> its module (in this package) and the function there; a command's module is imported
# only when that command runs or the help lists it, so `motorlib match` does not import the other eleven.
_COMMANDS = {
    "check": (".check", "check"), "import": (".importing", "import_curve"), "fly": (".fly", "fly"),
    "airframe": (".airframe", "airframe"), "descent": (".descent", "descent"), "catalog": (".catalog", "catalog"),
    "match": (".match", "match"), "demo": (".demo", "demo"), "reduce": (".reduce", "reduce"),
    "new-airframe": (".new_airframe", "new_airframe"), "scatter": (".scatter", "scatter"),
    "calibrate": (".calibrate", "calibrate"),
}


class _Commands(_Group):
    """The top-level group: its commands are imported on first use (:data:`_COMMANDS`)."""

    def list_commands(self, ctx: click.Context) -> list[str]:
        return sorted(set(_COMMANDS) | set(self.commands))

    def get_command(self, ctx: click.Context, cmd_name: str) -> Any:
        if cmd_name not in self.commands and cmd_name in _COMMANDS:
            module, attribute = _COMMANDS[cmd_name]
            self.add_command(getattr(importlib.import_module(module, __package__), attribute), cmd_name)
        return self.commands.get(cmd_name)


@click.group(cls=_Commands, epilog=_EPILOG, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="motorlib")
@click.option("--debug", is_flag=True, envvar="MOTORLIB_DEBUG",
              help="Show the Python traceback of an internal error (a bug in motorlib).")
@_units_option
def main(units: str | None, debug: bool) -> None:
    """motorlib: thrust-curve catalog, checks and flight tools for rocket flyers.

    Quantities take units (800ft, 29mm, 25g, 9.5s); a bare number is the SI
    unit, and options for motor sizes and small masses ask for a unit. Set
    the display units once with --units, $MOTORLIB_UNITS or 'units =
    "imperial"' in the user config file (e.g. ~/.config/motorlib/config.toml).

    \b
    Examples:
      motorlib demo                   # rank the bundled motors for a demo rocket
      motorlib new-airframe rocket.toml      # start an airframe file to edit
      motorlib match my-rocket.toml --target 300 --ceiling 450
      motorlib --units imperial match my-rocket.toml --target 1000ft
      motorlib check sample_curves/             # check every bundled curve
      motorlib fly sample_curves/airframes/quibble-41.toml --motor F29-8
      motorlib airframe sample_curves/airframes/quibble-41.toml --motor F29-8
      motorlib check stand.csv --designation F30-6 --diameter 24mm --json
      motorlib import stand.csv -o F30.xml --designation F30-6
    """


def run() -> None:
    """The ``motorlib`` program: :func:`main` in a process of its own.

    A command is a short process that builds many records without reference cycles (5,000 catalog rows, as
    many ranked candidates); the cyclic garbage collector's default young-generation threshold (700
    allocations) makes it sweep those again and again, up to a fifth of a large ranking's time. The
    threshold is raised for the process to 200,000: at 20,000 a cold 5,000-motor match still spent about 25 ms
    in five young sweeps of records that stay alive (about 8 ms at 1,000 motors); at 200,000 it spends about 3,
    all before this function runs. Only garbage in reference cycles waits for a sweep (the rest is freed at
    once), so the most it can hold back is that many objects. Tests that call :func:`main` in-process keep the
    default.

    numpy's OpenBLAS starts a thread per core as it loads, about 50 ms of a cold ``motorlib match`` on the
    reference machine (2 cores), for threads no command uses: the flight and the ranking are element-wise, and
    the only linear algebra (calibrate's least squares, scatter's covariance) is on matrices of a few columns,
    below the size at which OpenBLAS splits work between threads. So the process asks for one BLAS thread
    before numpy is imported; a value set in the environment is kept.

    A reader of standard output that stops early (``| head -1``) while the command still has output to write ends
    it quietly with status 141, also when the pipe breaks as the interpreter flushes standard output at exit
    (:func:`.group.run_guarded`); output that fitted in the pipe buffer was delivered, and keeps its usual status.
    """
    os.environ.setdefault(_BLAS_THREADS, "1")
    gc.set_threshold(200_000, 20, 20)
    run_guarded(main)


_BLAS_THREADS = "OPENBLAS_NUM_THREADS"  # read by OpenBLAS once, when numpy loads it
