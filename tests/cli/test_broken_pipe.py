"""A reader that stops early (``motorlib catalog list | head -1``) ends motorlib quietly with status 141 when
motorlib still had output to write (more than the pipe buffer holds); output that fitted was delivered, status 0.

New-user trial: the command ended quietly, but its status was 0 or 1 depending on whether the output fitted in
the pipe's buffer. These tests run the real program in a subprocess, with an output far larger than any pipe
buffer (a reader that closes after one line), with a reader that is gone before anything is written, and with
output still buffered when the interpreter flushes standard output at exit.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from ..conftest import SAMPLE_DIR
from .conftest import AIRFRAMES

BROKEN_PIPE_STATUS = 141  # 128 + SIGPIPE (13), as a shell reports a program stopped by a closed pipe
AIRFRAME = str(AIRFRAMES / "quibble-41.toml")
MOTORLIB = [sys.executable, "-m", "motorlib"]
NOISE = ("Traceback", "Exception ignored", "BrokenPipeError", "Broken pipe", "Error")


@pytest.fixture(scope="module")
def big_catalog(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """A catalog whose listings are far larger than a pipe's buffer (64 KiB on Linux)."""
    from motorlib.catalog import Catalog

    from ..synthetic import synthetic_motors

    folder = tmp_path_factory.mktemp("big") / "catalog"
    catalog = Catalog(folder)
    for motor in synthetic_motors(800, seed=5):
        catalog.add(motor)
    return folder


def _env() -> dict[str, str]:
    return {**os.environ, "COLUMNS": "120", "MOTORLIB_UNITS": "metric"}


def _read_some_then_close(args: list[str], n_bytes: int | None = None) -> tuple[int, bytes, str]:
    """Run motorlib, read one line (or ``n_bytes``) of its output, close the pipe: status, what was read, stderr."""
    proc = subprocess.Popen([*MOTORLIB, *args], stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=_env(),
                            bufsize=0)
    assert proc.stdout is not None and proc.stderr is not None
    # small reads from the pipe itself: the writer then has far more left than the pipe holds when it closes
    first = b""
    while len(first) < (n_bytes or 1 << 20) and not (n_bytes is None and first.endswith(b"\n")):
        chunk = os.read(proc.stdout.fileno(), min(64, (n_bytes or 64) - len(first)) if n_bytes else 1)
        if not chunk:
            break
        first += chunk
    proc.stdout.close()
    err = proc.stderr.read().decode()
    proc.stderr.close()
    return proc.wait(timeout=300), first, err


@pytest.mark.parametrize(("args", "n_bytes"), [
    (["catalog", "list"], None), (["catalog", "list", "--csv"], None),
    (["catalog", "list", "--json"], 100),  # JSON to a pipe is one line: its first 100 bytes, as `head -c 100`
])
def test_a_reader_that_stops_after_one_line_gets_status_141(args: list[str], n_bytes: int | None,
                                                            big_catalog: Path) -> None:
    full = subprocess.run([*MOTORLIB, *args, "--catalog", str(big_catalog)], capture_output=True, env=_env())
    assert full.returncode == 0 and len(full.stdout) > 65536 + 16384  # more than a pipe holds and a line
    for _ in range(3):  # the same every time, whatever the timing
        code, first, err = _read_some_then_close([*args, "--catalog", str(big_catalog)], n_bytes)  # `| head -1`
        assert first
        assert code == BROKEN_PIPE_STATUS, err
        assert not any(word in err for word in NOISE), err


def test_match_json_read_in_part_gets_status_141(big_catalog: Path) -> None:
    code, first, err = _read_some_then_close(["match", AIRFRAME, "--json", "--catalog", str(big_catalog)], 100)
    assert first.startswith(b"{")
    assert code == BROKEN_PIPE_STATUS, err
    assert not any(word in err for word in NOISE), err


@pytest.mark.parametrize("args", [
    ["catalog", "list", "--catalog", str(SAMPLE_DIR)],   # small: fits in any pipe buffer
    ["match", AIRFRAME, "--json"],
    ["fly", AIRFRAME, "--motor", "F29-8", "--csv", "-"],
    ["--help"],                                            # printed by the group itself, before any command
    ["--version"],
    ["match", "--help"],
])
def test_a_reader_gone_before_anything_is_written_gets_status_141(args: list[str]) -> None:
    read_end, write_end = os.pipe()
    os.close(read_end)  # the reader is gone: the first write to the pipe fails
    try:
        proc = subprocess.run([*MOTORLIB, *args], stdout=write_end, stderr=subprocess.PIPE, env=_env(), timeout=300)
    finally:
        os.close(write_end)
    err = proc.stderr.decode()
    assert proc.returncode == BROKEN_PIPE_STATUS, err
    assert not any(word in err for word in ("Traceback", "Exception ignored", "BrokenPipeError")), err


def test_output_left_for_the_flush_at_exit_gets_status_141(tmp_path: Path) -> None:
    # Text still in sys.stdout's buffer when the command ends is written when the interpreter flushes standard
    # output at shutdown; with the reader gone, Python then printed "Exception ignored ... BrokenPipeError" and
    # exited with 120.
    driver = tmp_path / "driver.py"
    driver.write_text(
        "import sys\n"
        "from motorlib.cli.main import run\n"
        "sys.stdout.write('left in the buffer\\n')  # a pipe is block-buffered: nothing is written yet\n"
        "sys.argv = ['motorlib', 'fly', 'no-such-airframe.toml']  # a usage error, on standard error only\n"
        "run()\n")
    read_end, write_end = os.pipe()
    os.close(read_end)
    try:
        env = {k: v for k, v in _env().items() if k != "PYTHONUNBUFFERED"}  # a buffered standard output
        proc = subprocess.run([sys.executable, str(driver)], stdout=write_end, stderr=subprocess.PIPE, env=env,
                              timeout=300)
    finally:
        os.close(write_end)
    err = proc.stderr.decode()
    assert proc.returncode == BROKEN_PIPE_STATUS, err
    assert not any(word in err for word in ("Traceback", "Exception ignored", "BrokenPipeError")), err


def test_the_status_is_documented() -> None:
    from motorlib.cli import group

    assert "141" in (group.__doc__ or "")
    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text()
    assert "141" in readme


@pytest.mark.parametrize("args", [["catalog", "list", "--catalog", str(SAMPLE_DIR)], ["--help"]])
def test_output_that_fitted_in_the_pipe_keeps_its_status(args: list[str]) -> None:
    # new-user trial: the README promised 141 to every reader that stops early, but `catalog list | head -1` on a
    # small catalog ends with 0: the whole output fitted in the pipe and was delivered before the reader stopped
    code, first, err = _read_some_then_close(args)
    assert first and code == 0, err


def test_the_documents_say_when_the_status_is_141() -> None:
    from motorlib.cli import group

    readme = " ".join((Path(__file__).resolve().parents[2] / "README.md").read_text().split())
    docstring = " ".join((group.__doc__ or "").split())
    for text in (readme, docstring):
        assert "141" in text and "pipe buffer" in text and "usual status" in text, text[:200]
    assert "(`motorlib catalog list | head -1`), motorlib ends quietly with status 141" not in readme
    assert "141 the reader of standard output stopped early (``motorlib catalog list | head -1``)" not in docstring
