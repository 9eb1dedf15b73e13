"""Options shared by several commands: quantities, delays, motor metadata, and which catalog to open."""

from __future__ import annotations

import datetime as _dt
import math
import sys
from typing import Any

import click

from ..errors import QuantityError
from ..flight.rules import LaunchRules  # standard library only: help texts quote the rules' defaults
from .output import _err_console

RULES = LaunchRules()  # the defaults every option's help quotes (they live only in LaunchRules)
DEPLOY_LIMITS_TEXT = ", ".join(f"{kind} {speed:g} m/s" for kind, speed in RULES.max_deployment_speed_m_s)


class _Quantity(click.ParamType):
    """A click type for quantities such as ``29mm``, ``0.85 oz`` or ``9.5s``.

    Bare numbers follow one rule on the command line and in airframe files: a bare number is the SI unit
    (m, kg, s, m/s, m²). Where the everyday unit is not the SI one (motor sizes in mm, small masses in g) a
    bare number would mislead (``--ballast 25`` would be 25 kg), so those options pass ``bare=False`` and
    refuse it, asking for a unit. The value keeps the text it was given as (a
    :class:`~motorlib.units.Quantity`), so that reports echo the user's own numbers.
    """

    def __init__(self, kind: str, bare: bool = True, example: str = "", *, default_unit: str | None = None,
                 minimum: float | None = None, strict: bool = False) -> None:
        self.kind, self.bare, self.example, self.default_unit = kind, bare, example, default_unit  # unit of a bare number
        self.minimum, self.strict = minimum, strict  # values below (with strict: at) the minimum are refused
        self.name = f"{kind}"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> float:
        if isinstance(value, float):
            return value
        from ..units import is_bare_number, parse_quantity

        name = param.name if param else "value"
        text = str(value).strip()
        if _is_non_finite(text):  # before the unit rules: 'nan' is no unit problem, and no length such as '29 mm'
            self.fail(f"{text!r} is not a finite number; give e.g. {self.example or _UNIT_EXAMPLES[self.kind]}",
                      param, ctx)
        if not self.bare and is_bare_number(text):
            self.fail(f"{text!r} has no unit; give one, e.g. {self.example or _UNIT_EXAMPLES[self.kind]} "
                      "(a bare number would mean the SI unit here)", param, ctx)
        try:
            quantity = parse_quantity(value, self.kind, field=name, keep_text=True, default_unit=self.default_unit)
        except QuantityError as exc:
            self.fail(exc.problem, param, ctx)
        if not math.isfinite(quantity):
            self.fail(f"{text!r} is not a finite number", param, ctx)
        low = self.minimum
        if low is not None and (quantity < low or (self.strict and quantity == low)):
            self.fail(f"{text!r} must be {'more than' if self.strict else 'at least'} {low:g}", param, ctx)
        return quantity


def _is_non_finite(text: str) -> bool:
    """Whether ``text`` is a number Python reads as nan or an infinity (``nan``, ``-inf``, ``Infinity``)."""
    try:
        return not math.isfinite(float(text))
    except ValueError:
        return False


class _Finite(click.FloatRange):
    """A float option that refuses nan and inf (a NaN limit silently switched a rule off), optionally in a range."""

    name = "number"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> Any:
        number = super().convert(value, param, ctx)
        if not math.isfinite(number):
            self.fail(f"{value!r} is not a finite number", param, ctx)
        return number

    def _describe_range(self) -> str:
        # click describes a range with no bounds as 'x<=None' in --help; with none there is no range to show
        if self.min is None and self.max is None:
            return ""
        return str(super()._describe_range())


_UNIT_EXAMPLES = {"length": "24mm or 0.95in", "mass": "25g or 0.9oz", "time": "6s", "speed": "15m/s",
                  "area": "0.05m2 or 78in2", "angle": "5deg", "temperature": "30degC or 86degF"}

# Field-day overrides: re-run today's conditions without editing the airframe file (fly and match)
_FIELD_DAY = (
    ("--wind", "wind_m_s", _Quantity("speed"), "Wind speed at 10 m today, e.g. 6m/s or 12mph; a bare number is m/s."),
    ("--wind-from", "wind_from_rad", _Quantity("angle", bare=False, example="270deg"),
     "Where the wind blows from, clockwise from north, e.g. 270deg (a west wind)."),
    ("--temperature", "temperature_k", _Quantity("temperature", bare=False, example="30degC"),
     "Temperature at the pad today, e.g. 30degC or 86degF."),
    ("--elevation", "elevation_m", _Quantity("length"), "Pad elevation above sea level, e.g. 1400m or 4600ft."),
    ("--rail-length", "rail_length_m", _Quantity("length"), "Rail length, e.g. 2.4m or 8ft; a bare number is m."),
    ("--rail-angle", "rail_angle_rad", _Quantity("angle", bare=False, example="5deg"),
     "Rail angle from vertical, e.g. 5deg."),
    ("--rail-azimuth", "rail_azimuth_rad", _Quantity("angle", bare=False, example="250deg"),
     "Direction the rail leans toward, clockwise from north, e.g. 250deg (into a wind from 250deg)."),
)


def field_day_options(func: Any) -> Any:
    """The field-day overrides (--wind, --wind-from, --temperature, --elevation, --rail-*) on a command."""
    for flag, name, kind, text in reversed(_FIELD_DAY):
        func = click.option(flag, name, type=kind, default=None, help=text)(func)
    return func


def pop_field_day(opts: dict[str, Any]) -> dict[str, Any]:
    """Remove the field-day overrides from ``opts``: {name: value or None}."""
    return {name: opts.pop(name, None) for _, name, _, _ in _FIELD_DAY}


_FIELD_DAY_KEYS = {"wind_m_s": "--wind", "wind_from_rad": "--wind-from", "temperature_k": "--temperature",
                   "elevation_m": "--elevation", "rail_length_m": "--rail-length", "rail_angle_rad": "--rail-angle",
                   "rail_azimuth_rad": "--rail-azimuth"}


def apply_field_day(frame: Any, day: dict[str, Any]) -> Any:
    """``frame`` with the field-day overrides that were given (the rest as in the file)."""
    from dataclasses import replace

    from ..errors import SimulationInputError

    given = {k: float(v) for k, v in day.items() if v is not None}
    if not given:
        return frame
    launch = frame.launch
    site = launch.site
    try:
        if "temperature_k" in given or "elevation_m" in given:
            site = replace(site, temperature_k=given.get("temperature_k", site.temperature_k),
                           elevation_m=given.get("elevation_m", site.elevation_m))
        profile = launch.wind_profile
        if profile is not None and ("wind_m_s" in given or "wind_from_rad" in given):
            # today's reading replaces the file's measured profile: flying the profile would ignore the option
            click.echo("Note: --wind/--wind-from replace the airframe file's measured wind_profile; the wind "
                       "grows from today's reading by the power law.", err=True)
            profile = None
        launch = replace(launch, site=site, wind_profile=profile,
                         wind_speed_m_s=given.get("wind_m_s", launch.wind_speed_m_s),
                         wind_direction_rad=given.get("wind_from_rad", launch.wind_direction_rad),
                         rail_length_m=given.get("rail_length_m", launch.rail_length_m),
                         rail_angle_rad=given.get("rail_angle_rad", launch.rail_angle_rad),
                         rail_azimuth_rad=given.get("rail_azimuth_rad", launch.rail_azimuth_rad))
    except (SimulationInputError, ValueError) as exc:
        problem = str(getattr(exc, "problem", exc))
        names = {"temperature_k": "--temperature", "elevation_m": "--elevation", "wind_speed": "--wind",
                 "wind_direction": "--wind-from", "rail_length": "--rail-length", "rail_angle": "--rail-angle",
                 "rail_azimuth": "--rail-azimuth"}
        field = str(getattr(exc, "field", "")) + " " + problem
        option = next((opt for key, opt in names.items() if key in field), "field-day option")
        shown = day.get({v: k for k, v in _FIELD_DAY_KEYS.items()}.get(option, ""), None)
        typed = getattr(shown, "text", None)
        for key in names:
            problem = problem.replace(f"`{key}` ", "")
        if typed:  # the value as typed is shown; the internal SI figure would only confuse (-300 degC is -26.85 K)
            problem = problem.split(", got ")[0]
        raise click.UsageError(f"{option}{' ' + typed if typed else ''}: {problem.replace('`', '')}") from None
    return replace(frame, launch=launch)


_UNITS_HELP = ("Display units, metric or imperial (default: $MOTORLIB_UNITS, else 'units' in the user config "
               "file, else metric). JSON stays SI.")


def _units_option(func: Any) -> Any:
    """``--units metric|imperial`` on a command; resolved by :func:`display_units`."""
    return click.option("--units", "units", type=click.Choice(["metric", "imperial", "si"], case_sensitive=False),
                        default=None, metavar="metric|imperial", help=_UNITS_HELP)(func)


def config_file() -> Any:
    """The user config file in the platform's config folder, e.g. ``~/.config/motorlib/config.toml`` on Linux.

    It may hold ``units = "imperial"`` (or ``"metric"``). Only the command line reads it; the library reads no
    configuration.
    """
    from pathlib import Path

    return Path(_user_dir("config")) / "motorlib" / "config.toml"


# The user folders the command line reads: (Windows variable, its fallback, XDG variable, its fallback)
_USER_DIRS = {"config": ("APPDATA", "~\\AppData\\Roaming", "XDG_CONFIG_HOME", "~/.config"),
              "data": ("LOCALAPPDATA", "~\\AppData\\Local", "XDG_DATA_HOME", "~/.local/share")}


def _user_dir(kind: str) -> str:
    """The platform's user folder for ``kind`` (``config`` or ``data``): XDG on Linux, the usual ones elsewhere."""
    import os

    windows, windows_default, xdg, xdg_default = _USER_DIRS[kind]
    if sys.platform == "win32":
        return os.environ.get(windows) or os.path.expanduser(windows_default)
    if sys.platform == "darwin":
        return os.path.expanduser("~/Library/Application Support")
    return os.environ.get(xdg) or os.path.expanduser(xdg_default)


_CONFIG_KEYS = ("units",)


def _config() -> dict[str, Any]:
    """The user config file's settings ({} when there is none); a broken file is a usage error naming it."""
    import tomllib

    path = config_file()
    try:
        with open(path, "rb") as handle:
            data = tomllib.load(handle)
    except FileNotFoundError:
        return {}
    except (OSError, tomllib.TOMLDecodeError) as exc:
        raise click.UsageError(f"{path}: cannot read the config file: {exc}") from None
    unknown = sorted(set(data) - set(_CONFIG_KEYS))
    if unknown:
        raise click.UsageError(f"{path}: {unknown[0]}: unknown key; expected one of {', '.join(_CONFIG_KEYS)}")
    return data


def display_units(value: str | None = None) -> Any:
    """The display units in force: this command's ``--units``, else the group's ``motorlib --units``, else
    ``$MOTORLIB_UNITS``, else ``units`` in :func:`config_file`, else metric."""
    import os

    from ..present.display import DisplayUnits

    ctx = click.get_current_context(silent=True)
    while value is None and ctx is not None:
        value = ctx.params.get("units")
        ctx = ctx.parent
    source = "--units"
    if value is None and os.environ.get("MOTORLIB_UNITS"):
        value, source = os.environ["MOTORLIB_UNITS"], "MOTORLIB_UNITS"
    if value is None:
        value, source = _config().get("units"), f"{config_file()}: units"
    try:
        return DisplayUnits(value or "metric")
    except ValueError as exc:
        raise click.UsageError(f"{source}: {exc}") from None


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
        click.option("--diameter", "diameter_m", type=_Quantity("length", bare=False, example="24mm"),
                     help="Case diameter with a unit, e.g. 18mm or 0.5in."),
        click.option("--length", "length_m", type=_Quantity("length", bare=False, example="70mm"),
                     help="Case length with a unit, e.g. 70mm or 2.75in."),
        click.option("--total-mass", "total_mass_kg", type=_Quantity("mass", bare=False, example="24g"),
                     help="Loaded motor mass with a unit, e.g. 24g or 0.85oz."),
        click.option("--propellant-mass", "propellant_mass_kg", type=_Quantity("mass", bare=False, example="12.5g"),
                     help="Propellant mass with a unit, e.g. 12.5g."),
        click.option("--delays", "delays_s", callback=_delays, metavar="S[,S...]",
                     help="Available ejection delays in seconds, e.g. 3,5,7."),
        click.option("--plugged", is_flag=True, help="No ejection charge (plugged or booster)."),
        click.option("--adjustable-delay", is_flag=True, help="The user may shorten the delay."),
        click.option("--source-kind", type=click.Choice(SOURCE_KINDS), default=None,
                     help="Where the curve comes from (default: other; for reduce: own-firing)."),
        click.option("--test-date", type=click.DateTime(["%Y-%m-%d"]), help="Date of the test, YYYY-MM-DD."),
        click.option("--notes", default="", help="Free-text provenance notes (stand, lot, operator)."),
        click.option("--meta", "meta_file", type=click.Path(exists=True, dir_okay=False),
                     help="TOML side file with metadata for many CSV files ([defaults] and [files.\"NAME.csv\"]); "
                          "options given here override it."),
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
        provenance=Provenance(kind=opts["source_kind"] or "other", date=date, notes=opts["notes"]),
    )


# Metadata option -> (side-file key, value when not given)
_GIVEN = {"designation": ("designation", None), "maker": ("maker", ""), "diameter_m": ("diameter", None),
          "length_m": ("length", None), "total_mass_kg": ("total_mass", None),
          "propellant_mass_kg": ("propellant_mass", None), "delays_s": ("delays", ()), "plugged": ("plugged", False),
          "adjustable_delay": ("adjustable_delay", False), "source_kind": ("source_kind", None),
          "test_date": ("test_date", None), "notes": ("notes", "")}


def _metadata_for(opts: dict[str, Any], csv_paths: list[Any] = (), report_unused: bool = False,
                  default_kind: str = "other") -> Any:
    """Metadata per CSV file: ``path -> CurveMetadata`` from ``--meta`` under the options given, or the options'
    :class:`CurveMetadata` when there is no side file. With ``report_unused``, tables naming none of
    ``csv_paths`` (a misspelt file name) are reported on stderr. ``default_kind`` is the provenance kind when
    neither ``--source-kind`` nor the side file gives one."""
    base = _metadata(opts if opts.get("source_kind") else {**opts, "source_kind": default_kind})
    if not opts.get("meta_file"):
        return base
    from ..errors import CurveError
    from ..files.csv_meta import read_csv_metadata

    try:
        side = read_csv_metadata(opts["meta_file"])
    except CurveError as exc:
        raise click.UsageError(str(exc)) from None
    given = {key for option, (key, unset) in _GIVEN.items() if opts.get(option) not in (unset, "", None)}
    csvs = [p for p in csv_paths if str(p).lower().endswith((".csv", ".txt", ".tsv"))]
    from rich.markup import escape

    for name in side.unused(csvs) if csvs and report_unused else []:
        _err_console().print(f"[yellow]note[/yellow] {escape(str(opts['meta_file']))}: "
                             + escape(f'[files."{name}"] names none of the files given'), highlight=False)

    def for_path(path: Any) -> Any:
        try:
            return side.metadata(path, base, given)
        except CurveError as exc:
            raise click.UsageError(str(exc)) from None

    return for_path


def default_catalog_dir() -> str:
    """The platform's user data folder for the catalog (XDG on Linux)."""
    import os

    return os.path.join(_user_dir("data"), "motorlib", "catalog")


def _open_catalog(folder: str | None, *, create: bool = False, report_skipped: bool = True) -> Any:
    """Open a catalog for a command; only ``catalog add`` (``create``) makes a missing folder.

    A read-only command never creates one: a typo in ``--catalog`` is an error naming the folder, and the
    user catalog is not made empty by a ``list`` (after which ``match`` would find "no motors" instead of
    using the bundled samples). Files skipped as unreadable are named on standard error, unless the command
    reports them itself (``report_skipped`` False: ``catalog verify``).
    """
    import os
    from pathlib import Path

    from ..catalog import Catalog
    from ..errors import CatalogError

    path = Path(folder or default_catalog_dir())
    if not create and not path.exists():
        hint = ("; add curves with 'motorlib catalog add' (match and fly use the bundled samples until then)"
                if folder is None else "; check the name, or create it with 'motorlib catalog add --catalog ...'")
        raise CatalogError(f"{path}: no such catalog folder{hint}")
    read_only = path.exists() and not os.access(path, os.W_OK)  # the bundled samples carry a READ_ONLY marker
    catalog = Catalog(path, read_only=read_only, create=create, on_lock_wait=lambda: _err_console().print(
        f"waiting for another motorlib process that is writing {path} ...", markup=False, highlight=False))
    problems = catalog.problems if report_skipped else []
    if not (catalog.notices and not catalog.read_only) and not problems:
        return catalog  # nothing to say: rich stays unimported (a --json or --csv run never needs it)
    err = _err_console()
    for notice in catalog.notices:
        if not catalog.read_only:
            err.print(f"[dim]note: {notice}[/dim]")
    from rich.markup import escape

    for where, problem in problems:  # paths and messages are user text: never read as markup
        err.print(f"[yellow]skipped[/yellow] {escape(skip_text(where, problem))}", markup=True, highlight=False,
                  soft_wrap=True)
    return catalog


def skip_text(where: str, problem: str) -> str:
    """'FILE: why' for a skipped file; the problem alone when it names the file already ('FILE:LINE: why')."""
    return problem if problem.startswith(where + ":") else f"{where}: {problem}"


def _catalog_or_samples(catalog_dir: str | None) -> str:
    """The catalog asked for, else the user catalog when it exists, else the bundled sample curves."""
    import os

    if catalog_dir is not None:
        return catalog_dir
    from ..files.curvefiles import sample_catalog_dir  # only here: it imports the file readers

    return default_catalog_dir() if os.path.isdir(default_catalog_dir()) else str(sample_catalog_dir())


_catalog_option = click.option(
    "--catalog", "catalog_dir", envvar="MOTORLIB_CATALOG", type=click.Path(file_okay=False),
    help="Catalog folder (default: $MOTORLIB_CATALOG, else the user data folder, e.g. ~/.local/share/motorlib/catalog).")


def motor_options(required: bool = True) -> Any:
    """``--motor`` (a curve file, or a reference in a catalog) and ``--catalog``, as every command that flies one
    motor takes them; see :func:`load_motor`."""
    def decorate(func: Any) -> Any:
        func = click.option("--catalog", "catalog_dir", type=click.Path(file_okay=False), envvar="MOTORLIB_CATALOG",
                            help="Catalog to find --motor in (default: $MOTORLIB_CATALOG, else the user catalog if "
                                 "it exists, else the bundled sample curves).")(func)
        return click.option("--motor", "motor_ref", required=required,
                            help="A curve file (.xml or .csv), or a motor id, handle or designation in the catalog "
                                 "(e.g. F29-8).")(func)
    return decorate


def resolve_motor(catalog: Any, ref: str) -> str:
    """The id of the motor ``ref`` names in ``catalog`` (:meth:`Catalog.resolve`); a reference that names none
    raises :class:`~motorlib.errors.MotorNotFoundError` with the closest designations and handles (difflib's
    ratio, case folded) and how to list them all."""
    import difflib

    from ..errors import MotorNotFoundError

    try:
        return str(catalog.resolve(ref))
    except MotorNotFoundError as exc:
        if "several motors match" in str(exc):
            raise
        names: dict[str, str] = {}  # folded -> as the catalog spells it; designations first, then handles
        for row in catalog.rows():
            for name in (row.designation, row.handle):
                if name:
                    names.setdefault(name.casefold(), name)
        close = difflib.get_close_matches(ref.strip().casefold(), list(names), n=4, cutoff=0.6)
        hint = f"; did you mean {', '.join(names[c] for c in close)}?" if close else ""
        raise MotorNotFoundError(f"{exc}{hint} ('motorlib catalog list' lists them)") from None


def _looks_like_a_file(reference: str) -> bool:
    """Whether a --motor reference names a file (a folder in it, or a curve file's suffix) rather than a motor."""
    import os

    return os.sep in reference or reference.lower().endswith((".xml", ".csv", ".json"))


def load_motor(motor_ref: str, catalog_dir: str | None, delay_s: float | None = None
               ) -> tuple[Any, str | None, float | None]:
    """The motor in the curve file ``motor_ref``, else the one ``motor_ref`` names in the catalog; its file; and
    the delay [s] its reference names, when it is the label on a motor with one of its delays (``E9-6`` for the
    catalog's ``E9-4,6,8``), else None.

    Refuses a ``--delay`` of ``delay_s`` [s] that the motor does not offer (one rule with the flight's:
    :func:`motorlib.flight.delays.delay_problem`), or that differs from the label's.
    """
    from pathlib import Path

    from ..errors import MotorNotFoundError
    from ..files.curvefiles import load_curve_file
    from ..flight.delays import delay_problem

    label_delay = None
    if Path(motor_ref).is_file():
        motor, path = load_curve_file(motor_ref), motor_ref
    elif Path(motor_ref).is_dir():
        raise click.UsageError(f"--motor {motor_ref}: is a folder; give a curve file, or a motor's designation or id "
                               "in the catalog")
    else:
        catalog = _open_catalog(_catalog_or_samples(catalog_dir))
        try:
            motor_id = resolve_motor(catalog, motor_ref)
        except MotorNotFoundError as exc:
            found = _label_with_delay(catalog, motor_ref)
            if found is None and _looks_like_a_file(motor_ref):
                raise MotorNotFoundError(f"{motor_ref}: no such file, and no motor of that name in "
                                         f"{catalog.root}") from exc
            if found is None:
                raise
            if isinstance(found, str):
                raise MotorNotFoundError(found) from exc
            motor_id, label_delay = found
            if delay_s is not None and float(delay_s) != label_delay:
                raise click.UsageError(f"--delay {float(delay_s):g}: the label {motor_ref} names its {label_delay:g} s "
                                       "delay; give one or the other") from None
        row_path = next((row.path for row in catalog.rows() if row.motor_id == motor_id), None)
        motor, path = catalog.get(motor_id), (str(Path(catalog.root) / row_path) if row_path else None)
    problem = None if delay_s is None else delay_problem(float(delay_s), motor.delays_s, motor.delay_adjustable,
                                                     plugged=motor.no_ejection_charge)
    if problem:
        raise click.UsageError(f"--delay {float(delay_s):g}: {motor.designation} {problem}")
    return motor, path, label_delay


def _label_with_delay(catalog: Any, ref: str) -> tuple[str, float] | str | None:
    """The motor and delay [s] that a label with one delay names (``E9-6``: the catalog's ``E9-4,6,8`` at 6 s);
    a message when the label's motor is there but offers no such delay (or several motors carry the label);
    None when no motor carries its designation."""
    import re

    match = re.fullmatch(r"\s*(.+?)-(\d+(?:\.\d+)?)\s*", ref)
    if match is None:
        return None
    base, delay = match.group(1).casefold(), float(match.group(2))
    rows = [row for row in catalog.rows() if row.designation and "-" in row.designation
            and row.designation.rsplit("-", 1)[0].casefold() == base]
    if not rows:
        return None
    offering = [row for row in rows if delay in row.delays_s]
    if len(offering) == 1:
        return offering[0].motor_id, delay
    if not offering:
        offers = "; ".join(f"{row.designation} offers {', '.join(f'{d:g}' for d in row.delays_s) or 'no'} s"
                           for row in rows)
        return f"{ref!r}: no motor with that label offers a {delay:g} s delay ({offers}); name the motor and give --delay"
    return (f"{ref!r}: several motors carry that label ({', '.join(row.handle for row in offering)}); name one by its "
            "handle and give --delay")
