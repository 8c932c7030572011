"""Small building blocks shared by the checklist's sections.

Every section builder takes parts of the checklist record (a
``supervisor.check/1`` object with ``plan_text`` and ``checklist`` added, see
:mod:`supervisor.report.document`) and the usable page width [pt], and
returns reportlab flowables.  A section whose data are missing prints
:data:`~supervisor.report.formatting.NOT_COMPUTED`, never a pass.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from reportlab.platypus import Flowable

from supervisor.report.formatting import MISSING, NOT_COMPUTED, fmt_gf
from supervisor.report.pdf_meta import same_person
from supervisor.report.styles import BODY, CELL, SMALL, rich


@dataclass(frozen=True)
class SignerNote:
    """Who applies the digital signature, printed on page 1 and in the signature section."""

    name: str
    fingerprint_sha256: str
    self_signed: bool


def m(value: Any) -> Mapping[str, Any]:
    """``value`` if it is a mapping, else an empty one."""
    return value if isinstance(value, Mapping) else {}


def text(value: Any) -> str:
    """A value as text; missing or empty is :data:`MISSING`."""
    return MISSING if value is None or value == "" else str(value)


def stated(value: Any) -> str:
    """A descriptive field (status, edition) that the source may leave out."""
    return "not stated" if value is None or value == "" else str(value)


def not_computed(what: str) -> Flowable:
    """``"<what>: not computed — needs review"``."""
    return rich([(f"{what}: ", False), (NOT_COMPUTED, True)], BODY)


def model_label(model: Mapping[str, Any]) -> str:
    """``"zhl16c GF 30/85"`` from the record's ``model`` entry."""
    name = text(model.get("name"))
    return f"{name} GF {fmt_gf(model.get('gf_low'), model.get('gf_high'))}"


def kv_lines(pairs: Sequence[tuple[str, str]]) -> list[Flowable]:
    """One ``key: value`` cell line per pair, the key in bold."""
    return [rich([(f"{k}: ", True), (v, False)], CELL) for k, v in pairs]


def signed_in_place(record: Mapping[str, Any], signer: SignerNote | None) -> str | None:
    """The plan's supervisor when the signer is someone else, else ``None``."""
    supervisor = m(record.get("job")).get("supervisor")
    if signer is None or not isinstance(supervisor, str) or not supervisor.strip():
        return None
    return None if same_person(signer.name, supervisor) else supervisor


def signer_statement(record: Mapping[str, Any], signer: SignerNote | None) -> Flowable:
    """Who signs this PDF digitally, and in place of whom when it is not the plan's supervisor."""
    if signer is None:
        return rich([("Digital signature. ", True),
                     ("This copy carries no digital signature.", False)], SMALL)
    kind = ("a self-signed certificate: whether it may approve dives is checked by "
            "'supervisor verify' against the contractor's keyring of trusted supervisors"
            if signer.self_signed else "a certificate issued by another party")
    parts: list[tuple[object, bool]] = [("Digital signature. ", True)]
    instead = signed_in_place(record, signer)
    if instead is not None:
        parts.append((f"Digitally signed by {signer.name} in place of the plan's supervisor "
                      f"{instead}. ", True))
    else:
        parts.append((f"Digitally signed by {signer.name}. ", False))
    parts.append((f"The PDF carries a PDF (PAdES) signature and its JSON record a detached CMS "
                  f"signature; certificate SHA-256 fingerprint {signer.fingerprint_sha256}; "
                  f"{kind}.", False))
    return rich(parts, SMALL)
