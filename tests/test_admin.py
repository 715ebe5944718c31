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
    wps = make.make_wps()
    wps.pqrs.add(pqr)
    make.move_wps(wps, WPSState.APPROVED)
    assert admin_client_.post(reverse("admin:procedures_pqr_change", args=[pqr.pk]), {}).status_code == 403


@pytest.mark.parametrize("model", ["inspections_inspection", "inspections_ncr", "core_event",
                                   "procedures_continuityentry", "inspections_photo"])
def test_signed_records_and_history_cannot_be_added_in_the_admin(admin_client_, model):
    assert admin_client_.get(reverse(f"admin:{model}_add")).status_code == 403


# --- every frozen record, and the bulk delete action -------------------------------------------------------

FROZEN = ["approved WPS", "signed inspection", "photo", "dispositioned NCR", "issued traveler", "done packet",
          "released assembly", "weld of a released assembly", "final-inspected weld (who, when)", "history row",
          "client criteria set"]


@pytest.mark.parametrize("case", FROZEN)
def test_a_superuser_cannot_change_or_delete_a_frozen_record_in_the_admin(admin_client_, make, case):
    from tests.test_record_locks import CASES, _stored

    build, field, value = CASES[case]
    record = build(make)
    info = (record._meta.app_label, record._meta.model_name)
    before = _stored(record, field)
    change = reverse("admin:{}_{}_change".format(*info), args=[record.pk])
    assert admin_client_.post(change, {field: str(value)}).status_code == 403
    delete = reverse("admin:{}_{}_delete".format(*info), args=[record.pk])
    assert admin_client_.post(delete, {"post": "yes"}).status_code == 403
    assert _stored(record, field) == before


def test_the_bulk_delete_action_refuses_a_frozen_row(admin_client_, make):
    from inspections.models import Assembly
    from tests.test_record_locks import _released

    released, open_one = _released(make), make.make_assembly()
    response = admin_client_.post(reverse("admin:inspections_assembly_changelist"), {
        "action": "delete_selected", "_selected_action": [released.pk, open_one.pk], "post": "yes"})
    # The admin asks each row's permission first and refuses the whole action, naming what it may not delete.
    assert response.status_code == 200 and "Cannot delete assemblies" in response.text
    assert Assembly.objects.filter(pk__in=[released.pk, open_one.pk]).count() == 2


def test_a_welders_stamp_on_record_is_refused_beside_the_field_in_the_admin(admin_client_, make):
    from tests.test_stale_saves import form_data

    welder = make.make_welder(stamp="B-31")
    make.make_qualification(welder=welder)
    url = reverse("admin:procedures_welder_change", args=[welder.pk])
    data = form_data(admin_client_.get(url).context["adminform"].form)
    response = admin_client_.post(url, {**data, "stamp": "B-32"})
    assert response.status_code == 200
    assert "cannot change" in " ".join(response.context["adminform"].form.errors["stamp"])
    welder.refresh_from_db()
    assert welder.stamp == "B-31"


def test_an_inspected_welds_size_cannot_be_changed_in_the_admin(admin_client_, make):
    from tests.test_record_locks import _inspected_weld

    weld = _inspected_weld(make)
    url = reverse("admin:inspections_weld_change", args=[weld.pk])
    assert admin_client_.post(url, {"size": "1"}).status_code == 403
    weld.refresh_from_db()
    assert weld.size == L("1/4 in")
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
