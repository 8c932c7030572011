"""Import of a contractor's CSV table: rows unverified, provenance from options, no overwrite.

CSV contents are fictional (invented for the tests).
"""

from __future__ import annotations

import pytest

from supervisor.errors import InputError
from supervisor.references import ImportOptions, InvalidTableError, import_csv, load_table

NO_STOP_CSV = "depth,no_stop_limit,group_A,group_B,note\n20,unlimited,30,60,\n30,200,20,45,\n" \
              "40,100,15,30,shallow end\n"
DECO_CSV = ("depth,bottom_time,mode,stop_20,stop_10,total_ascent,repetitive_group,"
            "exceptional_exposure\n"
            "60,40,air,,5,7,F,no\n60,60,air,3,12,17,H,\n60,60,air_o2,3,8:oxygen,13,H,\n"
            "80,60,air,10,30,43,,yes\n")
TREAT_CSV = ("step,from_depth,to_depth,minutes,gas,travel_rate,elapsed_min\n"
             "1,0,60,3,air,20,3\n2,60,60,20,oxygen,,23\n3,60,0,60,oxygen,1,83\n")
LIMITS_CSV = "po2_atm,limit_min,status\n0.6,700,fictional\n1.2,200,fictional\n"


def _opts(**kw):
    return ImportOptions(source="ACME Diving operations manual (fictional)",
                         transcribed_by="J. Smith", **kw)


def _csv(tmp_path, text, name="acme-table.csv"):
    p = tmp_path / name
    p.write_text(text, "utf-8")
    return p


def test_import_no_stop(tmp_path):
    src = _csv(tmp_path, NO_STOP_CSV)
    out, warnings = import_csv(src, "no-stop", _opts(edition="rev 3"))
    assert out == tmp_path / "acme-table.toml"
    t = load_table(out)
    assert t.kind == "no-stop" and t.name == "acme-table" and t.n_verified == 0
    assert t.model.provenance.source_document == "ACME Diving operations manual (fictional)"
    assert t.model.provenance.edition == "rev 3"
    assert t.model.provenance.source_status == "SECONDARY"
    assert t.model.conventions.repetitive_groups == ["A", "B"]
    assert t.rows[0].unlimited and t.rows[2].repetitive_groups == {"A": 15, "B": 30}
    assert t.rows[2].note == "shallow end"
    assert all(r.verification == "unverified" for r in t.rows)
    assert {w.row for w in warnings} == {2, 3}  # group gaps up to the limit


def test_import_decompression_merges_modes(tmp_path):
    src = _csv(tmp_path, DECO_CSV)
    out, _ = import_csv(src, "decompression", _opts(), out=tmp_path / "acme-deco.toml")
    t = load_table(out)
    assert len(t.rows) == 3
    r = t.rows[1]
    assert r.air.stop_minutes == 15 and r.air_o2.stops[1].gas == "oxygen"
    assert t.rows[2].exceptional_exposure and not t.rows[0].exceptional_exposure


def test_import_treatment_and_limits(tmp_path):
    out, _ = import_csv(_csv(tmp_path, TREAT_CSV, "acme-tt.csv"), "treatment", _opts())
    assert [s.step for s in load_table(out).rows] == [1, 2, 3]
    out, _ = import_csv(_csv(tmp_path, LIMITS_CSV, "acme-limits.csv"), "limits", _opts())
    t = load_table(out)
    assert t.rows[1].data() == {"po2_atm": 1.2, "limit_min": 200, "status": "fictional"}


def test_import_refuses_overwrite_without_force(tmp_path):
    src = _csv(tmp_path, NO_STOP_CSV)
    out, _ = import_csv(src, "no-stop", _opts())
    before = out.read_bytes()
    with pytest.raises(InputError, match="exists; give --force"):
        import_csv(src, "no-stop", _opts(edition="other"))
    assert out.read_bytes() == before
    import_csv(src, "no-stop", _opts(edition="other"), force=True)
    assert load_table(out).model.provenance.edition == "other"


@pytest.mark.parametrize(("text", "field", "words"), [
    ("depth,no_stop_limit\n20,abc\n", "row 1, column no_stop_limit", "or unlimited"),
    ("depth,no_stop_limit\n20,100\n-30,50\n", "row 2, column depth", "> 0"),
    ("depth,limit\n20,100\n", "header", "missing column no_stop_limit"),
    ("depth,no_stop_limit,group_A\n20,100,x\n", "row 1, column group_A", "expected a number"),
    ("depth,no_stop_limit\n", "", "no data rows"),
])
def test_import_bad_cells_name_row_and_column(tmp_path, text, field, words):
    src = _csv(tmp_path, text)
    with pytest.raises(InputError, match=words) as info:
        import_csv(src, "no-stop", _opts())
    assert field in info.value.field and "acme-table.csv" in info.value.field
    assert not (tmp_path / "acme-table.toml").exists()


def test_import_bad_stop_cell_and_mode(tmp_path):
    src = _csv(tmp_path, "depth,bottom_time,stop_10\n60,40,five\n")
    with pytest.raises(InputError, match="minutes:gas") as info:
        import_csv(src, "decompression", _opts())
    assert info.value.field.endswith("row 1, column stop_10")
    src = _csv(tmp_path, "depth,bottom_time,mode,stop_10\n60,40,heliox,5\n")
    with pytest.raises(InputError, match="air, air_o2, surd_o2"):
        import_csv(src, "decompression", _opts())


def test_import_failing_sanity_writes_nothing(tmp_path):
    src = _csv(tmp_path, "depth,no_stop_limit\n20,100\n30,200\n")
    with pytest.raises(InvalidTableError, match="deeper depth never has a longer"):
        import_csv(src, "no-stop", _opts())
    assert not (tmp_path / "acme-table.toml").exists()


@pytest.mark.parametrize(("kind", "opts", "field"), [
    ("sat-table", {}, "--kind"),
    ("no-stop", {"source_status": "GOOD"}, "--source-status"),
    ("no-stop", {"unit": "ft"}, "--unit"),
])
def test_import_bad_options(tmp_path, kind, opts, field):
    src = _csv(tmp_path, NO_STOP_CSV)
    with pytest.raises(InputError) as info:
        import_csv(src, kind, _opts(**opts))
    assert info.value.field == field


def test_import_bad_out_name(tmp_path):
    src = _csv(tmp_path, NO_STOP_CSV)
    with pytest.raises(InputError, match="not a table name"):
        import_csv(src, "no-stop", _opts(), out=tmp_path / "ACME Table.toml")
    with pytest.raises(InputError, match="ending in .toml"):
        import_csv(src, "no-stop", _opts(), out=tmp_path / "acme.csv")
