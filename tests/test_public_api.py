"""motorlib.__all__ is sorted, complete and importable; the package never imports the CLI."""

from __future__ import annotations

import subprocess
import sys

import motorlib


def test_all_is_sorted_and_importable() -> None:
    assert motorlib.__all__ == sorted(motorlib.__all__)
    for name in motorlib.__all__:
        assert hasattr(motorlib, name), name


def test_public_names_are_exported() -> None:
    public = {name for name in vars(motorlib) if not name.startswith("_") and not isinstance(getattr(motorlib, name), type(sys))}
    public.discard("annotations")
    assert public <= set(motorlib.__all__) | {"__version__"}, public - set(motorlib.__all__)


def test_package_import_does_not_load_the_cli() -> None:
    code = "import sys, motorlib; print('motorlib.cli' in sys.modules, 'click' in sys.modules, 'rich' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.split()
    assert out == ["False", "False", "False"]
