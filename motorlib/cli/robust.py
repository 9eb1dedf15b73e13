"""``motorlib match --robust``: rank by the probability of a successful flight under sampled uncertainties."""

from __future__ import annotations

from typing import Any

import click

from .options import _Quantity, display_units
from .output import _EPILOG, _caution, _console, _echo_json


class _Window(click.ParamType):
    """``LOW..HIGH`` of one quantity kind, e.g. ``240m..260m`` or ``41s..44s``; bare numbers take the default unit."""

    def __init__(self, kind: str, default_unit: str) -> None:
        self.kind, self.default_unit = kind, default_unit
        self.name = f"{kind} window"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> tuple[float, float]:
        if isinstance(value, tuple):
            return value
        parts = str(value).split("..")
        if len(parts) != 2:
            self.fail(f"expected LOW..HIGH such as 240m..260m, got {value!r}", param, ctx)
        if self.kind == "time":
            try:
                low, high = (float(p.strip().removesuffix("s")) for p in parts)
            except ValueError:
                self.fail(f"expected LOW..HIGH in seconds such as 41s..44s, got {value!r}", param, ctx)
        else:
            quantity = _Quantity(self.kind, default_unit=self.default_unit, minimum=0.0)
            low, high = (quantity.convert(p.strip(), param, ctx) for p in parts)
        if not 0.0 <= low < high:
            self.fail(f"the window's low end must be at least 0 and below its high end, got {value!r}", param, ctx)
        return (low, high)


def robust_options(func: Any) -> Any:
    """The options ``match`` gains for ``--robust`` (kept here so that match.py stays small)."""
    options = [
        click.option("--robust", is_flag=True, help="Rank by the probability of meeting every rule and window over "
                                                    "sampled flights (motor, masses, drag, wind, rail, weather)."),
        click.option("--samples", "n_samples", type=click.IntRange(2), default=500, show_default=True,
                     help="With --robust: sampled flights per motor."),
        click.option("--seed", type=click.IntRange(0), default=0, show_default=True, help="With --robust: seed."),
        click.option("--workers", type=click.IntRange(1), default=None,
                     help="With --robust: worker processes (default: the cores); results do not depend on it."),
        click.option("--altitude-window", type=_Window("length", "m"),
                     help="With --robust: apogee window, e.g. 240m..260m."),
        click.option("--duration-window", type=_Window("time", "s"),
                     help="With --robust: liftoff-to-landing window, e.g. 41s..44s."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


# --field-radius and --wind-from are shared with the plain ranking (match options and field-day overrides)
_ROBUST_ONLY = ("n_samples", "seed", "workers", "altitude_window", "duration_window")


# options of the plain ranking that the robust one has no use for: refused, never silently dropped
_PLAIN_ONLY = (("--ballast", "ballast"), ("--csv", "as_csv"), ("--show-rejected", "show_rejected"),
               ("--report", "report_path"), ("--plot", "plot_path"))


def pop_robust(opts: dict[str, Any]) -> dict[str, Any]:
    """Remove the robust options from ``opts`` (the plain ranking never sees them)."""
    return {name: opts.pop(name) for name in ("robust", *_ROBUST_ONLY)}


def run_robust(airframe_file: str, cat: Any, opts: dict[str, Any], robust: dict[str, Any]) -> None:
    from ..catalog import CatalogFilter
    from ..files.airframe_toml import load_airframe
    from ..files.uncertainty_toml import load_uncertainty
    from ..flight.dispersion import catalog_spread, default_workers
    from ..matching.rank import _fits
    from .match import match_settings
    from ..matching.robust import RobustSettings, robust_rank
    from .scatter import run_with_progress

    from .options import apply_field_day

    unused = [flag for flag, key in _PLAIN_ONLY if opts.get(key)]
    if opts.get("target_tolerance") is not None:
        unused.append("--target-tolerance")
    if unused:
        # the apogee advice only where the option is about apogee (a ballast or a tolerance reaches the target)
        about_apogee = ("; give --altitude-window to judge apogee"
                        if {"--ballast", "--target-tolerance"} & set(unused) else "")
        raise click.UsageError(f"{', '.join(unused)}: not used with --robust (it ranks by the share of sampled flights "
                               f"that meet every rule{about_apogee}); leave "
                               f"{'it' if len(unused) == 1 else 'them'} out or drop --robust")
    frame = apply_field_day(load_airframe(airframe_file), opts.get("_field_day") or {})
    match = match_settings(opts)
    try:
        settings = RobustSettings(n_samples=robust["n_samples"], seed=robust["seed"],
                                  altitude_window_m=robust["altitude_window"],
                                  duration_window_s=robust["duration_window"],
                                  field_radius_m=opts.get("field_radius"),
                                  wind_from_rad=frame.launch.wind_direction_rad)
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None
    rows = cat.rows(CatalogFilter(tag=opts["tag"]), findings=False)  # the ranking never reads them
    fitting = [r for r in rows if not _fits(frame, r, match)[0]]
    if not fitting:
        raise click.UsageError(f"no motor in {cat.root} fits the airframe")
    records = [cat.get(r.motor_id) for r in fitting]
    by_name: dict[tuple[str, str], list[Any]] = {}
    for r in records:
        by_name.setdefault((r.maker, r.designation), []).append(r)
    spreads = [catalog_spread(by_name[(r.maker, r.designation)]) for r in records]
    k = robust["workers"] or default_workers()
    total = settings.n_samples * len(records)
    result = run_with_progress(
        lambda progress: robust_rank(frame, records, match, load_uncertainty(airframe_file), settings,
                                     ids=[r.motor_id for r in fitting], spreads=spreads, workers=k,
                                     progress=progress),
        total, f"{len(records)} motors x {settings.n_samples} flights")
    result = {"airframe": frame.name, **result,
              "conditions": {"target_m": match.target_m, "ceiling_m": match.ceiling_m,
                             "delay_slack_s": match.rules.max_delay_error_s,
                             "min_rail_exit_speed_m_s": match.rules.min_rail_exit_speed_m_s,
                             "min_liftoff_thrust_to_weight": match.rules.min_liftoff_thrust_to_weight,
                             "max_ejection_speed_m_s": match.rules.max_ejection_speed_m_s,
                             "max_landing_speed_m_s": match.rules.max_landing_speed_m_s,
                             "min_stability_cal": match.min_stability_cal if frame.geometry is not None else None,
                             "catalog": str(cat.root)},
              "caution": _EPILOG}
    if opts["as_json"]:
        _echo_json(result)  # indented at a terminal, one line to a pipe or a file (as plain `match --json`)
        return
    from rich.markup import escape

    from ..present.scatter import robust_key, robust_table, uncertainty_text

    console = _console()
    units = display_units(opts.get("units"))
    console.print(robust_table(result, units, opts["top"], console.width))
    console.print(escape(robust_key(result, opts["top"])) + " ± is one standard error; every motor flies the same "
                  "sampled conditions, so the differences between motors are sharper than the standard errors "
                  "suggest (p_difference_to_next_standard_error in --json).", highlight=False)
    hidden = len(result["candidates"]) - (opts["top"] or len(result["candidates"]))
    if hidden > 0:
        console.print(f"{hidden} more sampled motor(s) below #{opts['top']} are not shown (--top); --json lists "
                      "every one.", highlight=False)
    if len(rows) > len(fitting):
        console.print(f"{len(rows) - len(fitting)} motor(s) do not fit the mount or the class limit and were not "
                      "sampled.", highlight=False)
    spread = uncertainty_text(result.get("uncertainty") or {}, units)
    if spread:
        console.print(f"Sampled spreads (one standard deviation): {spread}.", highlight=False)
    console.print(f"Catalog: {escape(str(cat.root))}", highlight=False)
    _caution(console)
