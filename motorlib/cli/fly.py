"""``motorlib fly``: one flight of an airframe with one motor."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Mapping

import click

from .options import (_Finite, _Quantity, _units_option, apply_field_day, display_units, load_motor, motor_options,
                      field_day_options, pop_field_day)
from .group import _Command
from .output import STDOUT_HELP, _EPILOG, _card_units, _caution, _check_outputs, _echo_json, _report_console

if TYPE_CHECKING:  # annotations only: the CLI imports the library inside each command, for a fast start
    from pathlib import Path

    import numpy as np

    from ..flight.airframe import Airframe
    from ..flight.results import FlightResults
    from ..motor.record import MotorRecord
    from ..present.display import DisplayUnits


@click.command(cls=_Command)
@click.argument("airframe_file", type=click.Path(exists=True, dir_okay=False))
@motor_options()
@click.option("--delay", "delay_s", type=_Quantity("time", minimum=0.0),
              help="Ejection delay to use, e.g. 6s; a bare number is s (default: the listed delay closest to the "
                   "optimal one).")
@click.option("--ballast", "ballast_kg", type=_Quantity("mass", bare=False, example="25g", minimum=0.0), default=None,
              help="Mass added to the airframe, with a unit (e.g. 25g, 1.2oz); counted at half the nose length "
                   "for the stability margin.")
@click.option("--min-stability", "min_stability_cal", type=_Finite(0.0, 10.0), default=None,
              help="Warn below this stability margin in calibers when the airframe has a [geometry] (default 1: "
                   "common practice, no published source).")
@_units_option
@click.option("--json", "as_json", is_flag=True, help="Print the results as JSON (SI units).")
@click.option("--csv", "csv_path", type=click.Path(dir_okay=False),
              help="Write the trajectory to this CSV file, in the display units (named in each column header); "
                   "its 'phase' column reads ascent (up to apogee), freefall (falling, no recovery device open) "
                   f"or descent (under a device); {STDOUT_HELP}.")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False),
              help="Write the flight chart (altitude by phase with its events, beside the side view with the wind) "
                   "to this PNG file.")
@click.option("--report", "report_path", type=click.Path(dir_okay=False),
              help="Write a printable pre-flight report (one self-contained HTML file, at most two pages).")
@click.option("--overwrite", is_flag=True, help="Replace the --csv, --plot and --report files if they exist.")
@click.option("--field-radius", "field_radius", type=_Quantity("length", minimum=0.0, strict=True), default=None,
              help="Warn when the rocket lands farther from the pad than this, e.g. 600m.")
@click.option("--ceiling", "ceiling_m", type=_Quantity("length", minimum=0.0, strict=True), default=None,
              help="Warn when the apogee is above this altitude (the field's limit), e.g. 600m or 2000ft; a bare "
                   "number is m.")
@field_day_options
def fly(airframe_file: str, motor_ref: str, catalog_dir: str | None, delay_s: float | None, ballast_kg: float | None,
        min_stability_cal: float | None, units: str | None, as_json: bool, csv_path: str | None,
        plot_path: str | None, report_path: str | None, overwrite: bool, field_radius: float | None,
        ceiling_m: float | None, **day: Any) -> None:
    """Simulate one flight of AIRFRAME_FILE (TOML) with one motor.

    Prints rail exit speed, apogee, optimal delay, the ejection altitude and
    speed at each delay, and descent figures when the airframe has recovery,
    with warnings from the launch rules of thumb that match applies too. Times count from motor ignition.
    With a [geometry] in the airframe file it also gives the stability margin
    at liftoff, rail exit and burnout, and, when the file gives no Cd, flies
    the drag estimated from the shape.
    Exits with status 1 when the flight fails or breaks a launch rule (the
    figures and warnings are printed first).

    \b
    Example:
      motorlib fly sample_curves/airframes/quibble-41.toml --motor F29-8 \\
          --plot f29.png
      motorlib fly my-rocket.toml --motor static-3.xml --delay 8s --units imperial
      motorlib fly my-rocket.toml --motor G59-10 --ballast 25g --csv g59.csv
      motorlib fly my-rocket.toml --motor G59-10 --report preflight.html
      motorlib fly sample_curves/airframes/quibble-41.toml --motor G59-10 \\
          --min-stability 1.5 --json
      motorlib fly my-rocket.toml --motor G59-10 --wind 7m/s --wind-from 250deg \\
          --temperature 31degC --rail-azimuth 250deg
    """
    import numpy as np

    from ..files.airframe_toml import load_airframe
    from ..flight.integrate import simulate
    from ..flight.results import dense_trajectory
    from ..flight.delays import offered_delays_s
    from ..flight.rulebook import device_rule_entries, flown_rule_inputs
    from ..flight.rules import LaunchRules, broken_rule_codes

    shown = display_units(units)
    delay_s = None if delay_s is None else float(delay_s)
    frame = apply_field_day(load_airframe(airframe_file), pop_field_day(day))
    motor, motor_file, label_delay = load_motor(motor_ref, catalog_dir, delay_s)
    lead = frame.recovery_devices[0] if frame.recovery_devices else None
    if delay_s is None and label_delay is not None and (lead is None or lead.deploy == "ejection"):
        delay_s = label_delay  # the label's delay (E9-6), as --delay 6 gives it
    if delay_s is not None and lead is not None and lead.deploy != "ejection":
        raise click.UsageError(f"--delay {delay_s:g}: the airframe file opens its {lead.device} by electronics "
                               f"(deploy = \"{lead.deploy}\"), so the motor's delay opens nothing; leave out --delay")
    _check_outputs({"--csv": csv_path, "--plot": plot_path, "--report": report_path}, overwrite, [airframe_file, motor_file],
                   printing="--json" if as_json else None)
    if report_path:
        from .output import _write_report

        _write_report(None, report_path, overwrite, [airframe_file] + ([motor_file] if motor_file else []),
                      check_only=True)
    wanted = None if delay_s is None else np.array([delay_s])
    results = simulate(frame, [motor], added_mass_kg=ballast_kg or 0.0, deploy_delay_s=wanted,
                       trajectories=bool(csv_path or plot_path or report_path))
    summary = results.summary(0, motor.delays_s, delay_s)
    summary["has_recovery"] = frame.recovery is not None and frame.recovery.device != "none"
    rules = LaunchRules(field_radius_m=None if field_radius is None else float(field_radius))
    inputs = flown_rule_inputs(frame, results, chosen_delay_s=np.array([summary["chosen_delay_s"]], dtype=float),
                               delays_known=motor.ejection != "unknown",
                               offered_delays_s=np.array([offered_delays_s(motor.delays_s, motor.delay_adjustable)
                                                          or [np.nan]], dtype=float),
                               delay_adjustable=motor.delay_adjustable)
    entries = device_rule_entries(inputs, rules, ceiling_m=ceiling_m)[0]
    warnings = [(code, message) for _, code, message, _ in entries]
    from ..present.flightcard import opened_device_positions

    # the device each warning is about, as its place among the devices that opened (the card's recovery events)
    devices = opened_device_positions([k for *_, k in entries], np.isfinite(results.deployment_time_s[0]).tolist())
    warnings += _stability_and_drag(frame, motor, results, summary, ballast_kg or 0.0, min_stability_cal)
    from ..matching.rank import mount_problems

    warnings += [("motor-does-not-fit", f"{motor.designation} {text}: flown as asked, but it cannot go in this mount")
                 for text in mount_problems(frame, motor)]
    if not as_json:  # the JSON keeps the library's SI text; people read the figures in their display units
        from ..present.messages import reason_text

        limits = {**rules.conditions(frame.launch.surface_wind_m_s), "ceiling_m": ceiling_m}
        warnings = [(code, reason_text(code, message, summary, limits, shown)) for code, message in warnings]
    written = []
    if csv_path:
        written.append(_write_trajectory_csv(results.trajectories[0], csv_path, shown, overwrite))
    # the chart and the report draw the path between the steps too (the CSV keeps the flown steps)
    drawn = dense_trajectory(results.trajectories[0]) if plot_path or report_path else None
    if plot_path:
        from ..present.plots import flight_plot

        written.append(flight_plot(drawn, {**summary, "wind_speed_m_s": frame.launch.wind_speed_m_s},
                                   f"{frame.name} with {motor.designation}", plot_path, shown))
    if report_path:
        from .output import _write_report
        from ..present.report_content import fly_report

        inputs = [airframe_file] + ([motor_file] if motor_file else [])
        report = fly_report(frame, motor, summary, warnings, drawn, inputs=inputs,
                            command=_command_line(), units=_card_units(shown),
                            warning_devices=devices + [None] * (len(warnings) - len(devices)),
                            ballast_kg=ballast_kg or 0.0, charge_deploys=lead is None or lead.deploy == "ejection")
        written.append(_write_report(report, report_path, overwrite, inputs))
    # status 1 when the flight fails or breaks a launch rule (README, "When something goes wrong"); notes do not count
    failed = summary["status"] != "ok" or bool(broken_rule_codes(code for code, _ in warnings))
    if as_json:
        payload = {"airframe": frame.name, "motor": motor.designation, "maker": motor.maker, **summary,
                   "warnings": [{"code": c, "message": m} for c, m in warnings], "caution": _EPILOG}
        _echo_json(payload)
        if failed:  # the figures are printed, and the exit status says the flight failed
            raise SystemExit(1)
        return
    from ..present import tables as render

    from ..present.flightcard import flight_card

    console = _report_console(csv_path)  # standard error when the CSV has standard output (--csv -)
    card = flight_card(summary, warnings, title=f"{frame.name} with {motor.designation} ({motor.maker or 'maker unknown'})",
                       units=_card_units(shown), wind_speed_m_s=frame.launch.surface_wind_m_s,
                       warning_devices=devices + [None] * (len(warnings) - len(devices)),
                       empty_mass_kg=frame.mass_kg, ballast_kg=ballast_kg or 0.0,
                       charge_deploys=lead is None or lead.deploy == "ejection")
    console.print(render.flight_card_table(card))
    for path in written:
        if path is not None:  # None: standard output
            console.print(f"Wrote {render.escape(str(path))}")
    _caution(console)
    if failed:
        raise SystemExit(1)


def _stability_and_drag(frame: Airframe, record: MotorRecord, results: FlightResults, summary: dict[str, Any], ballast_kg: float,
                        min_stability_cal: float | None) -> list[tuple[str, str]]:
    """Add ``stability``, ``drag_source`` and ``drag`` to ``summary``; return the stability warnings."""
    from ..flight.stability import MIN_STABILITY_CAL, flight_stability, stability_warnings
    from ..flight.summary import drag_summary

    required = MIN_STABILITY_CAL if min_stability_cal is None else min_stability_cal
    stability = flight_stability(frame, [record], results, added_mass_kg=ballast_kg)
    summary["stability"] = None if stability is None else stability.as_dict(0)
    summary["min_stability_cal"] = required
    summary["drag_source"] = frame.drag_source
    summary["drag"] = drag_summary(frame)
    if stability is None:
        return []
    return stability_warnings(summary["stability"]["min_margin_cal"], min_margin_cal=required)


def _command_line() -> str:
    """The command as typed (for the report's trace)."""
    import shlex
    import sys

    return "motorlib " + " ".join(shlex.quote(a) for a in sys.argv[1:])


def _write_trajectory_csv(trajectory: Mapping[str, np.ndarray], path: str, units: DisplayUnits,
                          overwrite: bool) -> Path | None:
    from ..present.csvout import trajectory_csv
    from .output import _write_output

    return _write_output(path, trajectory_csv(trajectory, units).encode(), overwrite)
