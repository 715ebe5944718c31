"""Consumable control pages: the oven register, an oven with its paginated log, and the log's forms. Hostile input
answers beside the field and stores nothing; pages read a fixed number of queries whatever the size of the log.
Rules: AWS D1.1/D1.1M:2020 clause 7.3 (from memory), judged by inspections.consumables."""

from datetime import timedelta

import pytest
from django.urls import reverse
from django.utils import timezone

from inspections.models import ElectrodeIssue, ElectrodeOven, IssueState, OvenReading, Rebake

pytestmark = pytest.mark.django_db


def _local(moment):
    return timezone.localtime(moment).strftime("%Y-%m-%dT%H:%M")


def _rows():
    return (ElectrodeOven.objects.count(), OvenReading.objects.count(), ElectrodeIssue.objects.count(),
            Rebake.objects.count())


def test_the_qa_lead_adds_an_oven_and_an_inspector_logs_it(make, client_as):
    response = client_as("qa_lead").post(reverse("inspections:oven_create"), {
        "number": " ov-07 ", "kind": "holding", "system": "US", "location": "Bay 2 crib"})
    oven = ElectrodeOven.objects.get(number="OV-07")
    assert response.status_code == 302
    inspector = client_as("inspector")
    response = inspector.post(reverse("inspections:oven_reading_create", args=[oven.pk]), {
        "read_at": _local(timezone.now() - timedelta(hours=6)), "temperature": "248"})  # bare: the oven's degF
    assert response.status_code == 302
    page = inspector.get(reverse("inspections:oven_list")).content.decode()
    assert "248 °F, below the minimum" in page
    lot = make.make_filler_lot("E7018")
    welder = make.make_welder()
    response = inspector.post(reverse("inspections:oven_issue_create", args=[oven.pk]), {
        "lot": lot.pk, "welder": welder.pk, "quantity": "20", "unit": "electrodes",
        "taken_out_at": _local(timezone.now() - timedelta(hours=5))})
    issue = ElectrodeIssue.objects.get()
    assert response.status_code == 302 and issue.state == IssueState.OUT
    detail = inspector.get(oven.get_absolute_url()).content.decode()
    assert "still out" in detail and "past the limit of 4 h" in detail and "below the 250 °F" in detail
    response = inspector.post(reverse("inspections:oven_issue_close", args=[issue.pk]), {
        "outcome": "discarded", "back_at": _local(timezone.now())})
    assert response.status_code == 302 and ElectrodeIssue.objects.get().state == IssueState.DISCARDED
    again = inspector.post(reverse("inspections:oven_issue_close", args=[issue.pk]), {
        "outcome": "discarded", "back_at": _local(timezone.now())})
    assert again.status_code == 409


def test_a_rebake_twice_is_recorded_and_shown_against_clause_7_3_2_4(make, client_as):
    oven, lot = make.make_oven(), make.make_filler_lot("E7018")
    client = client_as("welding_engineer")
    for previous in ("", "first"):
        data = {"lot": lot.pk, "started_at": _local(timezone.now() - timedelta(hours=3)), "temperature": "650 F",
                "hours": "1.5", "quantity": "10", "unit": "lb"}
        if previous:
            data["previous"] = Rebake.objects.get().pk
        assert client.post(reverse("inspections:oven_rebake_create", args=[oven.pk]), data).status_code == 302
    assert sorted(Rebake.objects.values_list("number", flat=True)) == [1, 2]
    assert "no more than once" in client.get(oven.get_absolute_url()).content.decode()


@pytest.mark.parametrize("data", [
    {"read_at": "", "temperature": ""},
    {"read_at": "yesterday", "temperature": "300 F"},
    {"read_at": "2026-01-01T06:00", "temperature": "9" * 400},
    {"read_at": "2026-01-01T06:00", "temperature": "1e9 F"},
    {"read_at": "2026-01-01T06:00", "temperature": "5000 F"},
    {"read_at": "2999-01-01T06:00", "temperature": "300 F"},
    {"read_at": "2026-01-01T06:00", "temperature": "300 K"},
    {"read_at": ["a", "b"], "temperature": {"x": 1}},
])
def test_hostile_readings_answer_beside_the_field(make, client_as, data):
    oven = make.make_oven()
    before = _rows()
    response = client_as("inspector").post(reverse("inspections:oven_reading_create", args=[oven.pk]), data)
    assert response.status_code == 400 and response.context["form"].errors and _rows() == before


@pytest.mark.parametrize("field,value", [
    ("quantity", "0"), ("quantity", "99999999999999999999"), ("quantity", "-3"), ("quantity", "ten"),
    ("lot", "999999"), ("welder", "999999"), ("rebake", "999999"), ("unit", "barrels"),
    ("taken_out_at", "2026-13-45T99:99"), ("lot", "wire"),
])
def test_hostile_issues_answer_beside_the_field(make, client_as, field, value):
    oven, lot, welder = make.make_oven(), make.make_filler_lot("E7018"), make.make_welder()
    data = {"lot": lot.pk, "welder": welder.pk, "quantity": "5", "unit": "electrodes",
            "taken_out_at": _local(timezone.now() - timedelta(hours=1))}
    data[field] = make.make_filler_lot().pk if value == "wire" else value  # a wire lot is not an electrode
    before = _rows()
    response = client_as("inspector").post(reverse("inspections:oven_issue_create", args=[oven.pk]), data)
    assert response.status_code == 400 and field in response.context["form"].errors and _rows() == before


def test_a_rebake_batch_of_another_lot_and_a_return_before_out_are_refused(make, client_as):
    oven, lot, other = make.make_oven(), make.make_filler_lot("E7018"), make.make_filler_lot("E7018")
    batch = Rebake(oven=oven, lot=other, started_at=timezone.now() - timedelta(hours=5),
                   temperature=make_temperature("600 F"), hours=1, quantity=5)
    batch.save()
    client = client_as("inspector")
    response = client.post(reverse("inspections:oven_issue_create", args=[oven.pk]), {
        "lot": lot.pk, "welder": make.make_welder().pk, "quantity": "5", "unit": "electrodes",
        "taken_out_at": _local(timezone.now() - timedelta(hours=1)), "rebake": batch.pk})
    assert response.status_code == 400 and "rebake" in response.context["form"].errors
    issue = ElectrodeIssue(oven=oven, lot=lot, welder=make.make_welder(), quantity=3,
                           taken_out_at=timezone.now() - timedelta(hours=1))
    issue.save()
    response = client.post(reverse("inspections:oven_issue_close", args=[issue.pk]), {
        "outcome": "returned", "returned_to": oven.pk, "back_at": _local(timezone.now() - timedelta(hours=2))})
    assert response.status_code == 400 and "back_at" in response.context["form"].errors
    response = client.post(reverse("inspections:oven_issue_close", args=[issue.pk]), {
        "outcome": "returned", "back_at": _local(timezone.now())})
    assert response.status_code == 400 and "returned_to" in response.context["form"].errors
    assert ElectrodeIssue.objects.get(pk=issue.pk).state == IssueState.OUT


def test_a_retired_oven_takes_no_more_log_entries(make, client_as, users):
    from inspections.services.consumables import retire_oven

    oven = make.make_oven()
    retire_oven(oven, users["qa_lead"], "Door seal failed")
    before = _rows()
    response = client_as("inspector").post(reverse("inspections:oven_reading_create", args=[oven.pk]), {
        "read_at": _local(timezone.now()), "temperature": "300 F"})
    assert response.status_code == 400 and "retired" in response.content.decode() and _rows() == before


def make_temperature(text):
    from core.units import parse_temperature

    return parse_temperature(text)


def _fill(make, oven, n):
    now = timezone.now()
    lot, welder = make.make_filler_lot("E7018"), make.make_welder()
    for i in range(n):
        OvenReading(oven=oven, read_at=now - timedelta(hours=i + 1), temperature=make_temperature("300 F")).save()
        ElectrodeIssue(oven=oven, lot=lot, welder=welder, quantity=5, taken_out_at=now - timedelta(hours=i + 2),
                       state=IssueState.RETURNED, back_at=now - timedelta(hours=i + 1), returned_to=oven).save()
        Rebake(oven=oven, lot=lot, started_at=now - timedelta(hours=i + 3), temperature=make_temperature("600 F"),
               hours=1, quantity=5).save()


def test_the_oven_pages_read_a_fixed_number_of_queries(make, client_as, django_assert_num_queries):
    oven = make.make_oven()
    _fill(make, oven, 2)
    client = client_as("qa_lead")
    client.get(oven.get_absolute_url())
    # session, user; oven; issues count and page (each with its oven's last reading before it); readings count and
    # page; rebakes; SAW flux records of the lots in its log; history
    with django_assert_num_queries(10) as first:
        client.get(oven.get_absolute_url())
    with django_assert_num_queries(3):  # session, user, ovens with their last reading and issues out
        client.get(reverse("inspections:oven_list"))
    _fill(make, oven, 60)
    make.make_oven()
    with django_assert_num_queries(len(first.captured_queries)):
        page = client.get(oven.get_absolute_url() + "?page=2&readings=2")
    assert page.status_code == 200 and "Readings page 2 of 2" in page.content.decode()
    with django_assert_num_queries(3):
        client.get(reverse("inspections:oven_list"))


def test_a_viewer_never_opens_the_register(make, client_as):
    oven = make.make_oven()
    viewer = client_as("viewer")
    assert viewer.get(reverse("inspections:oven_list")).status_code == 403
    assert viewer.get(oven.get_absolute_url()).status_code == 404


def test_a_flux_ovens_readings_are_kept_not_judged_against_the_electrode_minimum(make, client_as):
    make.make_oven(reading="200 F")
    flux = ElectrodeOven(number="FX-01", kind="flux")
    flux.save()
    OvenReading(oven=flux, read_at=timezone.now() - timedelta(hours=1), temperature=make_temperature("200 F")).save()
    page = client_as("inspector").get(reverse("inspections:oven_list")).content.decode()
    assert "flux oven: not judged" in page and "200 °F, below the minimum" in page  # OV-.. is judged, FX-01 not
