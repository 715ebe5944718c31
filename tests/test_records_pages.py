"""The document check page (a PDF against the sealed records) and the job export (the whole record, JSON + files)."""

import hashlib
import io
import json
import zipfile
from pathlib import Path

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.core.management import CommandError, call_command
from django.urls import reverse

from core import seals
from core.models import Seal
from inspections.models import Inspection, Photo, Weld
from tests import shop_records
from tests.test_seals import tamper

pytestmark = pytest.mark.pdf


@pytest.fixture
def shop(make):
    return shop_records.build(make)


def _check(client, content, name="copy.pdf"):
    return client.post(reverse("inspections:document_check"),
                       {"document": SimpleUploadedFile(name, content, content_type="application/pdf")})


def _media_files(settings):
    return sorted(p for p in Path(settings.MEDIA_ROOT).rglob("*") if p.is_file())


def test_a_traveler_as_issued_matches_its_record_and_seal(shop, client_as, settings):
    traveler = shop["traveler"]
    before = _media_files(settings)
    page = _check(client_as("viewer"), traveler.file.read())
    assert page.status_code == 200
    text = page.text
    assert f"Matches traveler {traveler.document_number}" in text and traveler.sha256 in text
    seal = Seal.objects.get(kind="traveler.issued", record_id=traveler.pk)
    assert f"Sealed as #{seal.sequence}" in text and "still match the seal" in text
    assert _media_files(settings) == before  # nothing of the upload is kept


def test_a_copy_with_other_bytes_matches_nothing(shop, client_as):
    content = shop["traveler"].file.read() + b"\n"
    page = _check(client_as("qa_lead"), content)
    assert page.status_code == 200
    assert "No traveler or packet issued by Legwork has this SHA-256" in page.text
    assert hashlib.sha256(content).hexdigest() in page.text


def test_a_large_upload_is_hashed_in_chunks_and_kept_nowhere(make, client_as, settings):
    content = bytes(range(256)) * (6 * 4096 + 7)  # about 6 MB: past the size Django would spool to a temporary file
    page = _check(client_as("viewer"), content)
    assert page.status_code == 200 and hashlib.sha256(content).hexdigest() in page.text
    assert _media_files(settings) == []


def test_an_upload_past_the_limit_is_refused_beside_the_field(make, client_as, settings):
    settings.LEGWORK_CHECK_MAX_BYTES = 100_000
    page = _check(client_as("viewer"), b"x" * 300_000)
    assert page.status_code == 400 and "larger than" in page.text


def test_an_empty_post_asks_for_the_file(make, client_as):
    page = client_as("qa_lead").post(reverse("inspections:document_check"), {})
    assert page.status_code == 400 and "This field is required" in page.text


def test_a_traveler_whose_record_changed_is_matched_with_the_problem_named(shop, client_as):
    traveler = shop["traveler"]
    tamper("UPDATE inspections_traveler SET pages = %s WHERE id = %s", [99, traveler.pk])
    page = _check(client_as("viewer"), traveler.file.read())
    assert "no longer matches its seal" in page.text and "pages sealed as" in page.text


def test_a_superseded_traveler_says_a_newer_revision_exists(shop, make, client_as):
    from inspections.traveler import issue

    old = shop["traveler"]
    weld = old.assembly.welds.get(mark="W02")
    make.make_inspection(weld, accepted=True, stage="final")
    new, created = issue(old.assembly, shop["qa"])
    assert created
    page = _check(client_as("viewer"), old.file.read())
    assert f"A newer revision, {new.document_number}" in page.text


def test_a_printed_chain_head_is_checked(shop, client_as):
    head = seals.head()
    url = reverse("inspections:document_check")
    good = client_as("viewer").get(url, {"sequence": head.sequence, "sha256": head.chain_sha256.upper()})
    assert "has exactly that hash" in good.text
    wrong = client_as("viewer").get(url, {"sequence": head.sequence, "sha256": "0" * 64})
    assert "has another hash" in wrong.text
    missing = client_as("viewer").get(url, {"sequence": head.sequence + 50, "sha256": "0" * 64})
    assert f"no seal #{head.sequence + 50}" in missing.text
    bad = client_as("viewer").get(url, {"sequence": "x", "sha256": "nope"})
    assert bad.status_code == 200 and "64 characters" in bad.text


def test_a_packet_cover_prints_the_chain_head_and_the_packet_matches(make, client_as):
    from pypdf import PdfReader

    shop = shop_records.build(make, packet=True, issue_traveler=False)
    packet = shop["packet"]
    assert packet.state == "done", packet.error
    content = packet.file.read()
    cover = PdfReader(io.BytesIO(content)).pages[0].extract_text()
    printed = Seal.objects.filter(sealed_at__lt=Seal.objects.get(kind="packet.built").sealed_at).last()
    assert f"seal #{printed.sequence}" in cover and printed.chain_sha256[:20] in cover.replace("\n", "")
    page = _check(client_as("viewer"), content)
    assert f"Matches packet {packet.document_number}" in page.text and "still match the seal" in page.text


# --- export -------------------------------------------------------------------------------------------------------

def _open_export(content):
    archive = zipfile.ZipFile(io.BytesIO(content))
    root = archive.namelist()[0].split("/")[0]
    return archive, root, json.loads(archive.read(f"{root}/export.json"))


def test_a_job_export_holds_every_record_and_file_exactly(shop, client_as):
    job = shop["job"]
    response = client_as("qa_lead").get(reverse("inspections:job_export", args=[job.pk]))
    assert response.status_code == 200 and response["Content-Type"] == "application/zip"
    archive, root, description = _open_export(b"".join(response.streaming_content))
    assert description["format"] == "legwork-job-export 1" and not description["missing_files"]
    tables = {t["name"]: t for t in description["tables"]}
    for table in tables.values():
        member = archive.read(table["path"])
        assert hashlib.sha256(member).hexdigest() == table["sha256"]
    rows = {name: json.loads(archive.read(t["path"])) for name, t in tables.items()}
    assert len(rows["inspections.inspection"]) == Inspection.objects.filter(weld__assembly__job=job).count()
    assert len(rows["inspections.weld"]) == Weld.objects.filter(assembly__job=job).count()
    assert len(rows["inspections.photo"]) == Photo.objects.filter(inspection__weld__assembly__job=job).count()
    inspection = shop["inspection"]
    row = next(r for r in rows["inspections.inspection"] if r["id"] == inspection.pk)
    assert row["min_size"] == f"{inspection.min_size.mm:.7f}"
    assert row["inspected_at"] == inspection.inspected_at.isoformat(timespec="microseconds")
    assert all("password" not in user for user in rows["core.user"])
    assert {u["id"] for u in rows["core.user"]} >= {inspection.inspector_id, shop["qa"].pk}
    # Every file is there with the SHA-256 the records give it.
    for entry in description["files"]:
        assert hashlib.sha256(archive.read(entry["path"])).hexdigest() == entry["sha256"]
    photo = rows["inspections.photo"][0]
    assert photo["image"]["sha256"] == photo["sha256"]
    assert any(f["name"] == photo["image"]["name"] for f in description["files"])
    # The seals come along and can be checked from the export alone.
    exported_seals = rows["core.seal"]
    assert {s["kind"] for s in exported_seals} >= {"inspection.signed", "assembly.released", "traveler.issued"}
    for seal in exported_seals:
        assert hashlib.sha256(seal["content"].encode()).hexdigest() == seal["content_sha256"]
        content = json.loads(seal["content"])
        table = rows[content["record"]]
        record = next(r for r in table if r["id"] == content["id"])
        assert {k: record[k] for k in content["fields"]} == content["fields"]
    assert {e["subject_type"] for e in rows["core.event"]} >= {"inspections.ncr", "inspections.assembly"}
    # The recipe in docs/export-format.md checks every seal from the export alone.
    doc = (Path(__file__).resolve().parent.parent / "docs" / "export-format.md").read_text()
    recipe = {}
    exec(doc.split("```python\n")[1].split("```")[0], recipe)  # noqa: S102 - the documented code, as written
    by_table = {name: {r["id"]: r for r in table} for name, table in rows.items()}
    assert all(recipe["check"](seal, by_table) == {} for seal in exported_seals)
    tamper_row = dict(row, min_size="1.0000000")
    by_table["inspections.inspection"][inspection.pk] = tamper_row
    seal = next(s for s in exported_seals if s["kind"] == "inspection.signed" and s["record_id"] == inspection.pk)
    assert recipe["check"](seal, by_table) == {"min_size": (row["min_size"], "1.0000000")}


def test_a_job_export_holds_the_lots_credentials_gauges_and_repairs_its_welds_name(make, users, client_as):
    from inspections.services import trace
    from inspections.services.ncr import disposition_repair
    from inspections.services.repairs import record_repair

    weld = make.make_sound_weld()
    lot, repair_lot, gauge = make.make_filler_lot(), make.make_filler_lot(), make.make_gauge()
    trace.record_weld_filler(weld, lot, users["inspector"])
    ncr = make.make_inspection(weld, accepted=False, gauge=gauge).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get(), "Grind out and re-weld")
    record_repair(ncr.__class__.objects.get(pk=ncr.pk), users["inspector"], wps=weld.wps,
                  welders=[weld.welders.get()], welded_on=weld.welded_on, filler_lot=repair_lot)
    make.make_filler_lot()  # a lot no weld of the job names: not exported
    response = client_as("qa_lead").get(reverse("inspections:job_export", args=[weld.assembly.job_id]))
    archive, _root, description = _open_export(b"".join(response.streaming_content))
    rows = {t["name"]: json.loads(archive.read(t["path"])) for t in description["tables"]}
    assert {r["id"] for r in rows["inspections.fillerlot"]} == {lot.pk, repair_lot.pk}
    assert [r["filler_lot"] for r in rows["inspections.weldrepair"]] == [repair_lot.pk]
    inspection = weld.inspections.get()
    assert [r["id"] for r in rows["inspections.inspectorcredential"]] == [inspection.credential_id]
    assert [r["id"] for r in rows["inspections.gauge"]] == [gauge.pk]
    assert [r["id"] for r in rows["inspections.gaugecalibration"]] == [inspection.gauge_calibration_id]


def test_export_job_command_writes_the_zip_once(shop, tmp_path, capsys):
    out = tmp_path / "job.zip"
    call_command("export_job", shop["job"].number, "--output", str(out))
    assert "Exported job" in capsys.readouterr().out
    _archive, root, description = _open_export(out.read_bytes())
    assert root == f"legwork-job-{shop['job'].number}" and description["job"]["number"] == shop["job"].number
    with pytest.raises(CommandError, match="exists"):
        call_command("export_job", shop["job"].number, "--output", str(out))
    with pytest.raises(CommandError, match="No job"):
        call_command("export_job", "J-NOPE", "--output", str(tmp_path / "x.zip"))


def test_only_the_qa_lead_sees_the_export_button(make, client_as):
    """The job page's "Export all (zip)": the job's whole record."""
    job = make.make_job()
    url = reverse("inspections:job_export", args=[job.pk])
    assert url in client_as("qa_lead").get(job.get_absolute_url()).text
    assert url not in client_as("viewer").get(job.get_absolute_url()).text
