"""``motorlib import`` through click's CliRunner: a checked record is written, or nothing is."""

from __future__ import annotations

from pathlib import Path

from motorlib import read_record

from ..conftest import FIXTURE_DIR
from .conftest import run


def test_import_writes_a_checked_record(tmp_path: Path) -> None:
    out_path = tmp_path / "d12.xml"
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "D12-5",
                    "--maker", "Stand team (fictional)", "--diameter", "24mm", "--length", "70mm", "--total-mass", "44g",
                    "--propellant-mass", "21g", "--delays", "5", "--source-kind", "own-firing",
                    "--test-date", "2026-11-14")
    assert code == 0, out
    record = read_record(out_path)
    assert record.designation == "D12-5" and record.provenance.kind == "own-firing"
    assert str(record.provenance.date) == "2026-11-14"
    code, out = run("check", str(out_path))
    assert code == 0 and "No findings." in out
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "D12-5")
    assert code == 2 and "--overwrite" in out


def test_import_refuses_errors_unless_forced(tmp_path: Path) -> None:
    out_path = tmp_path / "x.xml"
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "E12-5")
    assert code == 1 and "nothing was written" in out and not out_path.exists()
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(out_path), "--designation", "E12-5",
                    "--force")
    assert code == 0 and out_path.exists()


def test_import_of_broken_csv_names_the_line(tmp_path: Path) -> None:
    code, out = run("import", str(FIXTURE_DIR / "ragged_row.csv"), "-o", str(tmp_path / "x.xml"))
    assert code == 2 and "ragged_row.csv:4" in out


def test_source_kinds_are_our_own_words(tmp_path: Path) -> None:
    from motorlib.motor.record import PROVENANCE_KINDS

    code, out = run("import", "--help")
    assert code == 0 and all(kind in out for kind in PROVENANCE_KINDS)
    code, out = run("import", str(FIXTURE_DIR / "sound_d12.csv"), "-o", str(tmp_path / "x.xml"), "--designation",
                    "D12-5", "--source-kind", "static-test")
    assert code == 2 and "own-firing" in out


def test_cli_source_kinds_match_the_records() -> None:
    from motorlib.cli.options import SOURCE_KINDS
    from motorlib.motor.record import PROVENANCE_KINDS

    assert tuple(SOURCE_KINDS) == tuple(PROVENANCE_KINDS)


def test_import_never_writes_over_its_own_inputs(tmp_path: Path) -> None:
    # a raw stand log written over by its own record is lost: refused even with --overwrite (README: no output
    # ever replaces one of the command's inputs), and the log is left byte for byte
    log = tmp_path / "stand.csv"
    log.write_bytes((FIXTURE_DIR / "sound_d12.csv").read_bytes())
    meta = tmp_path / "meta.toml"
    meta.write_text('designation = "D12-5"\n')
    before = log.read_bytes(), meta.read_bytes()
    code, out = run("import", str(log), "-o", str(log), "--designation", "D12-5", "--overwrite")
    assert code == 2 and "is an input of this command" in out, out
    code, out = run("import", str(log), "-o", str(meta), "--meta", str(meta), "--overwrite")
    assert code == 2 and "is an input of this command" in out, out
    assert (log.read_bytes(), meta.read_bytes()) == before
