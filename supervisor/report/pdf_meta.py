"""What the checklist PDF says about itself in its metadata (no reportlab here).

The PDF's keywords carry, as ``name:value`` words, the document sha256 (the
SHA-256 of the JSON record), the verdict printed on page 1 and the count of
findings by severity::

    document-sha256:<64 hex digits> verdict:needs-review fail:0 warn:9 info:12 pass:103

The author is the plan's diving supervisor.  The signature covers the whole
file, metadata included, so ``supervisor verify`` can report what a signed
checklist says and who it names without trusting anything outside the
signature.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Mapping
from dataclasses import dataclass

KEYWORD_PREFIX = "document-sha256:"
VERDICT_PREFIX = "verdict:"
SEVERITIES = ("fail", "warn", "info", "pass")
_VERDICTS = ("conforms", "needs-review", "does-not-conform")


@dataclass(frozen=True)
class PdfFacts:
    """The facts read back from a checklist PDF's keywords."""

    document_sha256: str | None
    verdict: str | None
    counts: dict[str, int] | None


def keywords(document_sha256: str, verdict: str, counts: Mapping[str, int]) -> list[str]:
    """The keyword words of a checklist PDF (see the module docstring)."""
    return [f"{KEYWORD_PREFIX}{document_sha256}", f"{VERDICT_PREFIX}{verdict}",
            *(f"{k}:{int(counts.get(k, 0))}" for k in SEVERITIES)]


def read_keywords(text: str) -> PdfFacts:
    """Parse the keywords written by :func:`keywords`; unknown words are ignored."""
    digest = verdict = None
    counts: dict[str, int] = {}
    for word in text.replace(",", " ").split():
        name, _, value = word.partition(":")
        if word.startswith(KEYWORD_PREFIX) and re.fullmatch(r"[0-9a-f]{64}", value):
            digest = value
        elif word.startswith(VERDICT_PREFIX) and value in _VERDICTS:
            verdict = value
        elif name in SEVERITIES and value.isdigit():
            counts[name] = int(value)
    return PdfFacts(digest, verdict, counts if len(counts) == len(SEVERITIES) else None)


def _person_key(name: str) -> str:
    folded = unicodedata.normalize("NFKC", name).casefold()
    return " ".join(folded.split())


def same_person(a: str, b: str) -> bool:
    """Whether two printed names are the same, ignoring case, spacing and Unicode forms."""
    return _person_key(a) == _person_key(b)
