"""inspections.consumables.flux_at: a flux lot's log judged at a moment, through flux_usable. AWS D1.1/D1.1M:2020
clause 7.3.3.2 recalled without the document (from memory): flux dry and clean; from a damaged package discarded or
dried at no less than 500 degF [260 degC] for 1 h; flux that has been wet is not used."""

from datetime import datetime, timedelta
from decimal import Decimal

import pytest

from core.units import parse_temperature
from inspections import consumables as engine

T0 = datetime(2026, 11, 2, 6, 0)
SECOND = timedelta(seconds=1)


def ev(kind, minutes=0, temperature=None, hours=None):
    return engine.FluxEvent(minutes, T0 + timedelta(minutes=minutes), kind,
                            parse_temperature(temperature) if temperature else None,
                            Decimal(hours) if hours else None)


def test_nothing_opened_on_record_is_not_a_failure_but_says_so():
    assert engine.flux_at([], T0) == (True, "no package opened on record before then")
    # an opening after the moment asked does not count yet
    assert engine.flux_at([ev(engine.OPENED_DAMAGED, 10)], T0 + 10 * timedelta(minutes=1) - SECOND)[0]


def test_opened_intact_is_usable_clause_7_3_3_2_from_memory():
    assert engine.flux_at([ev(engine.OPENED_INTACT)], T0) == (True, "")


def test_opened_damaged_is_unusable_until_dried_500_f_1_h_clause_7_3_3_2_from_memory():
    opened = ev(engine.OPENED_DAMAGED)
    usable, reason = engine.flux_at([opened], T0)
    assert not usable and "7.3.3.2" in reason
    at_edge = [opened, ev(engine.DRIED, 5, "500 F", "1")]
    assert engine.flux_at(at_edge, T0 + timedelta(hours=2))[0]  # just inside: 500 degF for 1 h
    assert not engine.flux_at([opened, ev(engine.DRIED, 5, "499 F", "1")], T0 + timedelta(hours=2))[0]
    assert not engine.flux_at([opened, ev(engine.DRIED, 5, "500 F", "0.99")], T0 + timedelta(hours=2))[0]


def test_dried_in_celsius_judged_against_260_c_from_memory():
    opened = ev(engine.OPENED_DAMAGED)
    assert engine.flux_at([opened, ev(engine.DRIED, 5, "260 C", "1")], T0 + SECOND * 600, "SI")[0]
    assert not engine.flux_at([opened, ev(engine.DRIED, 5, "259 C", "1")], T0 + SECOND * 600, "SI")[0]


def test_the_last_drying_counts():
    events = [ev(engine.OPENED_DAMAGED), ev(engine.DRIED, 5, "550 F", "1"), ev(engine.DRIED, 90, "300 F", "1")]
    assert engine.flux_at(events, T0 + timedelta(minutes=60))[0]
    assert not engine.flux_at(events, T0 + timedelta(minutes=90))[0]


@pytest.mark.parametrize("finding", [engine.FOUND_WET, engine.FOUND_CONTAMINATED])
def test_wet_or_contaminated_flux_stays_unusable_even_dried_until_a_new_package_from_memory(finding):
    events = [ev(engine.OPENED_INTACT), ev(finding, 30), ev(engine.DRIED, 40, "600 F", "2")]
    assert engine.flux_at(events, T0 + timedelta(minutes=30) - SECOND)[0]  # just before it was found
    usable, reason = engine.flux_at(events, T0 + timedelta(minutes=30))
    assert not usable and "7.3.3.2" in reason
    assert not engine.flux_at(events, T0 + timedelta(hours=5))[0]
    assert engine.flux_at(events + [ev(engine.OPENED_INTACT, 300)], T0 + timedelta(hours=5))[0]


def test_an_unknown_event_is_refused():
    with pytest.raises(ValueError):
        engine.flux_at([engine.FluxEvent(1, T0, "spilled")], T0)
