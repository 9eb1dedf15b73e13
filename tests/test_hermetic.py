"""Tests run hermetically: the caller's user folders and settings never reach them (autouse fixture in conftest)."""

from __future__ import annotations

import os
import sys
from pathlib import Path

import pytest

from motorlib.cli.options import default_catalog_dir


@pytest.mark.skipif(sys.platform in ("win32", "darwin"), reason="XDG folders are the Linux convention")
def test_user_catalog_points_into_a_private_temporary_folder(tmp_path_factory: pytest.TempPathFactory) -> None:
    folder = Path(default_catalog_dir())
    assert folder.is_relative_to(tmp_path_factory.getbasetemp())
    assert folder.is_relative_to(os.environ["XDG_DATA_HOME"])
    assert not folder.exists()


def test_no_motorlib_setting_leaks_in() -> None:
    assert not [name for name in os.environ if name.startswith("MOTORLIB_")]
