"""When a final visual may be made (no database). AWS D1.1/D1.1M:2020 Table 8.1 note (from memory): A514, A517 and
A709 Gr 100, 100W and HPS 100W are visually inspected no sooner than 48 h after the weld has cooled."""

from datetime import UTC, datetime, timedelta

import pytest

from inspections.visual_timing import DELAY, SOURCE, final_visual_timing, needs_delay

COOLED = datetime(2026, 3, 2, 14, 0, tzinfo=UTC)


def test_the_delay_is_48_hours_and_names_its_source():
    assert DELAY == timedelta(hours=48) and "Table 8.1" in SOURCE and "from memory" in SOURCE


@pytest.mark.parametrize("steel", ["ASTM A514", "A514 Gr B", "a517", "ASTM A709 Gr HPS 100W", "A709 Grade 100W"])
def test_quenched_and_tempered_steels_wait(steel):
    assert needs_delay(steel)


@pytest.mark.parametrize("steel", ["ASTM A709 Gr 50", "ASTM A572 Gr 65", "ASTM A992", "EN 10025-2 S355J2"])
def test_other_steels_do_not(steel):
    assert not needs_delay(steel)


def test_at_the_limit_and_just_before_it():
    timing = final_visual_timing("ASTM A36, ASTM A514", COOLED)
    assert timing.steels == ("ASTM A514",)
    assert timing.allows(COOLED + timedelta(hours=48))
    assert not timing.allows(COOLED + timedelta(hours=47, minutes=59))
    assert "becomes possible at 2026-03-04T14:00" in timing.refusal(COOLED)


def test_without_a_completion_time_it_cannot_say_when():
    timing = final_visual_timing(["ASTM A517"], None)
    assert not timing.allows(COOLED) and "record when the weld was completed" in timing.refusal(COOLED)


def test_a_weld_in_ordinary_steel_may_be_inspected_at_once():
    timing = final_visual_timing([], None)
    assert timing.allows(COOLED) and timing.refusal(COOLED) is None
