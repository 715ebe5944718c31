"""The admin cannot change what is signed: approved procedures, test records, inspections, history."""

import pytest
from django.contrib import admin
from django.urls import reverse

from procedures.models.wps import WPSState
from tests.factory import L


@pytest.fixture
def admin_client_(client, make):
    admin = make.make_user("qa_lead", username="shop-admin", is_staff=True, is_superuser=True)
    client.force_login(admin)
    return client


def test_an_approved_wps_cannot_be_changed_in_the_admin(admin_client_, make):
    wps = make.make_wps(state=WPSState.APPROVED)
    url = reverse("admin:procedures_wps_change", args=[wps.pk])
    response = admin_client_.post(url, {"title": "Changed behind the QA lead's back"})
    assert response.status_code == 403
    wps.refresh_from_db()
    assert wps.title != "Changed behind the QA lead's back"


def test_a_draft_wps_can_still_be_opened_in_the_admin(admin_client_, make):
    wps = make.make_wps()
    assert admin_client_.get(reverse("admin:procedures_wps_change", args=[wps.pk])).status_code == 200


def test_a_welder_test_record_is_read_only_in_the_admin(admin_client_, make):
    qualification = make.make_qualification()
    url = reverse("admin:procedures_qualification_change", args=[qualification.pk])
    assert admin_client_.post(url, {"examiner": "someone else"}).status_code == 403
    assert admin_client_.post(reverse("admin:procedures_qualification_delete", args=[qualification.pk]),
                              {"post": "yes"}).status_code == 403


def test_a_pqr_behind_an_approved_wps_is_read_only_in_the_admin(admin_client_, make):
    pqr = make.make_pqr()
    wps = make.make_wps(state=WPSState.APPROVED)
    wps.pqrs.add(pqr)
    assert admin_client_.post(reverse("admin:procedures_pqr_change", args=[pqr.pk]), {}).status_code == 403


@pytest.mark.parametrize("model", ["inspections_inspection", "inspections_ncr", "core_event",
                                   "procedures_continuityentry", "inspections_photo"])
def test_signed_records_and_history_cannot_be_added_in_the_admin(admin_client_, model):
    assert admin_client_.get(reverse(f"admin:{model}_add")).status_code == 403


# --- quantities print as the pages print them (issue 15: "Speed(mm_per_min=Decimal(...", "76.2 mm000") ----------

def test_a_signed_inspection_shows_its_lengths_in_the_jobs_units(admin_client_, make):
    inspection = make.make_inspection(min_size="3/16 in", undersize_length="3 in")
    html = admin_client_.get(reverse("admin:inspections_inspection_change", args=[inspection.pk])).content.decode()
    assert "3/16&quot;" in html and "3&quot;" in html
    assert "mm000" not in html and "Length(" not in html


def test_an_approved_wps_shows_speeds_temperatures_and_amps_as_the_pages_do(admin_client_, make):
    wps = make.make_wps(state=WPSState.APPROVED)
    html = admin_client_.get(reverse("admin:procedures_wps_change", args=[wps.pk])).content.decode()
    assert "Speed(" not in html and "Temperature(" not in html and "mm000" not in html
    assert "8 in/min" in html and "50 °F" in html


def test_lists_show_quantities_in_words(admin_client_, make):
    weld = make.make_weld(size=L("1/4 in"))
    WeldAdmin = type(admin.site._registry[type(weld)])  # noqa: N806 - a class
    assert "size_shown" in WeldAdmin(type(weld), admin.site).get_list_display(None)
    html = admin_client_.get(reverse("admin:inspections_weld_changelist")).content.decode()
    assert "1/4&quot;" in html and "mm000" not in html
