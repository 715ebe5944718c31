"""The fillet weld calculator and the calculation sheets: roles, published figures through the page, bad input,
and the PDF read back with pypdf.

Published figure: AISC Steel Construction Manual 15th ed., Part 8: E70 fillet, phi Rn = 1.392 D kip/in and
Rn / Omega = 0.928 D kip/in, D in sixteenths of an inch (1/4 in: 5.568 and 3.712 kip per inch).
"""

import io

import pytest
from django.urls import reverse
from pypdf import PdfReader

from core.roles import CAUTIONS
from core.units import parse_force
from tests.conftest import ROLES
from tests.factory import L

pytestmark = pytest.mark.django_db

CALC = reverse("inspections:strength_calculator")
SHEET = reverse("inspections:strength_sheet")
SHEET_PDF = reverse("inspections:strength_sheet_pdf")
MANUAL = {"system": "US", "leg": "1/4", "length": "1", "fexx": "70", "angle": "0"}


def pdf_text(response) -> str:
    assert response["Content-Type"] == "application/pdf"
    return "\n".join(page.extract_text() for page in PdfReader(io.BytesIO(response.content)).pages)


def flat(text: str) -> str:
    return " ".join(text.split())


# --- who may look ------------------------------------------------------------------------------------------

@pytest.mark.parametrize("role", ROLES)
def test_every_role_may_use_the_calculator(client_as, role):
    response = client_as(role).get(CALC, MANUAL)
    assert response.status_code == 200
    assert "5.568 kip" in response.content.decode()


def test_anonymous_is_sent_to_sign_in(client_as, make):
    client = client_as(None)
    weld = make.make_weld()
    for url in (CALC, SHEET_PDF, reverse("inspections:weld_capacity", args=[weld.pk])):
        response = client.get(url, MANUAL)
        assert response.status_code == 302 and response.url.startswith(reverse("login"))


def test_missing_records_are_404(client_as):
    client = client_as("viewer")
    for name in ("weld_capacity", "weld_capacity_pdf", "inspection_capacity", "inspection_capacity_pdf"):
        assert client.get(reverse(f"inspections:{name}", args=[999999])).status_code == 404


def test_the_pages_answer_only_get(client_as, make):
    client = client_as("qa_lead")
    assert client.post(CALC, MANUAL).status_code == 405
    assert client.post(reverse("inspections:inspection_capacity", args=[make.make_inspection().pk])).status_code == 405


# --- published figures through the page -------------------------------------------------------------------

def test_manual_part_8_quarter_inch_e70_one_inch_long(client_as):
    # AISC Manual 15th ed. Part 8: phi Rn = 1.392 x 4 = 5.568 kip/in, Rn / Omega = 0.928 x 4 = 3.712 kip/in
    response = client_as("welding_engineer").get(CALC, MANUAL)
    page = response.content.decode()
    assert "5.568 kip" in page and "3.712 kip" in page
    assert "24.77 kN" in page  # the same in SI: 5.5676 kip x 4.448222 kN/kip
    assert "E = 0.707 w = 0.707 × 1/4 in" in page  # the step with its numbers, in trade notation
    assert "AISC 360-16 J2.2a" in page and "The engineer of record decides" in page


def test_ninety_degrees_is_one_and_a_half_times_through_the_page(client_as):
    # AISC 360-16 J2.4(a): 1.0 + 0.50 sin^1.5 90 = 1.5 -> 5.5676 kip x 1.5 = 8.351 kip (the Manual's 1.392 D
    # is rounded: 1.392 x 4 x 1.5 = 8.352)
    page = client_as("inspector").get(CALC, {**MANUAL, "angle": "90"}).content.decode()
    assert "8.351 kip" in page


def test_si_toggle_reads_bare_numbers_in_millimetres(client_as):
    page = client_as("viewer").get(CALC, {"system": "SI", "leg": "6", "length": "100", "fexx": "480",
                                          "angle": "0"}).content.decode()
    # 0.60 x 480 MPa x 0.707 x 6 mm x 100 mm = 122.2 kN nominal; phi Rn = 91.63 kN
    assert "122.2 kN" in page and "91.63 kN" in page
    assert "0.707 × 6 mm" in page


def test_plate_and_required_strength_say_what_governs(client_as):
    page = client_as("qa_lead").get(CALC, {**MANUAL, "length": "4", "plate_thickness": "1/8", "plate_width": "4",
                                           "material": "A36", "required": "15", "method": "LRFD"}).content.decode()
    # 1/8 in A36 plate along 4 in, AISC 360-16 J4.2: shear yielding 1.00 x 0.60 x 36 ksi x 0.5 in2 = 10.8 kip,
    # shear rupture 0.75 x 0.60 x 58 ksi x 0.5 in2 = 13.05 kip, both under the welds' 22.27 kip (J2.4)
    assert "Governs (LRFD):</strong> plate: shear yielding" in page
    assert "10.8 kip" in page and "13.05 kip" in page and "22.27 kip" in page
    assert "exceeds the available strength" in page  # 15 kip over 10.8 kip


def test_findings_show_the_size_rules(client_as):
    page = client_as("welding_engineer").get(CALC, {**MANUAL, "leg": "1/8", "length": "6", "thinner_part": "3/4",
                                                    "edge_thickness": "1/8", "intermittent": "on"}).content.decode()
    assert "is smaller than the minimum 1/4 in" in page  # AISC 360-16 Table J2.4: over 1/2 to 3/4 in -> 1/4 in
    assert "AISC 360-16 Table J2.4" in page


# --- bad input: a message beside the field, never a 500 --------------------------------------------------

@pytest.mark.parametrize("params, field, words", [
    ({"leg": "-1/4"}, "leg", "cannot be negative"),
    ({"leg": "0"}, "leg", "greater than zero"),
    ({"leg": ""}, "leg", "required"),
    ({"length": "0"}, "length", "greater than zero"),
    ({"length": "twelve"}, "length", "is not a length"),
    ({"angle": "200"}, "angle", "outside 0 to 90 degrees"),
    ({"angle": "-5"}, "angle", "outside 0 to 90 degrees"),
    ({"angle": "north"}, "angle", "is not a number"),
    ({"angle": "nan"}, "angle", "outside 0 to 90"),
    ({"fexx": "70 MPa"}, "fexx", "did you mean 70 ksi"),
    ({"fexx": "480 ksi"}, "fexx", "above 2000 MPa"),
    ({"fexx": "200 ksi"}, "fexx", "outside 60-120 ksi"),
    ({"fexx": "E70"}, "fexx", "not a stress"),
    ({"plate_width": "4"}, "plate_thickness", "thickness too"),
    ({"plate_thickness": "3/8"}, "material", "Fy and Fu"),
    ({"plate_thickness": "3/8", "material": "A36", "fy": "36"}, "fy", "not both"),
    ({"plate_thickness": "3/8", "fy": "250", "fu": "400"}, "fy", "did you mean 250 MPa"),
    ({"plate_thickness": "3/8", "fy": "58", "fu": "36"}, "fy", "less than Fu"),
    ({"plate_thickness": "3/8", "plate_width": "4", "material": "A36", "net_area": "9"}, "net_area", "larger"),
    ({"plate_thickness": "3/8", "material": "X99"}, "material", "valid choice"),
    ({"required": "0"}, "required", "greater than zero"),
    ({"required": "lots"}, "required", "not a force"),
    ({"leg": "1/4" * 30}, "leg", "too long"),
])
def test_bad_input_gets_a_message_beside_the_field(client_as, params, field, words):
    response = client_as("welding_engineer").get(CALC, {**MANUAL, **params})
    assert response.status_code == 200
    errors = response.context["form"].errors
    assert field in errors, errors
    assert words in " ".join(errors[field])
    assert response.context["snapshot"] is None


@pytest.mark.parametrize("params", [
    {"system": "XX", "leg": "1/4", "length": "1"},
    {"leg": "\x00", "length": "\u2603", "fexx": "\U0001f525", "angle": "1e400"},
    {"leg": "1/0", "length": "99999999999999 in", "fexx": "1e3 ksi", "method": "WSD"},
    {"leg": "1/4", "length": "1", "fexx": "70", "angle": "0", "leg2": "0", "required": "-5"},
])
def test_nasty_input_never_breaks_the_page(client_as, params):
    response = client_as("viewer").get(CALC, params)
    assert response.status_code == 200
    assert response.context["form"].errors


def test_the_sheet_sends_empty_input_to_the_calculator_and_refuses_bad_input(client_as):
    client = client_as("viewer")
    response = client.get(SHEET)
    assert response.status_code == 302 and response.url == CALC
    response = client.get(SHEET_PDF, {**MANUAL, "angle": "200"})
    assert response.status_code == 400 and "outside 0 to 90 degrees" in response.content.decode()


# --- calculation sheets ---------------------------------------------------------------------------------

def test_the_html_sheet_lists_inputs_and_every_step(client_as):
    page = client_as("viewer").get(SHEET, MANUAL).content.decode()
    assert "Calculation sheet: Fillet weld strength" in page
    assert "Effective throat (AISC 360-16 J2.2a)" in page and "Design strength, LRFD" in page
    assert "1/4&quot; (6.35 mm)" in page  # the input, in both systems
    assert "fillet-weld-calculation.pdf" not in page and "strength/sheet.pdf?" in page


def test_the_calculator_pdf_carries_the_steps_and_the_cautions(client_as):
    response = client_as("welding_engineer").get(SHEET_PDF, MANUAL)
    text = flat(pdf_text(response))
    assert "Calculation sheet: Fillet weld strength" in text
    assert "E = 0.707 w = 0.707 × 1/4 in" in text and "5.568 kip" in text and "3.712 kip" in text
    assert "The engineer of record decides" in text and "checks the arithmetic" in text
    assert flat(CAUTIONS)[:60] in text
    assert "Page 1 of" in text


def test_the_inspection_pdf_shows_the_as_inspected_capacity(client_as, make):
    weld = make.make_weld(size=L("5/16 in"), required_strength=parse_force("50 kip"))
    inspection = make.make_inspection(weld, min_size="1/4 in", undersize_length="2 in")
    response = client_as("qa_lead").get(reverse("inspections:inspection_capacity_pdf", args=[inspection.pk]))
    assert f"inspection-{inspection.pk}.pdf" in response["Content-Disposition"]
    text = flat(pdf_text(response))
    assert "As-inspected capacity of weld" in text and weld.mark in text
    assert "Awe = (0.1768 in × 2 in + 0.2209 in × 10 in)" in text  # AISC 360-16 J2.4, two segments
    assert "80.73 kip" in text  # phi Rn = 0.75 x 107.64 kip
    assert "Demand / capacity" in text and "0.619" in text
    assert "The engineer of record decides" in text and flat(CAUTIONS)[:60] in text


def test_the_inspection_sheet_offers_asd(client_as, make):
    weld = make.make_weld(required_strength=parse_force("30 kip"))
    inspection = make.make_inspection(weld, min_size="3/16 in", undersize_length="2 in")
    url = reverse("inspections:inspection_capacity", args=[inspection.pk])
    page = client_as("inspector").get(url, {"method": "ASD"}).content.decode()
    assert "Required strength read as <strong>ASD</strong>" in page
    assert "capacity.pdf?method=ASD" in page
    assert client_as("inspector").get(url, {"method": "<script>"}).status_code == 200


def test_the_weld_sheet_shows_the_design_capacity(client_as, make):
    weld = make.make_weld()
    page = client_as("viewer").get(reverse("inspections:weld_capacity", args=[weld.pk])).content.decode()
    assert f"Design capacity of weld {weld.mark}" in page and "66.81 kip" in page  # 1.392 x 4 x 12 in


def test_a_groove_weld_sheet_explains_instead_of_failing(client_as, make):
    weld = make.make_weld(joint_type="groove")
    response = client_as("viewer").get(reverse("inspections:weld_capacity_pdf", args=[weld.pk]))
    assert response.status_code == 200 and "fillet welds only" in flat(pdf_text(response))


def test_the_calculator_changes_nothing(client_as, make, django_assert_num_queries):
    client = client_as("welding_engineer")
    with django_assert_num_queries(2):  # session and user: no record is read or written
        client.get(CALC, {**MANUAL, "plate_thickness": "3/8", "material": "A36", "required": "5"})


# --- the capacity card on the weld, inspection and NCR pages ---------------------------------------------------

def test_the_weld_page_shows_the_design_and_as_inspected_capacity(client_as, make):
    weld = make.make_weld(size=L("5/16 in"), required_strength=parse_force("50 kip"))
    make.make_inspection(weld, min_size="1/4 in", undersize_length="2 in")
    page = client_as("viewer").get(reverse("inspections:weld_detail", args=[weld.pk])).content.decode()
    assert f"Design capacity of weld {weld.mark}" in page and f"As-inspected capacity of weld {weld.mark}" in page
    assert reverse("inspections:weld_capacity_pdf", args=[weld.pk]) in page


def test_the_inspection_page_shows_the_capacity_only_when_a_leg_is_under_size(client_as, make):
    weld = make.make_weld(size=L("5/16 in"))
    short = make.make_inspection(weld, min_size="1/4 in", undersize_length="2 in")
    page = client_as("inspector").get(short.get_absolute_url()).content.decode()
    assert "As-inspected capacity of weld" in page and "The engineer of record decides" in page
    full = make.make_inspection(make.make_weld(), min_size="1/4 in")
    assert "As-inspected capacity" not in client_as("inspector").get(full.get_absolute_url()).content.decode()


def test_the_ncr_page_shows_the_as_inspected_capacity(client_as, make):
    from inspections.models import NCR

    weld = make.make_weld(size=L("5/16 in"))
    inspection = make.make_inspection(weld, min_size="3/16 in", undersize_length="3 in")
    ncr = NCR.objects.get(inspection=inspection)  # a rejected final visual opens one
    page = client_as("qa_lead").get(ncr.get_absolute_url()).content.decode()
    assert "As-inspected capacity of weld" in page
    assert reverse("inspections:inspection_capacity", args=[inspection.pk]) in page
