"""The ``>>>`` examples in the fit modules' docstrings run and print what they say."""

import doctest
import importlib

import pytest

MODULES = [
    "advisor.fitting.measured",
    "advisor.fitting.parameters",
    "advisor.fitting.problem",
    "advisor.fitting.lumped_fit",
    "advisor.fitting.fragment",
]


@pytest.mark.parametrize("name", MODULES)
def test_fit_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0, f"{name} has no examples"
    assert result.failed == 0
