"""The docstring examples run as tests: an example that no longer holds is a failing test, not stale text."""

from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

import motorlib

MODULES = sorted(m.name for m in pkgutil.walk_packages(motorlib.__path__, "motorlib.") if not m.ispkg)


def _modules_with_examples() -> list[str]:
    finder = doctest.DocTestFinder()
    out = []
    for name in MODULES:
        module = importlib.import_module(name)
        if any(t.examples for t in finder.find(module, name, module=module)):
            out.append(name)
    return out


WITH_EXAMPLES = _modules_with_examples()


def test_the_examples_are_found() -> None:
    # a finder that silently found nothing would make the test below pass vacuously
    assert {"motorlib.flight.atmosphere", "motorlib.motor.classes", "motorlib.present.display"} <= set(WITH_EXAMPLES)


@pytest.mark.parametrize("name", WITH_EXAMPLES)
def test_docstring_examples(name: str) -> None:
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE, report=False)
    assert result.attempted > 0
    assert result.failed == 0, f"{result.failed} of {result.attempted} examples in {name} fail (run doctest on it)"
