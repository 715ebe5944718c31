"""Inspector credentials: recorded as the card prints them, never edited, withdrawn with a reason; a final visual is
signed only under a credential current that day (AWS D1.1/D1.1M:2020 clause 8.1.4, ISO 3834-2:2021 clause 7.4,
both from memory; the currency rule's own sources are in inspections.credentials), and the traveler prints the
credential beside the inspector's name."""

from datetime import timedelta

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.db import DatabaseError, connection, transaction
from django.urls import reverse
from django.utils import timezone

from core import history
from core.errors import RecordLocked, Refused
from core.seals import compare
from inspections import traveler
from inspections.models import Inspection, InspectorCredential
from inspections.services import trace
from tests.factory import png_bytes

pytestmark = pytest.mark.django_db


def today():
    return timezone.localdate()


def uncertified(make):
    return make.make_user("inspector", credential=False)


# --- signing ---------------------------------------------------------------------------------------------------

def test_a_final_visual_needs_a_current_credential(make):
    inspector = uncertified(make)
    weld = make.make_weld()
    with pytest.raises(Refused, match="no inspector certification is on file") as refused:
        make.make_inspection(weld, user=inspector)
    assert refused.value.code == "credential"
    assert "AWS D1.1/D1.1M:2020 clause 8.1.4" in str(refused.value)
    assert not Inspection.objects.filter(weld=weld).exists()


def test_credential_expiring_today_signs_and_one_expired_yesterday_does_not(make):
    inspector = uncertified(make)
    make.make_credential(inspector, expires_on=today())  # the last valid day printed on the card
    inspection = make.make_inspection(user=inspector)
    assert inspection.credential.expires_on == today()
    late = uncertified(make)
    make.make_credential(late, expires_on=today() - timedelta(days=1))
    with pytest.raises(Refused, match="expired on"):
        make.make_inspection(user=late)


def test_cwi_eye_examination_three_years_old_today_refuses_aws_qc1_from_memory(make):
    inspector = uncertified(make)
    exam = today().replace(year=today().year - 3) if (today().month, today().day) != (2, 29) else today()
    make.make_credential(inspector, issued_on=exam, eye_exam_on=exam)
    with pytest.raises(Refused, match="eye examination"):
        make.make_inspection(user=inspector)
    fresh = uncertified(make)
    make.make_credential(fresh, issued_on=exam, eye_exam_on=exam + timedelta(days=1))
    assert make.make_inspection(user=fresh).credential is not None


def test_fit_up_signs_without_a_credential_and_records_none(make):
    inspection = make.make_inspection(stage="fit_up", accepted=True, user=uncertified(make))
    assert inspection.credential is None


def test_a_withdrawn_credential_does_not_sign(make, users):
    inspector = uncertified(make)
    credential = make.make_credential(inspector)
    trace.withdraw_credential(credential, users["qa_lead"], "Number typed wrong")
    with pytest.raises(Refused, match="no inspector certification"):
        make.make_inspection(user=inspector)


def test_the_tablet_says_so_before_signing(make, client):
    inspector = uncertified(make)
    weld = make.make_sound_weld()
    client.force_login(inspector)
    page = client.get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert 'id="lw-no-credential"' in page and "no inspector certification is on file" in page
    response = client.post(reverse("inspections:inspect_weld", args=[weld.pk]),
                           {"stage": "final", "min_size": "1/4"})
    assert response.status_code == 400
    assert "cannot sign a final visual" in response.content.decode()
    assert not Inspection.objects.filter(weld=weld).exists()


# --- the traveler and the inspection page --------------------------------------------------------------------

def test_the_traveler_prints_the_credential_beside_the_name(make):
    inspector = uncertified(make)
    credential = make.make_credential(inspector, number="21-0417")
    inspection = make.make_inspection(user=inspector)
    snapshot = traveler.gather(inspection.weld.assembly_id)
    final = snapshot["welds"][0]["final"]
    assert final["inspector"] == f"{inspector.get_full_name()} (AWS CWI 21-0417, valid to " \
                                 f"{credential.expires_on.isoformat()})"


def test_a_viewer_reads_the_credential_as_printed_but_has_no_link(make, client_as):
    inspection = make.make_inspection(make.use_on_job())
    page = client_as("viewer").get(inspection.get_absolute_url()).content.decode()
    assert inspection.credential.printed() in page
    assert inspection.credential.get_absolute_url() not in page
    assert client_as("viewer").get(inspection.credential.get_absolute_url()).status_code == 404
    assert client_as("viewer").get(reverse("inspections:credential_list")).status_code == 403


# --- the register ---------------------------------------------------------------------------------------------

def post_credential(client, inspector, **kw):
    data = dict(inspector=inspector.pk, scheme="aws_cwi", number="22-1180", issued_on="2025-01-02",
                expires_on="2028-01-31", eye_exam_on="2025-01-02", endorsements="AWS D1.1")
    data.update(kw)
    return client.post(reverse("inspections:credential_create"), data)


def test_the_qa_lead_records_a_credential_with_its_card_and_history(make, client_as, users):
    inspector = uncertified(make)
    card = SimpleUploadedFile("card.png", png_bytes(), content_type="image/png")
    response = post_credential(client_as("qa_lead"), inspector, document=card)
    credential = InspectorCredential.objects.get(inspector=inspector)
    assert response.status_code == 302 and response.url == credential.get_absolute_url()
    assert len(credential.document_sha256) == 64
    assert [e.action for e in history.panel(credential)] == ["created"]
    download = client_as("inspector").get(reverse("inspections:credential_document", args=[credential.pk]))
    assert download.status_code == 200 and "sandbox" in download["Content-Security-Policy"]


@pytest.mark.parametrize(("fields", "field", "words"), [
    ({"scheme": "national"}, "scheme_name", "Name the national scheme"),
    ({"scheme": "iso_9712", "level": "4"}, "level", "level 1, 2 or 3"),
    ({"level": "2"}, "level", "has no level"),
    ({"expires_on": "2024-12-31"}, "expires_on", "expires before it is valid"),
    ({"eye_exam_on": "2999-01-01"}, "eye_exam_on", "after today"),
])
def test_the_form_says_what_is_wrong_beside_the_field(make, client_as, fields, field, words):
    inspector = uncertified(make)
    response = post_credential(client_as("qa_lead"), inspector, **fields)
    assert response.status_code == 400
    assert words in str(response.context["form"].errors[field])
    assert not InspectorCredential.objects.filter(inspector=inspector).exists()


def test_a_card_that_is_not_a_pdf_or_image_is_refused(make, client_as):
    fake = SimpleUploadedFile("card.pdf", b"MZ\x90\x00 not a pdf", content_type="application/pdf")
    response = post_credential(client_as("qa_lead"), uncertified(make), document=fake)
    assert response.status_code == 400 and "not a readable PDF" in str(response.context["form"].errors["document"])
    exe = SimpleUploadedFile("card.exe", b"MZ", content_type="application/octet-stream")
    response = post_credential(client_as("qa_lead"), uncertified(make), document=exe)
    assert "PDF, PNG or JPEG" in str(response.context["form"].errors["document"])


def test_only_an_inspector_holds_a_credential(make, client_as, users):
    response = post_credential(client_as("qa_lead"), users["welding_engineer"])
    assert response.status_code == 400  # not in the choices: only inspectors are offered
    assert not InspectorCredential.objects.filter(inspector=users["welding_engineer"]).exists()


def test_a_stored_credential_is_never_edited_by_any_path(make):
    credential = make.make_credential()
    credential.number = "99-9999"
    with pytest.raises(RecordLocked):
        credential.save()
    with pytest.raises(RecordLocked):
        InspectorCredential.objects.filter(pk=credential.pk).update(number="99-9999")
    with pytest.raises(RecordLocked):
        credential.delete()
    with pytest.raises(DatabaseError), transaction.atomic(), connection.cursor() as cursor:
        cursor.execute("UPDATE inspections_inspectorcredential SET expires_on = %s WHERE id = %s",
                       [today() + timedelta(days=3650), credential.pk])


def test_withdrawing_needs_a_reason_and_writes_history(make, client_as):
    credential = make.make_credential()
    url = reverse("inspections:credential_withdraw", args=[credential.pk])
    assert client_as("qa_lead").post(url, {"reason": "  "}).status_code == 400
    assert client_as("qa_lead").post(url, {"reason": "Card revoked"}).status_code == 302
    credential.refresh_from_db()
    assert credential.state == "withdrawn" and credential.withdrawn_reason == "Card revoked"
    assert history.panel(credential)[0].reason == "Card revoked"
    assert client_as("inspector").post(url, {"reason": "x"}).status_code == 403


def test_the_list_shows_a_lapse_within_30_days_and_not_at_31_common_practice_no_source(make, client_as):
    soon = make.make_credential(number="SOON-30", expires_on=today() + timedelta(days=29))  # lapses in 30 days
    later = make.make_credential(number="LATER-31", expires_on=today() + timedelta(days=30))
    rows = {r["credential"].pk: r for r in trace.credential_rows(today())}
    assert rows[soon.pk]["soon"] and rows[soon.pk]["days_left"] == 30
    assert not rows[later.pk]["soon"]
    page = client_as("inspector").get(reverse("inspections:credential_list")).content.decode()
    assert "in 30 days" in page


def test_the_list_reads_in_fixed_queries(make, client_as, django_assert_num_queries):
    make.make_credential()
    client = client_as("qa_lead")
    client.get(reverse("inspections:credential_list"))
    with django_assert_num_queries(3) as first:  # session, user, credentials with their inspectors
        client.get(reverse("inspections:credential_list"))
    for _ in range(4):
        make.make_credential()
    with django_assert_num_queries(len(first.captured_queries)):
        client.get(reverse("inspections:credential_list"))


def test_a_column_added_after_signing_and_empty_is_not_a_change():
    assert compare({"fields": {"accepted": True}}, {"fields": {"accepted": True, "credential": None}}) == []
    assert compare({"fields": {"accepted": True}}, {"fields": {"accepted": True, "credential": 4}})


@pytest.mark.parametrize("page, words", [
    ("credential", "the card is recorded again"), ("gauge", "taken out of use"), ("heat", "recorded again"),
    ("oven", "taken out of service")])
def test_each_withdraw_or_retire_form_gives_an_example_in_its_own_words(page, words, make, client_as):
    record = {"credential": make.make_credential, "gauge": make.make_gauge, "heat": make.make_heat,
              "oven": make.make_oven}[page]()
    text = client_as("qa_lead").get(record.get_absolute_url()).content.decode()
    assert words in text and "Left the shop" not in text  # the welder deactivation's example
