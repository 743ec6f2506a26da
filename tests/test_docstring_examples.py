"""The ``>>>`` examples in the public entry points' docstrings run and print what they say."""

import doctest
import importlib

import pytest

MODULES = [
    "geometries.shapes",
    "geometries.meshing",
    "fem.materials",
    "fem.model",
    "fem.transient",
    "advisor.analysis.assessment",
    "advisor.analysis.modes",
    "advisor.analysis.quick",
    "geometries.section",
]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0, f"{name} has no examples"
    assert result.failed == 0
