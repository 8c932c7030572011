"""One unit system per plan: gas quantities in the plan's system (issue 8 §2)."""

from __future__ import annotations

import pytest

from supervisor.quantities import LITRES_PER_CUBIC_FOOT, UnitSystem


def test_litres_per_cubic_foot_is_the_international_foot() -> None:
    # NIST SP 811 (2008), Appendix B.8: 1 ft³ = 2.831685 E-02 m³
    assert LITRES_PER_CUBIC_FOOT == pytest.approx(28.316846592, rel=1e-12)


def test_fsw_plan_prints_psig_and_scf() -> None:
    u = UnitSystem("fsw")
    assert u.show_gas(LITRES_PER_CUBIC_FOOT * 100) == "100 scf"
    assert u.show_pressure(200.0) == "2901 psig"  # 200 bar / 0.0689475729 (NIST SP 811)
    assert u.show_rmv(39.64) == "1.4 acfm"  # the Navy's 1.4 acfm (U.S. Navy Diving Manual ch. 8)
    assert u.stated_psig(108) == "108 psig"


def test_msw_plan_prints_bar_and_litres_with_the_stated_psig_in_parentheses() -> None:
    u = UnitSystem("msw")
    assert u.show_gas(557.4) == "557 L" and u.show_flow(344.2) == "344 L/min"
    assert u.show_pressure(200.0) == "200 bar"
    assert u.stated_psig(108) == "7.4 bar (108 psig)"  # 108 x 0.0689475729 bar
    assert u.stated_scf(19.7) == "558 L (19.7 scf)"


def test_gradient_factor_prints_one_way() -> None:
    """Issue 8 §2: 165.5 % is '166 %' everywhere (half up from the record's 0.1 %),
    never '165 %' in one place and '166 %' in another (project's own convention)."""
    from supervisor.quantities import gf_percent_text, gf_percent_value

    assert gf_percent_value(165.46) == 165.5
    assert gf_percent_text(165.46) == gf_percent_text(165.5) == "166 %"
    assert gf_percent_text(164.5) == "165 %"  # half up, not to even
    assert gf_percent_text(-12.0).startswith("-12 % (below 0 %")
