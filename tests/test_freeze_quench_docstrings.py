"""The ``>>>`` examples of the freezing, quench and boiling-curve modules run and print what
they say."""

import doctest
import importlib

import pytest

MODULES = ["advisor.analysis.freezing", "advisor.analysis.quench", "fem.boiling_curve"]


@pytest.mark.parametrize("name", MODULES)
def test_docstring_examples(name):
    if name == "fem.boiling_curve":
        pytest.importorskip("ht", reason="the boiling-curve builder needs the optional 'ht'")
    result = doctest.testmod(importlib.import_module(name), optionflags=doctest.ELLIPSIS)
    assert result.attempted > 0, f"{name} has no examples"
    assert result.failed == 0
