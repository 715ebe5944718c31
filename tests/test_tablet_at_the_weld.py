"""At the weld: photos before signing, the next weld, a pass over identical welds, drafts, the queue, the delayed
final visual of quenched and tempered steels, and the verdict fingerprint that keeps a signature honest.

The delayed visual: AWS D1.1/D1.1M:2020 Table 8.1 note (from memory): ASTM A514, A517 and A709 Gr 100/100W/HPS 100W
are visually inspected no sooner than 48 h after the weld has cooled to ambient temperature.
"""

from datetime import datetime, timedelta

import pytest
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from inspections import queue
from inspections.models import NCR, DraftPhoto, Inspection, InspectionDraft, Photo
from inspections.photos import clean_photo
from inspections.services.inspect import (
    VerdictChanged,
    add_draft_photo,
    judge,
    keep_draft,
    sign_batch,
    sign_inspection,
    verdict_digest,
)
from inspections.visual_timing import final_visual_timing, needs_delay
from tests.factory import L, png_bytes
from tests.test_inspect_views import sign


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def _clean():
    import io

    return clean_photo(io.BytesIO(png_bytes((64, 48))))


# --- the verdict fingerprint ---------------------------------------------------------------------------------

def test_signing_refuses_a_verdict_other_than_the_one_shown(make, users):
    weld = make.make_weld(size=L("1/4 in"))
    shown = verdict_digest(judge(weld, {"min_size": L("1/4 in")}, "final"))
    with pytest.raises(VerdictChanged) as refused:
        sign_inspection(weld, {"min_size": L("1/4 in"), "crack": True}, "final", users["inspector"], shown=shown)
    assert not refused.value.verdict.accepted  # the verdict it would have recorded comes back to be shown
    assert not Inspection.objects.exists() and not NCR.objects.exists()
    signed = sign_inspection(weld, {"min_size": L("1/4 in")}, "final", users["inspector"], shown=shown)
    assert signed.accepted and verdict_digest(signed.verdict) == shown


def test_a_page_posted_without_a_shown_verdict_shows_it_first_and_signs_on_the_second_tap(make, client_as):
    weld = make.make_weld(size=L("1/4 in"))
    client = client_as("inspector")
    url = reverse("inspections:inspect_weld", args=[weld.pk])
    first = client.post(url, {"stage": "final", "min_size": "1/8"})
    html = first.content.decode()
    assert first.status_code == 400 and "Check the verdict beside the form" in html
    assert 'data-accepted="no"' in html and not Inspection.objects.exists()
    digest = first.context["digest"]
    second = client.post(url, {"stage": "final", "min_size": "1/8", "shown_verdict": digest})
    assert second.status_code == 302 and not Inspection.objects.get().accepted


# --- photos taken before signing -----------------------------------------------------------------------------

def test_photos_taken_before_signing_are_held_then_attached_when_signed(make, client_as, users):
    weld = make.make_weld(size=L("1/4 in"))
    client = client_as("inspector")
    url = reverse("inspections:inspect_weld", args=[weld.pk])
    from django.core.files.uploadedfile import SimpleUploadedFile

    upload = SimpleUploadedFile("toe.png", png_bytes((64, 48)), content_type="image/png")
    held = client.post(url, {"stage": "final", "min_size": "1/4", "action": "photo", "photo": upload,
                             "photo_caption": "north toe"}, HTTP_HX_REQUEST="true")
    assert held.status_code == 200 and "1 photo held" in held.content.decode()
    photo = DraftPhoto.objects.get()
    assert photo.caption == "north toe" and photo.draft.inspector == users["inspector"]
    assert not Photo.objects.exists() and not Inspection.objects.exists()
    response = sign(client, weld, {"stage": "final", "min_size": "1/4"})
    inspection = Inspection.objects.get()
    assert response.status_code == 302 and inspection.photos.count() == 1
    attached = inspection.photos.get()
    assert attached.caption == "north toe" and attached.sha256 == photo.sha256
    assert not InspectionDraft.objects.exists() and not DraftPhoto.objects.exists()
    assert client.get(reverse("inspections:photo_thumbnail", args=[attached.pk])).status_code == 200


def test_a_bad_photo_is_refused_beside_the_photos_and_nothing_is_signed(make, client_as):
    from django.core.files.uploadedfile import SimpleUploadedFile

    weld = make.make_weld()
    bad = SimpleUploadedFile("notes.png", b"not an image at all", content_type="image/png")
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]),
                                           {"stage": "final", "min_size": "1/4", "photo": bad})
    assert response.status_code == 400 and "notes.png" in response.content.decode()
    assert not Inspection.objects.exists() and not DraftPhoto.objects.exists()


def test_a_held_photo_is_its_inspectors_only(make, client_as, users):
    weld = make.make_weld()
    photo = add_draft_photo(weld, make.make_user("inspector"), _clean())
    assert client_as("inspector").get(reverse("inspections:draft_photo_file", args=[photo.pk])).status_code == 404
    assert client_as("inspector").post(reverse("inspections:draft_photo_remove",
                                               args=[photo.pk])).status_code == 404
    assert DraftPhoto.objects.filter(pk=photo.pk).exists()


# --- drafts ----------------------------------------------------------------------------------------------------

def test_keep_for_later_keeps_a_draft_only_its_inspector_sees(make, client_as, users):
    weld = make.make_weld(mark="W7")
    client = client_as("inspector")
    response = client.post(reverse("inspections:inspect_weld", args=[weld.pk]),
                           {"stage": "final", "min_size": "3/16", "crack": "on", "action": "keep"})
    assert response.status_code == 302 and not Inspection.objects.exists()
    draft = InspectionDraft.objects.get()
    assert draft.inspector == users["inspector"]
    form = client.get(reverse("inspections:inspect_weld", args=[weld.pk])).context["form"]
    assert form.initial["min_size"] == "3/16" and form.initial["crack"] is True
    # The page's own words for the draft, not a bare "W7" that a random CSRF token may also hold.
    shown = f"{weld.assembly.piece_mark} / W7"
    home = client.get(reverse("inspections:inspect_home"))
    assert [d.weld for d in home.context["drafts"]] == [weld] and shown in home.content.decode()
    other = make.make_user("inspector")
    client.force_login(other)
    home = client.get(reverse("inspections:inspect_home"))
    assert home.context["drafts"] == [] and shown not in home.content.decode()
    assert not client.get(reverse("inspections:inspect_weld", args=[weld.pk])).context["form"].initial


def test_throwing_a_draft_away_deletes_it_and_its_photos(make, client_as, users):
    weld = make.make_weld()
    photo = add_draft_photo(weld, users["inspector"], _clean())
    storage, name = photo.image.storage, photo.image.name
    client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]), {"action": "discard"})
    assert not InspectionDraft.objects.exists() and not storage.exists(name)


# --- a pass over identical welds -----------------------------------------------------------------------------

def _identical(make, n=3, **kwargs):
    assembly = make.make_assembly()
    return [make.make_weld(assembly=assembly, mark=f"W{i}", size=L("1/4 in"), length=L("12 in"), **kwargs)
            for i in range(1, n + 1)]


def test_identical_welds_are_signed_in_one_pass_with_one_verdict(make, users):
    welds = _identical(make)
    signed = sign_batch(welds, {"min_size": L("1/4 in")}, "final", users["inspector"])
    assert [i.weld.mark for i in signed] == ["W1", "W2", "W3"]
    assert len({i.batch for i in signed}) == 1 and signed[0].batch is not None
    assert all(i.accepted and i.findings == signed[0].findings for i in signed)


def test_a_rejected_pass_opens_an_ncr_for_each_weld(make, users):
    welds = _identical(make, 2)
    sign_batch(welds, {"min_size": L("1/8 in")}, "final", users["inspector"])
    assert NCR.objects.count() == 2


def test_a_weld_that_is_not_identical_cannot_join_the_pass(make, users):
    welds = _identical(make, 2)
    odd = make.make_weld(assembly=welds[0].assembly, mark="W9", size=L("5/16 in"), length=L("12 in"))
    with pytest.raises(Refused, match="W9 is not identical"):
        sign_batch([*welds, odd], {"min_size": L("1/4 in")}, "final", users["inspector"])
    assert not Inspection.objects.exists()


def test_the_assembly_page_offers_identical_welds_as_one_pass_and_one_can_be_split_out(make, client_as):
    w1, w2, w3 = _identical(make)
    client = client_as("inspector")
    html = client.get(reverse("inspections:inspect_assembly", args=[w1.assembly_id])).content.decode()
    link = reverse("inspections:inspect_weld", args=[w1.pk]) + f"?with={w2.pk},{w3.pk}"
    assert 'data-pass="W1,W2,W3"' in html and link in html
    data = {"stage": "final", "min_size": "1/4", "with": f"{w2.pk},{w3.pk}", "welds": [str(w1.pk), str(w2.pk)]}
    response = sign(client, w1, data)  # W3 split out: left for its own inspection
    assert response.status_code == 302
    assert sorted(Inspection.objects.values_list("weld__mark", flat=True)) == ["W1", "W2"]


def test_after_signing_the_page_offers_the_next_weld(make, client_as):
    w1, w2, w3 = _identical(make)
    make.make_inspection(w2)  # accepted: skipped
    inspection = make.make_inspection(w1)
    html = client_as("inspector").get(inspection.get_absolute_url()).content.decode()
    assert 'data-next="W3"' in html
    last = make.make_inspection(w3)
    html = client_as("inspector").get(last.get_absolute_url()).content.decode()
    assert "No other weld of" in html and "data-next" not in html


# --- the queue ---------------------------------------------------------------------------------------------------

def test_the_queue_lists_what_waits_by_job_and_stage_and_marks_what_is_overdue(make, settings, users):
    settings.LEGWORK_INSPECTION_DUE_DAYS = 2
    job = make.make_job(number="J-9001")
    today = timezone.localdate()
    late = make.make_assembly(job=job, piece_mark="L1")
    make.make_weld(assembly=late, mark="W1", welded_on=today - timedelta(days=5))
    fresh = make.make_assembly(job=job, piece_mark="F1")
    make.make_weld(assembly=fresh, mark="W1", welded_on=today)
    unwelded = make.make_assembly(job=job, piece_mark="U1")
    make.make_weld(assembly=unwelded, mark="W1")
    repaired = make.make_assembly(job=job, piece_mark="R1")
    from inspections.services.ncr import disposition_repair
    from procedures.models.wps import WPSState
    from tests.test_jobs_pages import qualified_welder

    bad = make.make_inspection(make.make_weld(assembly=repaired, mark="W1", welded_on=today), accepted=False)
    disposition_repair(bad.ncrs.get(), users["qa_lead"], make.make_wps(state=WPSState.APPROVED),
                       qualified_welder(make), "re-weld")
    done = make.make_assembly(job=job, piece_mark="D1")
    make.make_inspection(make.make_weld(assembly=done, mark="W1", welded_on=today))
    (found,) = [q for q in queue.waiting() if q.job.number == "J-9001"]
    stages = {s.key: s for s in found.stages}
    assert [a.assembly.piece_mark for a in stages["final"].assemblies] == ["L1", "F1"]  # overdue first
    assert stages["final"].assemblies[0].overdue and not stages["final"].assemblies[1].overdue
    assert [a.assembly.piece_mark for a in stages["fit_up"].assemblies] == ["U1"]
    assert [a.assembly.piece_mark for a in stages["repair"].assemblies] == ["R1"]
    assert found.overdue == 1


def test_the_queue_page_uses_a_fixed_number_of_queries(make, client_as, django_assert_num_queries):
    for n in range(3):
        assembly = make.make_assembly()
        for m in range(n + 1):
            make.make_weld(assembly=assembly, mark=f"W{m}", welded_on=timezone.localdate())
    client = client_as("inspector")
    client.get(reverse("inspections:inspect_queue"))
    with django_assert_num_queries(5):  # session, user, repairs waiting, welds with assembly and job, own drafts
        assert client.get(reverse("inspections:inspect_queue")).status_code == 200


# --- the delayed final visual (D1.1:2020 Table 8.1 note, from memory) ------------------------------------------

@pytest.mark.parametrize("steel, delayed", [
    ("ASTM A514", True), ("A514 Gr B", True), ("ASTM A517", True), ("ASTM A709 Gr HPS 100W", True),
    ("ASTM A709 Gr 100", True), ("ASTM A709 Gr 50", False), ("ASTM A572 Gr 50", False), ("ASTM A36", False),
])
def test_which_steels_wait_48_h(steel, delayed):
    assert needs_delay(steel) is delayed


def test_the_final_visual_of_a514_waits_48_h_after_the_weld_cooled_and_says_when(make, users):
    cooled = timezone.now() - timedelta(hours=47)
    weld = make.make_weld(base_metals="ASTM A514, ASTM A572 Gr 50", completed_at=cooled)
    timing = final_visual_timing(weld.base_metal_list, cooled)
    assert timing.earliest == cooled + timedelta(hours=48)
    assert not timing.allows(cooled + timedelta(hours=47, minutes=59)) and timing.allows(timing.earliest)
    with pytest.raises(Refused, match="it becomes possible at"):
        sign_inspection(weld, {"min_size": weld.size}, "final", users["inspector"])
    in_process = sign_inspection(weld, {"min_size": weld.size}, "in_process", users["inspector"])
    assert in_process.accepted  # only the final visual waits


def test_the_final_visual_of_a514_is_possible_once_48_h_have_passed(make, users):
    weld = make.make_weld(base_metals="ASTM A514", completed_at=timezone.now() - timedelta(hours=48, minutes=1))
    assert sign_inspection(weld, {"min_size": weld.size}, "final", users["inspector"]).accepted


def test_without_a_completion_time_the_end_of_the_weld_day_counts_and_without_a_date_it_is_refused(make, users):
    yesterday = timezone.localdate() - timedelta(days=1)
    weld = make.make_weld(base_metals="ASTM A517", welded_on=yesterday)
    with pytest.raises(Refused, match="becomes possible at"):
        sign_inspection(weld, {"min_size": weld.size}, "final", users["inspector"])
    undated = make.make_weld(base_metals="ASTM A517")
    with pytest.raises(Refused, match="record when the weld was completed"):
        sign_inspection(undated, {"min_size": undated.size}, "final", users["inspector"])
    plain = make.make_weld(base_metals="ASTM A572 Gr 50")
    assert sign_inspection(plain, {"min_size": plain.size}, "final", users["inspector"]).accepted


def test_the_form_says_when_the_final_visual_becomes_possible(make, client_as):
    weld = make.make_weld(base_metals="ASTM A514", completed_at=timezone.make_aware(datetime(2030, 1, 1, 8, 0)))
    html = client_as("inspector").get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert "Final visual not yet." in html and "2030-01-03 08:00" in html


def test_a_draft_keeps_the_pass(make, users):
    w1, w2 = _identical(make, 2)
    draft = keep_draft(w1, users["inspector"], {"with": [str(w2.pk)], "stage": ["final"]})
    assert draft.data["with"] == [str(w2.pk)]


def test_a_held_photo_can_be_taken_out_before_signing(make, client_as, users):
    weld = make.make_weld()
    photo = add_draft_photo(weld, users["inspector"], _clean())
    storage, name = photo.image.storage, photo.image.name
    response = client_as("inspector").post(reverse("inspections:draft_photo_remove", args=[photo.pk]),
                                           HTTP_HX_REQUEST="true")
    assert response.status_code == 200 and "photo held" not in response.content.decode()
    assert not DraftPhoto.objects.exists() and not storage.exists(name)


# --- one vocabulary -----------------------------------------------------------------------------------------------

def test_the_inspection_has_a_column_for_each_observation_of_the_table_and_nothing_else_lists_them(make):
    from inspections import observations
    from inspections.forms.inspect import InspectionForm

    columns = {f.name for f in Inspection._meta.concrete_fields}
    assert {o.name for o in observations.OBSERVATIONS} <= columns
    for o in observations.OBSERVATIONS:
        field = Inspection._meta.get_field(o.name)
        assert o.us_label in str(field.verbose_name)
    iso = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    form = InspectionForm(weld=make.make_weld(assembly=make.make_assembly(job=iso), size=L("6 mm")))
    asked = {o.name for o in observations.asked_by("iso-5817-2014-C")} | set(observations.AT_FIT_UP)
    assert {name for name in form.fields if name in observations.BY_NAME} == asked
    assert form.fields["pores_per_4in"].label == "Pores in the worst 100 mm"  # the table's SI words


def test_what_was_recorded_reads_in_the_tables_words_and_the_jobs_units(make):
    inspection = make.make_inspection(min_size="1/4 in", undercut_depth="1/64 in", arc_strike=True, accepted=False)
    rows = dict(inspection.recorded("US"))
    assert rows == {"Smallest leg measured": '1/4"', "Deepest undercut": '1/64"', "Arc strike": "seen"}


def test_a_nul_typed_into_the_form_is_left_out_of_the_draft(make):
    """PostgreSQL's JSON cannot hold a NUL: the draft keeps what was typed without it (found by the hostile walk)."""
    weld, inspector = make.make_weld(), make.make_user("inspector")
    draft = keep_draft(weld, inspector, {"crack": ["\x00"], "remarks": ["leg \x00short at the north end"],
                                         "min_size": "1/4\x00 in"})
    draft.refresh_from_db()
    assert draft.data == {"crack": [""], "remarks": ["leg short at the north end"], "min_size": "1/4 in"}
