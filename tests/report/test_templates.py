"""Pre-dive items and cautions loaded from templates/ (supervisor.report.templates)."""

from __future__ import annotations

from pathlib import Path

import pytest

from supervisor.report import templates
from supervisor.report.templates import TemplateError, load_cautions, load_checklist, normalise_mode


def test_bundled_checklist_loads_with_citations_and_status() -> None:
    checklist = load_checklist()
    ids = [i.id for i in checklist.items]
    assert len(ids) == len(set(ids))
    for item in checklist.items:
        assert item.citations and all("CFR" in c for c in item.citations)
        assert item.source_status in templates.STATUSES


def test_bundled_checklist_holds_the_required_pre_dive_items() -> None:
    """The items named in the pre-dive list of 29 CFR 1910.421-.423.

    Paragraphs as cited in the eCFR copy of Subpart T and the Washington
    state-plan copy (WAC 296-37-535); see the header of predive-checklist.toml.
    """
    by_id = {i.id: i for i in load_checklist().items}
    assert "29 CFR 1910.421(b)" in by_id["emergency-contacts"].citations
    assert "29 CFR 1910.421(c)" in by_id["first-aid"].citations
    assert "29 CFR 1910.421(f)(1)" in by_id["briefing"].citations
    assert "29 CFR 1910.421(g)" in by_id["equipment-inspection"].citations
    assert "29 CFR 1910.421(d)" in by_id["repetitive-designation"].citations
    assert any(c.startswith("29 CFR 1910.423(c)") for c in by_id["chamber-ready"].citations)
    assert "resuscitator" in by_id["first-aid"].text


@pytest.mark.parametrize(
    ("given", "expected"),
    [
        ("scuba", "scuba"),
        ("SCUBA", "scuba"),
        ("ss_air", "surface-supplied-air"),
        ("surface-supplied-air", "surface-supplied-air"),
        ("Surface supplied air", "surface-supplied-air"),
        ("mixed_gas", "mixed-gas"),
        ("surface-supplied-heliox", "mixed-gas"),
        ("surface-supplied-nitrox", "mixed-gas"),
        ("snorkel", None),
        (None, None),
    ],
)
def test_normalise_mode(given: object, expected: str | None) -> None:
    assert normalise_mode(given) == expected


def test_for_mode_filters_items_and_unknown_mode_gets_all() -> None:
    checklist = load_checklist()
    mode, scuba = checklist.for_mode("scuba")
    assert mode == "scuba"
    ids = {i.id for i in scuba}
    assert "scuba-reserve-valve" in ids and "voice-comms" not in ids
    mode, ssa = checklist.for_mode("ss_air")
    assert "voice-comms" in {i.id for i in ssa} and "scuba-reserve-valve" not in {i.id for i in ssa}
    mode, everything = checklist.for_mode("snorkel")
    assert mode is None and len(everything) == len(checklist.items)


def test_bundled_cautions_defer_to_supervisor_manual_medical_officer_and_regulation() -> None:
    text = " ".join(load_cautions())
    for phrase in ("qualified diving supervisor", "operations manual", "diving medical officer",
                   "governing regulation", "residual risk of decompression sickness",
                   "licensed practice", "not computed — needs review"):
        assert phrase in text


def _write(folder: Path, name: str, text: str) -> Path:
    (folder / name).write_text(text, encoding="utf-8")
    return folder


def test_checklist_without_citation_is_rejected(tmp_path: Path) -> None:
    _write(tmp_path, "predive-checklist.toml", """
schema = "supervisor-checklist/1"
title = "t"
note = "n"
[[items]]
id = "a"
group = "g"
text = "x"
citations = []
source_status = "VERIFIED"
modes = ["scuba"]
""")
    with pytest.raises(TemplateError, match="citations"):
        load_checklist(tmp_path)


@pytest.mark.parametrize(
    ("field", "value", "match"),
    [
        ("source_status", '"PROBABLY"', "source_status"),
        ("modes", '["freediving"]', "modes"),
        ("text", '""', "text"),
    ],
)
def test_checklist_item_fields_are_validated(tmp_path: Path, field: str, value: str,
                                             match: str) -> None:
    fields = {"id": '"a"', "group": '"g"', "text": '"x"', "citations": '["29 CFR 1910.420(a)"]',
              "source_status": '"VERIFIED"', "modes": '["scuba"]'}
    fields[field] = value
    body = "\n".join(f"{k} = {v}" for k, v in fields.items())
    _write(tmp_path, "predive-checklist.toml",
           f'schema = "supervisor-checklist/1"\ntitle = "t"\nnote = "n"\n[[items]]\n{body}\n')
    with pytest.raises(TemplateError, match=match):
        load_checklist(tmp_path)


def test_wrong_schema_and_missing_file(tmp_path: Path) -> None:
    with pytest.raises(TemplateError, match="cannot be read"):
        load_cautions(tmp_path)
    _write(tmp_path, "cautions.toml", 'schema = "other/1"\n')
    with pytest.raises(TemplateError, match="schema"):
        load_cautions(tmp_path)


def test_every_check_caution_is_covered_or_printed_once() -> None:
    """The check's own cautions (supervisor.check.CAUTIONS) repeat bundled ones: each is covered."""
    from supervisor.check import CAUTIONS
    from supervisor.report.templates import load_caution_entries

    covered = {text for c in load_caution_entries() for text in c.covers}
    assert set(CAUTIONS) <= covered, set(CAUTIONS) - covered


def test_stated_by_lists_plan_paths(tmp_path: Path) -> None:
    items = [i for i in load_checklist().items if i.stated_by]
    assert {i.id for i in items} >= {"safe-practices-manual", "emergency-contacts", "first-aid",
                                     "standby-diver", "code-flag-a"}
    from supervisor.resources import templates_dir

    text = (templates_dir() / "predive-checklist.toml").read_text(encoding="utf-8")
    _write(tmp_path, "predive-checklist.toml",
           text.replace('stated_by = ["site.safe_practices_manual"]', "stated_by = [3]"))
    with pytest.raises(TemplateError, match="'stated_by' must list plan paths"):
        load_checklist(tmp_path)
