"""Tests of supervisor.engine.oxygen: UPTD/OTU, NOAA CNS limits, rolling and REPEX checks.

Outside values carry their source beside the check.  Values of the NOAA and REPEX tables
are themselves FROM MEMORY or SECONDARY (see the provenance in tables/limits/), so these
tests pin the transcription and the arithmetic, not the truth of the limits.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import numpy as np
import pytest
from scipy import integrate

from supervisor import constants as C
from supervisor.engine import oxygen as ox
from supervisor.errors import InputError, TableError
from supervisor.gas import AIR, OXYGEN, Gas
from supervisor.profile import Profile, Segment
from supervisor.resources import tables_dir

DATA = Path(__file__).resolve().parent.parent / "data"
ATM = C.P_ATM_BAR  # 1 atm = 1.01325 bar (definition of the standard atmosphere)

# NOAA Diving Manual, normal-exposure oxygen limits (3rd-6th eds., adapted from Butler &
# Thalmann 1986): PO2 [atm], single exposure [min], 24-hour total [min].  FROM MEMORY;
# single-exposure values 1.2-1.6 atm also SECONDARY (quotations of the 3rd edition).
NOAA_ROWS = [
    (0.6, 720, 720),
    (0.7, 570, 570),
    (0.8, 450, 450),
    (0.9, 360, 360),
    (1.0, 300, 300),
    (1.1, 240, 270),
    (1.2, 210, 240),
    (1.3, 180, 210),
    (1.4, 150, 180),
    (1.5, 120, 180),
    (1.6, 45, 150),
]

# REPEX (Hamilton, Kenyon & Peterson 1988, NOAA OUR Technical Report 88-1B): exposure
# days, daily allowance [OTU], total [OTU].  FROM MEMORY; 850 and 300/day also SECONDARY.
REPEX_ROWS = [
    (1, 850, 850),
    (2, 700, 1400),
    (3, 620, 1860),
    (4, 525, 2100),
    (5, 460, 2300),
    (6, 420, 2520),
    (7, 380, 2660),
    (8, 350, 2800),
    (9, 330, 2970),
    (10, 310, 3100),
    (11, 300, 3300),
]


def otu_integrand(p1_atm: float, p2_atm: float, minutes: float):
    """UPTD dose rate along a linear PO2 change (Clark & Lambertsen formula)."""

    def f(t: float) -> float:
        p = p1_atm + (p2_atm - p1_atm) * t / minutes
        return max((p - 0.5) / 0.5, 0.0) ** 0.833

    return f


def crossing_times(p1_atm: float, p2_atm: float, minutes: float, levels) -> list[float]:
    """Times at which a linear PO2 change passes the given levels (quad break points)."""
    if p1_atm == p2_atm:
        return []
    out = [(lv - p1_atm) / (p2_atm - p1_atm) * minutes for lv in levels]
    return [t for t in out if 0.0 < t < minutes]


def fsw_to_atm(depth_fsw: float) -> float:
    """ata = 1 + D/33 (U.S. Navy Diving Manual convention, 33 fsw = 1 atm)."""
    return 1.0 + depth_fsw / 33.0


# ------------------------------------------------------------------ pulmonary dose (OTU)


def test_otu_60_min_at_1_atm_is_60():
    """Definition of the UPTD: one minute of 100 % O2 at 1 atm is 1 unit.

    Clark & Lambertsen, Pharmacological Reviews 23 (1971), from memory; formula as printed
    in Naikagaku (Internal Medicine) 12th ed., Asakura, digital appendix Fig. 2-1-2.
    """
    e = ox.segment_exposure(60.0, 1.0 * ATM, 1.0 * ATM)
    assert e.otu == pytest.approx(60.0, rel=1e-12)


@pytest.mark.parametrize(
    ("depth_fsw", "rate"),
    [(30, 2.37), (45, 2.99), (60, 3.59), (165, 7.37)],
)
def test_otu_rate_oxygen_vs_uptd_formula(depth_fsw, rate):
    """OTU/min of 100 % O2 at 30/45/60/165 fsw: 2.37, 2.99, 3.59, 7.37.

    Derived from the UPTD formula (Clark & Lambertsen) with ata = 1 + D/33 (U.S. Navy
    Diving Manual convention); printed to two decimals -> atol 0.005.
    """
    assert ox.otu_rate(fsw_to_atm(depth_fsw)) == pytest.approx(rate, abs=0.005)
    prof = Profile([Segment(depth_fsw, depth_fsw, 1.0, OXYGEN, "chamber")], unit="fsw")
    assert ox.profile_exposure(prof).otu == pytest.approx(rate, abs=0.005)


@pytest.mark.parametrize(
    ("p1", "p2", "minutes"),
    [
        (1.0, 1.6, 10.0),
        (2.82, 1.91, 30.0),
        (1.91, 1.0, 30.0),
        (0.3, 1.4, 7.0),  # crosses 0.5 atm going up
        (1.4, 0.21, 5.0),  # crosses 0.5 atm going down
        (0.5, 3.0, 12.0),  # starts exactly at the threshold
        (1.3, 1.3 + 1e-7, 40.0),  # nearly constant: cancellation-prone
        (0.500001, 0.6, 3.0),  # starts just above the threshold
        (6.0, 2.82, 4.0),  # above the CNS table: OTU is still computed
    ],
)
def test_otu_linear_integral_vs_scipy_quad(p1, p2, minutes):
    """Exact linear-PO2 integral equals scipy.integrate.quad (general-purpose library)."""
    f = otu_integrand(p1, p2, minutes)
    points = crossing_times(p1, p2, minutes, [0.5]) or None
    expected, _ = integrate.quad(f, 0.0, minutes, points=points, epsabs=1e-13, epsrel=1e-13,
                                 limit=200)
    got = ox.segment_exposure(minutes, p1 * ATM, p2 * ATM).otu
    assert got == pytest.approx(expected, rel=1e-9, abs=1e-9)


def test_otu_treatment_table_5_oxygen_periods():
    """Patient OTU of the U.S. Navy Treatment Table 5 oxygen periods.

    Steps from memory (U.S. Navy Diving Manual TT5; no stored copy gives them): 40 min O2
    at 60 fsw, 60 -> 30 fsw in 30 min, 20 min at 30 fsw, 30 -> 0 fsw in 30 min; the
    1 ft/min ascent rate is OLDER-EDITION (Rev 4/5 TT5 notes).  No published OTU figure
    for TT5 is available: the expected value is the project's own UPTD formula (Clark &
    Lambertsen) integrated independently here by scipy.integrate.quad (general-purpose
    library), with ata = 1 + D/33; it agrees with the 332 OTU the reference notes derive
    the same way (DERIVED, not an outside value).  At 2.82 atm the oxygen is chamber
    oxygen: no in-water CNS percentage.
    """
    prof = Profile(
        [
            Segment(60, 60, 40, OXYGEN, "chamber"),
            Segment(60, 30, 30, OXYGEN, "chamber"),
            Segment(30, 30, 20, OXYGEN, "chamber"),
            Segment(30, 0, 30, OXYGEN, "chamber"),
        ],
        unit="fsw",
    )
    e = ox.profile_exposure(prof)
    legs = [(60, 60, 40), (60, 30, 30), (30, 30, 20), (30, 0, 30)]
    expected = 0.0
    for d0, d1, t in legs:
        # the package's own fsw -> bar convention, so only the integration is independent
        p0 = prof.p_surface_bar / ATM + d0 * C.BAR_PER_FSW / ATM
        p1 = prof.p_surface_bar / ATM + d1 * C.BAR_PER_FSW / ATM
        expected += integrate.quad(otu_integrand(p0, p1, t), 0.0, t, epsabs=1e-12)[0]
    assert e.otu == pytest.approx(expected, rel=1e-9)
    assert e.otu == pytest.approx(332.0, abs=1.0)  # DERIVED in the reference notes
    # chamber oxygen: no in-water CNS percentage, kept apart with its minutes and OTU
    assert not e.out_of_range and e.cns_percent == 0.0
    assert e.chamber_otu == e.otu and e.chamber_oxygen_minutes == 120.0
    assert e.max_po2_atm == pytest.approx(fsw_to_atm(60), rel=1e-3)
    # 2.82 ata for oxygen at 60 fsw: the figure the Navy treatment tables print
    # (U.S. Navy Diving Manual Rev 4 Change A ch. 21, OLDER-EDITION); two decimals
    assert e.max_po2_atm == pytest.approx(2.82, abs=0.005)
    assert e.chamber_max_po2_atm == e.max_po2_atm
    top = 1.6 + ox.PO2_TOLERANCE_ATM
    hi30 = prof.p_surface_bar / ATM + 30 * C.BAR_PER_FSW / ATM
    above_last = 30.0 * (hi30 - top) / (hi30 - prof.p_surface_bar / ATM)
    assert e.chamber_minutes_above_table == pytest.approx(90.0 + above_last, rel=1e-9)


@pytest.mark.parametrize(
    ("p1", "p2"),
    [(0.5, 0.5), (0.21, 0.21), (0.0, 0.5), (0.5, 0.1), (0.45, 0.3)],
)
def test_po2_at_or_below_half_atm_gives_no_dose(p1, p2):
    """UPTD formula: no pulmonary dose at PO2 <= 0.5 atm (Clark & Lambertsen); NOAA CNS
    convention of the table file: no accrual at or below 0.5 atm (from memory)."""
    e = ox.segment_exposure(120.0, p1 * ATM, p2 * ATM)
    assert e.otu == 0.0
    assert e.cns_percent == 0.0
    assert e.cns_24h_percent == 0.0


def test_zero_length_segments_give_zero_and_no_warning():
    """Analytic limit: a segment of no duration adds no dose, whatever its PO2."""
    e = ox.segment_exposure([0.0, 0.0, 0.0], [0.3 * ATM, 1.2 * ATM, 1.4 * ATM],
                            [0.3 * ATM, 1.2 * ATM, 0.7 * ATM])
    assert np.all(e.segment_otu == 0.0)
    assert np.all(e.segment_cns_percent == 0.0)
    assert np.all(e.segment_minutes_above_range == 0.0)
    assert not e.out_of_range


def test_empty_profile_gives_zero():
    e = ox.profile_exposure(Profile(unit="msw"))
    assert e.otu == 0.0 and e.cns_percent == 0.0 and e.max_po2_atm == 0.0
    assert e.segment_otu.shape == (0,)


# ------------------------------------------------------------------ CNS percentage


def test_cns_45_min_at_1p6_atm_is_100_percent():
    """NOAA Diving Manual normal-exposure limits: 1.6 atm single exposure 45 min
    (SECONDARY: quotations of the 3rd edition)."""
    e = ox.segment_exposure(45.0, 1.6 * ATM)
    assert e.cns_percent == 100.0
    assert not e.out_of_range


@pytest.mark.parametrize(("po2", "single", "daily"), NOAA_ROWS)
def test_noaa_rows_each_reproduce_100_percent(po2, single, daily):
    """Each row of the NOAA normal-exposure table (values beside NOAA_ROWS) gives 100 %:
    a constant PO2 gives exactly t / limit * 100."""
    e = ox.segment_exposure(float(single), po2 * ATM)
    assert e.cns_percent == 100.0
    e24 = ox.segment_exposure(float(daily), po2 * ATM)
    assert e24.cns_24h_percent == 100.0
    t = 37.0
    assert ox.segment_exposure(t, po2 * ATM).cns_percent == t / single * 100


def test_cns_table_file_matches_noaa_rows():
    """The bundled file holds the rows listed in NOAA_ROWS, all unverified.

    Not an outside check: NOAA_ROWS and the file are the same recollection of the NOAA
    table (FROM MEMORY); this pins the transcription.  The outside values, where a quoted
    copy exists, are checked in the next test."""
    lim = ox.load_cns_limits()
    np.testing.assert_array_equal(lim.po2_atm, [r[0] for r in NOAA_ROWS])
    np.testing.assert_array_equal(lim.single_exposure_min, [r[1] for r in NOAA_ROWS])
    np.testing.assert_array_equal(lim.daily_limit_min, [r[2] for r in NOAA_ROWS])
    assert lim.info.source_status == "FROM MEMORY"
    assert not lim.info.verified
    assert lim.range_top_atm == 1.6


# NOAA Diving Manual, 3rd ed., normal-exposure limits as quoted on a technical-diving
# mailing list (2001): single exposure [min] by PO2 [atm].  SECONDARY.
NOAA_QUOTED_SINGLE = {1.6: 45, 1.5: 120, 1.4: 150, 1.3: 180, 1.2: 210}
# The same table's 24-hour limit at 1.4 atm as quoted on a diving forum: SECONDARY.
NOAA_QUOTED_DAILY = {1.4: 180}


def test_cns_table_rows_vs_quoted_noaa_table():
    """The bundled single-exposure limits for 1.2-1.6 atm and the 1.4 atm 24-hour limit
    equal the quoted NOAA Diving Manual table (SECONDARY quotations named above)."""
    lim = ox.load_cns_limits()
    rows = {float(p): (float(a), float(b)) for p, a, b in
            zip(lim.po2_atm, lim.single_exposure_min, lim.daily_limit_min, strict=True)}
    for po2, minutes in NOAA_QUOTED_SINGLE.items():
        assert rows[po2][0] == minutes
    for po2, minutes in NOAA_QUOTED_DAILY.items():
        assert rows[po2][1] == minutes


def test_cns_row_reached_through_profile_rounding():
    """Nitrox 28 at 132 fsw: PO2 = 0.28 x (1 + 132/33) = 1.4 atm (Navy 33 fsw/atm
    convention), computed in bar as 1.4000000000000001 atm; it must still take the NOAA
    1.4-atm row, 150 min, not the 1.5-atm row."""
    prof = Profile([Segment(132, 132, 150.0, Gas(0.28))], unit="fsw")
    e = ox.profile_exposure(prof)
    assert e.cns_percent == pytest.approx(100.0, rel=1e-12)


def test_cns_between_rows_takes_next_higher_row():
    """Convention of the table file (conservative, no source): 1.15 atm uses the 1.2 row,
    210 min (NOAA), not an interpolated limit."""
    e = ox.segment_exposure(60.0, 1.15 * ATM)
    assert e.cns_percent == pytest.approx(60.0 / 210.0 * 100.0, rel=1e-12)


def test_cns_below_lowest_row_charged_at_first_row():
    """Convention of the table file (conservative, from memory): 0.5-0.6 atm is charged at
    the 0.6-atm limit, 720 min (NOAA), and the minutes are reported."""
    e = ox.segment_exposure(72.0, 0.55 * ATM)
    assert e.cns_percent == pytest.approx(10.0, rel=1e-12)
    assert e.minutes_below_table == 72.0
    assert ox.segment_exposure(72.0, 0.6 * ATM).minutes_below_table == 0.0


def test_cns_ramp_across_rows_analytic():
    """0.4 -> 0.8 atm in 40 min (0.01 atm/min): 11 min in (0.5, 0.61], 10 in (0.61, 0.71]
    and 9 in (0.71, 0.8], charged at the NOAA limits 720, 570, 450 min (arithmetic on
    the NOAA rows, each row's band reaching 0.01 atm above it); 9 min below 0.59 atm."""
    e = ox.segment_exposure(40.0, 0.4 * ATM, 0.8 * ATM)
    expected = 100.0 * (11.0 / 720 + 10.0 / 570 + 9.0 / 450)
    assert e.cns_percent == pytest.approx(expected, rel=1e-9)
    assert e.minutes_below_table == pytest.approx(9.0, rel=1e-9)


@pytest.mark.parametrize(
    ("p1", "p2", "minutes"),
    [(1.0, 1.6, 17.0), (1.55, 0.62, 9.0), (0.3, 1.25, 30.0), (1.12, 1.18, 5.0),
     (1.2, 2.0, 12.0)],
)
def test_cns_linear_integral_vs_scipy_quad(p1, p2, minutes):
    """Exact CNS integral over the step curve of the NOAA rows equals scipy quad with the
    row crossings as break points (general-purpose library)."""
    rows = np.array([r[0] for r in NOAA_ROWS]) + ox.PO2_TOLERANCE_ATM  # row + tolerance
    lim = np.array([r[1] for r in NOAA_ROWS], dtype=float)

    def rate(t: float) -> float:
        p = p1 + (p2 - p1) * t / minutes
        if p <= 0.5:
            return 0.0
        return 100.0 / lim[min(int(np.searchsorted(rows, p, side="left")), lim.size - 1)]

    pts = crossing_times(p1, p2, minutes, [0.5, *rows])
    expected, _ = integrate.quad(rate, 0.0, minutes, points=pts, epsabs=1e-12, epsrel=1e-12,
                                 limit=200)
    got = ox.segment_exposure(minutes, p1 * ATM, p2 * ATM).cns_percent
    assert got == pytest.approx(expected, rel=1e-9, abs=1e-9)


# ------------------------------------------------------------------ above the table


def test_above_table_in_water_counts_at_top_row_rate():
    """In the water above 1.6 atm (+ 0.01) the NOAA table gives no limit: the minutes are
    charged at the 1.6 atm row's limits (45 min single exposure, SECONDARY quotation of
    the NOAA Diving Manual 3rd ed.; 150 min in 24 h, from memory) and the figure is
    marked a lower bound; CNS never counts zero."""
    e = ox.segment_exposure(30.0, 2.8 * ATM)
    assert e.out_of_range and e.cns_is_lower_bound
    assert e.minutes_above_range == 30.0
    assert e.max_po2_atm == pytest.approx(2.8, rel=1e-12)
    assert e.cns_percent == pytest.approx(30.0 / 45.0 * 100.0, rel=1e-12)
    assert e.cns_24h_percent == pytest.approx(30.0 / 150.0 * 100.0, rel=1e-12)
    assert e.cns_status == "lower bound"
    assert e.needs_review
    assert any("lower bound" in r for r in e.review_reasons)
    assert "30.0 min in the water above 1.6 atm" in e.cns_note
    # the same CNS figure at 1.7 and 2.8 atm: the top row's rate, no extrapolation
    assert ox.segment_exposure(30.0, 1.7 * ATM).cns_percent == e.cns_percent
    # the pulmonary dose is still computed
    assert e.otu == pytest.approx(30.0 * ox.otu_rate(2.8), rel=1e-12)
    d = e.to_dict()
    assert d["cns_percent_is_lower_bound"] is True and d["cns_is_lower_bound"] is True
    assert d["out_of_range"] is True
    assert d["minutes_above_table"] == 30.0 and d["po2_tolerance_atm"] == 0.01
    assert d["chamber_oxygen"] is None


def test_ramp_through_top_charges_the_part_above_at_the_top_rate():
    """1.0 -> 2.2 atm in 20 min (0.06 atm/min): 10.17 min up to 1.61 atm are charged by
    the table, the last 9.83 min at the 1.6 atm row's 45 min (arithmetic on the ramp and
    the NOAA rows)."""
    e = ox.segment_exposure(20.0, 1.0 * ATM, 2.2 * ATM)
    t_in = 20.0 * 0.61 / 1.2
    inside = ox.segment_exposure(t_in, 1.0 * ATM, 1.61 * ATM)
    assert e.minutes_above_range == pytest.approx(20.0 - t_in, rel=1e-9)
    assert e.cns_percent == pytest.approx(
        inside.cns_percent + (20.0 - t_in) / 45.0 * 100.0, rel=1e-9)
    assert e.out_of_range and not inside.out_of_range


def test_zero_length_segment_above_range_is_flagged():
    """Conservative convention of the engine: reaching a PO2 above the table, even for an
    instant, flags the dive."""
    e = ox.segment_exposure([20.0, 0.0], [1.2 * ATM, 2.0 * ATM])
    assert e.out_of_range
    assert e.minutes_above_range == 0.0


@pytest.mark.parametrize(("po2_bar", "flagged"), [(1.62, False), (1.63, False), (1.64, True)])
def test_bar_is_converted_to_atm(po2_bar, flagged):
    """1 atm = 1.01325 bar: 1.62 bar = 1.599 atm and 1.63 bar = 1.609 atm count at the
    1.6 atm row (within 0.01 atm), 1.64 bar = 1.619 atm is above the table."""
    assert ox.segment_exposure(10.0, po2_bar).out_of_range is flagged


@pytest.mark.parametrize(
    ("po2_atm", "minutes", "expected"),
    [
        # oxygen at 20 fsw: 1 + 20/33 = 1.606 atm (Navy 33 fsw/atm): the 1.6 atm row, 45 min
        (1.0 + 20.0 / 33.0, 45.0, 100.0),
        (1.609, 45.0, 100.0),  # within 0.01 atm of the 1.6 atm row
        (1.105, 240.0, 100.0),  # within 0.01 atm of the 1.1 atm row (240 min), not 1.2
        (1.111, 210.0, 100.0),  # beyond the tolerance: the next-higher 1.2 atm row (210 min)
        (0.595, 720.0, 100.0),  # within 0.01 atm below the 0.6 atm row (720 min)
    ],
)
def test_po2_within_tolerance_counts_at_the_row(po2_atm, minutes, expected):
    """NOAA normal-exposure rows: 1.6 atm 45 min and 1.2 atm 210 min as quoted from the
    NOAA Diving Manual 3rd ed. (SECONDARY, NOAA_QUOTED_SINGLE); 1.1 atm 240 min and
    0.6 atm 720 min from memory (NOAA_ROWS).  A PO2 within 0.01 atm of a row counts at
    that row (the tolerance is the project's own choice, no source); 1.606 atm for 45 min
    is exactly the 1.6 atm single-exposure limit."""
    e = ox.segment_exposure(minutes, po2_atm * ATM)
    assert e.cns_percent == pytest.approx(expected, rel=1e-12)
    assert not e.out_of_range
    assert ox.PO2_TOLERANCE_ATM == 0.01


def test_oxygen_at_20_fsw_from_a_profile_counts_at_the_top_row():
    """A 20 fsw in-water oxygen stop, the trade's standard depth (common practice, no
    source): 45 min give 100 % of the NOAA 1.6 atm single-exposure limit (45 min, SECONDARY
    quotation of the NOAA Diving Manual 3rd ed.), never 0 % and not above the table."""
    prof = Profile([Segment(20, 20, 45.0, OXYGEN, "water")], unit="fsw")
    e = ox.profile_exposure(prof)
    assert e.water_max_po2_atm == pytest.approx(1.605, abs=0.002)
    assert e.cns_percent == pytest.approx(100.0, rel=1e-12)
    assert not e.out_of_range and e.cns_note == ""


# ------------------------------------------------------------------ chamber oxygen


def _surd_profile() -> Profile:
    """In-water air to a 40 fsw stop, then oxygen at 50 fsw in the chamber (2.5 atm)."""
    return Profile(
        [
            Segment(0, 100, 2.0, AIR, "water"),
            Segment(100, 100, 28.0, AIR, "water"),
            Segment(100, 40, 2.0, AIR, "water"),
            Segment(40, 40, 2.0, AIR, "water"),
            Segment(40, 0, 1.33, AIR, "water"),
            Segment(0, 50, 0.5, AIR, "chamber"),
            Segment(50, 50, 30.0, OXYGEN, "chamber"),
            Segment(50, 50, 5.0, AIR, "chamber"),
            Segment(50, 40, 1.0, OXYGEN, "chamber"),
            Segment(40, 40, 20.0, OXYGEN, "chamber"),
            Segment(40, 0, 1.33, OXYGEN, "chamber"),
        ],
        unit="fsw",
    )


def test_chamber_oxygen_gives_no_in_water_cns_and_is_kept_apart():
    """Chamber oxygen at 2.5 atm is not on the NOAA in-water table: the CNS figure counts
    the water segments only (identical to the in-water part alone), the chamber's minutes,
    OTU and highest PO2 are reported apart (arithmetic on the same engine)."""
    prof = _surd_profile()
    e = ox.profile_exposure(prof)
    water = ox.profile_exposure(Profile(prof.segments[:5], unit="fsw"))
    assert e.cns_percent == pytest.approx(water.cns_percent, rel=1e-12)
    assert e.cns_24h_percent == pytest.approx(water.cns_24h_percent, rel=1e-12)
    assert not e.out_of_range and e.minutes_above_range == 0.0
    assert e.chamber_oxygen_minutes == pytest.approx(30.0 + 1.0 + 20.0 + 1.33)
    assert e.chamber_minutes == pytest.approx(0.5 + 30 + 5 + 1 + 20 + 1.33)
    assert e.otu == pytest.approx(water.otu + e.chamber_otu, rel=1e-12)
    assert e.chamber_max_po2_atm == pytest.approx(fsw_to_atm(50), abs=0.01)
    assert e.water_max_po2_atm < 1.0
    assert "not on the NOAA in-water CNS table" in e.cns_note
    d = json.loads(json.dumps(e.to_dict()))
    assert d["chamber_oxygen"]["otu"] == pytest.approx(e.chamber_otu)
    assert d["chamber_oxygen"]["minutes"] == pytest.approx(e.chamber_oxygen_minutes)
    assert d["cns_is_lower_bound"] is False


def test_daily_exposure_counts_chamber_otu_but_no_chamber_cns():
    """Rolling 24 h: the chamber oxygen adds its OTU (REPEX counts every dose) and no
    in-water CNS percentage."""
    e = ox.profile_exposure(_surd_profile())
    d = ox.daily_exposure([(0.0, e)])
    assert d.max_otu_24h == pytest.approx(e.otu, rel=1e-9)
    assert d.max_cns_24h_percent == pytest.approx(e.cns_24h_percent, rel=1e-9, abs=1e-12)
    assert not d.out_of_range


# ------------------------------------------------------------------ vector and profile


def test_vector_equals_scalar():
    rng = np.random.default_rng(7)
    n = 200
    t = rng.uniform(0.0, 90.0, n)
    t[::17] = 0.0
    p1 = rng.uniform(0.1, 3.0, n)
    p2 = np.where(rng.random(n) < 0.3, p1, rng.uniform(0.1, 3.0, n))
    vec = ox.segment_exposure(t, p1, p2)
    for i in range(n):
        one = ox.segment_exposure(t[i], p1[i], p2[i])
        assert one.otu == pytest.approx(vec.segment_otu[i], rel=1e-13, abs=1e-13)
        assert one.cns_percent == pytest.approx(vec.segment_cns_percent[i], rel=1e-13, abs=1e-13)
        assert one.minutes_above_range == pytest.approx(
            vec.segment_minutes_above_range[i], rel=1e-13, abs=1e-13
        )
    assert vec.otu == pytest.approx(float(np.sum(vec.segment_otu)), rel=1e-14)


def test_profile_uses_oxygen_fraction_and_pressure():
    """PO2 = ambient pressure x FO2 (Dalton's law); air at 33 fsw is 0.42 atm (no dose)."""
    prof = Profile(unit="fsw").add(99, 3, gas=AIR).add(99, 30).add(20, 8).add(20, 10, gas=OXYGEN)
    e = ox.profile_exposure(prof)
    arr = prof.arrays()
    direct = ox.segment_exposure(arr.minutes, arr.p_start * arr.fo2, arr.p_end * arr.fo2)
    np.testing.assert_array_equal(e.segment_otu, direct.segment_otu)
    assert e.segment_po2_start_atm[1] == pytest.approx(0.21 * fsw_to_atm(99), rel=1e-12)
    shallow = Profile([Segment(33, 33, 60, AIR)], unit="fsw")
    assert ox.profile_exposure(shallow).otu == 0.0


def test_to_dict_is_json():
    e = ox.segment_exposure([10.0, 5.0], [1.2 * ATM, 1.4 * ATM], [1.4 * ATM, 1.4 * ATM])
    d = json.loads(json.dumps(e.to_dict()))
    assert d["otu"] == pytest.approx(e.otu)
    assert len(d["segments"]) == 2
    assert d["needs_review"] is True  # the bundled limits are unverified


# ------------------------------------------------------------------ bad input


@pytest.mark.parametrize(
    ("args", "field"),
    [
        ((-1.0, 1.0), "minutes"),
        ((10.0, -0.2), "po2_start_bar"),
        ((10.0, 1.0, -0.1), "po2_end_bar"),
        ((float("nan"), 1.0), "minutes"),
        ((10.0, float("inf")), "po2_start_bar"),
        (("ten", 1.0), "minutes"),
        (([1.0, 2.0], [1.0, 1.0, 1.0]), "minutes"),
        ((np.ones((2, 2)), 1.0), "minutes"),
    ],
)
def test_bad_input_raises_input_error(args, field):
    with pytest.raises(InputError) as exc:
        ox.segment_exposure(*args)
    assert exc.value.field == field


def test_profile_exposure_rejects_non_profile():
    with pytest.raises(InputError) as exc:
        ox.profile_exposure([(0, 10, 5)])
    assert exc.value.field == "profile"


# ------------------------------------------------------------------ table loading


def test_loader_refuses_file_without_provenance():
    with pytest.raises(TableError, match="provenance"):
        ox.load_cns_limits(DATA / "oxygen_no_provenance.toml")


def _copy_with(tmp_path: Path, stem: str, old: str, new: str) -> Path:
    src = tables_dir() / "limits" / f"{stem}.toml"
    dst = tmp_path / f"{stem}.toml"
    shutil.copyfile(src, dst)
    text = dst.read_text(encoding="utf-8")
    assert old in text
    dst.write_text(text.replace(old, new, 1), encoding="utf-8")
    return dst


@pytest.mark.parametrize(
    ("old", "new", "match"),
    [
        ('licence = "', 'licence_x = "', "lacks licence"),
        ('name = "noaa-cns-limits"', 'name = "other"', "file stem"),
        ("po2_atm = 0.7", "po2_atm = 0.5", "increase"),
        ("single_exposure_min = 45", "single_exposure_min = 400", "lengthen"),
        ('verification = "unverified"', 'verification = "maybe"', "verification"),
    ],
)
def test_loader_refuses_bad_cns_files(tmp_path, old, new, match):
    path = _copy_with(tmp_path, ox.CNS_TABLE, old, new)
    with pytest.raises(TableError, match=match):
        ox.load_cns_limits(path)


def test_every_bundled_row_ships_unverified():
    """Project rule: every row is unverified until a second person checks it."""
    import tomllib

    for stem in (ox.CNS_TABLE, ox.PULMONARY_TABLE):
        raw = tomllib.loads((tables_dir() / "limits" / f"{stem}.toml").read_text("utf-8"))
        assert raw["provenance"]["source_status"] == "FROM MEMORY"
        assert all(r["verification"] == "unverified" for r in raw["rows"])


def test_pulmonary_table_matches_repex_rows():
    """The bundled file holds the REPEX rows listed above (values beside REPEX_ROWS)."""
    lim = ox.load_pulmonary_limits()
    np.testing.assert_array_equal(lim.exposure_days, [r[0] for r in REPEX_ROWS])
    np.testing.assert_array_equal(lim.daily_allowance_otu, [r[1] for r in REPEX_ROWS])
    np.testing.assert_array_equal(lim.total_allowance_otu, [r[2] for r in REPEX_ROWS])
    # REPEX: 300 OTU per day from day 11 on (SECONDARY): 12 days -> 3600, 20 days -> 6000
    np.testing.assert_array_equal(lim.total_allowance([1, 11, 12, 20]), [850, 3300, 3600, 6000])
    with pytest.raises(InputError):
        lim.total_allowance(0)


# ------------------------------------------------------------------ daily exposure


def _const(minutes: float, po2_atm: float) -> ox.OxygenExposure:
    return ox.segment_exposure(minutes, po2_atm * ATM)


def test_daily_two_dives_in_24_h_add_up():
    """Two 100-min exposures at 1.4 atm 10 h apart: 200 min against the NOAA 24-hour limit
    of 180 min at 1.4 atm -> 111 % (NOAA, from memory); OTU is the sum."""
    one = _const(100.0, 1.4)
    d = ox.daily_exposure([(0.0, one), (600.0, one)])
    assert d.max_otu_24h == pytest.approx(2 * one.otu, rel=1e-12)
    assert d.max_cns_24h_percent == pytest.approx(200.0 / 180.0 * 100.0, rel=1e-12)
    assert d.cns_24h_exceeded
    assert not d.single_exposure_exceeded  # 100 of 150 min each (NOAA single exposure)
    assert not d.otu_24h_exceeded
    assert d.otu_24h_window_start_min == 0.0
    assert d.cns_carried_percent is None and d.cns_carried_exceeded is None


def test_daily_rolling_window_takes_partial_overlap():
    """1.4 atm 100 min at t=0 and 1.3 atm 100 min at t=1400: the worst 24 h start at 0 and
    hold 100 min at 1.4 plus the first 40 min at 1.3 (arithmetic on the UPTD formula)."""
    d = ox.daily_exposure([(1400.0, _const(100.0, 1.3)), (0.0, _const(100.0, 1.4))])
    expected = 100.0 * ox.otu_rate(1.4) + 40.0 * ox.otu_rate(1.3)
    assert d.max_otu_24h == pytest.approx(expected, rel=1e-12)
    assert d.otu_24h_window_start_min == pytest.approx(0.0, abs=1e-9)
    np.testing.assert_array_equal(d.start_min, [0.0, 1400.0])  # sorted


def test_daily_dives_more_than_a_day_apart_do_not_add():
    one = _const(100.0, 1.4)
    d = ox.daily_exposure([(0.0, one), (1600.0, one)])
    assert d.max_otu_24h == pytest.approx(one.otu, rel=1e-12)


def test_repex_series_check():
    """REPEX (Hamilton et al. 1988, from memory): 700 OTU a day (700 min at 1.0 atm) for
    three days fits the 1-day 850 and 2-day 1400 allowances, not the 3-day 1860."""
    day = _const(700.0, 1.0)
    assert day.otu == pytest.approx(700.0, rel=1e-12)
    d = ox.daily_exposure([(k * ox.DAY_MIN, day) for k in range(3)])
    np.testing.assert_array_equal(d.series_days, [1, 2, 3])
    np.testing.assert_allclose(d.series_max_otu, [700.0, 1400.0, 2100.0], rtol=1e-12)
    np.testing.assert_array_equal(d.series_allowance_otu, [850.0, 1400.0, 1860.0])
    assert not d.otu_24h_exceeded
    assert d.series_exceeded


def test_single_day_above_850_is_exceeded():
    """REPEX single-day allowance 850 OTU (SECONDARY): 900 min at 1.0 atm = 900 OTU."""
    d = ox.daily_exposure([(0.0, _const(900.0, 1.0))])
    assert d.otu_24h_exceeded and d.series_exceeded


def test_daily_recovery_only_when_half_time_given():
    """Optional exponential CNS recovery with a caller-supplied half-time (a 90-min value
    is often quoted, from memory): C2 = C1 * 2^(-gap/h) + CNS2."""
    one = _const(60.0, 1.5)  # 60 of 120 min: 50 % (NOAA single exposure)
    d = ox.daily_exposure([(0.0, one), (240.0, one)], cns_half_time_min=90.0)
    expected = 50.0 * 2.0 ** (-180.0 / 90.0) + 50.0
    assert d.cns_carried_percent[1] == pytest.approx(expected, rel=1e-12)
    assert d.cns_carried_exceeded is False
    assert any("assumption" in r for r in d.review_reasons)


def test_daily_out_of_range_propagates():
    d = ox.daily_exposure([(0.0, _const(30.0, 2.8)), (300.0, _const(30.0, 1.2))])
    assert d.out_of_range and d.needs_review
    assert d.minutes_above_range == 30.0
    # 30 min above the table at the 1.6 atm 24-hour rate (150 min) + 30 of 240 at 1.2 atm
    assert d.max_cns_24h_percent == pytest.approx(100 * (30 / 150 + 30 / 240), rel=1e-9)
    blob = json.loads(json.dumps(d.to_dict()))
    assert blob["cns_status"] == "lower bound"


def test_daily_ramp_window_close_to_grid_refinement():
    """Window placement inside ramps: a finer grid changes the maximum by far less than
    the grid's first-order bound (rate x step)."""
    dive = ox.segment_exposure([5.0, 60.0, 30.0], [0.21, 1.4 * ATM, 1.4 * ATM],
                               [1.4 * ATM, 1.4 * ATM, 0.21])
    pairs = [(0.0, dive), (1440.0 - 20.0, dive)]
    coarse = ox.daily_exposure(pairs, grid_min=0.1).max_otu_24h
    fine = ox.daily_exposure(pairs, grid_min=0.005).max_otu_24h
    assert fine >= coarse - 1e-9
    assert fine - coarse < 1e-3


@pytest.mark.parametrize(
    ("pairs", "kwargs", "field"),
    [
        ([], {}, "exposures"),
        ([(0.0, "dive")], {}, "exposures[0]"),
        ([(float("nan"), None)], {}, "exposures[0]"),
        ([("x", _const(10.0, 1.0))], {}, "exposures[0].start_min"),
        ([(0.0, _const(100.0, 1.0)), (50.0, _const(10.0, 1.0))], {}, "exposures"),
        ([(0.0, _const(10.0, 1.0))], {"cns_half_time_min": -5.0}, "cns_half_time_min"),
        ([(0.0, _const(10.0, 1.0))], {"grid_min": 0.0}, "grid_min"),
    ],
)
def test_daily_bad_input_raises_input_error(pairs, kwargs, field):
    with pytest.raises(InputError) as exc:
        ox.daily_exposure(pairs, **kwargs)
    assert exc.value.field == field


def test_verified_needs_checker_and_matching_hash(tmp_path):
    """A row counts as verified only with a checker's name and a row hash that matches its
    content; editing a verified row voids the check (project rule of the table layer)."""
    import tomllib

    import tomli_w

    from supervisor.references.canonical import row_hash

    src = tables_dir() / "limits" / f"{ox.PULMONARY_TABLE}.toml"
    doc = tomllib.loads(src.read_text(encoding="utf-8"))
    for r in doc["rows"]:
        r["verification"] = "verified"
    dst = tmp_path / src.name
    dst.write_text(tomli_w.dumps(doc), encoding="utf-8")
    assert not ox.load_pulmonary_limits(dst).info.verified  # no checker, no hash
    for r in doc["rows"]:
        r["verified_by"] = "checker"
        r["row_hash"] = "0123abcd"
    dst.write_text(tomli_w.dumps(doc), encoding="utf-8")
    ox._pulmonary_limits_cached.cache_clear()
    assert not ox.load_pulmonary_limits(dst).info.verified  # hash does not match
    for r in doc["rows"]:
        r["row_hash"] = row_hash(r)
    dst.write_text(tomli_w.dumps(doc), encoding="utf-8")
    ox._pulmonary_limits_cached.cache_clear()
    info = ox.load_pulmonary_limits(dst).info
    assert info.verified
    assert not info.usable_without_review  # still FROM MEMORY / SECONDARY
    doc["rows"][0]["daily_allowance_otu"] = 900  # a transcription slip after the check
    doc["rows"][0]["total_allowance_otu"] = 900
    dst.write_text(tomli_w.dumps(doc), encoding="utf-8")
    ox._pulmonary_limits_cached.cache_clear()
    assert not ox.load_pulmonary_limits(dst).info.verified  # edited after the check

