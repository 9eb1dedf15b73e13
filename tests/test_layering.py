"""The numerics import no lxml, pandas, click or rich; the CLI start-up path imports no pandas or scipy."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

NUMERIC_MODULES = ["motorlib.units", "motorlib.motor.classes", "motorlib.motor.record", "motorlib.motor.checks", "motorlib.errors",
                   "motorlib.flight.atmosphere", "motorlib.flight.airframe", "motorlib.flight", "motorlib.flight.descent", "motorlib.flight.rules",
                   "motorlib.flight.geometry", "motorlib.flight.drag",
                   "motorlib.matching", "motorlib.motor.reduction"]
HEAVY = ["lxml", "pandas", "click", "rich", "scipy", "matplotlib"]


def _modules_after_import(statement: str) -> set[str]:
    code = f"import sys, json\n{statement}\nprint(json.dumps(sorted(sys.modules)))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    return set(json.loads(out))


def _top_level_modules_of(module: str) -> set[str]:
    # Import the module alone, bypassing motorlib/__init__ (which re-exports the I/O modules too).
    code = (
        "import sys, types, importlib, pathlib, json\n"
        "import importlib.util as u\n"
        "spec = u.find_spec('motorlib')\n"
        "pkg = types.ModuleType('motorlib'); pkg.__path__ = list(spec.submodule_search_locations)\n"
        "sys.modules['motorlib'] = pkg\n"
        f"importlib.import_module('{module}')\n"
        "print(json.dumps(sorted(sys.modules)))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    return {name.split(".")[0] for name in json.loads(out)}


@pytest.mark.parametrize("module", NUMERIC_MODULES)
def test_numerics_stay_light(module: str) -> None:
    loaded = _top_level_modules_of(module)
    assert not loaded & set(HEAVY), loaded & set(HEAVY)


def test_the_probe_can_see_a_heavy_import() -> None:
    # Guard against a probe that can never fail: xmlio does import lxml.
    assert "lxml" in _top_level_modules_of("motorlib.files.motor_xml")


def test_cli_start_up_imports_no_pandas_or_scipy() -> None:
    loaded = {name.split(".")[0] for name in _modules_after_import("import motorlib.cli")}
    assert "pandas" not in loaded and "scipy" not in loaded and "matplotlib" not in loaded


def test_match_path_imports_no_pandas_scipy_or_matplotlib() -> None:
    # The ranking path of `motorlib match` (catalog open, rows, pack, batched flight, reasons).
    statement = (
        "from motorlib.catalog import Catalog\n"
        "from motorlib.files.airframe_toml import load_airframe\n"
        "from motorlib.matching import MatchSettings, rank\n"
        "from motorlib.files.curvefiles import sample_catalog_dir\n"
        "c = Catalog(sample_catalog_dir(), read_only=True)\n"
        "rank(load_airframe(sample_catalog_dir() / 'airframes' / 'quibble-41.toml'), c.rows(), c.motor_pack,"
        " MatchSettings(target_m=400.0))\n"
    )
    loaded = {name.split(".")[0] for name in _modules_after_import(statement)}
    assert not loaded & {"pandas", "scipy", "matplotlib"}
