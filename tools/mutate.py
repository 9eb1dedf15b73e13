"""Mutation testing by hand: change one thing in a module, run its tests, see whether they notice.

Run from the repository root, one package (or a few modules) at a time; it is far too slow for CI::

    python tools/mutate.py motorlib/flight/events.py motorlib/flight/rules.py -n 40 --tests tests/flight
    python tools/mutate.py motorlib/motor -n 30            # tests default to the mirrored folder, tests/motor
    python tools/mutate.py motorlib/motor/checks.py --list  # the mutation sites only, nothing is run

Each module's mutation sites are found with the standard ``ast`` module; ``-n`` of them per module are drawn
with a fixed seed (``--seed``), so two runs on the same code try the same mutants. Every mutant is written into
a scratch copy of the repository (the working tree is never touched) and the chosen tests run there with
``pytest -x`` under a timeout. A mutant is *killed* when the tests fail or time out, and *survives* when they
pass. The tool prints one line per mutant and the score (killed / tried) per module.

Operators: comparison swaps (``<`` ↔ ``<=``, ``>`` ↔ ``>=``, ``==`` ↔ ``!=``, ``in`` ↔ ``not in``,
``is`` ↔ ``is not``), arithmetic swaps (``+`` ↔ ``-``, ``*`` ↔ ``/``, ``**`` → ``*``, ``//`` → ``/``,
``%`` → ``*``), boolean swaps (``and`` ↔ ``or``, ``True`` ↔ ``False``, ``not x`` → ``x``), sign drop
(``-x`` → ``x``), number tweaks (``0`` → ``1``, ``n`` → ``n + 1`` for integers, ``x`` → ``2x`` for floats)
and dropped statements (an expression, assignment, ``raise`` or ``return`` statement replaced by
``pass``). Docstrings, annotations, ``__all__`` and string constants are left alone.
"""

from __future__ import annotations

import argparse
import ast
import os
import random
import shutil
import signal
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

_COMPARE_SWAPS: dict[type, type] = {
    ast.Lt: ast.LtE, ast.LtE: ast.Lt, ast.Gt: ast.GtE, ast.GtE: ast.Gt, ast.Eq: ast.NotEq, ast.NotEq: ast.Eq,
    ast.In: ast.NotIn, ast.NotIn: ast.In, ast.Is: ast.IsNot, ast.IsNot: ast.Is,
}
_BINOP_SWAPS: dict[type, type] = {
    ast.Add: ast.Sub, ast.Sub: ast.Add, ast.Mult: ast.Div, ast.Div: ast.Mult, ast.Pow: ast.Mult,
    ast.FloorDiv: ast.Div, ast.Mod: ast.Mult,
}
_SYMBOL = {ast.Lt: "<", ast.LtE: "<=", ast.Gt: ">", ast.GtE: ">=", ast.Eq: "==", ast.NotEq: "!=",
           ast.In: "in", ast.NotIn: "not in", ast.Is: "is", ast.IsNot: "is not", ast.Add: "+", ast.Sub: "-",
           ast.Mult: "*", ast.Div: "/", ast.Pow: "**", ast.FloorDiv: "//", ast.Mod: "%", ast.And: "and",
           ast.Or: "or"}
_DROPPABLE = (ast.Expr, ast.Assign, ast.AugAssign, ast.Raise, ast.Return)


@dataclass(frozen=True)
class Site:
    """One mutation: the ``index``-th node of ``ast.walk`` order in the module, an operator and where it is."""

    index: int
    operator: str
    line: int
    text: str  # what changes, e.g. "< -> <="


def _skipped_nodes(tree: ast.Module) -> set[int]:
    """ids of nodes never mutated: docstrings, annotations, ``__all__`` and everything under them."""
    skip: set[int] = set()

    def under(node: ast.AST | None) -> None:
        if node is not None:
            skip.update(id(n) for n in ast.walk(node))

    for node in ast.walk(tree):
        body = getattr(node, "body", None)
        if isinstance(body, list) and body and isinstance(body[0], ast.Expr) \
                and isinstance(body[0].value, ast.Constant) and isinstance(body[0].value.value, str):
            under(body[0])  # a docstring
        if isinstance(node, ast.AnnAssign):
            under(node.annotation)
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            under(node.returns)
            for arg in node.args.args + node.args.kwonlyargs + node.args.posonlyargs:
                under(arg.annotation)
        if isinstance(node, ast.Assign) and any(isinstance(t, ast.Name) and t.id == "__all__" for t in node.targets):
            under(node)
        if isinstance(node, ast.If) and "TYPE_CHECKING" in ast.unparse(node.test):
            under(node)
        if isinstance(node, ast.JoinedStr):
            under(node)  # f-string format specs are text
    return skip


def _sites(tree: ast.Module) -> list[Site]:
    """Every mutation site of a module, in a fixed order."""
    skip = _skipped_nodes(tree)
    out: list[Site] = []
    for index, node in enumerate(ast.walk(tree)):
        if id(node) in skip:
            continue
        line = getattr(node, "lineno", 0)
        if isinstance(node, ast.Compare):
            for k, op in enumerate(node.ops):
                new = _COMPARE_SWAPS.get(type(op))
                if new:
                    out.append(Site(index, f"compare:{k}", line, f"{_SYMBOL[type(op)]} -> {_SYMBOL[new]}"))
        elif isinstance(node, (ast.BinOp, ast.AugAssign)) and type(node.op) in _BINOP_SWAPS:
            new = _BINOP_SWAPS[type(node.op)]
            out.append(Site(index, "binop", line, f"{_SYMBOL[type(node.op)]} -> {_SYMBOL[new]}"))
        elif isinstance(node, ast.BoolOp):
            out.append(Site(index, "boolop", line, "and -> or" if isinstance(node.op, ast.And) else "or -> and"))
        elif isinstance(node, ast.UnaryOp) and isinstance(node.op, (ast.USub, ast.Not)):
            out.append(Site(index, "unary", line, "drop " + ("-" if isinstance(node.op, ast.USub) else "not")))
        elif isinstance(node, ast.Constant) and isinstance(node.value, bool):
            out.append(Site(index, "bool", line, f"{node.value} -> {not node.value}"))
        elif isinstance(node, ast.Constant) and type(node.value) in (int, float):
            out.append(Site(index, "number", line, f"{node.value!r} -> {_tweak(node.value)!r}"))
        if isinstance(node, _DROPPABLE) and line:
            out.append(Site(index, "drop", line, f"drop `{ast.unparse(node).splitlines()[0][:50]}`"))
    return out


def _tweak(value: int | float) -> int | float:
    if value == 0:
        return type(value)(1)
    return value + 1 if isinstance(value, int) else value * 2.0


class _Apply(ast.NodeTransformer):
    """Applies one :class:`Site` to a fresh copy of the tree (nodes are matched by ``ast.walk`` position)."""

    def __init__(self, tree: ast.Module, site: Site) -> None:
        self.target = list(ast.walk(tree))[site.index]
        self.site = site

    def visit(self, node: ast.AST) -> ast.AST | None:
        if node is not self.target:
            return self.generic_visit(node)
        op = self.site.operator
        if op.startswith("compare:"):
            k = int(op.split(":")[1])
            node.ops[k] = _COMPARE_SWAPS[type(node.ops[k])]()
        elif op == "binop":
            node.op = _BINOP_SWAPS[type(node.op)]()
        elif op == "boolop":
            node.op = ast.Or() if isinstance(node.op, ast.And) else ast.And()
        elif op == "unary":
            return node.operand
        elif op == "bool":
            node.value = not node.value
        elif op == "number":
            node.value = _tweak(node.value)
        elif op == "drop":
            return ast.copy_location(ast.Pass(), node)
        return node


def mutated_source(source: str, site: Site) -> str:
    """The module's source with one mutation applied (re-printed by ``ast.unparse``)."""
    tree = ast.parse(source)
    new = _Apply(tree, site).visit(tree)
    return ast.unparse(ast.fix_missing_locations(new))


def _modules(paths: list[str]) -> list[Path]:
    out: list[Path] = []
    for p in paths:
        path = (ROOT / p).resolve() if not Path(p).is_absolute() else Path(p)
        out.extend(sorted(path.rglob("*.py")) if path.is_dir() else [path])
    return [m for m in out if m.name != "__init__.py" or m.stat().st_size > 400]


def _default_tests(module: Path) -> list[str]:
    """The mirrored test folder (motorlib/flight/x.py -> tests/flight), else the whole suite."""
    rel = module.relative_to(ROOT / "motorlib")
    folder = ROOT / "tests" / rel.parent
    return [str(folder.relative_to(ROOT))] if rel.parent.parts and folder.is_dir() else ["tests"]


def _run_tests(workdir: Path, tests: list[str], extra: list[str], timeout_s: float) -> str:
    env = dict(os.environ, PYTHONDONTWRITEBYTECODE="1", PYTHONPATH=str(workdir))
    cmd = [sys.executable, "-m", "pytest", "-x", "-q", "-p", "no:cacheprovider", "-o", "addopts=",
           "--ignore=tests/benchmarks", *extra, *tests]
    try:
        done = subprocess.run(cmd, cwd=workdir, env=env, capture_output=True, timeout=timeout_s)
    except subprocess.TimeoutExpired:
        return "timeout"
    return {0: "survived", 1: "killed"}.get(done.returncode, f"error {done.returncode}")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0],
                                     formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("paths", nargs="+", help="modules or package folders under motorlib/")
    parser.add_argument("-n", "--sample", type=int, default=30, help="mutants per module (default 30; 0 = all)")
    parser.add_argument("--seed", type=int, default=17, help="sampling seed (default 17)")
    parser.add_argument("--tests", nargs="+", help="test paths or node ids (default: the mirrored tests/ folder)")
    parser.add_argument("-k", dest="keyword", help="passed to pytest -k")
    parser.add_argument("--timeout", type=float, default=0.0,
                        help="seconds per mutant (default: 5 x the unmutated run + 60 s)")
    parser.add_argument("--list", action="store_true", help="print the sampled mutation sites and stop")
    args = parser.parse_args(argv)
    signal.signal(signal.SIGTERM, lambda *_: sys.exit(1))  # a stopped run still removes its scratch copy
    extra = ["-k", args.keyword] if args.keyword else []

    plan: list[tuple[Path, str, Site]] = []
    for module in _modules(args.paths):
        source = module.read_text(encoding="utf-8")
        sites = _sites(ast.parse(source))
        chosen = sites if not args.sample or args.sample >= len(sites) else \
            sorted(random.Random(f"{args.seed}:{module.name}").sample(sites, args.sample), key=lambda s: s.index)
        plan.extend((module, source, s) for s in chosen)
        print(f"{module.relative_to(ROOT)}: {len(sites)} sites, {len(chosen)} sampled")
    if args.list:
        for module, _, s in plan:
            print(f"  {module.relative_to(ROOT)}:{s.line}: {s.operator:10} {s.text}")
        return 0

    scores: dict[Path, list[int]] = {}
    survivors: list[str] = []
    with tempfile.TemporaryDirectory(prefix="mutate-") as scratch:
        work = Path(scratch) / "repo"
        shutil.copytree(ROOT, work, ignore=shutil.ignore_patterns(".git", "__pycache__", ".hypothesis",
                                                                  "*.egg-info", ".venv", ".pytest_cache"))
        baseline: dict[tuple[str, ...], float] = {}
        for module, source, site in plan:
            tests = [t for t in (args.tests or _default_tests(module)) if (ROOT / t.split("::")[0]).exists()]
            key = tuple(tests)
            if key not in baseline:
                start = time.monotonic()
                outcome = _run_tests(work, tests, extra, 3600.0)
                baseline[key] = time.monotonic() - start
                print(f"baseline {' '.join(tests)}: {outcome} in {baseline[key]:.1f} s")
                if outcome != "survived":
                    print("the tests fail on the unmutated code; fix that first", file=sys.stderr)
                    return 2
            timeout_s = args.timeout or 5 * baseline[key] + 60.0
            target = work / module.relative_to(ROOT)
            target.write_text(mutated_source(source, site), encoding="utf-8")
            try:
                outcome = _run_tests(work, tests, extra, timeout_s)
            finally:
                target.write_text(source, encoding="utf-8")
            killed = outcome != "survived"
            tally = scores.setdefault(module, [0, 0])
            tally[0] += killed
            tally[1] += 1
            where = f"{module.relative_to(ROOT)}:{site.line}"
            print(f"{outcome.upper():9} {where}: {site.text}", flush=True)
            if not killed:
                survivors.append(f"{where}: {site.text}")

    print("\nscore per module (killed / tried)")
    total = [0, 0]
    for module, (killed, tried) in scores.items():
        total[0] += killed
        total[1] += tried
        print(f"  {str(module.relative_to(ROOT)):45} {killed:4d} / {tried:<4d} {100.0 * killed / tried:5.1f} %")
    if total[1]:
        print(f"  {'all':45} {total[0]:4d} / {total[1]:<4d} {100.0 * total[0] / total[1]:5.1f} %")
    if survivors:
        print("\nsurvivors")
        print("\n".join(f"  {s}" for s in survivors))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
