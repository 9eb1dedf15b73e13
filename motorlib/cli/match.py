"""``motorlib match``: rank every catalog motor for an airframe by apogee, rail exit speed and delay."""

from __future__ import annotations

import math
from typing import Any

import click

from .options import (DEPLOY_LIMITS_TEXT as _DEPLOY_LIMITS, RULES as _RULES, _catalog_option, _catalog_or_samples, _Finite, _open_catalog, _Quantity, _units_option,
                      apply_field_day, display_units, field_day_options, pop_field_day)
from .group import _Command
from .output import _EPILOG, _card_units, _check_outputs, _console, _echo_json
from .robust import pop_robust, robust_options, run_robust

# Rows of the ranking table unless --top says otherwise: a screen or two. A 5,000-motor catalog printed whole was
# 33,000 lines and 4.5-6.7 s of drawing (new-user trial), which nobody reads; the line below the table says how
# many more fit, and --json lists every one. Our choice, no published source.
_TABLE_ROWS = 40


class _Tolerance(click.ParamType):
    """``--target-tolerance``: a percentage of the target (``5%``) or a length (``20m``, ``60ft``).

    A bare number is refused: 5 could be 5 % or 5 m. Every refusal says what to give; a length is checked
    against the target in :func:`match_settings`, which knows it.
    """

    name = "tolerance"
    _WANT = "give a percentage of the target above 0 and below 100, such as 5%, or a length such as 20m"

    def convert(self, value: Any, param: click.Parameter | None, ctx: click.Context | None) -> Any:
        if isinstance(value, tuple):
            return value
        text = str(value).strip()
        if text.endswith("%"):
            try:
                percent = float(text[:-1])
            except ValueError:
                percent = math.nan
            if not 0.0 < percent < 100.0:  # NaN fails too
                self.fail(f"{text!r}: {self._WANT}", param, ctx)
            return ("fraction", percent / 100.0)
        try:
            float(text)
        except ValueError:
            pass
        else:
            self.fail(f"{text!r} has no unit; {self._WANT}", param, ctx)
        try:
            length = _Quantity("length", minimum=0.0, strict=True).convert(text, param, ctx)
        except click.BadParameter:
            length = math.nan
        if not (math.isfinite(length) and length > 0.0):
            self.fail(f"{text!r}: {self._WANT}", param, ctx)
        return ("length", length)


def _match_options(func: Any) -> Any:
    options = [
        click.option("--target", "target_m", type=_Quantity("length", minimum=0.0, strict=True),
                     help="Aim altitude above the pad, e.g. 250m or 800ft; a bare number is m."),
        click.option("--target-tolerance", "target_tolerance", type=_Tolerance(), default=None,
                     help="How far from the target still counts as on target: 10% or 30m (default 5%). "
                          "A safe motor outside it is 'off target'."),
        click.option("--ceiling", "ceiling_m", type=_Quantity("length", minimum=0.0, strict=True),
                     help="Never exceed this altitude (the field's limit), e.g. 600m or 2000ft; a bare number is m."),
        click.option("--max-class", type=click.Choice(["1/8A", "1/4A", "1/2A", *"ABCDEFGHIJKLMNO"]),
                     help="Highest impulse class you may fly (your certification)."),
        click.option("--min-rail-exit", "min_rail_exit", type=_Quantity("speed", minimum=0.0, strict=True), default=None,
                     help=f"Minimum rail exit speed, e.g. 15m/s or 50ft/s (default {_RULES.min_rail_exit_speed_m_s:g} "
                          f"m/s, or {_RULES.rail_exit_wind_ratio:g} x the wind if higher: common practice, no "
                          "published source)."),
        click.option("--min-thrust-to-weight", type=_Finite(min=0.0), default=None,
                     help=f"Minimum liftoff thrust-to-weight (default {_RULES.min_liftoff_thrust_to_weight:g}: common "
                          "practice, no published source)."),
        click.option("--delay-slack", type=_Quantity("time", minimum=0.0), default=None,
                     help=f"How far the chosen delay may be from the optimal one, e.g. 2s (default "
                          f"{_RULES.max_delay_error_s:g} s: common practice, no published source)."),
        click.option("--max-landing-speed", "max_landing_speed", type=_Quantity("speed", minimum=0.0, strict=True),
                     default=None,
                     help=f"Highest descent rate at landing, e.g. 6.5m/s (default {_RULES.max_landing_speed_m_s:g} "
                          "m/s: common practice, no published source)."),
        click.option("--max-deploy-speed", "max_deploy_speed", multiple=True, metavar="KIND=SPEED",
                     help=f"Highest opening speed of a device kind, e.g. drogue=40m/s (defaults: {_DEPLOY_LIMITS}: "
                          "common practice, no published source)."),
        click.option("--field-radius", "field_radius", type=_Quantity("length", minimum=0.0, strict=True), default=None,
                     help="Fail motors whose estimated landing point lies farther from the pad, e.g. 600m."),
        click.option("--allow-smaller-motors", is_flag=True,
                     help="Narrower motors fit with an adapter, up to --adapter-steps standard sizes down."),
        click.option("--adapter-steps", type=click.IntRange(1, 9), default=2, show_default=True,
                     help="Most standard motor sizes an adapter steps down (2: 24 or 18 mm in a 29 mm mount)."),
        click.option("--tag", help="Only motors with this catalog tag (e.g. the ones in stock)."),
        click.option("--top", type=click.IntRange(1),
                     help=f"Show only the first N candidates in the table (the ranking's: {_TABLE_ROWS} unless "
                          "told; --robust's: every one unless told; --json and --csv list every one)."),
        click.option("--show-rejected", is_flag=True, help="Also list the motors that do not fit."),
        click.option("--ballast", is_flag=True,
                     help="Solve the nose weight that brings every motor too strong for the target or the ceiling "
                          "down to the target, and re-check every rule with it."),
        click.option("--min-stability", "min_stability_cal", type=_Finite(0.0, 10.0), default=None,
                     help="Least stability margin in calibers over the powered flight, when the airframe has a "
                          "[geometry] (default 1: common practice, no published source)."),
        _units_option,
        click.option("--json", "as_json", is_flag=True,
                     help="Print {airframe, conditions, candidates} as JSON (SI) on standard output ('--json -' "
                          "says the same; it takes no file name: save it with '--json > FILE')."),
        click.option("--csv", "as_csv", is_flag=True,
                     help="Print the candidates as CSV on standard output, in the display units (named in each "
                          "column header); '--csv -' says the same; it takes no file name: save it with "
                          "'--csv > FILE'."),
        click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
                     help="Write apogee per motor against the target and ceiling to this PNG file."),
        click.option("--report", "report_path", type=click.Path(dir_okay=False),
                     help="Write a printable ranking report (one self-contained HTML file, at most two pages)."),
        click.option("--overwrite", is_flag=True, help="Replace the --plot and --report files if they exist."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def _run_match(airframe_file: str, cat: Any, opts: dict[str, Any]) -> None:
    from ..files.airframe_toml import load_airframe
    from ..catalog import CatalogFilter
    from ..matching.rank import rank

    units = display_units(opts.get("units"))
    frame = apply_field_day(load_airframe(airframe_file), opts.get("_field_day") or {})
    _check_outputs({"--plot": opts["plot_path"], "--report": opts.get("report_path")}, opts["overwrite"], [airframe_file])
    if opts.get("report_path"):
        from .output import _write_report

        _write_report(None, opts["report_path"], opts["overwrite"], [airframe_file], check_only=True)
    settings = match_settings(opts)
    rows = cat.rows(CatalogFilter(tag=opts["tag"]), findings=False)  # the ranking never reads them
    if not rows:
        raise click.UsageError(f"no motors in {cat.root}" + (f" with tag {opts['tag']!r}" if opts["tag"] else ""))
    result = rank(frame, rows, cat.motor_pack, settings)
    conditions = {**result.conditions, "catalog": str(cat.root), "caution": _EPILOG}
    written = []
    if opts["plot_path"]:
        from ..present.plots import match_plot

        written.append(match_plot(result, opts["plot_path"], units))
    if opts.get("report_path"):
        from .fly import _command_line
        from .output import _write_report
        from ..present.report_content import match_report

        report = match_report(result, inputs=[airframe_file], command=_command_line(), catalog=str(cat.root),
                              units=_card_units(units), frame=frame)
        written.append(_write_report(report, opts["report_path"], opts["overwrite"], [airframe_file]))
    if opts["as_json"]:
        from ..matching.candidate import Candidate

        _echo_json({"airframe": result.airframe, "conditions": conditions,
                    "candidates": Candidate.json_dicts(result.candidates)})
        return
    if opts["as_csv"]:
        from ..present.csvout import candidates_csv

        click.echo(candidates_csv(result.candidates, result.conditions, units), nl=False)
        click.echo(f"Caution: {_EPILOG}", err=True)  # beside the data, never inside it
        return
    from ..present import tables as render

    console = _console()
    top = _TABLE_ROWS if opts["top"] is None else opts["top"]
    console.print(render.match_table(result, units, top, opts["show_rejected"], opts["ballast"], console.width))
    console.print(render.match_legend(result, top, opts["show_rejected"]))
    console.print(render.match_reasons(result, units, top, opts["show_rejected"]), end="")
    fits = [c.fits for c in result.candidates]
    rejected = fits.count(False)
    if rejected and not opts["show_rejected"]:
        console.print(f"{rejected} motor(s) do not fit the mount or the class limit (--show-rejected lists them).")
    listed = len(fits) if opts["show_rejected"] else len(fits) - rejected
    if listed > top:
        # the motors that do not fit come after the ranked ones: counted apart, never called ranked
        below_rejected = rejected - fits[:top].count(False) if opts["show_rejected"] else 0
        below_ranked = listed - top - below_rejected
        what = f"{below_ranked} more ranked motor(s)" + (f" and {below_rejected} that do not fit" if below_rejected else "")
        console.print(f"{what} below #{top} are not shown (--top N shows more); --json lists every one.")
    console.print(render.conditions_text(result, units, frame))
    console.print(f"Catalog: {render.escape(str(cat.root))}")
    for path in written:
        console.print(f"Wrote {render.escape(str(path))}")
    console.print(f"[bold yellow]Caution:[/bold yellow] {_EPILOG}")



def match_settings(opts: dict[str, Any]) -> Any:
    """The :class:`MatchSettings` the match options ask for (options left out keep the library's defaults)."""
    from dataclasses import replace

    from ..matching.rank import MatchSettings

    given = {"min_liftoff_thrust_to_weight": opts["min_thrust_to_weight"], "min_rail_exit_speed_m_s": opts["min_rail_exit"],
             "max_delay_error_s": opts["delay_slack"]}
    rules: dict[str, Any] = {name: float(value) for name, value in given.items() if value is not None}
    rules.update(recovery_rules(opts.get("max_landing_speed"), opts.get("max_deploy_speed") or (),
                                opts.get("field_radius")))
    extra: dict[str, Any] = {}
    tolerance = opts.get("target_tolerance")
    if tolerance is not None:
        kind, value = tolerance
        if not opts["target_m"]:
            raise click.UsageError("--target-tolerance needs --target (the altitude it is a tolerance of)")
        if kind == "length" and not value < opts["target_m"]:
            shown = display_units(opts.get("units"))  # a length given on the command line is echoed as typed
            raise click.UsageError(f"--target-tolerance {shown.given(value, 'length')} is not below the "
                                   f"{shown.given(opts['target_m'], 'length')} target; {_Tolerance._WANT} below it")
        extra["target_tolerance"] = value / opts["target_m"] if kind == "length" else value
    if opts.get("min_stability_cal") is not None:
        extra["min_stability_cal"] = opts["min_stability_cal"]
    try:
        return MatchSettings(target_m=opts["target_m"], ceiling_m=opts["ceiling_m"], max_class=opts["max_class"],
                             rules=replace(_RULES, **rules), allow_smaller_motors=opts["allow_smaller_motors"],
                             adapter_steps=opts.get("adapter_steps", 2), ballast=opts.get("ballast", False), **extra)
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None

@click.command(cls=_Command)
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@_catalog_option
@_match_options
@field_day_options
@robust_options
def match(airframe_file: str, catalog_dir: str | None, **opts: Any) -> None:
    """Rank every motor in the catalog for AIRFRAME_FILE by apogee, rail exit speed and delay.

    Motors that fit the mount (and the class limit) are flown together; each
    gets its apogee, rail exit speed, liftoff thrust-to-weight, optimal delay,
    the closest available delay, the speed through the air at which the
    recovery device opens with it ('opens'; without a device listed, the
    speed over the ground when the delay fires, 'eject'), and the reasons it
    fails any rule. With a [geometry] in the airframe file a motor
    that leaves less than --min-stability fails, with the nose weight that
    restores the margin flown again. With --target the ranking is by closeness
    to it; otherwise by apogee under the ceiling. Good choices come first:
    'pass' (every rule, within --target-tolerance of the target), then
    'pass with ballast' (with --ballast), then 'off target' (safe, but
    misses the target), then 'fail' and the motors that cannot fly.
    Without --catalog (or $MOTORLIB_CATALOG) the user catalog is used when it
    exists, else the bundled sample curves. The exit status is 0 whether or
    not a motor passes (a ranking, not a check: read the verdicts); 2 for
    unusable input.

    \b
    Example:
      motorlib match sample_curves/airframes/quibble-41.toml --target 400 \\
          --ceiling 600
      motorlib match my-rocket.toml --target 1300ft --max-class G --ballast \\
          --allow-smaller-motors --units imperial
      motorlib match my-rocket.toml --target 300 --ceiling 450 \\
          --report motors.html
      motorlib match my-rocket.toml --robust --altitude-window 240m..260m \\
          --duration-window 41s..44s
      motorlib match my-rocket.toml --target 900 --wind 8m/s --wind-from 300deg \\
          --field-radius 600m
    """
    robust = pop_robust(opts)
    opts["_field_day"] = pop_field_day(opts)
    if robust["robust"]:
        run_robust(airframe_file, _open_catalog(_catalog_or_samples(catalog_dir)), opts, robust)
        return
    _run_match(airframe_file, _open_catalog(_catalog_or_samples(catalog_dir)), opts)


def recovery_rules(max_landing: float | None, deploy: tuple[str, ...], field_radius: float | None) -> dict[str, Any]:
    """The :class:`~motorlib.flight.rules.LaunchRules` fields that the recovery options set."""
    from ..flight.airframe import RECOVERY_DEVICES
    from ..units import parse_quantity

    rules: dict[str, Any] = {}
    if max_landing is not None:
        rules["max_landing_speed_m_s"] = float(max_landing)
    if field_radius is not None:
        rules["field_radius_m"] = float(field_radius)
    if deploy:
        limits = dict(_RULES.max_deployment_speed_m_s)
        for text in deploy:
            kind, _, speed = text.partition("=")
            if kind.strip() not in RECOVERY_DEVICES or not speed:
                raise click.UsageError(f"--max-deploy-speed {text!r}: expected KIND=SPEED with KIND one of "
                                       f"{', '.join(k for k in RECOVERY_DEVICES if k != 'none')}, e.g. drogue=40m/s")
            try:
                limits[kind.strip()] = float(parse_quantity(speed, "speed", field="--max-deploy-speed"))
                if not limits[kind.strip()] > 0.0:
                    raise ValueError("the speed must be above 0")
            except ValueError as exc:
                raise click.UsageError(f"--max-deploy-speed {text!r}: {getattr(exc, 'problem', exc)}") from None
        rules["max_deployment_speed_m_s"] = tuple(limits.items())
    return rules
