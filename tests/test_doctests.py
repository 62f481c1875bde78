"""Run the examples in every simheat docstring (the README's test command runs them).

Each module's doctests run with the standard library's :mod:`doctest`; a module
whose examples fail shows the failing example in the assertion message.
"""

import doctest
import importlib
import io
import pkgutil

import pytest

import simheat

MODULES = sorted(
    info.name for info in pkgutil.walk_packages(simheat.__path__, "simheat.")
)
FLAGS = doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples_run(name):
    module = importlib.import_module(name)
    finder = doctest.DocTestFinder(exclude_empty=True)
    out = io.StringIO()
    runner = doctest.DocTestRunner(optionflags=FLAGS)
    for test in finder.find(module, name):
        runner.run(test, out=out.write)
    result = runner.summarize(verbose=False)
    assert result.failed == 0, out.getvalue()


def test_examples_are_found():
    # guards the finder: simheat.report.output has examples that must be run
    module = importlib.import_module("simheat.report.output")
    tests = doctest.DocTestFinder(exclude_empty=True).find(module)
    assert sum(len(t.examples) for t in tests) >= 2
