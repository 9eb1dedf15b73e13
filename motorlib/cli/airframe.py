"""``motorlib airframe``: what an airframe's shape gives: CP, CG and margins with a motor, drag build-up, Cd(Mach)."""

from __future__ import annotations

import os

import click

from .group import _Command, _InputError
from .options import _Finite, _units_option, display_units, motor_options
from .output import _OVERWRITE_HINT, _caution, _check_outputs, _console, _EPILOG, _strict_json


@click.command(cls=_Command)
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@motor_options(required=False)
@click.option("--mach", type=_Finite(0.0, 5.0), default=0.3, show_default=True,
              help="Mach number of the drag build-up.")
@click.option("--min-stability", "min_stability_cal", type=_Finite(0.0, 10.0), default=1.0, show_default=True,
              help="Margin in calibers the nose-weight solve aims for (1 caliber: common practice, no published "
                   "source).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
              help="Write the side profile to scale (CG and CP marked) and Cd against Mach to this PNG file.")
@click.option("--overwrite", is_flag=True, help="Replace the --plot file if it exists.")
@click.option("--json", "as_json", is_flag=True, help="Print the figures as JSON (SI units, positions from the nose tip).")
@_units_option
def airframe(airframe_file: str, motor_ref: str | None, catalog_dir: str | None, mach: float, min_stability_cal: float,
             plot_path: str | None, overwrite: bool, as_json: bool, units: str | None) -> None:
    """Show what the [geometry] of AIRFRAME_FILE (TOML) gives.

    Lengths, the centre of pressure (Barrowman, subsonic), the CG without
    and with --motor (at liftoff and burnout) and the stability margins, the
    nose weight that restores --min-stability, the drag build-up by component
    at --mach, and the estimated Cd against Mach for powered and coasting
    flight. Positions are from the nose tip.

    \b
    Example:
      motorlib airframe sample_curves/airframes/quibble-41.toml --motor F29-8
      motorlib airframe my-rocket.toml --motor G59-10 --plot shape.png --json
    """
    from ..files.airframe_toml import load_airframe
    from ..flight.summary import airframe_summary
    from .options import load_motor as _load_motor

    frame = load_airframe(airframe_file)
    if frame.geometry is None:
        raise _InputError(f"{airframe_file}: [geometry]: missing section; this command needs the "
                                   "airframe's shape (see data_schema/AIRFRAME.md; `motorlib new-airframe` writes a "
                                   "commented example block to start from)")
    motor = None if motor_ref is None else _load_motor(motor_ref, catalog_dir)[0]
    inputs = [airframe_file] + ([motor_ref] if motor_ref is not None and os.path.isfile(motor_ref) else [])
    _check_outputs({"--plot": plot_path}, overwrite, inputs)
    summary = airframe_summary(frame, motor, mach=mach, required_margin_cal=min_stability_cal)
    written = None
    if plot_path:
        from ..present.plots import airframe_plot

        try:
            written = airframe_plot(frame, summary, plot_path, overwrite=overwrite, units=display_units(units))
        except FileExistsError as exc:
            raise _InputError(f"{exc}; {_OVERWRITE_HINT}") from exc
    if as_json:
        payload = {**summary, "plot": None if written is None else str(written), "caution": _EPILOG}
        click.echo(_strict_json(payload, indent=2))
        return
    from ..present import tables as render

    console = _console()
    console.print(render.airframe_report(summary, display_units(units)))
    if written is not None:
        console.print(f"Wrote {render.escape(str(written))}")
    _caution(console)
