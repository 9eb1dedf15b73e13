"""Issue 13, classes 2, 9 and 10: outputs never overwrite silently, never replace an input, and bad output
paths give ``Error: PATH: ...`` (never a traceback)."""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import numpy as np
import pytest

from .conftest import AIRFRAME, SAMPLE_DIR, run

MOTOR = SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml"
PNG_MAGIC = b"\x89PNG"


def _log(path: Path) -> Path:
    t = np.arange(-0.3, 1.5, 1e-3)
    f = np.where((t > 0) & (t < 1.0), 30.0, 0.0) + 5.0
    path.write_text("time_s,force_N\n" + "".join(f"{a:.4f},{b:.3f}\n" for a, b in zip(t, f)))
    return path


def _commands(tmp: Path, out: str) -> dict[str, list[str]]:
    """Each command with an output option, writing to ``out`` (a name in ``tmp``)."""
    log = _log(tmp / "firing.csv")
    return {
        "reduce --plot": ["reduce", str(log), "--designation", "E30", "--plot", out],
        "reduce -o": ["reduce", str(log), "--designation", "E30", "-o", out],
        "fly --plot": ["fly", str(AIRFRAME), "--motor", str(MOTOR), "--plot", out],
        "fly --csv": ["fly", str(AIRFRAME), "--motor", str(MOTOR), "--csv", out],
        "match --plot": ["match", str(AIRFRAME), "--target", "300", "--plot", out],
        "demo --plot": ["demo", "--plot", out],
        "catalog show --plot": ["catalog", "show", "--catalog", str(SAMPLE_DIR), "F29-8", "--plot", out],
    }


COMMANDS = ["catalog show --plot", "demo --plot", "fly --csv", "fly --plot", "match --plot", "reduce --plot", "reduce -o"]


@pytest.mark.parametrize("name", COMMANDS)
def test_an_existing_file_is_never_replaced_without_overwrite(name: str, tmp_path: Path) -> None:
    os.chdir(tmp_path)
    target = tmp_path / "keep.out"
    target.write_bytes(b"precious")
    result = run(*_commands(tmp_path, str(target))[name])
    assert result.exit_code == 2, result.output
    assert "already exists" in result.output and "--overwrite" in result.output
    assert target.read_bytes() == b"precious"
    result = run(*_commands(tmp_path, str(target))[name], "--overwrite")
    assert result.exit_code in (0, 1), result.output  # 1: reduce's checks may fail; never a refusal of the path
    assert "already exists" not in result.output
    assert target.read_bytes() != b"precious"


@pytest.mark.parametrize("name", [n for n in COMMANDS if n.startswith(("reduce", "fly", "match"))])
def test_an_input_is_never_replaced_even_with_overwrite(name: str, tmp_path: Path) -> None:
    os.chdir(tmp_path)
    commands = _commands(tmp_path, "placeholder")
    args = commands[name]
    victim = str(tmp_path / "firing.csv") if name.startswith("reduce") else str(AIRFRAME)
    if name.startswith("fly"):
        victim = str(tmp_path / "rocket.toml")
        shutil.copy(AIRFRAME, victim)
        args = [a if a != str(AIRFRAME) else victim for a in args]
    if name.startswith("match"):
        victim = str(tmp_path / "rocket.toml")
        shutil.copy(AIRFRAME, victim)
        args = [a if a != str(AIRFRAME) else victim for a in args]
    before = Path(victim).read_bytes()
    args = [victim if a == "placeholder" else a for a in args]
    result = run(*args, "--overwrite")
    assert result.exit_code == 2, result.output
    assert "input" in result.output
    assert Path(victim).read_bytes() == before


@pytest.mark.parametrize("kind,make", [
    ("missing folder", lambda tmp: str(tmp / "no" / "such" / "dir" / "x.out")),
    ("under a regular file", lambda tmp: str(tmp / "afile" / "x.out")),
    ("name too long", lambda tmp: str(tmp / ("n" * 300 + ".out"))),
    ("read-only folder", lambda tmp: str(tmp / "ro" / "x.out")),
])
@pytest.mark.parametrize("name", COMMANDS)
def test_a_bad_output_path_is_a_clear_error(name: str, kind: str, make, tmp_path: Path) -> None:
    os.chdir(tmp_path)
    (tmp_path / "afile").write_text("x")
    (tmp_path / "ro").mkdir()
    os.chmod(tmp_path / "ro", 0o500)
    if kind == "read-only folder" and os.access(tmp_path / "ro", os.W_OK):
        pytest.skip("running as a user who may write anywhere (root)")
    out = make(tmp_path)
    result = run(*_commands(tmp_path, out)[name])
    assert result.exit_code in (1, 2), result.output
    assert "Error" in result.output and "Traceback" not in result.output


def _catalog_with_near_twins(tmp: Path) -> Path:
    """Two motors whose handles differ only in case and punctuation: maker 'A.B' and 'a b'."""
    root = tmp / "cat"
    for maker, stem in (("A.B", "one"), ("a b", "two")):
        csv = tmp / f"{stem}.csv"
        csv.write_text("time_s,thrust_n\n0,0\n0.1,30\n0.9,25\n1.0,0\n")
        result = run("catalog", "add", "--catalog", root, csv, "--designation", "E25", "--maker", maker)
        assert result.exit_code == 0, result.output
    return root


@pytest.mark.parametrize("fmt", ["xml", "csv"])
def test_export_writes_one_file_per_motor_even_when_handles_differ_only_in_case(fmt: str, tmp_path: Path) -> None:
    root = _catalog_with_near_twins(tmp_path)
    out = tmp_path / "out"
    result = run("catalog", "export", "--catalog", root, "--to", out, "--format", fmt)
    assert result.exit_code == 0, result.output
    assert len(list(out.iterdir())) == 2


@pytest.mark.parametrize("fmt", ["xml", "csv", "json"])
def test_export_never_replaces_files_without_overwrite(fmt: str, tmp_path: Path) -> None:
    out = tmp_path / "out"
    args = ["catalog", "export", "--catalog", SAMPLE_DIR, "F29-8", "--to", out, "--format", fmt]
    assert run(*args).exit_code == 0
    (written,) = list(out.iterdir())
    written.write_bytes(b"edited by hand")
    result = run(*args)
    assert result.exit_code == 2 and "already exists" in result.output
    assert written.read_bytes() == b"edited by hand"
    assert run(*args, "--overwrite").exit_code == 0
    assert written.read_bytes() != b"edited by hand"


def test_exported_csv_reads_back_with_a_newline_in_the_maker(tmp_path: Path) -> None:
    csv = tmp_path / "m.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.1,30\n0.9,25\n1.0,0\n")
    root = tmp_path / "cat"
    assert run("catalog", "add", "--catalog", root, csv, "--designation", "E25", "--maker", "Two\nLines").exit_code == 0
    out = tmp_path / "out"
    assert run("catalog", "export", "--catalog", root, "--to", out, "--format", "csv").exit_code == 0
    (written,) = list(out.iterdir())
    result = run("check", written, "--designation", "E25")
    assert result.exit_code == 0, result.output


def test_an_atomic_write_never_replaces_a_pipe_or_device(tmp_path: Path) -> None:
    """`--plot /dev/null` replaced /dev/null with a regular file (as root): a special file is written into."""
    import stat
    import threading

    from motorlib.files.fsio import write_atomic

    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    received = []
    reader = threading.Thread(target=lambda: received.append(fifo.read_bytes()), daemon=True)
    reader.start()
    write_atomic(fifo, b"chart bytes")
    reader.join(timeout=10)
    assert received == [b"chart bytes"]
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


def test_markup_in_user_text_is_shown_verbatim(tmp_path: Path) -> None:
    """Rich markup in a maker name is text: neither a rich error nor shown with escape backslashes."""
    csv = tmp_path / "mk.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.1,30\n0.9,25\n1.0,0\n")
    root = tmp_path / "cat"
    maker = "[/x]Evil[bold"
    assert run("catalog", "add", "--catalog", root, csv, "--designation", "E25", "--maker", maker,
               "--total-mass", "40g", "--propellant-mass", "20g").exit_code == 0
    for args in (["catalog", "show", "--catalog", root, "E25"], ["fly", AIRFRAME, "--motor", "E25", "--catalog", root]):
        result = run(*args)
        assert maker in result.output and "\\[" not in result.output, result.output


@pytest.mark.skipif(not os.path.exists("/dev/full"), reason="needs /dev/full (a device whose writes fail: disk full)")
def test_a_full_device_names_the_output_it_could_not_write() -> None:
    # `fly --csv /dev/full` said only "Error: No space left on device": which of the outputs failed?
    result = run("fly", AIRFRAME, "--motor", MOTOR, "--csv", "/dev/full")
    assert result.exit_code == 2
    assert "/dev/full" in result.output and "No space left on device" in result.output


@pytest.mark.parametrize("value", ["nan", "inf", "-inf", "NaN", "Infinity"])
@pytest.mark.parametrize("option", ["--target", "--wind-from", "--wind"])
def test_a_non_finite_quantity_is_refused_as_such(option: str, value: str) -> None:
    # `--target nan` answered "expected a length such as '29 mm'" and `--wind-from nan` "has no unit"
    result = run("match", AIRFRAME, "--target", "300", option, value)
    assert result.exit_code == 2
    assert "is not a finite number" in result.output and option in result.output


def test_every_refused_output_and_unusable_file_exits_2(tmp_path: Path) -> None:
    # The README: exit 2 for unusable input. new-airframe and import answered an existing output with 1, as did
    # airframe for a file without the [geometry] it needs (fly --plot, reduce -o and the others said 2).
    existing = tmp_path / "taken.toml"
    existing.write_text("x = 1\n")
    assert run("new-airframe", existing).exit_code == 2
    csv = tmp_path / "stand.csv"
    csv.write_text("time_s,thrust_n\n0,0\n0.05,14\n0.1,20\n0.3,19\n0.5,18.5\n0.7,18\n0.8,17\n0.9,8\n1,0\n")
    taken = tmp_path / "taken.xml"
    taken.write_text("<x/>")
    assert run("import", csv, "-o", taken, "--designation", "D16-6").exit_code == 2
    result = run("airframe", SAMPLE_DIR / "airframes" / "fennelwick-24.toml")
    assert result.exit_code == 2 and "[geometry]" in result.output
