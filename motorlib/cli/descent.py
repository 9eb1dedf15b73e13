"""``motorlib descent``: recovery arithmetic, forward (terminal speed, fall time) and inverse (drag area)."""

from __future__ import annotations

import json

import click

from .options import _Quantity
from .output import _caution, _console


@click.command()
@click.option("--mass", "mass_kg", type=_Quantity("mass", "g"), help="Mass under the device; a bare number is g.")
@click.option("--drag-area", "drag_area_m2", type=float, help="Cd·A of the device in m².")
@click.option("--cd", "drag_coefficient", type=float, help="Drag coefficient of the device (with --diameter).")
@click.option("--diameter", "diameter_m", type=_Quantity("length", "m"),
              help="Device diameter (with --cd); a bare number is m (e.g. 0.6, 24in).")
@click.option("--height", "height_m", type=_Quantity("length", "m"), help="Height fallen; a bare number is m.")
@click.option("--fall-time", "fall_time_s", type=click.FloatRange(min=0, min_open=True),
              help="Observed time to fall --height, in seconds (e.g. read off a launch video).")
@click.option("--elevation", "elevation_m", type=_Quantity("length", "m"), default=0.0,
              help="Site elevation for the air density (standard atmosphere); a bare number is m.")
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
def descent(mass_kg: float | None, drag_area_m2: float | None, drag_coefficient: float | None,
            diameter_m: float | None, height_m: float | None, fall_time_s: float | None, elevation_m: float,
            as_json: bool) -> None:
    """Recovery arithmetic: terminal speed and fall time, or the drag area that explains an observed fall.

    Forward: --mass and --drag-area (or --cd with --diameter) give the terminal
    speed, and with --height the time to fall it from rest. Inverse: --height
    and --fall-time give the terminal speed that explains them (the exact
    quadratic-drag fall, not height / time), and with --mass the drag area.
    Air density is the standard atmosphere's at --elevation.

    \b
    Examples:
      motorlib descent --mass 450g --cd 0.8 --diameter 0.6 --height 300
      motorlib descent --height 82 --fall-time 9.5 --mass 15g
    """
    import math

    from ..flight.atmosphere import density_kg_m3
    from ..flight.descent import drag_area_m2 as area_for, fall_speed_m_s, fall_time_s as time_for
    from ..flight.descent import terminal_speed_from_fall_m_s, terminal_speed_m_s

    if drag_area_m2 is None and drag_coefficient is not None and diameter_m is not None:
        drag_area_m2 = drag_coefficient * math.pi * diameter_m**2 / 4.0
    elif drag_area_m2 is None and (drag_coefficient is not None or diameter_m is not None):
        raise click.UsageError("--cd and --diameter go together")
    rho = float(density_kg_m3(elevation_m))
    result: dict[str, float] = {"density_kg_m3": rho}
    if fall_time_s is not None:
        if height_m is None:
            raise click.UsageError("--fall-time needs --height")
        try:
            v_t = float(terminal_speed_from_fall_m_s(height_m, fall_time_s))
        except ValueError as exc:
            raise click.UsageError(str(exc).replace("`", "")) from None
        result.update(terminal_speed_m_s=v_t, fall_time_s=fall_time_s, height_m=height_m,
                      landing_speed_m_s=float(fall_speed_m_s(fall_time_s, v_t)))
        if mass_kg is not None:
            result["drag_area_m2"] = float(area_for(mass_kg, v_t, rho))
    elif mass_kg is not None and drag_area_m2 is not None:
        v_t = float(terminal_speed_m_s(mass_kg, drag_area_m2, rho))
        result.update(terminal_speed_m_s=v_t, drag_area_m2=drag_area_m2)
        if height_m is not None:
            t = float(time_for(height_m, v_t))
            result.update(fall_time_s=t, height_m=height_m, landing_speed_m_s=float(fall_speed_m_s(t, v_t)))
    else:
        raise click.UsageError("give --mass with --drag-area (or --cd and --diameter), or --height with --fall-time")
    if as_json:
        click.echo(json.dumps(result, indent=2))
        return
    console = _console()
    console.print(f"Air density at {elevation_m:g} m: {rho:.4g} kg/m³")
    console.print(f"Terminal speed: {result['terminal_speed_m_s']:.3g} m/s")
    if "fall_time_s" in result:
        console.print(f"Fall of {result['height_m']:g} m from rest: {result['fall_time_s']:.3g} s, "
                      f"landing at {result['landing_speed_m_s']:.3g} m/s")
    if "drag_area_m2" in result:
        console.print(f"Drag area Cd·A: {result['drag_area_m2']:.4g} m²")
    _caution(console)
