"""Assembly states: sent for inspection, rejected and back, released only when nothing blocks it."""

import pytest
from django.core.exceptions import PermissionDenied
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from core.history import history_of
from inspections.models import Assembly, AssemblyState
from inspections.services.assemblies import refresh_assembly_state, release, release_blockers, submit_for_inspection
from inspections.services.ncr import disposition_use_as_is


@pytest.fixture
def assembly(make):
    return make.make_assembly(piece_mark="B40")


def test_it_releases_an_assembly_whose_welds_all_have_an_accepted_final_inspection(make, users, assembly):
    for mark in ("W1", "W2"):
        make.make_inspection(weld=make.make_sound_weld(assembly=assembly, mark=mark), accepted=True)
    release(assembly, users["qa_lead"], "Ready to ship")
    assembly.refresh_from_db()
    assert assembly.state == AssemblyState.RELEASED and assembly.released_by == users["qa_lead"]
    event = history_of(assembly).get(to_state=AssemblyState.RELEASED)
    assert event.user == users["qa_lead"] and event.reason == "Ready to ship"


def test_it_refuses_release_with_an_uninspected_weld(make, users, assembly):
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly, mark="W1"), accepted=True)
    make.make_sound_weld(assembly=assembly, mark="W2")
    before = (Assembly.objects.get(pk=assembly.pk).state, history_of(assembly).filter(action="state").count())
    with pytest.raises(Refused) as refused:
        release(assembly, users["qa_lead"])
    assert refused.value.messages == ["Weld W2 has no final visual inspection."]
    assembly.refresh_from_db()
    assert (assembly.state, history_of(assembly).filter(action="state").count()) == before == (
        AssemblyState.AWAITING_INSPECTION, 1)


def test_an_in_process_inspection_is_not_a_final_one(make, users, assembly):
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly, mark="W1"), accepted=True, stage="in_process")
    assert release_blockers(assembly) == ["Weld W1 has no final visual inspection."]


def test_it_refuses_release_with_an_open_ncr(make, users, assembly):
    weld = make.make_weld(assembly=assembly, mark="W1")
    ncr = make.make_ncr(inspection=make.make_inspection(weld=weld, accepted=False))
    with pytest.raises(Refused) as refused:
        release(assembly, users["qa_lead"])
    assert any(ncr.number in m and "open" in m for m in refused.value.messages)


def test_a_superseded_acceptance_does_not_count(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    first = make.make_inspection(weld=weld, accepted=True)
    rejection = make.make_inspection(weld=weld, accepted=False, supersedes=first, reason="Misread the gauge")
    ncr = rejection.ncrs.get()
    assert release_blockers(assembly) == [f"Weld W1: {ncr} is open (awaiting disposition)."]


def test_it_refuses_an_empty_weld_map_and_a_second_release(make, users, assembly):
    with pytest.raises(Refused):
        release(assembly, users["qa_lead"])
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly), accepted=True)
    release(assembly, users["qa_lead"])
    with pytest.raises(Refused, match="already released"):
        release(assembly, users["qa_lead"])


def test_only_the_qa_lead_releases(make, users, assembly):
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly), accepted=True)
    for role in ("welding_engineer", "inspector", "viewer"):
        with pytest.raises(PermissionDenied):
            release(assembly, users[role])


def test_submit_moves_it_to_awaiting_inspection_once(make, users, assembly):
    make.make_weld(assembly=assembly)
    submit_for_inspection(assembly, users["inspector"])
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.AWAITING_INSPECTION
    with pytest.raises(Refused):
        submit_for_inspection(assembly, users["inspector"])
    with pytest.raises(PermissionDenied):
        submit_for_inspection(make.make_assembly(), users["viewer"])


def test_refresh_rejects_and_comes_back_when_the_ncr_closes(make, users, assembly):
    weld = make.make_weld(assembly=assembly)
    rejected = make.make_inspection(weld=weld, accepted=False)  # signing opens the NCR and rejects the assembly
    assert refresh_assembly_state(assembly, users["inspector"]) == AssemblyState.REJECTED
    event = history_of(assembly).get(action="state")
    assert event.user == rejected.inspector and event.from_state == AssemblyState.IN_FABRICATION
    ncr = rejected.ncrs.get()
    disposition_use_as_is(ncr, users["qa_lead"], "A. Engineer, PE", timezone.localdate(rejected.inspected_at))
    assert refresh_assembly_state(assembly, users["inspector"]) == AssemblyState.AWAITING_INSPECTION
    assert refresh_assembly_state(assembly, users["inspector"]) == AssemblyState.AWAITING_INSPECTION
    assert history_of(assembly).filter(action="state").count() == 2


def test_a_released_assembly_takes_no_more_inspections(make, users, assembly):
    weld = make.make_sound_weld(assembly=assembly)
    accepted = make.make_inspection(weld=weld, accepted=True)
    release(assembly, users["qa_lead"])
    with pytest.raises(Refused, match="released"):
        make.make_inspection(weld=weld, accepted=False, supersedes=accepted, reason="Crack found on review")
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.RELEASED


# --- the buttons ------------------------------------------------------------------------------------------

def test_the_release_button_shows_why_it_was_refused(client_as, make, assembly):
    make.make_sound_weld(assembly=assembly, mark="W7")
    response = client_as("qa_lead").post(reverse("inspections:assembly_release", args=[assembly.pk]))
    assert response.status_code == 409
    assert "Weld W7 has no final visual inspection." in response.text
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.IN_FABRICATION


def test_the_release_button_releases(client_as, make, assembly):
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly), accepted=True)
    response = client_as("qa_lead").post(reverse("inspections:assembly_release", args=[assembly.pk]),
                                         {"reason": "x" * 5000})
    assert response.status_code == 302
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.RELEASED


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_the_release_button_is_the_qa_leads(client_as, make, assembly, role):
    make.make_inspection(weld=make.make_sound_weld(assembly=assembly), accepted=True)
    assert client_as(role).post(reverse("inspections:assembly_release", args=[assembly.pk])).status_code == 403
    assert Assembly.objects.get(pk=assembly.pk).state == AssemblyState.AWAITING_INSPECTION


def test_the_submit_button(client_as, make, assembly):
    make.make_weld(assembly=assembly)
    assert client_as("viewer").post(reverse("inspections:assembly_submit", args=[assembly.pk])).status_code == 403
    assert client_as("inspector").post(reverse("inspections:assembly_submit", args=[assembly.pk])).status_code == 302
    again = client_as("inspector").post(reverse("inspections:assembly_submit", args=[assembly.pk]))
    assert again.status_code == 409 and "is awaiting inspection; this needs it in fabrication" in again.text


def test_the_buttons_answer_404_for_a_missing_assembly(client_as):
    assert client_as("qa_lead").post(reverse("inspections:assembly_release", args=[99999])).status_code == 404
