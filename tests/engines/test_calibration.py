"""inspections.calibration at its edges: the due date is the last day of use (common practice, no source); the
interval is the shop's (ISO 3834-2:2021 clause 12, from memory); a gauge found out of tolerance puts in doubt what
was measured under its last good calibration."""

from datetime import date

import pytest

from inspections import calibration as engine
from inspections.calibration import IN_TOLERANCE, OUT_OF_TOLERANCE, Calibration

GOOD = Calibration(1, date(2026, 1, 10), date(2026, 7, 10), IN_TOLERANCE)


def test_usable_on_its_due_date_and_not_the_day_after_common_practice_no_source():
    assert engine.standing([GOOD], date(2026, 7, 10)).ok
    late = engine.standing([GOOD], date(2026, 7, 11))
    assert not late.ok and late.reason == "calibration was due on 2026-07-10"


def test_usable_from_the_day_it_is_calibrated_and_not_before():
    assert engine.standing([GOOD], date(2026, 1, 10)).calibration == 1
    assert engine.standing([GOOD], date(2026, 1, 9)).reason == "no calibration on record"


def test_the_latest_calibration_decides_and_found_out_of_tolerance_stops_use():
    failed = Calibration(2, date(2026, 5, 1), date(2026, 5, 1), OUT_OF_TOLERANCE)
    assert engine.standing([GOOD, failed], date(2026, 4, 30)).ok
    answer = engine.standing([failed, GOOD], date(2026, 5, 1))
    assert not answer.ok and "found out of tolerance on 2026-05-01" in answer.reason


def test_a_retired_gauge_is_never_usable():
    assert engine.standing([GOOD], date(2026, 2, 1), retired=True).reason == "retired from use"


def test_suspect_is_the_last_good_calibration_before_the_failure():
    later_good = Calibration(3, date(2026, 7, 1), date(2027, 1, 1), IN_TOLERANCE)
    failed = Calibration(4, date(2026, 11, 2), date(2026, 11, 2), OUT_OF_TOLERANCE)
    assert engine.suspect([GOOD, later_good, failed], 4) == 3
    assert engine.suspect([failed], 4) is None


def test_an_unknown_result_is_refused():
    with pytest.raises(ValueError, match="Unknown calibration result"):
        engine.standing([Calibration(1, date(2026, 1, 1), date(2027, 1, 1), "maybe")], date(2026, 2, 1))
