"""``motorlib scatter``: Monte Carlo dispersion of one airframe with one motor (apogee spread, landing zone)."""

from __future__ import annotations

from typing import Any

import click

from .group import _Command

from .options import DEPLOY_LIMITS_TEXT, _Quantity, _units_option, display_units, motor_options
from .output import _caution, _check_outputs, _console, _EPILOG, _strict_json

# option name -> (Uncertainty field, kind, default unit); kind "relative" takes 0.03 or 3%
_STD_OPTIONS = {
    "impulse_std": ("total_impulse_relative_std", "relative", None),
    "burn_time_std": ("burn_time_relative_std", "relative", None),
    "airframe_mass_std": ("airframe_mass_relative_std", "relative", None),
    "motor_mass_std": ("motor_mass_relative_std", "relative", None),
    "drag_std": ("drag_relative_std", "relative", None),
    "wind_speed_std": ("wind_speed_std_m_s", "speed", "m/s"),
    "wind_direction_std": ("wind_direction_std_rad", "angle", "deg"),
    "rail_angle_std": ("rail_angle_std_rad", "angle", "deg"),
    "rail_azimuth_std": ("rail_azimuth_std_rad", "angle", "deg"),
    "temperature_std": ("pad_temperature_std_k", "difference", "K"),
    "cg_std": ("cg_std_m", "length", "mm"),
    "deploy_altitude_std": ("deploy_altitude_std_m", "length", "m"),
}


class _Relative(click.ParamType):
    """A fraction (0.03) or a percentage (3%)."""

    name = "fraction"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> float:
        if isinstance(value, float):
            return value
        text = str(value).strip()
        try:
            number = float(text[:-1]) / 100.0 if text.endswith("%") else float(text)
        except ValueError:
            self.fail(f"expected a fraction such as 0.03 or a percentage such as 3%, got {value!r}", param, ctx)
        if number < 0:
            self.fail(f"a standard deviation must be at least 0, got {value!r}", param, ctx)
        if number >= 1.0 and not text.endswith("%"):
            self.fail(f"{text} would mean {100 * number:g} %; write {text}% for a percentage, or a fraction "
                      "below 1 such as 0.03", param, ctx)
        from ..files.uncertainty_toml import relative_too_large
        from ..flight.dispersion import MAX_RELATIVE_STD

        if number >= MAX_RELATIVE_STD:
            self.fail(relative_too_large(text, MAX_RELATIVE_STD), param, ctx)
        return number


class _Difference(click.ParamType):
    """A temperature difference in K (a bare number), degC or degF."""

    name = "temperature difference"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> float:
        if isinstance(value, float):
            return value
        text = str(value).strip()
        factor = 1.0
        for unit, f in (("degF", 5.0 / 9.0), ("degC", 1.0), ("K", 1.0)):  # 1 degF = 5/9 K, exact
            if text.endswith(unit):
                text, factor = text[: -len(unit)], f
                break
        try:
            return float(text) * factor
        except ValueError:
            self.fail(f"expected a temperature difference such as 2, 2K or 3.6degF, got {value!r}", param, ctx)


def _std_options(func: Any) -> Any:
    for option, (_, kind, unit) in reversed(list(_STD_OPTIONS.items())):
        flag = "--" + option.replace("_", "-")
        if kind == "relative":
            ptype: click.ParamType = _Relative()
            hint = "as a fraction or percentage (e.g. 3%)"
        elif kind == "difference":
            ptype, hint = _Difference(), "in K (e.g. 2, 3.6degF)"
        elif unit == "mm":  # a small length: a bare number would be metres, and mm was meant (README)
            ptype, hint = _Quantity(kind, bare=False, example="10mm", minimum=0.0), "with a unit (e.g. 10mm)"
        else:
            ptype, hint = _Quantity(kind, default_unit=unit, minimum=0.0), f"a bare number is {unit}"
        func = click.option(flag, option, type=ptype, default=None,
                            help=f"Standard deviation of the {option[:-4].replace('_', ' ')}, {hint}.")(func)
    return func


def uncertainty_from_options(airframe_file: str, opts: dict[str, Any]) -> Any:
    """The airframe file's [uncertainty] (or zero with --no-uncertainty), then the command-line overrides."""
    from dataclasses import replace

    from ..files.uncertainty_toml import load_uncertainty
    from ..flight.dispersion import Uncertainty

    base = Uncertainty.zero() if opts.get("no_uncertainty") else None
    u = load_uncertainty(airframe_file, base) if base is None else base
    overrides = {field: opts[name] for name, (field, _, _) in _STD_OPTIONS.items() if opts.get(name) is not None}
    try:
        return replace(u, **overrides)
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None


def run_with_progress(call: Any, total: int, label: str) -> Any:
    """``call(progress)``, with a rich progress bar on stderr when it is a terminal (else ``progress`` is None)."""
    from .output import _err_console

    console = _err_console()
    if not console.is_terminal:
        return call(None)
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TimeRemainingColumn

    with Progress("[progress.description]{task.description}", BarColumn(), MofNCompleteColumn(),
                  TimeRemainingColumn(), console=console, transient=True) as progress:
        task = progress.add_task(label, total=total)
        return call(lambda done, _total: progress.update(task, completed=done))


def _sibling_spread(motor: Any, catalog: Any) -> Any:
    """The spread of the catalog's records with this motor's maker and designation (None for fewer than 2)."""
    if catalog is None or motor.firing_spread is not None:
        return None
    from ..flight.dispersion import catalog_spread

    rows = [r for r in catalog.rows() if r.designation == motor.designation and r.maker == motor.maker]
    if len(rows) < 2:
        return None
    return catalog_spread([catalog.get(r.motor_id) for r in rows])


@click.command(cls=_Command)
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@motor_options()
@click.option("-n", "--samples", "n_samples", type=click.IntRange(1, 10_000_000), default=2000, show_default=True,
              help="Number of sampled flights.")
@click.option("--seed", type=click.IntRange(0), default=0, show_default=True,
              help="Seed of the random draws; the same seed gives the same flights for any --workers.")
@click.option("--workers", type=click.IntRange(1), default=None,
              help="Worker processes (default: the machine's cores); the results do not depend on it.")
@click.option("--delay", "delay_s", type=_Quantity("time", minimum=0.0),
              help="Ejection delay fitted before the flight; a bare number is s (default: the delay on offer "
                   "closest to the nominal optimal delay).")
@click.option("--target", "target_m", type=_Quantity("length", minimum=0.0, strict=True), help="Aim altitude, marked on the plot.")
@click.option("--ceiling", "ceiling_m", type=_Quantity("length", minimum=0.0, strict=True), help="Altitude limit; a bare number is m.")
@click.option("--field-radius", "field_radius_m", type=_Quantity("length", minimum=0.0, strict=True),
              help="Radius of the recovery field around the pad; a bare number is m.")
@click.option("--max-deploy-speed", "max_deploy_speed", type=_Quantity("speed", minimum=0.0, strict=True), default=None,
              help="An opening faster than this counts as a failure (default: each device against its kind's "
                   f"limit: {DEPLOY_LIMITS_TEXT}; common practice).")
@click.option("--wind-from", "wind_from_rad", type=_Quantity("angle", default_unit="deg"), default=None,
              help="Direction the wind blows from, clockwise from north; a bare number is degrees (default: the "
                   "airframe file's wind_direction).")
@click.option("--rail-azimuth", "rail_azimuth_rad", type=_Quantity("angle", default_unit="deg"), default=None,
              help="Direction the rail leans towards; a bare number is degrees (default: the file's rail_azimuth, else downwind).")
@click.option("--no-uncertainty", is_flag=True, help="Start from zero uncertainty instead of the file's and the "
                                                     "defaults (then add the options you give).")
@_std_options
@click.option("--json", "as_json", is_flag=True, help="Print the statistics as JSON (SI).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
              help="Write the apogee histogram and the landing map to this PNG file.")
@_units_option
@click.option("--overwrite", is_flag=True, help="Replace an existing --plot file.")
def scatter(airframe_file: str, motor_ref: str, catalog_dir: str | None, n_samples: int, seed: int,
            workers: int | None, delay_s: float | None, target_m: float | None, ceiling_m: float | None,
            field_radius_m: float | None, max_deploy_speed: float | None, wind_from_rad: float | None,
            rail_azimuth_rad: float | None, as_json: bool, plot_path: str | None, units: str, overwrite: bool,
            **opts: Any) -> None:
    """Sample many flights of AIRFRAME_FILE with one motor under stated uncertainties.

    Motor impulse and burn time, masses, drag, wind, rail, pad temperature, CG
    and deployment altitude are drawn from normal distributions (defaults and
    the file's [uncertainty] table, see data_schema/AIRFRAME.md; options
    override them). Reports apogee percentiles with mean and standard error,
    the chances of passing the ceiling, of a fast deployment and of landing
    outside the field, and the 95 % landing ellipse.

    \b
    Example:
      motorlib scatter my-rocket.toml --motor F29-8 --ceiling 550 \\
        --field-radius 400
      motorlib scatter my-rocket.toml --motor G59-10 -n 10000 --seed 3 \\
        --drag-std 8% --plot scatter.png
    """
    from ..files.airframe_toml import load_airframe
    from ..flight.dispersion import DispersionSettings, default_workers, run_scatter
    from .options import load_motor as _load_motor
    from .options import _catalog_or_samples, _open_catalog

    _check_outputs({"--plot": plot_path}, overwrite, [airframe_file])
    shown = display_units(units)
    frame = load_airframe(airframe_file)
    uncertainty = uncertainty_from_options(airframe_file, opts)
    motor, _, label_delay = _load_motor(motor_ref, catalog_dir, delay_s)
    if delay_s is None and label_delay is not None:
        delay_s = label_delay  # the label's delay (E9-6), as --delay 6 gives it
    from pathlib import Path

    catalog = None if Path(motor_ref).is_file() else _open_catalog(_catalog_or_samples(catalog_dir))
    spread = _sibling_spread(motor, catalog)
    try:
        settings = DispersionSettings(n_samples=n_samples, seed=seed, wind_from_rad=wind_from_rad,
                                      rail_azimuth_rad=rail_azimuth_rad, ceiling_m=ceiling_m,
                                      field_radius_m=field_radius_m, max_deploy_speed_m_s=max_deploy_speed)
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None
    k = workers or default_workers()
    summary, flights = run_with_progress(
        lambda progress: run_scatter(frame, motor, uncertainty, settings, delay_s=delay_s, target_m=target_m,
                                     spread=spread, workers=k, progress=progress),
        n_samples, f"{n_samples} flights")
    summary = {"airframe": frame.name, "motor": motor.designation, "maker": motor.maker, **summary}
    written = None
    if plot_path:
        from ..present.plots import scatter_plot

        written = scatter_plot(summary, flights, f"{frame.name} with {motor.designation}", plot_path, shown)
    if as_json:
        click.echo(_strict_json({**summary, "caution": _EPILOG}, indent=2))
        return
    from ..present.scatter import scatter_text

    console = _console()
    console.print(scatter_text(summary, shown, devices_listed=bool(frame.recovery_devices)))
    if written:
        from rich.markup import escape

        console.print(f"Wrote {escape(str(written))}")
    _caution(console)
