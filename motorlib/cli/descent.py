"""``motorlib descent``: recovery arithmetic, forward (terminal speed, fall time) and inverse (drag area)."""

from __future__ import annotations

import json

import click

from .group import _Command

from .options import _Finite, _Quantity, _units_option, display_units
from .output import _caution, _console


@click.command(cls=_Command)
@click.option("--mass", "mass_kg", type=_Quantity("mass", bare=False, example="450g", minimum=0.0, strict=True),
              help="Mass under the device, with a unit (e.g. 450g, 1.2kg, 16oz).")
@click.option("--drag-area", "drag_area_m2", type=_Quantity("area", minimum=0.0),
              help="Cd·A of the device, e.g. 0.18m2 or 280in2; a bare number is m².")
@click.option("--cd", "drag_coefficient", type=_Finite(min=0, min_open=True),
              help="Drag coefficient of the device (with --diameter).")
@click.option("--diameter", "diameter_m", type=_Quantity("length", minimum=0.0, strict=True),
              help="Device diameter (with --cd), e.g. 0.6m or 24in; a bare number is m.")
@click.option("--height", "height_m", type=_Quantity("length", minimum=0.0, strict=True), help="Height fallen, e.g. 300m or 1000ft; a bare number is m.")
@click.option("--fall-time", "fall_time_s", type=_Quantity("time", minimum=0.0, strict=True),
              help="Observed time to fall --height, e.g. 9.5s (read off a launch video); a bare number is s.")
@click.option("--elevation", "elevation_m", type=_Quantity("length"), default=None,
              help="Site elevation for the air density (standard atmosphere), e.g. 120m or 4000ft; default 0.")
@_units_option
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
def descent(mass_kg: float | None, drag_area_m2: float | None, drag_coefficient: float | None,
            diameter_m: float | None, height_m: float | None, fall_time_s: float | None, elevation_m: float | None,
            units: str | None, as_json: bool) -> None:
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
      motorlib descent --mass 450g --cd 0.8 --diameter 0.6m --height 300m
      motorlib descent --height 82m --fall-time 9.5s --mass 15g
      motorlib descent --mass 1lb --drag-area 280in2 --units imperial
    """
    # --- issue 10 (defect 6): falls integrate through the atmosphere; JSON carries null, never Infinity/NaN ---
    import math

    from ..flight.atmosphere import Site
    from ..flight.descent import drag_area_from_fall_m2, fall_through_air, pad_terminal_speed_m_s
    from ..flight.geometry import disc_drag_area_m2

    for option, value, least in (("--fall-time", fall_time_s, 0.0), ("--mass", mass_kg, 0.0),
                                 ("--drag-area", drag_area_m2, None), ("--diameter", diameter_m, 0.0),
                                 ("--height", height_m, 0.0)):
        # a zero or negative size printed 0, inf or nan with exit 0; no drag at all (Cd·A = 0) is a free fall
        if value is not None and not (value > least if least is not None else value >= 0.0):
            above = "above 0" if least is not None else "0 or more"
            raise click.BadParameter(f"must be {above}, got {getattr(value, 'text', value)}", param_hint=option)
    if elevation_m is None:
        elevation_m = 0.0
    if drag_area_m2 is None and drag_coefficient is not None and diameter_m is not None:
        drag_area_m2 = disc_drag_area_m2(drag_coefficient, diameter_m)
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
    from ..present.tables import descent_text

    console = _console()
    console.print(descent_text(result, display_units(units), elevation_m=elevation_m, height_m=height_m,
                               fall_time_s=fall_time_s, drag_area_m2=drag_area_m2), end="")
    _caution(console)
    # --- end of issue 10 (defect 6) ---
