"""Every example in every command's ``--help`` runs as printed (issue 14), and help fits 80 columns.

The examples are read from the help text itself, joined at trailing backslashes, split like a shell would and
run in a scratch folder that holds the files they name: the bundled samples, copies of a demo airframe, a
catalog of the samples (``$MOTORLIB_CATALOG``) and small synthetic stand logs.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
from pathlib import Path

import click
import numpy as np
import pytest
from click.testing import CliRunner

from motorlib.cli.main import main
from motorlib.files.airframe_toml import load_airframe
from motorlib.files.curvefiles import load_curve_file

from ..conftest import SAMPLE_DIR
from ..flight.test_calibration import synthetic_log

ENV_80 = {"COLUMNS": "80"}


def _commands(group: click.Group = main, path: tuple[str, ...] = ()) -> list[tuple[str, ...]]:
    found = [path]
    for name, command in sorted(group.commands.items()):
        if isinstance(command, click.Group):
            found += _commands(command, path + (name,))
        else:
            found.append(path + (name,))
    return found


def _help(path: tuple[str, ...]) -> str:
    result = CliRunner().invoke(main, [*path, "--help"], env=ENV_80)
    assert result.exit_code == 0, result.output
    return result.output


def _examples(text: str) -> list[str]:
    """The example command lines of one help text, continuation lines joined."""
    lines, examples, inside = text.splitlines(), [], False
    for line in lines:
        stripped = line.strip()
        if re.fullmatch(r"Examples?:", stripped):
            inside = True
            continue
        if inside and stripped.startswith("motorlib "):
            examples.append(stripped)
        elif inside and examples and examples[-1].endswith("\\") and stripped:
            examples[-1] = examples[-1][:-1].rstrip() + " " + stripped
        elif inside and not stripped:
            inside = False
    return examples


EXAMPLES = sorted({example for path in _commands() for example in _examples(_help(path))})


def test_every_command_shows_examples() -> None:
    for path in _commands():
        assert _examples(_help(path)), f"motorlib {' '.join(path)} --help has no example"


def test_help_fits_80_columns() -> None:
    for path in _commands():
        wide = [line for line in _help(path).splitlines() if len(line) > 80]
        assert not wide, (path, wide)


def test_help_never_shows_a_missing_bound() -> None:
    # new-user trial: `reduce --help` showed `--offset ... [default: 0.0; x<=None]` (a range with no bounds)
    for path in _commands():
        flat = " ".join(_help(path).split())
        assert "None" not in flat, (path, flat[flat.find("None") - 80:flat.find("None") + 10])


def _curve(peak_n: float, end_n: float, burn_s: float) -> tuple[np.ndarray, np.ndarray]:
    """A regressive curve: up to ``peak_n`` in 0.1 s, down to ``end_n`` at ``burn_s``, out 0.1 s later."""
    return np.array([0.0, 0.1, burn_s, burn_s + 0.1]), np.array([0.0, peak_n, end_n, 0.0])


def _write_curve(path: Path, time_s: np.ndarray, thrust_n: np.ndarray) -> None:
    path.write_text("time_s,thrust_n\n" + "".join(f"{float(t)!r},{float(f)!r}\n" for t, f in zip(time_s, thrust_n)))


def _write_log(path: Path, seed: int) -> None:
    """A raw stand log of an F30-like firing: 0.5 s of baseline at 1 kHz, a 2 N offset and a little noise."""
    time_s, thrust_n = _curve(36.0, 26.0, 2.0)
    t = np.arange(-0.5, 2.7, 1e-3)
    f = np.interp(t, time_s, thrust_n, left=0.0, right=0.0) + 2.0 + np.random.default_rng(seed).normal(0, 0.05, t.size)
    _write_curve(path, t, f)


@pytest.fixture(scope="module")
def scratch_template(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The files the examples name, built once; each example runs in its own copy."""
    root = tmp_path_factory.mktemp("examples")
    shutil.copytree(SAMPLE_DIR, root / "sample_curves")
    (root / "sample_curves" / "READ_ONLY").unlink()  # a private copy the examples may read freely
    for name in ("my-rocket.toml",):
        shutil.copy(SAMPLE_DIR / "airframes" / "quibble-41.toml", root / name)
    shutil.copy(SAMPLE_DIR / "bramblewick-propulsion_f29-8.xml", root / "static-3.xml")
    for name in ("stand.csv", "stand-03.csv"):
        _write_curve(root / name, *_curve(36.0, 26.0, 2.0))  # about 62 N·s at 30 N: an F30
    _write_curve(root / "test3.csv", *_curve(48.0, 36.0, 3.0))  # about 126 N·s at 41 N: a G40
    (root / "motors.toml").write_text('[defaults]\nmaker = "Our team"\ndiameter = "24 mm"\nsource_kind = "own-firing"\n'
                                      '[files."stand.csv"]\ndesignation = "F30-4"\n'
                                      '[files."stand-03.csv"]\ndesignation = "F30-6"\ndelays = [4, 6, 8]\n')
    for seed, name in enumerate(("firing-1.csv", "f1.csv", "f2.csv", "f3.csv")):
        _write_log(root / name, seed)
    # an altimeter log of the demo airframe on a G59-10 (barometric, synthesised from our own flight model)
    frame = load_airframe(root / "my-rocket.toml")
    t, p = synthetic_log(frame, load_curve_file(SAMPLE_DIR / "bramblewick-propulsion_g59-10.xml"), 0.62)
    (root / "flight.csv").write_text("time (s),pressure (Pa)\n" + "".join(f"{a:.3f},{b:.2f}\n" for a, b in zip(t, p)))
    result = CliRunner().invoke(main, ["catalog", "add", "--catalog", str(root / "motors"), str(SAMPLE_DIR)])
    assert result.exit_code == 0, result.output
    return root


@pytest.mark.parametrize("example", EXAMPLES)
def test_help_example_runs_as_printed(example: str, scratch_template: Path, tmp_path: Path,
                                      monkeypatch: pytest.MonkeyPatch) -> None:
    work = tmp_path / "work"
    shutil.copytree(scratch_template, work, symlinks=True)
    monkeypatch.chdir(work)
    args = shlex.split(example, comments=True)
    assert args[0] == "motorlib"
    env = {**ENV_80, "MOTORLIB_CATALOG": str(work / "motors")}
    result = CliRunner().invoke(main, args[1:], env=env)
    # status 1 is a flight that breaks a launch rule on the example's conditions: it ran, and said so
    assert result.exit_code in (0, 1) and "Error:" not in result.output, f"{example}\n{result.output}"
    assert os.getcwd() == str(work)
