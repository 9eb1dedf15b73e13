"""Options shared by several commands: quantities, delays, motor metadata, and which catalog to open."""

from __future__ import annotations

import datetime as _dt
import sys
from typing import Any

import click

from ..errors import QuantityError
from .output import _err_console


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


# The provenance kinds of motor.record.PROVENANCE_KINDS, spelled out so that the CLI's start-up imports no numpy
# (tests/cli/test_importing.py checks that both lists agree).
SOURCE_KINDS = ("approval-firing", "maker-published", "own-firing", "demo", "other")


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
        click.option("--source-kind", type=click.Choice(SOURCE_KINDS), default="other", show_default=True,
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
        delay_adjustable=opts["adjustable_delay"], no_ejection_charge=opts["plugged"],
        provenance=Provenance(kind=opts["source_kind"], date=date, notes=opts["notes"]),
    )


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

    from ..catalog import Catalog

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


def _catalog_or_samples(catalog_dir: str | None) -> str:
    """The catalog asked for, else the user catalog when it exists, else the bundled sample curves."""
    import os

    from ..files.curvefiles import sample_catalog_dir

    if catalog_dir is not None:
        return catalog_dir
    return default_catalog_dir() if os.path.isdir(default_catalog_dir()) else str(sample_catalog_dir())


_catalog_option = click.option(
    "--catalog", "catalog_dir", envvar="MOTORLIB_CATALOG", type=click.Path(file_okay=False),
    help="Catalog folder (default: $MOTORLIB_CATALOG, else the user data folder, e.g. ~/.local/share/motorlib/catalog).")
