"""Consumable control in the shop: the oven register and its log, and the proof chain's sixth link. A weld made
with low-hydrogen electrodes past their exposure limit (AWS D1.1/D1.1M:2020 Table 7.1, from memory), taken from an
oven below 250 F [120 C] (clause 7.3.2.1, from memory) or from a batch rebaked twice (clause 7.3.2.4, from memory)
blocks release, with the oven's page as the place to read why; the chain's queries stay fixed."""

from datetime import datetime, timedelta
from decimal import Decimal
from zoneinfo import ZoneInfo

import pytest
import time_machine
from django.urls import reverse

from core.errors import RecordLocked, Refused
from core.units import parse_temperature
from inspections import traveler
from inspections.models import Assembly, ElectrodeIssue, IssueState, OvenReading, Rebake
from inspections.services import consumables, trace
from inspections.services.assemblies import release_blockers

pytestmark = pytest.mark.django_db
NOON = datetime(2026, 12, 3, 12, 0, tzinfo=ZoneInfo("America/Chicago"))


@pytest.fixture(autouse=True)
def at_noon():
    with time_machine.travel(NOON, tick=False):
        yield


def _issue(make, users, weld, oven=None, out=None, back=None, discard=False, **kwargs):
    issue = ElectrodeIssue(oven=oven or make.make_oven(), lot=weld.filler_lot, welder=weld.welders.first(),
                           quantity=20, taken_out_at=out or NOON - timedelta(hours=3), **kwargs)
    consumables.record_issue(issue, users["inspector"])
    if back is not None:
        consumables.close_issue(issue, users["inspector"], back, None if discard else issue.oven)
    return issue


def _weld(make, users, classification="E7018"):
    weld = make.make_smaw_weld()
    trace.record_weld_filler(weld, make.make_filler_lot(classification, specification="AWS A5.1/A5.1M",
                                                        diameter=make_l("1/8 in")), users["inspector"])
    make.make_inspection(weld)
    return weld


def make_l(text):
    from tests.factory import L

    return L(text)


def test_an_issue_returned_at_its_4_h_limit_holds_table_7_1_from_memory(make, users):
    weld = _weld(make, users)
    _issue(make, users, weld, out=NOON - timedelta(hours=5), back=NOON - timedelta(hours=1))
    assert release_blockers(Assembly.objects.get(pk=weld.assembly_id)) == []


def test_an_issue_a_minute_past_its_limit_blocks_with_the_oven_page_table_7_1_from_memory(make, users):
    weld = _weld(make, users)
    issue = _issue(make, users, weld, out=NOON - timedelta(hours=5), back=NOON - timedelta(minutes=59))
    blockers = release_blockers(Assembly.objects.get(pk=weld.assembly_id))
    assert len(blockers) == 1 and "4 h 01 min out of the oven" in blockers[0] and "Table 7.1" in blockers[0]
    assert blockers[0].url == reverse("inspections:oven_detail", args=[issue.oven_id]) + f"#issue-{issue.pk}"


def test_an_issue_still_out_past_its_limit_blocks_and_shows_on_the_morning_list(make, users):
    weld = _weld(make, users)
    _issue(make, users, weld, out=NOON - timedelta(hours=4, seconds=1))
    assert "so far" not in release_blockers(Assembly.objects.get(pk=weld.assembly_id))[0]
    assert len(consumables.open_past_limit()) == 1


def test_a_weld_of_another_welder_or_another_day_is_not_covered(make, users):
    weld = _weld(make, users)
    other = make.make_qualified_welder(process="SMAW")
    ElectrodeIssue(oven=make.make_oven(), lot=weld.filler_lot, welder=other, quantity=5,
                   taken_out_at=NOON - timedelta(hours=9)).save()
    _issue(make, users, weld, out=NOON - timedelta(days=2), back=NOON - timedelta(days=1, hours=12))
    assert release_blockers(Assembly.objects.get(pk=weld.assembly_id)) == []


def test_an_oven_below_250_f_before_the_issue_blocks_clause_7_3_2_1_from_memory(make, users):
    weld = _weld(make, users)
    oven = make.make_oven(reading="249 F", at=NOON - timedelta(hours=4))
    _issue(make, users, weld, oven=oven, out=NOON - timedelta(hours=3), back=NOON - timedelta(hours=2))
    blockers = release_blockers(Assembly.objects.get(pk=weld.assembly_id))
    assert len(blockers) == 1 and "249 °F" in blockers[0] and "7.3.2.1" in blockers[0]
    ok_oven = make.make_oven(reading="250 F", at=NOON - timedelta(hours=4))
    weld2 = _weld(make, users)
    _issue(make, users, weld2, oven=ok_oven, out=NOON - timedelta(hours=3), back=NOON - timedelta(hours=2))
    assert release_blockers(Assembly.objects.get(pk=weld2.assembly_id)) == []


def test_electrodes_rebaked_twice_block_clause_7_3_2_4_from_memory(make, users):
    weld = _weld(make, users)
    oven = make.make_oven()
    first = consumables.record_rebake(Rebake(oven=oven, lot=weld.filler_lot, started_at=NOON - timedelta(hours=8),
                                             temperature=parse_temperature("600 F"), hours=Decimal("1"),
                                             quantity=40), users["inspector"])
    assert first.number == 1
    _issue(make, users, weld, oven=oven, rebake=first, out=NOON - timedelta(hours=3), back=NOON - timedelta(hours=2))
    assert release_blockers(Assembly.objects.get(pk=weld.assembly_id)) == []
    second = consumables.record_rebake(Rebake(oven=oven, lot=weld.filler_lot, started_at=NOON - timedelta(hours=6),
                                              temperature=parse_temperature("600 F"), hours=Decimal("1"),
                                              quantity=40, previous=first), users["inspector"])
    assert second.number == 2
    _issue(make, users, weld, oven=oven, rebake=second, out=NOON - timedelta(hours=2), back=NOON - timedelta(hours=1))
    blockers = release_blockers(Assembly.objects.get(pk=weld.assembly_id))
    assert len(blockers) == 1 and "no more than once" in blockers[0]


def test_an_ncr_closed_use_as_is_accepts_it(make, users):
    from inspections.services.ncr import disposition_use_as_is

    weld = _weld(make, users)
    _issue(make, users, weld, out=NOON - timedelta(hours=6), back=NOON - timedelta(hours=1))
    make.make_inspection(weld, accepted=False)
    disposition_use_as_is(weld.ncrs.get(), users["qa_lead"], "P. Lindqvist, PE (engineer of record)",
                          NOON.date(), "Moisture test of the lot passed")
    assert not any("oven" in b for b in release_blockers(Assembly.objects.get(pk=weld.assembly_id)))


def test_a_wire_lot_is_not_controlled_and_no_query_is_added(make, users):
    weld = make.make_sound_weld()  # E71T-1C: FCAW has no Table 7.1 limit
    trace.record_weld_filler(weld, make.make_filler_lot(), users["inspector"])
    assert consumables.weld_exposures([weld]) == {}


def _counted(make, users, welds, issues=True):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    assembly = make.make_assembly()
    welder = make.make_qualified_welder(process="SMAW")
    lot = make.make_filler_lot("E7018", diameter=make_l("1/8 in"))
    oven = make.make_oven()
    for i in range(welds):
        weld = make.make_smaw_weld(assembly=assembly, mark=f"W{i:02d}", welders=[welder])
        trace.record_weld_filler(weld, lot, users["inspector"])
        make.make_inspection(weld)
    for hours in range(welds if issues else 0):
        ElectrodeIssue(oven=oven, lot=lot, welder=welder, quantity=5,
                       taken_out_at=NOON - timedelta(hours=3 + hours / 10), state=IssueState.RETURNED,
                       back_at=NOON - timedelta(hours=1), returned_to=oven).save()
    assembly = Assembly.objects.get(pk=assembly.pk)
    with CaptureQueriesContext(connection) as counted:
        assert release_blockers(assembly) == []
    return len(counted)


def test_consumable_control_adds_one_query_to_the_chain_whatever_the_number_of_welds(make, users):
    assert _counted(make, users, 1) == _counted(make, users, 12) == _counted(make, users, 12, issues=False)


def test_the_log_is_never_edited_and_an_issue_closes_once(make, users):
    weld = _weld(make, users)
    issue = _issue(make, users, weld, back=NOON - timedelta(hours=1))
    assert ElectrodeIssue.objects.get(pk=issue.pk).state == IssueState.RETURNED
    with pytest.raises(Refused):
        consumables.close_issue(issue, users["inspector"], NOON, None)
    issue.quantity = 1
    with pytest.raises(RecordLocked):
        issue.save()
    reading = OvenReading.objects.filter(oven=issue.oven).first()
    reading.temperature = parse_temperature("500 F")
    with pytest.raises(RecordLocked):
        reading.save()


def test_refusals_back_before_out_future_times_wire_lots_and_retired_ovens(make, users):
    weld = _weld(make, users)
    issue = _issue(make, users, weld)
    with pytest.raises(Refused, match="before it was taken out"):
        consumables.close_issue(issue, users["inspector"], issue.taken_out_at - timedelta(minutes=1), None)
    with pytest.raises(Refused, match="future"):
        consumables.close_issue(issue, users["inspector"], NOON + timedelta(hours=1), None)
    wire = ElectrodeIssue(oven=issue.oven, lot=make.make_filler_lot(), welder=issue.welder, quantity=1,
                          taken_out_at=NOON)
    with pytest.raises(Refused, match="not a covered electrode"):
        consumables.record_issue(wire, users["inspector"])
    consumables.retire_oven(issue.oven, users["qa_lead"], "Element failed")
    with pytest.raises(Refused, match="retired"):
        consumables.record_reading(OvenReading(oven=issue.oven, read_at=NOON,
                                               temperature=parse_temperature("300 F")), users["inspector"])


def test_the_traveler_prints_the_exposure_status(make, users):
    weld = _weld(make, users)
    _issue(make, users, weld, out=NOON - timedelta(hours=5), back=NOON - timedelta(minutes=59))
    row = traveler.gather(weld.assembly_id)["welds"][0]
    assert "4 h 01 min of 4 h (past)" in row["exposure"]


def test_the_qa_leads_morning_page_names_unread_ovens_and_electrodes_out_past_their_limit(make, users):
    from inspections.services import today as morning

    weld = _weld(make, users)
    make.make_oven(number="OV-READ", at=NOON - timedelta(hours=12))  # read a shift ago: not due yet
    make.make_oven(number="OV-LATE", at=NOON - timedelta(hours=12, seconds=1))
    _issue(make, users, weld, oven=make.make_oven(number="OV-ISSUE"), out=NOON - timedelta(hours=4, minutes=1))
    section = next(s for s in morning.for_user(users["qa_lead"]) if s.key == "consumables")
    texts = [i.text for i in section.items]
    assert "Oven OV-LATE: no reading for a shift" in texts and not any("OV-READ" in t for t in texts)
    assert any(t.startswith(f"Lot {weld.filler_lot.lot_number} with ") and "(past)" in t for t in texts)
    assert section.total == 2


def test_a_repair_welded_with_electrodes_past_their_limit_blocks_too_table_7_1_from_memory(make, users):
    from inspections.services.ncr import disposition_repair
    from inspections.services.repairs import record_repair

    weld = _weld(make, users)
    make.make_inspection(weld, accepted=False)
    ncr = weld.ncrs.get()
    welder = weld.welders.first()
    disposition_repair(ncr, users["qa_lead"], make._smaw_wps, welder, notes="Grind out and re-weld")
    record_repair(ncr, users["inspector"], wps=make._smaw_wps, welders=[welder], welded_on=NOON.date(),
                  filler_lot=weld.filler_lot)
    _issue(make, users, weld, out=NOON - timedelta(hours=5), back=NOON - timedelta(minutes=30))
    blockers = release_blockers(Assembly.objects.get(pk=weld.assembly_id))
    flagged = [b for b in blockers if "out of the oven" in b]
    assert len(flagged) == 2 and any(f"repair for {ncr.number}: lot" in b for b in flagged)
