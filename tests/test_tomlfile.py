"""TOML input with bounded nesting (issue 13: 1,000 levels was an internal error)."""

from __future__ import annotations

import pytest

from supervisor.tomlfile import MAX_NESTING, TomlError, nesting_depth, parse_toml


@pytest.mark.parametrize("text", [
    "x = " + "[" * 1000 + "]" * 1000,            # reproducer: 1,000 nested arrays
    "x = " + "{a = " * 1000 + "1" + "}" * 1000,  # 1,000 nested inline tables
    "x = " + "[" * 17 + "]" * 17,                # just past the cap
])
def test_deep_nesting_is_bad_input(text):
    with pytest.raises(TomlError) as err:
        parse_toml(text)
    assert f"more than {MAX_NESTING} levels" in err.value.reason
    assert "\n" not in err.value.reason


def test_nesting_at_the_cap_is_read():
    doc = parse_toml("x = " + "[" * (MAX_NESTING - 1) + "]" * (MAX_NESTING - 1))
    assert nesting_depth(doc) == MAX_NESTING


def test_syntax_error_is_one_line():
    with pytest.raises(TomlError) as err:
        parse_toml("a = \n = 3")
    assert err.value.reason.startswith("not valid TOML (") and "\n" not in err.value.reason


@pytest.mark.parametrize(("value", "depth"), [(1, 0), ({}, 1), ({"a": [1]}, 2),
                                              ({"a": [{"b": {}}]}, 4)])
def test_nesting_depth(value, depth):
    assert nesting_depth(value) == depth
