"""Catalog test fixtures: a temporary catalog holding the bundled sample curves."""

from __future__ import annotations

from pathlib import Path

import pytest

from motorlib.catalog import Catalog

from ..conftest import SAMPLE_DIR


@pytest.fixture
def tmp_catalog(tmp_path: Path) -> Catalog:
    catalog = Catalog(tmp_path / "catalog")
    catalog.add_files(sorted(SAMPLE_DIR.glob("*.xml")))
    return catalog
