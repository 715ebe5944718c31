"""SAW flux in an oven's log: a package opened (intact or damaged), a drying, flux found wet or contaminated and
discarded; the lot's standing on the oven page and the QA lead's morning page. Rules: AWS D1.1/D1.1M:2020 clause
7.3.3.2 (from memory), judged by inspections.consumables.flux_at. Hostile input answers beside the field and stores
nothing; the rows are frozen once stored."""

from datetime import timedelta

import pytest
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked, Refused
from inspections.models import FluxRecord
from inspections.services import consumables as steps

pytestmark = pytest.mark.django_db


def _local(moment):
    return timezone.localtime(moment).strftime("%Y-%m-%dT%H:%M")


def _post(client, oven, **data):
    return client.post(reverse("inspections:oven_flux_create", args=[oven.pk]), data)


def test_damaged_package_is_not_usable_until_dried_500_f_1_h_clause_7_3_3_2_from_memory(make, client_as):
    oven, lot = make.make_oven(), make.make_filler_lot("F7A2-EM12K", specification="AWS A5.17")
    client = client_as("inspector")
    opened = _post(client, oven, lot=lot.pk, event="opened_damaged", at=_local(timezone.now() - timedelta(hours=3)))
    assert opened.status_code == 302
    page = client.get(oven.get_absolute_url()).content.decode()
    assert "not usable: flux from a damaged package is discarded" in page
    from inspections.services.today import _consumables

    assert any(f"Flux lot {lot.lot_number} not usable" in item.text for item in _consumables().items)
    dried = _post(client, oven, lot=lot.pk, event="dried", at=_local(timezone.now() - timedelta(hours=1)),
                  temperature="500 F", hours="1")
    assert dried.status_code == 302
    assert "usable</span>" in client.get(oven.get_absolute_url()).content.decode()
    assert not steps.flux_unusable()


def test_flux_found_wet_is_discarded_and_leaves_the_morning_page(make, client_as):
    oven, lot = make.make_oven(), make.make_filler_lot("F7A2-EM12K")
    client = client_as("welding_engineer")
    _post(client, oven, lot=lot.pk, event="opened_intact", at=_local(timezone.now() - timedelta(hours=3)))
    _post(client, oven, lot=lot.pk, event="wet", at=_local(timezone.now() - timedelta(hours=1)), note="roof leak")
    page = client.get(oven.get_absolute_url()).content.decode()
    assert "flux that has been wet is not used" in page
    assert not steps.flux_unusable()  # discarded: nothing left in a hopper


@pytest.mark.parametrize("data", [
    {"event": "dried", "temperature": "", "hours": ""},
    {"event": "dried", "temperature": "9" * 400, "hours": "1"},
    {"event": "dried", "temperature": "550 F", "hours": "1e9"},
    {"event": "dried", "temperature": "550 K", "hours": "1"},
    {"event": "spilled"},
    {"lot": "999999"},
    {"lot": "electrode"},
    {"at": "2999-01-01T06:00"},
    {"at": ["a", "b"]},
])
def test_hostile_flux_records_answer_beside_the_field(make, client_as, data):
    oven, lot = make.make_oven(), make.make_filler_lot("F7A2-EM12K")
    base = {"lot": lot.pk, "event": "opened_intact", "at": _local(timezone.now() - timedelta(hours=1))}
    base.update(data)
    if base["lot"] == "electrode":
        base["lot"] = make.make_filler_lot("E7018").pk  # an electrode lot is not flux
    response = _post(client_as("inspector"), oven, **base)
    assert response.status_code == 400 and response.context["form"].errors and not FluxRecord.objects.exists()


def test_the_step_refuses_a_drying_without_figures_and_a_retired_oven(make, users):
    oven, lot = make.make_oven(), make.make_filler_lot("F7A2-EM12K")
    with pytest.raises(Refused):
        steps.record_flux(FluxRecord(oven=oven, lot=lot, event="dried", at=timezone.now()), users["inspector"])
    steps.retire_oven(oven, users["qa_lead"], "Door seal failed")
    with pytest.raises(Refused):
        steps.record_flux(FluxRecord(oven=oven, lot=lot, event="opened_intact", at=timezone.now()),
                          users["inspector"])
    assert not FluxRecord.objects.exists()


def test_a_flux_record_is_frozen_once_stored(make, users):
    oven, lot = make.make_oven(), make.make_filler_lot("F7A2-EM12K")
    record = steps.record_flux(FluxRecord(oven=oven, lot=lot, event="opened_intact",
                                          at=timezone.now() - timedelta(hours=1)), users["inspector"])
    record.event = "opened_damaged"
    with pytest.raises(RecordLocked):
        record.save()
    assert FluxRecord.objects.get().event == "opened_intact"


def test_a_viewer_never_sees_the_flux_form(make, client_as):
    oven = make.make_oven()
    assert client_as("viewer").get(reverse("inspections:oven_flux_create", args=[oven.pk])).status_code in (403, 404)
