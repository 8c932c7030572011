"""The reference package's public names load on first use (``supervisor.references``)."""

from __future__ import annotations

import subprocess
import sys

import pytest

import supervisor.references as refs


def test_every_public_name_is_exported_lazily():
    assert sorted(refs.__all__) == sorted(refs._EXPORTS)
    for name in refs.__all__:
        assert getattr(refs, name) is getattr(
            __import__(f"supervisor.references.{refs._EXPORTS[name]}", fromlist=[name]), name)
    assert set(refs.__all__) <= set(dir(refs))


def test_unknown_name_is_an_attribute_error():
    with pytest.raises(AttributeError, match="no attribute 'nosuch'"):
        refs.nosuch  # noqa: B018


def test_row_hash_alone_does_not_load_the_schema():
    code = ("import sys\nfrom supervisor.references.canonical import row_hash\n"
            "print(sorted(m for m in sys.modules if m.startswith('supervisor.references')"
            " or m == 'pydantic'))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=60).stdout
    assert out.strip() == "['supervisor.references', 'supervisor.references.canonical']"
