"""One history for every record: creations and edits (old and new values), steps, revisions, imports and the admin,
each shown on the record's page in a fixed number of queries."""

import pytest
from django.urls import reverse

from core.history import history_of
from core.models import Event
from inspections.models import Weld
from inspections.services.weldmap_csv import import_weld_map
from procedures.models.wps import WPSState
from tests.pages_jobs import make_client_set
from tests.pages_travelers import _packet, build_assembly
from tests.test_stale_saves import form_data
from tests.test_weldmap_csv import GOOD


def _issued_traveler(make):
    from inspections.traveler import issue

    assembly = build_assembly(make, welds=1)
    issue(assembly, make.make_user("qa_lead"))
    return reverse("inspections:traveler_list", args=[assembly.pk]), "Issued TRV"


def _welder_with_test(make):
    welder = make.make_welder()
    make.make_qualification(welder=welder)
    return reverse("procedures:welder_detail", args=[welder.pk]), "Qualification:"


PAGES = {
    "WPS": lambda make: (make.make_wps(state=WPSState.APPROVED).get_absolute_url(),
                         "Submitted for approval → Approved"),
    "PQR": lambda make: (make.make_pqr().get_absolute_url(), "Created"),
    "welder": _welder_with_test,
    "job": lambda make: (make.make_job().get_absolute_url(), "Created"),
    "assembly": lambda make: (make.make_inspection(accepted=False).weld.assembly.get_absolute_url(),
                              "In fabrication → Rejected"),
    "weld": lambda make: (make.make_weld().get_absolute_url(), "Created"),
    "inspection": lambda make: (make.make_photo().inspection.get_absolute_url(), "Photo:"),
    "NCR": lambda make: (make.make_ncr().get_absolute_url(), "Created (open)"),
    "traveler": _issued_traveler,
    "packet": lambda make: (_packet(make, done=True).get_absolute_url(), "Queued → Building"),
    "client criteria set": lambda make: (make_client_set(make).get_absolute_url(), "Created"),
}


@pytest.mark.parametrize("page", sorted(PAGES))
def test_every_detail_page_shows_the_records_history(make, client_as, page):
    url, expected = PAGES[page](make)
    html = client_as("inspector").get(url).content.decode()
    panel = html[html.index('id="history-title"'):]
    assert expected in panel and "Nothing recorded yet" not in panel


def test_a_draft_edit_through_the_page_keeps_old_and_new_values_and_the_pqrs_in_one_row(make, client_as, users):
    wps = make.make_wps()
    pqr = make.make_pqr(number="PQR-7101")
    client = client_as("welding_engineer")
    url = reverse("procedures:wps_edit", args=[wps.pk])
    data = form_data(client.get(url).context["form"])
    response = client.post(url, {**data, "amperage_max": "240", "pqrs": [pqr.pk], "basis": "test"})
    assert response.status_code == 302
    event = history_of(wps).get(action="edited")
    assert event.user == users["welding_engineer"]
    assert event.changes == {"current max (A)": ["220", "240"], "supporting PQRs": ["", "PQR PQR-7101"],
                             "basis": ["Prequalified", "Qualified by test (PQR)"]}


def test_a_weld_map_import_records_each_weld_with_the_importer(make, users):
    job = make.make_job(number="J-8800")
    make.make_assembly(job=job, piece_mark="B1")
    make.make_assembly(job=job, piece_mark="C2")
    make.make_wps(number="BSW-501", state=WPSState.APPROVED, joint_types="fillet, groove")  # as the CSV tests'
    welds = import_weld_map(GOOD.encode(), job, users["welding_engineer"])
    rows = Event.objects.filter(subject_type__model="weld", action="created")
    assert sorted(rows.values_list("subject_id", flat=True)) == sorted(w.pk for w in welds)
    assert {(e.user, e.reason) for e in rows} == {(users["welding_engineer"], "Weld map imported (3 welds)")}


def test_recording_who_welded_writes_one_row_with_the_welders_and_the_date(make, client_as, users):
    from tests.test_jobs_pages import qualified_welder

    weld = make.make_weld()
    welder = qualified_welder(make, name="Dana Whitcomb")
    client = client_as("inspector")
    url = reverse("inspections:weld_edit", args=[weld.pk])
    data = form_data(client.get(url).context["form"])
    assert client.post(url, {**data, "welders": [welder.pk], "welded_on": "2026-04-02"}).status_code == 302
    event = history_of(weld).get(action="edited")
    assert event.user == users["inspector"]
    assert event.changes == {"welders": ["", str(welder)], "date welded": ["", "2026-04-02"]}


def test_a_deleted_draft_leaves_its_row(make, users):
    wps = make.make_wps()
    pk = wps.pk
    wps.delete(user=users["welding_engineer"])
    event = Event.objects.get(subject_type__model="wps", subject_id=pk, action="deleted")
    assert event.user == users["welding_engineer"] and str(wps.number) in event.reason


def test_a_password_change_says_only_that_it_changed(make):
    user = make.make_user("inspector")
    user.set_password("another long passphrase")
    user.save()
    assert history_of(user).get(action="edited").changes == {"password": ["", "(changed)"]}


def test_signing_in_writes_no_history(client, make):
    user = make.make_user("inspector")
    before = Event.objects.count()
    response = client.post(reverse("login"), {"username": user.username, "password": make.password})
    assert response.status_code == 302 and response.wsgi_request.user == user
    assert Event.objects.count() == before


@pytest.mark.parametrize("edits", [1, 12])
def test_the_weld_page_reads_its_history_in_one_query_whatever_its_length(make, client_as, edits,
                                                                          django_assert_num_queries):
    weld = make.make_weld()
    for n in range(edits):
        weld = Weld.objects.get(pk=weld.pk)
        weld.count = n + 2
        weld.save()
    client = client_as("viewer")
    url = weld.get_absolute_url()
    client.get(url)
    with django_assert_num_queries(QUERIES_WELD_PAGE):
        assert client.get(url).status_code == 200


QUERIES_WELD_PAGE = 11  # session, user, weld, statuses (2), welder checks (2), inspections, NCRs, history,
#                         the assembly's parts (the chain's material link)
