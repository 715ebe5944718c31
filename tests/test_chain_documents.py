"""What the documents say about the chain: the traveler never contradicts itself, the packet cover counts the
released assemblies, the WPS page shows what its PQRs support."""

import io

import pytest
from django.urls import reverse
from django.utils import timezone
from pypdf import PdfReader

from inspections import packets
from inspections.models import WeldRepair
from inspections.services.assemblies import release
from inspections.services.ncr import disposition_repair
from inspections.services.repairs import record_repair
from inspections.traveler import gather, issue
from procedures.models.wps import WPSState

TODAY = timezone.localdate()
pytestmark = pytest.mark.pdf


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def _text(content):
    return "\n".join(page.extract_text() for page in PdfReader(io.BytesIO(content)).pages)


def released_assembly(make, users, piece_mark="R1", job=None):
    assembly = make.make_assembly(piece_mark=piece_mark, job=job or make.make_job())
    weld = make.make_sound_weld(assembly=assembly, mark="W1")
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    repairer = make.make_qualified_welder(stamp=f"R-{piece_mark}")
    disposition_repair(ncr, users["qa_lead"], weld.wps, repairer)
    record_repair(ncr, users["inspector"], wps=weld.wps, welders=[repairer], welded_on=TODAY)
    make.make_inspection(weld, accepted=True)
    release(assembly, users["qa_lead"])
    return assembly


def test_a_released_traveler_has_no_open_items(make, users):
    assembly = released_assembly(make, users)
    snapshot = gather(assembly.pk)
    assert snapshot["open_items"] == [] and not any(c.startswith("NOT RELEASED") for c in snapshot["cautions"])
    assert all(h["done"] for h in snapshot["hold_points"])
    repair = WeldRepair.objects.get(weld__assembly=assembly)
    assert snapshot["welds"][0]["repairs"][0]["welders"] == [{"stamp": f"R-{assembly.piece_mark}", "allowed": True}]
    assert {w["stamp"] for w in snapshot["welders_used"]} >= {repair.welders.get().stamp}
    text = _text(issue(assembly, users["qa_lead"])[0].file.read())
    assert "State Released" in text and "NOT RELEASED" not in text and "repaired" in text and "by R-R1" in text


def test_a_traveler_before_release_says_what_is_still_open(make, users):
    assembly = make.make_assembly()
    weld = make.make_sound_weld(assembly=assembly, mark="W1", wps=make.make_wps())  # a draft WPS
    make.make_inspection(weld, accepted=True)
    snapshot = gather(assembly.pk)
    assert len(snapshot["open_items"]) == 2
    assert "is draft: it was never approved" in snapshot["open_items"][0]
    assert snapshot["open_items"][1] == "The assembly is not released (awaiting inspection)."
    assert snapshot["cautions"][0].startswith("NOT RELEASED: 2 open items")
    assert snapshot["welds"][0]["wps_ok"] is False
    text = _text(issue(assembly, users["qa_lead"])[0].file.read())
    assert "NOT RELEASED" in text and "not approved" in text


def test_the_traveler_holds_the_fit_up_only_where_the_job_does(make, users):
    held = make.make_assembly(job=make.make_job(fit_up_hold_point=True))
    make.make_inspection(make.make_sound_weld(assembly=held), accepted=True)
    fit_up = gather(held.pk)["hold_points"][0]
    assert fit_up["name"] == "Fit-up" and not fit_up["done"] and "a hold point on this job" in fit_up["status"]
    free = make.make_assembly()
    make.make_inspection(make.make_sound_weld(assembly=free), accepted=True)
    assert gather(free.pk)["hold_points"][0]["done"]


def test_the_packet_cover_counts_released_and_not_released_assemblies(make, users,
                                                                     django_capture_on_commit_callbacks):
    first = released_assembly(make, users, "R1")
    waiting = make.make_assembly(job=first.job, piece_mark="W9")
    make.make_sound_weld(assembly=waiting)
    with django_capture_on_commit_callbacks(execute=True):
        packet = packets.start_packet(first.job, [first.pk, waiting.pk], users["qa_lead"])
    packet.refresh_from_db()
    assert packet.state == "done", packet.error
    text = _text(packet.file.read())
    assert "2: 1 released, 1 not released (W9)" in text and "1 released, 1 not released." in text


def test_the_wps_page_shows_what_its_pqrs_support(client_as, make):
    wps = make.make_wps(basis="test")
    wps.pqrs.add(make.make_pqr(number="PQR-7100"))
    page = client_as("inspector").get(wps.get_absolute_url())
    assert "What the PQRs support" in page.text
    envelope, error = wps.support_envelope()
    assert error == "" and [joint for joint, _ in envelope] == ["fillet"]
    rows = {row.label: row for row in envelope[0][1]}
    assert rows["Welding process"].supported_by == "PQR-7100" and rows["Welding process"].severity is None
    assert rows["Welding positions"].severity == "error" and "1F for F" in rows["Welding positions"].message
    assert "Table 6.1" in page.text and "supported" in page.text


def test_a_wps_whose_pqrs_do_not_support_it_cannot_be_submitted_or_approved(make, users):
    from core.errors import Refused
    from procedures.services import wps as steps

    wps = make.make_wps(basis="test")
    wps.pqrs.add(make.make_pqr())
    with pytest.raises(Refused, match="PQR-.* \\(3F\\) qualifies V"):
        steps.submit(wps, users["welding_engineer"])
    submitted = make.make_wps(basis="test")
    submitted.pqrs.add(make.make_pqr())
    make.put(submitted, state=WPSState.SUBMITTED)  # submitted before its PQRs were checked
    with pytest.raises(Refused, match="Cannot approve"):
        steps.approve(submitted, users["qa_lead"])
    supported = make.make_tested_wps(state=WPSState.APPROVED)  # the same PQR, a WPS inside it
    assert supported.state == WPSState.APPROVED


def test_an_iso_wps_is_judged_by_the_iso_ranges(make):
    pqr = make.make_pqr(code="ISO 15609-1:2019", unit_system="SI", process="GMAW", transfer="spray",
                        electrode="ER70S-6", position="PB", shielding_gas="M21", base_metal="EN 10025-2 S355J2")
    wps = make.make_wps(code="ISO 15609-1:2019", unit_system="SI", basis="test", process="GMAW", transfer="spray",
                        electrode="ER70S-6", shielding_gas="M21", positions="F, H", base_metals="EN 10025-2 S355J2")
    wps.pqrs.add(pqr)
    sources = {f.source for f in wps.findings() if f.field in ("thickness_max", "thickness_min", "heat_input")}
    assert any(source.startswith("ISO 15614-1:2017") and "from memory" in source for source in sources)


def test_a_pqr_without_a_preheat_cannot_support_a_wps(make):
    wps = make.make_tested_wps(pqr=make.make_pqr(preheat=None))
    finding = next(f for f in wps.findings() if f.rule == "support_unreadable")
    assert finding.severity == "error" and "preheat" in finding.message
    assert reverse("procedures:wps_detail", args=[wps.pk]) == wps.get_absolute_url()
