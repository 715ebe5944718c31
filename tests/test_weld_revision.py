"""A weld's data after its first inspection changes only by a recorded revision that sends it back for inspection."""

from datetime import date

import pytest
from django.urls import reverse

from core.errors import RecordLocked, Refused, Stale
from core.history import history_of
from inspections.models import AssemblyState, Weld
from inspections.services.assemblies import release, release_blockers, weld_statuses
from inspections.services.welds import revise
from tests.factory import L
from tests.test_stale_saves import form_data


@pytest.fixture
def inspected(make):
    """A weld on B-07's record, accepted at its final visual inspection."""
    weld = make.make_sound_weld()
    make.make_inspection(weld, accepted=True)
    return Weld.objects.select_related("assembly__job").get(pk=weld.pk)


def test_a_revision_changes_the_data_and_sends_the_weld_back_for_inspection(make, users, inspected):
    inspected.size = L("5/16 in")
    revised = revise(inspected, users["qa_lead"], "Drawing E-204 rev 3 enlarged the leg")
    assert revised.revision == 1 and revised.size == L("5/16 in")
    assert revised.latest_inspection is None and revised.latest_final is None
    assert weld_statuses([revised.pk])[revised.pk].word == "not_inspected"
    assert inspected.inspections.count() == 1  # the earlier inspection stays on record
    assert release_blockers(revised.assembly) == [f"Weld {revised.mark} has no final visual inspection."]
    event = history_of(revised).get(action="revised")
    assert (event.user, event.reason) == (users["qa_lead"], "Drawing E-204 rev 3 enlarged the leg")
    assert (event.from_state, event.to_state) == ("revision 0", "revision 1")
    assert event.changes == {"specified leg": ['1/4"', '5/16"']}


def test_the_welders_changed_by_a_revision_are_listed_in_its_one_row(make, users, inspected):
    other = make.make_welder(name="Luis Ferreira")
    revise(inspected, users["qa_lead"], "Luis made this weld, not the welder recorded", welders=[other])
    assert list(inspected.welders.all()) == [other]
    rows = list(history_of(inspected).filter(action="revised"))
    assert len(rows) == 1 and rows[0].changes["welders"][1] == str(other)


@pytest.mark.parametrize("reason", ["", "   "])
def test_a_revision_needs_a_reason(make, users, inspected, reason):
    inspected.size = L("5/16 in")
    with pytest.raises(Refused, match="reason"):
        revise(inspected, users["qa_lead"], reason)
    assert Weld.objects.get(pk=inspected.pk).size == L("1/4 in")


def test_an_uninspected_weld_is_edited_not_revised(make, users):
    weld = make.make_weld()
    weld.size = L("5/16 in")
    with pytest.raises(Refused, match="edit it"):
        revise(weld, users["qa_lead"], "no need")


def test_a_released_assemblys_weld_is_not_revised(make, users, inspected):
    release(inspected.assembly, users["qa_lead"])
    inspected.size = L("5/16 in")
    with pytest.raises(RecordLocked, match="released"):
        revise(inspected, users["qa_lead"], "too late")


def test_a_revision_from_a_stale_page_is_refused(make, users, inspected):
    other = Weld.objects.get(pk=inspected.pk)
    other.count = 3
    revise(other, users["qa_lead"], "Three of them on the drawing")
    inspected.size = L("5/16 in")
    with pytest.raises(Stale):
        revise(inspected, users["qa_lead"], "Bigger leg")
    stored = Weld.objects.get(pk=inspected.pk)
    assert (stored.count, stored.size, stored.revision) == (3, L("1/4 in"), 1)


def test_only_a_revision_changes_an_inspected_weld(make, users, inspected):
    inspected.size = L("5/16 in")
    with pytest.raises(RecordLocked, match="Revise the weld"):
        inspected.save()
    inspected.refresh_from_db()
    inspected.revision = 1  # the step's own fields are not an edit either
    with pytest.raises(RecordLocked):
        inspected.save()


def test_an_inspection_of_the_old_data_is_not_corrected_after_a_revision(make, users, inspected):
    old = inspected.latest_final
    inspected.size = L("5/16 in")
    revise(inspected, users["qa_lead"], "New drawing")
    with pytest.raises(Refused, match="revised after that inspection"):
        make.make_inspection(Weld.objects.select_related("assembly__job").get(pk=inspected.pk), supersedes=old,
                             reason="typo", accepted=True)


def test_the_revised_weld_is_inspected_again_and_the_assembly_released(make, users, inspected):
    inspected.size = L("5/16 in")
    revise(inspected, users["qa_lead"], "New drawing")
    make.make_inspection(Weld.objects.select_related("assembly__job").get(pk=inspected.pk), accepted=True,
                         min_size="5/16 in")
    assert release(inspected.assembly, users["qa_lead"]).state == AssemblyState.RELEASED


# --- the pages ------------------------------------------------------------------------------------------------

def test_the_engineer_revises_from_the_weld_page(make, client_as, inspected):
    client = client_as("welding_engineer")
    url = reverse("inspections:weld_revise", args=[inspected.pk])
    assert "Revise (with a reason)" in client.get(reverse("inspections:weld_detail", args=[inspected.pk])).text
    data = form_data(client.get(url).context["form"])
    response = client.post(url, {**data, "size": "5/16", "reason": "Drawing E-204 rev 3"})
    assert response.status_code == 302
    assert Weld.objects.get(pk=inspected.pk).revision == 1
    page = client.get(reverse("inspections:weld_detail", args=[inspected.pk])).text
    assert "Drawing E-204 rev 3" in page and "revision 0 → revision 1" in page


def test_a_revision_without_a_reason_keeps_the_input(make, client_as, inspected):
    client = client_as("welding_engineer")
    url = reverse("inspections:weld_revise", args=[inspected.pk])
    response = client.post(url, {**form_data(client.get(url).context["form"]), "size": "5/16", "reason": ""})
    assert response.status_code == 200 and "reason" in response.context["form"].errors
    assert response.context["form"]["size"].value() == "5/16"
    assert Weld.objects.get(pk=inspected.pk).revision == 0


def test_an_inspector_cannot_change_a_final_inspected_weld_by_a_crafted_post(make, client_as, inspected):
    client = client_as("inspector")
    before = (inspected.welded_on, inspected.size)
    url = reverse("inspections:weld_edit", args=[inspected.pk])
    assert client.get(url).status_code == 302  # to the weld page: only a revision changes it now
    response = client.post(url, {"mark": inspected.mark, "welded_on": "2026-04-09", "size": "1/2",
                                 "opened_version": inspected.version})
    assert response.status_code in (200, 409)
    stored = Weld.objects.get(pk=inspected.pk)
    assert (stored.welded_on, stored.size) == before
    assert client.post(reverse("inspections:weld_revise", args=[inspected.pk]), {}).status_code == 403


def test_after_fit_up_the_welders_and_date_are_still_recorded(make, client_as):
    """Fit-up is a hold point before welding: who welded it and when come after it, until the final inspection."""
    from tests.test_jobs_pages import qualified_welder

    weld = make.make_weld()
    make.make_inspection(weld, stage="fit_up")
    welder = qualified_welder(make)
    client = client_as("inspector")
    url = reverse("inspections:weld_edit", args=[weld.pk])
    data = form_data(client.get(url).context["form"])
    response = client.post(url, {**data, "welders": [welder.pk], "welded_on": "2026-04-02", "size": "1/2"})
    assert response.status_code == 302
    stored = Weld.objects.get(pk=weld.pk)
    assert list(stored.welders.all()) == [welder] and stored.welded_on == date(2026, 4, 2)
    assert stored.size == L("1/4 in")  # the drawing data froze at the fit-up inspection
