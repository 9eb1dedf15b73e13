"""An output path of ``-`` means standard output (new-user trial: ``fly --csv -`` wrote a file named ``-``).

Text outputs (CSV, our XML, the airframe TOML) go to standard output and the command's own report moves to
standard error, so the data can be piped; a PNG chart or an HTML report refuses ``-`` naming its option. The
flags that already print to standard output (``--csv`` and ``--json`` of ``match``, ``catalog list`` ...) take
``-`` as saying the same.
"""

from __future__ import annotations

import json
import os
import tomllib
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

from motorlib.cli.main import main

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES

AIRFRAME = str(AIRFRAMES / "quibble-41.toml")
MOTOR = str(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml")


def _run(*args: str) -> tuple[int, str, str]:
    """Exit code, standard output and standard error of ``motorlib ARGS`` (kept apart)."""
    result = CliRunner().invoke(main, [str(a) for a in args], env={"COLUMNS": "80"})
    return result.exit_code, result.stdout, result.stderr


def _log(path: Path) -> Path:
    t = np.arange(-0.3, 1.5, 1e-3)
    f = np.where((t > 0) & (t < 1.0), 30.0, 0.0) + 5.0
    path.write_text("time_s,force_N\n" + "".join(f"{a:.4f},{b:.3f}\n" for a, b in zip(t, f)))
    return path


@pytest.fixture
def in_tmp(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    monkeypatch.chdir(tmp_path)
    return tmp_path


def test_fly_csv_dash_prints_the_trajectory_and_writes_no_file(in_tmp: Path) -> None:
    code, out, err = _run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "-")
    assert code == 0, err
    header, *rows = out.splitlines()
    assert header.startswith("time_s,") and len(rows) > 50  # the CSV alone on standard output
    assert "Caution" not in out and "Apogee" not in out
    assert "Apogee" in err or "apogee" in err  # the flight card went to standard error
    assert not (in_tmp / "-").exists()


def test_a_file_named_dash_is_left_alone(in_tmp: Path) -> None:
    (in_tmp / "-").write_text("precious")
    code, out, _ = _run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "-")
    assert code == 0 and out.startswith("time_s,")
    assert (in_tmp / "-").read_text() == "precious"
    # a file of that name is still reachable as ./-, and still refused without --overwrite
    code, _, err = _run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "./-")
    assert code == 2 and "already exists" in err and "--overwrite" in err
    assert (in_tmp / "-").read_text() == "precious"


def test_reduce_output_dash_prints_the_record(in_tmp: Path) -> None:
    log = _log(in_tmp / "firing.csv")
    code, out, err = _run("reduce", log, "--designation", "E30", "-o", "-")
    assert code in (0, 1), err  # 1: the label check may find errors; the record is printed all the same with --force
    if code == 1:
        code, out, err = _run("reduce", log, "--designation", "E30", "-o", "-", "--force")
    assert out.lstrip().startswith("<?xml") and out.rstrip().endswith("</motor-record>")
    assert "Wrote" not in out and "Wrote -" not in err
    assert not (in_tmp / "-").exists()


def test_import_output_dash_prints_the_record(in_tmp: Path) -> None:
    csv = in_tmp / "stand.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.05,14\n0.1,20\n0.3,19\n0.5,18.5\n0.7,18\n0.8,17\n0.9,8\n1,0\n")
    code, out, err = _run("import", csv, "-o", "-", "--designation", "D16-6", "--force")
    assert code == 0, err
    assert out.lstrip().startswith("<?xml") and out.rstrip().endswith("</motor-record>")
    assert not (in_tmp / "-").exists()


def test_new_airframe_dash_prints_the_template(in_tmp: Path) -> None:
    code, out, err = _run("new-airframe", "-")
    assert code == 0, err
    assert tomllib.loads(out)  # the file alone, readable
    assert not (in_tmp / "-").exists()


@pytest.mark.parametrize("command", [
    ["match", AIRFRAME, "--target", "400", "--csv"],
    ["match", AIRFRAME, "--target", "400", "--json"],
    ["catalog", "list", "--catalog", str(SAMPLE_DIR), "--csv"],
    ["catalog", "list", "--catalog", str(SAMPLE_DIR), "--json"],
    ["check", MOTOR, "--json"],
])
def test_a_flag_that_prints_takes_dash_as_the_same(command: list[str], in_tmp: Path) -> None:
    plain = _run(*command)
    dashed = _run(*command, "-")
    assert plain[0] == 0 and dashed[0] == plain[0], dashed[2]
    assert dashed[1] == plain[1]
    if "--json" in command:
        assert json.loads(dashed[1])
    assert not (in_tmp / "-").exists()


@pytest.mark.parametrize(("command", "option"), [
    (["fly", AIRFRAME, "--motor", MOTOR, "--plot", "-"], "--plot"),
    (["fly", AIRFRAME, "--motor", MOTOR, "--report", "-"], "--report"),
    (["match", AIRFRAME, "--target", "400", "--plot", "-"], "--plot"),
    (["match", AIRFRAME, "--target", "400", "--report", "-"], "--report"),
    (["demo", "--plot", "-"], "--plot"),
])
def test_a_binary_or_html_output_refuses_dash(command: list[str], option: str, in_tmp: Path) -> None:
    code, out, err = _run(*command)
    assert code == 2, out + err
    assert f"{option} -:" in err and "standard output" in err and "file name" in err
    assert not (in_tmp / "-").exists()


def test_two_outputs_cannot_share_standard_output(in_tmp: Path) -> None:
    code, out, err = _run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "-", "--json")
    assert code == 2 and "--csv -" in err and "--json" in err and "standard output" in err
    assert out == ""
    log = _log(in_tmp / "firing.csv")
    code, out, err = _run("reduce", log, "--designation", "E30", "-o", "-", "--json")
    assert code == 2 and "--output -" in err and "--json" in err


@pytest.mark.parametrize(("command", "option"), [
    (["fly"], "--csv"), (["reduce"], "--output"), (["import"], "--output"), (["new-airframe"], "PATH"),
    (["match"], "--csv"), (["catalog", "list"], "--csv"),
])
def test_the_help_says_dash_is_standard_output(command: list[str], option: str) -> None:
    code, out, _ = _run(*command, "--help")
    assert code == 0
    flat = " ".join(out.split())
    assert ("'-'" in flat or f"'{option} -'" in flat) and "standard output" in flat, flat


def test_the_outputs_stay_atomic_files_otherwise(in_tmp: Path) -> None:
    code, _, err = _run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "f29.csv")
    assert code == 0, err
    assert (in_tmp / "f29.csv").read_text().startswith("time_s,")
    assert not [p for p in os.listdir(in_tmp) if p.endswith(".tmp")]


@pytest.mark.parametrize("command", [
    ["match", AIRFRAME, "--target", "400", "--csv", "--json"],
    ["match", AIRFRAME, "--target", "400", "--csv", "-", "--json", "-"],
    ["catalog", "list", "--catalog", str(SAMPLE_DIR), "--csv", "--json"],
    ["catalog", "list", "--catalog", str(SAMPLE_DIR), "--json", "-", "--csv"],
])
def test_csv_and_json_together_are_refused_naming_both(command: list[str], in_tmp: Path) -> None:
    # new-user trial: `match AIRFRAME --csv - --json -` and `catalog list --csv --json` printed the JSON alone, as
    # if --csv had not been given; fly refuses the same conflict
    code, out, err = _run(*command)
    assert code == 2, out + err
    assert out == ""
    flat = " ".join(err.split())
    assert "--csv" in flat and "--json" in flat and "standard output" in flat, flat
    assert not (in_tmp / "-").exists()


@pytest.mark.parametrize(("command", "flag", "name"), [
    (["match", AIRFRAME, "--target", "400", "--csv", "rank.csv"], "--csv", "rank.csv"),
    (["match", AIRFRAME, "--json", "rank.json", "--target", "400"], "--json", "rank.json"),
    (["catalog", "list", "--catalog", str(SAMPLE_DIR), "--csv", "motors.csv"], "--csv", "motors.csv"),
    (["catalog", "list", "--catalog", str(SAMPLE_DIR), "--json=motors.json"], "--json", "motors.json"),
])
def test_a_file_name_after_a_printing_flag_says_to_redirect(command: list[str], flag: str, name: str,
                                                            in_tmp: Path) -> None:
    # new-user trial: `match AIRFRAME --csv rank.csv` said "Got unexpected extra argument (rank.csv)"
    code, out, err = _run(*command)
    assert code == 2, out + err
    flat = " ".join(err.split())
    assert f"{flag} {name}:" in flat and "standard output" in flat and f"{flag} > {name}" in flat, flat
    assert "unexpected extra argument" not in flat
    assert not (in_tmp / name).exists()


def test_a_printing_flag_before_the_airframe_still_prints(in_tmp: Path) -> None:
    code, out, err = _run("match", "--json", AIRFRAME, "--target", "400")
    assert code == 0, err
    assert json.loads(out)["candidates"]


@pytest.mark.parametrize("command", [["match"], ["catalog", "list"]])
def test_the_help_says_how_to_save_what_a_flag_prints(command: list[str]) -> None:
    code, out, _ = _run(*command, "--help")
    flat = " ".join(out.split())
    assert code == 0 and "--csv > FILE" in flat and "--json > FILE" in flat, flat


def test_export_json_to_dash_prints_one_document(in_tmp: Path) -> None:
    # new-user trial: `catalog export --to - --format json` made a folder named '-'
    code, out, err = _run("catalog", "export", "--catalog", SAMPLE_DIR, "G59-10", "F29-8", "--to", "-",
                          "--format", "json")
    assert code == 0, err
    motors = json.loads(out)  # the JSON document alone on standard output
    assert sorted(m["designation"] for m in motors) == ["F29-8", "G59-10"] and motors[0]["samples"]["time_s"]
    assert "Exported 2 motor(s)" in err and "standard output" in err
    assert not (in_tmp / "-").exists()


@pytest.mark.parametrize("fmt", ["xml", "csv"])
def test_export_of_one_file_a_motor_refuses_dash(fmt: str, in_tmp: Path) -> None:
    code, out, err = _run("catalog", "export", "--catalog", SAMPLE_DIR, "G59-10", "--to", "-", "--format", fmt)
    assert code == 2, out + err
    flat = " ".join(err.split())
    assert "--to -:" in flat and "folder" in flat and "--format json" in flat, flat
    assert out == "" and not (in_tmp / "-").exists()


@pytest.mark.parametrize("name", ["./-", "./rocket.toml"])
def test_an_existing_output_is_named_as_the_user_wrote_it(name: str, in_tmp: Path) -> None:
    # new-user trial: `new-airframe ./-` over an existing file said "Error: -: already exists"
    (in_tmp / name).write_text("precious")
    code, out, err = _run("new-airframe", name)
    assert code == 2, out + err
    assert f"Error: {name}: already exists" in err and "--overwrite" in err, err
    assert (in_tmp / name).read_text() == "precious"


def test_new_airframe_names_dot_slash_dash_in_its_suggestion(in_tmp: Path) -> None:
    code, out, err = _run("new-airframe", "./-")
    assert code == 0, err
    assert "Wrote ./-:" in out and "motorlib fly ./- --motor" in out, out
    assert tomllib.loads((in_tmp / "-").read_text())
