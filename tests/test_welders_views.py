"""Welder pages: the list and its states, the welder page, tests, continuity, deactivation, reports.

Every view is checked for its role (403), a missing record (404) and, for writes, that refused input changes
nothing. Invented scenario (Brannock Steelworks).
"""

from datetime import date, timedelta

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.urls import reverse
from django.utils import timezone

from core.models import Event
from procedures.eligibility import record_production
from procedures.models import ContinuityEntry, Qualification, Welder
from procedures.services import welders as welder_steps
from tests.factory import L

TODAY = timezone.localdate()
WRITERS = {"welding_engineer": "welder.manage", "qa_lead": "continuity.log"}


def url(name, *args):
    return reverse(f"procedures:{name}", args=args)


def snapshot():
    return (list(Welder.objects.values()), list(Qualification.objects.values()),
            list(ContinuityEntry.objects.values()), list(Event.objects.values()))


def test_input(**overrides):
    data = {"code": "AWS D1.1:2020", "process": "FCAW", "joint": "groove", "test_position": "3G+4G",
            "unit_system": "US", "test_thickness": "1", "electrode": "E71T-1C", "wps": "",
            "test_date": (TODAY - timedelta(days=3)).isoformat(), "result": "pass", "examiner": "R. Okafor, CWI",
            "iso_revalidation": ""}
    data.update(overrides)
    return data


test_input.__test__ = False  # a helper, not a test


# --- list -----------------------------------------------------------------------------------------------------

def _shop(make, n):
    for _ in range(n):
        welder = make.make_welder()
        make.make_qualification(welder, test_date=TODAY - timedelta(days=10))
        make.make_qualification(welder, process="SMAW", electrode="E7018", test_date=TODAY - timedelta(days=175))
        ContinuityEntry.objects.create(welder=welder, process="FCAW", date=TODAY - timedelta(days=2), source="manual",
                                       note="Shop work")


@pytest.mark.parametrize("n", [2, 12])
def test_the_list_takes_a_fixed_number_of_queries(client_as, make, django_assert_num_queries, n):
    _shop(make, n)
    client = client_as("inspector")
    with django_assert_num_queries(5):  # session, user, welders, their tests, their continuity
        response = client.get(url("welder_list"))
    assert response.status_code == 200
    assert len(response.context["page"]) == n


def test_the_list_shows_each_state_and_filters_by_it(client_as, make, users):
    fresh = make.make_welder(stamp="S-01")
    make.make_qualification(fresh, test_date=TODAY - timedelta(days=10))
    soon = make.make_welder(stamp="S-02")
    make.make_qualification(soon, test_date=TODAY - timedelta(days=175))
    gone = make.make_welder(stamp="S-03")
    make.make_qualification(gone, test_date=TODAY - timedelta(days=400))
    make.make_welder(stamp="S-04")
    off = make.make_welder(stamp="S-05")
    welder_steps.deactivate(off, users["welding_engineer"], "Left the shop")
    client = client_as("inspector")

    def stamps(**params):
        response = client.get(url("welder_list"), params)
        return {row.welder.stamp: row.state for row in response.context["page"]}

    assert stamps() == {"S-01": "qualified", "S-02": "lapsing", "S-03": "lapsed", "S-04": "untested"}
    assert stamps(state="lapsing") == {"S-02": "lapsing"}
    assert stamps(active="0") == {"S-05": "inactive"}
    assert set(stamps(active="")) == {"S-01", "S-02", "S-03", "S-04", "S-05"}
    # the list contract's words: current, lapsing (within 30 days), lapsed
    assert stamps(continuity="current") == {"S-01": "qualified"}
    assert stamps(continuity="lapsing") == {"S-02": "lapsing"}
    assert stamps(continuity="lapsed") == {"S-03": "lapsed"}
    assert set(stamps(process="FCAW")) == {"S-01", "S-02", "S-03"}
    assert set(stamps(process="SMAW")) == set()
    # bad filters are ignored
    assert stamps(state="nonsense", process="<script>", active="maybe", continuity="x", o="?") == stamps()


# --- detail ---------------------------------------------------------------------------------------------------

def test_the_welder_page_shows_ranges_in_words_and_the_computed_lapse(client_as, make):
    welder = make.make_welder()
    make.make_qualification(welder, joint="fillet", test_position="3F", test_thickness=L("1/2 in"),
                            test_date=date(2026, 11, 2))
    response = client_as("inspector").get(url("welder_detail", welder.pk))
    text = response.content.decode()
    assert "Fillet welds in flat, horizontal and vertical positions; no groove welds; plate 1/8&quot;" in text
    assert "2027-05-02" in text  # valid until six months after the test


def test_the_welder_page_shows_production_and_manual_continuity(client_as, make, users):
    welder = make.make_welder()
    make.make_qualification(welder, test_date=date(2026, 6, 1))
    weld = make.make_weld(wps=make.make_wps(), welded_on=date(2026, 8, 3), mark="W-77")
    weld.welders.set([welder])
    record_production(weld)
    welder_steps.log_continuity(welder, "FCAW", date(2026, 9, 14), "Work order 5512", users["qa_lead"])
    text = client_as("inspector").get(url("welder_detail", welder.pk)).content.decode()
    assert "W-77" in text
    assert weld.assembly.job.number in text
    assert "Work order 5512" in text
    assert str(users["qa_lead"]) in text


def test_the_welder_page_answers_whether_the_welder_may_make_a_weld(client_as, make):
    welder = make.make_welder()
    make.make_qualification(welder, joint="fillet", test_position="2F", test_date=TODAY - timedelta(days=5))
    client = client_as("inspector")
    params = {"code": "AWS D1.1:2020", "process": "FCAW", "joint": "fillet", "position": "V", "thickness": "1/2",
              "electrode": "E71T-1C", "on": ""}
    response = client.get(url("welder_detail", welder.pk), params)
    assert response.context["check"].allowed is False
    assert "this weld is V" in response.content.decode()
    params["position"] = "H"
    assert client.get(url("welder_detail", welder.pk), params).context["check"].allowed is True


@pytest.mark.parametrize("thickness", ["", "abc", "0", "-1 in", "1e9", "9" * 60, "1/0", "½ in", "3 furlongs"])
def test_the_check_box_answers_bad_input_next_to_the_field(client_as, make, thickness):
    welder = make.make_welder()
    params = {"code": "AWS D1.1:2020", "process": "FCAW", "joint": "fillet", "position": "F", "thickness": thickness}
    response = client_as("inspector").get(url("welder_detail", welder.pk), params)
    assert response.status_code == 200
    if thickness != "½ in":
        assert response.context["check"] is None


def test_a_missing_welder_is_404(client_as):
    for name in ("welder_detail", "welder_pdf", "qualification_create", "continuity_create", "welder_deactivate",
                 "welder_reactivate"):
        role = {"qualification_create": "welding_engineer", "continuity_create": "qa_lead",
                "welder_deactivate": "welding_engineer", "welder_reactivate": "welding_engineer"}.get(name, "viewer")
        assert client_as(role).get(url(name, 999999)).status_code == 404, name
    assert client_as("viewer").get(url("qualification_report", 999999)).status_code == 404


# --- add a welder ---------------------------------------------------------------------------------------------

def test_the_welding_engineer_adds_a_welder(client_as):
    response = client_as("welding_engineer").post(url("welder_create"), {"name": "Ines Varga", "stamp": " b-51 ",
                                                                          "employer": "Brannock Steelworks"})
    welder = Welder.objects.get()
    assert response.status_code == 302
    assert (welder.stamp, welder.active) == ("B-51", True)


@pytest.mark.parametrize("role", ["inspector", "qa_lead", "viewer"])
def test_other_roles_cannot_add_a_welder(client_as, role):
    response = client_as(role).post(url("welder_create"), {"name": "X", "stamp": "X-1", "employer": "Y"})
    assert response.status_code == 403
    assert not Welder.objects.exists()


def test_a_stamp_in_use_is_refused(client_as, make):
    make.make_welder(stamp="B-51")
    before = snapshot()
    response = client_as("welding_engineer").post(url("welder_create"), {"name": "Ines", "stamp": "b-51",
                                                                          "employer": "Brannock"})
    assert response.status_code == 200
    assert response.context["form"].errors["stamp"]
    assert snapshot() == before


# --- record a test --------------------------------------------------------------------------------------------

def test_the_welding_engineer_records_a_test(client_as, make, users):
    welder = make.make_welder()
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk),
                                                  test_input(test_position="3g + 4g", test_thickness="1"))
    assert response.status_code == 302
    q = Qualification.objects.get()
    assert (q.welder, q.test_position, q.test_thickness, q.recorded_by) == (
        welder, "3G+4G", L("1 in"), users["welding_engineer"])


@pytest.mark.parametrize("role", ["inspector", "qa_lead", "viewer"])
def test_other_roles_cannot_record_a_test(client_as, make, role):
    welder = make.make_welder()
    assert client_as(role).post(url("qualification_create", welder.pk), test_input()).status_code == 403
    assert not Qualification.objects.exists()


@pytest.mark.parametrize("field, overrides, says", [
    ("test_position", {"joint": "fillet", "test_position": "5G"}, "5G"),
    ("test_position", {"joint": "fillet", "test_position": "3G"}, "groove test position"),
    ("test_position", {"test_position": "7G"}, "Unknown test position"),
    ("test_position", {"test_position": "+"}, "combination"),
    ("test_thickness", {"test_thickness": "0"}, "more than zero"),
    ("test_thickness", {"test_thickness": "0 mm"}, "more than zero"),
    ("test_thickness", {"test_thickness": "1/4 in"}, "Table 6.11"),
    ("test_thickness", {"test_thickness": "abc"}, ""),
    ("test_thickness", {"test_thickness": "1e3 in"}, "exponent"),
    ("test_thickness", {"test_thickness": "-3/8"}, "negative"),
    ("test_date", {"test_date": (TODAY + timedelta(days=1)).isoformat()}, "after today"),
    ("test_date", {"test_date": "2026-02-30"}, ""),
    ("electrode", {"electrode": "E7018"}, "not for FCAW"),
    ("electrode", {"electrode": "banana"}, ""),
    ("electrode", {"process": "SMAW", "electrode": "ER70S-6"}, "not for SMAW"),
    ("code", {"code": "AWS D1.1:1998"}, ""),
    ("result", {"result": "maybe"}, ""),
    ("examiner", {"examiner": ""}, ""),
])
def test_a_bad_test_record_is_refused_next_to_the_field_and_changes_nothing(client_as, make, field, overrides, says):
    welder = make.make_welder()
    before = snapshot()
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk), test_input(**overrides))
    assert response.status_code == 200
    errors = response.context["form"].errors
    assert field in errors, errors
    assert says in " ".join(errors[field])
    assert snapshot() == before


def test_a_wps_of_another_process_is_refused(client_as, make):
    welder = make.make_welder()
    wps = make.make_wps(process="SMAW", electrode="E7018", shielding_gas="")
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk), test_input(wps=wps.pk))
    assert "is a SMAW procedure" in " ".join(response.context["form"].errors["wps"])
    assert not Qualification.objects.exists()


def test_a_test_cannot_be_recorded_for_an_inactive_welder(client_as, make, users):
    welder = make.make_welder()
    welder_steps.deactivate(welder, users["welding_engineer"], "Left")
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk), test_input())
    assert response.status_code == 302
    assert not Qualification.objects.exists()


PDF = b"%PDF-1.4\n1 0 obj<<>>endobj\ntrailer<<>>\n%%EOF\n"


def _png():
    from io import BytesIO

    from PIL import Image

    buffer = BytesIO()
    Image.new("RGB", (4, 4), "white").save(buffer, "PNG")
    return buffer.getvalue()


@pytest.fixture
def media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path
    return tmp_path


def test_a_report_is_stored_and_served_only_to_signed_in_users(client_as, make, media):
    welder = make.make_welder()
    data = test_input(report=SimpleUploadedFile("B-14 bend test.pdf", PDF, content_type="application/pdf"))
    assert client_as("welding_engineer").post(url("qualification_create", welder.pk), data).status_code == 302
    q = Qualification.objects.get()
    assert q.report.name.startswith("qualification-reports/")
    make.use_on_job(welder=welder)  # the customer's viewer reads the records of welders on its jobs
    response = client_as("viewer").get(url("qualification_report", q.pk))
    assert response.status_code == 200
    assert response["Content-Type"] == "application/pdf"
    assert b"".join(response.streaming_content) == PDF
    anonymous = client_as(None).get(url("qualification_report", q.pk))
    assert anonymous.status_code == 302


def test_a_photo_of_the_report_is_accepted(client_as, make, media):
    welder = make.make_welder()
    data = test_input(report=SimpleUploadedFile("report.png", _png(), content_type="image/png"))
    assert client_as("welding_engineer").post(url("qualification_create", welder.pk), data).status_code == 302


@pytest.mark.parametrize("name, content, says", [
    ("report.pdf", b"MZ\x90\x00 not a pdf at all", "not a readable PDF"),
    ("report.png", b"%PDF-1.4 a pdf named png", "not a readable PNG"),
    ("report.exe", PDF, "PDF, PNG or JPEG"),
    ("report.html", b"<script>alert(1)</script>", "PDF, PNG or JPEG"),
])
def test_a_bad_report_file_is_refused(client_as, make, media, name, content, says):
    welder = make.make_welder()
    data = test_input(report=SimpleUploadedFile(name, content))
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk), data)
    assert says in " ".join(response.context["form"].errors["report"])
    assert not Qualification.objects.exists()
    assert not list(media.rglob("*.*"))


def test_a_report_over_the_size_limit_is_refused(client_as, make, media, monkeypatch):
    from procedures.forms import welders as forms

    monkeypatch.setattr(forms, "REPORT_MAX_BYTES", 1024 * 1024)
    welder = make.make_welder()
    data = test_input(report=SimpleUploadedFile("big.pdf", PDF + b"0" * (1024 * 1024)))
    response = client_as("welding_engineer").post(url("qualification_create", welder.pk), data)
    assert "the limit is 1 MB" in " ".join(response.context["form"].errors["report"])
    assert not Qualification.objects.exists()


# --- continuity -----------------------------------------------------------------------------------------------

def test_the_qa_lead_logs_continuity_with_a_note(client_as, make, users):
    welder = make.make_welder()
    response = client_as("qa_lead").post(url("continuity_create", welder.pk),
                                         {"process": "FCAW", "date": TODAY.isoformat(), "note": "WO 5512 repairs"})
    assert response.status_code == 302
    entry = ContinuityEntry.objects.get()
    assert (entry.source, entry.note, entry.entered_by, entry.date) == (
        "manual", "WO 5512 repairs", users["qa_lead"], TODAY)


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_other_roles_cannot_log_continuity(client_as, make, role):
    welder = make.make_welder()
    response = client_as(role).post(url("continuity_create", welder.pk),
                                    {"process": "FCAW", "date": TODAY.isoformat(), "note": "x"})
    assert response.status_code == 403
    assert not ContinuityEntry.objects.exists()


@pytest.mark.parametrize("data, field", [
    ({"process": "FCAW", "date": TODAY.isoformat(), "note": "   "}, "note"),
    ({"process": "FCAW", "date": TODAY.isoformat()}, "note"),
    ({"process": "FCAW", "date": (TODAY + timedelta(days=1)).isoformat(), "note": "x"}, "date"),
    ({"process": "FCAW", "date": "yesterday", "note": "x"}, "date"),
    ({"process": "OFW", "date": TODAY.isoformat(), "note": "x"}, "process"),
    ({"process": "FCAW", "date": TODAY.isoformat(), "note": "x" * 201}, "note"),
])
def test_bad_continuity_is_refused_and_changes_nothing(client_as, make, data, field):
    welder = make.make_welder()
    response = client_as("qa_lead").post(url("continuity_create", welder.pk), data)
    assert response.status_code == 200
    assert field in response.context["form"].errors
    assert not ContinuityEntry.objects.exists()


# --- deactivate -----------------------------------------------------------------------------------------------

def test_the_welding_engineer_deactivates_with_a_reason_and_history_keeps_it(client_as, make, users):
    welder = make.make_welder()
    response = client_as("welding_engineer").post(url("welder_deactivate", welder.pk), {"reason": "Left the shop"})
    assert response.status_code == 302
    welder.refresh_from_db()
    assert (welder.active, welder.deactivation_reason) == (False, "Left the shop")
    event = Event.objects.get(action="state")
    assert (event.from_state, event.to_state, event.user, event.reason) == (
        "active", "inactive", users["welding_engineer"], "Left the shop")
    client_as("welding_engineer").post(url("welder_reactivate", welder.pk), {"reason": "Back from the yard"})
    welder.refresh_from_db()
    assert welder.active and Event.objects.filter(action="state").count() == 2


def test_deactivating_twice_writes_one_history_row(client_as, make):
    welder = make.make_welder()
    client = client_as("welding_engineer")
    client.post(url("welder_deactivate", welder.pk), {"reason": "Left"})
    response = client.post(url("welder_deactivate", welder.pk), {"reason": "Left again"}, follow=True)
    assert "is inactive; this needs it active" in response.content.decode()
    assert Event.objects.filter(action="state").count() == 1


def test_deactivating_needs_a_reason(client_as, make):
    welder = make.make_welder()
    before = snapshot()
    response = client_as("welding_engineer").post(url("welder_deactivate", welder.pk), {"reason": "  "})
    assert response.status_code == 200
    assert "reason" in response.context["form"].errors
    assert snapshot() == before


@pytest.mark.parametrize("role", ["inspector", "qa_lead", "viewer"])
def test_other_roles_cannot_deactivate(client_as, make, role):
    welder = make.make_welder()
    assert client_as(role).post(url("welder_deactivate", welder.pk), {"reason": "x"}).status_code == 403
    assert client_as(role).post(url("welder_reactivate", welder.pk), {"reason": "x"}).status_code == 403
    welder.refresh_from_db()
    assert welder.active
