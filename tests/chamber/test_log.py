"""A treatment as run against its plan: every kind of deviation, with its citation.

The demo treatment (examples/, fictional) is Treatment Table 6 started 21:41 and run
across midnight with one late air break.  Variants of its events file break one thing
at a time.  Rules: U.S. Navy Diving Manual, Revision 4 Change A (2001), ch. 21
(OLDER-EDITION): ascent no faster than the table's rate (too fast: stop and wait),
first oxygen symptom 15 min after it has gone, a second symptom or a convulsion 10 fsw
up, Figure 21-5 decision logic; chamber limits as in test_atmosphere.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from supervisor.chamber.log import log_treatment, read_events
from supervisor.errors import InputError

PLAN = "examples/demo-treatment.toml"
EVENTS = Path("examples/demo-treatment-events.toml")


def _events(tmp_path, edit=None, append=""):
    text = EVENTS.read_text("utf-8")
    if edit:
        for old, new in edit:
            assert old in text, old
            text = text.replace(old, new, 1)
    p = tmp_path / "events.toml"
    p.write_text(text + append, "utf-8")
    return p


def _rules(log, severity=None):
    return [f.rule for f in log.findings if severity is None or f.severity == severity]


def test_demo_one_late_air_break(tmp_path):
    log = log_treatment(PLAN, EVENTS)
    warn = [f for f in log.findings if f.rule == "treatment-log-oxygen-period"]
    assert len(warn) == 1 and warn[0].severity == "warn"
    assert (warn[0].measured, warn[0].limit, warn[0].unit) == (23, 20, "min")
    assert "line 6" in warn[0].message and "Treatment Table 6" in warn[0].citation
    assert log.verdict == "needs-review" and "fail" not in {f.severity for f in log.findings}
    j = log.to_json()
    assert j["schema"] == "supervisor.treatment-log/1"
    # across midnight: line 10 runs 23:47 to 00:47 the next day, 60 min
    line10 = j["lines"][9]
    assert line10["actual_start"]["clock"] == "23:47" and line10["actual_end"]["day"] == 1
    assert line10["actual_min"] == 60


def test_ascent_too_fast_fails(tmp_path):
    p = _events(tmp_path, [('end = "02:32"', 'end = "02:22"')])
    log = log_treatment(PLAN, p)
    f = next(f for f in log.findings if f.rule == "treatment-log-travel")
    assert f.severity == "fail" and f.measured == 20 and f.limit == 30
    assert "too fast" in f.message and "figure notes" in f.citation
    assert log.verdict == "does-not-conform"


def test_slow_travel_is_not_made_up(tmp_path):
    p = _events(tmp_path, [('end = "23:32"', 'end = "23:36"')])
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-travel")
    assert f.severity == "info" and "not made up" in f.message


def test_short_air_break_warns(tmp_path):
    p = _events(tmp_path, [('end = "23:47"', 'end = "23:40"')])
    log = log_treatment(PLAN, p)
    f = next(f for f in log.findings if f.rule == "treatment-log-air-break")
    assert f.severity == "warn" and f.measured == 8 and f.limit == 15


def _symptom(start, end, gone=None, cause="oxygen-symptom"):
    g = f'symptoms_gone = "{gone}"\n' if gone else ""
    return f'\n[[interruptions]]\nstart = "{start}"\nend = "{end}"\ncause = "{cause}"\n{g}'


def test_first_symptom_resumed_too_early(tmp_path):
    # on line 10 (23:47-00:47): mask off 00:05, symptoms gone 00:08, oxygen back 00:15 (7 min)
    p = _events(tmp_path, [('end = "00:47"', 'end = "00:57"')], _symptom("00:05", "00:15", "00:08"))
    log = log_treatment(PLAN, p)
    f = next(f for f in log.findings if f.rule == "treatment-log-interruption")
    assert f.severity == "warn" and f.measured == 7 and f.limit == 15
    # the line's oxygen time leaves out the 10 min off oxygen: 70 - 10 = 60, as planned
    assert "treatment-log-oxygen-period" not in log.lines[9].rules
    assert log.to_json()["lines"][9]["interrupted_min"] == 10


def test_first_symptom_waited_15_min_is_info(tmp_path):
    p = _events(tmp_path, [('end = "00:47"', 'end = "01:05"')], _symptom("00:05", "00:23", "00:08"))
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-interruption")
    assert f.severity == "info" and f.measured == 15


def test_symptom_without_time_gone_needs_review(tmp_path):
    p = _events(tmp_path, [('end = "00:47"', 'end = "00:57"')], _symptom("00:05", "00:15"))
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-interruption")
    assert f.severity == "warn" and "not recorded" in f.message


def test_second_symptom_and_convulsion_point_to_the_rule(tmp_path):
    extra = _symptom("00:05", "00:20", "00:06") + _symptom("00:30", "00:40", "00:31")
    p = _events(tmp_path, [('end = "00:47"', 'end = "01:12"')], extra)
    fs = [f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-interruption"]
    assert any("come up this far" in f.message and "p. 21-20" in f.citation for f in fs)
    p = _events(tmp_path, [('end = "00:47"', 'end = "00:57"')],
                _symptom("00:05", "00:15", "00:10", cause="convulsion"))
    fs = [f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-interruption"]
    assert fs and all(f.severity == "warn" for f in fs) and "convulsion" in fs[0].message


def test_equipment_interruption_past_two_hours(tmp_path):
    p = _events(tmp_path, [('end = "00:47"', 'end = "03:00"')],
                _symptom("23:50", "01:55", cause="equipment"))
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-interruption")
    assert f.severity == "warn" and "matching air table" in f.message and f.limit == 120


@pytest.mark.parametrize(("o2", "severity"), [(22.9, "pass"), (24.0, "warn"), (25.5, "fail"),
                                              (18.5, "fail")])
def test_chamber_oxygen_readings(tmp_path, o2, severity):
    p = _events(tmp_path, append=f'\n[[readings]]\nat = "01:00"\noxygen_percent = {o2}\n')
    fs = [f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-atmosphere"]
    worst = max((f.severity for f in fs), key=["pass", "warn", "fail"].index)
    assert worst == severity
    if severity != "pass":
        bad = next(f for f in fs if f.severity == severity)
        assert bad.measured == o2 and bad.citation and bad.source_status


def test_co2_reading_above_limit_fails(tmp_path):
    p = _events(tmp_path, append='\n[[readings]]\nat = "01:00"\nco2_percent_sev = 1.8\n')
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-atmosphere"
             and f.severity == "fail")
    assert f.limit == 1.5 and f.unit == "% SEV"


def test_incomplete_and_extra_steps(tmp_path):
    text = EVENTS.read_text("utf-8")
    cut = text[:text.index("[[steps]]   # line 12")]
    p = tmp_path / "short.toml"
    p.write_text(cut, "utf-8")
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-incomplete")
    assert f.severity == "warn" and "lines 12 to 13" in f.message
    p = _events(tmp_path, append='\n[[steps]]\nend = "02:40"\n')
    assert "treatment-log-extra" in _rules(log_treatment(PLAN, p), "warn")


def test_extension_run_that_was_not_planned(tmp_path):
    # one --extend-air (15 air + 60 oxygen at 30 fsw) run after line 12, before the ascent
    ext = '[extensions]\noxygen = 0\nair = 1\ndecided_by = "Dr. Ines Vardy (fictional)"\n\n'
    text = EVENTS.read_text("utf-8").replace('[[steps]]   # line 1:', ext + '[[steps]]   # line 1:')
    text = text.replace('[[steps]]   # line 13: oxygen, 30 -> 0 fsw at 1 fsw/min\nend = "02:32"',
                        '[[steps]]\nend = "02:17"\n\n[[steps]]\nend = "03:17"\n\n[[steps]]\n'
                        'end = "03:47"')
    p = tmp_path / "ext.toml"
    p.write_text(text, "utf-8")
    log = log_treatment(PLAN, p)
    f = next(f for f in log.findings if f.rule == "treatment-log-extensions")
    assert f.severity == "info" and "Ines Vardy" in f.message
    assert "treatment-log-incomplete" not in _rules(log) and len(log.lines) == 15


def test_extension_beyond_the_table_warns(tmp_path):
    text = EVENTS.read_text("utf-8").replace('[[steps]]   # line 1:',
                                             '[extensions]\noxygen = 3\n\n[[steps]]   # line 1:')
    p = tmp_path / "ext.toml"
    p.write_text(text, "utf-8")
    fs = [f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-extensions"]
    assert any(f.severity == "warn" and f.limit == 2 and f.measured == 3 for f in fs)


def test_patient_worse_and_table5_without_full_relief(tmp_path):
    p = _events(tmp_path, [('relief = "partial"', 'relief = "worse"')])
    f = next(f for f in log_treatment(PLAN, p).findings if f.rule == "treatment-log-patient")
    assert f.severity == "warn" and "Figure 21-5" in f.citation
    plan5 = tmp_path / "tt5.toml"
    plan5.write_text('schema = "supervisor.treatment-plan/1"\ntable = "5"\nstart = "10:00"\n',
                     "utf-8")
    ev5 = tmp_path / "ev5.toml"
    ev5.write_text('schema = "supervisor.treatment-events/1"\nstart = "10:00"\n'
                   '[[steps]]\nend = "10:03"\n[[steps]]\nend = "10:23"\nrelief = "partial"\n',
                   "utf-8")
    fs = [f for f in log_treatment(plan5, ev5).findings if f.rule == "treatment-log-patient"]
    assert fs and "calls for Table 6" in fs[0].message


def test_gap_and_step_cross_checks(tmp_path):
    p = _events(tmp_path, [('[[steps]]   # line 3: air break\nend = "22:09"',
                            '[[steps]]   # line 3: air break\nstart = "22:06"\nend = "22:11"\n'
                            'depth = 30\ngas = "oxygen"')])
    log = log_treatment(PLAN, p)
    assert "treatment-log-gap" in _rules(log, "warn")
    assert _rules(log, "warn").count("treatment-log-step-check") == 2


@pytest.mark.parametrize(("edit", "field"), [
    (('end = "22:04"', 'ned = "22:04"'), "steps[2].ned"),
    (('end = "22:04"', 'end = "22:61"'), "steps[2].end"),
    (('relief = "partial"', 'relief = "better"'), "steps[2].relief"),
    (('schema = "supervisor.treatment-events/1"', 'schema = "x"'), "schema"),
    (('start = "21:41"', 'start = "9"'), "start"),
])
def test_bad_events_name_the_field(tmp_path, edit, field):
    p = _events(tmp_path, [edit])
    with pytest.raises(InputError) as e:
        log_treatment(PLAN, p)
    assert field in e.value.field or field in str(e.value)


def test_events_reader_accepts_toml_times(tmp_path):
    p = tmp_path / "ev.toml"
    p.write_text('schema = "supervisor.treatment-events/1"\nstart = 21:41:00\n'
                 '[[steps]]\nend = 21:44:00\n', "utf-8")
    assert read_events(p).steps[0].end.hour == 21
    assert re.match(r"^\d{2}:\d{2}$", log_treatment(PLAN, p).to_json()["actual_start"])


def test_start_across_midnight_from_the_plan(tmp_path):
    plan = tmp_path / "p.toml"
    plan.write_text('schema = "supervisor.treatment-plan/1"\ntable = "9"\nstart = "23:58"\n',
                    "utf-8")
    ev = tmp_path / "e.toml"
    ev.write_text('schema = "supervisor.treatment-events/1"\nstart = "00:03"\n'
                  '[[steps]]\nend = "00:05:15"\n', "utf-8")
    log = log_treatment(plan, ev)
    f = next(f for f in log.findings if f.rule == "treatment-log-start")
    assert f.measured == 5.0 and "after" in f.message
