"""``motorlib catalog``: the catalog group (add, list, show, tag, untag, remove, export, verify, reindex)."""

from __future__ import annotations

import sys
from pathlib import Path
from contextlib import contextmanager
from typing import Any, Callable, Iterator

import click

from ..errors import QuantityError
from .group import _Group
from .options import (_catalog_option, _metadata_for, _metadata_options, _open_catalog, _Quantity,
                      _units_option, display_units, resolve_motor, skip_text)
from .output import _check_outputs, _console, _err_console, _echo_json


@click.group(cls=_Group)
def catalog() -> None:
    """Keep a local catalog of checked thrust curves: add, list, show, tag, export.

    Every command uses your user catalog unless --catalog names another folder
    (the last example keeps a catalog in ./motors).

    \b
    Example:
      motorlib catalog add sample_curves/
      motorlib catalog list --class D..G --diameter 29mm
      motorlib catalog show G59-10
      motorlib catalog add --catalog ./motors sample_curves/
    """


def _range(text: str | None, kind: str, default_unit: str, name: str) -> tuple[float | None, float | None]:
    if not text:
        return (None, None)
    from ..units import parse_quantity

    low, _, high = text.partition("..")
    try:
        lo = parse_quantity(low, kind, field=name, default_unit=default_unit) if low.strip() else None
        hi = parse_quantity(high, kind, field=name, default_unit=default_unit) if high.strip() else None
    except QuantityError as exc:
        raise click.BadParameter(exc.problem, param_hint=name) from None
    if not _ and hi is None:
        hi = lo
    return lo, hi


def _filter_options(func: Any) -> Any:
    options = [
        click.option("--class", "class_range", help="Impulse class or range, e.g. D or D..G."),
        click.option("--diameter", "diameter", type=_Quantity("length", bare=False, example="29mm"),
                     help="Motor diameter with a unit, e.g. 29mm."),
        click.option("--maker", help="Part of the maker's name."),
        click.option("--impulse", help="Total impulse range in N·s, e.g. 40..160 (either end may be left out)."),
        click.option("--burn", help="Burn time range in s, e.g. 1..3."),
        click.option("--delay", "delay_s", type=_Quantity("time"),
                     help="Only motors offering this ejection delay, e.g. 6s; a bare number is s."),
        click.option("--search", "text", help="Text to find in designation, maker, notes or handle."),
        click.option("--tag", help="Only motors with this tag."),
    ]
    for option in reversed(options):
        func = option(func)
    return func


def _filter(opts: dict[str, Any]) -> Any:
    from ..catalog import CatalogFilter, parse_class_range

    try:
        classes = parse_class_range(opts["class_range"]) if opts.get("class_range") else None
    except ValueError as exc:
        raise click.BadParameter(str(exc), param_hint="--class") from None
    return CatalogFilter(class_range=classes, diameter_m=opts.get("diameter"), maker=opts.get("maker"),
                         impulse_range_ns=_range(opts.get("impulse"), "impulse", "Ns", "--impulse"),
                         burn_range_s=_range(opts.get("burn"), "time", "s", "--burn"), delay_s=opts.get("delay_s"),
                         text=opts.get("text"), tag=opts.get("tag"))


@contextmanager
def _progress(what: str, total: int) -> Iterator[Callable[[int], None] | None]:
    """A progress bar on the terminal (stderr) for long work; None when not a terminal or for few items."""
    err = _err_console()
    if total <= 20 or not err.is_terminal:
        yield None
        return
    from rich.progress import Progress

    with Progress(console=err, transient=True) as progress:
        task = progress.add_task(what, total=total)
        yield lambda n: progress.advance(task, n)


@catalog.command("add")
@_catalog_option
@click.argument("paths", nargs=-1, required=True, type=click.Path(exists=True))
@click.option("--force", is_flag=True, help="Add curves even when the checks find errors (the file records them).")
@_metadata_options
def catalog_add(catalog_dir: str | None, paths: tuple[str, ...], force: bool, **opts: Any) -> None:
    """Check and add curve files (XML, or CSV with metadata options) or folders of them.

    Curves with errors are refused unless --force. Exact duplicates are not
    added again; curves with the same maker and designation as one already in
    the catalog are added and reported as near-duplicates.

    \b
    Example:
      motorlib catalog add stand-03.csv --designation F30-6 --maker "Our team" \\
          --diameter 24mm --length 70mm --total-mass 48g --propellant-mass 22g \\
          --delays 4,6,8 --source-kind own-firing
      motorlib catalog add stand.csv stand-03.csv --meta motors.toml
    """
    from collections import Counter

    from ..present import tables as render
    from ..files.curvefiles import find_curve_files

    cat = _open_catalog(catalog_dir, create=True)
    files = find_curve_files(list(paths))
    console = _console()
    kwargs = dict(metadata=_metadata_for(opts, files, report_unused=True), force=force, time_unit=opts["time_unit"], thrust_unit=opts["thrust_unit"])
    before = len(cat)
    try:
        with _progress("adding curves", len(files)) as advance:
            results = cat.add_files(files, progress=advance, **kwargs) if advance else cat.add_files(files, **kwargs)
    except KeyboardInterrupt:  # the batches written are whole and kept; the one under way was undone
        now = len(cat)
        _err_console().print(f"interrupted: {now - before} curve(s) added before the interruption are kept (the "
                             f"catalog holds {now}); run the same command again to add the rest (curves already "
                             "in are recognised and skipped)", markup=False, highlight=False)
        sys.exit(130)  # 128 + SIGINT, as a shell reports an interrupted command
    errors = [render.forced_errors(r) for r in results]  # what --force let in, per result
    forced = sum(map(bool, errors))
    listing = render.add_results_table(results)
    if listing is not None:
        console.print(listing)
    counts = Counter(r.status for r in results)
    # curves added with warnings (a label that cannot be checked against the curve, say): counted, never silent
    warned = sum(r.status == "added" and not forced_r and any(f.severity == "warning" for f in r.findings)
                 for r, forced_r in zip(results, errors))
    notes = [f"{forced} with errors, by --force"] if forced else []
    notes += [f"{warned} with warnings: `motorlib catalog verify` lists them"] if warned else []
    added = f"{counts['added']} added" + (f" ({'; '.join(notes)})" if notes else "")
    console.print(f"{len(results)} file(s): {added}, {counts['duplicate']} already present, "
                  f"{counts['refused']} refused, {counts['unreadable']} unreadable; the catalog now holds "
                  f"{len(cat)} motor(s) in {render.escape(str(cat.root))}")
    if counts["refused"] or counts["unreadable"]:
        sys.exit(1)


@catalog.command("list")
@_catalog_option
@_filter_options
@click.option("--sort", default="impulse", show_default=True,
              help="Column to sort by, as named in the table header: motor, maker, class, impulse, thrust, burn, "
                   "dia, length, mass, check (or a JSON key such as total_impulse_ns).")
@click.option("--desc", is_flag=True, help="Sort in descending order.")
@_units_option
@click.option("--json", "as_json", is_flag=True,
              help="Print JSON (SI units) on standard output ('--json -' says the same; it takes no file name: save "
                   "it with '--json > FILE').")
@click.option("--csv", "as_csv", is_flag=True,
              help="Print CSV on standard output, in the display units (named in each column header); '--csv -' says "
                   "the same; it takes no file name: save it with '--csv > FILE'.")
def catalog_list(catalog_dir: str | None, sort: str, desc: bool, units: str | None, as_json: bool, as_csv: bool,
                 **opts: Any) -> None:
    """List the motors in the catalog, filtered and sorted.

    \b
    Example:
      motorlib catalog list --class D..G --diameter 29mm --delay 6s --sort thrust
      motorlib catalog list --tag in-stock --json
    """
    from ..catalog.query import SORT_KEYS
    from ..present.tables import CATALOG_SORT

    key = CATALOG_SORT.get(sort.lower(), sort)
    if key not in SORT_KEYS:
        raise click.BadParameter(f"expected one of {', '.join(CATALOG_SORT)}", param_hint="--sort")
    shown = display_units(units)
    cat = _open_catalog(catalog_dir)
    rows = cat.rows(_filter(opts), sort=key, descending=desc)
    if as_json:
        _echo_json([row.as_dict() for row in rows])
    elif as_csv:
        from ..present.csvout import catalog_csv

        click.echo(catalog_csv(rows, shown), nl=False)
    else:
        from ..present import tables as render

        console = _console()
        console.print(render.long_catalog_table(rows, f"{len(rows)} of {len(cat)} motor(s) in {cat.root}", shown,
                                                console.width))


@catalog.command("show")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), help="Write the curve(s) to this PNG file.")
@click.option("--overwrite", is_flag=True, help="Replace the --plot file if it exists.")
@_units_option
def catalog_show(catalog_dir: str | None, refs: tuple[str, ...], plot_path: str | None, overwrite: bool,
                 units: str | None) -> None:
    """Show motors by id, handle or designation: metadata, provenance, metrics, findings and the curve.

    Several motors are also compared in one table, and --plot overlays their curves.

    \b
    Example:
      motorlib catalog show G59-10 F29-8 --plot compare.png
    """
    from ..present import tables as render
    from ..motor.checks import check_record, metrics
    from ..files.curvefiles import CheckReport

    shown = display_units(units)
    cat = _open_catalog(catalog_dir)
    ids = [resolve_motor(cat, ref) for ref in refs]
    rows = cat.rows(_ids(*ids)) if ids else []
    handles = {row.motor_id: row.handle for row in rows}
    _check_outputs({"--plot": plot_path}, overwrite,  # never over one of the curves shown
                   [cat.root / row.path for row in rows if row.path])
    console = _console()
    records = []
    for motor_id in ids:
        record = cat.get(motor_id)
        records.append((motor_id, record))
        report = CheckReport(f"{motor_id}  {handles[motor_id]}", True, record,
                             tuple(check_record(record, cat.settings)), metrics(record, cat.settings.burn_threshold))
        console.print(render.check_details(report, shown, record))
        console.print(f"  thrust |{render.sparkline(record.time_s, record.thrust_n, min(60, console.width - 24))}| "
                      f"{shown.precise(record.peak_thrust_n, 'force')} peak")
        console.print()
    if len(records) > 1:
        console.print(render.catalog_table(rows, "Comparison", shown, console.width))
    if plot_path:
        from ..present.plots import curves_plot

        path = curves_plot([r for _, r in records], plot_path, cat.settings.burn_threshold)
        console.print(f"Wrote {render.escape(str(path))}")


def _ids(*ids: str) -> Any:
    from ..catalog import CatalogFilter

    return CatalogFilter(ids=tuple(ids))


@catalog.command("tag")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.argument("name")
def catalog_tag(catalog_dir: str | None, refs: tuple[str, ...], name: str) -> None:
    """Tag motors, e.g. the ones in stock: catalog tag REF... NAME.

    \b
    Example:
      motorlib catalog tag G59-10 F29-8 in-stock
    """
    cat = _open_catalog(catalog_dir)
    ids = cat.tag([resolve_motor(cat, r) for r in refs], name)
    _console().print(f"Tagged {len(ids)} motor(s) {name!r}.")


@catalog.command("untag")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
@click.argument("name")
def catalog_untag(catalog_dir: str | None, refs: tuple[str, ...], name: str) -> None:
    """Remove a tag from motors: catalog untag REF... NAME.

    \b
    Example:
      motorlib catalog untag F29-8 in-stock
    """
    cat = _open_catalog(catalog_dir)
    ids = cat.untag([resolve_motor(cat, r) for r in refs], name)
    _console().print(f"Removed tag {name!r} from {len(ids)} motor(s).")


@catalog.command("remove")
@_catalog_option
@click.argument("refs", nargs=-1, required=True)
def catalog_remove(catalog_dir: str | None, refs: tuple[str, ...]) -> None:
    """Delete motors (their files, index rows and tags).

    \b
    Example:
      motorlib catalog remove bramblewick-propulsion-fictional/g59-10
    """
    cat = _open_catalog(catalog_dir)
    for ref in refs:
        _console().print(f"Removed {cat.remove(resolve_motor(cat, ref))}")


@catalog.command("export")
@_catalog_option
@click.argument("refs", nargs=-1)
@_filter_options
@click.option("--to", "folder", required=True, type=click.Path(file_okay=False),
              help="Folder to write into; with --format json (one file), '-' prints it on standard output (the "
                   "command's own report then goes to standard error).")
@click.option("--format", "fmt", type=click.Choice(["xml", "csv", "json"]), default="xml", show_default=True,
              help="xml: our format; csv: time_s,thrust_n per motor; json: one file with every motor.")
@click.option("--overwrite", is_flag=True, help="Replace files of the same names in the folder.")
def catalog_export(catalog_dir: str | None, refs: tuple[str, ...], folder: str, fmt: str, overwrite: bool,
                   **opts: Any) -> None:
    """Export motors (the REFs given, else those passing the filters) to a folder.

    \b
    Example:
      motorlib catalog export --class G --to ./g-motors --format csv
    """
    from ..catalog import CatalogFilter
    from ..files.export import export_json_bytes, export_records
    from .output import STDOUT_PATH, _write_output

    to_stdout = folder == STDOUT_PATH
    if to_stdout and fmt != "json":
        from .group import _InputError

        raise _InputError(f"--to -: --format {fmt} writes one file per motor, into a folder, and standard output is "
                          f"no folder; give a folder name (a folder named '-' is ./-), or use --format json, one "
                          f"document that '-' prints on standard output")
    cat = _open_catalog(catalog_dir)
    target, root = Path(folder).resolve(), Path(cat.root).resolve()
    if not to_stdout and (target == root or root in target.parents):
        from .group import _InputError

        raise _InputError(f"--to {folder}: is inside the catalog {cat.root}, whose curves would be added to it a "
                          "second time (or replaced); choose a folder outside it")
    ids = [resolve_motor(cat, r) for r in refs] if refs else [r.motor_id for r in cat.rows(_filter(opts))]
    rows = cat.rows(CatalogFilter(ids=tuple(ids))) if ids else []
    items = [(r.handle, cat.get(r.motor_id)) for r in rows]
    if to_stdout:
        with _progress("exporting curves", len(rows)) as advance:
            _write_output(STDOUT_PATH, export_json_bytes(items, progress=advance), overwrite)
        _err_console().print(f"Exported {len(rows)} motor(s) to standard output")
        return
    try:
        with _progress("exporting curves", len(rows)) as advance:
            written = export_records(items, folder, fmt, overwrite=overwrite, progress=advance)
    except FileExistsError as exc:
        from .group import _InputError

        raise _InputError(f"{exc}; choose another folder or use --overwrite to replace them") from None
    from rich.markup import escape

    _console().print(f"Exported {len(rows)} motor(s) to {len(written)} file(s) in {escape(folder)}")


@catalog.command("verify")
@_catalog_option
def catalog_verify(catalog_dir: str | None) -> None:
    """Re-read every curve file, re-run every check and report problems.

    Names every file skipped as unreadable, and re-reads files whose content
    no longer matches the index. Exit status 1 when a file is unreadable or a
    curve has errors.

    \b
    Example:
      motorlib catalog verify
    """
    from ..present import tables as render
    from ..files.curvefiles import check_file

    cat = _open_catalog(catalog_dir, report_skipped=False)  # listed below, on standard output, once
    stale = cat.stale_files()  # changed behind the index's back (same size and time): re-read now
    reports = [check_file(cat.root / str(row.path), cat.settings) for row in cat.rows()]
    console = _console()
    for path in stale:
        console.print(f"[yellow]index was stale[/yellow] {render.escape(path)}: the file changed without a new "
                      "size or modification time; re-read", soft_wrap=True)
    for where, problem in cat.problems:
        console.print(f"[red]skipped[/red] {render.escape(skip_text(where, problem))}", soft_wrap=True)
    bad = [r for r in reports if any(f.severity != "note" for f in r.findings)]
    for report in bad:
        console.print(f"[bold]{render.escape(report.source)}[/bold]")
        console.print(render.findings_text(report, include_notes=False), end="")
    for tag, ids in cat.orphan_tags().items():
        former = cat.former_motors(ids)
        listed = ", ".join(f"{i} (was {former[i]})" if i in former else i for i in ids)
        console.print(f"[yellow]tag {render.escape(repr(tag))} names {len(ids)} motor id(s) no longer in the "
                      f"catalog[/yellow]: {render.escape(listed)}", soft_wrap=True)
    n_errors = sum(not r.ok for r in reports)  # of the curves verified; the skipped files are counted apart
    console.print(f"{len(reports)} curve(s) verified: {n_errors} with errors, {len(cat.problems)} file(s) skipped.")
    if n_errors or cat.problems:
        sys.exit(1)


@catalog.command("reindex")
@_catalog_option
def catalog_reindex(catalog_dir: str | None) -> None:
    """Rebuild the catalog index from the curve files.

    \b
    Example:
      motorlib catalog reindex
    """
    cat = _open_catalog(catalog_dir)
    count = cat.reindex()
    _console().print(f"Re-read {count} file(s); the catalog holds {len(cat)} motor(s).")
