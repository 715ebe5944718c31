"""Traveler and packet pages: roles, 404s, issue from the page, stored bytes served, progress polled."""

import hashlib

import pytest
from django.urls import reverse

from inspections import packets
from inspections.models import JobPacket, PacketState, Traveler
from inspections.services.welds import revise
from tests.pages_travelers import build_assembly

pytestmark = pytest.mark.pdf


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def test_the_qa_lead_issues_from_the_page_and_both_revisions_are_listed(make, client_as):
    assembly = build_assembly(make, welds=1)
    client = client_as("qa_lead")
    response = client.post(reverse("inspections:traveler_issue", args=[assembly.pk]))
    assert response.status_code == 302
    first = Traveler.objects.get()
    page = client.get(reverse("inspections:traveler_list", args=[assembly.pk])).content.decode()
    assert first.sha256 in page and "Nothing has changed" in page
    client.post(reverse("inspections:traveler_issue", args=[assembly.pk]))
    assert Traveler.objects.count() == 1  # no change, no new revision
    weld = assembly.welds.get()
    weld.count = 2
    revise(weld, make.make_user("qa_lead"), "Drawing revised: two of this weld")
    client.post(reverse("inspections:traveler_issue", args=[assembly.pk]))
    page = client.get(reverse("inspections:traveler_list", args=[assembly.pk])).content.decode()
    assert [t.revision for t in assembly.travelers.all()] == [1, 0]
    for t in assembly.travelers.all():
        assert t.document_number in page and t.sha256 in page


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_other_roles_may_not_issue(role, make, client_as):
    assembly = make.make_assembly()
    response = client_as(role).post(reverse("inspections:traveler_issue", args=[assembly.pk]))
    assert response.status_code == 403 and not Traveler.objects.exists()
    page = client_as(role).get(reverse("inspections:traveler_list", args=[assembly.pk])).content.decode()
    assert "Issue traveler" not in page


def test_download_serves_the_stored_bytes_with_their_hash(make, client_as, users):
    from inspections.traveler import issue, read_stored

    traveler, _ = issue(build_assembly(make, welds=1), users["qa_lead"])
    stored = read_stored(traveler)
    for _ in range(2):
        response = client_as("viewer").get(reverse("inspections:traveler_download", args=[traveler.pk]))
        body = b"".join(response.streaming_content)
        assert body == stored and response["X-Content-SHA256"] == hashlib.sha256(body).hexdigest()
    sidecar = client_as("viewer").get(reverse("inspections:traveler_sha256", args=[traveler.pk])).content.decode()
    assert sidecar == f"{traveler.sha256}  {traveler.filename}\n"


@pytest.mark.parametrize("name", ["traveler_list", "traveler_download", "traveler_sha256", "packet_list",
                                  "packet_detail", "packet_progress", "packet_download"])
def test_missing_records_are_404(name, client_as):
    assert client_as("qa_lead").get(reverse(f"inspections:{name}", args=[999999])).status_code == 404


def test_anonymous_visitors_are_sent_to_log_in(make, client_as):
    assembly = make.make_assembly()
    response = client_as(None).get(reverse("inspections:traveler_list", args=[assembly.pk]))
    assert response.status_code == 302 and response.url.startswith(reverse("login"))


def test_the_packet_page_starts_a_packet_and_polls_until_done(make, client_as, django_capture_on_commit_callbacks):
    assembly = build_assembly(make, welds=1)
    client = client_as("qa_lead")
    page = client.get(reverse("inspections:packet_list", args=[assembly.job.pk])).content.decode()
    assert f'value="{assembly.pk}"' in page and "Build packet" in page
    with django_capture_on_commit_callbacks(execute=True):
        response = client.post(reverse("inspections:packet_start", args=[assembly.job.pk]),
                               {"assemblies": [assembly.pk]})
    packet = JobPacket.objects.get()
    assert response.status_code == 302 and response.url == packet.get_absolute_url()
    assert packet.state == PacketState.DONE, packet.error
    progress = client.get(reverse("inspections:packet_progress", args=[packet.pk])).content.decode()
    assert "hx-trigger" not in progress and "Open PDF" in progress  # polling stops when done
    download = client_as("viewer").get(reverse("inspections:packet_download", args=[packet.pk]))
    assert b"".join(download.streaming_content).startswith(b"%PDF")


def test_a_running_packet_keeps_polling_and_cannot_be_downloaded(make, client_as, users):
    job = make.make_job()
    packet = JobPacket.objects.create(job=job, document_number="PKT-R", assembly_pks=[],
                                      requested_by=users["qa_lead"])
    packets.start(packet, 4)
    packets.advance(packet, 1, "Traveler B1 (1 of 2)")
    progress = client_as("viewer").get(reverse("inspections:packet_progress", args=[packet.pk])).content.decode()
    assert 'hx-trigger="every 1s"' in progress and 'value="25"' in progress and "Traveler B1" in progress
    assert client_as("viewer").get(reverse("inspections:packet_download", args=[packet.pk])).status_code == 404


@pytest.mark.parametrize("data", [{}, {"assemblies": ["x"]}, {"assemblies": ["999999"]}])
def test_bad_packet_choices_are_refused_on_the_page_and_change_nothing(data, make, client_as):
    job = make.make_assembly().job
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]), data)
    assert response.status_code == 400 and not JobPacket.objects.exists()
    assert "alert-danger" in response.content.decode()


# --- a big job's packet: chosen by rule ----------------------------------------------------------------------------

@pytest.fixture
def big_job(make, monkeypatch):
    """A job above the checkbox limit (lowered to 2 here): B1 and B2 in fabrication, C3 awaiting inspection."""
    from inspections.views import travelers

    monkeypatch.setattr(travelers, "CHECKBOXES", 2)
    job = make.make_job()
    marks = {mark: make.make_assembly(job, piece_mark=mark, **({"state": "awaiting_inspection"} if mark == "C3"
                                                                 else {})) for mark in ("B2", "B1", "C3")}
    return job, marks


def test_a_big_job_is_packed_by_rule_and_its_page_weighs_the_same(big_job, make, client_as,
                                                                    django_assert_num_queries):
    job, marks = big_job
    client = client_as("qa_lead")
    page = client.get(reverse("inspections:packet_list", args=[job.pk])).content.decode()
    assert 'name="assemblies"' not in page and "3 assemblies" in page and "Awaiting inspection (1)" in page
    with django_assert_num_queries(5) as few:  # session, user, job, counts by state, packets
        client.get(reverse("inspections:packet_list", args=[job.pk]))
    for i in range(20):
        make.make_assembly(job, piece_mark=f"D{i}")
    with django_assert_num_queries(len(few.captured_queries)):
        client.get(reverse("inspections:packet_list", args=[job.pk]))
    response = client.post(reverse("inspections:packet_start", args=[job.pk]),
                           {"rule": "marks", "marks": "C3,\nB1  B2"})
    packet = JobPacket.objects.get()
    assert response.status_code == 302 and packet.assembly_pks == [marks[m].pk for m in ("B1", "B2", "C3")]
    client.post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "state", "state": "awaiting_inspection"})
    assert JobPacket.objects.latest("pk").assembly_pks == [marks["C3"].pk]


@pytest.mark.parametrize("data, field, words", [
    ({"rule": "marks", "marks": "B1 Z9 Q1"}, "marks", "Not on job"),
    ({"rule": "marks", "marks": " , "}, "marks", "Type the piece marks"),
    ({"rule": "state", "state": ""}, "state", "Choose a state"),
    ({"rule": "state", "state": "scrapped"}, "rule", "No assembly"),
    ({"rule": "every"}, "rule", "Select a valid choice"),
    ({"rule": "marks", "marks": "B1 " * 30_000}, "marks", "at most 64000"),
])
def test_a_bad_rule_is_refused_beside_its_field_and_changes_nothing(big_job, client_as, data, field, words):
    job, _marks = big_job
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]), data)
    assert response.status_code == 400 and not JobPacket.objects.exists()
    assert words.lower() in " ".join(response.context["rule_form"].errors[field]).lower()


def test_typed_piece_marks_match_whatever_their_case(big_job, client_as):
    """Piece marks are unique in a job whatever their case (AssemblyForm.clean_piece_mark), so "b1" typed on a
    tablet is B1, not a mark the job lacks; a mark typed twice in two cases counts once."""
    job, marks = big_job
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]),
                                         {"rule": "marks", "marks": "c3 b1 B1"})
    assert response.status_code == 302
    assert JobPacket.objects.get().assembly_pks == [marks["B1"].pk, marks["C3"].pk]


def test_a_rule_refused_on_a_job_now_small_says_why(make, client_as):
    """A rule posted from a page left open while the job shrank to checkboxes (or typed by hand): the page shows
    the checkboxes, and the refusal above them rather than nowhere."""
    job = make.make_job()
    make.make_assembly(job, piece_mark="B1")
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]),
                                         {"rule": "marks", "marks": "Z9"})
    assert response.status_code == 400 and not JobPacket.objects.exists()
    assert "Not on job" in response.content.decode() and 'name="assemblies"' in response.content.decode()


def test_the_most_piece_marks_a_packet_holds_fit_the_field(big_job, client_as):
    """A packet holds 2,000 assemblies (packets.MAX_ASSEMBLIES) and a piece mark up to 30 characters: that many
    longest marks, comma and space between, fit in the field; the answer names the marks, not the field's length."""
    job, _marks = big_job
    marks = ", ".join(f"{i:04d}".rjust(30, "X") for i in range(packets.MAX_ASSEMBLIES))
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]),
                                         {"rule": "marks", "marks": marks})
    assert response.status_code == 400 and "Not on job" in " ".join(response.context["rule_form"].errors["marks"])


def test_a_packet_over_the_limit_is_refused_with_the_way_out(big_job, client_as, monkeypatch):
    job, _marks = big_job
    monkeypatch.setattr(packets, "MAX_ASSEMBLIES", 2)
    response = client_as("qa_lead").post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "all"})
    assert response.status_code == 400 and "pack the job in parts" in response.content.decode()
    assert not JobPacket.objects.exists()


def test_piece_marks_with_a_space_are_read_whole_or_split(big_job, make, client_as):
    job, marks = big_job
    spaced = make.make_assembly(job, piece_mark="B 101")
    client = client_as("qa_lead")
    client.post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "marks", "marks": "b 101\nB1 C3"})
    assert JobPacket.objects.get().assembly_pks == [spaced.pk, marks["B1"].pk, marks["C3"].pk]


def test_a_job_past_the_packet_limit_offers_one_state_first(big_job, client_as, monkeypatch):
    job, _marks = big_job
    monkeypatch.setattr(packets, "MAX_ASSEMBLIES", 2)
    form = client_as("qa_lead").get(reverse("inspections:packet_list", args=[job.pk])).context["rule_form"]
    assert form["rule"].value() == "state"


def test_build_pressed_twice_queues_one_packet(big_job, client_as, django_capture_on_commit_callbacks):
    job, _marks = big_job
    client = client_as("qa_lead")
    with django_capture_on_commit_callbacks(execute=False):  # no worker yet: the first one stays queued
        first = client.post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "all"})
        second = client.post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "all"})
    packet = JobPacket.objects.get()
    assert first.url == second.url == packet.get_absolute_url() and packet.state == PacketState.QUEUED
    with django_capture_on_commit_callbacks(execute=False):
        client.post(reverse("inspections:packet_start", args=[job.pk]), {"rule": "state", "state": "in_fabrication"})
    assert JobPacket.objects.count() == 2  # other assemblies: another packet


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_other_roles_may_not_start_packets(role, make, client_as):
    assembly = make.make_assembly()
    response = client_as(role).post(reverse("inspections:packet_start", args=[assembly.job.pk]),
                                    {"assemblies": [assembly.pk]})
    assert response.status_code == 403 and not JobPacket.objects.exists()


def test_the_traveler_list_keeps_a_fixed_number_of_queries(make, client_as, django_assert_max_num_queries):
    assembly = build_assembly(make, welds=3)
    client = client_as("viewer")
    with django_assert_max_num_queries(8):
        client.get(reverse("inspections:traveler_list", args=[assembly.pk]))
