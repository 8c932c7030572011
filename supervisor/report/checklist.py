"""Make the checklist files from a check result: PDF, JSON record, detached signature.

``make_checklist`` builds everything in memory first (record, PDF, both
signatures) and only then writes, atomically, so a failure at any step (a
bad key, a wrong passphrase, a full disk) leaves the output folder as it was.

**Files already in the folder.**  The files are named after the job title
(``<slug>-checklist.pdf``, see :func:`~supervisor.report.document.job_slug`).

* A *signed* checklist (a ``.json.sig`` beside it, or a PDF whose structure
  holds a signature) is never written over: a signed checklist is a record,
  and replacing it needs a deliberate act (moving it away, or choosing
  another folder).
* An unsigned checklist *of the same job* (the same job title, exactly) is
  replaced: the checklist is regenerated from the plan as it is now.
* An unsigned checklist of *another* job whose title gives the same file
  name, or a file at one of those names that is not a checklist this tool
  can read, is refused, never silently replaced.

Signatures are found by reading the PDF's structure (pyHanko's reader),
never by searching its bytes, so text typed into the plan cannot make an
unsigned checklist look signed.  pyHanko and cryptography are imported only
when a checklist is signed or an existing PDF is examined.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from supervisor.errors import InputError
from supervisor.report.document import (
    build_record,
    document_sha256,
    job_slug,
    output_paths,
    record_bytes,
    write_atomically,
)
from supervisor.report.fonts import clean
from supervisor.report.pdf import render_pdf

if TYPE_CHECKING:
    from supervisor.report.keys import SigningIdentity

SIGN_REASON = "Diving supervisor's pre-dive checklist"
_MOVE = "move it away or choose another --out folder"


@dataclass(frozen=True)
class ChecklistFiles:
    """What :func:`make_checklist` wrote."""

    pdf: Path
    json: Path
    signature: Path | None
    document_sha256: str
    signer: str | None
    plan_supervisor: str | None = None

    @property
    def signed_in_place(self) -> bool:
        """Whether the signer is someone other than the plan's supervisor."""
        from supervisor.report.pdf_meta import same_person

        return (self.signer is not None and self.plan_supervisor is not None
                and not same_person(self.signer, self.plan_supervisor))


def _pdf_title(path: Path) -> tuple[bool, str | None]:
    """Whether an existing PDF is signed (by its structure) and its job title.

    Raises
    ------
    InputError
        If the file is not a PDF that can be read.
    """
    from supervisor.report.verify import pdf_facts

    try:
        return pdf_facts(path.read_bytes())
    except Exception:
        raise InputError("--out", f"{path} is there but is not a checklist PDF this tool can "
                                  f"read, so it is not replaced; {_MOVE}") from None


def _json_title(path: Path) -> str | None:
    try:
        record = json.loads(path.read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError, RecursionError):
        record = None
    job = record.get("job") if isinstance(record, dict) else None
    if not isinstance(record, dict) or "checklist" not in record or not isinstance(job, dict):
        raise InputError("--out", f"{path} is there but is not a checklist record this tool "
                                  f"can read, so it is not replaced; {_MOVE}")
    title = job.get("title")
    return title if isinstance(title, str) else None


def refuse_existing(paths: Mapping[str, Path], title: str | None) -> None:
    """Refuse to write over a signed checklist, or over another job's.

    Parameters
    ----------
    paths : mapping
        The ``pdf``, ``json`` and ``sig`` paths about to be written.
    title : str or None
        The job title of the checklist about to be written.

    Raises
    ------
    InputError
        If a signed checklist is there, or an unsigned one of another job
        (another title with the same file name), or a file that is not a
        readable checklist.
    """
    if paths["sig"].exists():
        raise InputError("--out", f"{paths['sig']} is a signed checklist and is never "
                                  f"replaced; {_MOVE}")
    theirs: list[tuple[Path, str | None, str | None]] = []
    if paths["pdf"].exists():
        signed, pdf_title = _pdf_title(paths["pdf"])
        if signed:
            raise InputError("--out", f"{paths['pdf']} is a signed checklist and is never "
                                      f"replaced; {_MOVE}")
        # the PDF's title is the job title as printed (normalised by fonts.clean)
        theirs.append((paths["pdf"], pdf_title, clean(title or "untitled job")))
    if paths["json"].exists():
        theirs.append((paths["json"], _json_title(paths["json"]), title))
    for path, other, want in theirs:
        if other != want:
            shown = "no title" if other is None else repr(other[:80])
            raise InputError("--out", f"{path} is the unsigned checklist of another job "
                                      f"({shown}) whose title gives the same file name; it is "
                                      f"not replaced: {_MOVE}")


def make_checklist(
    check: Mapping[str, Any],
    plan_bytes: bytes,
    out_dir: Path,
    *,
    identity: SigningIdentity | None = None,
    paper: str = "letter",
) -> ChecklistFiles:
    """Write ``<job>-checklist.pdf`` and ``.json`` (and ``.json.sig`` when signing).

    Parameters
    ----------
    check : mapping
        The ``supervisor.check/1`` result for the plan.
    plan_bytes : bytes
        The plan file as read.
    out_dir : Path
        Output folder; it is created if its parent exists.
    identity : SigningIdentity, optional
        Sign the PDF (PAdES) and the JSON (detached CMS) with this key.
    paper : {"letter", "a4"}
        Page size.

    Returns
    -------
    ChecklistFiles

    Raises
    ------
    InputError
        If the folder cannot be used, a signed checklist is already there,
        the plan changed while being checked, or the certificate is outside
        its validity.
    """
    if out_dir.exists() and not out_dir.is_dir():
        raise InputError("--out", f"{out_dir} is a file; expected a folder")
    if not out_dir.exists():
        if not out_dir.parent.is_dir():
            raise InputError("--out", f"{out_dir.parent} does not exist; expected a folder "
                                      "whose parent exists")
        out_dir.mkdir()
    record = build_record(check, plan_bytes)
    data = record_bytes(record)
    digest = document_sha256(data)
    job = record.get("job") if isinstance(record.get("job"), Mapping) else {}
    title = job.get("title") if isinstance(job.get("title"), str) else None
    paths = output_paths(out_dir, job_slug(title))
    refuse_existing(paths, title)
    note = None
    if identity is not None:
        from supervisor.report.keys import check_validity
        from supervisor.report.signing import sign_detached, sign_pdf, signer_note

        check_validity(identity)
        note = signer_note(identity)
    pdf = render_pdf(record, digest, signer=note, paper=paper)
    files: list[tuple[Path, bytes, int | None]] = [(paths["json"], data, None)]
    if identity is not None:
        site = job.get("site")
        pdf = sign_pdf(pdf, identity, reason=SIGN_REASON,
                       location=site if isinstance(site, str) else None)
        files.append((paths["sig"], sign_detached(data, identity), None))
    files.append((paths["pdf"], pdf, None))
    write_atomically(files)
    return ChecklistFiles(
        pdf=paths["pdf"],
        json=paths["json"],
        signature=paths["sig"] if identity is not None else None,
        document_sha256=digest,
        signer=identity.name if identity is not None else None,
        plan_supervisor=job.get("supervisor") if isinstance(job.get("supervisor"), str)
        else None,
    )
