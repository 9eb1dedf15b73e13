"""The ``motorlib`` command line: parse options, call the library, render the result.

The only module that imports click. Library errors reach the terminal in one
place, :class:`_Group`, as ``Error: path:line: field: problem`` with exit 1.
"""

from __future__ import annotations

import datetime as _dt
import json
import sys
from typing import Any

import click

from .. import __version__
from ..errors import MotorlibError, QuantityError

_EPILOG = ("Predictions are estimates. Follow your national rocketry association's safety code, local law and "
           "the launch site's rules; the range safety officer decides; fly only motors within your certification.")


class _Group(click.Group):
    """Turns any MotorlibError into a clean ``Error: ...`` message with exit status 1."""

    def invoke(self, ctx: click.Context) -> Any:
        try:
            return super().invoke(ctx)
        except MotorlibError as exc:
            raise click.ClickException(str(exc)) from exc


class _Quantity(click.ParamType):
    """A click type for quantities such as ``29mm`` or ``0.85 oz``; bare numbers take ``default_unit``."""

    def __init__(self, kind: str, default_unit: str) -> None:
        self.kind, self.default_unit = kind, default_unit
        self.name = f"{kind}"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> float:
        if isinstance(value, float):
            return value
        from ..units import parse_quantity

        try:
            return parse_quantity(value, self.kind, field=param.name if param else "value",
                                  default_unit=self.default_unit)
        except QuantityError as exc:
            self.fail(exc.problem, param, ctx)


def _delays(ctx: click.Context, param: click.Parameter, value: str | None) -> tuple[float, ...]:
    if not value:
        return ()
    try:
        delays = tuple(float(v.strip().removesuffix("s")) for v in value.replace("/", ",").split(","))
    except ValueError:
        raise click.BadParameter(f"expected delays in seconds separated by commas, e.g. 3,5,7; got {value!r}")
    if any(d <= 0 for d in delays):
        raise click.BadParameter(f"delays must be above 0 s, got {value!r}")
    return delays


def _metadata_options(func: Any) -> Any:
    """Options describing a motor whose curve file (CSV) does not."""
    options = [
        click.option("--designation", help="Label as printed on the motor, e.g. C6-5 or 1/2A3-2T. "
                                           "CSV only; default: the file name."),
        click.option("--maker", default="", help="Maker name (CSV only)."),
        click.option("--diameter", "diameter_m", type=_Quantity("length", "mm"),
                     help="Case diameter; a bare number is mm (e.g. 18, 0.5in)."),
        click.option("--length", "length_m", type=_Quantity("length", "mm"),
                     help="Case length; a bare number is mm (e.g. 70, 2.75in)."),
        click.option("--total-mass", "total_mass_kg", type=_Quantity("mass", "g"),
                     help="Loaded motor mass; a bare number is g (e.g. 24, 0.85oz)."),
        click.option("--propellant-mass", "propellant_mass_kg", type=_Quantity("mass", "g"),
                     help="Propellant mass; a bare number is g (e.g. 12.5)."),
        click.option("--delays", "delays_s", callback=_delays, metavar="S[,S...]",
                     help="Available ejection delays in seconds, e.g. 3,5,7."),
        click.option("--plugged", is_flag=True, help="No ejection charge (plugged or booster)."),
        click.option("--adjustable-delay", is_flag=True, help="The user may shorten the delay."),
        click.option("--source-kind", type=click.Choice(["certification-test", "maker-data", "static-test", "demo",
                                                         "other"]), default="other", show_default=True,
                     help="Where the curve comes from."),
        click.option("--test-date", type=click.DateTime(["%Y-%m-%d"]), help="Date of the test, YYYY-MM-DD."),
        click.option("--notes", default="", help="Free-text provenance notes (stand, lot, operator)."),
        click.option("--time-unit", help="Unit of the CSV time column (s, ms) when the header gives none."),
        click.option("--thrust-unit", help="Unit of the CSV thrust column (N, lbf, kgf, gf) when the header gives none."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def _metadata(opts: dict[str, Any]) -> Any:
    from ..files.motor_csv import CurveMetadata
    from ..motor.record import Provenance

    if opts["plugged"] and opts["delays_s"]:
        raise click.UsageError("--plugged and --delays exclude each other")
    date = opts["test_date"].date() if isinstance(opts["test_date"], _dt.datetime) else None
    return CurveMetadata(
        designation=opts["designation"] or "", maker=opts["maker"], diameter_m=opts["diameter_m"],
        length_m=opts["length_m"], total_mass_kg=opts["total_mass_kg"],
        propellant_mass_kg=opts["propellant_mass_kg"], delays_s=opts["delays_s"],
        delay_adjustable=opts["adjustable_delay"],
        provenance=Provenance(kind=opts["source_kind"], date=date, notes=opts["notes"]),
    )


def _console() -> Any:
    from rich.console import Console

    return Console(highlight=False)


@click.group(cls=_Group, epilog=_EPILOG, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="motorlib")
def main() -> None:
    """motorlib: thrust-curve catalog, checks and flight tools for rocket flyers.

    \b
    Examples:
      motorlib demo                            rank the bundled motors for a demo rocket
      motorlib match my-rocket.toml --target 300 --ceiling 450
      motorlib check sample_curves/            check every bundled curve
      motorlib fly sample_curves/airframes/quibble-41.toml --motor F29-8
      motorlib check stand.csv --designation F30-6 --diameter 24 --json
      motorlib import stand.csv -o F30.xml --designation F30-6 --maker "Our team"
    """


@main.command()
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--json", "as_json", is_flag=True, help="Print a JSON list, one object per file.")
@click.option("--details/--summary", default=None,
              help="Full metrics per file (default for one file) or one table row per file (default for several).")
@click.option("--burn-threshold", type=click.FloatRange(0.1, 50.0), default=5.0, show_default=True,
              help="Burn time starts and ends where thrust crosses this percentage of peak thrust.")
@click.option("--thrust-tolerance", type=click.FloatRange(1.0, 100.0), default=20.0, show_default=True,
              help="Allowed difference, in percent, between labelled and computed average thrust.")
@_metadata_options
def check(paths: tuple[str, ...], as_json: bool, details: bool | None, burn_threshold: float,
          thrust_tolerance: float, **opts: Any) -> None:
    """Check thrust-curve files (our XML, or CSV with metadata options) and their labels.

    PATHS are files or folders (searched for .xml and .csv). For each curve it
    prints total impulse (N·s), impulse class, average and peak thrust (N), burn
    time (s) and findings: errors, warnings and notes with stable codes.

    Exit status: 0 no errors, 1 errors found, 2 a file could not be read.

    \b
    Example:
      motorlib check sample_curves/
      motorlib check test3.csv --designation G40-7 --diameter 29mm --total-mass 120g --propellant-mass 60g
    """
    from ..motor.checks import CheckSettings
    from ..files.curvefiles import check_file, find_curve_files

    settings = CheckSettings(burn_threshold=burn_threshold / 100.0, average_thrust_tolerance=thrust_tolerance / 100.0)
    metadata = _metadata(opts)
    files = find_curve_files(list(paths))
    if not files:
        raise click.UsageError(f"no .xml or .csv curve files in {', '.join(paths)}")
    reports = [check_file(f, settings, metadata, time_unit=opts["time_unit"], thrust_unit=opts["thrust_unit"])
               for f in files]
    if as_json:
        click.echo(json.dumps([r.as_dict() for r in reports], indent=2, default=float))
    else:
        from ..present import tables as render

        console = _console()
        if details or (details is None and len(reports) == 1):
            for report in reports:
                console.print(render.check_details(report))
        else:
            console.print(render.check_summary_table(reports))
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


@main.command("import")
@click.argument("csv_file", type=click.Path(exists=True, dir_okay=False))
@click.option("-o", "--output", required=True, type=click.Path(dir_okay=False),
              help="Motor-record XML file to write (atomically).")
@click.option("--overwrite", is_flag=True, help="Replace OUTPUT if it exists.")
@click.option("--force", is_flag=True, help="Write the file even when the checks find errors.")
@_metadata_options
def import_curve(csv_file: str, output: str, overwrite: bool, force: bool, **opts: Any) -> None:
    """Convert a CSV thrust curve plus metadata into a motor-record XML file.

    The CSV holds time and thrust columns; units come from the header
    (time_ms, "t (s)", thrust_lbf, "Thrust [N]") or --time-unit/--thrust-unit.
    The curve is checked first; a curve with errors is not written unless --force.

    \b
    Example:
      motorlib import stand-03.csv -o F30-6.xml --designation F30-6 --maker "Our team" \\
          --diameter 24 --length 70 --total-mass 48g --propellant-mass 22g --delays 4,6,8 \\
          --source-kind static-test --test-date 2026-11-14
    """
    from ..present import tables as render
    from ..motor.checks import check_record, findings_from_problems
    from ..files.motor_csv import record_from_csv
    from ..files.curvefiles import CheckReport
    from ..errors import CurveDataError
    from ..files.motor_xml import write_record

    console = _console()
    try:
        record = record_from_csv(csv_file, _metadata(opts), time_unit=opts["time_unit"],
                                 thrust_unit=opts["thrust_unit"])
    except CurveDataError as exc:
        report = CheckReport(csv_file, True, None, tuple(findings_from_problems(exc)), None)
        console.print(render.findings_text(report), end="")
        raise click.ClickException(f"{csv_file}: the curve breaks the record rules above; nothing was written")
    findings = check_record(record)
    report = CheckReport(csv_file, True, record, tuple(findings), None)
    if findings:
        console.print(render.findings_text(report), end="")
    if not report.ok and not force:
        raise click.ClickException(f"{csv_file}: the checks found errors; nothing was written (use --force to "
                                   "write it anyway)")
    try:
        path = write_record(record, output, overwrite=overwrite)
    except FileExistsError as exc:
        raise click.ClickException(f"{exc}; use --overwrite to replace it") from exc
    console.print(f"Wrote {render.escape(str(path))}: {record.designation}, {record.total_impulse_ns:.4g} N·s, "
                  f"{record.computed_designation()}")


def _caution(console: Any) -> None:
    console.print(f"[dim]{_EPILOG}[/dim]")


@main.command()
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@click.option("--motor", "motor_ref", required=True,
              help="A curve file (.xml or .csv), or a motor id, handle or designation in the catalog (e.g. F29-8).")
@click.option("--catalog", "catalog_dir", type=click.Path(file_okay=False), envvar="MOTORLIB_CATALOG",
              help="Catalog to find --motor in (default: $MOTORLIB_CATALOG, else the user catalog if it exists, "
                   "else the bundled sample curves).")
@click.option("--delay", "delay_s", type=float, help="Ejection delay to use in seconds (default: the listed delay "
                                                      "closest to the optimal one).")
@click.option("--ballast", "ballast_kg", type=_Quantity("mass", "g"), default=None,
              help="Mass added to the airframe; a bare number is g (e.g. 25, 1.2oz).")
@click.option("--units", type=click.Choice(["si", "imperial"]), default="si", show_default=True,
              help="Units of the table.")
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False), help="Write the trajectory to this CSV file.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), help="Write altitude, speed and acceleration "
                                                                           "against time to this PNG file.")
def fly(airframe_file: str, motor_ref: str, catalog_dir: str | None, delay_s: float | None, ballast_kg: float | None,
        units: str, as_json: bool, csv_path: str | None, plot_path: str | None) -> None:
    """Simulate one flight of AIRFRAME_FILE (TOML) with one motor.

    Prints rail exit speed, apogee, optimal delay, the ejection altitude and
    speed at each delay, and descent figures when the airframe has recovery,
    with warnings from launch rules of thumb. Times count from motor ignition.

    \b
    Example:
      motorlib fly sample_curves/airframes/quibble-41.toml --motor F29-8 --plot f29.png
      motorlib fly my-rocket.toml --motor tests/static-3.xml --delay 6 --json
    """
    import numpy as np

    from pathlib import Path

    from ..files.airframe_toml import load_airframe
    from ..files.curvefiles import load_curve_file
    from ..flight.integrate import simulate
    from ..flight.rules import flight_warnings

    frame = load_airframe(airframe_file)
    if Path(motor_ref).is_file():
        motor = load_curve_file(motor_ref)
    else:
        motor = _open_catalog(_catalog_or_samples(catalog_dir)).get(motor_ref)
    wanted = None if delay_s is None else np.array([delay_s])
    if delay_s is not None and motor.delays_s and not motor.delay_adjustable and delay_s not in motor.delays_s:
        raise click.UsageError(f"--delay {delay_s:g}: {motor.designation} offers {', '.join(f'{d:g}' for d in motor.delays_s)} s")
    record = motor
    if delay_s is not None and motor.delay_adjustable and delay_s not in motor.delays_s:
        if not motor.delays_s or delay_s > max(motor.delays_s):
            raise click.UsageError(f"--delay {delay_s:g}: an adjustable delay can only be shortened below "
                                   f"{max(motor.delays_s or (0,)):g} s")
        from dataclasses import replace

        record = replace(motor, delays_s=tuple(sorted(set(motor.delays_s) | {delay_s})))
    results = simulate(frame, [record], added_mass_kg=ballast_kg or 0.0, deploy_delay_s=wanted,
                       trajectories=bool(csv_path or plot_path))
    summary = results.summary(0, record.delays_s)
    summary["has_recovery"] = frame.recovery is not None and frame.recovery.device != "none"
    if delay_s is not None and frame.recovery is None:
        summary["chosen_delay_s"] = delay_s
    warnings = flight_warnings(summary, wind_speed_m_s=frame.launch.wind_speed_m_s)
    written = []
    if csv_path:
        written.append(_write_trajectory_csv(results.trajectories[0], csv_path))
    if plot_path:
        from ..present.plots import flight_plot

        written.append(flight_plot(results.trajectories[0], summary, f"{frame.name} with {motor.designation}",
                                   plot_path))
    if as_json:
        payload = {"airframe": frame.name, "motor": motor.designation, "maker": motor.maker, **summary,
                   "warnings": [{"code": c, "message": m} for c, m in warnings], "caution": _EPILOG}
        click.echo(json.dumps(payload, indent=2))
        return
    from ..present import tables as render

    console = _console()
    console.print(render.flight_table(summary, f"{frame.name} with {motor.designation} ({motor.maker or 'maker unknown'})",
                                      units))
    if warnings:
        console.print(render.warnings_text(warnings), end="")
    for path in written:
        console.print(f"Wrote {render.escape(str(path))}")
    _caution(console)


def _write_trajectory_csv(trajectory: dict[str, Any], path: str) -> Any:
    import io

    from ..files.fsio import write_atomic

    buffer = io.StringIO()
    names = ["time_s", "x_m", "altitude_m", "vx_m_s", "vz_m_s", "ax_m_s2", "az_m_s2"]
    buffer.write(",".join(names + ["phase"]) + "\n")
    for row in range(len(trajectory["time_s"])):
        values = [repr(float(trajectory[n][row])) for n in names]
        buffer.write(",".join(values + ["descent" if trajectory["descent"][row] else "ascent"]) + "\n")
    return write_atomic(path, buffer.getvalue().encode())


@main.command()
@click.option("--mass", "mass_kg", type=_Quantity("mass", "g"), help="Mass under the device; a bare number is g.")
@click.option("--drag-area", "drag_area_m2", type=float, help="Cd·A of the device in m².")
@click.option("--cd", "drag_coefficient", type=float, help="Drag coefficient of the device (with --diameter).")
@click.option("--diameter", "diameter_m", type=_Quantity("length", "m"),
              help="Device diameter (with --cd); a bare number is m (e.g. 0.6, 24in).")
@click.option("--height", "height_m", type=_Quantity("length", "m"), help="Height fallen; a bare number is m.")
@click.option("--fall-time", "fall_time_s", type=click.FloatRange(min=0, min_open=True),
              help="Observed time to fall --height, in seconds (e.g. read off a launch video).")
@click.option("--elevation", "elevation_m", type=_Quantity("length", "m"), default=0.0,
              help="Pad elevation; the fall goes through the standard atmosphere above it. A bare number is m.")
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units; null for no value).")
def descent(mass_kg: float | None, drag_area_m2: float | None, drag_coefficient: float | None,
            diameter_m: float | None, height_m: float | None, fall_time_s: float | None, elevation_m: float,
            as_json: bool) -> None:
    """Recovery arithmetic: terminal speed and fall time, or the drag area that explains an observed fall.

    Forward: --mass and --drag-area (or --cd with --diameter) give the terminal
    speed at the pad, and with --height the time to fall it from rest and the
    landing speed. Inverse: --height and --fall-time give the terminal speed
    that explains them, and with --mass the drag area. Falls go through the
    standard atmosphere from the pad at --elevation (air thins with height, so
    a long fall is quicker than in pad air); the quadratic-drag fall is
    integrated, not estimated as height / time.

    \b
    Examples:
      motorlib descent --mass 450g --cd 0.8 --diameter 0.6 --height 300
      motorlib descent --height 82 --fall-time 9.5 --mass 15g
    """
    # --- issue 10 (defect 6): falls integrate through the atmosphere; JSON carries null, never Infinity/NaN ---
    import math

    from ..flight.atmosphere import Site
    from ..flight.descent import drag_area_from_fall_m2, fall_through_air, pad_terminal_speed_m_s

    if drag_area_m2 is None and drag_coefficient is not None and diameter_m is not None:
        drag_area_m2 = drag_coefficient * math.pi * diameter_m**2 / 4.0
    elif drag_area_m2 is None and (drag_coefficient is not None or diameter_m is not None):
        raise click.UsageError("--cd and --diameter go together")
    try:
        site = Site(elevation_m=elevation_m)
        result: dict[str, float | None] = {"elevation_m": elevation_m, "density_kg_m3": float(site.air(0.0)[2])}
        if fall_time_s is not None:
            if height_m is None:
                raise click.UsageError("--fall-time needs --height")
            mass = 1.0 if mass_kg is None else mass_kg  # without a mass: the speeds only (they need none)
            area = float(drag_area_from_fall_m2(height_m, fall_time_s, mass, site))
            fall = fall_through_air(height_m, mass, area, site)
            result.update(terminal_speed_m_s=float(fall.terminal_speed_m_s), fall_time_s=fall_time_s,
                          height_m=height_m, landing_speed_m_s=float(fall.landing_speed_m_s))
            if mass_kg is not None:
                result["drag_area_m2"] = area
        elif mass_kg is not None and drag_area_m2 is not None:
            result.update(terminal_speed_m_s=float(pad_terminal_speed_m_s(mass_kg, drag_area_m2, site)),
                          drag_area_m2=drag_area_m2)
            if height_m is not None:
                fall = fall_through_air(height_m, mass_kg, drag_area_m2, site)
                result.update(fall_time_s=float(fall.time_s), height_m=height_m,
                              landing_speed_m_s=float(fall.landing_speed_m_s))
        else:
            raise click.UsageError("give --mass with --drag-area (or --cd and --diameter), or --height with "
                                   "--fall-time")
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None
    if as_json:
        finite = {k: (v if v is None or math.isfinite(v) else None) for k, v in result.items()}
        click.echo(json.dumps(finite, indent=2, allow_nan=False))
        return
    console = _console()
    console.print(f"Air density at the pad ({elevation_m:g} m, standard atmosphere): "
                  f"{result['density_kg_m3']:.4g} kg/m³")
    v_t = result["terminal_speed_m_s"]
    console.print(f"Terminal speed at the pad: {v_t:.3g} m/s" if v_t is not None and math.isfinite(v_t)
                  else "Terminal speed: none (no drag)")
    if "fall_time_s" in result:
        console.print(f"Fall of {result['height_m']:g} m from rest through the atmosphere: "
                      f"{result['fall_time_s']:.4g} s, landing at {result['landing_speed_m_s']:.3g} m/s")
    if "drag_area_m2" in result:
        console.print(f"Drag area Cd·A: {result['drag_area_m2']:.4g} m²")
    _caution(console)
    # --- end of issue 10 (defect 6) ---


# ----------------------------------------------------------------------------- catalog
def default_catalog_dir() -> str:
    """The platform's user data folder for the catalog (XDG on Linux)."""
    import os

    if sys.platform == "win32":
        base = os.environ.get("LOCALAPPDATA") or os.path.expanduser("~\\AppData\\Local")
    elif sys.platform == "darwin":
        base = os.path.expanduser("~/Library/Application Support")
    else:
        base = os.environ.get("XDG_DATA_HOME") or os.path.expanduser("~/.local/share")
    return os.path.join(base, "motorlib", "catalog")


def _open_catalog(folder: str | None) -> Any:
    import os
    from pathlib import Path

    from ..catalog.store import Catalog

    path = Path(folder or default_catalog_dir())
    read_only = path.exists() and not os.access(path, os.W_OK)  # the bundled samples carry a READ_ONLY marker
    catalog = Catalog(path, read_only=read_only)
    err = _err_console()
    for notice in catalog.notices:
        if not catalog.read_only:
            err.print(f"[dim]note: {notice}[/dim]")
    for where, problem in catalog.problems:
        err.print(f"[yellow]skipped[/yellow] {where}: {problem}", markup=True, highlight=False)
    return catalog


def _err_console() -> Any:
    from rich.console import Console

    return Console(stderr=True, highlight=False)


_catalog_option = click.option(
    "--catalog", "catalog_dir", envvar="MOTORLIB_CATALOG", type=click.Path(file_okay=False),
    help="Catalog folder (default: $MOTORLIB_CATALOG, else the user data folder, e.g. ~/.local/share/motorlib/catalog).")


@main.group(cls=_Group)
def catalog() -> None:
    """Keep a local catalog of checked thrust curves: add, list, show, tag, export.

    \b
    Example:
      motorlib catalog --catalog ./motors add sample_curves/
      motorlib catalog --catalog ./motors list --class D..G --diameter 29mm
    """


def _range(text: str | None, kind: str, default_unit: str, name: str) -> tuple[float | None, float | None]:
    if not text:
        return (None, None)
    from ..units import parse_quantity

    low, _, high = text.partition("..")
    try:
        lo = parse_quantity(low, kind, field=name, default_unit=default_unit) if low.strip() else None
        hi = parse_quantity(high, kind, field=name, default_unit=default_unit) if high.strip() else None
    except QuantityError as exc:
        raise click.BadParameter(exc.problem, param_hint=name) from None
    if not _ and hi is None:
        hi = lo
    return lo, hi


def _filter_options(func: Any) -> Any:
    options = [
        click.option("--class", "class_range", help="Impulse class or range, e.g. D or D..G."),
        click.option("--diameter", "diameter", type=_Quantity("length", "mm"), help="Motor diameter; a bare number is mm."),
        click.option("--maker", help="Part of the maker's name."),
        click.option("--impulse", help="Total impulse range in N·s, e.g. 40..160 (either end may be left out)."),
        click.option("--burn", help="Burn time range in s, e.g. 1..3."),
        click.option("--delay", "delay_s", type=float, help="Only motors offering this ejection delay (s)."),
        click.option("--search", "text", help="Text to find in designation, maker, notes or handle."),
        click.option("--tag", help="Only motors with this tag."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def _filter(opts: dict[str, Any]) -> Any:
    from ..catalog.store import CatalogFilter, parse_class_range

    try:
        classes = parse_class_range(opts["class_range"]) if opts.get("class_range") else None
    except ValueError as exc:
        raise click.BadParameter(str(exc), param_hint="--class") from None
    return CatalogFilter(class_range=classes, diameter_m=opts.get("diameter"), maker=opts.get("maker"),
                         impulse_range_ns=_range(opts.get("impulse"), "impulse", "Ns", "--impulse"),
                         burn_range_s=_range(opts.get("burn"), "time", "s", "--burn"), delay_s=opts.get("delay_s"),
                         text=opts.get("text"), tag=opts.get("tag"))


@catalog.command("add")
@_catalog_option
@click.argument("paths", nargs=-1, required=True, type=click.Path(exists=True))
@click.option("--force", is_flag=True, help="Add curves even when the checks find errors (the file records them).")
@_metadata_options
def catalog_add(catalog_dir: str | None, paths: tuple[str, ...], force: bool, **opts: Any) -> None:
    """Check and add curve files (XML, or CSV with metadata options) or folders of them.

    Curves with errors are refused unless --force. Exact duplicates are not
    added again; curves with the same maker and designation as one already in
    the catalog are added and reported as near-duplicates.

    \b
    Example:
      motorlib catalog add stand-03.csv --designation F30-6 --maker "Our team" --diameter 24 \\
          --length 70 --total-mass 48g --propellant-mass 22g --delays 4,6,8 --source-kind static-test
    """
    from collections import Counter

    from ..present import tables as render
    from ..files.curvefiles import find_curve_files

    cat = _open_catalog(catalog_dir)
    files = find_curve_files(list(paths))
    console = _console()
    kwargs = dict(metadata=_metadata(opts), force=force, time_unit=opts["time_unit"], thrust_unit=opts["thrust_unit"])
    if len(files) > 20:
        from rich.progress import Progress

        with Progress(console=_err_console(), transient=True) as progress:
            task = progress.add_task("adding curves", total=len(files))
            results = cat.add_files(files, progress=lambda n: progress.advance(task, n), **kwargs)
    else:
        results = cat.add_files(files, **kwargs)
    if any(r.status != "added" or r.near_duplicates for r in results):
        console.print(render.add_results_table(results))
    counts = Counter(r.status for r in results)
    console.print(f"{len(results)} file(s): {counts['added']} added, {counts['duplicate']} already present, "
                  f"{counts['refused']} refused, {counts['unreadable']} unreadable; the catalog now holds "
                  f"{len(cat)} motor(s) in {render.escape(str(cat.root))}")
    if counts["refused"] or counts["unreadable"]:
        sys.exit(1)


@catalog.command("list")
@_catalog_option
@_filter_options
@click.option("--sort", default="total_impulse_ns", show_default=True,
              help="Column to sort by, e.g. total_impulse_ns, average_thrust_n, burn_time_s, designation, maker.")
@click.option("--desc", is_flag=True, help="Sort in descending order.")
@click.option("--json", "as_json", is_flag=True, help="Print JSON (SI units).")
@click.option("--csv", "as_csv", is_flag=True, help="Print CSV (SI units).")
def catalog_list(catalog_dir: str | None, sort: str, desc: bool, as_json: bool, as_csv: bool, **opts: Any) -> None:
    """List the motors in the catalog, filtered and sorted.

    \b
    Example:
      motorlib catalog list --class D..G --diameter 29 --delay 6 --sort average_thrust_n
      motorlib catalog list --tag in-stock --json
    """
    from ..catalog.store import SORT_KEYS

    if sort not in SORT_KEYS:
        raise click.BadParameter(f"expected one of {', '.join(SORT_KEYS)}", param_hint="--sort")
    cat = _open_catalog(catalog_dir)
    rows = cat.rows(_filter(opts), sort=sort, descending=desc)
    if as_json:
        click.echo(json.dumps(rows, indent=2))
    elif as_csv:
        import csv
        import io

        buffer = io.StringIO()
        columns = [c for c in rows[0] if c != "findings"] if rows else []
        writer = csv.DictWriter(buffer, columns, extrasaction="ignore")
        writer.writeheader()
        for row in rows:
            writer.writerow({**row, "delays_s": " ".join(f"{d:g}" for d in row["delays_s"])})
        click.echo(buffer.getvalue(), nl=False)
    else:
        from ..present import tables as render

        _console().print(render.catalog_table(rows, f"{len(rows)} of {len(cat)} motor(s) in {cat.root}"))


@catalog.command("show")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), help="Write the curve(s) to this PNG file.")
def catalog_show(catalog_dir: str | None, refs: tuple[str, ...], plot_path: str | None) -> None:
    """Show motors by id, handle or designation: metadata, metrics, findings and the curve.

    Several motors are also compared in one table, and --plot overlays their curves.

    \b
    Example:
      motorlib catalog show G59-10 F29-8 --plot compare.png
    """
    from ..present import tables as render
    from ..motor.checks import check_record, metrics
    from ..files.curvefiles import CheckReport

    cat = _open_catalog(catalog_dir)
    console = _console()
    records = []
    for ref in refs:
        motor_id = cat.resolve(ref)
        record = cat.get(motor_id)
        records.append((motor_id, record))
        report = CheckReport(f"{motor_id}  {cat.rows(_ids(motor_id))[0]['handle']}", True, record,
                             tuple(check_record(record, cat.settings)), metrics(record, cat.settings.burn_threshold))
        console.print(render.check_details(report))
        console.print(f"  thrust |{render.sparkline(record.time_s, record.thrust_n)}| {record.peak_thrust_n:.4g} N peak")
        console.print()
    if len(records) > 1:
        console.print(render.catalog_table(cat.rows(_ids(*[i for i, _ in records])), "Comparison"))
    if plot_path:
        from ..present.plots import curves_plot

        path = curves_plot([r for _, r in records], plot_path, cat.settings.burn_threshold)
        console.print(f"Wrote {render.escape(str(path))}")


def _ids(*ids: str) -> Any:
    from ..catalog.store import CatalogFilter

    return CatalogFilter(ids=tuple(ids))


@catalog.command("tag")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.argument("name")
def catalog_tag(catalog_dir: str | None, refs: tuple[str, ...], name: str) -> None:
    """Tag motors, e.g. the ones in stock: catalog tag REF... NAME.

    \b
    Example:
      motorlib catalog tag G59-10 F29-8 in-stock
    """
    cat = _open_catalog(catalog_dir)
    ids = cat.tag(list(refs), name)
    _console().print(f"Tagged {len(ids)} motor(s) {name!r}.")


@catalog.command("untag")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.argument("name")
def catalog_untag(catalog_dir: str | None, refs: tuple[str, ...], name: str) -> None:
    """Remove a tag from motors: catalog untag REF... NAME.

    \b
    Example:
      motorlib catalog untag F29-8 in-stock
    """
    cat = _open_catalog(catalog_dir)
    ids = cat.untag(list(refs), name)
    _console().print(f"Removed tag {name!r} from {len(ids)} motor(s).")


@catalog.command("remove")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
def catalog_remove(catalog_dir: str | None, refs: tuple[str, ...]) -> None:
    """Delete motors (their files, index rows and tags).

    \b
    Example:
      motorlib catalog remove bramblewick-propulsion-fictional/g59-10
    """
    cat = _open_catalog(catalog_dir)
    for ref in refs:
        _console().print(f"Removed {cat.remove(ref)}")


@catalog.command("export")
@_catalog_option
@click.argument("refs", nargs=-1)
@_filter_options
@click.option("--to", "folder", required=True, type=click.Path(file_okay=False), help="Folder to write into.")
@click.option("--format", "fmt", type=click.Choice(["xml", "csv", "json"]), default="xml", show_default=True,
              help="xml: our format; csv: time_s,thrust_n per motor; json: one file with every motor.")
def catalog_export(catalog_dir: str | None, refs: tuple[str, ...], folder: str, fmt: str, **opts: Any) -> None:
    """Export motors (the REFs given, else those passing the filters) to a folder.

    \b
    Example:
      motorlib catalog export --class G --to ./g-motors --format csv
    """
    from ..catalog.store import CatalogFilter
    from ..files.export import export_records

    cat = _open_catalog(catalog_dir)
    ids = [cat.resolve(r) for r in refs] if refs else [r["motor_id"] for r in cat.rows(_filter(opts))]
    rows = cat.rows(CatalogFilter(ids=tuple(ids))) if ids else []
    written = export_records([(r["handle"], cat.get(r["motor_id"])) for r in rows], folder, fmt)
    _console().print(f"Exported {len(rows)} motor(s) to {len(written)} file(s) in {folder}")


@catalog.command("verify")
@_catalog_option
def catalog_verify(catalog_dir: str | None) -> None:
    """Re-read every curve file, re-run every check and report problems.

    Exit status 1 when a file is unreadable or a curve has errors.

    \b
    Example:
      motorlib catalog verify
    """
    from ..present import tables as render
    from ..files.curvefiles import check_file

    cat = _open_catalog(catalog_dir)
    reports = [check_file(cat.root / row["path"], cat.settings) for row in cat.rows()]
    console = _console()
    bad = [r for r in reports if any(f.severity != "note" for f in r.findings)]
    for report in bad:
        console.print(f"[bold]{render.escape(report.source)}[/bold]")
        console.print(render.findings_text(report, include_notes=False), end="")
    known = {row["motor_id"] for row in cat.rows()}
    orphans = {t: [i for i in ids if i not in known] for t, ids in cat.tags().items()}
    for tag, ids in orphans.items():
        if ids:
            console.print(f"[yellow]tag {tag!r} names {len(ids)} motor id(s) no longer in the catalog[/yellow]")
    n_errors = sum(not r.ok for r in reports) + len(cat.problems)
    console.print(f"{len(reports)} curve(s) verified: {n_errors} with errors, {len(cat.problems)} file(s) skipped.")
    if n_errors:
        sys.exit(1)


@catalog.command("reindex")
@_catalog_option
def catalog_reindex(catalog_dir: str | None) -> None:
    """Rebuild the catalog index from the curve files.

    \b
    Example:
      motorlib catalog reindex
    """
    cat = _open_catalog(catalog_dir)
    count = cat.reindex()
    _console().print(f"Re-read {count} file(s); the catalog holds {len(cat)} motor(s).")


# ----------------------------------------------------------------------------- matching
def _match_options(func: Any) -> Any:
    options = [
        click.option("--target", "target_m", type=_Quantity("length", "m"),
                     help="Aim altitude above the pad; a bare number is m (e.g. 250, 800ft)."),
        click.option("--ceiling", "ceiling_m", type=_Quantity("length", "m"),
                     help="Never exceed this altitude (the field's limit); a bare number is m."),
        click.option("--max-class", type=click.Choice(["1/8A", "1/4A", "1/2A", *"ABCDEFGHIJKLMNO"]),
                     help="Highest impulse class you may fly (your certification)."),
        click.option("--min-rail-exit", "min_rail_exit", type=_Quantity("speed", "m/s"), default="15 m/s",
                     show_default=True, help="Minimum rail exit speed (common practice, no published source)."),
        click.option("--min-thrust-to-weight", type=float, default=5.0, show_default=True,
                     help="Minimum liftoff thrust-to-weight (common practice, no published source)."),
        click.option("--delay-slack", type=float, default=2.0, show_default=True,
                     help="How far, in s, the chosen delay may be from the optimal one."),
        click.option("--allow-smaller-motors", is_flag=True, help="Narrower motors fit with an adapter."),
        click.option("--tag", help="Only motors with this catalog tag (e.g. the ones in stock)."),
        click.option("--top", type=click.IntRange(1), help="Show only the first N candidates."),
        click.option("--show-rejected", is_flag=True, help="Also list the motors that do not fit."),
        click.option("--ballast", is_flag=True, help="Solve the nose weight that brings each passing motor to the target."),
        click.option("--units", type=click.Choice(["si", "imperial"]), default="si", show_default=True,
                     help="Units of the table."),
        click.option("--json", "as_json", is_flag=True, help="Print {airframe, conditions, candidates} as JSON (SI)."),
        click.option("--csv", "as_csv", is_flag=True, help="Print the candidates as CSV (SI)."),
        click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
                     help="Write apogee per motor against the target and ceiling to this PNG file."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def _run_match(airframe_file: str, cat: Any, opts: dict[str, Any]) -> None:
    from ..files.airframe_toml import load_airframe
    from ..catalog.store import CatalogFilter
    from ..matching.rank import MatchSettings, rank
    from ..flight.rules import LaunchRules

    frame = load_airframe(airframe_file)
    try:
        settings = MatchSettings(
            target_m=opts["target_m"], ceiling_m=opts["ceiling_m"], max_class=opts["max_class"],
            rules=LaunchRules(min_rail_exit_speed_m_s=opts["min_rail_exit"],
                              min_liftoff_thrust_to_weight=opts["min_thrust_to_weight"]),
            delay_slack_s=opts["delay_slack"], allow_smaller_motors=opts["allow_smaller_motors"],
            ballast=opts["ballast"])
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None
    rows = cat.rows(CatalogFilter(tag=opts["tag"]))
    if not rows:
        raise click.UsageError(f"no motors in {cat.root}" + (f" with tag {opts['tag']!r}" if opts["tag"] else ""))
    result = rank(frame, rows, cat.motor_pack, settings)
    conditions = {**result.conditions, "catalog": str(cat.root), "caution": _EPILOG}
    written = None
    if opts["plot_path"]:
        from ..present.plots import match_plot

        written = match_plot(result, opts["plot_path"])
    if opts["as_json"]:
        click.echo(json.dumps({"airframe": result.airframe, "conditions": conditions,
                               "candidates": result.candidates}, indent=2))
        return
    if opts["as_csv"]:
        import csv
        import io

        buffer = io.StringIO()
        columns = [k for k in result.candidates[0] if not isinstance(result.candidates[0][k], list)] + ["reasons"]
        columns = [c for c in columns if c not in ("reason_codes", "ballast_reasons")]
        writer = csv.DictWriter(buffer, columns, extrasaction="ignore")
        writer.writeheader()
        for c in result.candidates:
            writer.writerow({**c, "reasons": "; ".join(c["reasons"])})
        click.echo(buffer.getvalue(), nl=False)
        return
    from ..present import tables as render

    console = _console()
    console.print(render.match_table(result, opts["units"], opts["top"], opts["show_rejected"], opts["ballast"]))
    console.print(render.match_reasons(result, opts["top"], opts["show_rejected"]), end="")
    rejected = sum(not c["fits"] for c in result.candidates)
    if rejected and not opts["show_rejected"]:
        console.print(f"{rejected} motor(s) do not fit the mount or the class limit (--show-rejected lists them).")
    console.print(render.conditions_text(result))
    console.print(f"Catalog: {render.escape(str(cat.root))}")
    if written:
        console.print(f"Wrote {render.escape(str(written))}")
    console.print(f"[bold yellow]Caution:[/bold yellow] {_EPILOG}")


@main.command()
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@_catalog_option
@_match_options
def match(airframe_file: str, catalog_dir: str | None, **opts: Any) -> None:
    """Rank every motor in the catalog for AIRFRAME_FILE by apogee, rail exit speed and delay.

    Motors that fit the mount (and the class limit) are flown together; each
    gets its apogee, rail exit speed, liftoff thrust-to-weight, optimal delay,
    the closest available delay and the ejection speed with it, and the
    reasons it fails any rule. With --target the ranking is by closeness to
    it; otherwise by apogee under the ceiling. Passing motors come first.
    Without --catalog (or $MOTORLIB_CATALOG) the user catalog is used when it
    exists, else the bundled sample curves.

    \b
    Example:
      motorlib match sample_curves/airframes/quibble-41.toml --target 400 --ceiling 600
      motorlib match rocket.toml --target 800ft --max-class G --tag in-stock --ballast --units imperial
    """
    _run_match(airframe_file, _open_catalog(_catalog_or_samples(catalog_dir)), opts)


def _catalog_or_samples(catalog_dir: str | None) -> str:
    """The catalog asked for, else the user catalog when it exists, else the bundled sample curves."""
    import os

    from ..files.curvefiles import sample_catalog_dir

    if catalog_dir is not None:
        return catalog_dir
    return default_catalog_dir() if os.path.isdir(default_catalog_dir()) else str(sample_catalog_dir())


@main.command()
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default="motorlib-demo.png", show_default=True,
              help="Where to write the chart of apogee per motor.")
def demo(plot_path: str) -> None:
    """Run the main job end to end on bundled data: rank the sample motors for a demo airframe.

    The demo airframe (a 41.6 mm sport model with a 29 mm mount) aims at 400 m
    under a 600 m ceiling; the ranking and a chart are produced.

    \b
    Example:
      motorlib demo --plot /tmp/demo.png
    """
    from ..files.curvefiles import sample_catalog_dir

    airframe = sample_catalog_dir() / "airframes" / "quibble-41.toml"
    opts = dict(target_m=400.0, ceiling_m=600.0, max_class=None, min_rail_exit=15.0, min_thrust_to_weight=5.0,
                delay_slack=2.0, allow_smaller_motors=True, tag=None, top=None, show_rejected=False, ballast=True,
                units="si", as_json=False, as_csv=False, plot_path=plot_path)
    _console().print(f"Demo: airframe {airframe.name}, bundled sample catalog, target 400 m, ceiling 600 m, "
                     "24 and 29 mm motors (adapters allowed), with ballast.")
    _run_match(str(airframe), _open_catalog(str(sample_catalog_dir())), opts)


# ----------------------------------------------------------------------------- static-test reduction
@main.command()
@click.argument("logs", nargs=-1, required=True, type=click.Path(exists=True, dir_okay=False))
@click.option("-o", "--output", type=click.Path(dir_okay=False), help="Motor-record XML file to write (atomically).")
@click.option("--overwrite", is_flag=True, help="Replace OUTPUT if it exists.")
@click.option("--force", is_flag=True, help="Write OUTPUT even when the checks find errors.")
@click.option("--combine", is_flag=True, help="Several firings of one motor: write their mean curve and report the spread.")
@click.option("--scale", type=float, help="Calibration for a raw-count column: newtons per count.")
@click.option("--offset", type=float, default=0.0, show_default=True, help="Zero reading of a raw-count column, in counts.")
@click.option("--cutoff", default=None, metavar="HZ|none",
              help="-3 dB frequency of the zero-phase low-pass filter (default: 100 Hz or a quarter of the sample rate); "
                   "'none' disables it.")
@click.option("--detrend", is_flag=True, help="Remove linear load-cell drift between the pre- and post-burn levels.")
@click.option("--points", type=click.IntRange(8, 500), default=48, show_default=True,
              help="Most points in the reduced curve.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), help="Write raw, filtered and reduced curves to this PNG.")
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
@_metadata_options
def reduce(logs: tuple[str, ...], output: str | None, overwrite: bool, force: bool, combine: bool, scale: float | None,
           offset: float, cutoff: str | None, detrend: bool, points: int, plot_path: str | None, as_json: bool,
           **opts: Any) -> None:
    """Turn raw load-cell logs from a test stand into a checked thrust curve.

    A log is a CSV with a time column and a force column, in any unit the
    header names (N, lbf, kgf, gf, or kg and g as a load cell reports mass:
    force = m·g0), or raw counts with --scale and --offset. The baseline is
    tared from the readings before ignition, the data filtered, ignition and
    burnout found, and the curve reduced to at most --points points; the
    result is checked against --designation when given. The provenance kind
    defaults to static-test.

    \b
    Example:
      motorlib reduce firing-1.csv --designation F30-6 --diameter 24 --length 70 \\
          --total-mass 48g --propellant-mass 22g --delays 6 -o F30-6.xml --plot firing-1.png
      motorlib reduce f1.csv f2.csv f3.csv --combine --designation F30-6 -o F30-6-mean.xml
    """
    from dataclasses import replace
    from pathlib import Path

    import numpy as np

    from ..motor.checks import check_record, metrics
    from ..files.motor_csv import read_csv_curve
    from ..files.curvefiles import CheckReport
    from ..errors import CurveDataError
    from ..motor.reduction import ReductionSettings, combine_reductions, reduce_log

    if len(logs) > 1 and not combine and output:
        raise click.UsageError("several logs with --output: add --combine to write their mean curve")
    try:
        cutoff_hz = None if cutoff is None else (0.0 if cutoff.lower() == "none" else float(cutoff))
    except ValueError:
        raise click.BadParameter("expected a frequency in Hz or 'none'", param_hint="--cutoff") from None
    settings = ReductionSettings(cutoff_hz=cutoff_hz, detrend=detrend, max_points=points)
    if opts["source_kind"] == "other":
        opts = {**opts, "source_kind": "static-test"}
    meta = _metadata(opts)
    reductions = []
    for path in logs:
        curve = read_csv_curve(path, time_unit=opts["time_unit"], thrust_unit=opts["thrust_unit"], scale=scale,
                               offset=offset)
        try:
            reductions.append((path, reduce_log(curve.time_s, curve.thrust_n, settings, lines=np.asarray(curve.lines),
                                                source=path)))
        except CurveDataError as exc:
            raise click.ClickException(str(exc)) from None
    if combine:
        time_s, thrust_n, spread = combine_reductions([r for _, r in reductions], points)
    else:
        time_s, thrust_n, spread = reductions[0][1].time_s, reductions[0][1].thrust_n, None
    first = reductions[0][1]
    note = (f"Reduced by motorlib from {', '.join(Path(p).name for p, _ in reductions)}: baseline {first.baseline_n:.4g} N, "
            f"noise {first.noise_n:.3g} N, {first.sample_rate_hz:.4g} Hz, "
            + (f"low-pass {first.cutoff_hz:g} Hz" if first.cutoff_hz else "no filter")
            + f", events at {first.threshold_n:.3g} N." + (f" Mean of {len(reductions)} firings." if combine else ""))
    meta = replace(meta, provenance=replace(meta.provenance, notes=f"{meta.provenance.notes} {note}".strip()))
    record = meta.record(time_s, thrust_n, default_designation=Path(logs[0]).stem)
    log_findings = [f for _, r in reductions for f in r.findings]
    findings = log_findings + check_record(record)
    report = CheckReport(output or logs[0], True, record, tuple(findings), metrics(record))
    written = []
    if output:
        if not report.ok and not force:
            raise click.ClickException(_findings_message(report))
        from ..files.motor_xml import write_record

        try:
            written.append(write_record(record, output, overwrite=overwrite))
        except FileExistsError as exc:
            raise click.ClickException(f"{exc}; use --overwrite to replace it") from exc
    if plot_path:
        from ..present.plots import reduction_plot

        written.append(reduction_plot(first, f"{record.designation}: {Path(logs[0]).name}", plot_path))
    summary = [{"file": p, "rows": int(r.raw_time_s.size), "sample_rate_hz": r.sample_rate_hz,
                "baseline_n": r.baseline_n, "noise_n": r.noise_n, "drift_n_per_s": r.drift_n_per_s,
                "cutoff_hz": r.cutoff_hz, "ignition_time_s": r.ignition_time_s, "burnout_time_s": r.burnout_time_s,
                "event_threshold_n": r.threshold_n, "points": int(r.time_s.size),
                "reduction_impulse_error": r.impulse_error, "reduction_peak_error": r.peak_error} for p, r in reductions]
    if as_json:
        click.echo(json.dumps({"logs": summary, "combined": spread, **report.as_dict(),
                               "written": [str(p) for p in written]}, indent=2, default=float))
        return
    from ..present import tables as render

    console = _console()
    for entry in summary:
        console.print(f"[bold]{render.escape(entry['file'])}[/bold]: {entry['sample_rate_hz']:.4g} Hz, baseline "
                      f"{entry['baseline_n']:.4g} N, noise {entry['noise_n']:.3g} N, "
                      + (f"low-pass {entry['cutoff_hz']:g} Hz, " if entry["cutoff_hz"] else "no filter, ")
                      + f"ignition at {entry['ignition_time_s']:.4g} s, burnout at {entry['burnout_time_s']:.4g} s, "
                      f"{entry['points']} points (impulse within {100 * entry['reduction_impulse_error']:.3f} %)")
    if spread:
        ti, bt = spread["total_impulse_ns"], spread["event_burn_time_s"]
        console.print(f"{spread['n_firings']} firings: total impulse {ti['mean']:.4g} ± {ti['std']:.2g} N·s "
                      f"({ti['min']:.4g}-{ti['max']:.4g}), burn {bt['mean']:.3g} ± {bt['std']:.2g} s")
    console.print(render.check_details(report))
    for path in written:
        console.print(f"Wrote {render.escape(str(path))}")


def _findings_message(report: Any) -> str:
    errors = [f"{f.code}: {f.message}" for f in report.findings if f.severity == "error"]
    return (f"{report.source}: the reduced curve has errors ({'; '.join(errors)}); nothing was written "
            "(use --force to write it anyway)")
