"""Quantity model and form fields: exact storage, units at the edges, clear field errors."""

from decimal import Decimal

import pytest

from core.fields import LengthFormField, TemperatureFormField
from core.units import Length, parse_length, parse_temperature
from tests.factory import L


def test_a_length_goes_in_and_comes_back_exactly(make):
    weld = make.make_weld(size=L("3/16 in"), length=L("1-1/2 in"))
    weld.refresh_from_db()
    assert isinstance(weld.size, Length)
    assert weld.size.mm == Decimal("4.7625") and weld.length.inch == Decimal("1.5")


def test_the_smallest_fraction_we_promise_is_stored_exactly(make):
    weld = make.make_weld(size=L("1/128 in"))
    weld.refresh_from_db()
    assert weld.size == parse_length("1/128 in")


def test_lengths_filter_and_order_in_the_database(make):
    assembly = make.make_assembly()
    make.make_weld(assembly=assembly, mark="W1", size=L("5/16 in"))
    make.make_weld(assembly=assembly, mark="W2", size=L("6 mm"))
    from inspections.models import Weld

    assert [w.mark for w in Weld.objects.filter(assembly=assembly).order_by("size")] == ["W2", "W1"]
    assert Weld.objects.filter(size__gt=L("1/4 in")).get().mark == "W1"


def test_temperatures_are_stored_in_celsius(make):
    wps = make.make_wps(preheat_min=parse_temperature("150 F"))
    wps.refresh_from_db()
    assert wps.preheat_min.f == Decimal("150")


@pytest.mark.parametrize("system, typed, mm", [("US", "3/16", "4.7625"), ("SI", "5", "5"), ("US", "5 mm", "5"),
                                               ("SI", '1/4"', "6.35")])
def test_the_form_field_reads_a_bare_number_in_the_jobs_system(system, typed, mm):
    assert LengthFormField(system=system).clean(typed).mm == Decimal(mm)


@pytest.mark.parametrize("typed", ["3//16", "-1 in", "1e400 mm", "\u2603", "0"])
def test_the_form_field_puts_the_engines_message_beside_the_field(typed):
    from django.core.exceptions import ValidationError

    with pytest.raises(ValidationError):
        LengthFormField(allow_zero=False).clean(typed)


def test_a_bare_temperature_is_read_in_the_records_system_as_a_bare_length_is():
    """Issue 15: a bare "50" preheat was refused on a US WPS while bare lengths were read in the job's units."""
    assert TemperatureFormField(system="US").clean("50") == parse_temperature("50 F")
    assert TemperatureFormField(system="SI").clean("10") == parse_temperature("10 C")
    assert TemperatureFormField(system="US").clean("10 C") == parse_temperature("10 C")  # a unit typed wins


def test_a_stored_length_shows_in_the_form_as_typed_text():
    field = LengthFormField(system="US")
    assert field.prepare_value(L("3/16 in")) == '3/16"'
    assert field.prepare_value(L("5 mm")) == "0.1968503937007874015748031496 in"
    assert field.clean(field.prepare_value(L("5 mm"))) == L("5 mm")
