"""PQR pages: the engineer records a coupon; everyone reads it; heat input is computed, never typed."""

from decimal import Decimal

import pytest
from django.urls import reverse

from procedures.models.wps import PQR

VALID = {
    "number": "PQR-77", "code": "AWS D1.1:2020", "unit_system": "US", "test_date": "2025-10-14",
    "process": "FCAW", "electrode": "E71T-1C", "electrode_diameter": "0.045", "current": "DCEP",
    "amperage": "200", "voltage": "25", "travel_speed": "10", "position": "3f", "base_metal": "ASTM A572 Gr 50",
    "thickness": "1", "shielding_gas": "100% CO2", "preheat": "50 F", "visual": "pass", "macroetch": "pass",
    "bends": "not_tested", "tensiles": "not_tested", "fillet_break": "pass", "laboratory": "", "notes": "",
}


def test_the_engineer_records_a_pqr_and_its_heat_input_is_computed(client_as):
    response = client_as("welding_engineer").post(reverse("procedures:pqr_create"), VALID)
    pqr = PQR.objects.get(number="PQR-77")
    assert response.url == pqr.get_absolute_url()
    # HI = 60 V A / (1000 S) = 60 * 25 * 200 / (1000 * 10 in/min) = 30 kJ/in (common practice).
    assert pqr.heat_input.kj_per_in == Decimal("30")
    assert pqr.heat_input_kj_per_mm.quantize(Decimal("0.0001")) == Decimal("1.1811")
    assert pqr.position == "3F" and pqr.passed


def test_a_posted_heat_input_is_ignored(client_as):
    client_as("welding_engineer").post(reverse("procedures:pqr_create"), {**VALID, "heat_input_kj_per_mm": "9"})
    assert PQR.objects.get().heat_input.kj_per_in == Decimal("30")


@pytest.mark.parametrize("field, value, message", [
    ("preheat", "50 K", "not a temperature unit"),
    ("electrode", "E99Q", "E99Q"),
    ("travel_speed", "-10", "negative"),
    ("amperage", "5000", "2000 A"),
    ("voltage", "0", "zero"),
    ("thickness", "1/0", "0 below the line"),
    ("test_date", "yesterday", "valid date"),
])
def test_bad_input_is_refused_beside_its_field_and_saves_nothing(client_as, field, value, message):
    response = client_as("welding_engineer").post(reverse("procedures:pqr_create"), {**VALID, field: value})
    assert response.status_code == 200
    assert message.lower() in " ".join(response.context["form"].errors[field]).lower()
    assert not PQR.objects.exists()


def test_only_the_engineer_records_a_pqr(client_as):
    for role in ("inspector", "qa_lead", "viewer"):
        assert client_as(role).post(reverse("procedures:pqr_create"), VALID).status_code == 403
    assert not PQR.objects.exists()


def test_the_detail_shows_results_heat_input_and_the_procedures_it_supports(client_as, make):
    pqr = make.make_pqr(number="PQR-78")
    wps = make.make_wps(basis="test")
    wps.pqrs.add(pqr)
    html = client_as("inspector").get(pqr.get_absolute_url()).content.decode()
    assert "30 kJ/in" in html and "Macroetch" in html and wps.number in html


def test_the_list_searches_and_runs_a_fixed_number_of_queries(client_as, make, django_assert_num_queries):
    for n in range(12):
        make.make_pqr(number=f"PQR-L{n}")
    client = client_as("inspector")
    with django_assert_num_queries(4):  # session, user, count, page
        response = client.get(reverse("procedures:pqr_list"), {"q": "PQR-L1"})
    assert [p.number for p in response.context["page"]] == ["PQR-L1", "PQR-L10", "PQR-L11"]


def test_a_missing_pqr_is_404(client_as):
    assert client_as("viewer").get(reverse("procedures:pqr_detail", args=[31337])).status_code == 404
