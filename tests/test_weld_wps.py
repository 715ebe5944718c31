"""A weld's WPS: approved on the weld date and covering the weld, or refused beside the field with the reason.

The rules are procedures.applicability's (tests/engines/test_applicability.py tests each at its limit); the date
rule is WPS.in_force_on's. These tests check that the weld form, the check panel, the weld-map import and the
tablet card each ask them.
"""

from datetime import timedelta
from unittest import mock

import pytest
from django.urls import reverse
from django.utils import timezone

from inspections.models import Weld
from inspections.services import weldmap_csv
from procedures.models import WPS
from procedures.models.wps import WPSState
from procedures.services import wps as wps_steps
from tests.factory import L
from tests.test_jobs_pages import weld_data

TODAY = timezone.localdate()


@pytest.fixture
def assembly(make):
    return make.make_assembly()


def _post(client, assembly, **data):
    return client.post(reverse("inspections:weld_create", args=[assembly.pk]), weld_data(**data))


def test_an_approved_wps_that_covers_the_weld_is_accepted(client_as, make, assembly):
    wps = make.make_wps(state=WPSState.APPROVED)
    response = _post(client_as("welding_engineer"), assembly, wps=wps.pk, welded_on=TODAY.isoformat())
    assert response.status_code == 302 and Weld.objects.get(assembly=assembly).wps == wps


@pytest.mark.parametrize("state, words", [(WPSState.DRAFT, "is draft: it was never approved"),
                                          (WPSState.SUBMITTED, "is submitted for approval: it was never approved")])
def test_a_wps_never_approved_is_refused_beside_the_field(client_as, make, assembly, state, words):
    wps = make.make_wps(state=state)
    response = _post(client_as("welding_engineer"), assembly, wps=wps.pk)
    assert response.status_code == 200 and any(words in e for e in response.context["form"].errors["wps"])
    assert not Weld.objects.filter(assembly=assembly).exists()


def test_a_weld_dated_before_its_wps_was_approved_is_refused(client_as, make, assembly):
    wps = make.make_wps(state=WPSState.APPROVED)  # approved today
    yesterday = TODAY - timedelta(days=1)
    response = _post(client_as("welding_engineer"), assembly, wps=wps.pk, welded_on=yesterday.isoformat())
    errors = response.context["form"].errors["wps"]
    assert f"was approved on {TODAY.isoformat()}, after the weld date {yesterday.isoformat()}" in errors[0]


def test_a_wps_that_does_not_cover_the_thickness_is_refused_with_the_clause(client_as, make, assembly):
    wps = make.make_wps(state=WPSState.APPROVED, thickness_max=L("3/8 in"))
    response = _post(client_as("welding_engineer"), assembly, wps=wps.pk, thickness1="3/8", thickness2="1/2")
    errors = response.context["form"].errors["wps"]
    assert len(errors) == 1 and "part 2 is 1/2\"" in errors[0] and "Table 6.2" in errors[0]


def test_an_si_wps_is_refused_on_a_us_job(client_as, make, assembly):
    wps = make.make_wps(state=WPSState.APPROVED, via_steps=False, approved_at=timezone.now(), unit_system="SI",
                        thickness_min=L("6 mm"), thickness_max=L("40 mm"), fillet_size_min=L("5 mm"),
                        fillet_size_max=L("12 mm"))
    response = _post(client_as("welding_engineer"), assembly, wps=wps.pk)
    assert any("SI units" in e and "US customary" in e for e in response.context["form"].errors["wps"])


def test_a_withdrawn_wps_is_not_offered_and_refused_if_posted(client_as, make, assembly):
    yesterday = timezone.now() - timedelta(days=1)
    with mock.patch("django.utils.timezone.now", return_value=yesterday):  # approved and withdrawn yesterday
        wps = make.make_wps(state=WPSState.WITHDRAWN)
    client = client_as("welding_engineer")
    page = client.get(reverse("inspections:weld_create", args=[assembly.pk]))
    assert wps.pk not in [pk for _, group in page.context["form"].fields["wps"].choices[1:] for pk, _ in group]
    response = _post(client, assembly, wps=wps.pk, welded_on=TODAY.isoformat())
    assert "withdrawn" in response.context["form"].errors["wps"][0]


def test_approved_covering_procedures_are_offered_first(client_as, make):
    weld = make.make_weld(thickness1=L("3/8 in"), thickness2=L("1/2 in"))
    good = make.make_wps(state=WPSState.APPROVED, number="BSW-900")
    thin = make.make_wps(state=WPSState.APPROVED, number="BSW-901", thickness_max=L("3/8 in"))
    draft = make.make_wps(number="BSW-902")
    page = client_as("qa_lead").get(reverse("inspections:weld_edit", args=[weld.pk]))
    choices = page.context["form"].fields["wps"].choices
    (first, usable), (_, refused) = choices[1], choices[2]
    assert first == "Approved, covering this weld" and [pk for pk, _ in usable] == [good.pk]
    labels = dict(refused)
    assert "does not cover this weld" in labels[thin.pk] and "not approved on" in labels[draft.pk]


def test_a_superseded_revision_still_covers_a_weld_made_while_it_was_in_force(make, users):
    from inspections.services.chain import wps_check

    old = make.make_wps(state=WPSState.APPROVED)
    new = wps_steps.approve(wps_steps.submit(wps_steps.new_revision(old, users["welding_engineer"]),
                                             users["welding_engineer"]), users["qa_lead"])
    old = WPS.objects.get(pk=old.pk)
    weld = make.make_weld()
    assert old.state == WPSState.SUPERSEDED and new.state == WPSState.APPROVED
    assert wps_check(weld, old, weld.assembly.job, TODAY).errors == []  # superseded today: in force today
    late = wps_check(weld, old, weld.assembly.job, TODAY + timedelta(days=1)).errors
    assert late == [f"{old} was superseded by revision 1 on {TODAY.isoformat()}, before the weld date "
                    f"{(TODAY + timedelta(days=1)).isoformat()}."]


def test_a_wps_withdrawn_today_covers_today_and_not_tomorrow(make, users):
    wps = make.make_wps(state=WPSState.WITHDRAWN)
    assert wps.in_force_on(TODAY) is None
    assert "was withdrawn on" in wps.in_force_on(TODAY + timedelta(days=1))


def test_the_check_panel_says_why_a_wps_does_not_cover_the_weld(client_as, make, assembly):
    wps = make.make_wps(state=WPSState.APPROVED, positions="F, H")
    page = client_as("welding_engineer").get(reverse("inspections:weld_check", args=[assembly.pk]),
                                             {**weld_data(position="OH"), "wps": wps.pk})
    assert "refused for this weld" in page.text and "position OH" in page.text


# --- the weld-map import: a row whose WPS does not apply is a row error ------------------------------------

HEADER = "piece_mark,weld_mark,joint,size,size2,length,count,sides,thickness1,thickness2,position,wps_number\n"


def test_a_weld_map_row_whose_wps_does_not_apply_is_refused(make):
    job = make.make_job()
    make.make_assembly(job=job, piece_mark="B1")
    make.make_wps(state=WPSState.APPROVED, number="BSW-910", positions="F, H")
    make.make_wps(number="BSW-911")  # a draft
    data = (HEADER + "B1,W1,fillet,1/4,,12,1,arrow,3/8,1/2,H,BSW-910\n"
            "B1,W2,fillet,1/4,,12,1,arrow,3/8,1/2,OH,BSW-910\n"
            "B1,W3,fillet,1/4,,12,1,arrow,3/8,1/2,F,BSW-911\n").encode()
    preview = weldmap_csv.read_weld_map(data, job)
    errors = {row.values["weld_mark"]: row.errors for row in preview.rows}
    assert errors["W1"] == []
    assert len(errors["W2"]) == 1 and errors["W2"][0].startswith("wps_number:") and "position OH" in errors["W2"][0]
    assert "never approved" in errors["W3"][0]
    assert not preview.ok


# --- the tablet card ------------------------------------------------------------------------------------------

def test_the_tablet_shows_a_weld_whose_wps_does_not_apply_as_blocked(client_as, make, assembly):
    make.make_sound_weld(assembly=assembly, mark="W1")
    make.make_weld(assembly=assembly, mark="W2", wps=make.make_wps(), welded_on=TODAY)  # a draft WPS
    page = client_as("inspector").get(reverse("inspections:inspect_assembly", args=[assembly.pk]))
    blocked = {weld.mark: reasons for weld, _status, reasons in page.context["cards"]}
    assert blocked["W1"] == [] and len(blocked["W2"]) == 1 and "never approved" in blocked["W2"][0]
    assert page.text.count("Blocked") == 1


def test_a_checker_for_many_welds_answers_each_as_wps_check_does(make, assembly):
    """chain.WpsChecker (the weld-map import's) works each WPS out once and each weld's values once: every answer
    is wps_check's, repeated welds included, and each a list of its own."""
    from inspections.services import chain

    job = assembly.job
    approved = make.make_wps(state=WPSState.APPROVED)
    draft = make.make_wps(state=WPSState.DRAFT)
    welds = [Weld(assembly=assembly, mark=mark, joint_type=joint, size=L(size), length=L("12 in"),
                  thickness1=L("3/8 in"), thickness2=L(thickness), position="F")
             for mark, joint, size, thickness in [("W1", "fillet", "1/4 in", "1/2 in"),
                                                  ("W2", "fillet", "1/4 in", "2 in"),
                                                  ("W3", "groove", "1/4 in", "1/2 in"),
                                                  ("W1", "fillet", "1/4 in", "1/2 in"),
                                                  ("W2", "fillet", "1/4 in", "2 in")]]
    checker = chain.WpsChecker(job, TODAY)
    for wps in (approved, draft, approved):
        for weld in welds:
            mine, alone = checker.check(weld, wps), chain.wps_check(weld, wps, job, TODAY)
            assert (mine.wps, mine.errors, mine.notes) == (alone.wps, alone.errors, alone.notes)
            mine.errors.append("changed by the caller")
    assert checker.check(welds[0], approved).errors == []
    assert checker.check(welds[1], approved).errors and checker.check(welds[0], draft).errors
    assert checker.check(welds[0], None).errors == ["no WPS is named"]
