"""NCRs: raised from a rejected inspection; repair, use-as-is or scrap by the QA lead; closed by re-inspection."""

from datetime import timedelta

import pytest
from django.core.exceptions import PermissionDenied
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked, Refused
from core.history import history_of
from inspections.models import NCR, AssemblyState
from inspections.models.ncr import Disposition, NCRState
from inspections.services.ncr import (
    close_ncrs_for,
    disposition_repair,
    disposition_scrap,
    disposition_use_as_is,
    open_ncr,
)
from inspections.services.repairs import record_repair
from procedures.models.wps import WPSState
from tests.factory import L, parse_force
from tests.test_jobs_pages import qualified_welder


@pytest.fixture
def ncr(make):
    return make.make_ncr()


def snapshot(ncr):
    ncr = NCR.objects.get(pk=ncr.pk)
    return (ncr.state, ncr.disposition, ncr.repair_wps_id, ncr.engineer_name, ncr.capacity_calculation,
            history_of(ncr).count())


# --- raising ------------------------------------------------------------------------------------------

def test_it_opens_an_ncr_from_a_rejected_inspection_and_rejects_the_assembly(make, users):
    inspection = make.make_inspection(accepted=False)
    ncr = open_ncr(inspection, users["inspector"], "Undersize leg, 3 in at the north end")
    job = inspection.weld.assembly.job
    assert ncr.number == f"NCR-{job.number}-001" and ncr.state == NCRState.OPEN
    assert history_of(ncr).get().to_state == NCRState.OPEN
    inspection.weld.assembly.refresh_from_db()
    assert inspection.weld.assembly.state == AssemblyState.REJECTED
    assert open_ncr(inspection, users["inspector"], "again") == ncr  # one NCR per inspection


def test_it_refuses_an_ncr_from_an_accepted_inspection_or_without_words(make, users):
    with pytest.raises(Refused):
        open_ncr(make.make_inspection(accepted=True), users["inspector"], "x")
    with pytest.raises(Refused):
        open_ncr(make.make_inspection(accepted=False), users["inspector"], "   ")
    with pytest.raises(PermissionDenied):
        open_ncr(make.make_inspection(accepted=False), users["viewer"], "x")
    assert NCR.objects.count() == 2  # only those the two rejected final inspections opened when signed


def test_an_ncr_is_never_edited_in_place(ncr):
    ncr.description = "changed"
    with pytest.raises(RecordLocked):
        ncr.save()
    with pytest.raises(RecordLocked):
        ncr.delete()


# --- repair -------------------------------------------------------------------------------------------

def test_a_repair_needs_an_approved_wps_and_a_qualified_welder(make, users, ncr):
    draft = make.make_wps()
    approved = make.make_wps(state=WPSState.APPROVED)
    untested = make.make_welder()
    before = snapshot(ncr)
    with pytest.raises(Refused) as refused:
        disposition_repair(ncr, users["qa_lead"], draft, untested)
    assert set(refused.value.message_dict) == {"repair_wps", "repair_welder"}
    assert "approved WPS" in refused.value.message_dict["repair_wps"][0]
    assert snapshot(ncr) == before
    welder = qualified_welder(make)
    disposition_repair(ncr, users["qa_lead"], approved, welder, "Grind and re-weld the north 4 in")
    ncr.refresh_from_db()
    assert ncr.state == NCRState.DISPOSITIONED and ncr.disposition == Disposition.REPAIR
    assert ncr.repair_welder == welder and ncr.dispositioned_by == users["qa_lead"]


def test_a_repair_is_refused_for_a_welder_not_qualified_for_the_position(make, users):
    weld = make.make_weld(position="OH")
    ncr = make.make_ncr(inspection=make.make_inspection(weld=weld, accepted=False))
    flat_only = make.make_welder()
    make.make_qualification(welder=flat_only, joint="fillet", test_position="1F",
                            test_date=timezone.localdate() - timedelta(days=10))
    with pytest.raises(Refused) as refused:
        disposition_repair(ncr, users["qa_lead"], make.make_wps(state=WPSState.APPROVED), flat_only)
    assert "repair_welder" in refused.value.message_dict


def test_an_accepted_final_reinspection_closes_the_repair(make, users, ncr):
    wps, welder = make.make_wps(state=WPSState.APPROVED), qualified_welder(make)
    disposition_repair(ncr, users["qa_lead"], wps, welder)
    too_soon = make.make_inspection(weld=ncr.weld, accepted=True)  # before the repair is recorded as welded
    assert NCR.objects.get(pk=ncr.pk).state == NCRState.DISPOSITIONED and close_ncrs_for(too_soon) == []
    record_repair(ncr, users["inspector"], wps=wps, welders=[welder], welded_on=timezone.localdate())
    in_process = make.make_inspection(weld=ncr.weld, accepted=True, stage="in_process")
    assert close_ncrs_for(in_process) == []
    final = make.make_inspection(weld=ncr.weld, accepted=True)  # signing closes the repaired NCR
    assert close_ncrs_for(final) == []  # and a second call finds nothing left to close
    ncr.refresh_from_db()
    assert ncr.state == NCRState.CLOSED and ncr.closed_by_inspection == final
    ncr.weld.assembly.refresh_from_db()
    assert ncr.weld.assembly.state == AssemblyState.AWAITING_INSPECTION


def test_an_undispositioned_ncr_stays_open_after_an_accepted_inspection(make, ncr):
    assert close_ncrs_for(make.make_inspection(weld=ncr.weld, accepted=True)) == []
    assert NCR.objects.get(pk=ncr.pk).state == NCRState.OPEN


# --- use as is ----------------------------------------------------------------------------------------

def test_use_as_is_needs_the_engineer_and_a_date_not_in_the_future(users, ncr):
    before = snapshot(ncr)
    with pytest.raises(Refused) as refused:
        disposition_use_as_is(ncr, users["qa_lead"], "  ", None)
    assert set(refused.value.message_dict) == {"engineer_name", "engineer_approved_on"}
    with pytest.raises(Refused):
        disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate() + timedelta(days=1))
    assert snapshot(ncr) == before


def test_use_as_is_attaches_the_as_inspected_capacity_and_closes(make, users, ncr):
    disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate(), "Within capacity")
    ncr.refresh_from_db()
    assert ncr.state == NCRState.CLOSED and ncr.disposition == Disposition.USE_AS_IS
    calc = ncr.capacity_calculation
    assert calc["kind"] == "as_inspected" and calc["steps"] and not calc.get("error")
    assert any("AISC 360-16 J2.4" in step[0] for step in calc["steps"])
    ncr.weld.assembly.refresh_from_db()
    assert ncr.weld.assembly.state != AssemblyState.REJECTED


def test_a_use_as_is_weld_counts_as_inspected_for_release(make, users):
    from inspections.services.assemblies import release_blockers

    ncr = make.make_ncr(inspection=make.make_inspection(weld=make.make_sound_weld(), accepted=False))
    assert release_blockers(ncr.weld.assembly) == [f"Weld {ncr.weld.mark}: {ncr} is open (awaiting disposition)."]
    disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())
    assert release_blockers(ncr.weld.assembly) == []


def test_use_as_is_is_refused_when_the_weld_as_inspected_does_not_carry_its_required_strength(make, users):
    weld = make.make_weld(size=L("1/4 in"), length=L("4 in"), required_strength=parse_force("20 kip"))
    inspection = make.make_inspection(weld=weld, accepted=False, min_size=L("1/8 in"), undersize_length=L("4 in"))
    ncr = make.make_ncr(inspection=inspection)
    with pytest.raises(Refused, match="does not carry its required strength"):
        disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())
    assert NCR.objects.get(pk=ncr.pk).state == NCRState.OPEN


def test_use_as_is_is_accepted_when_the_weld_carries_its_required_strength(make, users):
    weld = make.make_weld(size=L("1/4 in"), length=L("12 in"), required_strength=parse_force("20 kip"))
    ncr = make.make_ncr(inspection=make.make_inspection(weld=weld, accepted=False, min_size=L("3/16 in"),
                                                        undersize_length=L("2 in")))
    disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())
    ncr.refresh_from_db()
    # AISC Manual 15th ed. Part 8, 1.392 D kip/in: 10 in at D = 4 and 2 in at D = 3 carry 64.0 kip; 20 / 64.0.
    assert ncr.state == NCRState.CLOSED and ncr.capacity_calculation["ratio"] == "0.312"


def test_use_as_is_is_refused_when_a_required_strength_cannot_be_checked(make, users):
    weld = make.make_weld(joint_type="groove", required_strength=parse_force("10 kip"))
    ncr = make.make_ncr(inspection=make.make_inspection(weld=weld, accepted=False))
    before = snapshot(ncr)
    with pytest.raises(Refused, match="required strength: Weld .* is a groove weld"):
        disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())
    assert snapshot(ncr) == before


# --- scrap --------------------------------------------------------------------------------------------

def test_scrap_needs_a_reason_and_scraps_the_assembly(users, ncr):
    with pytest.raises(Refused):
        disposition_scrap(ncr, users["qa_lead"], "")
    disposition_scrap(ncr, users["qa_lead"], "Burn-through at the cope")
    ncr.refresh_from_db()
    assert ncr.state == NCRState.CLOSED and ncr.weld.assembly.state == AssemblyState.SCRAPPED
    with pytest.raises(Refused):
        disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())


def test_only_the_qa_lead_dispositions(users, ncr, make):
    for role in ("welding_engineer", "inspector", "viewer"):
        with pytest.raises(PermissionDenied):
            disposition_scrap(ncr, users[role], "x")


# --- pages --------------------------------------------------------------------------------------------

def test_the_list_shows_open_ncrs_first(client_as, make, users):
    closed = make.make_ncr()
    disposition_scrap(closed, users["qa_lead"], "Scrap")
    open_one = make.make_ncr()
    client = client_as("viewer")
    assert open_one.number in client.get(reverse("inspections:ncr_list")).text
    assert closed.number not in client.get(reverse("inspections:ncr_list")).text
    page = client.get(reverse("inspections:ncr_list"), {"show": "all"}).text
    assert page.index(open_one.number) < page.index(closed.number)


def test_the_list_uses_a_fixed_number_of_queries(client_as, make, django_assert_num_queries):
    client = client_as("viewer")
    make.make_ncr()
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    with CaptureQueriesContext(connection) as ctx:
        client.get(reverse("inspections:ncr_list"))
    for _ in range(5):
        make.make_ncr()
    with django_assert_num_queries(len(ctx.captured_queries)):
        client.get(reverse("inspections:ncr_list"))


def test_the_detail_page_offers_dispositions_to_the_qa_lead_only(client_as, ncr):
    url = reverse("inspections:ncr_detail", args=[ncr.pk])
    assert "Use as is" in client_as("qa_lead").get(url).text
    assert "Use as is" not in client_as("inspector").get(url).text


def test_a_disposition_form_with_bad_input_shows_errors_and_changes_nothing(client_as, make, ncr):
    before = snapshot(ncr)
    client = client_as("qa_lead")
    draft = make.make_wps()
    response = client.post(reverse("inspections:ncr_disposition", args=[ncr.pk, "repair"]), {
        "repair-repair_wps": draft.pk, "repair-repair_welder": "x", "repair-disposition_notes": ""})
    assert response.status_code == 400 and response.context["forms"]["repair"].errors
    response = client.post(reverse("inspections:ncr_disposition", args=[ncr.pk, "use_as_is"]), {
        "use_as_is-engineer_name": "", "use_as_is-engineer_approved_on": "yesterday"})
    assert response.status_code == 400
    assert client.post(reverse("inspections:ncr_disposition", args=[ncr.pk, "bogus"])).status_code == 404
    assert snapshot(ncr) == before


def test_a_repair_with_an_unqualified_welder_is_explained_beside_the_field(client_as, make, ncr):
    approved = make.make_wps(state=WPSState.APPROVED)
    untested = make.make_welder()
    response = client_as("qa_lead").post(reverse("inspections:ncr_disposition", args=[ncr.pk, "repair"]), {
        "repair-repair_wps": approved.pk, "repair-repair_welder": untested.pk,
        "repair-disposition_notes": "Re-weld"})
    assert response.status_code == 400
    assert "repair_welder" in response.context["forms"]["repair"].errors


def test_the_use_as_is_form_closes_the_ncr(client_as, ncr):
    response = client_as("qa_lead").post(reverse("inspections:ncr_disposition", args=[ncr.pk, "use_as_is"]), {
        "use_as_is-engineer_name": "M. Ferreira, PE",
        "use_as_is-engineer_approved_on": timezone.localdate().isoformat(), "use_as_is-disposition_notes": "OK"})
    assert response.status_code == 302
    page = client_as("viewer").get(reverse("inspections:ncr_detail", args=[ncr.pk])).text
    assert "As-inspected capacity" in page and "M. Ferreira, PE" in page


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_the_disposition_forms_refuse_other_roles(client_as, ncr, role):
    response = client_as(role).post(reverse("inspections:ncr_disposition", args=[ncr.pk, "scrap"]),
                                    {"scrap-disposition_notes": "x"})
    assert response.status_code == 403 and NCR.objects.get(pk=ncr.pk).state == NCRState.OPEN
