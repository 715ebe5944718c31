"""Fit-up is a hold point before welding: the inspector gauges the root opening and judges the joint, not weld
sizes; the final visual then judges the leg increased by the opening.

Sources named in the findings: AWS D1.1/D1.1M:2020 clause 7.21.1 (2015: 5.22.1), fit-up of fillet welds: root
opening at most 3/16 in [5 mm] (5/16 in [8 mm] on material 3 in [75 mm] and thicker, with backing), and from
1/16 in [2 mm] the leg increased by the opening (clause number and values from memory, high confidence);
clause 7, fit-up and dimensional tolerances for the inspector's call; ISO 5817:2014 item 617 on ISO jobs.
"""

import pytest
from django.urls import reverse

from inspections.models import NCR, Inspection, InspectionStage
from inspections.services.assemblies import release_blockers
from inspections.services.inspect import sign_inspection
from tests.factory import L
from tests.test_inspect_views import sign


def _post(**data):
    return {"stage": "fit_up", **data}


def test_a_fit_up_needs_no_weld_measurement_and_is_accepted_when_the_joint_is_ready(make, client_as):
    weld = make.make_weld()
    response = sign(client_as("inspector"), weld, _post(fit_up_ok="on", root_gap="0"))
    assert response.status_code == 302
    inspection = Inspection.objects.get(weld=weld)
    assert inspection.stage == InspectionStage.FIT_UP and inspection.accepted
    assert [f["criterion"] for f in inspection.findings] == ["root_opening", "fit_up"]
    assert "clause 7.21.1" in inspection.findings[0]["source"] and "clause 7" in inspection.findings[1]["source"]
    assert inspection.root_gap == L("0 in")


def test_the_root_opening_is_asked_at_fit_up(make, client_as):
    weld = make.make_weld()
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]),
                                           _post(fit_up_ok="on"))
    assert response.status_code == 400
    assert "Gauge the root opening" in response.context["form"].errors["root_gap"][0]
    assert not Inspection.objects.exists()


def test_a_fit_up_that_is_not_ready_is_rejected_and_opens_no_ncr(make, users):
    weld = make.make_weld()
    inspection = sign_inspection(weld, {"fit_up_ok": False}, "fit_up", users["inspector"])
    assert not inspection.accepted
    assert not inspection.ncrs.exists()


def test_a_weld_measurement_at_fit_up_is_refused_beside_the_field_and_nothing_is_saved(make, client_as):
    weld = make.make_weld()
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]),
                                           _post(fit_up_ok="on", root_gap="0", min_size="1/4", crack="on"))
    assert response.status_code == 400
    form = response.context["form"]
    assert "Fit-up comes before welding" in form.errors["min_size"][0]
    assert "crack" in form.errors
    assert not Inspection.objects.exists()


def test_the_preview_shows_the_fit_up_finding(make, client_as):
    weld = make.make_weld()
    html = client_as("inspector").post(reverse("inspections:inspect_preview", args=[weld.pk]),
                                       _post(fit_up_ok="on", root_gap="1/16")).content.decode()
    assert "ready to weld" in html
    assert not Inspection.objects.exists()


def test_an_accepted_fit_up_does_not_count_as_the_final_visual_for_release(make, users):
    weld = make.make_weld()
    sign_inspection(weld, {"fit_up_ok": True}, "fit_up", users["inspector"])
    assert any("no final visual inspection" in reason for reason in release_blockers(weld.assembly))


# --- the root opening, measured (AWS D1.1:2020 clause 7.21.1, from memory) -------------------------------------

@pytest.mark.parametrize("opening, thicker, ok", [
    ("3/16 in", "1/2 in", True),  # at the limit
    ("7/32 in", "1/2 in", False),  # just past it
    ("5/16 in", "3 in", True),  # 3 in and thicker: 5/16 in (with backing)
    ("11/32 in", "3 in", False),
])
def test_the_root_opening_at_fit_up_is_judged_against_its_limit(opening, thicker, ok, make, users):
    weld = make.make_weld(thickness2=L(thicker))
    inspection = sign_inspection(weld, {"fit_up_ok": True, "root_gap": L(opening)}, "fit_up", users["inspector"])
    assert inspection.accepted is ok
    assert inspection.findings[0]["criterion"] == "root_opening" and inspection.findings[0]["ok"] is ok
    assert not inspection.ncrs.exists()  # a fit-up opens no NCR


def test_from_1_16_in_the_final_visual_judges_the_leg_increased_by_the_opening(make, users):
    """A 1/4 in fillet with a 1/8 in root opening must reach 3/8 in: 1/4 in measured is 1/8 in under it."""
    weld = make.make_weld(size=L("1/4 in"), length=L("12 in"))
    sign_inspection(weld, {"fit_up_ok": True, "root_gap": L("1/8 in")}, "fit_up", users["inspector"])
    final = sign_inspection(weld, {"min_size": L("1/4 in")}, "final", users["inspector"])
    assert not final.accepted and final.leg_increase == L("1/8 in")
    assert final.findings[0]["criterion"] == "root_opening"
    assert 'judged as 3/8"' in final.findings[0]["message"]
    undersize = next(f for f in final.findings if f["criterion"] == "undersize")
    assert not undersize["ok"] and 'specified 3/8"' in undersize["message"]
    assert NCR.objects.filter(inspection=final).exists()
    full = sign_inspection(weld, {"min_size": L("3/8 in")}, "final", users["inspector"])
    assert full.accepted


def test_under_1_16_in_the_leg_is_not_increased(make, users):
    weld = make.make_weld(size=L("1/4 in"))
    sign_inspection(weld, {"fit_up_ok": True, "root_gap": L("1/32 in")}, "fit_up", users["inspector"])
    final = sign_inspection(weld, {"min_size": L("1/4 in")}, "final", users["inspector"])
    assert final.accepted and final.leg_increase is None
    assert [f["criterion"] for f in final.findings][0] != "root_opening"


def test_an_si_aws_job_reads_the_limits_in_mm(make, users):
    """D1.1M: 5 mm at most; from 2 mm the leg grows (not a conversion of 1/16 in)."""
    job = make.make_job(unit_system="SI")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("6 mm"), thickness1=L("10 mm"),
                          thickness2=L("12 mm"), length=L("300 mm"))
    refused = sign_inspection(weld, {"fit_up_ok": True, "root_gap": L("5.5 mm")}, "fit_up", users["inspector"])
    assert not refused.accepted
    sign_inspection(weld, {"fit_up_ok": True, "root_gap": L("2 mm")}, "fit_up", users["inspector"])
    final = sign_inspection(weld, {"min_size": L("6 mm")}, "final", users["inspector"])
    assert final.leg_increase == L("2 mm") and not final.accepted


def test_on_an_iso_job_the_root_gap_is_judged_by_item_617_and_the_leg_is_not_increased(make, users):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("7 mm"), thickness1=L("10 mm"),
                          thickness2=L("12 mm"), length=L("300 mm"))
    fitted = sign_inspection(weld, {"fit_up_ok": True, "root_gap": L("1 mm")}, "fit_up", users["inspector"])
    assert fitted.accepted and "617" in fitted.findings[0]["source"]
    final = sign_inspection(weld, {"throat": L("5 mm"), "throat_short_length": L("0 mm")}, "final",
                            users["inspector"])
    assert final.leg_increase is None
