"""Writing a fitted drag into an airframe file (issue 12): one line edited, comments kept, a backup."""

from __future__ import annotations

from pathlib import Path

import pytest

from motorlib.errors import SimulationInputError
from motorlib.files.airframe_toml import load_airframe, write_drag

from ..conftest import SAMPLE_DIR


def test_a_drag_coefficient_is_replaced_in_place(tmp_path: Path) -> None:
    path = tmp_path / "q.toml"
    original = (SAMPLE_DIR / "airframes" / "quibble-41.toml").read_text()
    path.write_text(original)
    _, backup = write_drag(path, "drag_coefficient", 0.6123)
    assert Path(backup).read_text() == original
    new = path.read_text()
    assert "drag_coefficient = 0.6123   # constant" in new
    assert [a for a in new.splitlines() if "drag_coefficient" not in a] == \
           [a for a in original.splitlines() if "drag_coefficient" not in a]
    assert load_airframe(path).drag_coefficient == 0.6123
    _, second = write_drag(path, "drag_coefficient", 0.6)
    assert second.endswith(".bak2")


def test_a_multi_line_drag_table_is_scaled(tmp_path: Path) -> None:
    path = tmp_path / "t.toml"
    path.write_text('[airframe]  # body\nmass = 2.0\ndiameter = 0.1\ndrag_table = [\n  [0.0, 0.5],  # low\n'
                    '  [1.0, 0.8],\n]  # from a wind tunnel\n\n[launch]\nrail_length = 2.0\n')
    write_drag(path, "drag_scale", 1.1)
    frame = load_airframe(path)
    assert frame.drag_table == ((0.0, pytest.approx(0.55)), (1.0, pytest.approx(0.88)))
    text = path.read_text()
    assert "# from a wind tunnel" in text and "[airframe]  # body" in text and "rail_length = 2.0" in text


def test_a_missing_key_is_refused(tmp_path: Path) -> None:
    path = tmp_path / "q.toml"
    path.write_text('[airframe]\nmass = 1.0\ndiameter = 0.05\ndrag_coefficient = 0.5\n')
    with pytest.raises(SimulationInputError, match="airframe.drag_table"):
        write_drag(path, "drag_scale", 1.1)
