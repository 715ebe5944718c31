"""Customers see only their own jobs (core.visibility): lists, searches and counts as a viewer reads them, the
records that hang from a job, and the welders and procedures used on it. Pages of single records are walked by
tests/test_role_matrix.py with a second customer."""

import re
from datetime import timedelta

import pytest
from django.urls import reverse
from django.utils import timezone

from core.visibility import continuity_for, jobs_visible_to, visible
from inspections.models import NCR, Assembly, ClientCriteriaSet, Customer, Inspection, Job, Photo, Weld
from inspections.models.traveler import JobPacket, Traveler
from inspections.services.assemblies import record_production
from inspections.services.ncr import disposition_repair
from procedures.models import PQR, WPS, Qualification, Welder
from procedures.models.welders import ContinuityEntry
from procedures.models.wps import WPSState
from tests.pages_jobs import make_client_set
from tests.pages_travelers import _issued, _packet

OTHER = "Ostrander Mill Services"


def _tree(make, customer_name, tag, welders=(), wps=None, welded_on=None):
    """A job of the customer with everything that hangs from it; names carry the tag, so a page shows whose.
    welders, wps, welded_on: links to another tree's records, made before the weld's final visual freezes them."""
    make.customer_name = customer_name
    cset = make_client_set(make, key=f"client-{tag.lower()}")
    job = make.make_job(number=f"J-{tag}", name=f"{tag} framing", client_criteria=cset, criteria_key=cset.key)
    assembly = make.make_assembly(job=job, piece_mark=f"PM{tag}")
    pqr = make.make_pqr(number=f"PQR-{tag}")
    wps_used = wps
    wps = make.make_wps(number=f"WPS-{tag}")
    wps.pqrs.add(pqr)  # linked while a draft: an approved WPS's PQRs are part of what was approved
    make.move_wps(wps, WPSState.APPROVED)
    welder = make.make_welder(name=f"Welder {tag}", stamp=f"S-{tag}")
    make.make_qualification(welder=welder)
    weld = make.make_weld(assembly=assembly, mark=f"W{tag}", wps=wps_used or wps, welded_on=welded_on)
    weld.welders.add(welder, *welders)
    if welded_on is not None:
        record_production(weld)
    inspection = make.make_inspection(weld, accepted=False)
    make.make_photo(inspection)
    ncr = make.make_ncr(inspection)
    return {"job": job, "assembly": assembly, "weld": weld, "wps": wps, "pqr": pqr, "welder": welder, "ncr": ncr,
            "inspection": inspection, "cset": cset}


@pytest.fixture
def two(make, users):
    """Customer A (the viewer's) and customer B, each with a full job."""
    a = _tree(make, make.customer_name, "AAA")
    b = _tree(make, OTHER, "BBB")
    make.customer_name = Customer.objects.get(jobs=a["job"]).name
    return a, b


def test_each_model_is_narrowed_to_the_viewers_customer(two, users, make):
    a, b = two
    make.customer_name = OTHER
    _issued(make), _packet(make)  # a traveler and a packet on B's side
    viewer = users["viewer"]
    for model in (Job, Assembly, Weld, Inspection, Photo, NCR, Traveler, JobPacket, WPS, PQR, Welder, Qualification,
                  ContinuityEntry, ClientCriteriaSet):
        seen = visible(viewer, model.objects.all())
        everything = visible(users["qa_lead"], model.objects.all())
        assert set(seen) < set(everything) or not everything.exists(), model.__name__
    assert set(jobs_visible_to(viewer)) == {a["job"]}
    assert set(visible(viewer, WPS.objects.all())) == {a["wps"]}
    assert set(visible(viewer, PQR.objects.all())) == {a["pqr"]}
    assert set(visible(viewer, Welder.objects.all())) == {a["welder"]}
    assert set(visible(viewer, NCR.objects.all())) == {a["ncr"]}
    assert set(visible(viewer, ClientCriteriaSet.objects.all())) == {a["cset"]}
    assert not visible(viewer, Traveler.objects.all()).exists() and not visible(viewer, JobPacket.objects.all())


def test_shop_roles_see_everything_and_a_viewer_without_a_customer_sees_nothing(two, users, make):
    for role in ("welding_engineer", "inspector", "qa_lead"):
        assert jobs_visible_to(users[role]).count() == 2
    stranger = make.make_user("viewer")
    assert not jobs_visible_to(stranger).exists() and not visible(stranger, WPS.objects.all()).exists()


def test_a_procedure_or_welder_used_on_both_customers_jobs_is_visible_to_both(users, make):
    a = _tree(make, make.customer_name, "AAA")
    _tree(make, OTHER, "BBB", welders=[a["welder"]], wps=a["wps"])
    make.customer_name = OTHER
    other_viewer = make.make_user("viewer")
    make.make_customer(viewers=[other_viewer])
    assert a["welder"] in visible(other_viewer, Welder.objects.all())
    assert a["wps"] in visible(other_viewer, WPS.objects.all())
    assert a["welder"] in visible(users["viewer"], Welder.objects.all())


def test_a_repair_named_by_an_ncr_is_visible_with_it(two, users, make):
    a, b = two
    repair_wps = make.make_wps(state=WPSState.APPROVED, number="WPS-REPAIR")
    repair_welder = make.make_qualified_welder(name="Repair Welder", stamp="S-REP")
    disposition_repair(a["ncr"], users["qa_lead"], repair_wps, repair_welder)
    assert repair_wps in visible(users["viewer"], WPS.objects.all())
    assert repair_welder in visible(users["viewer"], Welder.objects.all())


def test_an_unknown_model_is_a_programming_error(users):
    with pytest.raises(ValueError, match="does not know"):
        visible(users["viewer"], users["viewer"].__class__.objects.all())


LISTS = [
    ("home", {}),
    ("inspections:job_list", {}),
    ("inspections:ncr_list", {"show": "all"}),
    ("inspections:assembly_find", {"q": "PM"}),
    ("inspections:inspect_home", {"q": "PM"}),
    ("inspections:criteria_list", {}),
    ("procedures:wps_list", {}),
    ("procedures:pqr_list", {}),
    ("procedures:welder_list", {"active": "all"}),
]


@pytest.mark.parametrize("name, query", LISTS)
def test_lists_and_searches_show_a_viewer_its_customers_records_only(name, query, two, client_as):
    viewer_page = client_as("viewer").get(reverse(name), query)
    shop_page = client_as("qa_lead").get(reverse(name), query)
    assert viewer_page.status_code == shop_page.status_code == 200
    # criteria set keys are lower case; a random CSRF token can hold "bbb" too: it is not a record
    viewer_text, shop_text = (re.sub(r'name="csrfmiddlewaretoken" value="[^"]*"', "", page.text).lower()
                              for page in (viewer_page, shop_page))
    assert "bbb" not in viewer_text
    if name != "home":
        assert "aaa" in viewer_text and "bbb" in shop_text


def test_the_home_counts_are_the_viewers_own(two, client_as):
    viewer = client_as("viewer").get(reverse("home")).context["sections"]
    shop = {s.key: s for s in client_as("qa_lead").get(reverse("home")).context["sections"]}
    jobs, = viewer
    assert [i.url for i in jobs.items] == [two[0]["job"].get_absolute_url()]
    assert jobs.items[0].note.endswith("; 1 open NCR")
    assert shop["ncrs"].total == 2


def test_a_welders_continuity_hides_another_customers_job_from_a_viewer(users, client_as, make):
    a = _tree(make, make.customer_name, "AAA")
    b = _tree(make, OTHER, "BBB", welders=[a["welder"]], welded_on=timezone.localdate())
    make.customer_name = Customer.objects.get(jobs=a["job"]).name
    assert ContinuityEntry.objects.filter(welder=a["welder"], weld=b["weld"]).exists()
    viewer_page = client_as("viewer").get(a["welder"].get_absolute_url()).text
    shop_page = client_as("qa_lead").get(a["welder"].get_absolute_url()).text
    assert "J-BBB" in shop_page and "J-BBB" not in viewer_page and "PMBBB" not in viewer_page
    assert "Production weld on another customer's job" in viewer_page
    rows = continuity_for(users["viewer"], [(e, "/x", False) for e in ContinuityEntry.objects.filter(
        welder=a["welder"], weld=b["weld"])])
    assert rows and all(hidden and url is None for _e, url, hidden in rows)


def test_a_viewers_pages_take_the_same_number_of_queries_as_the_shops(two, client_as):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    counts = {}
    for role in ("qa_lead", "viewer"):
        client = client_as(role)
        client.get(reverse("inspections:job_list"))  # the session is read once, warm both alike
        with CaptureQueriesContext(connection) as ctx:
            assert client.get(reverse("inspections:job_list")).status_code == 200
        counts[role] = len(ctx.captured_queries)
    assert counts["viewer"] == counts["qa_lead"]


@pytest.mark.pdf
def test_a_packets_welder_summary_names_no_other_customers_job(make):
    from inspections.packets import _welder_summary
    from tests.test_traveler import pdf_text

    # Ten days apart: the printed summary lists both (the first use, then the latest within six months of it).
    a = _tree(make, make.customer_name, "AAA", welded_on=timezone.localdate() - timedelta(days=10))
    _tree(make, OTHER, "BBB", welders=[a["welder"]], welded_on=timezone.localdate())
    text, _pages = pdf_text(_welder_summary(a["welder"].pk, a["job"]))
    assert "J-AAA" in text and "J-BBB" not in text and "another customer's job" in text
