"""The package layout holds: layers import downward only, the numerics stay light, the CLI starts fast.

Layers, bottom to top (DEVELOPERS.md, "Layout"): errors, units -> motor -> flight -> matching -> files ->
catalog -> present -> cli.  A module may import its own folder and folders below it, never one above.
Two kinds of check: a static one that reads every ``import`` statement in the source (including imports inside
functions, which a runtime probe would miss), and a runtime one in a fresh interpreter that sees what a module
pulls in transitively.
"""

from __future__ import annotations

import ast
import json
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "motorlib"
LAYERS = ["errors", "units", "safety", "motor", "flight", "matching", "files", "catalog", "present", "cli"]
# errors, units and safety are one layer (units raises QuantityError): all three sit at rank 0.
RANK = {name: max(0, i - 2) for i, name in enumerate(LAYERS)}

# Third-party packages each layer must not import (directly or inside a function).
FORBIDDEN = {
    "motor": {"lxml", "sqlite3", "pandas", "click", "rich", "matplotlib"},
    "flight": {"lxml", "sqlite3", "pandas", "click", "rich", "matplotlib", "scipy"},
    "matching": {"lxml", "sqlite3", "pandas", "click", "rich", "matplotlib", "scipy"},
    "files": {"click", "rich", "sqlite3"},
    "catalog": {"click", "rich"},
    "present": {"click"},
    "errors": {"numpy", "lxml", "sqlite3", "pandas", "click", "rich", "matplotlib", "scipy"},
    "units": {"numpy", "lxml", "sqlite3", "pandas", "click", "rich", "matplotlib", "scipy"},
    "safety": {"numpy", "lxml", "sqlite3", "pandas", "click", "rich", "matplotlib", "scipy"},
}


# The only places a layer may import a package it otherwise must not: inside one function that exists to hand
# results to that package (``FlightResults.to_frame`` builds a pandas DataFrame when called). The runtime probes
# below still require that importing the layer never loads it.
LAZY_BRIDGES = {("flight/results.py", "pandas")}


def _layer_of(path: Path) -> str:
    rel = path.relative_to(PACKAGE)
    return rel.parts[0] if len(rel.parts) > 1 else rel.stem


def _imports(path: Path) -> list[tuple[int, str]]:
    """(line, absolute dotted name) of every import in a module, relative imports resolved."""
    tree = ast.parse(path.read_text(), filename=str(path))
    package = ["motorlib", *path.relative_to(PACKAGE).parts[:-1]]
    found: list[tuple[int, str]] = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found += [(node.lineno, alias.name) for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package[: len(package) - node.level + 1]
                module = ".".join(base + ([node.module] if node.module else []))
                if not node.module:  # `from . import x`: each name is a module of that package
                    found += [(node.lineno, f"{module}.{alias.name}") for alias in node.names]
                    continue
            else:
                module = node.module or ""
            found.append((node.lineno, module))
    return found


MODULES = sorted(p for p in PACKAGE.rglob("*.py") if p.name != "__main__.py" and p != PACKAGE / "__init__.py")


def test_every_module_is_in_a_known_layer() -> None:
    unknown = {_layer_of(p) for p in MODULES} - set(LAYERS)
    assert not unknown, f"add these folders to LAYERS (and DEVELOPERS.md): {unknown}"


@pytest.mark.parametrize("path", MODULES, ids=lambda p: str(p.relative_to(PACKAGE)))
def test_imports_point_down_only(path: Path) -> None:
    layer = _layer_of(path)
    wrong = []
    for line, name in _imports(path):
        parts = name.split(".")
        if parts[0] == "motorlib":
            if len(parts) == 1:
                target = "__init__"
            else:
                target = parts[1]
            if target == "__init__" or target == "__version__":
                if layer != "cli":  # only the CLI may read the package top (for __version__)
                    wrong.append(f"line {line}: imports the package top")
                continue
            if RANK[target] > RANK[layer]:
                wrong.append(f"line {line}: {layer} imports {name} (a layer above)")
        elif parts[0] in FORBIDDEN.get(layer, set()):
            if (path.relative_to(PACKAGE).as_posix(), parts[0]) in LAZY_BRIDGES and line not in _top_level_lines(path):
                continue
            wrong.append(f"line {line}: {layer} imports {parts[0]}")
    assert not wrong, wrong


def _top_level_lines(path: Path) -> set[int]:
    """Lines of the imports at module level (not inside a function or class)."""
    tree = ast.parse(path.read_text(), filename=str(path))
    return {node.lineno for node in tree.body if isinstance(node, (ast.Import, ast.ImportFrom))}


def test_a_lazy_bridge_stays_inside_its_function() -> None:
    for module, package in LAZY_BRIDGES:
        path = PACKAGE / module
        lines = {line for line, name in _imports(path) if name.split(".")[0] == package}
        assert lines and not lines & _top_level_lines(path), (module, package)


def test_only_cli_imports_click_and_only_present_and_cli_import_rich() -> None:
    for path in MODULES:
        layer = _layer_of(path)
        tops = {name.split(".")[0] for _, name in _imports(path)}
        if layer != "cli":
            assert "click" not in tops, path
        if layer not in ("cli", "present"):
            assert "rich" not in tops, path


def test_the_static_probe_sees_imports_inside_functions() -> None:
    # Guard against a probe that can never fail: the CLI imports matplotlib charts only inside commands.
    names = {name for path in (PACKAGE / "cli").rglob("*.py") for _, name in _imports(path)}
    assert "motorlib.present.plots" in names


def _modules_after_import(statement: str) -> set[str]:
    code = f"import sys, json\n{statement}\nprint(json.dumps(sorted(sys.modules)))"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    return {name.split(".")[0] for name in json.loads(out)}


def _top_level_modules_of(module: str) -> set[str]:
    # Import the module alone, bypassing motorlib/__init__ (which re-exports the I/O modules too).
    code = (
        "import sys, types, importlib, json\n"
        "import importlib.util as u\n"
        "spec = u.find_spec('motorlib')\n"
        "pkg = types.ModuleType('motorlib'); pkg.__path__ = list(spec.submodule_search_locations)\n"
        "sys.modules['motorlib'] = pkg\n"
        f"importlib.import_module('{module}')\n"
        "print(json.dumps(sorted(sys.modules)))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout
    return {name.split(".")[0] for name in json.loads(out)}


@pytest.mark.parametrize("package", ["motorlib.motor", "motorlib.flight", "motorlib.matching"])
def test_numerics_stay_light_in_a_fresh_interpreter(package: str) -> None:
    loaded = _top_level_modules_of(package)
    assert not loaded & (FORBIDDEN[package.split(".")[1]] | {"scipy"})


def test_the_runtime_probe_can_see_a_heavy_import() -> None:
    assert "lxml" in _top_level_modules_of("motorlib.files.motor_xml")


def test_cli_start_up_imports_no_pandas_scipy_or_matplotlib() -> None:
    loaded = _modules_after_import("import motorlib.cli.main")
    assert not loaded & {"pandas", "scipy", "matplotlib"}


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
    assert not _modules_after_import(statement) & {"pandas", "scipy", "matplotlib"}


def _modules_imported_by_command(args: list[str]) -> set[str]:
    """Top-level names of every module a fresh ``python -m motorlib ARGS`` imports (``-X importtime``)."""
    run = subprocess.run([sys.executable, "-X", "importtime", "-m", "motorlib", *args], capture_output=True,
                         text=True, check=True, cwd=PACKAGE.parent)
    return {line.rsplit("|", 1)[1].strip().split(".")[0] for line in run.stderr.splitlines()
            if line.startswith("import time:") and "|" in line}


@pytest.mark.parametrize("args", [["--version"], ["--help"], ["match", "--help"]])
def test_version_and_help_import_no_numpy(args: list[str]) -> None:
    # Issue 16: the command line answers --version and --help at once, without loading the numerics.
    imported = _modules_imported_by_command(args)
    assert {"motorlib", "click"} <= imported  # the probe sees what the command imports
    assert not imported & {"numpy", "scipy", "pandas", "matplotlib", "lxml"}


def test_match_json_imports_no_rich() -> None:
    # Issue 16 (cold `match`): JSON to a pipe needs no terminal rendering. The bundled catalog is read-only, so
    # opening it has nothing to say on stderr either.
    airframe = str(PACKAGE.parent / "sample_curves" / "airframes" / "quibble-41.toml")
    loaded = _modules_imported_by_command(["match", airframe, "--catalog", str(PACKAGE.parent / "sample_curves"),
                                           "--target", "400", "--json"])
    assert "numpy" in loaded  # the probe sees the ranking's imports
    assert "rich" not in loaded


def test_a_command_imports_no_other_command_module() -> None:
    # Issue 16 (cold start): `motorlib match` loads cli/match.py, not the eleven other command modules.
    code = ("import sys\nfrom motorlib.cli.main import main\n"
            "try:\n    main(['match', '--help'])\nexcept SystemExit:\n    pass\n"
            "print(' '.join(m for m in sys.modules if m.startswith('motorlib.cli.')), file=sys.stderr)")
    run = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=PACKAGE.parent)
    cli_modules = set(run.stderr.split())
    assert "motorlib.cli.match" in cli_modules  # the probe sees the command's own module
    assert not cli_modules & {"motorlib.cli.scatter", "motorlib.cli.catalog", "motorlib.cli.fly",
                              "motorlib.cli.calibrate", "motorlib.cli.reduce"}


def _writable_sample_catalog(root: Path) -> Path:
    """A catalog folder holding the bundled sample curves, with a current index on disk."""
    from motorlib.catalog import Catalog

    with Catalog(root) as catalog:
        catalog.add_files(sorted((PACKAGE.parent / "sample_curves").glob("*.xml")))
    return root


def test_opening_a_catalog_for_a_ranking_imports_no_file_reader(tmp_path: Path) -> None:
    # Issue 16 (cold `match`): a current index answers everything a ranking asks (rows, and the motor pack from
    # its blobs); the XML reader (lxml) is for curve files, and no file is read.
    root = _writable_sample_catalog(tmp_path / "catalog")
    statement = (
        "from motorlib.catalog import Catalog\n"
        f"catalog = Catalog({str(root)!r})\n"
        "rows = catalog.rows(findings=False)\n"
        "assert len(rows) > 20 and catalog.motor_pack(rows).n_motors == len(rows)\n"
    )
    loaded = _modules_after_import(statement)
    assert {"numpy", "sqlite3"} <= loaded  # the probe sees what the reads import
    assert "lxml" not in loaded


def test_match_from_a_current_catalog_imports_no_file_reader(tmp_path: Path) -> None:
    root = _writable_sample_catalog(tmp_path / "catalog")
    airframe = str(PACKAGE.parent / "sample_curves" / "airframes" / "quibble-41.toml")
    loaded = _modules_imported_by_command(["match", airframe, "--catalog", str(root), "--target", "400", "--json"])
    assert "numpy" in loaded and "lxml" not in loaded
