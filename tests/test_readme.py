"""The README keeps its promised shape, and CI runs exactly the README's test command."""

from __future__ import annotations

import re

from .conftest import ROOT


def _commands() -> list[str]:
    text = (ROOT / "README.md").read_text()
    return re.findall(r"```bash\n(.*?)\n```", text, re.S)


def test_readme_starts_with_the_job_then_two_setup_commands() -> None:
    text = (ROOT / "README.md").read_text()
    body = text.split("\n", 1)[1].strip()
    paragraphs = body.split("\n\n")
    assert not paragraphs[0].startswith("```")  # one paragraph stating the job comes first
    assert paragraphs[1].startswith("```bash") and paragraphs[2].startswith("```bash")
    install_run, install_test = _commands()[:2]
    assert "\n" not in install_run and "\n" not in install_test
    assert "pip install ." in install_run and "motorlib " in install_run
    assert "pip install '.[test]'" in install_test


def test_ci_runs_the_readme_test_command() -> None:
    test_command = _commands()[1].split("&&")[-1].strip()
    ci = (ROOT / ".ci" / "run").read_text()
    assert test_command in ci.splitlines()


def test_readme_shows_the_safety_caution() -> None:
    text = (ROOT / "README.md").read_text().lower()
    for phrase in ("safety code", "range safety officer", "certification", "estimates"):
        assert phrase in text


def test_readme_python_examples_run(monkeypatch) -> None:
    # The package-layout issue: the README's Python tour must keep working after modules move.
    blocks = re.findall(r"```python\n(.*?)\n```", (ROOT / "README.md").read_text(), re.S)
    assert blocks
    monkeypatch.chdir(ROOT)
    for block in blocks:
        exec(compile(block, "README.md", "exec"), {})
