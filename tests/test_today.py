"""Each role's morning page (inspections.services.today, templates/home.html): every figure against counts made from
the factory's own records, every link to the list-filter contract's URL and parameters, fixed query counts."""

from datetime import timedelta
from urllib.parse import parse_qs, urlsplit

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from inspections.models import AssemblyState
from inspections.services import today as morning
from inspections.services.assemblies import submit_for_inspection
from procedures.models.wps import WPSState
from procedures.services import wps as wps_steps
from tests.factory import L

OTHER = "Ostrander Bridge Works"


def _section(sections, key):
    return next(s for s in sections if s.key == key)


def _link(url):
    parts = urlsplit(url)
    return parts.path, {k: v[0] for k, v in parse_qs(parts.query).items()}


# --- inspector -------------------------------------------------------------------------------------------------

@pytest.fixture
def shop(make, users):
    """Two jobs of the factory's customer and one of another customer, with welds waiting for final inspection."""
    today = timezone.localdate()
    welder = make.make_qualified_welder()
    a, b = make.make_job(number="J-AAA1"), make.make_job(number="J-AAA2")
    other = make.make_job(number="J-BBB1", customer=OTHER)
    old = today - timedelta(days=10)
    waiting = {
        a.pk: [make.make_sound_weld(make.make_assembly(a), welders=[welder], welded_on=old),
               make.make_sound_weld(make.make_assembly(a), welders=[welder], welded_on=today)],
        b.pk: [make.make_sound_weld(make.make_assembly(b), welders=[welder], welded_on=today)],
        other.pk: [make.make_sound_weld(make.make_assembly(other), welders=[welder], welded_on=old)],
    }
    done = make.make_sound_weld(make.make_assembly(a), welders=[welder])
    make.make_inspection(done, accepted=True)
    return {"today": today, "old": old, "a": a, "b": b, "other": other, "waiting": waiting, "done": done,
            "welder": welder}


def test_inspector_sees_welds_waiting_by_job_oldest_first_with_overdue(shop, users):
    # Overdue: the queue's rule (inspections.queue, LEGWORK_INSPECTION_DUE_DAYS = 2 days; common practice, no
    # source): the welds of ten days ago are overdue, today's are not.
    sections = morning.for_user(users["inspector"], shop["today"])
    final = _section(sections, "final")
    expected = {job: len(welds) for job, welds in shop["waiting"].items()}
    got = {_link(i.url)[1]["job"]: i.count for i in final.items}
    assert got == {str(k): v for k, v in expected.items()}
    assert final.total == sum(expected.values())
    late = [i for i in final.items if i.overdue]
    assert final.items[:len(late)] == late and {i.since for i in late} == {shop["old"]}
    assert not _section_item(final, shop["b"]).overdue
    assert _section_item(final, shop["a"]).note == "1 assembly overdue"
    path, params = _link(_section_item(final, shop["a"]).url)
    assert path == "/inspections/assemblies/"
    assert params == {"job": str(shop["a"].pk), "waiting": "final", "o": "created"}
    assemblies = _section(sections, "assemblies")
    assert assemblies.total == sum(expected.values())  # one weld per assembly
    assert assemblies.items[0].since == shop["old"] and assemblies.items[0].overdue
    assert all(i.url.startswith("/inspections/a/") for i in assemblies.items)


def _section_item(section, job):
    return next(i for i in section.items if _link(i.url)[1].get("job") == str(job.pk))


def test_inspector_sees_fit_ups_waiting(make, users):
    job = make.make_job(fit_up_hold_point=True)
    welds = [make.make_weld(make.make_assembly(job)) for _ in range(3)]
    make.make_inspection(welds[0], stage="fit_up", accepted=True)
    fit_up = _section(morning.for_user(users["inspector"]), "fit_up")
    assert [(i.count, _link(i.url)[1]) for i in fit_up.items] == [
        (2, {"job": str(job.pk), "waiting": "fit_up", "o": "created"})]


def test_a_repair_waits_for_re_inspection(make, users):
    from inspections.services import ncr as ncr_steps
    from inspections.services import repairs

    welder = make.make_qualified_welder()
    weld = make.make_sound_weld(welders=[welder])
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    ncr = ncr_steps.disposition_repair(ncr, users["qa_lead"], make.approved_wps(), welder)
    repairs.record_repair(ncr, users["inspector"], wps=make.approved_wps(), welded_on=timezone.localdate(),
                          welders=[welder])
    item, = _section(morning.for_user(users["inspector"]), "repair").items
    assert item.count == 1
    assert _link(item.url) == ("/inspections/ncrs/", {"job": str(weld.assembly.job_id), "state": "dispositioned",
                                                      "o": "opened"})


# --- welding engineer --------------------------------------------------------------------------------------------

def test_engineer_sees_drafts_returned_procedures_with_the_reason_and_welds_whose_wps_does_not_apply(make, users):
    drafts = [make.make_wps(), make.make_wps()]
    sent_back = make.make_wps(state=WPSState.SUBMITTED)
    wps_steps.return_to_draft(sent_back, users["qa_lead"], "Preheat missing for the 1-1/2 in flange")
    make.make_wps(state=WPSState.SUBMITTED)  # waiting for approval: not the engineer's
    too_thick = make.make_weld(wps=make.approved_wps(), thickness1=L("2 in"), thickness2=L("2 in"))
    no_wps = make.make_weld()
    fine = make.make_weld(wps=make.approved_wps())

    sections = morning.for_user(users["welding_engineer"])
    returned = _section(sections, "returned")
    assert returned.total == 1 and returned.items[0].url == sent_back.get_absolute_url()
    assert returned.items[0].note == "Returned: Preheat missing for the 1-1/2 in flange"
    assert _section(sections, "drafts").total == len(drafts)
    assert {i.url for i in _section(sections, "drafts").items} == {w.get_absolute_url() for w in drafts}
    wps = _section(sections, "wps")
    urls = {i.url for i in wps.items}
    assert urls == {reverse("inspections:weld_detail", args=[w.pk]) for w in (too_thick, no_wps)}
    assert reverse("inspections:weld_detail", args=[fine.pk]) not in urls
    assert _link(returned.all_url) == ("/procedures/wps/", {"state": "draft"})


# --- QA lead -----------------------------------------------------------------------------------------------------

def test_qa_lead_sees_procedures_waiting_for_approval(make, users):
    waiting = [make.make_wps(state=WPSState.SUBMITTED) for _ in range(2)]
    make.make_wps()
    section = _section(morning.for_user(users["qa_lead"]), "approvals")
    assert section.total == 2 and [i.url for i in section.items] == [w.get_absolute_url() for w in waiting]
    assert _link(section.all_url) == ("/procedures/wps/", {"state": "submitted"})


@pytest.mark.parametrize("days, band", [(0, (0, 7)), (7, (0, 7)), (8, (8, 30)), (30, (8, 30)), (31, (31, None))])
def test_ncr_age_bands_at_their_edges(make, users, days, band):
    # Common practice, no source: 0-7, 8-30, more than 30 days. The NCRs are raised today; the page is asked on a
    # later day.
    ncr = make.make_ncr()
    raised = timezone.localdate(ncr.raised_at)
    ages = morning.ncr_ages(users["qa_lead"], raised + timedelta(days=days))
    assert ages[band] == 1 and ages["open"] == 1
    assert sum(ages[b] for b in morning.NCR_AGE_BANDS) == 1


def test_qa_lead_sees_ncrs_by_age_with_the_oldest(make, users):
    ncrs = [make.make_ncr(), make.make_ncr()]
    today = timezone.localdate(ncrs[0].raised_at) + timedelta(days=40)
    section = _section(morning.for_user(users["qa_lead"], today), "ncrs")
    assert section.total == 2
    assert section.items[2].count == 2 and section.items[2].overdue  # more than 30 days
    oldest = section.items[3]
    assert oldest.url == ncrs[0].get_absolute_url() and oldest.days == 40
    path, params = _link(section.items[2].url)
    assert path == "/inspections/ncrs/"
    assert params == {"state": "open", "opened_before": (today - timedelta(days=31)).isoformat(), "o": "opened"}
    path, params = _link(section.items[0].url)
    assert params == {"state": "open", "opened_after": (today - timedelta(days=7)).isoformat(),
                      "opened_before": today.isoformat(), "o": "opened"}


def test_qa_lead_sees_assemblies_ready_and_blocked_with_the_blocker(make, users):
    ready = make.make_assembly()
    make.make_inspection(make.make_sound_weld(ready), accepted=True)
    blocked = make.make_assembly()
    waiting_weld = make.make_sound_weld(blocked)
    submit_for_inspection(blocked, users["inspector"])
    in_shop = make.make_assembly()
    make.make_sound_weld(in_shop)
    ready.refresh_from_db()
    assert ready.state == AssemblyState.AWAITING_INSPECTION
    sections = morning.for_user(users["qa_lead"])
    assert [i.url for i in _section(sections, "ready").items] == [ready.get_absolute_url()]
    item, = _section(sections, "blocked").items
    assert item.url == blocked.get_absolute_url()
    assert item.note == f"Weld {waiting_weld.mark} has no final visual inspection."
    assert item.note_url == reverse("inspections:inspect_weld", args=[waiting_weld.pk])


def test_the_whole_chain_runs_for_assemblies_whose_welds_are_all_accepted(make, users):
    # Accepted at final visual, but welded to a draft WPS: the inspection link holds, the procedure link does not.
    draft = make.make_wps()
    assembly = make.make_assembly()
    make.make_inspection(make.make_sound_weld(assembly, wps=draft), accepted=True)
    item, = _section(morning.for_user(users["qa_lead"]), "blocked").items
    assert item.url == assembly.get_absolute_url()
    assert f"{draft} is draft: it was never approved" in item.note and item.note_url == draft.get_absolute_url()


def test_qa_lead_sees_welders_lapsed_and_lapsing(make, users):
    today = timezone.localdate()
    in_continuity = make.make_qualified_welder()
    lapsing = make.make_welder()
    make.make_qualification(welder=lapsing, test_date=today - timedelta(days=170))  # continuity ends in < 30 days
    lapsed = make.make_welder()
    make.make_qualification(welder=lapsed, test_date=today - timedelta(days=400))
    section = _section(morning.for_user(users["qa_lead"], today), "welders")
    assert section.total == 2
    assert (section.items[0].count, section.items[1].count) == (1, 1)
    assert _link(section.items[0].url) == ("/procedures/welders/", {"continuity": "lapsed"})
    assert _link(section.items[1].url) == ("/procedures/welders/", {"continuity": "lapsing"})
    urls = [i.url for i in section.items[2:]]
    assert urls == [lapsed.get_absolute_url(), lapsing.get_absolute_url()]  # the earliest lapse first
    assert in_continuity.get_absolute_url() not in urls


# --- viewer ------------------------------------------------------------------------------------------------------

def test_viewer_sees_its_jobs_progress_only(shop, users, make):
    make.make_ncr(make.make_inspection(make.make_sound_weld(make.make_assembly(shop["a"])), accepted=False))
    sections = morning.for_user(users["viewer"])
    jobs = _section(sections, "jobs")
    urls = [i.url for i in jobs.items]
    assert shop["other"].get_absolute_url() not in urls
    assert set(urls) == {shop["a"].get_absolute_url(), shop["b"].get_absolute_url()}
    a = next(i for i in jobs.items if i.url == shop["a"].get_absolute_url())
    # job A: 4 assemblies (2 waiting, 1 done, 1 with the NCR), 4 welds, 1 accepted at final, 1 NCR open
    assert a.text.endswith(": 0 of 4 assemblies released")
    assert a.note == "1 of 4 welds accepted at final visual; 1 open NCR"
    assert _link(a.note_url) == ("/inspections/assemblies/", {"job": str(shop["a"].pk)})


def test_qa_lead_sees_inspector_credentials_and_gauges_lapsing_or_lapsed(make, users):
    # The notice: 30 days ahead (inspections/credentials.py LAPSE_NOTICE_DAYS, common practice, no source). A
    # credential's last valid day is its printed expiry (AWS QC1:2016 / ISO 9712:2021, from memory); a gauge's is
    # its calibration's due date (common practice, no source).
    today = timezone.localdate()
    renewed = users["inspector"]  # an old card lapsing tomorrow, and its renewal: the renewal counts
    make.make_credential(renewed, expires_on=today)
    make.make_credential(renewed)
    edge = make.make_user("inspector", credential=False)
    edge.first_name, edge.last_name = "Edge", "Thirty"
    edge.save()
    make.make_credential(edge, expires_on=today + timedelta(days=29))  # lapses on day 30: shown
    beyond = make.make_user("inspector", credential=False)
    make.make_credential(beyond, expires_on=today + timedelta(days=30))  # lapses on day 31: not shown
    bare = make.make_user("inspector", credential=False)
    bare.first_name, bare.last_name = "Bare", "Nocard"
    bare.save()
    make.make_gauge(number="FG-LATE", due_on=today - timedelta(days=1))
    make.make_gauge(number="FG-SOON", due_on=today + timedelta(days=10))
    make.make_gauge(number="FG-FAR", due_on=today + timedelta(days=200))
    section = _section(morning.for_user(users["qa_lead"], today), "registers")
    texts = [i.text for i in section.items]
    assert texts == ["Gauge FG-LATE", "Inspector Bare Nocard", "Gauge FG-SOON", "Inspector Edge Thirty"]
    assert section.total == 4
    late, none, soon, lapsing = section.items
    assert late.overdue and "calibration was due on" in late.note
    assert none.overdue and "no current credential" in none.note
    assert not soon.overdue and soon.note == f"calibration due on {(today + timedelta(days=10)).isoformat()}"
    assert lapsing.note.endswith(f"lapses on {(today + timedelta(days=30)).isoformat()}")


# --- the page: every role, fixed queries -----------------------------------------------------------------------

@pytest.mark.parametrize("role", ["inspector", "welding_engineer", "qa_lead", "viewer"])
def test_home_page_takes_a_fixed_number_of_queries(role, shop, make, client_as):
    client = client_as(role)
    client.get(reverse("home"))  # warm the session and the content types
    with CaptureQueriesContext(connection) as small:
        assert client.get(reverse("home")).status_code == 200
    # More of everything: welds waiting on more jobs, NCRs, submitted procedures, assemblies awaiting release.
    for _ in range(3):
        job = make.make_job()
        assembly = make.make_assembly(job)
        make.make_inspection(make.make_sound_weld(assembly, welders=[shop["welder"]]), accepted=True)
        make.make_sound_weld(make.make_assembly(job), welders=[shop["welder"]])
        make.make_ncr()
        make.make_wps(state=WPSState.SUBMITTED)
        make.make_wps()
        make.make_qualified_welder()
    with CaptureQueriesContext(connection) as large:
        assert client.get(reverse("home")).status_code == 200
    assert len(large.captured_queries) == len(small.captured_queries), role


PINNED = {"inspector": 4, "welding_engineer": 5, "qa_lead": 28, "viewer": 6}  # qa_lead: +1 parts, +2 ovens, +1 flux


@pytest.mark.parametrize("role", list(PINNED))
def test_home_page_query_count_is_pinned(role, shop, client_as, django_assert_num_queries):
    client = client_as(role)
    client.get(reverse("home"))
    with django_assert_num_queries(PINNED[role]):
        client.get(reverse("home"))


def test_links_to_lists_carry_the_list_filter_parameters():
    assert morning.list_url("inspections:assembly_list", job=3, waiting="final", state="") == \
        "/inspections/assemblies/?job=3&waiting=final"
    assert morning.list_url("inspections:inspection_list") == "/inspections/inspections/"
