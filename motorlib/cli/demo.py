"""``motorlib demo``: the main job end to end on bundled data."""

from __future__ import annotations

import click

from .match import _run_match
from .options import _open_catalog
from .output import _console


@click.command()
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
                units="si", as_json=False, as_csv=False, plot_path=plot_path, report_path=None,
                overwrite=False)
    _console().print(f"Demo: airframe {airframe.name}, bundled sample catalog, target 400 m, ceiling 600 m, "
                     "24 and 29 mm motors (adapters allowed), with ballast.")
    _run_match(str(airframe), _open_catalog(str(sample_catalog_dir())), opts)
