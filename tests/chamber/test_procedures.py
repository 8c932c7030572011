"""The rules around a treatment: picked by table, with clock times.

Rules (``tables/limits/usn-treatment-after-care.toml``): U.S. Navy Diving Manual,
Revision 4 Change A (2001), §21-5.6.8 and §21-6, pp. 21-20 to 21-30 (OLDER-EDITION).
"""

from __future__ import annotations

from supervisor.chamber.procedures import missing_topics, rules_for, rules_json, window_h


def _by_rule(number, end):
    return {r["rule"]: r for r in rules_json(number, end)}


def test_attendant_intervals_after_table6():
    # ends 03:30 (210 min after midnight): no-decompression dive after 12 h, decompression dive
    # and flying after 24 h (§21-6, §21-6.4)
    r = _by_rule("6", 210.0)
    assert r["attendant-dive-no-decompression"]["until"] == "15:30"
    assert r["attendant-dive-decompression"]["until"] == "03:30 (+1 d)"
    assert r["attendant-fly"]["until"] == "03:30 (+1 d)"
    assert r["attendant-stay-near-chamber"]["until"] == "04:30"
    assert all(x["source_status"] == "OLDER-EDITION" and "Revision 4 Change A" in x["citation"]
               for x in r.values())


def test_deep_tables_have_longer_intervals():
    r = {x.rule: x for x in rules_for("4")}
    assert r["attendant-dive-deep"].value == 48 and r["attendant-fly-deep"].value == 72
    assert "attendant-dive-no-decompression" not in r


def test_patient_observation_flying_return_to_diving():
    r5 = _by_rule("5", 600.0)
    assert r5["patient-stay-at-chamber-type1"]["value"] == 2
    assert r5["patient-return-to-diving-type1"]["until"] == "7 days after surfacing"
    r6 = _by_rule("6", 600.0)
    assert r6["patient-stay-at-chamber-type2"]["value"] == 6
    assert r6["patient-fly"]["until"] == "10:00 (+3 d)"  # 72 h after 10:00


def test_retreatment_and_oxygen_toxicity_rules():
    r = _by_rule("6", 0.0)
    assert r["retreatment-residual"]["value"] == 2 and r["retreatment-residual"]["until"] is None
    assert r["oxygen-symptom-first"]["value"] == 15
    assert "10 fsw" not in r["oxygen-symptom-again"]["text"]  # the value carries the 10 fsw
    assert r["oxygen-symptom-again"]["value"] == 10 and r["oxygen-symptom-again"]["unit"] == "fsw"
    assert "oxygen-symptom-table9" in _by_rule("9", 0.0)


def test_windows_are_not_clock_times():
    r = _by_rule("6", 0.0)
    assert r["attendant-recent-exposure-window"]["until"] is None
    assert r["attendant-tend-again-oxygen"]["until"] is None
    assert window_h("6") == 12 and window_h("9") == 12.0  # default when the table names none


def test_what_is_not_bundled_is_said():
    assert missing_topics("6") == []
    assert "intervals before the attendant may dive or fly" in missing_topics("9")
    assert "re-treatment and its limits" in missing_topics("6A")
