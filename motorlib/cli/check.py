"""``motorlib check``: check thrust-curve files and their labels."""

from __future__ import annotations

import sys
from typing import Any

import click

from .group import _Command

from .options import _Finite, _metadata_for, _metadata_options, _units_option, display_units
from .output import _console, _strict_json


@click.command(cls=_Command)
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--json", "as_json", is_flag=True, help="Print a JSON list, one object per file.")
@click.option("--details/--summary", default=None,
              help="Full metrics per file (default for one file) or one table row per file (default for several).")
@click.option("--burn-threshold", type=_Finite(0.1, 50.0), default=5.0, show_default=True,
              help="Burn time starts and ends where thrust crosses this percentage of peak thrust.")
@click.option("--thrust-tolerance", type=_Finite(1.0, 100.0), default=20.0, show_default=True,
              help="Allowed difference, in percent, between labelled and computed average thrust.")
@_units_option
@_metadata_options
def check(paths: tuple[str, ...], as_json: bool, details: bool | None, burn_threshold: float,
          thrust_tolerance: float, units: str | None, **opts: Any) -> None:
    """Check thrust-curve files (our XML, or CSV with metadata options) and their labels.

    PATHS are files or folders (searched for .xml and .csv). For each curve it
    prints total impulse (N·s), impulse class, average and peak thrust (N), burn
    time (s) and findings: errors, warnings and notes with stable codes.

    Exit status: 0 no errors, 1 errors found, 2 a file could not be read.

    \b
    Example:
      motorlib check sample_curves/
      motorlib check test3.csv --designation G40-7 --diameter 29mm \\
          --total-mass 120g --propellant-mass 60g
    """
    from ..motor.checks import CheckSettings
    from ..files.curvefiles import check_file, find_curve_files

    settings = CheckSettings(burn_threshold=burn_threshold / 100.0, average_thrust_tolerance=thrust_tolerance / 100.0)
    files = find_curve_files(list(paths))
    if not files:
        raise click.UsageError(f"no .xml or .csv curve files in {', '.join(paths)}")
    metadata = _metadata_for(opts, files)
    reports = [check_file(f, settings, metadata(f) if callable(metadata) else metadata, time_unit=opts["time_unit"],
                          thrust_unit=opts["thrust_unit"]) for f in files]
    if as_json:
        click.echo(_strict_json([r.as_dict() for r in reports], indent=2, default=float))
    else:
        from ..present import tables as render

        console = _console()
        shown = display_units(units)
        if details or (details is None and len(reports) == 1):
            for report in reports:
                console.print(render.check_details(report, shown))
        else:
            console.print(render.check_summary_table(reports, shown, console.width))
            for report in reports:
                if any(f.severity != "note" for f in report.findings):
                    console.print(f"[bold]{render.escape(report.source)}[/bold]")
                    console.print(render.findings_text(report, include_notes=False), end="")
        n_bad = sum(not r.ok for r in reports)
        console.print(f"{len(reports)} file(s) checked: {len(reports) - n_bad} sound, {n_bad} with errors.")
    if any(not r.readable for r in reports):
        sys.exit(2)
    if any(not r.ok for r in reports):
        sys.exit(1)
