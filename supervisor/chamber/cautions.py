"""The cautions printed with every treatment plan and log (templates/treatment-cautions.toml)."""

from __future__ import annotations

import tomllib
from functools import lru_cache

from supervisor.errors import SupervisorError
from supervisor.resources import templates_dir

CAUTIONS_FILE = "treatment-cautions.toml"


@lru_cache(maxsize=1)
def _load() -> tuple[str, ...]:
    path = templates_dir() / CAUTIONS_FILE
    try:
        data = tomllib.loads(path.read_text("utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        raise SupervisorError(f"template {CAUTIONS_FILE}: cannot be read ({exc})") from None
    entries = data.get("cautions")
    if data.get("schema") != "supervisor-cautions/1" or not isinstance(entries, list) \
            or not entries:
        raise SupervisorError(f"template {CAUTIONS_FILE}: needs schema 'supervisor-cautions/1' "
                              "and at least one [[cautions]] entry")
    texts = []
    for n, e in enumerate(entries, start=1):
        text = e.get("text") if isinstance(e, dict) else None
        if not isinstance(text, str) or not text.strip():
            raise SupervisorError(f"template {CAUTIONS_FILE} caution {n}: needs a text")
        texts.append(text.strip())
    return tuple(texts)


def treatment_cautions() -> list[str]:
    """The caution texts, in printed order."""
    return list(_load())
