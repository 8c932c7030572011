"""The checklist record: its JSON bytes, its hash, its file names, atomic writing.

The record is the ``supervisor.check/1`` object produced by the check, with
three keys added: ``plan_text`` (the plan file as checked), ``checklist``
(the pre-dive items per diving mode and the cautions, exactly as printed) and
nothing else.  It is written as UTF-8 JSON with sorted keys, a two-space
indent and a final newline, so the same check always gives the same bytes.

**Document hash.**  The *document sha256* of a checklist is the SHA-256 of
the bytes of ``<job>-checklist.json``.  The PDF prints it in full on page 1
and its first 16 hex digits on every page, and stores it in the PDF
keywords, so a paper copy, the PDF and the JSON record can be matched with
any sha256 tool.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import re
import tempfile
import unicodedata
from collections.abc import Iterable, Mapping, Sequence
from pathlib import Path
from typing import Any

from supervisor.errors import InputError, SupervisorError
from supervisor.report.templates import Checklist, load_caution_entries, load_checklist

CHECK_SCHEMA = "supervisor.check/1"
RECORD_SCHEMA = "supervisor.checklist/1"
HASH_DEFINITION = (
    "document sha256 = SHA-256 of the bytes of this JSON file as written "
    "(UTF-8, keys sorted, two-space indent, final newline)"
)

_RESERVED = {"con", "prn", "aux", "nul"} | {f"com{i}" for i in range(10)} | {
    f"lpt{i}" for i in range(10)
}


# letters that Unicode decomposition (NFKD) does not reduce to ASCII, spelt the usual way
_LETTERS = str.maketrans({
    "æ": "ae", "ø": "o", "œ": "oe", "ß": "ss", "ł": "l", "đ": "d", "ð": "d", "þ": "th",
    "ı": "i", "ħ": "h", "ŧ": "t", "ŀ": "l", "ŋ": "ng", "ĸ": "k", "ſ": "s",
})


def transliterate(text: str) -> str:
    """Fold text to ASCII for a file name, keeping Latin names recognisable.

    Accents are dropped through NFKD decomposition (``"é"`` gives ``"e"``,
    ``"å"`` gives ``"a"``) and letters that do not decompose are spelt out
    (``"Ærøskøbing"`` gives ``"aeroskobing"``, ``"Straße"`` ``"strasse"``,
    ``"Łódź"`` ``"lodz"``).  The result is lower case; characters of other
    scripts are left out.
    """
    lowered = text.lower().translate(_LETTERS)
    return unicodedata.normalize("NFKD", lowered).encode("ascii", "ignore").decode("ascii")


def job_slug(title: object, max_length: int = 60) -> str:
    """A file-name-safe slug of a job title.

    Parameters
    ----------
    title : object
        The job title as the user typed it (any script).
    max_length : int
        Longest slug returned [characters].

    Returns
    -------
    str
        Lower-case ASCII letters, digits and single hyphens, accents folded
        and other Latin letters spelt out by :func:`transliterate`
        (``"Pier 7 — Zoë"`` gives ``"pier-7-zoe"``, ``"Ærøskøbing"``
        ``"aeroskobing"``).  A title with no
        ASCII-foldable letter (``"王芳"``) gives ``"job-"`` and the first 10 hex
        digits of the title's SHA-256, so distinct titles keep distinct names.
    """
    text = "" if title is None else str(title)
    folded = transliterate(text)
    slug = re.sub(r"[^a-z0-9]+", "-", folded.lower()).strip("-")
    slug = slug[:max_length].rstrip("-")
    if not slug or slug in _RESERVED:
        digest = hashlib.sha256(text.encode("utf-8")).hexdigest()[:10]
        slug = f"job-{slug}-{digest}" if slug else f"job-{digest}"
    return slug


def sanitize(value: Any) -> Any:
    """Make a value strictly JSON-ready: non-finite floats become ``None``.

    Tuples become lists and mapping keys become strings; anything that is not
    a JSON type is turned into its ``str``.
    """
    if isinstance(value, Mapping):
        return {str(k): sanitize(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [sanitize(v) for v in value]
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if value is None or isinstance(value, bool | int | str):
        return value
    if hasattr(value, "item"):  # numpy scalars
        return sanitize(value.item())
    return str(value)


def _caution_key(text: str) -> str:
    """Caution texts compare equal when they differ only in case and spacing."""
    return " ".join(text.casefold().split())


def _mode_groups(check: Mapping[str, Any], template: Checklist) -> list[dict[str, Any]]:
    dives = check.get("dives") or []
    groups: dict[str | None, dict[str, Any]] = {}
    for dive in dives:
        if not isinstance(dive, Mapping):
            continue
        given = dive.get("mode")
        canonical, items = template.for_mode(str(given) if given is not None else "")
        group = groups.setdefault(
            canonical,
            {
                "mode": canonical,
                "mode_as_given": [],
                "dives": [],
                "items": [i.to_json() for i in items],
            },
        )
        if given not in group["mode_as_given"]:
            group["mode_as_given"].append(given)
        group["dives"].append(dive.get("id"))
    if not groups:
        groups[None] = {
            "mode": None,
            "mode_as_given": [],
            "dives": [],
            "items": [i.to_json() for i in template.items],
        }
    known = [g for k, g in groups.items() if k is not None]
    unknown = [g for k, g in groups.items() if k is None]
    return known + unknown


def build_record(
    check: Mapping[str, Any],
    plan_bytes: bytes,
    *,
    template: Checklist | None = None,
    cautions: Sequence[str] | None = None,
) -> dict[str, Any]:
    """Build the checklist record from a check result and the plan file bytes.

    Parameters
    ----------
    check : mapping
        A ``supervisor.check/1`` object (see DEVELOPERS.md).
    plan_bytes : bytes
        The plan file exactly as read.
    template : Checklist, optional
        Pre-dive items (default: the bundled template).
    cautions : sequence of str, optional
        Cautions (default: the bundled ``cautions.toml``); the check's own
        ``cautions`` are appended after them, except those that a bundled
        caution already says (its ``covers`` list) and exact repeats, so each
        caution is printed once.

    Returns
    -------
    dict
        The record, JSON-ready.

    Raises
    ------
    SupervisorError
        If ``check`` is not a ``supervisor.check/1`` object.
    InputError
        If the plan is not UTF-8 text, or its SHA-256 differs from the one
        the check recorded (the file changed while it was being checked).
    """
    if not isinstance(check, Mapping) or check.get("schema") != CHECK_SCHEMA:
        raise SupervisorError(f"the check result is not a {CHECK_SCHEMA} object")
    try:
        plan_text = plan_bytes.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError("plan", "is not UTF-8 text; save the plan file as UTF-8") from None
    plan_sha = hashlib.sha256(plan_bytes).hexdigest()
    if check.get("plan_sha256") not in (None, plan_sha):
        raise InputError(
            "plan",
            "changed while it was being checked (its sha256 differs from the check's); "
            "run the checklist again",
        )
    template = template or load_checklist()
    covered: set[str] = set()
    if cautions is None:
        entries = load_caution_entries()
        all_cautions = [c.text for c in entries]
        covered = {_caution_key(t) for c in entries for t in c.covers}
    else:
        all_cautions = list(cautions)
    seen = {_caution_key(t) for t in all_cautions} | covered
    for extra in check.get("cautions") or []:
        if isinstance(extra, str) and _caution_key(extra) not in seen:
            all_cautions.append(extra)
            seen.add(_caution_key(extra))
    record = sanitize(check)
    record["plan_sha256"] = plan_sha
    record["plan_text"] = plan_text
    record["checklist"] = {
        "schema": RECORD_SCHEMA,
        "title": template.title,
        "template_revision": template.revision,
        "note": template.note,
        "modes": _mode_groups(check, template),
        "cautions": all_cautions,
        "document_hash": HASH_DEFINITION,
    }
    return record


def record_bytes(record: Mapping[str, Any]) -> bytes:
    """Serialise a record deterministically (see the module docstring)."""
    text = json.dumps(record, ensure_ascii=False, sort_keys=True, indent=2, allow_nan=False)
    return (text + "\n").encode("utf-8")


def document_sha256(data: bytes) -> str:
    """The document sha256 of a checklist: SHA-256 of its JSON record bytes [hex]."""
    return hashlib.sha256(data).hexdigest()


def output_paths(out_dir: Path, slug: str) -> dict[str, Path]:
    """The files a checklist writes: ``pdf``, ``json`` and ``sig`` (detached signature)."""
    base = out_dir / f"{slug}-checklist"
    return {
        "pdf": base.with_name(base.name + ".pdf"),
        "json": base.with_name(base.name + ".json"),
        "sig": base.with_name(base.name + ".json.sig"),
    }


def _default_mode() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def write_atomically(files: Iterable[tuple[Path, bytes, int | None]]) -> None:
    """Write several files so that each is either wholly old or wholly new.

    Every file is first written and synced to a temporary file in its target
    folder; only when all are written are they renamed over their targets.
    If anything fails before the renames, the temporaries are removed and no
    target is touched.

    Parameters
    ----------
    files : iterable of (Path, bytes, int or None)
        Target path, content and file mode (``None``: 0666 less the umask).

    Raises
    ------
    OSError
        If a folder is missing or not writable; nothing is changed then.
    """
    staged: list[tuple[str, Path]] = []
    try:
        for path, data, mode in files:
            fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
            staged.append((tmp, path))
            with os.fdopen(fd, "wb") as fh:
                os.fchmod(fh.fileno(), _default_mode() if mode is None else mode)
                fh.write(data)
                fh.flush()
                os.fsync(fh.fileno())
        for tmp, path in staged:
            os.replace(tmp, path)
        staged = []
    finally:
        for tmp, _ in staged:
            try:
                os.unlink(tmp)
            except FileNotFoundError:
                pass
