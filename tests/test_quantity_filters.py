"""Stored quantities print in the job's system on pages (legwork/templatetags/quantities.py)."""

from django.template import Context, Template
from django.urls import reverse

from core.units import parse_force, parse_temperature
from tests.factory import L


def render(text, **context):
    return Template("{% load quantities %}" + text).render(Context(context))


def test_filters_print_in_the_named_system():
    assert render("{{ v|length:'US' }}", v=L("3/16 in")) == "3/16&quot;"
    assert render("{{ v|length:'SI' }}", v=L("6 mm")) == "6 mm"
    assert render("{{ v|force:'US' }}", v=parse_force("18 kip")) == "18 kip"
    assert render("{{ v|temperature:'SI' }}", v=parse_temperature("50 F")) == "10 °C"
    assert render("{{ v|length }}", v=None) == "—"


def test_the_weld_page_shows_the_required_strength_as_a_person_reads_it(client_as, make):
    weld = make.make_weld(required_strength=parse_force("18 kip"))
    response = client_as("viewer").get(reverse("inspections:weld_detail", args=[weld.pk]))
    assert response.status_code == 200
    assert "18 kip" in response.content.decode() and "Force(" not in response.content.decode()
