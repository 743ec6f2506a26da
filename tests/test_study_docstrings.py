"""The ``>>>`` examples of the study modules' entry points run and print what they say."""

import doctest
import importlib

import pytest

MODULES = [
    "advisor.studies.convergence",
    "advisor.studies.validity",
    "advisor.studies.uncertainty",
]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    pytest.importorskip("pandas", reason="the study tables are pandas DataFrames")
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0, f"{name} has no examples"
    assert result.failed == 0
