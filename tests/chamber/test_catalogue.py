"""Finding bundled treatment tables by their published number."""

from __future__ import annotations

import pytest

from supervisor.chamber.catalogue import catalogue, load_treatment, table_numbers
from supervisor.errors import InputError


def test_every_table_of_the_issue_is_bundled():
    # the oxygen tables 5, 6, 6A, 9, the deeper 4, 7, 8 and the air tables 1A, 2A, 3
    assert table_numbers() == ["1A", "2A", "3", "4", "5", "6", "6A", "7", "8", "9"]
    plannable = {e.number for e in catalogue() if e.plannable}
    assert plannable == {"5", "6", "6A", "9"}


def test_number_is_case_insensitive():
    assert load_treatment("6a").name == "usn-tt6a"
    assert load_treatment(" 6 ").name == "usn-tt6"


@pytest.mark.parametrize("number", ["1A", "2A", "3", "4", "7", "8"])
def test_table_without_steps_is_refused_with_what_is_missing(number):
    with pytest.raises(InputError) as e:
        load_treatment(number)
    assert e.value.field == "TABLE" and "cannot be planned" in e.value.message
    assert "lacks" in e.value.message and "5, 6, 6A, 9" in e.value.message
    t = load_treatment(number, plannable_only=False)  # bundled, stops as far as known
    assert t.model.conventions.missing


@pytest.mark.parametrize("number", ["12", "", "six", "6B"])
def test_unknown_table(number):
    with pytest.raises(InputError) as e:
        load_treatment(number)
    assert e.value.field == "TABLE" and "1A, 2A, 3, 4, 5, 6, 6A, 7, 8, 9" in e.value.message
