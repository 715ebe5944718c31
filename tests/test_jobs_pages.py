"""Job, assembly and weld pages: roles, forms in the job's units, the weld map with a fixed number of queries."""

from datetime import timedelta

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from inspections.models import Assembly, Job, Weld
from procedures.models import ContinuityEntry
from procedures.models.wps import WPSState
from tests.factory import L


def qualified_welder(make, **kwargs):
    """An FCAW welder with a recent all-position test on 1 in plate (so in continuity today)."""
    welder = make.make_welder(**kwargs)
    make.make_qualification(welder=welder, test_date=timezone.localdate() - timedelta(days=30))
    return welder


# --- jobs ---------------------------------------------------------------------------------------------

def test_job_list_shows_jobs_and_the_new_job_button_only_to_managers(client_as, make):
    job = make.make_job(number="J-7001")
    page = client_as("viewer").get(reverse("inspections:job_list"))
    assert job.number in page.text and "New job" not in page.text
    assert "New job" in client_as("qa_lead").get(reverse("inspections:job_list")).text


def test_it_creates_a_job_with_a_criteria_set_and_unit_system(client_as):
    response = client_as("welding_engineer").post(reverse("inspections:job_create"), {
        "number": "J-7100", "name": "Ostrander footbridge", "customer": "Ostrander Parks Board", "unit_system": "SI",
        "criteria": "builtin:iso-5817-2014-C"})
    job = Job.objects.get(number="J-7100")
    assert response.status_code == 302 and response.url == job.get_absolute_url()
    assert job.unit_system == "SI" and job.criteria_key == "iso-5817-2014-C" and job.client_criteria is None


def test_it_refuses_a_job_with_an_unknown_criteria_set_and_saves_nothing(client_as):
    response = client_as("qa_lead").post(reverse("inspections:job_create"), {
        "number": "J-7101", "name": "x", "customer": "y", "unit_system": "US", "criteria": "builtin:nonsense"})
    assert response.status_code == 200 and "criteria" in response.context["form"].errors
    assert not Job.objects.filter(number="J-7101").exists()


def test_it_refuses_a_job_for_the_wrong_role(client_as):
    response = client_as("inspector").post(reverse("inspections:job_create"), {
        "number": "J-7102", "name": "x", "customer": "y", "unit_system": "US",
        "criteria": "builtin:aws-d1.1-2020-static"})
    assert response.status_code == 403 and not Job.objects.filter(number="J-7102").exists()


def test_job_detail_searches_piece_marks(client_as, make):
    job = make.make_job()
    make.make_assembly(job=job, piece_mark="C14")
    make.make_assembly(job=job, piece_mark="B22")
    page = client_as("viewer").get(reverse("inspections:job_detail", args=[job.pk]), {"q": "c1"})
    assert "C14" in page.text and "B22" not in page.text


def test_missing_records_answer_404(client_as):
    client = client_as("qa_lead")
    for name in ("job_detail", "assembly_detail", "weld_detail", "weld_edit", "ncr_detail", "assembly_create",
                 "weld_create", "weldmap_import", "weldmap_export"):
        assert client.get(reverse(f"inspections:{name}", args=[999999])).status_code == 404, name
    assert client.get(reverse("inspections:criteria_detail", args=["no-such-set"])).status_code == 404


def test_the_global_search_opens_the_one_exact_piece_mark(client_as, make):
    assembly = make.make_assembly(piece_mark="G7")
    make.make_assembly(piece_mark="G77")
    response = client_as("inspector").get(reverse("inspections:assembly_find"), {"q": "g7"})
    assert response.status_code == 302 and response.url == assembly.get_absolute_url()
    listing = client_as("inspector").get(reverse("inspections:assembly_find"), {"q": "G"})
    assert "G7" in listing.text and "G77" in listing.text


def test_the_global_search_survives_nasty_input(client_as):
    client = client_as("viewer")
    for q in ["'; drop table x; --", "%", "<script>", "x" * 500, "\x00"]:
        assert client.get(reverse("inspections:assembly_find"), {"q": q}).status_code == 200


# --- assemblies -----------------------------------------------------------------------------------------

def test_it_adds_an_assembly_and_refuses_a_duplicate_piece_mark(client_as, make):
    job = make.make_job()
    client = client_as("qa_lead")
    url = reverse("inspections:assembly_create", args=[job.pk])
    data = {"piece_mark": "B5", "drawing": "E-301", "drawing_revision": "2", "quantity": 2, "description": "Beam"}
    assert client.post(url, data).status_code == 302
    again = client.post(url, {**data, "piece_mark": "b5"})
    assert again.status_code == 200 and "piece_mark" in again.context["form"].errors
    assert client.post(url, {**data, "piece_mark": "B6", "quantity": 0}).status_code == 200
    assert list(Assembly.objects.filter(job=job).values_list("piece_mark", flat=True)) == ["B5"]


# --- welds ----------------------------------------------------------------------------------------------

def weld_data(**kwargs):
    data = {"mark": "W1", "joint_type": "fillet", "size": "5/16", "size2": "", "length": "1-1/2\"", "count": 2,
            "sides": "both", "thickness1": "3/8", "thickness2": "1/2 in", "position": "H", "load_angle": "0",
            "required_strength": "", "pitch": ""}
    data.update(kwargs)
    return data


def test_it_adds_a_weld_reading_fractions_in_inches_on_a_us_job(client_as, make):
    assembly = make.make_assembly()
    response = client_as("welding_engineer").post(reverse("inspections:weld_create", args=[assembly.pk]), weld_data())
    assert response.status_code == 302, response.context["form"].errors
    weld = Weld.objects.get(assembly=assembly)
    assert weld.size == L("5/16 in") and weld.length == L("1.5 in") and weld.thickness2 == L("1/2 in")


def test_it_reads_bare_numbers_as_millimetres_on_an_si_job(client_as, make):
    assembly = make.make_assembly(job=make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C"))
    response = client_as("qa_lead").post(reverse("inspections:weld_create", args=[assembly.pk]),
                                         weld_data(size="8", length="300", thickness1="10", thickness2="1/2 in"))
    assert response.status_code == 302
    weld = Weld.objects.get(assembly=assembly)
    assert weld.size == L("8 mm") and weld.length == L("300 mm") and weld.thickness2 == L("12.7 mm")


@pytest.mark.parametrize("bad", [
    {"size": "abc"}, {"size": "0"}, {"size": "-1/4"}, {"length": "1e999"}, {"count": "0"}, {"count": "x"},
    {"thickness1": ""}, {"position": "Z"}, {"joint_type": "groove", "size2": "1/4"}, {"load_angle": "120"},
    {"mark": ""}, {"welded_on": "2999-01-01"}, {"size": "3/0"}, {"size": "9" * 60},
])
def test_bad_weld_input_is_shown_beside_the_field_and_saves_nothing(client_as, make, bad):
    assembly = make.make_assembly()
    response = client_as("qa_lead").post(reverse("inspections:weld_create", args=[assembly.pk]), weld_data(**bad))
    assert response.status_code == 200 and response.context["form"].errors
    assert not Weld.objects.filter(assembly=assembly).exists()


def test_it_refuses_a_duplicate_weld_mark(client_as, make):
    weld = make.make_weld()
    response = client_as("qa_lead").post(reverse("inspections:weld_create", args=[weld.assembly.pk]),
                                         weld_data(mark=weld.mark.lower()))
    assert "mark" in response.context["form"].errors
    assert Weld.objects.filter(assembly=weld.assembly).count() == 1


def test_an_inspector_records_who_welded_but_cannot_change_the_drawing_data(client_as, make):
    weld = make.make_weld(size=L("1/4 in"))
    wps = make.make_wps(state=WPSState.APPROVED)
    welder = qualified_welder(make)
    day = timezone.localdate()  # the WPS was approved today: an earlier weld date is refused (test_weld_wps)
    response = client_as("inspector").post(reverse("inspections:weld_edit", args=[weld.pk]), weld_data(
        mark=weld.mark, size="1/2", wps=wps.pk, welders=[welder.pk], welded_on=day.isoformat(),
        opened_version=weld.version))
    assert response.status_code == 302
    weld.refresh_from_db()
    assert weld.size == L("1/4 in") and weld.wps == wps and list(weld.welders.all()) == [welder]
    # saving welders and a date records continuity (procedures.eligibility.record_production)
    entry = ContinuityEntry.objects.get(weld=weld)
    assert entry.welder == welder and entry.date == day and entry.process == "FCAW"


def test_welders_need_a_date_welded(client_as, make):
    weld = make.make_weld()
    welder = qualified_welder(make)
    response = client_as("qa_lead").post(reverse("inspections:weld_edit", args=[weld.pk]),
                                         weld_data(mark=weld.mark, welders=[welder.pk], opened_version=weld.version))
    assert "welded_on" in response.context["form"].errors and not weld.welders.exists()


def test_a_released_assemblys_welds_cannot_be_edited(client_as, make):
    assembly = make.make_assembly()
    weld = make.make_weld(assembly=assembly)
    make.put(assembly, state="released")  # fixture shortcut: a legal move, past the release step's checks
    client = client_as("qa_lead")
    assert client.get(reverse("inspections:weld_edit", args=[weld.pk])).status_code == 403
    assert client.post(reverse("inspections:weld_create", args=[assembly.pk]), weld_data(mark="W9")).status_code == 403


def test_the_check_panel_says_at_once_whether_the_welder_is_qualified_and_the_wps_approved(client_as, make):
    assembly = make.make_assembly()
    approved = make.make_wps(state=WPSState.APPROVED)
    draft = make.make_wps()
    good = qualified_welder(make, stamp="B-71")
    untested = make.make_welder(stamp="B-72")
    url = reverse("inspections:weld_check", args=[assembly.pk])
    client = client_as("welding_engineer")
    page = client.get(url, {**weld_data(), "wps": approved.pk, "welders": [good.pk, untested.pk],
                            "welded_on": timezone.localdate().isoformat()}, HTTP_HX_REQUEST="true")
    assert page.status_code == 200 and "<html" not in page.text
    assert "approved" in page.text
    assert "B-71" in page.text and "qualified on" in page.text
    assert "B-72" in page.text and "not qualified on" in page.text
    draft_page = client.get(url, {**weld_data(), "wps": draft.pk})
    assert "not approved" in draft_page.text


def test_the_check_panel_survives_half_filled_and_nasty_input(client_as, make):
    assembly = make.make_assembly()
    url = reverse("inspections:weld_check", args=[assembly.pk])
    client = client_as("inspector")
    for params in [{}, {"wps": "x", "welders": ["a", "-1"]}, {"thickness1": "zz", "wps": "99999"},
                   {"weld": "99999"}, {"welded_on": "not a date", "welders": ["1"] * 200}]:
        assert client.get(url, params).status_code in (200, 404), params


# --- the weld map: a fixed number of queries ------------------------------------------------------------

def _weld_map(make, n):
    assembly = make.make_assembly()
    wps = make.make_wps(state=WPSState.APPROVED)
    welders = [qualified_welder(make) for _ in range(2)]
    inspector = make.make_user("inspector")
    for i in range(n):
        weld = make.make_weld(assembly=assembly, mark=f"W{i:03d}", wps=wps, welded_on=timezone.localdate())
        weld.welders.set(welders)
        if i % 3 == 0:
            make.make_inspection(weld=weld, accepted=True, user=inspector)
        elif i % 3 == 1:
            make.make_ncr(inspection=make.make_inspection(weld=weld, accepted=False, user=inspector))
    return assembly


def _queries(client, url):
    with CaptureQueriesContext(connection) as ctx:
        response = client.get(url)
    assert response.status_code == 200
    return len(ctx.captured_queries), response


def test_the_assembly_page_uses_the_same_number_of_queries_for_3_and_30_welds(client_as, make,
                                                                                 django_assert_num_queries):
    client = client_as("viewer")
    small, large = _weld_map(make, 3), _weld_map(make, 30)
    count_small, _ = _queries(client, reverse("inspections:assembly_detail", args=[small.pk]))
    with django_assert_num_queries(count_small):
        response = client.get(reverse("inspections:assembly_detail", args=[large.pk]))
    assert response.text.count("qualified") >= 60 and "W029" in response.text
    assert count_small <= 16


def test_the_weld_map_shows_states_wps_approval_and_welder_qualification(client_as, make):
    assembly = _weld_map(make, 3)
    page = client_as("viewer").get(reverse("inspections:assembly_detail", args=[assembly.pk])).text
    assert "Accepted" in page and "Open NCR" in page and "Not inspected" in page
    assert "holds" in page and "qualified" in page  # the WPS was approved on the weld date and covers it
    assert "Release waits for" in page


def test_job_list_and_detail_queries_do_not_grow_with_rows(client_as, make, django_assert_num_queries):
    client = client_as("viewer")
    job = make.make_job()
    make.make_assembly(job=job)
    count, _ = _queries(client, reverse("inspections:job_detail", args=[job.pk]))
    for _ in range(10):
        make.make_weld(assembly=make.make_assembly(job=job))
    make.make_ncr(inspection=make.make_inspection(weld=make.make_weld(assembly=make.make_assembly(job=job)),
                                                  accepted=False))
    with django_assert_num_queries(count):
        client.get(reverse("inspections:job_detail", args=[job.pk]))
    list_count, _ = _queries(client, reverse("inspections:job_list"))
    make.make_job()
    make.make_job()
    with django_assert_num_queries(list_count):
        client.get(reverse("inspections:job_list"))
