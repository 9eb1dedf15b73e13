"""Every citation points inside the repository: CI clones the repository alone, so a source cited from a file
beside it (a folder of shared notes, the author's machine) cannot be checked by anyone who reads the code.

The check values the tests use live in ``tests/reference/check_values.md``; a citation names one of its entries
as ``tests/reference/check_values.md#<entry>``, and the entry must exist.
"""

from __future__ import annotations

import ast
import io
import re
import tokenize
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
CHECK_VALUES = ROOT / "tests" / "reference" / "check_values.md"
SCANNED_FOLDERS = ("motorlib", "tests", "tools", "data_schema")
SCANNED_SUFFIXES = (".py", ".md", ".toml", ".xsd", ".txt")

# Places outside the repository that citations used to name. The patterns are split so that this file does not
# match itself.
OUTSIDE = [
    (re.compile("check" + r"-values"), "the outside check-values file; cite tests/reference/check_values.md#<entry>"),
    (re.compile(r"(?:\.\./)+" + "shared" + r"\b|\bshared/" + "reference"), "a folder beside the repository"),
    (re.compile(r"(?<![\w.])/" + r"(?:work|home|Users)/"), "an absolute path on someone's machine"),
]
CITATION = re.compile(r"tests/reference/check_values\.md#([A-Za-z0-9-]+)")
BARE_CITATION = re.compile(r"(?<!tests/reference/)(?<![\w/])check_values\.md")
MD_LINK = re.compile(r"\]\(([^)\s]+)\)")
UP_PATH = re.compile(r"(?<![\w.])((?:\.\./)+[\w.-]+(?:/[\w.-]+)*)")


def _files() -> list[Path]:
    files = [p for p in ROOT.glob("*.md")]
    for folder in SCANNED_FOLDERS:
        files += [p for p in (ROOT / folder).rglob("*") if p.suffix in SCANNED_SUFFIXES and p.is_file()]
    return sorted(p for p in files if "__pycache__" not in p.parts)


def _scanned() -> list[Path]:
    """The files to check: all but this one, whose examples below cite outside places on purpose."""
    return [path for path in _files() if path != Path(__file__).resolve()]


def _entries() -> set[str]:
    return set(re.findall(r"^### +([a-z0-9-]+) *$", CHECK_VALUES.read_text(encoding="utf-8"), flags=re.MULTILINE))


def _prose(path: Path, text: str) -> list[tuple[int, str]]:
    """(line, text) of what a reader takes for prose: comments and docstrings of Python, all of other files."""
    if path.suffix != ".py":
        return list(enumerate(text.splitlines(), start=1))
    out = [(tok.start[0], tok.string) for tok in tokenize.generate_tokens(io.StringIO(text).readline)
           if tok.type == tokenize.COMMENT]
    for node in ast.walk(ast.parse(text)):
        if isinstance(node, (ast.Module, ast.ClassDef, ast.FunctionDef, ast.AsyncFunctionDef)) and node.body:
            first = node.body[0]
            if isinstance(first, ast.Expr) and isinstance(first.value, ast.Constant) and isinstance(first.value.value, str):
                out += [(first.lineno + i, line) for i, line in enumerate(first.value.value.splitlines())]
    return out


def outside_citations(path: Path, text: str, root: Path = ROOT, entries: set[str] | None = None) -> list[str]:
    """Every citation in ``text`` (the contents of ``path``) that leads outside ``root`` or to nothing."""
    entries = _entries() if entries is None else entries
    name = path.relative_to(root).as_posix()
    problems = []
    for number, line in enumerate(text.splitlines(), start=1):
        for pattern, what in OUTSIDE:
            if pattern.search(line):
                problems.append(f"{name}:{number}: {what}: {line.strip()}")
        for entry in CITATION.findall(line):
            if entry not in entries:
                problems.append(f"{name}:{number}: no entry #{entry} in tests/reference/check_values.md")
        if BARE_CITATION.search(line) and path.parent != CHECK_VALUES.parent:
            problems.append(f"{name}:{number}: cite check_values.md by its path, tests/reference/check_values.md")
    for number, line in _prose(path, text):  # ../ in prose: a path relative to the file must stay in the tree
        for target in UP_PATH.findall(line):
            if not (path.parent / target).resolve().is_relative_to(root):
                problems.append(f"{name}:{number}: {target} leads outside the repository")
    if path.suffix == ".md":
        for number, line in enumerate(text.splitlines(), start=1):
            for target in MD_LINK.findall(line):
                if re.match(r"[a-z]+:|#", target):  # a web address or a heading of this file
                    continue
                resolved = (path.parent / target.split("#")[0]).resolve()
                if not resolved.is_relative_to(root) or not resolved.exists():
                    problems.append(f"{name}:{number}: link {target} leads outside the repository or nowhere")
    return problems


def test_no_file_cites_a_path_outside_the_repository() -> None:
    entries = _entries()
    problems = [p for path in _scanned() for p in outside_citations(path, path.read_text(encoding="utf-8"), ROOT, entries)]
    assert not problems, "\n".join(problems)


def test_the_in_repository_file_is_cited() -> None:
    # The rule above could pass on a tree that cites nothing; the sources are meant to be cited.
    cited = {entry for path in _scanned() for entry in CITATION.findall(path.read_text(encoding="utf-8"))}
    assert len(cited) >= 15 and cited <= _entries()


@pytest.mark.parametrize(("relative", "text", "complaint"), [
    ("motorlib/x.py", "G = 9.8  # see " + "check" + "-values.md 1.1\n", "outside check-values file"),
    ("tests/x.py", "# values from ../" + "shared/reference/table.md\n", "folder beside"),
    ("README.md", "see [notes](../" + "shared/notes.md)\n", "folder beside"),
    ("tests/x.py", '"""Table 3 of ../../handbook.pdf."""\n', "leads outside the repository"),
    ("DEVELOPERS.md", "[style](../STYLE.md)\n", "leads outside the repository or nowhere"),
    ("tests/x.py", "# tests/reference/check_values.md#no-such-entry\n", "no entry #no-such-entry"),
    ("motorlib/x.py", "# check_values.md#atm-table\n", "by its path"),
    ("tests/x.py", "# /" + "work/notes/values.md\n", "absolute path"),
])
def test_the_rule_finds_each_kind_of_outside_citation(relative: str, text: str, complaint: str) -> None:
    problems = outside_citations(ROOT / relative, text, ROOT, {"atm-table"})
    assert any(complaint in problem for problem in problems), problems


@pytest.mark.parametrize(("relative", "text"), [
    ("tests/x.py", "# tests/reference/check_values.md#atm-table\n"),
    ("tests/x.py", 'slug("../../x")  # hostile input in a string, not a citation\n'),
    ("data_schema/FORMAT.md", "[samples](../sample_curves/)\n"),
    ("motorlib/files/x.py", '"""A slug: \'../x\' -> \'x\'."""\n'),
])
def test_the_rule_accepts_citations_inside_the_repository(relative: str, text: str) -> None:
    assert outside_citations(ROOT / relative, text, ROOT, {"atm-table"}) == []
