"""Welder forms: lengths read in the record's units, the engine's messages beside the field, nasty input refused.

Values come from procedures.qualification (AWS D1.1/D1.1M:2020 Table 6.11; the SI column and the ISO 9606-1
ranges are from memory there); these tests check the form hands the engine what was typed.
"""

from datetime import timedelta

import pytest
from django.utils import timezone

from procedures.forms.welders import ContinuityForm, QualificationForm, WeldCheckForm
from procedures.models import Qualification
from tests.factory import L

TODAY = timezone.localdate()


def form_data(**overrides):
    data = {"code": "AWS D1.1:2020", "process": "FCAW", "joint": "groove", "test_position": "3G+4G",
            "unit_system": "US", "test_thickness": "1", "electrode": "E71T-1C", "wps": "",
            "test_date": (TODAY - timedelta(days=1)).isoformat(), "result": "pass", "examiner": "R. Okafor, CWI",
            "iso_revalidation": ""}
    data.update(overrides)
    return data


@pytest.mark.django_db
@pytest.mark.parametrize("system, typed, stored, record_system", [
    ("US", "3/8", L("3/8 in"), "US"),
    ("US", '1-1/2"', L("1.5 in"), "US"),
    ("US", "10 mm", L("10 mm"), "SI"),
    ("SI", "10", L("10 mm"), "SI"),
    ("SI", "3/8 in", L("3/8 in"), "US"),
])
def test_a_bare_number_is_read_in_the_units_chosen_and_a_written_unit_sets_them(system, typed, stored,
                                                                                record_system):
    form = QualificationForm(data=form_data(unit_system=system, test_thickness=typed))
    assert form.is_valid(), form.errors
    assert form.cleaned_data["test_thickness"] == stored
    assert form.cleaned_data["unit_system"] == record_system


@pytest.mark.django_db
def test_an_iso_record_speaks_iso_positions_and_keeps_its_revalidation_route():
    form = QualificationForm(data=form_data(code="ISO 9606-1:2012", test_position="pf", unit_system="SI",
                                            test_thickness="12", process="135", iso_revalidation="b"))
    # '135' is not a choice of the record's process field: the record keeps AWS process names.
    assert "process" in form.errors
    form = QualificationForm(data=form_data(code="ISO 9606-1:2012", test_position="pf", unit_system="SI",
                                            test_thickness="12", process="GMAW", electrode="ER70S-6",
                                            iso_revalidation="b"))
    assert form.is_valid(), form.errors
    assert (form.cleaned_data["test_position"], form.cleaned_data["iso_revalidation"]) == ("PF", "b")


@pytest.mark.django_db
def test_an_aws_record_drops_an_iso_revalidation_route():
    form = QualificationForm(data=form_data(iso_revalidation="a"))
    assert form.is_valid(), form.errors
    assert form.cleaned_data["iso_revalidation"] == ""


@pytest.mark.django_db
def test_an_aws_groove_test_under_3_8_in_is_refused_with_the_engines_message():
    form = QualificationForm(data=form_data(test_thickness="5/16"))
    assert "Table 6.11" in " ".join(form.errors["test_thickness"])


NASTY = ["", " ", "\x00", "<script>alert(1)</script>", "' OR 1=1 --", "9" * 500, "１／２", "½", "NaN", "inf",
         "-0", "1e-400", "3/0", "\u202e3/8", "🙂"]


@pytest.mark.django_db
@pytest.mark.parametrize("field", ["code", "process", "joint", "test_position", "unit_system", "test_thickness",
                                   "electrode", "wps", "test_date", "result", "examiner", "iso_revalidation"])
@pytest.mark.parametrize("value", NASTY)
def test_nasty_input_in_any_field_is_an_error_or_harmless_never_a_crash(field, value):
    form = QualificationForm(data=form_data(**{field: value}))
    form.is_valid()  # must not raise
    assert Qualification.objects.count() == 0


@pytest.mark.parametrize("value", NASTY)
def test_nasty_input_in_the_weld_check_never_crashes(value):
    for field in ("code", "process", "joint", "position", "thickness", "electrode", "on"):
        data = {"code": "AWS D1.1:2020", "process": "FCAW", "joint": "fillet", "position": "F", "thickness": "1/2"}
        data[field] = value
        WeldCheckForm(data).is_valid()


def test_continuity_cannot_be_logged_for_tomorrow():
    form = ContinuityForm({"process": "FCAW", "date": (TODAY + timedelta(days=1)).isoformat(), "note": "x"})
    assert "after today" in " ".join(form.errors["date"])
