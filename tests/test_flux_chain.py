"""A SAW weld's flux (its flux-wire filler lot, e.g. F7A2-EM12K) not usable on the weld's day blocks its release,
the blocker linking the oven log's flux rows. AWS D1.1/D1.1M:2020 clause 7.3.3.2 (from memory): flux dry and clean;
from a damaged package discarded or dried at no less than 500 degF [260 degC] for 1 h; wet flux not used."""

from datetime import timedelta

import pytest
from django.urls import reverse

from inspections.models import Assembly, FluxRecord
from inspections.services import consumables, trace
from inspections.services.assemblies import release_blockers
from tests.factory import L
from tests.test_consumables import NOON, at_noon  # noqa: F401 - the same noon, frozen for every test here

pytestmark = pytest.mark.django_db


def _weld(make, users):
    weld = make.make_smaw_weld()
    trace.record_weld_filler(weld, make.make_filler_lot("F7A2-EM12K", specification="AWS A5.17/A5.17M",
                                                        diameter=L("5/32 in")), users["inspector"])
    return weld


def _flux(users, oven, weld, event, at, **kwargs):
    return consumables.record_flux(FluxRecord(oven=oven, lot=weld.filler_lot, event=event, at=at, **kwargs),
                                   users["inspector"])


def _flux_blockers(weld):
    return [b for b in release_blockers(Assembly.objects.get(pk=weld.assembly_id)) if "flux of lot" in b]


def test_flux_opened_intact_holds(make, users):
    weld = _weld(make, users)
    _flux(users, make.make_oven(), weld, "opened_intact", NOON - timedelta(days=2))
    assert consumables.weld_exposures([weld]) == {} and _flux_blockers(weld) == []


def test_no_flux_record_is_not_a_blocker(make, users):
    weld = _weld(make, users)
    assert consumables.weld_exposures([weld]) == {}


def test_a_damaged_package_not_dried_blocks_with_the_flux_log_clause_7_3_3_2_from_memory(make, users):
    weld, oven = _weld(make, users), make.make_oven()
    _flux(users, oven, weld, "opened_damaged", NOON - timedelta(days=2))
    blockers = _flux_blockers(weld)
    assert len(blockers) == 1 and "7.3.3.2" in blockers[0] and "damaged package" in blockers[0]
    assert blockers[0].url == reverse("inspections:oven_detail", args=[oven.pk]) + "#flux"


def test_dried_at_500_f_for_1_h_before_the_day_holds_and_499_f_does_not_from_memory(make, users):
    from core.units import parse_temperature

    for temperature, blocked in (("500 F", False), ("499 F", True)):
        weld, oven = _weld(make, users), make.make_oven()
        _flux(users, oven, weld, "opened_damaged", NOON - timedelta(days=2))
        _flux(users, oven, weld, "dried", NOON - timedelta(days=1), temperature=parse_temperature(temperature),
              hours=1)
        assert bool(_flux_blockers(weld)) is blocked


def test_flux_found_wet_later_the_same_day_flags_the_weld_the_weld_records_no_hour(make, users):
    weld, oven = _weld(make, users), make.make_oven()
    _flux(users, oven, weld, "opened_intact", NOON - timedelta(days=2))
    _flux(users, oven, weld, "wet", NOON - timedelta(minutes=5))
    blockers = _flux_blockers(weld)
    assert len(blockers) == 1 and "has been wet" in blockers[0]


def test_flux_found_wet_the_next_day_does_not_flag_an_earlier_weld(make, users):
    weld, oven = _weld(make, users), make.make_oven()
    _flux(users, oven, weld, "opened_intact", NOON - timedelta(days=2))
    day_before = NOON - timedelta(days=1)
    from inspections.models import Weld

    Weld.objects.filter(pk=weld.pk).update(welded_on=day_before.date())
    _flux(users, oven, weld, "wet", NOON - timedelta(minutes=5))
    earlier = Weld.objects.select_related("filler_lot").get(pk=weld.pk)
    assert earlier.welded_on == day_before.date() and consumables.weld_exposures([earlier]) == {}
