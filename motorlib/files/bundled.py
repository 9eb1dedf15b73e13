"""Where the files shipped with motorlib live: the XSDs (``data_schema/``) and the demo curves (``sample_curves/``).

Installed, both folders sit inside the package (``motorlib/data_schema``, pyproject.toml maps them there); in a
source checkout they sit beside the package at the top of the repository.  This module is the one place that
knows it.
"""

from __future__ import annotations

from pathlib import Path

__all__ = ["bundled_dir"]

_PACKAGE_DIR = Path(__file__).resolve().parent.parent


def bundled_dir(name: str, *, must_contain: str) -> Path:
    """The bundled folder `name` holding a file that matches the glob `must_contain`.

    Raises
    ------
    FileNotFoundError
        When neither the installed nor the checkout location holds it (a broken install).
    """
    for candidate in (_PACKAGE_DIR / name, _PACKAGE_DIR.parent / name):
        if any(candidate.glob(must_contain)):
            return candidate
    raise FileNotFoundError(f"motorlib is installed without its {name}/ folder; reinstall the package")
