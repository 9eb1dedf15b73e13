"""``motorlib calibrate``: fit the drag of an airframe to flown apogees or to an altimeter log."""

from __future__ import annotations

from typing import Any

import click

from .group import _Command

from .options import _Quantity, display_units, motor_options
from .output import _caution, _check_outputs, _console, _EPILOG, _strict_json

_FLIGHT_KEYS = ("apogee", "wind", "temperature", "pressure", "ballast", "motor", "label")


def _parse_flight(spec: str) -> dict[str, Any]:
    """``apogee=312m,wind=3m/s,temperature=18degC,pressure=1005hPa,ballast=20g,motor=F29-8,label=Sat``."""
    from ..errors import QuantityError, SimulationInputError
    from ..files.airframe_toml import _pressure
    from ..units import parse_quantity

    out: dict[str, Any] = {}
    for part in spec.split(","):
        key, sep, value = part.partition("=")
        key, value = key.strip(), value.strip()
        if not sep or key not in _FLIGHT_KEYS:
            raise click.BadParameter(f"expected key=value pairs with keys {', '.join(_FLIGHT_KEYS)}; got {part!r}",
                                     param_hint="--flight")
        try:
            if key == "apogee":
                out["apogee_m"] = parse_quantity(value, "length", field="apogee", default_unit="m")
            elif key == "wind":
                out["wind_speed_m_s"] = parse_quantity(value, "speed", field="wind", default_unit="m/s")
            elif key == "temperature":
                out["temperature_k"] = parse_quantity(value, "temperature", field="temperature", default_unit="degC")
            elif key == "pressure":
                out["pressure_pa"] = _pressure("--flight", {"pressure": value})
            elif key == "ballast":
                out["added_mass_kg"] = parse_quantity(value, "mass", field="ballast", default_unit="g")
            else:
                out[key] = value
        except (QuantityError, SimulationInputError) as exc:
            raise click.BadParameter(f"{key}: {exc.problem}", param_hint="--flight") from None
    if "apogee_m" not in out:
        raise click.BadParameter(f"every flight needs apogee=..., got {spec!r}", param_hint="--flight")
    return out


@click.command(cls=_Command)
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@motor_options()
@click.option("--apogee", "apogees_m", type=_Quantity("length", minimum=0.0, strict=True), multiple=True,
              help="A measured apogee above the pad, flown in the file's conditions (repeat for several flights).")
@click.option("--flight", "flights", multiple=True, metavar="apogee=..[,KEY=..]",
              help="A measured apogee with that day's conditions (repeatable); more keys: wind, temperature, "
                   "pressure, ballast, motor, label.")
@click.option("--apogee-std", "apogee_std_m", type=_Quantity("length", minimum=0.0, strict=True),
              help="Standard deviation of each measured apogee (default 1 % of it, from memory).")
@click.option("--log", "log_path", type=click.Path(exists=True, dir_okay=False),
              help="An altimeter log (CSV: time and altitude, or time and pressure); fits the drag over the coast.")
@click.option("--write", is_flag=True, help="Write the fitted drag into AIRFRAME_FILE (a backup .bak is kept).")
@click.option("--force", is_flag=True, help="With --write: write a fitted drag outside the usual range too.")
@click.option("--json", "as_json", is_flag=True, help="Print the fit as JSON (SI).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
              help="Write measured against simulated to this PNG file.")
@click.option("--overwrite", is_flag=True, help="Replace an existing --plot file.")
def calibrate(airframe_file: str, motor_ref: str, catalog_dir: str | None, apogees_m: tuple[float, ...],
              flights: tuple[str, ...], apogee_std_m: float | None, log_path: str | None, write: bool,
              force: bool, as_json: bool, plot_path: str | None, overwrite: bool) -> None:
    """Fit the drag of AIRFRAME_FILE to what flights really did.

    With measured apogees (--apogee, --flight) the constant Cd, or a scale on
    the Cd(Mach) table, that reproduces them is found: a root solve for one
    flight, least squares for several. With an altimeter log (--log) liftoff,
    burnout and apogee are detected and the drag is fitted over the coast.
    The fitted value comes with its uncertainty and the residuals.

    \b
    Example:
      motorlib calibrate my-rocket.toml --motor F29-8 --apogee 468m
      motorlib calibrate my-rocket.toml --motor F29-8 \\
        --flight apogee=468m,wind=4m/s --flight apogee=455m,temperature=31degC
      motorlib calibrate my-rocket.toml --motor G59-10 --log flight.csv \\
        --plot fit.png --write
    """
    from ..files.airframe_toml import load_airframe, write_drag
    from ..flight import calibration as cal
    from .options import load_motor as _load_motor

    if log_path and (apogees_m or flights):
        raise click.UsageError("give either --log or measured apogees (--apogee, --flight), not both")
    if not log_path and not (apogees_m or flights):
        raise click.UsageError("give measured apogees (--apogee, --flight) or an altimeter log (--log)")
    _check_outputs({"--plot": plot_path}, overwrite, [airframe_file])
    frame = load_airframe(airframe_file)
    motor = _load_motor(motor_ref, catalog_dir)[0]
    try:
        if log_path:
            from ..files.altimeter_csv import read_altimeter_csv

            log = read_altimeter_csv(log_path)
            result = cal.fit_log(frame, motor, log.time_s, log.altitude_m)
        else:
            specs = [{"apogee_m": a} for a in apogees_m] + [_parse_flight(f) for f in flights]
            motors = {motor_ref: motor}
            records, frames, labels = [], [], []
            for i, spec in enumerate(specs, start=1):
                ref = spec.get("motor", motor_ref)
                if ref not in motors:
                    motors[ref] = _load_motor(ref, catalog_dir)[0]
                records.append(motors[ref])
                frames.append(cal.flight_conditions(frame, **{k: spec[k] for k in ("wind_speed_m_s", "temperature_k",
                                                                                    "pressure_pa", "added_mass_kg")
                                                               if k in spec}))
                labels.append(spec.get("label", f"flight {i}"))
            result = cal.fit_apogees(frames, records, [s["apogee_m"] for s in specs], apogee_std_m=apogee_std_m,
                                     labels=labels)
    except ValueError as exc:
        from ..errors import MotorlibError

        if isinstance(exc, MotorlibError):
            raise
        raise click.UsageError(str(exc).replace("`", "")) from None
    kind = cal.drag_kind(frame)
    value = result[kind]
    result["file_value"] = cal.nominal_drag(frame)
    doubt = cal.implausible_drag(kind, value)
    if doubt:
        result.setdefault("notes", []).insert(0, f"Warning: {doubt}.")
        if write and not force:
            raise click.UsageError(f"not written: {doubt}; add --force to write it anyway")
    written = []
    if plot_path:
        from ..present.plots import calibration_plot

        track = None
        if log_path:
            track = cal.simulated_track(frame, motor, value, result["events"]["liftoff_time_s"])
            result["measured"] = {"time_s": log.time_s, "altitude_m": log.altitude_m - result["events"]["pad_level_m"]}
        written.append(calibration_plot(result, kind, f"{frame.name} with {motor.designation}", plot_path, track))
        result.pop("measured", None)
    backup = None
    if write:
        _, backup = write_drag(airframe_file, kind, value)
    payload = {"airframe": frame.name, "motor": motor.designation, **{k: v for k, v in result.items()
                                                                       if k not in ("model_time_s", "model_altitude_m")}}
    payload["written"] = airframe_file if write else None
    payload["backup"] = backup
    if as_json:
        click.echo(_strict_json({**payload, "caution": _EPILOG}, indent=2))
        return
    from rich.markup import escape

    from ..present.scatter import calibration_text

    console = _console()
    console.print(calibration_text(result, display_units(None)))
    if log_path:
        e = result["events"]
        console.print(f"Liftoff {e['liftoff_time_s']:.2f} s, burnout {e['burnout_time_s']:.2f} s, apogee "
                      f"{e['apogee_time_s']:.2f} s at {e['apogee_m']:.1f} m (log clock); fitted over "
                      f"{result['window_s'][0]:.2f}-{result['window_s'][1]:.2f} s.")
    for path in written:
        console.print(f"Wrote {escape(str(path))}")
    if backup:
        console.print(f"Wrote the fitted drag into {escape(airframe_file)} (backup {escape(backup)})")
    _caution(console)
