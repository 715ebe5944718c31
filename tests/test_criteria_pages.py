"""Client criteria sets: derived from a published set through inspections.criteria.derive, versioned, tighter
only unless an engineer signs; verdicts keep the key and version they were judged by."""

import pytest
from django.urls import reverse

from core.errors import RecordLocked
from inspections.models import ClientCriteriaSet
from tests.pages_jobs import make_client_set

URL = "inspections:criteria_derive"


def derive_data(**kwargs):
    data = {"base": "aws-d1.1-2020-static", "key": "harlan-transit-static", "title": "Harlan Transit, static",
            "engineer_name": "", "undercut_thin__us": "1/64 in", "undercut_thin__si": "0.5 mm"}
    data.update(kwargs)
    return data


def test_the_qa_lead_derives_a_tighter_set(client_as):
    response = client_as("qa_lead").post(reverse(URL), derive_data())
    stored = ClientCriteriaSet.objects.get()
    assert response.status_code == 302 and response.url == stored.get_absolute_url()
    assert (stored.key, stored.version, stored.base_key, stored.signed_by_engineer) == (
        "harlan-transit-static", 1, "aws-d1.1-2020-static", "")
    cset = stored.criteria_set()
    assert cset.overridden == ("undercut_thin",) and cset.base_version == 1


def test_saving_the_same_key_again_makes_the_next_version(client_as):
    client = client_as("qa_lead")
    client.post(reverse(URL), derive_data())
    client.post(reverse(URL), derive_data(undercut_thin__us="1/128 in", undercut_thin__si="0.25 mm"))
    assert list(ClientCriteriaSet.objects.order_by("version").values_list("version", flat=True)) == [1, 2]


def test_a_looser_limit_is_refused_beside_the_field_without_an_engineer(client_as):
    response = client_as("qa_lead").post(reverse(URL), derive_data(undercut_thin__us="1/8 in",
                                                                   undercut_thin__si="3 mm"))
    assert response.status_code == 400
    assert "signed_by_engineer" in " ".join(response.context["form"].errors["undercut_thin__us"])
    assert not ClientCriteriaSet.objects.exists()


def test_a_looser_limit_signed_by_an_engineer_is_kept_with_the_name(client_as):
    response = client_as("qa_lead").post(reverse(URL), derive_data(
        undercut_thin__us="1/8 in", undercut_thin__si="3 mm", engineer_name="M. Ferreira, PE"))
    assert response.status_code == 302
    stored = ClientCriteriaSet.objects.get()
    assert stored.signed_by_engineer == "M. Ferreira, PE" and stored.criteria_set().loosened == ("undercut_thin",)
    page = client_as("inspector").get(stored.get_absolute_url()).text
    assert "looser, signed" in page and "M. Ferreira, PE" in page


@pytest.mark.parametrize("bad, status", [
    ({"key": "aws-d1.1-2020-static"}, 400), ({"key": "Bad Key!"}, 400), ({"title": ""}, 400),
    ({"undercut_thin__us": "banana"}, 400), ({"undercut_thin__us": "", "undercut_thin__si": ""}, 400),
    ({"crack": "sometimes"}, 400), ({"base": "client:99999"}, 404), ({"undersize_portion": "150 %"}, 400),
])
def test_bad_input_saves_nothing(client_as, bad, status):
    response = client_as("qa_lead").post(reverse(URL), derive_data(**bad))
    assert response.status_code == status
    assert not ClientCriteriaSet.objects.exists()


def test_a_client_set_can_be_the_base_of_the_next(client_as, make):
    first = make_client_set(make)
    client = client_as("qa_lead")
    page = client.get(reverse(URL), {"base": f"client:{first.pk}"})
    assert page.status_code == 200 and first.key in page.text
    response = client.post(reverse(URL), derive_data(base=f"client:{first.pk}", key="harlan-strict",
                                                     undercut_thin__us="1/128 in", undercut_thin__si="0.25 mm"))
    assert response.status_code == 302
    assert ClientCriteriaSet.objects.get(key="harlan-strict").criteria_set().base_key == first.key


def test_a_stored_set_is_never_edited(make):
    stored = make_client_set(make)
    stored.title = "changed"
    with pytest.raises(RecordLocked):
        stored.save()


def test_a_job_on_a_client_set_judges_with_its_key_and_version(client_as, make):
    stored = make_client_set(make, version=3)
    response = client_as("qa_lead").post(reverse("inspections:job_create"), {
        "number": "J-9100", "name": "Depot", "customer": "Harlan County Transit Authority", "unit_system": "US",
        "criteria": f"client:{stored.pk}"})
    assert response.status_code == 302
    job = stored.jobs.get()
    assert job.criteria_identity() == ("harlan-transit-static", 3)
    assert job.criteria_for_evaluation() == stored.definition


def test_the_derive_page_is_the_qa_leads(client_as):
    for role in ("welding_engineer", "inspector", "viewer"):
        assert client_as(role).post(reverse(URL), derive_data()).status_code == 403
    assert not ClientCriteriaSet.objects.exists()


def test_the_published_sets_list_and_show_their_sources(client_as):
    client = client_as("viewer")
    assert "iso-5817-2014-B" in client.get(reverse("inspections:criteria_list")).text
    page = client.get(reverse("inspections:criteria_detail", args=["aws-d1.1-2020-static"])).text
    assert "Table 8.1" in page and "undercut_thin" in page
