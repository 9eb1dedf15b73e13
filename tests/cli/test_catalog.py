"""``motorlib catalog`` through click's CliRunner: every subcommand end to end, the environment."""

from __future__ import annotations

import json
from pathlib import Path

from click.testing import CliRunner

from motorlib import read_record
from motorlib.cli.main import main

from ..conftest import FIXTURE_DIR, SAMPLE_DIR
from .conftest import run


def test_catalog_commands_end_to_end(tmp_path: Path) -> None:
    cat = str(tmp_path / "motors")
    code, out = run("catalog", "add", "--catalog", cat, str(SAMPLE_DIR))
    assert code == 0 and "27 added" in out
    # a test-stand CSV, then finding it again (the README tour)
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "sound_d12.csv"), "--designation", "D12-5",
                    "--maker", "Stand team (fictional)", "--diameter", "24mm", "--length", "70mm", "--total-mass", "44g",
                    "--propellant-mass", "21g", "--delays", "5", "--source-kind", "own-firing")
    assert code == 0 and "1 added" in out
    code, out = run("catalog", "list", "--catalog", cat, "--maker", "stand", "--json")
    rows = json.loads(out)
    assert code == 0 and [r["designation"] for r in rows] == ["D12-5"] and rows[0]["provenance_kind"] == "own-firing"
    code, out = run("catalog", "list", "--catalog", cat, "--class", "D..G", "--diameter", "29mm")
    assert code == 0 and "G59-10" in out and "F29-8" not in out
    code, out = run("catalog", "list", "--catalog", cat, "--impulse", "100..", "--burn", "..2", "--csv")
    lines = out.strip().splitlines()
    assert code == 0 and lines[0].startswith("motor_id,") and len(lines) == 4  # G59-10, G99-14, 235H157-14
    code, out = run("catalog", "tag", "--catalog", cat, "G59-10", "F51-10", "in-stock")
    assert code == 0
    code, out = run("catalog", "list", "--catalog", cat, "--tag", "in-stock", "--json")
    assert sorted(r["designation"] for r in json.loads(out)) == ["F51-10", "G59-10"]
    plot = tmp_path / "cmp.png"
    code, out = run("catalog", "show", "--catalog", cat, "G59-10", "F51-10", "--plot", str(plot))
    assert code == 0 and "Comparison" in out and plot.exists()
    for fmt in ("xml", "csv", "json"):
        code, out = run("catalog", "export", "--catalog", cat, "--tag", "in-stock", "--to", str(tmp_path / fmt),
                        "--format", fmt)
        assert code == 0 and "Exported 2 motor(s)" in out
    assert read_record(next((tmp_path / "xml").glob("*g59*.xml"))).designation == "G59-10"
    code, out = run("catalog", "verify", "--catalog", cat)
    assert code == 0 and "28 curve(s) verified: 0 with errors" in out
    code, out = run("catalog", "reindex", "--catalog", cat)
    assert code == 0 and "28 motor(s)" in out
    code, out = run("catalog", "remove", "--catalog", cat, "G59-10")
    assert code == 0
    code, out = run("catalog", "show", "--catalog", cat, "G59-10")
    assert code == 2 and "no motor with that id" in out
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "class_mismatch.xml"))
    assert code == 1 and "refused" in out


def test_catalog_from_the_environment(tmp_path: Path) -> None:
    result = CliRunner().invoke(main, ["catalog", "add", str(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml")],
                                env={"MOTORLIB_CATALOG": str(tmp_path / "env-cat")})
    assert result.exit_code == 0 and (tmp_path / "env-cat").is_dir()


def _delay_cell(out: str, designation: str) -> str:
    line = next(row for row in out.splitlines() if designation in row)
    return line.split()[-2]  # the column before the check verdict


def test_a_csv_added_without_delays_shows_unknown_not_plugged(tmp_path: Path) -> None:
    # Issue 14: a CSV added without --delays showed as plugged.
    cat = str(tmp_path / "motors")
    common = ["--diameter", "24mm", "--length", "70mm", "--total-mass", "44g", "--propellant-mass", "21g"]
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "sound_d12.csv"), "--designation", "D12",
                    "--maker", "Unknown delays (fictional)", *common)
    assert code == 0, out
    code, out = run("catalog", "add", "--catalog", cat, str(FIXTURE_DIR / "sound_d12.csv"), "--designation", "D12-P",
                    "--maker", "Plugged (fictional)", *common, "--plugged")
    assert code == 0, out
    code, out = run("catalog", "list", "--catalog", cat, "--json")
    ejection = {r["designation"]: r["ejection"] for r in json.loads(out)}
    assert ejection == {"D12": "unknown", "D12-P": "no-charge"}
    code, out = run("catalog", "list", "--catalog", cat)
    assert code == 0
    assert _delay_cell(out, "D12 ") == "?" and _delay_cell(out, "D12-P") == "P"
    code, out = run("check", str(FIXTURE_DIR / "sound_d12.csv"), "--designation", "D12")
    assert "unknown (not given)" in out and "plugged" not in out


def test_a_forced_add_names_the_errors_it_accepted(tmp_path: Path) -> None:
    # `catalog add --force` printed only "1 added": the errors it let in were seen nowhere until a ranking
    text = (SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml").read_text(encoding="utf-8")
    relabelled = tmp_path / "h29-8.xml"
    relabelled.write_text(text.replace("<designation>F29-8<", "<designation>H29-8<"), encoding="utf-8")
    code, out = run("catalog", "add", "--catalog", str(tmp_path / "cat"), "--force", str(relabelled))
    assert code == 0
    flat = " ".join(out.split())
    assert "h29-8.xml" in flat and "forced" in flat and "class-mismatch" in flat
    assert "1 added (1 with errors, by --force)" in flat


def test_an_interrupted_add_says_what_it_kept(tmp_path: Path, monkeypatch) -> None:
    # Ctrl-C during `catalog add` printed only "Aborted!": the batches already written are safe, and the
    # command now says how many curves it kept and that running it again adds the rest.
    from motorlib.catalog import store

    monkeypatch.setattr(store, "BATCH_SIZE", 4)
    real_add = store.Catalog._add_locked
    calls = []

    def interrupted(self, *args, **kwargs):
        calls.append(1)
        if len(calls) == 7:  # in the second batch of four
            raise KeyboardInterrupt
        return real_add(self, *args, **kwargs)

    monkeypatch.setattr(store.Catalog, "_add_locked", interrupted)
    result = CliRunner().invoke(main, ["catalog", "add", "--catalog", str(tmp_path / "cat"), str(SAMPLE_DIR)])
    assert result.exit_code == 130
    flat = " ".join(result.output.split())
    assert "interrupted: 4 curve(s) added before the interruption are kept" in flat
    assert "run the same command again" in flat


def test_adding_a_folder_again_does_not_list_every_duplicate(tmp_path: Path) -> None:
    # Re-adding 3,000 curves printed 2,859 'duplicate' rows (6,148 lines); the summary line counts them. A few
    # duplicates are still listed by name (which file is the twin of which), many are counted only.
    cat = str(tmp_path / "cat")
    assert run("catalog", "add", "--catalog", cat, str(SAMPLE_DIR))[0] == 0
    n_curves = len(list(SAMPLE_DIR.glob("*.xml")))
    assert n_curves > 10  # more than the listing keeps
    code, out = run("catalog", "add", "--catalog", cat, str(SAMPLE_DIR))
    assert code == 0
    flat = " ".join(out.split())
    assert f"{n_curves} already present" in flat
    assert flat.count("duplicate") <= 1 and len(out.splitlines()) < 10
    one = next(SAMPLE_DIR.glob("*.xml"))
    code, out = run("catalog", "add", "--catalog", cat, str(one))
    assert "duplicate" in out and "already in the catalog as" in " ".join(out.split())


def test_export_and_plot_never_land_in_the_catalog(tmp_path: Path) -> None:
    # an export into the catalog's own folder would add every curve to it a second time (and, with --overwrite,
    # could replace its files); a plot over one of its curves would destroy it: both refused, nothing written
    cat = tmp_path / "motors"
    assert run("catalog", "add", "--catalog", str(cat), str(SAMPLE_DIR))[0] == 0
    before = sorted(p.name for p in cat.rglob("*") if p.is_file())
    for folder in (cat, cat / "sub"):
        code, out = run("catalog", "export", "--catalog", str(cat), "--to", str(folder), "--format", "xml",
                        "--overwrite")
        assert code == 2 and "inside the catalog" in out, out
    curve = next(cat.rglob("*g59-10*.xml"))
    text = curve.read_bytes()
    code, out = run("catalog", "show", "--catalog", str(cat), "G59-10", "--plot", str(curve), "--overwrite")
    assert code == 2 and "is an input of this command" in out, out
    assert curve.read_bytes() == text
    assert sorted(p.name for p in cat.rglob("*") if p.is_file()) == before


def test_a_folder_where_the_index_belongs_is_an_error_naming_it(tmp_path: Path) -> None:
    # new-user trial: a folder named index.sqlite was moved aside and the index rebuilt, with no word about it
    root = tmp_path / "cat"
    code, out = run("catalog", "add", "--catalog", str(root), str(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"))
    assert code == 0, out
    index = root / ".motorlib" / "index.sqlite"
    index.unlink()
    index.mkdir()
    code, out = run("catalog", "list", "--catalog", str(root))
    assert code == 2
    assert f"Error: {index}: is a folder" in " ".join(out.split()) and "Traceback" not in out
    assert index.is_dir()


def test_a_dangling_link_where_the_index_belongs_is_an_error_naming_it(tmp_path: Path) -> None:
    # new-user trial: `ln -s /nonexistent/x CAT/.motorlib/index.sqlite` gave an internal error (exit 3)
    root = tmp_path / "cat"
    (root / ".motorlib").mkdir(parents=True)
    index = root / ".motorlib" / "index.sqlite"
    index.symlink_to(tmp_path / "nonexistent" / "x")
    code, out = run("catalog", "list", "--catalog", str(root))
    assert code == 2, out
    assert f"Error: {index}: is a link to" in " ".join(out.split()) and "internal error" not in out
    assert index.is_symlink()


def test_verify_lists_the_ids_an_orphaned_tag_names(tmp_path: Path) -> None:
    # new-user trial: "tag 'in-stock' names 1 motor id(s) no longer in the catalog" said neither which nor what
    import shutil

    root = tmp_path / "cat"
    for name in ("bramblewick-propulsion_f29-8.xml", "bramblewick-propulsion_e25-7.xml"):
        code, out = run("catalog", "add", "--catalog", str(root), str(SAMPLE_DIR / name))
        assert code == 0, out
    code, out = run("catalog", "tag", "--catalog", str(root), "E25-7", "F29-8", "in-stock")
    assert code == 0, out
    code, out = run("catalog", "list", "--catalog", str(root), "--json")
    rows = {r["designation"]: r for r in json.loads(out)}
    shutil.copyfile(root / rows["F29-8"]["path"], root / rows["E25-7"]["path"])  # cp f29-8.xml e25-7.xml
    code, out = run("catalog", "verify", "--catalog", str(root))
    flat = " ".join(out.split())
    assert f"its motor id changed from {rows['E25-7']['motor_id']}" in flat and "not carried over" in flat, flat
    assert "names 1 motor id(s) no longer in the catalog" in flat
    assert f"{rows['E25-7']['motor_id']} (was E25-7 by {rows['E25-7']['maker']})" in flat, flat
    listed = CliRunner().invoke(main, ["catalog", "list", "--catalog", str(root), "--tag", "in-stock", "--json"])
    assert [r["designation"] for r in json.loads(listed.stdout)] == ["F29-8"]  # tagged by the user, not the copy


def test_verify_counts_a_skipped_file_once_and_names_it_once(tmp_path: Path) -> None:
    # new-user trial: "3000 curve(s) verified: 1 with errors, 1 file(s) skipped" counted the skipped file among the
    # curves with errors, printed its line on standard output and again on standard error, and named its path twice
    root = tmp_path / "cat"
    root.mkdir()
    for name in ("bramblewick-propulsion_f29-8.xml", "bramblewick-propulsion_g59-10.xml"):
        (root / name).write_bytes((SAMPLE_DIR / name).read_bytes())
    (root / "junk.xml").write_text("<motor>garbage", encoding="utf-8")
    result = CliRunner().invoke(main, ["catalog", "verify", "--catalog", str(root)], env={"COLUMNS": "200"})
    assert result.exit_code == 1, result.output
    out, err = result.stdout, result.stderr
    assert "2 curve(s) verified: 0 with errors, 1 file(s) skipped." in out, out
    assert "junk.xml" in out and "junk.xml" not in err, (out, err)
    line = next(text for text in out.splitlines() if "junk.xml" in text)
    assert line.count("junk.xml") == 1, line


def test_add_counts_the_curves_added_with_warnings(tmp_path: Path) -> None:
    # new-user trial: 1,986 of 3,000 curves whose label could not be checked ("F30-4-6") were added with
    # "3000 added, 0 refused" and nothing more; the summary now says how many carry warnings and where to see them
    import numpy as np

    from motorlib import MotorRecord, write_record

    record = MotorRecord("F30-4-6", np.array([0.0, 0.05, 1.5, 1.6]), np.array([0.0, 35.0, 30.0, 0.0]),
                         maker="Quokka Thrust Works (fictional)", diameter_m=0.029, length_m=0.1,
                         total_mass_kg=0.08, propellant_mass_kg=0.04, delays_s=(4.0, 6.0))
    src = write_record(record, tmp_path / "f30.xml")
    code, out = run("catalog", "add", "--catalog", str(tmp_path / "cat"), str(src))
    assert code == 0, out
    flat = " ".join(out.split())
    assert "1 added (1 with warnings: `motorlib catalog verify` lists them)" in flat, out
