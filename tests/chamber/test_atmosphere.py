"""Chamber atmosphere limits and readings.

Limits (``tables/limits/chamber-atmosphere-limits.toml``): chamber oxygen at most 25 %
(U.S. Navy Diving Manual, Revision 4 Change A §22-6.2.6, OLDER-EDITION); at most 23.5 %
(NFPA 99 hyperbaric facilities chapter, Class A, FROM MEMORY); at least 19 % and CO2 at
most 1.5 % SEV (Treatment Table 7 notes, VERIFIED as reproduced in a handbook).
"""

from __future__ import annotations

import pytest

from supervisor.chamber.atmosphere import atmosphere_plan, judge_reading, load_atmosphere_limits
from supervisor.chamber.ventilation import VentilationPiece


def test_limits_with_their_sources_and_status():
    lim = load_atmosphere_limits()
    assert lim["oxygen-percent-fire"].value == 25.0
    assert lim["oxygen-percent-fire"].source_status == "OLDER-EDITION"
    assert "22-6.2.6" in lim["oxygen-percent-fire"].citation
    assert lim["oxygen-percent-operating"].value == 23.5
    assert lim["oxygen-percent-operating"].source_status == "FROM MEMORY"
    assert "NFPA 99" in lim["oxygen-percent-operating"].citation
    assert lim["oxygen-percent-low"].value == 19.0 and lim["oxygen-percent-low"].bound == "min"
    assert lim["co2-sev-max"].value == 1.5 and lim["co2-sev-max"].unit == "% SEV"
    assert not any(x.verified for x in lim.values())


@pytest.mark.parametrize(("kind", "value", "worst"), [
    ("oxygen_percent", 21.0, "pass"),
    ("oxygen_percent", 23.5, "pass"),     # at the limit is within it
    ("oxygen_percent", 23.6, "warn"),     # above the operating limit (23.5 %, FROM MEMORY)
    ("oxygen_percent", 25.1, "fail"),     # above the fire limit (25 %): immediate harm
    ("oxygen_percent", 18.9, "fail"),     # below 19 %: hypoxia
    ("co2_percent_sev", 1.5, "pass"),
    ("co2_percent_sev", 1.6, "fail"),
    ("temperature_f", 86, "warn"),
])
def test_readings(kind, value, worst):
    order = ["pass", "warn", "fail"]
    got = max((v.severity for v in judge_reading(kind, value)), key=order.index)
    assert got == worst


def test_own_ventilation_below_the_navy_rate_warns():
    pieces = [VentilationPiece(60, 60, 20, 354.0, "patient on oxygen, no overboard dump")]
    a = atmosphere_plan(pieces, False, 200.0, 2)
    assert a["ventilation_required_lpm"] == 354.0
    assert any("below the 354 L/min" in w for w in a["warnings"])
    assert any("exhaled oxygen enters the chamber" in n for n in a["notes"])
    a = atmosphere_plan(pieces, True, 400.0, 2)
    assert a["warnings"] == [] and a["notes"] == []
    assert a["oxygen_operating_limit_percent"] == 23.5 and a["oxygen_fire_limit_percent"] == 25
