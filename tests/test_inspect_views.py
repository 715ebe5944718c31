"""The tablet pages: search, the assembly's weld cards, the inspection form with its live preview, signing,
corrections and the inspection page; roles, 404s, nasty inputs and fixed query counts."""

import re

import pytest
from django.urls import reverse

from inspections.models import NCR, Inspection
from tests.factory import L


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def _post(weld, **data):
    return {"stage": "final", **data}


def shown(client, weld, data):
    """The verdict fingerprint the live panel shows for these inputs (what a signing must carry)."""
    html = client.post(reverse("inspections:inspect_preview", args=[weld.pk]), data).content.decode()
    match = re.search(r'name="shown_verdict" id="lw-shown" value="([0-9a-f]*)"', html)
    assert match, html
    return match.group(1)


def sign(client, weld, data, url=None, **kwargs):
    """Sign as the tablet does: the panel shows the verdict, the sign button carries its fingerprint."""
    return client.post(url or reverse("inspections:inspect_weld", args=[weld.pk]),
                       {**data, "shown_verdict": shown(client, weld, data)}, **kwargs)


# --- finding an assembly --------------------------------------------------------------------------------

def test_a_piece_mark_that_names_one_assembly_goes_straight_to_it(make, client_as):
    assembly = make.make_assembly(piece_mark="C17")
    response = client_as("inspector").get(reverse("inspections:inspect_home"), {"q": "c17"})
    assert response.status_code == 302 and response.url == reverse("inspections:inspect_assembly", args=[assembly.pk])


def test_a_partial_mark_lists_the_matches(make, client_as):
    make.make_assembly(piece_mark="C170")
    make.make_assembly(piece_mark="C171")
    response = client_as("viewer").get(reverse("inspections:inspect_home"), {"q": "C17"})
    assert response.status_code == 200
    assert "C170" in response.content.decode() and "C171" in response.content.decode()


def test_an_unknown_mark_says_so(client_as, db):
    response = client_as("viewer").get(reverse("inspections:inspect_home"), {"q": "ZZ9"})
    assert "No assembly has a piece mark" in response.content.decode()


@pytest.mark.parametrize("q", ["x" * 500, "%", "_", "' OR 1=1 --", "\x00"])
def test_nasty_searches_do_not_fail(q, client_as, db):
    response = client_as("viewer").get(reverse("inspections:inspect_home"), {"q": q})
    assert response.status_code == 200 and "<form" in response.content.decode()


# --- the assembly page -----------------------------------------------------------------------------------

def test_the_assembly_page_shows_each_welds_state(make, client_as):
    assembly = make.make_assembly()
    bad = make.make_weld(assembly=assembly, mark="W1")
    good = make.make_weld(assembly=assembly, mark="W2")
    make.make_weld(assembly=assembly, mark="W3")
    make.make_inspection(bad, min_size="1/8 in")
    make.make_inspection(good)
    html = client_as("viewer").get(reverse("inspections:inspect_assembly", args=[assembly.pk])).content.decode()
    assert "Open NCR" in html and "Accepted" in html and "Not inspected" in html
    assert reverse("inspections:inspect_weld", args=[good.pk]) not in html  # a viewer gets no form links


def test_the_assembly_page_uses_the_same_queries_for_2_or_20_welds(make, client_as, django_assert_num_queries):
    def page(n):
        assembly = make.make_assembly()
        for i in range(n):
            weld = make.make_weld(assembly=assembly, mark=f"W{i}", wps=make.make_wps() if i % 2 else None)
            if i % 3 == 0:
                make.make_inspection(weld, min_size="1/8 in" if i % 2 else "1/4 in")
        return reverse("inspections:inspect_assembly", args=[assembly.pk])

    small, large = page(2), page(20)
    client = client_as("inspector")
    client.get(small)  # warm the session
    # session + user, assembly with job, welds with WPS, current inspections, NCRs, the WPSs' next revisions,
    # the inspector's drafts
    with django_assert_num_queries(8):
        assert client.get(small).status_code == 200
    with django_assert_num_queries(8):
        response = client.get(large)
    assert response.content.decode().count("lw-weld-card ") == 20


def test_a_missing_assembly_is_404(client_as, db):
    assert client_as("inspector").get(reverse("inspections:inspect_assembly", args=[999999])).status_code == 404


# --- the form and its live preview ------------------------------------------------------------------------

def test_the_form_reads_fractions_on_a_us_job_with_a_keyboard_that_has_a_slash(make, client_as):
    weld = make.make_weld()
    html = client_as("inspector").get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert 'name="min_size"' in html and 'inputmode="text"' in html
    assert 'hx-post="' + reverse("inspections:inspect_preview", args=[weld.pk]) in html
    # every input and every change (a switch's value does not change when ticked) refreshes the panel
    assert 'hx-trigger="load, input delay:250ms, change"' in html


def test_the_form_brings_up_the_decimal_keypad_on_an_si_job(make, client_as):
    job = make.make_job(unit_system="SI")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("6 mm"))
    html = client_as("inspector").get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert 'inputmode="decimal"' in html


def test_the_preview_judges_and_saves_nothing(make, client_as):
    weld = make.make_weld(size=L("1/4 in"))
    response = client_as("inspector").post(reverse("inspections:inspect_preview", args=[weld.pk]),
                                           _post(weld, min_size="5/32"))
    html = response.content.decode()
    assert response.status_code == 200
    assert 'data-criterion="undersize" data-result="fail"' in html
    assert "<html" not in html  # a partial
    assert Inspection.objects.count() == 0 and NCR.objects.count() == 0


def test_the_preview_turns_pass_when_the_leg_is_full(make, client_as):
    weld = make.make_weld(size=L("1/4 in"))
    html = client_as("inspector").post(reverse("inspections:inspect_preview", args=[weld.pk]),
                                       _post(weld, min_size="1/4")).content.decode()
    assert 'data-criterion="undersize" data-result="pass"' in html and 'data-accepted="yes"' in html


def test_the_preview_shows_input_errors_in_words(make, client_as):
    weld = make.make_weld()
    html = client_as("inspector").post(reverse("inspections:inspect_preview", args=[weld.pk]),
                                       _post(weld, min_size="3/0")).content.decode()
    assert "Smallest leg measured" in html and "0 below the line" in html


def test_the_preview_needs_the_inspector_role(make, client_as):
    weld = make.make_weld()
    response = client_as("viewer").post(reverse("inspections:inspect_preview", args=[weld.pk]), _post(weld))
    assert response.status_code == 403


# --- signing ----------------------------------------------------------------------------------------------

def test_saving_signs_and_shows_the_ncr(make, client_as, users):
    weld = make.make_weld(size=L("1/4 in"))
    response = sign(client_as("inspector"), weld, _post(weld, min_size="1/8", remarks="toe side"), follow=True)
    inspection = Inspection.objects.get()
    ncr = NCR.objects.get()
    assert inspection.inspector == users["inspector"] and inspection.min_size == L("1/8 in")
    html = response.content.decode()
    assert ncr.get_absolute_url() in html and "rejected" in html


NASTY = [
    {"min_size": "abc"}, {"min_size": "1/0"}, {"min_size": "-1/8"}, {"min_size": "0"}, {"min_size": "9" * 60},
    {"min_size": "1e400"}, {"min_size": "NaN"}, {"min_size": "1/4", "pores_per_4in": "-3"},
    {"min_size": "1/4", "pores_per_4in": "99999999999999999999"}, {"min_size": "1/4", "undercut_depth": "5 kg"},
    {"min_size": "1/4", "undersize_length": "13 in"}, {"min_size": "1/4", "stage": "after-lunch"},
    {"min_size": "1/4", "convexity": "200 mm"}, {}, {"min_size": "\x00"},
]


@pytest.mark.parametrize("data", NASTY)
def test_bad_input_gives_a_field_error_and_changes_nothing(data, make, client_as):
    weld = make.make_weld(size=L("1/4 in"), length=L("12 in"))
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[weld.pk]), {"stage": "final",
                                                                                                  **data})
    assert response.status_code == 400
    assert 'class="invalid-feedback' in response.content.decode() or "alert-danger" in response.content.decode()
    assert Inspection.objects.count() == 0 and NCR.objects.count() == 0


@pytest.mark.parametrize("role", ["viewer", "qa_lead", "welding_engineer"])
def test_only_inspectors_sign(role, make, client_as):
    weld = make.make_weld()
    response = client_as(role).post(reverse("inspections:inspect_weld", args=[weld.pk]), _post(weld, min_size="1/4"))
    assert response.status_code == 403 and Inspection.objects.count() == 0


def test_signing_a_missing_weld_is_404(client_as, db):
    response = client_as("inspector").post(reverse("inspections:inspect_weld", args=[999999]), {"min_size": "1/4"})
    assert response.status_code == 404


def test_the_weld_form_uses_a_fixed_number_of_queries(make, client_as, django_assert_num_queries):
    weld = make.make_weld()
    for _ in range(3):
        make.make_inspection(weld)
    make.make_gauge()
    client = client_as("inspector")
    url = reverse("inspections:inspect_weld", args=[weld.pk])
    client.get(url)
    # session, user, weld with assembly, job, client set and WPS, own draft; the inspector's credentials; the
    # gauges with their calibrations (inspections.services.trace)
    with django_assert_num_queries(7):
        client.get(url)


# --- the inspection page and corrections ------------------------------------------------------------------

def test_the_inspection_page_shows_findings_sources_photos_and_the_chain(make, client_as):
    old = make.make_inspection(min_size="1/8 in")
    new = make.make_inspection(old.weld, supersedes=old, reason="misread the gauge", min_size="1/4 in")
    make.make_photo(new)
    html = client_as("viewer").get(reverse("inspections:inspection_detail", args=[new.pk])).content.decode()
    assert "misread the gauge" in html and old.get_absolute_url() in html
    assert "AWS D1.1" in html and reverse("inspections:photo_thumbnail", args=[new.photos.get().pk]) in html
    assert "Record a correction" not in html  # viewers read only
    old_html = client_as("viewer").get(old.get_absolute_url()).content.decode()
    assert "Superseded by" in old_html and new.get_absolute_url() in old_html


def test_the_inspection_page_uses_a_fixed_number_of_queries(make, client_as, django_assert_num_queries):
    inspection = make.make_inspection(min_size="1/8 in")
    for _ in range(3):
        make.make_photo(inspection)
    client = client_as("inspector")
    client.get(inspection.get_absolute_url())
    # session, user, inspection (+ weld, assembly, job, people, neighbours), later link, photos, NCRs, history,
    # next weld
    with django_assert_num_queries(8):
        client.get(inspection.get_absolute_url())


def test_a_correction_through_the_page_supersedes_with_a_reason(make, client_as):
    old = make.make_inspection(min_size="1/8 in")
    client = client_as("inspector")
    url = reverse("inspections:inspection_correct", args=[old.pk])
    form = client.get(url).content.decode()
    assert 'value="1/8&quot;"' in form or 'value="1/8"' in form  # prefilled with what was recorded
    response = sign(client, old.weld, _post(old.weld, min_size="1/4", correction_reason="read the wrong leg"), url=url)
    new = Inspection.objects.get(supersedes=old)
    assert response.status_code == 302 and response.url == new.get_absolute_url()
    assert new.accepted and new.correction_reason == "read the wrong leg"


def test_a_correction_needs_a_reason_and_changes_nothing_without_one(make, client_as):
    old = make.make_inspection(min_size="1/8 in")
    response = sign(client_as("inspector"), old.weld, _post(old.weld, min_size="1/4", correction_reason="   "),
                    url=reverse("inspections:inspection_correct", args=[old.pk]))
    assert response.status_code == 200 and "Say why" in response.content.decode()
    assert Inspection.objects.count() == 1


def test_correcting_a_superseded_inspection_leads_to_the_latest(make, client_as):
    old = make.make_inspection(min_size="1/8 in")
    new = make.make_inspection(old.weld, supersedes=old, reason="first")
    response = client_as("inspector").post(reverse("inspections:inspection_correct", args=[old.pk]),
                                           _post(old.weld, min_size="1/4", reason="second"))
    assert response.status_code == 302 and response.url == new.get_absolute_url()
    assert Inspection.objects.count() == 2


def test_a_missing_inspection_is_404(client_as, db):
    assert client_as("viewer").get(reverse("inspections:inspection_detail", args=[999999])).status_code == 404
    assert client_as("inspector").get(reverse("inspections:inspection_correct", args=[999999])).status_code == 404


def test_a_pass_named_by_an_absurd_id_answers_without_a_server_error(make, client_as):
    """Found by tests/test_hostile_forms.py: a 4,400-digit 'with' id made int() raise (core.inputs.parse_id now)."""
    weld = make.make_sound_weld()
    response = client_as("inspector").get(reverse("inspections:inspect_weld", args=[weld.pk]) + "?with=" + "9" * 4400)
    assert response.status_code == 200
