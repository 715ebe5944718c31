"""Signing an inspection: the verdict comes from the engine and is stored with the criteria set's key and
version; a signed inspection is changed by no path (model, queryset, form, admin); a correction supersedes."""

import pytest
from django.urls import reverse

from core.errors import RecordLocked, Refused
from inspections.acceptance import evaluate
from inspections.models import NCR, Inspection, Photo
from inspections.models.jobs import AssemblyState
from inspections.services.inspect import judge, nominal_throat, sign_inspection, weld_for_engine
from tests.factory import L


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def test_it_builds_the_engine_weld_from_the_weld_map_with_the_thinner_part_at_the_toe(make):
    weld = make.make_weld(size=L("5/16 in"), length=L("10 in"), thickness1=L("1-1/4 in"), thickness2=L("3/4 in"),
                          primary_member=True, transverse_to_tension=True)
    data = weld_for_engine(weld)
    assert data["system"] == "US"
    assert data["size"] == L("5/16 in") and data["length"] == L("10 in")
    assert data["thickness"] == L("3/4 in")
    assert data["primary_member"] and data["transverse_to_tension"]
    # AISC 360-16 J2.2a: effective throat 0.707 w for equal legs.
    assert data["throat"] == L("5/16 in") * "0.707"


def test_unequal_legs_give_the_right_triangle_throat(make):
    weld = make.make_weld(size=L("6 mm"), size2=L("8 mm"))
    assert nominal_throat(weld) == L("4.8 mm")  # 6 x 8 / 10


def test_the_verdict_is_the_engines_for_the_jobs_criteria(make):
    weld = make.make_weld(size=L("1/4 in"))
    observed = {"min_size": L("1/8 in")}
    verdict = judge(weld, observed)
    direct = evaluate("aws-d1.1-2020-static", weld_for_engine(weld), observed)
    assert verdict.accepted is direct.accepted is False
    assert [f.criterion for f in verdict.findings] == [f.criterion for f in direct.findings]


def test_signing_stores_findings_with_sources_and_the_criteria_version(make):
    inspection = make.make_inspection(min_size="1/4 in")
    inspection.refresh_from_db()
    assert inspection.accepted
    assert inspection.criteria_key == "aws-d1.1-2020-static" and inspection.criteria_version >= 1
    assert {"criterion", "ok", "message", "source"} <= set(inspection.findings[0])
    assert all(f["source"] for f in inspection.findings)


def test_a_rejected_final_inspection_opens_an_ncr_and_rejects_the_assembly(make):
    inspection = make.make_inspection(min_size="1/8 in")
    ncr = NCR.objects.get(inspection=inspection)
    assert "- Undersize: smallest leg 1/8\"" in ncr.description  # the finding's heading, never the engine's name
    assert "undersize:" not in ncr.description
    inspection.weld.assembly.refresh_from_db()
    assert inspection.weld.assembly.state == AssemblyState.REJECTED


def test_a_rejected_in_process_inspection_opens_no_ncr(make):
    make.make_inspection(min_size="1/8 in", stage="in_process")
    assert NCR.objects.count() == 0


def test_it_refuses_to_save_a_signed_inspection_again(make):
    inspection = make.make_inspection()
    inspection.remarks = "changed"
    with pytest.raises(RecordLocked):
        inspection.save()
    assert Inspection.objects.get(pk=inspection.pk).remarks == ""


def test_it_refuses_to_delete_a_signed_inspection(make):
    inspection = make.make_inspection()
    with pytest.raises(RecordLocked):
        inspection.delete()
    with pytest.raises(RecordLocked):
        Inspection.objects.filter(pk=inspection.pk).delete()
    assert Inspection.objects.filter(pk=inspection.pk).exists()


def test_it_refuses_bulk_updates_of_signed_inspections(make):
    inspection = make.make_inspection(min_size="1/8 in")
    with pytest.raises(RecordLocked):
        Inspection.objects.filter(pk=inspection.pk).update(accepted=True)
    assert not Inspection.objects.get(pk=inspection.pk).accepted


def test_photos_are_append_only_too(make):
    photo = make.make_photo()
    photo.caption = "changed"
    with pytest.raises(RecordLocked):
        photo.save()
    with pytest.raises(RecordLocked):
        photo.delete()
    with pytest.raises(RecordLocked):
        Photo.objects.filter(pk=photo.pk).update(caption="x")


def test_the_admin_shows_inspections_read_only(make, client):
    inspection = make.make_inspection(min_size="1/8 in")
    admin = make.make_user("qa_lead", is_staff=True, is_superuser=True)
    client.force_login(admin)
    url = reverse("admin:inspections_inspection_change", args=[inspection.pk])
    assert client.get(url).status_code == 200  # view only
    response = client.post(url, {"remarks": "edited", "accepted": "on"})
    assert response.status_code == 403
    delete = client.post(reverse("admin:inspections_inspection_delete", args=[inspection.pk]), {"post": "yes"})
    assert delete.status_code == 403
    inspection.refresh_from_db()
    assert not inspection.accepted and inspection.remarks == ""


def test_a_correction_supersedes_and_keeps_the_old_record(make):
    old = make.make_inspection(min_size="1/8 in")
    new = make.make_inspection(old.weld, user=old.inspector, supersedes=old, reason="misread the gauge",
                          min_size="1/4 in")
    assert new.supersedes == old and new.correction_reason == "misread the gauge"
    assert list(Inspection.objects.filter(weld=old.weld).current()) == [new]
    old.refresh_from_db()
    assert not old.accepted and not old.is_current


def test_it_refuses_to_correct_an_inspection_twice(make):
    old = make.make_inspection(min_size="1/8 in")
    make.make_inspection(old.weld, supersedes=old, reason="first")
    with pytest.raises(Refused, match="already been corrected"):
        make.make_inspection(old.weld, supersedes=old, reason="second")
    assert Inspection.objects.count() == 2


def test_it_refuses_a_correction_without_a_reason_or_of_another_weld(make):
    old = make.make_inspection()
    with pytest.raises(Refused, match="why"):
        make.make_inspection(old.weld, supersedes=old, reason="  ")
    with pytest.raises(Refused, match="same weld"):
        make.make_inspection(make.make_weld(), supersedes=old, reason="wrong weld")
    assert Inspection.objects.count() == 1


def test_a_failed_signing_leaves_nothing_behind(make, monkeypatch):
    weld = make.make_weld()
    user = make.make_user("inspector")

    def boom(*args, **kwargs):
        raise RuntimeError("disk full")

    monkeypatch.setattr("inspections.services.inspect.refresh_assembly_state", boom)
    with pytest.raises(RuntimeError):
        sign_inspection(weld, {"min_size": L("1/8 in")}, "final", user)
    assert Inspection.objects.count() == 0 and NCR.objects.count() == 0


def test_an_si_job_is_judged_in_millimetres(make):
    job = make.make_job(unit_system="SI", criteria_key="aws-d1.1-2020-static")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("6 mm"), length=L("300 mm"),
                          thickness1=L("10 mm"), thickness2=L("12 mm"))
    # AWS D1.1:2020 Table 8.1: a 6 mm fillet may underrun 2.5 mm for 10 % of its length (SI values as printed).
    verdict = judge(weld, {"min_size": L("3.5 mm"), "undersize_length": L("30 mm")})
    assert verdict.system == "SI"
    assert verdict.accepted


def test_a_released_assembly_takes_no_more_inspections(make):
    weld = make.make_weld()
    make.put(weld.assembly, state=AssemblyState.RELEASED)  # fixture shortcut
    with pytest.raises(Refused, match="released"):
        make.make_inspection(weld)
    assert Inspection.objects.count() == 0
