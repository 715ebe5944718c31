"""Fit-up is a hold point before welding: the inspector judges the joint, not weld sizes.

Source named in the finding: AWS D1.1/D1.1M:2020 clause 7, fit-up and dimensional tolerances (clause from
memory); the visual acceptance tables (Table 8.1, ISO 5817) judge finished welds only.
"""

from django.urls import reverse

from inspections.models import Inspection, InspectionStage
from inspections.services.assemblies import release_blockers
from inspections.services.inspect import sign_inspection


def _post(**data):
    return {"stage": "fit_up", **data}


def test_a_fit_up_needs_no_weld_measurement_and_is_accepted_when_the_joint_is_ready(make, client_as):
    weld = make.make_weld()
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]),
                                           _post(fit_up_ok="on"))
    assert response.status_code == 302
    inspection = Inspection.objects.get(weld=weld)
    assert inspection.stage == InspectionStage.FIT_UP and inspection.accepted
    assert [f["criterion"] for f in inspection.findings] == ["fit_up"]
    assert "clause 7" in inspection.findings[0]["source"]


def test_a_fit_up_that_is_not_ready_is_rejected_and_opens_no_ncr(make, users):
    weld = make.make_weld()
    inspection = sign_inspection(weld, {"fit_up_ok": False}, "fit_up", users["inspector"])
    assert not inspection.accepted
    assert not inspection.ncrs.exists()


def test_a_weld_measurement_at_fit_up_is_refused_beside_the_field_and_nothing_is_saved(make, client_as):
    weld = make.make_weld()
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]),
                                           _post(fit_up_ok="on", min_size="1/4", crack="on"))
    assert response.status_code == 200
    form = response.context["form"]
    assert "Fit-up comes before welding" in form.errors["min_size"][0]
    assert "crack" in form.errors
    assert not Inspection.objects.exists()


def test_the_preview_shows_the_fit_up_finding(make, client_as):
    weld = make.make_weld()
    html = client_as("inspector").post(reverse("inspections:inspect_preview", args=[weld.pk]),
                                       _post(fit_up_ok="on")).content.decode()
    assert "ready to weld" in html
    assert not Inspection.objects.exists()


def test_an_accepted_fit_up_does_not_count_as_the_final_visual_for_release(make, users):
    weld = make.make_weld()
    sign_inspection(weld, {"fit_up_ok": True}, "fit_up", users["inspector"])
    assert any("no final visual inspection" in reason for reason in release_blockers(weld.assembly))
