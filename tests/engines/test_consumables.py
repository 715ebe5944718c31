"""inspections.consumables at its edges. Every rule is AWS D1.1/D1.1M:2020 clause 7.3 recalled without the
document (from memory): Table 7.1 exposure limits, 7.3.2.1 holding ovens, 7.3.2.4 rebaking, 7.3.3.2 SAW flux; the
reading interval of one shift is common practice, no source."""

from datetime import datetime, timedelta
from decimal import Decimal

import pytest

from core.units import Temperature, parse_temperature
from inspections import consumables as engine

OUT = datetime(2026, 11, 2, 6, 0)
SECOND = timedelta(seconds=1)


@pytest.mark.parametrize(("classification", "hours"), [
    ("E7018", "4"), ("E7016", "4"), ("E7028", "4"), ("E7018 H8", "4"), ("E7018-1 H4", "4"),
    ("E7018-1 H4R", "9"), ("E7018M", "9"),
    ("E8018-C3", "2"), ("E8018-B2 H4R", "2"), ("E9018-M", "1"), ("E10018-D2", "0.5"), ("E11018-M", "0.5"),
])
def test_table_7_1_exposure_limits_from_memory(classification, hours):
    """AWS D1.1/D1.1M:2020 Table 7.1 column A (from memory): E70XX 4 h, E70XXR and E7018M 9 h, E80XX 2 h, E90XX 1 h,
    E100XX and E110XX 0.5 h; H4/H8 change nothing; R extends only the E70XX classes here."""
    limit = engine.exposure_limit(classification)
    assert limit.controlled and limit.hours == Decimal(hours)
    assert "Table 7.1" in limit.source and "from memory" in limit.source


@pytest.mark.parametrize("classification", ["E6013", "E7024", "E6010", "E71T-1C", "ER70S-6", "F7A2-EM12K"])
def test_not_low_hydrogen_smaw_is_not_controlled_d1_1_table_7_1(classification):
    limit = engine.exposure_limit(classification)
    assert not limit.controlled and limit.hours is None


def test_a_class_table_7_1_does_not_list_has_no_limit_and_says_so():
    limit = engine.exposure_limit("E12018-M")
    assert limit.controlled and limit.hours is None and "engineer sets one" in limit.reason


def test_bad_classification_raises_value_error():
    with pytest.raises(ValueError):
        engine.exposure_limit("E70Q8")


@pytest.mark.parametrize(("classification", "hours"), [("E7018", 4), ("E7018-1 H4R", 9), ("E8018-C3", 2),
                                                       ("E9018-M", 1), ("E10018-D2", 0.5)])
def test_exposure_at_the_limit_is_within_and_a_second_past_is_not_table_7_1(classification, hours):
    limit = timedelta(hours=hours)
    assert engine.exposure(classification, OUT, OUT + limit, OUT).within
    past = engine.exposure(classification, OUT, OUT + limit + SECOND, OUT)
    assert not past.within and "rebake before use, or discard" in past.reason and "Table 7.1" in past.reason
    assert past.over_at == OUT + limit


def test_an_open_exposure_runs_to_now():
    now = OUT + timedelta(hours=4, minutes=1)
    answer = engine.exposure("E7018", OUT, None, now)
    assert answer.open and not answer.within and "4 h 01 min out of the oven" in answer.reason
    assert engine.exposure("E7018", OUT, None, OUT + timedelta(hours=4)).within


def test_back_before_out_is_refused():
    with pytest.raises(ValueError, match="before they were taken out"):
        engine.exposure("E7018", OUT, OUT - SECOND, OUT)


def test_uncontrolled_electrodes_are_always_within():
    assert engine.exposure("E6013", OUT, OUT + timedelta(days=3), OUT).within


def _reading(text, at=OUT):
    return engine.OvenReading(1, at, parse_temperature(text))


@pytest.mark.parametrize(("text", "system", "ok"), [
    ("250 F", "US", True), ("249 F", "US", False), ("120 C", "SI", True), ("119 C", "SI", False),
    ("249.9 F", "US", False), ("120 C", "US", False),  # 120 C is 248 F: below 250 F as printed in US units
])
def test_holding_oven_minimum_250_f_120_c_clause_7_3_2_1_from_memory(text, system, ok):
    answer = engine.oven_at([_reading(text)], OUT, system)
    assert answer.ok is ok
    if not ok:
        assert "7.3.2.1" in answer.reason


def test_the_last_reading_before_the_issue_decides_and_later_readings_do_not_count():
    readings = [_reading("200 F", OUT - timedelta(hours=3)), _reading("260 F", OUT - timedelta(hours=1)),
                _reading("100 F", OUT + SECOND)]
    assert engine.oven_at(readings, OUT, "US").ok
    assert not engine.oven_at(readings, OUT + SECOND, "US").ok  # a reading at the very time counts


def test_no_reading_is_not_a_failure_but_says_so():
    answer = engine.oven_at([], OUT, "US")
    assert answer.ok and answer.reading is None and "no reading" in answer.reason


def test_a_reading_is_due_after_one_shift_common_practice_no_source():
    assert not engine.reading_due(OUT, OUT + timedelta(hours=12))
    assert engine.reading_due(OUT, OUT + timedelta(hours=12) + SECOND)
    assert engine.reading_due(None, OUT)


@pytest.mark.parametrize(("classification", "text", "system", "ok"), [
    ("E7018", "500 F", "US", True), ("E7018", "499 F", "US", False), ("E7018", "800 F", "US", True),
    ("E7018", "801 F", "US", False), ("E7018", "260 C", "SI", True), ("E7018", "259 C", "SI", False),
    ("E8018-C3", "700 F", "US", True), ("E8018-C3", "699 F", "US", False), ("E8018-C3", "430 C", "SI", True),
    ("E8018-C3", "431 C", "SI", False),
])
def test_rebake_temperature_clause_7_3_2_4_from_memory(classification, text, system, ok):
    """A5.1 classes 500 to 800 F [260 to 430 C]; A5.5 classes 700 to 800 F [370 to 430 C]; 1 h minimum."""
    answer = engine.rebake(classification, parse_temperature(text), Decimal("1"), 1, system)
    assert answer.ok is ok


def test_rebake_time_at_least_one_hour_and_once_only_clause_7_3_2_4_from_memory():
    hot = parse_temperature("600 F")
    assert engine.rebake("E7018", hot, Decimal("1"), 1, "US").ok
    short = engine.rebake("E7018", hot, Decimal("0.99"), 1, "US")
    assert not short.ok and "1 h minimum" in short.reasons[0]
    twice = engine.rebake("E7018", hot, Decimal("2"), 2, "US")
    assert not twice.ok and "no more than once" in twice.reasons[0]


@pytest.mark.parametrize("hours", [Decimal("0"), Decimal("-1"), Decimal("NaN"), 1.5, "2"])
def test_rebake_bad_hours_raise_value_error(hours):
    with pytest.raises(ValueError):
        engine.rebake("E7018", Temperature(Decimal("300")), hours, 1, "US")


def test_rebake_bad_number_or_system_raise_value_error():
    with pytest.raises(ValueError):
        engine.rebake("E7018", Temperature(Decimal("300")), Decimal("1"), 0, "US")
    with pytest.raises(ValueError):
        engine.rebake("E7018", Temperature(Decimal("300")), Decimal("1"), 1, "metric")


def test_saw_flux_dry_and_clean_clause_7_3_3_2_from_memory():
    assert engine.flux_usable(engine.INTACT, wet=False, contaminated=False) == (True, "")
    assert not engine.flux_usable(engine.INTACT, wet=True, contaminated=False)[0]
    assert not engine.flux_usable(engine.INTACT, wet=False, contaminated=True)[0]


def test_saw_flux_from_a_damaged_package_is_discarded_unless_dried_500_f_1_h_from_memory():
    usable, reason = engine.flux_usable(engine.DAMAGED, wet=False, contaminated=False)
    assert not usable and "discarded" in reason and "7.3.3.2" in reason
    dried = dict(wet=False, contaminated=False, dried_hours=Decimal("1"))
    assert engine.flux_usable(engine.DAMAGED, dried=parse_temperature("500 F"), **dried)[0]
    assert not engine.flux_usable(engine.DAMAGED, dried=parse_temperature("499 F"), **dried)[0]
    assert not engine.flux_usable(engine.DAMAGED, dried=parse_temperature("500 F"), wet=False, contaminated=False,
                                  dried_hours=Decimal("0.9"))[0]
    with pytest.raises(ValueError):
        engine.flux_usable("torn", wet=False, contaminated=False)
