"""Every parser turns any string into a value or a message: the quantity form and model fields, record ids, and
the weld-map CSV, each fed the whole hostile list (tests/hostile.py) and generated text. The forms these parsers
serve are walked over HTTP by tests/test_hostile_forms.py."""

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError
from hypothesis import given
from hypothesis import strategies as st

from core import fields
from core.inputs import MAX_ID, parse_id, parse_ids
from tests.hostile import HOSTILE, HUGE_DIGITS

FORM_FIELDS = [fields.LengthFormField, fields.TemperatureFormField, fields.ForceFormField, fields.SpeedFormField,
               fields.FlowFormField]
MODEL_FIELDS = [fields.LengthField, fields.TemperatureField, fields.ForceField, fields.SpeedField, fields.FlowField]
TEXT = st.one_of(st.sampled_from(HOSTILE), st.text(max_size=60),
                 st.from_regex(r"\A[0-9]{15,40}(\.[0-9]{0,20})?( ?(in|mm|kip|kN|F|C|in/min|cfh))?\Z"))


def _read(field, value):
    """The field's answer: a value, or the message a person sees; anything else is the failure this file hunts."""
    try:
        return field.clean(value)
    except ValidationError as exc:
        assert exc.messages and all(message.strip() for message in exc.messages)
        return None


@pytest.mark.parametrize("field_class", FORM_FIELDS)
@pytest.mark.parametrize("system", ["US", "SI"])
def test_each_quantity_form_field_reads_every_hostile_value(field_class, system):
    field = field_class(system=system, required=False)
    for value in HOSTILE:
        _read(field, value)


@pytest.mark.parametrize("field_class", FORM_FIELDS)
@given(text=TEXT)
def test_each_quantity_form_field_reads_any_text(field_class, text):
    for system in ("US", "SI"):
        _read(field_class(system=system, required=False), text)


@pytest.mark.parametrize("field_class", FORM_FIELDS)
def test_a_number_of_22_digits_is_a_message_not_a_crash(field_class):
    field = field_class(system="US")
    for text in (HUGE_DIGITS, f"{HUGE_DIGITS} in", f"{HUGE_DIGITS} kip", f"{HUGE_DIGITS} F", f"{HUGE_DIGITS} in/min",
                 f"{HUGE_DIGITS} cfh", "1" + "0" * 30):
        with pytest.raises(ValidationError):
            field.clean(text)


@pytest.mark.parametrize("field_class, text", [
    (fields.LengthFormField, "101 m"), (fields.SpeedFormField, "101 m/min"), (fields.FlowFormField, "1001 L/min"),
    (fields.ForceFormField, "1000001 kN"),
])
def test_a_value_past_the_ceiling_says_what_the_ceiling_is(field_class, text):
    with pytest.raises(ValidationError) as refused:
        field_class(system="SI").clean(text)
    assert "check the number and the unit" in refused.value.messages[0]


@pytest.mark.parametrize("field_class, text", [
    (fields.LengthFormField, "99 m"), (fields.SpeedFormField, "99 m/min"), (fields.FlowFormField, "999 L/min"),
])
def test_a_value_under_the_ceiling_is_read(field_class, text):
    assert field_class(system="SI").clean(text) is not None


@pytest.mark.parametrize("field_class", MODEL_FIELDS)
def test_each_quantity_model_field_reads_every_hostile_value(field_class):
    field = field_class("x", null=True, blank=True)
    field.set_attributes_from_name("x")
    for value in [*HOSTILE, Decimal("NaN"), Decimal("Infinity"), Decimal("1E+40"), float("nan"), 1e300]:
        try:
            field.clean(value, None)
        except ValidationError as exc:
            assert exc.messages


@pytest.mark.parametrize("field_class", MODEL_FIELDS)
def test_a_model_field_refuses_nan_and_infinity(field_class):
    field = field_class("x")
    field.set_attributes_from_name("x")
    for value in ("NaN", "Infinity", Decimal("NaN"), Decimal("-Infinity")):
        with pytest.raises(ValidationError):
            field.to_python(value)


def test_ids_are_ascii_digits_within_a_64_bit_key():
    assert parse_id("42") == 42 and parse_id(" 42 ") == 42 and parse_id(7) == 7
    assert parse_id(str(MAX_ID)) == MAX_ID and parse_id(str(MAX_ID + 1)) is None
    for text in ["²", "¹²", "٣", "１２", "0", "-1", "+1", "1.0", "1e3", "", None, True, "9" * 40, "4\x00"]:
        assert parse_id(text) is None, text
    assert parse_ids(["1", "2"], limit=10) == [1, 2] and parse_ids(["1", "²"], limit=10) is None
    assert parse_ids([str(n) for n in range(1, 100)], limit=3) == [1, 2, 3]


@given(st.one_of(st.sampled_from(HOSTILE), st.text(max_size=30), st.integers()))
def test_an_id_is_an_int_in_range_or_none(value):
    found = parse_id(value)
    assert found is None or (isinstance(found, int) and 1 <= found <= MAX_ID)


def test_a_huge_id_in_a_multiple_choice_is_not_one_of_the_choices(make):
    """SQLite overflows on a 20-digit int in `pk__in`; core.lookups leaves such ids out of the query."""
    from django import forms

    from procedures.models import PQR

    pqr = make.make_pqr()
    field = forms.ModelMultipleChoiceField(PQR.objects.all())
    for huge in ("99999999999999999999", str(2**63), str(2**64)):
        with pytest.raises(ValidationError):
            field.clean([huge])
    assert list(field.clean([str(pqr.pk)])) == [pqr]
    assert list(PQR.objects.filter(pk__in=[pqr.pk, 10**30])) == [pqr]


def test_a_weld_map_row_of_hostile_cells_is_a_row_error_never_a_crash(weldmap_job):
    import csv
    import io

    from inspections.services.weldmap_csv import COLUMNS, read_weld_map

    @given(cells=st.lists(st.one_of(st.sampled_from(HOSTILE), st.text(max_size=40)), min_size=12, max_size=12))
    def read(cells):
        out = io.StringIO()
        writer = csv.writer(out)
        writer.writerow(COLUMNS)
        writer.writerow(["B1", *cells[1:]])
        preview = read_weld_map(out.getvalue().encode("utf-8", "surrogatepass"), weldmap_job)
        assert preview.file_errors or preview.rows

    read()


@pytest.fixture
def weldmap_job(make):
    job = make.make_job()
    make.make_assembly(job=job, piece_mark="B1")
    return job


@pytest.mark.parametrize("column", ["size", "size2", "length", "thickness1", "thickness2", "count"])
@pytest.mark.parametrize("value", [HUGE_DIGITS, f"{HUGE_DIGITS} in", "NaN", "Infinity", "1/0", "1e400", "٣/٠"])
def test_each_number_column_of_the_weld_map_refuses_hostile_numbers_on_its_row(column, value, weldmap_job):
    from inspections.services.weldmap_csv import read_weld_map

    row = {"piece_mark": "B1", "weld_mark": "W1", "size": "1/4", "length": "12", "thickness1": "3/8",
           "thickness2": "1/2", "count": "1"}
    row[column] = value
    text = ",".join(row) + "\n" + ",".join(row.values()) + "\n"
    preview = read_weld_map(text.encode(), weldmap_job)
    assert not preview.ok and preview.rows[0].errors and preview.rows[0].errors[0].startswith(column)
