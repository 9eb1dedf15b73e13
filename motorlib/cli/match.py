"""``motorlib match``: rank every catalog motor for an airframe by apogee, rail exit speed and delay."""

from __future__ import annotations

from typing import Any

import click

from .options import _Finite, _catalog_option, _catalog_or_samples, _open_catalog, _Quantity, _units_option, display_units
from .output import _EPILOG, _card_units, _check_outputs, _console, _json_text
from .robust import pop_robust, robust_options, run_robust


def _match_options(func: Any) -> Any:
    options = [
        click.option("--target", "target_m", type=_Quantity("length"),
                     help="Aim altitude above the pad, e.g. 250m or 800ft; a bare number is m."),
        click.option("--ceiling", "ceiling_m", type=_Quantity("length"),
                     help="Never exceed this altitude (the field's limit), e.g. 600m or 2000ft; a bare number is m."),
        click.option("--max-class", type=click.Choice(["1/8A", "1/4A", "1/2A", *"ABCDEFGHIJKLMNO"]),
                     help="Highest impulse class you may fly (your certification)."),
        click.option("--min-rail-exit", "min_rail_exit", type=_Quantity("speed"), default=None,
                     help="Minimum rail exit speed, e.g. 15m/s or 50ft/s (default 15 m/s: common practice, "
                          "no published source)."),
        click.option("--min-thrust-to-weight", type=_Finite(min=0.0), default=5.0, show_default=True,
                     help="Minimum liftoff thrust-to-weight (common practice, no published source)."),
        click.option("--delay-slack", type=_Quantity("time"), default=None,
                     help="How far the chosen delay may be from the optimal one, e.g. 2s (default 2 s)."),
        click.option("--allow-smaller-motors", is_flag=True, help="Narrower motors fit with an adapter."),
        click.option("--tag", help="Only motors with this catalog tag (e.g. the ones in stock)."),
        click.option("--top", type=click.IntRange(1), help="Show only the first N candidates."),
        click.option("--show-rejected", is_flag=True, help="Also list the motors that do not fit."),
        click.option("--ballast", is_flag=True, help="Solve the nose weight that brings each passing motor to the target."),
        _units_option,
        click.option("--json", "as_json", is_flag=True, help="Print {airframe, conditions, candidates} as JSON (SI)."),
        click.option("--csv", "as_csv", is_flag=True,
                     help="Print the candidates as CSV, in the display units (named in each column header)."),
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
    frame = load_airframe(airframe_file)
    _check_outputs({"--plot": opts["plot_path"]}, opts["overwrite"], [airframe_file])
    if opts.get("report_path"):
        from .output import _write_report

        _write_report(None, opts["report_path"], opts["overwrite"], [airframe_file], check_only=True)
    settings = match_settings(opts)
    rows = cat.rows(CatalogFilter(tag=opts["tag"]))
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
                              units=_card_units(units))
        written.append(_write_report(report, opts["report_path"], opts["overwrite"], [airframe_file]))
    if opts["as_json"]:
        click.echo(_json_text({"airframe": result.airframe, "conditions": conditions, "candidates": result.candidates}))
        return
    if opts["as_csv"]:
        from ..present.csvout import rows_csv
        from ..present.messages import reason_text

        skip = ("reasons", "reason_codes", "ballast_reasons", "ballast_reason_codes")
        columns = [k for k in result.candidates[0] if k not in skip] + ["reasons"]
        rows = [{**c, "reasons": "; ".join(reason_text(code, text, c, result.conditions, units)
                                           for code, text in zip(c["reason_codes"], c["reasons"]))}
                for c in result.candidates]
        click.echo(rows_csv(rows, columns, units), nl=False)
        return
    from ..present import tables as render

    console = _console()
    console.print(render.match_table(result, units, opts["top"], opts["show_rejected"], opts["ballast"],
                                     console.width))
    console.print(render.match_legend(result, opts["top"], opts["show_rejected"]))
    console.print(render.match_reasons(result, units, opts["top"], opts["show_rejected"]), end="")
    rejected = sum(not c["fits"] for c in result.candidates)
    if rejected and not opts["show_rejected"]:
        console.print(f"{rejected} motor(s) do not fit the mount or the class limit (--show-rejected lists them).")
    console.print(render.conditions_text(result, units, frame))
    console.print(f"Catalog: {render.escape(str(cat.root))}")
    for path in written:
        console.print(f"Wrote {render.escape(str(path))}")
    console.print(f"[bold yellow]Caution:[/bold yellow] {_EPILOG}")



def match_settings(opts: dict[str, Any]) -> Any:
    """The :class:`MatchSettings` the match options ask for (options left out keep the library's defaults)."""
    from ..flight.rules import LaunchRules
    from ..matching.rank import MatchSettings

    rules = {"min_liftoff_thrust_to_weight": opts["min_thrust_to_weight"]}
    if opts["min_rail_exit"] is not None:
        rules["min_rail_exit_speed_m_s"] = opts["min_rail_exit"]
    slack = {} if opts["delay_slack"] is None else {"delay_slack_s": opts["delay_slack"]}
    try:
        return MatchSettings(target_m=opts["target_m"], ceiling_m=opts["ceiling_m"], max_class=opts["max_class"],
                             rules=LaunchRules(**rules), allow_smaller_motors=opts["allow_smaller_motors"],
                             ballast=opts.get("ballast", False), **slack)
    except ValueError as exc:
        raise click.UsageError(str(exc).replace("`", "")) from None

@click.command()
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@_catalog_option
@_match_options
@robust_options
def match(airframe_file: str, catalog_dir: str | None, **opts: Any) -> None:
    """Rank every motor in the catalog for AIRFRAME_FILE by apogee, rail exit speed and delay.

    Motors that fit the mount (and the class limit) are flown together; each
    gets its apogee, rail exit speed, liftoff thrust-to-weight, optimal delay,
    the closest available delay and the ejection speed with it, and the
    reasons it fails any rule. With --target the ranking is by closeness to
    it; otherwise by apogee under the ceiling. Passing motors come first.
    Without --catalog (or $MOTORLIB_CATALOG) the user catalog is used when it
    exists, else the bundled sample curves.

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
    """
    robust = pop_robust(opts)
    if robust["robust"]:
        run_robust(airframe_file, _open_catalog(_catalog_or_samples(catalog_dir)), opts, robust)
        return
    _run_match(airframe_file, _open_catalog(_catalog_or_samples(catalog_dir)), opts)
