"""Welder essential variables recorded on the test and the WPS, and read by the check (procedures.eligibility).

The rules are the engine's (procedures.qualification, AWS D1.1:2020 Table 6.12 and ISO 9606-1, from memory:
tests/engines/test_qualification.py tests each); these tests check that the records carry the values to it.
"""

from datetime import timedelta

import pytest
from django.urls import reverse
from django.utils import timezone

from procedures import eligibility
from procedures.forms.welders import QualificationForm
from procedures.models.wps import PQR, WPSState
from tests.factory import L
from tests.test_pqr_views import VALID as PQR_DATA
from tests.test_welders_forms import form_data

TODAY = timezone.localdate()


def _weld(make, wps, **kwargs):
    return make.make_weld(wps=wps, welded_on=TODAY, **kwargs)


def _welder(make, **test):
    welder = make.make_welder()
    make.make_qualification(welder=welder, test_date=TODAY - timedelta(days=10), **test)
    return welder


@pytest.mark.parametrize("tested, welded, allowed", [("up", "up", True), ("up", "down", False),
                                                      ("down", "up", False), ("down", "down", True)])
def test_vertical_progression_of_the_test_against_the_wps(make, tested, welded, allowed):
    welder = _welder(make, progression=tested)
    weld = _weld(make, make.make_wps(state=WPSState.APPROVED, progression=welded), position="V")
    answer = eligibility.check_welder(welder, weld)
    assert answer.allowed is allowed
    if not allowed:
        assert "Table 6.12" in " ".join(answer.reasons)


@pytest.mark.parametrize("position, allowed", [("PF", True), ("PG", False)])
def test_an_iso_6947_position_on_the_weld_map_says_the_progression_itself(make, position, allowed):
    welder = _welder(make, progression="up")
    weld = _weld(make, make.make_wps(state=WPSState.APPROVED), position=position)  # the WPS states none
    assert eligibility.check_welder(welder, weld).allowed is allowed


def test_a_progression_not_recorded_is_not_refused_but_said(make):
    welder = _welder(make)
    answer = eligibility.check_welder(welder, _weld(make, make.make_wps(state=WPSState.APPROVED), position="V"))
    assert answer.allowed and "Not checked" in answer.reasons[0] and "vertical progression" in answer.reasons[0]


@pytest.mark.parametrize("tested, welded, allowed", [("short_circuit", "short_circuit", True),
                                                      ("short_circuit", "spray", False),
                                                      ("spray", "short_circuit", False), ("spray", "pulsed", True)])
def test_gmaw_s_is_its_own_process(make, tested, welded, allowed):
    welder = _welder(make, process="GMAW", transfer=tested, electrode="ER70S-6")
    wps = make.make_wps(process="GMAW", transfer=welded, electrode="ER70S-6", shielding_gas="90Ar/10CO2")
    assert eligibility.check_welder(welder, _weld(make, wps)).allowed is allowed


@pytest.mark.parametrize("tested, welded, allowed", [("without", "with", True), ("with", "without", False),
                                                      ("with", "with", True)])
def test_a_test_with_backing_does_not_qualify_welding_without(make, tested, welded, allowed):
    welder = _welder(make, backing=tested)
    wps = make.make_wps(joint_types="fillet, groove", backing=welded)
    weld = _weld(make, wps, joint_type="groove", thickness1=L("1/2 in"), thickness2=L("1/2 in"))
    assert eligibility.check_welder(welder, weld).allowed is allowed


# --- the forms record them ---------------------------------------------------------------------------------------

@pytest.mark.django_db
def test_the_test_record_form_keeps_progression_backing_and_gmaw_transfer():
    form = QualificationForm(data=form_data(process="GMAW", electrode="ER70S-6", transfer="short_circuit",
                                            progression="up", backing="with"))
    assert form.is_valid(), form.errors
    assert (form.cleaned_data["transfer"], form.cleaned_data["progression"], form.cleaned_data["backing"]) == (
        "short_circuit", "up", "with")


@pytest.mark.django_db
def test_the_test_record_form_drops_a_transfer_for_another_process_and_backing_for_a_fillet_test():
    form = QualificationForm(data=form_data(transfer="spray", joint="fillet", test_position="3F", backing="with"))
    assert form.is_valid(), form.errors
    assert (form.cleaned_data["transfer"], form.cleaned_data["backing"]) == ("", "")


def test_a_gmaw_pqr_must_record_its_transfer(client_as):
    client = client_as("welding_engineer")
    data = {**PQR_DATA, "process": "GMAW", "electrode": "ER70S-6", "shielding_gas": "90Ar/10CO2"}
    response = client.post(reverse("procedures:pqr_create"), data)
    assert response.status_code == 200 and "transfer" in response.context["form"].errors
    assert client.post(reverse("procedures:pqr_create"), {**data, "transfer": "spray"}).status_code == 302
    assert PQR.objects.get().transfer == "spray"


def test_a_pqr_reads_its_test_weld_from_the_position_unless_recorded(make):
    assert make.make_pqr(position="3F").test_joint == "fillet"
    assert make.make_pqr(position="2G").test_joint == "groove"
    assert make.make_pqr(position="PB").test_joint == "fillet"
    assert make.make_pqr(position="PA", joint="fillet").test_joint == "fillet"


def test_the_job_form_records_the_fit_up_hold_point(client_as):
    from inspections.models import Job

    client_as("qa_lead").post(reverse("inspections:job_create"), {
        "number": "J-7200", "name": "Mill crane runway", "customer": "Ostrander", "unit_system": "US",
        "criteria": "builtin:aws-d1.1-2020-cyclic", "fit_up_hold_point": "on", "gauge_required": "on"})
    job = Job.objects.get(number="J-7200")
    assert (job.fit_up_hold_point, job.gauge_required, job.filler_lot_required) == (True, True, False)
    page = client_as("qa_lead").get(job.get_absolute_url()).text
    assert "every final visual names its gauge" in page and "filler lots recorded where known" in page


def test_the_wps_form_records_progression_for_vertical_and_backing_for_groove_welds_only(client_as):
    from procedures.models import WPS
    from tests.test_wps_views import VALID

    client = client_as("welding_engineer")
    client.post(reverse("procedures:wps_create"), {**VALID, "progression": "up", "backing": "with"})
    saved = WPS.objects.get(number=VALID["number"])
    assert (saved.progression, saved.backing) == ("up", "")  # a fillet-only WPS has no backing to state
    client.post(reverse("procedures:wps_create"), {**VALID, "number": "BSW-502", "positions": ["F", "H"],
                                                   "joint_types": ["groove"], "progression": "up",
                                                   "backing": "with"})
    assert WPS.objects.filter(number="BSW-502").values_list("progression", "backing").get() == ("", "with")


@pytest.mark.django_db
def test_the_could_this_welder_weld_it_form_asks_the_essential_variables_too():
    from procedures.forms.welders import WeldCheckForm

    form = WeldCheckForm({"code": "AWS D1.1:2020", "process": "GMAW", "joint": "fillet", "position": "V",
                          "thickness": "1/2", "transfer": "short_circuit", "progression": "down", "backing": "with"})
    assert form.is_valid(), form.errors
    demand = form.cleaned_data["demand"]
    assert (demand.transfer, demand.progression, demand.backing) == ("short_circuit", "down", None)
