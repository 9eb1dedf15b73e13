"""``motorlib demo``: the main job end to end on bundled data."""

from __future__ import annotations

import click

from .match import _run_match
from .options import _open_catalog, _units_option, display_units
from .output import _console


@click.command()
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Where to write the chart of apogee per motor (default: motorlib-demo.png, or the first free "
                   "motorlib-demo-N.png: the demo never replaces a file).")
@click.option("--overwrite", is_flag=True, help="Replace the --plot file if it exists.")
@_units_option
def demo(plot_path: str | None, overwrite: bool, units: str | None) -> None:
    """Run the main job end to end on bundled data: rank the sample motors for a demo airframe.

    The demo airframe (a 41.6 mm sport model with a 29 mm mount) aims at 400 m
    under a 600 m ceiling (1300 ft under 2000 ft with --units imperial); the
    ranking and a chart are produced.

    \b
    Example:
      motorlib demo --units imperial --plot demo.png
    """
    from ..files.curvefiles import sample_catalog_dir

    if plot_path is None:
        plot_path = _free_name("motorlib-demo", ".png")

    airframe = sample_catalog_dir() / "airframes" / "quibble-41.toml"
    from ..units import parse_quantity

    shown = display_units(units)
    target, ceiling = (parse_quantity(t, "length", keep_text=True) for t in
                       (("400 m", "600 m") if shown.system == "metric" else ("1300 ft", "2000 ft")))
    opts = dict(target_m=target, ceiling_m=ceiling, max_class=None, min_rail_exit=None, min_thrust_to_weight=None,
                delay_slack=None, allow_smaller_motors=True, adapter_steps=1, target_tolerance=None, tag=None,
                top=None, show_rejected=False, ballast=True,
                units=shown.system, as_json=False, as_csv=False, plot_path=plot_path, report_path=None,
                overwrite=overwrite)
    _console().print(f"Demo: airframe {airframe.name}, bundled sample catalog, target {target.text}, ceiling "
                     f"{ceiling.text}, motors for the 29 mm mount and 24 mm ones through an adapter, with ballast.")
    _run_match(str(airframe), _open_catalog(str(sample_catalog_dir())), opts)


def _free_name(stem: str, suffix: str) -> str:
    """``stem + suffix`` in the working folder, or ``stem-N + suffix`` with the first N that names no file."""
    import os

    name, n = stem + suffix, 1
    while os.path.lexists(name):
        name, n = f"{stem}-{n}{suffix}", n + 1
    return name
