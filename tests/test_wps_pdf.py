"""The printed WPS: rendered for real by WeasyPrint, read back with pypdf, one page."""

import io

import pytest
from django.urls import reverse
from pypdf import PdfReader

from procedures.models.wps import WPSState
from procedures.services import wps as wps_steps
from tests.factory import L

pytestmark = pytest.mark.pdf


def _pdf(client, wps):
    response = client.get(reverse("procedures:wps_pdf", args=[wps.pk]))
    assert response.status_code == 200 and response["Content-Type"] == "application/pdf"
    reader = PdfReader(io.BytesIO(response.content))
    return reader, " ".join(" ".join((page.extract_text() or "").split()) for page in reader.pages)


def test_a_draft_prints_on_one_page_marked_not_approved(client_as, make):
    wps = make.make_wps(number="BSW-801", process="SMAW", electrode="E7018", electrode_diameter=L("1/8 in"),
                        current="DCEN", shielding_gas="")
    reader, text = _pdf(client_as("inspector"), wps)
    assert len(reader.pages) == 1
    assert "WPS BSW-801" in text
    assert "NOT APPROVED — DRAFT" in text
    assert "E7018" in text and "AWS A5.1" in text  # decoded electrode
    assert "not DCEN" in text  # the error finding
    assert "ANSI Z49.1" in text and "engineer of record" in text  # safety note and cautions
    assert "Page 1 of 1" in text


def test_an_approved_wps_prints_its_approver_variables_and_pqrs(client_as, make, users):
    wps = make.make_tested_wps(number="BSW-802", pqr=make.make_pqr(number="PQR-9001"),
                               thickness_max=L("1-1/2 in"))
    wps_steps.submit(wps, users["welding_engineer"])
    wps_steps.approve(wps, users["qa_lead"])
    reader, text = _pdf(client_as("qa_lead"), wps)
    assert len(reader.pages) == 1
    assert "NOT APPROVED" not in text
    assert f"Approved by {users['qa_lead']}" in text
    assert "PQR-9001" in text and "30.0 kJ/in" in text
    assert '1/4" to 1-1/2"' in text  # thickness, in the WPS's system
    assert "E71T-1C" in text and "Qualified by test" in text


def test_a_superseded_wps_prints_do_not_use(client_as, make, users):
    old = make.make_wps(state=WPSState.APPROVED)
    new = wps_steps.new_revision(old, users["welding_engineer"])
    wps_steps.submit(new, users["welding_engineer"])
    wps_steps.approve(new, users["qa_lead"])
    _, text = _pdf(client_as("inspector"), old)
    assert "SUPERSEDED by revision 1" in text


def test_a_missing_wps_has_no_pdf(client_as):
    assert client_as("viewer").get(reverse("procedures:wps_pdf", args=[424242])).status_code == 404
