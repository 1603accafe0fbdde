"""The examples in the docstrings run and give what they show."""

import doctest

import hadamard_registry as hr


def test_docstring_examples():
    flags = doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE
    result = doctest.testmod(hr, optionflags=flags, verbose=False)
    assert result.attempted >= 30
    assert result.failed == 0
