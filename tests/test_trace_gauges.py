"""The gauge register: only a gauge in calibration can be chosen on an inspection (ISO 3834-2:2021 clause 12, from
memory; the due date is the last day of use, common practice, no source), every signed inspection names the
calibration its gauge was used under, and a gauge found out of tolerance lists every inspection made with it since
its last good calibration in a fixed number of queries."""

from datetime import timedelta

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.db import DatabaseError, connection, transaction
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked, Refused
from inspections import traveler
from inspections.models import GaugeCalibration
from inspections.services import trace
from tests.factory import png_bytes
from tests.test_inspect_views import sign

pytestmark = pytest.mark.django_db


def today():
    return timezone.localdate()


def test_a_gauge_due_today_signs_and_one_due_yesterday_does_not(make):
    due_today = make.make_gauge(due_on=today())
    inspection = make.make_inspection(gauge=due_today)
    assert inspection.gauge_calibration == due_today.calibrations.get()
    overdue = make.make_gauge(due_on=today() - timedelta(days=1))
    with pytest.raises(Refused, match="calibration was due on") as refused:
        make.make_inspection(gauge=overdue)
    assert refused.value.code == "gauge"


def test_the_form_offers_only_gauges_in_calibration_and_says_why_beside_the_field(make, client_as):
    good = make.make_gauge(number="FG-GOOD")
    bad = make.make_gauge(number="FG-LATE", due_on=today() - timedelta(days=1))
    unchecked = make.make_gauge(number="FG-NEW", result=None)
    weld = make.make_sound_weld()
    client = client_as("inspector")
    page = client.get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert "FG-GOOD" in page and "FG-LATE" not in page and "FG-NEW" not in page
    for gauge, words in ((bad, "calibration was due on"), (unchecked, "no calibration on record"),
                         (None, "Choose a gauge from the register")):
        response = client.post(reverse("inspections:inspect_weld", args=[weld.pk]), {
            "stage": "final", "min_size": "1/4", "gauge": str(gauge.pk) if gauge else "99999999"})
        assert response.status_code == 400
        assert words in str(response.context["form"].errors["gauge"])
    assert not weld.inspections.exists()
    response = sign(client, weld, {"stage": "final", "min_size": "1/4", "gauge": str(good.pk)})
    assert response.status_code == 302
    assert weld.inspections.get().gauge_calibration.gauge == good


def test_a_job_that_requires_a_gauge_refuses_a_final_visual_without_one(make, client_as):
    # The job's switch (Job.gauge_required): a contract's traceability clause, common practice, no source.
    job = make.make_job(gauge_required=True)
    weld = make.make_sound_weld(make.make_assembly(job))
    with pytest.raises(Refused, match="requires the gauge") as refused:
        make.make_inspection(weld)
    assert refused.value.code == "gauge"
    make.make_inspection(weld, stage="in_process")  # only the final visual asks
    client = client_as("inspector")
    response = client.post(reverse("inspections:inspect_weld", args=[weld.pk]), {"stage": "final", "min_size": "1/4"})
    assert response.status_code == 400
    assert "requires the gauge" in str(response.context["form"].errors["gauge"])
    assert not weld.inspections.filter(stage="final").exists()
    signed = sign(client, weld, {"stage": "final", "min_size": "1/4", "gauge": str(make.make_gauge().pk)})
    assert signed.status_code == 302


def test_the_gauge_field_does_not_say_optional_where_the_job_requires_it(make):
    from inspections.forms.inspect import InspectionForm

    required = InspectionForm(weld=make.make_sound_weld(make.make_assembly(make.make_job(gauge_required=True))))
    assert "Optional" not in required.fields["gauge"].help_text
    assert "requires" in required.fields["gauge"].help_text
    optional = InspectionForm(weld=make.make_sound_weld())
    assert "Optional" in optional.fields["gauge"].help_text
    assert InspectionForm.base_fields["gauge"].help_text == optional.fields["gauge"].help_text  # not changed for all


def test_found_out_of_tolerance_lists_what_was_measured_since_the_last_good_calibration(make, users):
    gauge = make.make_gauge(calibrated_on=today() - timedelta(days=10))
    cleared = make.make_inspection(gauge=gauge)  # under the first calibration, which the second one confirms
    second = make.calibrate(gauge, today() - timedelta(days=1), today() + timedelta(days=365))
    under_second = [make.make_inspection(gauge=gauge) for _ in range(2)]
    assert {i.gauge_calibration for i in under_second} == {second}
    failed = GaugeCalibration(gauge=gauge, calibrated_on=today(), due_on=today(), result="out_of_tolerance",
                              performed_by="QA bench")
    trace.record_calibration(failed, users["qa_lead"])
    good, suspects = trace.suspect_inspections(failed)
    assert good == second
    assert [i.pk for i in suspects] == [i.pk for i in under_second]
    assert cleared.pk not in [i.pk for i in suspects]
    with pytest.raises(Refused, match="found out of tolerance"):
        make.make_inspection(gauge=gauge)


def test_the_list_of_suspects_reads_in_fixed_queries(make, users, client_as):
    gauge = make.make_gauge()
    make.make_inspection(gauge=gauge)
    failed = trace.record_calibration(GaugeCalibration(gauge=gauge, calibrated_on=today(), due_on=today(),
                                                       result="out_of_tolerance", performed_by="QA bench"),
                                      users["qa_lead"])
    client = client_as("qa_lead")
    url = reverse("inspections:calibration_detail", args=[failed.pk])
    client.get(url)
    with CaptureQueriesContext(connection) as one:
        page = client.get(url).content.decode()
    assert "Inspections in doubt (1)" in page
    second = make.calibrate(make.make_gauge(), today() - timedelta(days=10), today() + timedelta(days=10))
    for _ in range(5):
        make.make_inspection(gauge=second.gauge)
    failed_two = trace.record_calibration(GaugeCalibration(gauge=second.gauge, calibrated_on=today(),
                                                           due_on=today(), result="out_of_tolerance",
                                                           performed_by="QA bench"), users["qa_lead"])
    with CaptureQueriesContext(connection) as five:
        page = client.get(reverse("inspections:calibration_detail", args=[failed_two.pk])).content.decode()
    assert "Inspections in doubt (5)" in page
    assert len(five) == len(one)


def test_recording_a_failure_on_the_page_leads_to_the_list(make, client_as):
    gauge = make.make_gauge()
    inspection = make.make_inspection(gauge=gauge)
    response = client_as("qa_lead").post(reverse("inspections:calibration_create", args=[gauge.pk]), {
        "calibrated_on": today().isoformat(), "due_on": today().isoformat(), "result": "out_of_tolerance",
        "performed_by": "QA bench, block R-2"})
    failed = gauge.calibrations.get(result="out_of_tolerance")
    assert response.status_code == 302 and response.url == failed.get_absolute_url()
    page = client_as("qa_lead").get(response.url).content.decode()
    assert inspection.get_absolute_url() in page


def test_a_certificate_is_stored_with_its_hash_and_served_only_signed_in(make, client_as, client):
    gauge = make.make_gauge(result=None)
    card = SimpleUploadedFile("cert.png", png_bytes(), content_type="image/png")
    response = client_as("qa_lead").post(reverse("inspections:calibration_create", args=[gauge.pk]), {
        "calibrated_on": today().isoformat(), "due_on": (today() + timedelta(days=365)).isoformat(),
        "result": "in_tolerance", "performed_by": "Ridgeway Metrology Lab", "document": card})
    assert response.status_code == 302
    record = gauge.calibrations.get()
    assert len(record.document_sha256) == 64
    url = reverse("inspections:calibration_document", args=[record.pk])
    assert client_as("inspector").get(url).status_code == 200
    assert client_as("viewer").get(url).status_code == 404
    client.logout()
    assert client.get(url).status_code == 302


def test_a_renamed_file_and_an_inverted_due_date_are_refused_beside_their_fields(make, client_as):
    gauge = make.make_gauge(result=None)
    fake = SimpleUploadedFile("cert.pdf", b"not a pdf at all", content_type="application/pdf")
    response = client_as("qa_lead").post(reverse("inspections:calibration_create", args=[gauge.pk]), {
        "calibrated_on": today().isoformat(), "due_on": today().isoformat(), "result": "in_tolerance",
        "performed_by": "Lab", "document": fake})
    assert response.status_code == 400
    errors = response.context["form"].errors
    assert "not a readable PDF" in str(errors["document"]) and "falls due after" in str(errors["due_on"])
    assert not gauge.calibrations.exists()


def test_calibrations_and_gauges_are_never_edited(make, users):
    gauge = make.make_gauge()
    record = gauge.calibrations.get()
    record.due_on = today() + timedelta(days=3650)
    with pytest.raises(RecordLocked):
        record.save()
    gauge.number = "FG-99"
    with pytest.raises(RecordLocked):
        gauge.save()
    with pytest.raises(DatabaseError), transaction.atomic(), connection.cursor() as cursor:
        cursor.execute("UPDATE inspections_gaugecalibration SET due_on = %s WHERE id = %s",
                       [today() + timedelta(days=3650), record.pk])
    trace.retire_gauge(gauge, users["qa_lead"], "Jaw bent")
    gauge.refresh_from_db()
    assert gauge.state == "retired"
    with pytest.raises(Refused, match="retired"):
        trace.record_calibration(GaugeCalibration(gauge=gauge, calibrated_on=today(), due_on=today(),
                                                  result="in_tolerance", performed_by="Lab"), users["qa_lead"])


def test_the_traveler_and_the_inspection_page_print_the_gauge(make, client_as):
    gauge = make.make_gauge(number="FG-07")
    weld = make.use_on_job()
    make.make_inspection(weld, gauge=gauge)
    final = traveler.gather(weld.assembly_id)["welds"][0]["final"]
    assert final["gauge"].startswith("FG-07 fillet weld gauge, calibrated ")
    inspection = weld.inspections.get()
    page = client_as("viewer").get(inspection.get_absolute_url()).content.decode()
    assert "FG-07 fillet weld gauge" in page and gauge.get_absolute_url() not in page


def test_the_list_warns_of_a_calibration_due_within_30_days_common_practice_no_source(make, client_as):
    soon = make.make_gauge(number="FG-SOON", due_on=today() + timedelta(days=29))
    later = make.make_gauge(number="FG-LATER", due_on=today() + timedelta(days=30))
    rows = {r["gauge"].pk: r for r in trace.gauge_rows(today())}
    assert rows[soon.pk]["soon"] and not rows[later.pk]["soon"]
    assert "due in 29 days" in client_as("inspector").get(reverse("inspections:gauge_list")).content.decode()
