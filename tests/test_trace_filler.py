"""Filler lots: recorded as received, named on the weld, and compared by the proof chain with the WPS's
classification (the WPS names its filler: AWS D1.1/D1.1M:2020 clause 5 and Table 6.5, ISO 15609-1:2019; from memory).
A lot of another classification blocks release, with the page where it is put right; the chain's queries stay
fixed."""

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.urls import reverse

from core.errors import RecordLocked
from inspections import traveler
from inspections.models import Assembly, FillerLot
from inspections.services import trace
from inspections.services.assemblies import release_blockers
from tests.factory import L

pytestmark = pytest.mark.django_db


def test_a_lot_of_the_wps_classification_holds_and_another_blocks(make, users):
    weld = make.make_sound_weld()  # the factory's WPS specifies E71T-1C
    trace.record_weld_filler(weld, make.make_filler_lot("e71t-1c"), users["inspector"])
    make.make_inspection(weld)
    assert release_blockers(weld.assembly) == []
    other = make.make_sound_weld(weld.assembly)
    trace.record_weld_filler(other, make.make_filler_lot("E71T-1M"), users["inspector"])  # the gas differs
    make.make_inspection(other)
    blockers = release_blockers(Assembly.objects.get(pk=weld.assembly_id))
    assert len(blockers) == 1 and "is E71T-1M" in blockers[0] and "specifies E71T-1C" in blockers[0]
    assert blockers[0].url == reverse("inspections:weld_filler", args=[other.pk])


def test_a_weld_without_a_lot_is_not_blocked_yet(make):
    weld = make.make_sound_weld()
    make.make_inspection(weld)
    assert release_blockers(weld.assembly) == []


def test_a_job_that_requires_lots_blocks_a_weld_without_one(make, users):
    # The job's switch (Job.filler_lot_required): a contract's traceability clause, common practice, no source.
    job = make.make_job(filler_lot_required=True)
    weld = make.make_sound_weld(make.make_assembly(job))
    make.make_inspection(weld)
    blocker, = release_blockers(weld.assembly)
    assert "no filler lot is recorded" in blocker and blocker.url == reverse("inspections:weld_filler", args=[weld.pk])
    job.filler_lot_required = False
    job.save()
    assert release_blockers(Assembly.objects.get(pk=weld.assembly_id)) == []


def test_a_lot_received_after_the_weld_date_is_refused_beside_the_field(make, users, client_as):
    # a lot is not welded with before the shop has it (common practice, no source); the same day is fine
    from datetime import timedelta

    from core.errors import Refused

    weld = make.make_sound_weld()
    late = make.make_filler_lot(received_on=weld.welded_on + timedelta(days=1))
    with pytest.raises(Refused, match="after the weld date"):
        trace.record_weld_filler(weld, late, users["inspector"])
    response = client_as("inspector").post(reverse("inspections:weld_filler", args=[weld.pk]), {"lot": late.pk})
    assert response.status_code == 400 and "after the weld date" in " ".join(response.context["form"].errors["lot"])
    same_day = make.make_filler_lot(received_on=weld.welded_on)
    assert trace.record_weld_filler(weld, same_day, users["inspector"]).filler_lot == same_day


def test_the_lot_freezes_with_the_weld_at_its_final_visual(make, users, client_as):
    weld = make.make_sound_weld()
    make.make_inspection(weld)
    with pytest.raises(RecordLocked):
        trace.record_weld_filler(weld, make.make_filler_lot(), users["inspector"])
    response = client_as("inspector").post(reverse("inspections:weld_filler", args=[weld.pk]),
                                           {"lot": make.make_filler_lot().pk})
    assert response.status_code == 409 and "Revise the weld" in response.content.decode()


def _counted(make, users, welds, lots=True):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    assembly = make.make_assembly()
    welder, lot = make.make_qualified_welder(), make.make_filler_lot()
    for i in range(welds):
        weld = make.make_sound_weld(assembly=assembly, mark=f"W{i:02d}", welders=[welder])
        if lots:
            trace.record_weld_filler(weld, lot if i else make.make_filler_lot(), users["inspector"])
        make.make_inspection(weld)
    assembly = Assembly.objects.get(pk=assembly.pk)
    with CaptureQueriesContext(connection) as counted:
        assert release_blockers(assembly) == []
    return len(counted)


def test_filler_lots_add_one_query_to_the_chain_whatever_the_number_of_welds(make, users):
    one, twenty = _counted(make, users, 1), _counted(make, users, 20)
    assert one == twenty == _counted(make, users, 20, lots=False) + 1


def test_the_register_page_records_a_lot_with_its_certificate(make, client_as):
    pdf = SimpleUploadedFile("cert.pdf", b"%PDF-1.4\n%%EOF\n", content_type="application/pdf")
    response = client_as("qa_lead").post(reverse("inspections:filler_lot_create"), {
        "classification": "er70s-6", "diameter": "0.035", "lot_number": "H-2291", "manufacturer": "Kessler Wire Co.",
        "received_on": "2026-10-01", "document": pdf})
    lot = FillerLot.objects.get(lot_number="H-2291")
    assert response.status_code == 302 and lot.classification == "ER70S-6" and lot.diameter == L("0.035 in")
    assert len(lot.document_sha256) == 64
    bad = client_as("qa_lead").post(reverse("inspections:filler_lot_create"), {
        "classification": "E99Q", "diameter": "0.035", "lot_number": " ", "manufacturer": "X",
        "received_on": "2026-10-01"})
    errors = bad.context["form"].errors
    assert bad.status_code == 400 and "classification" in errors and "lot_number" in errors


def test_the_traveler_prints_the_lot_and_flags_a_mismatch(make, users):
    weld = make.make_sound_weld()
    trace.record_weld_filler(weld, make.make_filler_lot("E71T-1M", lot_number="K-7"), users["inspector"])
    row = traveler.gather(weld.assembly_id)["welds"][0]
    assert row["filler"].startswith("E71T-1M ") and row["filler"].endswith(" lot K-7 (Kessler Wire Co.)")
    assert "specifies E71T-1C" in row["filler_problem"]


def test_a_lot_is_never_edited(make):
    lot = make.make_filler_lot()
    lot.lot_number = "X"
    with pytest.raises(RecordLocked):
        lot.save()


def test_the_weld_page_offers_the_newest_lots_of_the_wps_class_and_the_one_named(make, users, client_as):
    from datetime import timedelta

    from inspections.forms import trace as forms

    weld = make.make_sound_weld()  # the factory's WPS specifies E71T-1C
    old = make.make_filler_lot("E71T-1C", received_on=weld.welded_on - timedelta(days=400))
    trace.record_weld_filler(weld, old, users["inspector"])
    newer = [make.make_filler_lot("E71T-1C", received_on=weld.welded_on - timedelta(days=n))
             for n in range(forms.LOTS_OFFERED)]
    other = make.make_filler_lot("E70T-1C")
    response = client_as("inspector").get(reverse("inspections:weld_filler", args=[weld.pk]))
    offered = {pk for pk, _text in response.context["form"].fields["lot"].widget.choices if pk}
    assert offered == {lot.pk for lot in newer} | {old.pk} and other.pk not in offered
    # A lot not offered is still read back: recorded as it was, and the chain names the mismatch.
    client_as("inspector").post(reverse("inspections:weld_filler", args=[weld.pk]), {"lot": other.pk})
    assert Assembly.objects.get(pk=weld.assembly_id).welds.get(pk=weld.pk).filler_lot == other
