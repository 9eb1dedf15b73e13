"""The ``motorlib`` group: every command has help with an example; ``python -m motorlib`` runs it too."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from .conftest import run


def test_every_command_has_help_with_an_example() -> None:
    for command in ([], ["check"], ["import"], ["fly"], ["descent"], ["catalog"], ["catalog", "add"],
                    ["catalog", "list"], ["catalog", "show"], ["catalog", "tag"], ["catalog", "untag"],
                    ["catalog", "remove"], ["catalog", "export"], ["catalog", "verify"], ["catalog", "reindex"],
                    ["match"], ["demo"], ["reduce"]):
        code, out = run(*command, "--help")
        assert code == 0 and "Example" in out


def test_python_dash_m_runs_the_same_group() -> None:
    result = subprocess.run([sys.executable, "-m", "motorlib", "--version"], capture_output=True, text=True,
                            check=True)
    assert "motorlib" in result.stdout



@pytest.mark.parametrize(("given", "expected"), [(None, "1"), ("2", "2")])
def test_the_program_asks_for_one_blas_thread_unless_told(given: str | None, expected: str) -> None:
    # issue 16: OpenBLAS starting a thread per core is ~50 ms of a cold match; a value in the environment wins.
    # The process also sweeps young garbage every 200,000 allocations, not 700 (~25 ms of a 5,000-motor match).
    import os

    env = {k: v for k, v in os.environ.items() if k != "OPENBLAS_NUM_THREADS"}
    if given is not None:
        env["OPENBLAS_NUM_THREADS"] = given
    code = ("import os, sys\nfrom motorlib.cli.main import run\nsys.argv = ['motorlib', '--version']\n"
            "try:\n    run()\nexcept SystemExit:\n    pass\nimport gc\n"
            "print(os.environ['OPENBLAS_NUM_THREADS'], 'numpy' in sys.modules, gc.get_threshold()[0])")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, env=env)
    assert result.stdout.split()[-3:] == [expected, "False", "200000"]

def test_demo_never_replaces_a_file_and_runs_again(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # The README's first command may be run twice: the second run writes beside the first chart, not over it.
    monkeypatch.chdir(tmp_path)
    (tmp_path / "motorlib-demo.png").write_bytes(b"an older chart")
    code, out = run("demo")
    assert code == 0, out
    assert (tmp_path / "motorlib-demo.png").read_bytes() == b"an older chart"
    assert (tmp_path / "motorlib-demo-1.png").read_bytes()[:4] == b"\x89PNG" and "motorlib-demo-1.png" in out


def test_a_reader_that_stops_early_ends_the_command_quietly() -> None:
    # `motorlib match ... --json | head` closes the pipe early: the command stops without an "Error: Broken pipe"
    # (as shell tools do), not with the message an unwritable output file gets
    samples = Path(__file__).resolve().parents[2] / "sample_curves"
    process = subprocess.Popen([sys.executable, "-m", "motorlib", "catalog", "list", "--catalog", str(samples),
                                "--json"], stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    process.stdout.close()  # the reader is gone before the first byte
    error = process.stderr.read().decode()
    process.stderr.close()
    assert process.wait() != 0
    assert "Error" not in error and "Traceback" not in error, error
