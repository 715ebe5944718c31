"""WPS pages: list, detail, drafting with the live review, state changes by role, and read-only records."""

import pytest
from django.urls import reverse

from core.history import history_of
from core.models import Event
from procedures.models.wps import WPS, WPSState
from procedures.services import wps as wps_steps
from tests.factory import L

VALID = {
    "number": "BSW-501", "title": "FCAW fillet, wide-flange connections", "code": "AWS D1.1:2020",
    "unit_system": "US", "basis": "prequalified", "process": "FCAW", "transfer": "", "electrode": "e71t-1c",
    "electrode_diameter": "0.045", "current": "DCEP", "amperage_min": "160", "amperage_max": "220",
    "voltage_min": "22", "voltage_max": "27", "wire_feed_min": "", "wire_feed_max": "",
    "travel_speed_min": "8", "travel_speed_max": "16 in/min", "ctwd_min": "1/2", "ctwd_max": '3/4"',
    "work_angle": "45° ± 10°", "travel_angle": "5° to 15° drag", "technique": "stringer", "passes": "both",
    "interpass_cleaning": "Wire brush, remove slag", "shielding_gas": "100% CO2", "gas_flow_min": "35 cfh",
    "gas_flow_max": "45", "positions": ["F", "H", "V", "OH"], "joint_types": ["fillet"],
    "base_metals": "ASTM A992,  ASTM A572 Gr 50", "thickness_min": "1/4", "thickness_max": "1-1/2 in",
    "fillet_size_min": "3/16", "fillet_size_max": "1/2", "single_pass_size_max": "5/16", "preheat_min": "50 F",
    "interpass_max": "550 F", "notes": "",
}


def _post(client, url, **changes):
    data = {**VALID, **changes}
    return client.post(url, {k: v for k, v in data.items() if v is not None})


# --- list ----------------------------------------------------------------------------------------

def test_the_list_searches_number_title_and_electrode(client_as, make):
    make.make_wps(number="BSW-701", title="GMAW spray, flat fillets", process="GMAW", transfer="spray",
                  electrode="ER70S-6")
    make.make_wps(number="BSW-702", title="Stick, field repairs", process="SMAW", electrode="E7018",
                  electrode_diameter=L("1/8 in"), shielding_gas="")
    client = client_as("inspector")
    for q, expected in [("bsw-701", ["BSW-701"]), ("field repairs", ["BSW-702"]), ("er70s", ["BSW-701"])]:
        page = client.get(reverse("procedures:wps_list"), {"q": q}).context["page"]
        assert [w.number for w in page] == expected


def test_the_list_filters_by_state_process_electrode_and_base_metal(client_as, make):
    make.make_wps(number="BSW-711", state=WPSState.APPROVED)
    make.make_wps(number="BSW-712", process="SMAW", electrode="E7018", electrode_diameter=L("1/8 in"),
                  base_metals="ASTM A36")
    client = client_as("inspector")
    url = reverse("procedures:wps_list")

    def numbers(**params):
        return [w.number for w in client.get(url, params).context["page"]]

    assert numbers(state="approved") == ["BSW-711"]
    assert numbers(process="SMAW") == ["BSW-712"]
    assert numbers(electrode="E7018") == ["BSW-712"]
    assert numbers(base_metal="A36") == ["BSW-712"]
    assert numbers(base_metal="A992") == ["BSW-711"]
    assert sorted(numbers(state="nonsense", process="<script>")) == ["BSW-711", "BSW-712"]


@pytest.mark.parametrize("rows", [1, 30])
def test_the_list_runs_a_fixed_number_of_queries(client_as, make, django_assert_num_queries, rows):
    approver = make.make_user("qa_lead")
    for _ in range(rows):
        wps = make.make_wps()
        wps_steps.submit(wps, make.make_user("welding_engineer"))
        wps_steps.approve(wps, approver)
    client = client_as("inspector")
    # session, user, count, page of rows (approver joined): core.lists
    with django_assert_num_queries(4):
        response = client.get(reverse("procedures:wps_list"))
    assert response.status_code == 200


def test_a_bad_page_number_shows_the_last_page(client_as, make):
    make.make_wps()
    response = client_as("viewer").get(reverse("procedures:wps_list"), {"page": "999999"})
    assert response.status_code == 200


# --- detail --------------------------------------------------------------------------------------

def test_the_detail_shows_variables_in_the_wps_system_with_the_decoded_electrode(client_as, make):
    wps = make.make_wps(thickness_max=L("1-1/2 in"))
    html = client_as("inspector").get(wps.get_absolute_url()).content.decode()
    assert "1/4&quot; to 1-1/2&quot;" in html or '1/4" to 1-1/2"' in html
    assert "AWS A5.20" in html  # decoded electrode
    assert "kJ/in" in html
    assert "Nothing found" in html


def test_the_detail_of_an_si_wps_shows_millimetres(client_as, make):
    wps = make.make_wps(unit_system="SI", thickness_min=L("6 mm"), thickness_max=L("38 mm"))
    html = client_as("inspector").get(wps.get_absolute_url()).content.decode()
    assert "6 mm to 38 mm" in html
    assert "kJ/mm" in html


def test_the_detail_shows_findings_with_their_clause(client_as, make):
    wps = make.make_wps(process="SMAW", electrode="E7018", electrode_diameter=L("1/8 in"), current="DCEN")
    html = client_as("welding_engineer").get(wps.get_absolute_url()).content.decode()
    assert "runs on AC, DCEP, not DCEN" in html
    assert "AWS A5.1" in html
    assert "Cannot be submitted yet" in html


def test_a_missing_wps_is_404(client_as):
    assert client_as("viewer").get(reverse("procedures:wps_detail", args=[999999])).status_code == 404


def test_buttons_follow_the_role(client_as, make):
    submitted = make.make_wps(state=WPSState.SUBMITTED)
    assert b"Approve" in client_as("qa_lead").get(submitted.get_absolute_url()).content
    assert b">Approve<" not in client_as("welding_engineer").get(submitted.get_absolute_url()).content
    approved = make.make_wps(state=WPSState.APPROVED)
    make.use_on_job(wps=approved)  # so the customer's viewer may read it
    assert b"Start a new revision" in client_as("welding_engineer").get(approved.get_absolute_url()).content
    assert b"Withdraw" in client_as("qa_lead").get(approved.get_absolute_url()).content
    viewer_page = client_as("viewer").get(approved.get_absolute_url()).content
    assert b"Start a new revision" not in viewer_page and b"Withdraw" not in viewer_page


def test_the_approve_button_explains_why_it_cannot_be_pressed(client_as, make):
    wps = make.make_wps(state=WPSState.SUBMITTED, via_steps=False, basis="test")
    html = client_as("qa_lead").get(wps.get_absolute_url()).content.decode()
    assert "Cannot be approved" in html and "no supporting PQR" in html
    assert "disabled" in html


# --- create and edit ---------------------------------------------------------------------------------

def test_the_engineer_drafts_a_wps(client_as, users):
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_create"))
    wps = WPS.objects.get(number="BSW-501")
    assert response.status_code == 302 and response.url == wps.get_absolute_url()
    assert wps.state == WPSState.DRAFT and wps.revision == 0
    assert wps.electrode == "E71T-1C"  # normalised by the decoder
    assert wps.electrode_diameter == L("0.045 in") and wps.travel_speed_min.in_per_min == 8
    assert wps.positions == "F, H, V, OH" and wps.base_metals == "ASTM A992, ASTM A572 Gr 50"
    assert wps.created_by == users["welding_engineer"]
    assert history_of(wps).get().to_state == WPSState.DRAFT


def test_bare_lengths_are_read_in_millimetres_on_an_si_wps(client_as):
    _post(client_as("welding_engineer"), reverse("procedures:wps_create"), unit_system="SI", thickness_min="6",
          thickness_max="38", electrode_diameter="1.2", fillet_size_min="5", fillet_size_max="12",
          single_pass_size_max="8", ctwd_min="15", ctwd_max="20", preheat_min="10 C", interpass_max="290 C",
          travel_speed_min="200", travel_speed_max="400", gas_flow_min="16 L/min", gas_flow_max="20")
    wps = WPS.objects.get(number="BSW-501")
    assert wps.thickness_max == L("38 mm") and wps.electrode_diameter == L("1.2 mm")


@pytest.mark.parametrize("field, value, message", [
    ("preheat_min", "50 K", "not a temperature unit"),
    ("electrode", "E70Z8", "E70Z8"),
    ("electrode", "", "required"),
    ("amperage_min", "300", "The minimum is above the maximum"),
    ("thickness_min", "2 in", "The minimum is above the maximum"),
    ("travel_speed_min", "-8", "cannot be negative"),
    ("amperage_min", "-5", "negative"),
    ("voltage_max", "0", "zero"),
    ("amperage_max", "NaN", "number"),
    ("thickness_max", "1e9", "exponent"),
    ("thickness_max", "3/0 in", "0 below the line"),
    ("electrode_diameter", "x" * 200, "too long"),
    ("positions", [], "required"),
    ("process", "OFW", "valid choice"),
    ("transfer", "", "transfer mode"),
])
def test_bad_input_is_refused_beside_its_field_and_saves_nothing(client_as, field, value, message):
    changes = {field: value}
    if field == "transfer":
        changes.update(process="GMAW", electrode="ER70S-6")
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_create"), **changes)
    assert response.status_code == 200
    errors = response.context["form"].errors
    assert field in errors, errors
    assert message.lower() in " ".join(errors[field]).lower()
    assert not WPS.objects.exists() and not Event.objects.filter(subject_type__model="wps").exists()


def test_the_electrode_message_says_which_part_is_wrong(client_as):
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_create"), electrode="E7019")
    assert response.status_code == 200
    assert "E7019" in response.context["form"].errors["electrode"][0]


def test_a_number_in_use_is_refused(client_as, make):
    make.make_wps(number="BSW-501")
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_create"))
    assert "already exists" in response.context["form"].errors["number"][0]
    assert WPS.objects.count() == 1


def test_the_engineer_edits_a_draft(client_as, make):
    wps = make.make_wps(number="BSW-501")
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_edit", args=[wps.pk]),
                     title="Edited title", opened_version=wps.version)
    assert response.status_code == 302
    wps.refresh_from_db()
    assert wps.title == "Edited title"


def test_the_edit_form_shows_the_stored_values_in_the_wps_system(client_as, make):
    wps = make.make_wps()
    html = client_as("welding_engineer").get(reverse("procedures:wps_edit", args=[wps.pk])).content.decode()
    assert 'value="1-1/2&quot;"' in html  # thickness max
    assert 'value="50 F"' in html


@pytest.mark.parametrize("state", [WPSState.SUBMITTED, WPSState.APPROVED, WPSState.SUPERSEDED,
                                   WPSState.WITHDRAWN])
def test_a_record_past_draft_cannot_be_edited_by_form(client_as, make, state):
    wps = make.make_wps(number="BSW-501", state=state)
    client = client_as("welding_engineer")
    url = reverse("procedures:wps_edit", args=[wps.pk])
    assert client.get(url).status_code == 302
    response = _post(client, url, title="Changed", opened_version=wps.version)  # a crafted post
    assert response.status_code == 409
    assert "cannot be changed" in " ".join(response.context["form"].non_field_errors())
    assert response.context["form"]["title"].value() == "Changed"  # the input stays on the page
    wps.refresh_from_db()
    assert wps.title != "Changed"


def test_an_approved_wps_cannot_be_changed_in_the_admin(client, make):
    admin_user = make.make_user("qa_lead", is_staff=True, is_superuser=True)
    client.force_login(admin_user)
    wps = make.make_wps(state=WPSState.APPROVED)
    url = reverse("admin:procedures_wps_change", args=[wps.pk])
    page = client.get(url)
    assert page.status_code == 200 and b'name="_save"' not in page.content  # view only
    response = client.post(url, {"title": "Changed in the admin", "number": wps.number})
    assert response.status_code == 403
    delete = client.post(reverse("admin:procedures_wps_delete", args=[wps.pk]), {"post": "yes"})
    assert delete.status_code == 403
    wps.refresh_from_db()
    assert wps.title != "Changed in the admin"


# --- the live review panel -------------------------------------------------------------------------

def test_the_review_panel_answers_what_is_typed(client_as):
    client = client_as("welding_engineer")
    response = _post(client, reverse("procedures:wps_review"), process="SMAW", electrode="E7018",
                     electrode_diameter="1/8", current="DCEN", shielding_gas="")
    html = response.content.decode()
    assert response.status_code == 200
    assert "<html" not in html  # a partial
    assert "runs on AC, DCEP, not DCEN" in html and "AWS A5.1" in html
    assert not WPS.objects.exists()


def test_the_review_panel_lists_entries_to_fix_and_never_fails(client_as):
    client = client_as("welding_engineer")
    response = _post(client, reverse("procedures:wps_review"), preheat_min="50 K", thickness_max="lots",
                     amperage_min="1e99", electrode="??", process="")
    assert response.status_code == 200
    html = response.content.decode()
    assert "to fix" in html and "not a temperature unit" in html
    # errors to fix never sit under a green "nothing stands in the way", and no field is named None
    assert "Nothing stands in the way of approval" not in html and "Not ready for approval" in html
    response = client.post(reverse("procedures:wps_review"), {})
    assert response.status_code == 200
    html = response.content.decode()
    assert "None:" not in html and "Positions: This field is required" in html


def test_the_review_panel_of_a_draft_counts_the_pqrs_ticked(client_as, make):
    wps = make.make_wps(number="BSW-501", basis="test")
    pqr = make.make_pqr()
    client = client_as("welding_engineer")
    url = reverse("procedures:wps_review_draft", args=[wps.pk])
    assert "no supporting PQR" in _post(client, url, basis="test").content.decode()
    assert "no supporting PQR" not in _post(client, url, basis="test", pqrs=[pqr.pk]).content.decode()
    assert not wps.pqrs.exists()


def test_the_review_panel_refuses_other_roles_and_non_drafts(client_as, make):
    assert _post(client_as("viewer"), reverse("procedures:wps_review")).status_code == 403
    approved = make.make_wps(state=WPSState.APPROVED)
    response = _post(client_as("welding_engineer"), reverse("procedures:wps_review_draft", args=[approved.pk]))
    assert response.status_code == 403


def test_the_form_carries_the_htmx_review_trigger(client_as):
    html = client_as("welding_engineer").get(reverse("procedures:wps_create")).content.decode()
    assert 'hx-post="/procedures/wps/review/"' in html
    assert 'hx-trigger="input changed delay:400ms' in html
    assert "csrfmiddlewaretoken" in html


# --- state changes through the pages ---------------------------------------------------------------

def test_submit_approve_through_the_pages(client_as, make, users):
    wps = make.make_wps()
    assert client_as("welding_engineer").post(reverse("procedures:wps_submit", args=[wps.pk])).status_code == 302
    assert client_as("qa_lead").post(reverse("procedures:wps_approve", args=[wps.pk])).status_code == 302
    wps.refresh_from_db()
    assert wps.state == WPSState.APPROVED and wps.approved_by == users["qa_lead"]


@pytest.mark.parametrize("name, state, allowed", [
    ("procedures:wps_submit", WPSState.DRAFT, "welding_engineer"),
    ("procedures:wps_approve", WPSState.SUBMITTED, "qa_lead"),
    ("procedures:wps_new_revision", WPSState.APPROVED, "welding_engineer"),
])
def test_state_change_posts_refuse_every_other_role(client_as, make, name, state, allowed):
    wps = make.make_wps(state=state)
    for role in ("welding_engineer", "inspector", "qa_lead", "viewer"):
        if role != allowed:
            assert client_as(role).post(reverse(name, args=[wps.pk])).status_code == 403, role
    assert WPS.objects.get(pk=wps.pk).state == state and WPS.objects.count() == 1
    assert client_as(allowed).post(reverse(name, args=[999999])).status_code == 404


def test_approving_a_wps_with_an_error_finding_through_the_page_changes_nothing(client_as, make):
    wps = make.make_wps(state=WPSState.SUBMITTED, via_steps=False, process="SMAW", electrode="E7018",
                        electrode_diameter=L("1/8 in"), current="DCEN")
    client = client_as("qa_lead")
    response = client.post(reverse("procedures:wps_approve", args=[wps.pk]), follow=True)
    assert "Cannot approve" in response.content.decode()
    wps.refresh_from_db()
    assert wps.state == WPSState.SUBMITTED and not history_of(wps).filter(action="state").exists()


def test_a_new_revision_opens_its_draft_and_approval_supersedes(client_as, make):
    old = make.make_wps(number="BSW-501", state=WPSState.APPROVED)
    response = client_as("welding_engineer").post(reverse("procedures:wps_new_revision", args=[old.pk]))
    new = WPS.objects.get(number="BSW-501", revision=1)
    assert response.url == reverse("procedures:wps_edit", args=[new.pk])
    _post(client_as("welding_engineer"), response.url, number="IGNORED", amperage_max="210",
          opened_version=new.version)
    new.refresh_from_db()
    assert new.number == "BSW-501" and new.amperage_max == 210
    client_as("welding_engineer").post(reverse("procedures:wps_submit", args=[new.pk]))
    client_as("qa_lead").post(reverse("procedures:wps_approve", args=[new.pk]))
    old.refresh_from_db()
    new.refresh_from_db()
    assert (old.state, new.state) == (WPSState.SUPERSEDED, WPSState.APPROVED)
    html = client_as("inspector").get(old.get_absolute_url()).content.decode()
    assert "Superseded" in html and "Superseded by revision 1" in html


def test_withdraw_asks_for_a_reason_beside_the_field(client_as, make):
    wps = make.make_wps(state=WPSState.APPROVED)
    client = client_as("qa_lead")
    url = reverse("procedures:wps_withdraw", args=[wps.pk])
    response = client.post(url, {"reason": "   "})
    assert response.status_code == 200 and "reason" in response.context["form"].errors
    assert WPS.objects.get(pk=wps.pk).state == WPSState.APPROVED
    assert client.post(url, {"reason": "Replaced by the SAW procedure"}).status_code == 302
    wps.refresh_from_db()
    assert wps.state == WPSState.WITHDRAWN
    event = history_of(wps).last()
    assert (event.reason, event.from_state, event.to_state) == ("Replaced by the SAW procedure", "approved",
                                                               "withdrawn")
    assert client.get(url).status_code == 302  # nothing left to withdraw


def test_the_qa_lead_returns_a_submission_to_the_engineer(client_as, make):
    wps = make.make_wps(state=WPSState.SUBMITTED)
    client = client_as("qa_lead")
    client.post(reverse("procedures:wps_return", args=[wps.pk]), {"reason": "Add the interpass maximum"})
    wps.refresh_from_db()
    assert wps.state == WPSState.DRAFT
    assert "Add the interpass maximum" in client.get(wps.get_absolute_url()).content.decode()
