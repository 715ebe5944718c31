"""Release waits for every link of every weld's chain: one test per blocker, and a control where all hold.

The chain (inspections.services.chain): the WPS approved on the weld date and covering the weld; each welder
qualified and in continuity on that date; an accepted final visual with no NCR open; an accepted fit-up where the
job holds it; and the same WPS and welder links for every recorded repair. release() is refused while any is
listed, with no override.
"""

from datetime import date, timedelta
from unittest import mock

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from core.history import history_of
from inspections.models import Assembly, AssemblyState, WeldRepair
from inspections.services.assemblies import release, release_blockers
from inspections.services.ncr import disposition_repair, disposition_use_as_is
from inspections.services.repairs import record_repair
from procedures.models import WPS, ContinuityEntry
from procedures.models.wps import WPSState
from procedures.services import wps as wps_steps
from tests.factory import L

TODAY = timezone.localdate()


@pytest.fixture
def assembly(make):
    return make.make_assembly(piece_mark="B40")


def sound(make, assembly, before_inspection=None, **kwargs):
    """A weld whose whole chain holds: sound (factory) and accepted at final visual. before_inspection(weld)
    breaks one link first, while the weld map may still change (core.locking freezes it at its final visual)."""
    weld = make.make_sound_weld(assembly=assembly, **kwargs)
    if before_inspection is not None:
        before_inspection(weld)
    make.make_inspection(weld, accepted=True)
    return weld


def days_ago(days):
    """Steps taken inside this block happen `days` ago (their approval and withdrawal times)."""
    return mock.patch("django.utils.timezone.now", return_value=timezone.now() - timedelta(days=days))


def only_blocker(assembly):
    blockers = release_blockers(assembly)
    assert len(blockers) == 1, blockers
    return blockers[0]


def refused(assembly, user):
    """release() is refused, with the blockers as its messages, and nothing changes."""
    before = (Assembly.objects.get(pk=assembly.pk).state, history_of(assembly).count())
    with pytest.raises(Refused) as caught:
        release(assembly, user)
    assert caught.value.messages == [str(b) for b in release_blockers(assembly)]
    assert (Assembly.objects.get(pk=assembly.pk).state, history_of(assembly).count()) == before
    return caught.value.messages


# --- the control: every link holds -------------------------------------------------------------------------

def test_control_every_link_holds_and_release_is_allowed(make, users, assembly):
    sound(make, assembly, mark="W1")
    sound(make, assembly, mark="W2", position="V")
    assert release_blockers(assembly) == []
    release(assembly, users["qa_lead"], "Chain checked")
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.RELEASED


def test_control_a_repaired_weld_whose_repair_holds_is_released(make, users, assembly):
    weld = sound(make, assembly, mark="W1")
    ncr = make.make_ncr(make.make_inspection(weld, accepted=False, supersedes=weld.latest_final,
                                             reason="Undersize found on review"))
    repairer = make.make_qualified_welder()
    disposition_repair(ncr, users["qa_lead"], weld.wps, repairer)
    record_repair(ncr, users["inspector"], wps=weld.wps, welders=[repairer], welded_on=TODAY)
    make.make_inspection(weld, accepted=True)  # the re-inspection closes the NCR
    assert release_blockers(assembly) == []
    release(assembly, users["qa_lead"])


# --- the WPS link ---------------------------------------------------------------------------------------------

def test_a_weld_without_a_date_blocks(make, users, assembly):
    weld = sound(make, assembly, mark="W1",
                 before_inspection=lambda w: type(w).objects.filter(pk=w.pk).update(welded_on=None))
    blocker = only_blocker(assembly)
    assert blocker.startswith("Weld W1: no weld date is recorded") and blocker.url.endswith(f"/welds/{weld.pk}/edit/")
    refused(assembly, users["qa_lead"])


def test_a_weld_without_a_wps_blocks(make, users, assembly):
    sound(make, assembly, mark="W1", before_inspection=lambda w: type(w).objects.filter(pk=w.pk).update(wps=None))
    assert only_blocker(assembly) == "Weld W1: no WPS is named."
    refused(assembly, users["qa_lead"])


def test_a_draft_wps_blocks(make, users, assembly):
    sound(make, assembly, mark="W1", wps=make.make_wps())
    blocker = only_blocker(assembly)
    assert "is draft: it was never approved" in blocker and blocker.url.startswith("/procedures/")
    refused(assembly, users["qa_lead"])


def test_a_wps_approved_after_the_weld_date_blocks(make, users, assembly):
    yesterday = TODAY - timedelta(days=1)
    welder = make.make_qualified_welder()
    sound(make, assembly, mark="W1", welded_on=yesterday, welders=[welder])
    assert f"was approved on {TODAY.isoformat()}, after the weld date {yesterday.isoformat()}" in \
        only_blocker(assembly)
    refused(assembly, users["qa_lead"])


def test_a_wps_withdrawn_before_the_weld_date_blocks(make, users, assembly):
    with days_ago(10):
        wps = make.make_wps(state=WPSState.APPROVED)
    with days_ago(1):
        wps_steps.withdraw(WPS.objects.get(pk=wps.pk), users["qa_lead"], "No longer stocked")
    sound(make, assembly, mark="W1", wps=WPS.objects.get(pk=wps.pk))
    assert "was withdrawn on" in only_blocker(assembly)
    refused(assembly, users["qa_lead"])


def test_a_wps_superseded_before_the_weld_date_blocks(make, users, assembly):
    with days_ago(5):
        old = make.make_wps(state=WPSState.APPROVED)
    with days_ago(1):
        wps_steps.approve(wps_steps.submit(wps_steps.new_revision(old, users["welding_engineer"]),
                                           users["welding_engineer"]), users["qa_lead"])
    sound(make, assembly, mark="W1", wps=WPS.objects.get(pk=old.pk))
    assert "was superseded by revision 1 on" in only_blocker(assembly)
    refused(assembly, users["qa_lead"])


def test_a_wps_that_does_not_cover_the_weld_blocks(make, users, assembly):
    sound(make, assembly, mark="W1", thickness1=L("3/8 in"), thickness2=L("1-3/4 in"))  # WPS: 1/4 to 1-1/2 in
    blocker = only_blocker(assembly)
    assert "part 2 is 1-3/4\"" in blocker and "Table 6.2" in blocker
    refused(assembly, users["qa_lead"])


def test_a_wps_of_another_unit_system_blocks_on_this_job(make, users):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    assembly = make.make_assembly(job=job)
    weld = make.make_sound_weld(assembly=assembly, mark="W1", size=L("6 mm"), thickness1=L("10 mm"),
                                thickness2=L("12 mm"))
    make.make_inspection(weld, accepted=True, throat=L("4.3 mm"))  # ISO 5817 judges the throat
    blockers = release_blockers(assembly)
    assert len(blockers) == 2
    assert "is written to AWS; job" in blockers[0] and "judged to ISO" in blockers[0]
    assert "is written in US customary units" in blockers[1] and "works in SI units" in blockers[1]
    refused(assembly, users["qa_lead"])


# --- the welder link ------------------------------------------------------------------------------------------

def test_a_weld_without_a_welder_blocks(make, users, assembly):
    sound(make, assembly, mark="W1", before_inspection=lambda w: w.welders.clear())
    assert only_blocker(assembly) == "Weld W1: no welder is recorded."
    refused(assembly, users["qa_lead"])


def test_a_welder_with_an_iso_test_on_an_aws_job_blocks(make, users, assembly):
    iso = make.make_welder(stamp="N-40")
    make.make_qualification(welder=iso, code="ISO 9606-1:2012", process="FCAW", joint="fillet", test_position="PB",
                            test_thickness=L("10 mm"), test_date=TODAY - timedelta(days=20))
    sound(make, assembly, mark="W1", welders=[iso])
    blocker = only_blocker(assembly)
    assert "welder N-40 is not qualified" in blocker and "ISO 9606-1:2012; this weld is to AWS D1.1:2020" in blocker
    assert blocker.url == iso.get_absolute_url()
    refused(assembly, users["qa_lead"])


def test_a_welder_whose_continuity_lapsed_before_the_weld_date_blocks(make, users, assembly):
    lapsed = make.make_welder(stamp="B-41")
    make.make_qualification(welder=lapsed, test_date=date(2024, 1, 15))  # valid through 2024-07-15, never used
    sound(make, assembly, mark="W1", welders=[lapsed])
    blocker = only_blocker(assembly)
    assert "welder B-41" in blocker and "continuity lapsed on 2024-07-16" in blocker
    refused(assembly, users["qa_lead"])


def test_a_welder_tested_vertical_up_blocks_a_vertical_down_weld(make, users, assembly):
    # AWS D1.1:2020 Table 6.12 (from memory): a change of vertical progression needs a new test.
    up = make.make_welder(stamp="B-42")
    make.make_qualification(welder=up, progression="up", test_date=TODAY - timedelta(days=10))
    down = make.make_wps(state=WPSState.APPROVED, progression="down")
    sound(make, assembly, mark="W1", wps=down, welders=[up], position="V")
    blocker = only_blocker(assembly)
    assert "welded vertical up; this weld is vertical down" in blocker and "Table 6.12" in blocker
    refused(assembly, users["qa_lead"])


def test_a_gmaw_s_test_does_not_qualify_spray_transfer(make, users, assembly):
    short = make.make_welder(stamp="B-43")
    make.make_qualification(welder=short, process="GMAW", transfer="short_circuit", electrode="ER70S-6",
                            test_date=TODAY - timedelta(days=10))
    spray = make.make_wps(state=WPSState.APPROVED, process="GMAW", transfer="spray", electrode="ER70S-6",
                          shielding_gas="90Ar/10CO2", positions="F, H", single_pass_size_max=L("5/16 in"))
    sound(make, assembly, mark="W1", wps=spray, welders=[short])
    assert "GMAW-S and the other GMAW transfers qualify apart" in only_blocker(assembly)
    refused(assembly, users["qa_lead"])


# --- the inspection link --------------------------------------------------------------------------------------

def test_no_final_visual_blocks(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    blocker = only_blocker(assembly)
    assert blocker == "Weld W1 has no final visual inspection." and blocker.url.endswith(f"/inspect/weld/{weld.pk}/")
    refused(assembly, users["qa_lead"])


def test_an_open_ncr_blocks(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    blocker = only_blocker(assembly)
    assert blocker == f"Weld W1: {ncr} is open (awaiting disposition)." and blocker.url == ncr.get_absolute_url()
    refused(assembly, users["qa_lead"])


def test_a_repair_not_recorded_as_welded_blocks_even_after_an_accepted_inspection(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get())
    make.make_inspection(weld, accepted=True)  # not an inspection of a repair nobody recorded
    assert only_blocker(assembly) == f"Weld W1: {ncr} is open (repair not recorded as welded yet)."
    refused(assembly, users["qa_lead"])


def test_a_recorded_repair_awaiting_reinspection_blocks(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get())
    record_repair(ncr, users["inspector"], wps=weld.wps, welders=list(weld.welders.all()), welded_on=TODAY)
    assert only_blocker(assembly) == f"Weld W1: {ncr} is open (repair awaiting re-inspection)."
    refused(assembly, users["qa_lead"])


def test_use_as_is_is_the_one_way_to_accept_a_rejected_weld(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", TODAY)
    assert release_blockers(assembly) == []


# --- the repair's own links -----------------------------------------------------------------------------------

def _repair_outside_the_service(make, users, weld, wps, welder, day):
    """A repair record as an import or an older version could have left it: not checked when it was made."""
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get())
    repair = WeldRepair.objects.create(weld=weld, ncr=ncr, wps=wps, welded_on=day, recorded_by=users["inspector"])
    repair.welders.set([welder])
    make.make_inspection(weld, accepted=True)
    return ncr


def test_a_repair_by_a_welder_not_qualified_on_the_repair_date_blocks(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    untested = make.make_welder(stamp="B-44")
    ncr = _repair_outside_the_service(make, users, weld, weld.wps, untested, TODAY)
    blocker = only_blocker(assembly)
    assert blocker.startswith(f"Weld W1, repair for {ncr.number} ({TODAY.isoformat()}): welder B-44 is not "
                              "qualified")
    refused(assembly, users["qa_lead"])


def test_a_repair_to_a_wps_not_approved_blocks(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = _repair_outside_the_service(make, users, weld, make.make_wps(), weld.welders.get(), TODAY)
    blocker = only_blocker(assembly)
    assert blocker.startswith(f"Weld W1, repair for {ncr.number}") and "never approved" in blocker
    refused(assembly, users["qa_lead"])


# --- the fit-up hold point ------------------------------------------------------------------------------------

@pytest.fixture
def held(make):
    return make.make_assembly(job=make.make_job(fit_up_hold_point=True))


def test_a_fit_up_hold_point_not_signed_blocks_where_the_job_requires_it(make, users, held, assembly):
    sound(make, held, mark="W1")
    assert "the fit-up hold point is not signed" in only_blocker(held)
    refused(held, users["qa_lead"])
    sound(make, assembly, mark="W1")  # the same weld on a job without the hold point
    assert release_blockers(assembly) == []


def test_a_rejected_fit_up_blocks(make, users, held):
    weld = make.make_sound_weld(assembly=held, mark="W1")
    make.make_inspection(weld, stage="fit_up", accepted=False)
    make.make_inspection(weld, accepted=True)
    assert "its current fit-up inspection rejected the fit-up" in only_blocker(held)
    refused(held, users["qa_lead"])


def test_an_accepted_fit_up_satisfies_the_hold_point(make, users, held):
    weld = make.make_sound_weld(assembly=held, mark="W1")
    make.make_inspection(weld, stage="fit_up", accepted=True)
    make.make_inspection(weld, accepted=True)
    assert release_blockers(held) == []
    release(held, users["qa_lead"])


# --- every blocker at once, per weld, and the page ------------------------------------------------------------

def test_each_weld_lists_its_own_blockers_in_mark_order(make, users, assembly):
    sound(make, assembly, mark="W2", wps=make.make_wps())
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    weld.welders.clear()
    assert [b.split(":")[0].split(" has")[0] for b in release_blockers(assembly)] == ["Weld W1", "Weld W1",
                                                                                    "Weld W2"]


def test_the_assembly_page_lists_the_blockers_with_links_and_the_release_button_is_unavailable(
        client_as, make, assembly):
    sound(make, assembly, mark="W1", wps=make.make_wps())
    page = client_as("qa_lead").get(assembly.get_absolute_url())
    blocker = release_blockers(assembly)[0]
    assert page.status_code == 200 and f'href="{blocker.url}"' in page.text
    assert 'disabled aria-describedby="release-blockers"' in page.text and "Release is unavailable" in page.text


def test_the_release_button_is_available_when_nothing_blocks(client_as, make, assembly):
    sound(make, assembly, mark="W1")
    page = client_as("qa_lead").get(assembly.get_absolute_url())
    assert "Release is unavailable" not in page.text and "disabled aria-describedby" not in page.text


# --- a fixed number of queries ----------------------------------------------------------------------------------

def _assembly_of(make, users, n):
    assembly = make.make_assembly()
    wps, welder = make.approved_wps(), make.make_qualified_welder()
    for i in range(n):
        weld = make.make_sound_weld(assembly=assembly, mark=f"W{i:02d}", welders=[welder])
        make.make_inspection(weld, accepted=True)
    first = assembly.welds.order_by("mark").first()  # one repaired weld in each, so repairs are read too
    ncr = make.make_inspection(first, accepted=False, supersedes=first.latest_final, reason="Review").ncrs.get()
    disposition_repair(ncr, users["qa_lead"], wps, welder)
    record_repair(ncr, users["inspector"], wps=wps, welders=[welder], welded_on=TODAY)
    make.make_inspection(first, accepted=True)
    return Assembly.objects.get(pk=assembly.pk)


RELEASE_BLOCKERS_QUERIES = 11  # job, welds, welders, 2 statuses, repairs, their welders, next WPS revisions,
#                                the welders' test records and continuity, the parts with their heats


@pytest.mark.parametrize("welds", [1, 20])
def test_release_blockers_reads_a_fixed_number_of_queries(make, users, django_assert_num_queries, welds):
    assembly = _assembly_of(make, users, welds)
    with django_assert_num_queries(RELEASE_BLOCKERS_QUERIES):
        assert release_blockers(assembly) == []


@pytest.mark.parametrize("welds", [1, 20])
def test_the_fit_up_hold_point_adds_one_query(make, users, django_assert_num_queries, welds):
    assembly = _assembly_of(make, users, welds)
    type(assembly.job).objects.filter(pk=assembly.job_id).update(fit_up_hold_point=True)
    assembly = Assembly.objects.get(pk=assembly.pk)
    with django_assert_num_queries(RELEASE_BLOCKERS_QUERIES + 1):
        assert len(release_blockers(assembly)) == welds


def test_release_itself_reads_no_more_for_more_welds(make, users):
    counts = []
    for n in (1, 20):
        assembly = _assembly_of(make, users, n)
        with CaptureQueriesContext(connection) as queries:
            release(assembly, users["qa_lead"])
        counts.append(len(queries))
    assert counts[0] == counts[1]


def test_the_repair_credits_continuity(make, users):
    assembly = _assembly_of(make, users, 1)
    repair = WeldRepair.objects.get(weld__assembly=assembly)
    entry = ContinuityEntry.objects.get(repair=repair)
    assert (entry.source, entry.date, entry.process, entry.weld) == ("repair", TODAY, "FCAW", None)
    assert reverse("inspections:ncr_detail", args=[repair.ncr_id]) == repair.get_absolute_url()
