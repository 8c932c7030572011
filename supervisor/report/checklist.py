"""Make the checklist files from a check result: PDF, JSON record, detached signature.

``make_checklist`` builds everything in memory first (record, PDF, both
signatures) and only then writes, atomically, so a failure at any step (a
bad key, a wrong passphrase, a full disk) leaves the output folder as it was.
A folder that already holds a *signed* checklist for the same job is never
written over: a signed checklist is a record, and replacing it needs a
deliberate act (moving it away, or choosing another folder).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from supervisor.errors import InputError
from supervisor.report.document import (
    build_record,
    document_sha256,
    job_slug,
    output_paths,
    record_bytes,
    write_atomically,
)
from supervisor.report.keys import SigningIdentity, check_validity
from supervisor.report.pdf import render_pdf
from supervisor.report.signing import sign_detached, sign_pdf, signer_note

SIGN_REASON = "Diving supervisor's pre-dive checklist"


@dataclass(frozen=True)
class ChecklistFiles:
    """What :func:`make_checklist` wrote."""

    pdf: Path
    json: Path
    signature: Path | None
    document_sha256: str
    signer: str | None


def _is_signed_pdf(path: Path) -> bool:
    try:
        return b"/ByteRange" in path.read_bytes()
    except FileNotFoundError:
        return False


def _refuse_signed(paths: Mapping[str, Path]) -> None:
    signed = [p for p in (paths["sig"],) if p.exists()]
    if _is_signed_pdf(paths["pdf"]):
        signed.insert(0, paths["pdf"])
    if signed:
        raise InputError(
            "--out",
            f"{signed[0]} is a signed checklist and is never replaced; move it away or "
            "choose another --out folder",
        )


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
    paths = output_paths(out_dir, job_slug(job.get("title")))
    _refuse_signed(paths)
    note = None
    if identity is not None:
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
    )
