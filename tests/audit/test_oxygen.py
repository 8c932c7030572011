"""Oxygen as breathed (supervisor.audit.oxygen).

PO2 = absolute pressure x O2 fraction (Dalton's law) at 33 fsw per atmosphere;
reported in ata, as the check's PO2 rules (supervisor.rules.po2_limits); limits are
the demo policy's (bottom 1.4, decompression 1.6, chamber 2.8 ata).  CNS and OTU limits:
NOAA CNS table and REPEX single-day 850 OTU as bundled (FROM MEMORY, unverified, so over
a limit warns).
"""

from __future__ import annotations

import numpy as np
import pytest

from supervisor.audit.oxygen import po2_by_phase
from supervisor.audit.run import audit_one
from supervisor.gas import parse_gas
from tests.audit._logs import d1, d2_full, executed, item


def _f(result, rule):
    return [f for f in result.findings if f.rule == rule][0]


def test_air_at_50_fsw_passes(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    f = _f(r, "audit-po2-bottom")
    assert f.severity == "pass"
    assert f.measured == pytest.approx((1 + 50 / 33) * 0.21, abs=2e-3) and f.unit == "ata"


def test_rich_bottom_gas_fails_the_policy(demo):
    ex = executed(demo, "D1", d1())
    g = parse_gas("nitrox80")
    ex.fo2 = np.full(ex.fo2.size, g.fo2)
    r = audit_one(demo, item(demo, "D1", ex))
    f = _f(r, "audit-po2-bottom")
    assert f.severity == "fail" and f.limit == 1.4 and f.unit == "ata"
    assert f.measured == pytest.approx((1 + 50 / 33) * 0.80, abs=2e-3)


def test_chamber_oxygen_phase(demo):
    ex = d2_full(demo)
    ph = po2_by_phase(ex)
    assert ph["chamber"] == pytest.approx(1.01325 * (1 + 50 / 33), abs=2e-3)  # O2 at 50 fsw
    r = audit_one(demo, item(demo, "D2", ex))
    assert _f(r, "audit-po2-chamber").severity == "pass"


def test_oxygen_in_the_water_at_40_fsw_fails_decompression_po2(demo):
    ex = d2_full(demo)
    left = ex.events["left_bottom"]
    ex.fo2 = np.where((ex.t[:-1] > left) & (ex.place == "water"), 1.0, ex.fo2)
    r = audit_one(demo, item(demo, "D2", ex))
    f = _f(r, "audit-po2-decompression")
    assert f.severity == "fail" and f.measured > 1.6


def test_cns_and_otu_pass_on_air_and_warn_when_over(demo):
    r = audit_one(demo, item(demo, "D1", executed(demo, "D1", d1())))
    assert _f(r, "audit-cns").severity == "pass" and not _f(r, "audit-cns").verified
    assert _f(r, "audit-otu").severity == "pass"
    # about nine hours on oxygen at 18 fsw (1.55 atm, inside the CNS table): over both
    ex = executed(demo, "D1", d1())
    ex.fo2 = np.ones(ex.fo2.size)
    ex.depth = np.where(ex.depth > 0, 18.0, ex.depth)
    ex.t = ex.t * 12.0
    r = audit_one(demo, item(demo, "D1", ex))
    assert _f(r, "audit-cns").severity == "warn" and _f(r, "audit-cns").measured > 100
    assert _f(r, "audit-otu").severity == "warn" and _f(r, "audit-otu").measured > 850
