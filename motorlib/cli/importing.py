"""``motorlib import``: convert a CSV thrust curve plus metadata into a motor-record XML file."""

from __future__ import annotations

from typing import Any

import click

from .group import _Command, _InputError
from .options import _metadata_for, _metadata_options
from .output import STDOUT_HELP, STDOUT_PATH, _OVERWRITE_HINT, _check_outputs, _report_console, _write_output


@click.command("import", cls=_Command)
@click.argument("csv_file", type=click.Path(exists=True, dir_okay=False))
@click.option("-o", "--output", required=True, type=click.Path(dir_okay=False),
              help=f"Motor-record XML file to write (atomically); {STDOUT_HELP}.")
@click.option("--overwrite", is_flag=True, help="Replace OUTPUT if it exists.")
@click.option("--force", is_flag=True, help="Write the file even when the checks find errors.")
@_metadata_options
def import_curve(csv_file: str, output: str, overwrite: bool, force: bool, **opts: Any) -> None:
    """Convert a CSV thrust curve plus metadata into a motor-record XML file.

    The CSV holds time and thrust columns; units come from the header
    (time_ms, "t (s)", thrust_lbf, "Thrust [N]") or --time-unit/--thrust-unit.
    The curve is checked first; a curve with errors is not written unless --force.

    \b
    Example:
      motorlib import stand-03.csv -o F30-6.xml --designation F30-6 \\
          --maker "Our team" --diameter 24mm --length 70mm --total-mass 48g \\
          --propellant-mass 22g --delays 4,6,8 --source-kind own-firing \\
          --test-date 2026-11-14
    """
    from ..present import tables as render
    from ..motor.checks import check_record, findings_from_problems
    from ..files.motor_csv import record_from_csv
    from ..files.curvefiles import CheckReport
    from ..errors import CurveDataError
    from ..files.motor_xml import readable_record_bytes

    console = _report_console(output)  # standard error when the record has standard output (-o -)
    _check_outputs({"--output": output}, overwrite, [csv_file, opts.get("meta_file")])
    try:
        meta = _metadata_for(opts, [csv_file])
        record = record_from_csv(csv_file, meta(csv_file) if callable(meta) else meta, time_unit=opts["time_unit"],
                                 thrust_unit=opts["thrust_unit"])
    except CurveDataError as exc:
        report = CheckReport(csv_file, True, None, tuple(findings_from_problems(exc)), None)
        console.print(render.findings_text(report), end="")
        raise click.ClickException(f"{csv_file}: the curve breaks the record rules above; nothing was written")
    findings = check_record(record)
    report = CheckReport(csv_file, True, record, tuple(findings), None)
    if findings:
        console.print(render.findings_text(report), end="")
    if not report.ok and not force:
        raise click.ClickException(f"{csv_file}: the checks found errors; nothing was written (use --force to "
                                   "write it anyway)")
    try:
        shown = "standard output" if output == STDOUT_PATH else output
        path = _write_output(output, readable_record_bytes(record, shown), overwrite)
    except FileExistsError as exc:
        raise _InputError(f"{exc}; {_OVERWRITE_HINT}") from exc
    console.print(f"Wrote {render.escape(str(path or 'standard output'))}: {record.designation}, "
                  f"{render.impulse_text(record.total_impulse_ns)} N·s, "
                  f"{record.computed_designation()}")
