"""Job packets: started after commit, built inline in tests, progress recorded, merged and read back."""

import hashlib
import io

import pytest
from pypdf import PdfReader

from core.errors import Refused
from inspections import packets
from inspections.models import JobPacket, PacketState, Traveler
from tests.pages_travelers import build_assembly

pytestmark = pytest.mark.pdf


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def _job_with(make, n):
    first = build_assembly(make, welds=2, piece_mark="A1")
    for i in range(2, n + 1):
        build_assembly(make, welds=1, job=first.job, piece_mark=f"A{i}")
    return first.job


def test_a_packet_is_enqueued_after_commit_and_built_inline(make, users, django_capture_on_commit_callbacks):
    job = _job_with(make, 2)
    pks = list(job.assemblies.values_list("pk", flat=True))
    with django_capture_on_commit_callbacks(execute=False) as callbacks:
        packet = packets.start_packet(job, pks, users["qa_lead"])
    assert packet.state == PacketState.QUEUED and len(callbacks) == 1  # nothing runs before commit
    callbacks[0]()
    packet.refresh_from_db()
    assert packet.state == PacketState.DONE, packet.error
    assert (packet.progress_done, packet.progress_total, packet.percent) == (5, 5, 100)
    assert packet.task_id
    content = packet.file.read()
    assert hashlib.sha256(content).hexdigest() == packet.sha256
    reader = PdfReader(io.BytesIO(content))
    assert len(reader.pages) == packet.pages
    text = "\n".join(page.extract_text() for page in reader.pages)
    for expected in ("Job packet", "Index", "Traveler · A1", "Traveler · A2", "Open items", job.number):
        assert expected in text, expected
    wps = job.assemblies.first().welds.first().wps
    assert f"WPS {wps.number}" in text
    # The index's page numbers are where each part starts in the merged file.
    titles = [item["title"] for item in packet.index]
    assert titles[0] == "Cover and index" and titles[1].startswith("Traveler A1")
    a2 = next(item for item in packet.index if item["title"].startswith("Traveler A2"))
    assert "Traveler · A2" in reader.pages[a2["first_page"] - 1].extract_text()
    bookmarks = [o.title for o in reader.outline if not isinstance(o, list)]  # one per part, the travelers' own nested
    assert bookmarks[0] == "Cover and index" and any(b.startswith("Traveler A2") for b in bookmarks)
    assert set(packet.travelers.values_list("assembly__piece_mark", flat=True)) == {"A1", "A2"}


def test_a_packet_reuses_travelers_already_issued_for_the_same_records(make, users):
    from inspections.traveler import issue

    job = _job_with(make, 1)
    assembly = job.assemblies.get()
    issued, _ = issue(assembly, users["qa_lead"])
    packet = JobPacket.objects.create(job=job, document_number="PKT-T", assembly_pks=[assembly.pk],
                                      requested_by=users["qa_lead"])
    packets.build_packet(packet.pk)
    packet.refresh_from_db()
    assert packet.state == PacketState.DONE
    assert list(packet.travelers.all()) == [issued] and Traveler.objects.count() == 1


def test_a_failure_marks_the_packet_failed_with_the_reason(make, users, monkeypatch):
    job = _job_with(make, 1)
    packet = JobPacket.objects.create(job=job, document_number="PKT-F", assembly_pks=list(
        job.assemblies.values_list("pk", flat=True)), requested_by=users["qa_lead"])

    def boom(pk):
        raise OSError("disk full")

    monkeypatch.setattr(packets.travelers, "gather", boom)
    packets.build_packet(packet.pk)
    packet.refresh_from_db()
    assert packet.state == PacketState.FAILED and "disk full" in packet.error and packet.finished_at


def test_packet_steps_check_the_stored_state(make, users):
    job = make.make_job()
    packet = JobPacket.objects.create(job=job, document_number="PKT-S", assembly_pks=[], requested_by=users["qa_lead"])
    with pytest.raises(Refused):
        packets.advance(packet, 1, "x")
    packets.start(packet, 3)
    with pytest.raises(Refused):
        packets.start(packet, 3)
    packets.advance(packet, 2, "half")
    packet.refresh_from_db()
    assert (packet.state, packet.progress_done, packet.step, packet.percent) == ("running", 2, "half", 66)
    packets.fail(packet, "stopped")
    with pytest.raises(Refused):
        packets.fail(packet, "again")


def test_it_refuses_assemblies_of_another_job_or_none(make, users):
    job = make.make_job()
    other = make.make_assembly()
    with pytest.raises(packets.Refused):
        packets.start_packet(job, [], users["qa_lead"])
    with pytest.raises(packets.Refused):
        packets.start_packet(job, [other.pk], users["qa_lead"])
    assert not JobPacket.objects.exists()


def test_only_the_qa_lead_may_start_a_packet(make, users):
    from django.core.exceptions import PermissionDenied

    assembly = make.make_assembly()
    for role in ("welding_engineer", "inspector", "viewer"):
        with pytest.raises(PermissionDenied):
            packets.start_packet(assembly.job, [assembly.pk], users[role])
    assert not JobPacket.objects.exists()
