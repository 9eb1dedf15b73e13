"""``motorlib reduce`` through click's CliRunner: options that set the record's metadata."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from motorlib.files.curvefiles import load_curve_file

from .conftest import run


def _log(path: Path) -> Path:
    """A raw stand log: 0.5 s of baseline, an F30-like burn with a 2 N offset, 1 kHz, a little noise."""
    t = np.arange(-0.5, 2.7, 1e-3)
    f = np.interp(t, [0.0, 0.1, 2.0, 2.1], [0.0, 36.0, 26.0, 0.0], left=0.0, right=0.0)
    f = f + 2.0 + np.random.default_rng(3).normal(0.0, 0.05, t.size)
    path.write_text("time_s,thrust_n\n" + "".join(f"{a:.4f},{b:.4f}\n" for a, b in zip(t, f)))
    return path


@pytest.mark.parametrize(("args", "kind"), [((), "own-firing"), (("--source-kind", "other"), "other"),
                                             (("--source-kind", "maker-published"), "maker-published")])
def test_the_provenance_kind_defaults_to_own_firing_and_an_explicit_choice_is_kept(
        tmp_path: Path, args: tuple[str, ...], kind: str) -> None:
    out_path = tmp_path / "f30.xml"
    code, out = run("reduce", str(_log(tmp_path / "firing.csv")), "-o", str(out_path), *args)
    assert code == 0, out
    assert load_curve_file(out_path).provenance.kind == kind
