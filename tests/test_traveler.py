"""Travelers: gathered in fixed queries, rendered for real, read back with pypdf, issued once per change."""

import base64
import hashlib
import io
import re

import pytest
import segno
from django.core.files.storage import default_storage
from PIL import Image
from pypdf import PdfReader

from core.errors import RecordLocked
from core.units import parse_length
from inspections import traveler as traveler_module
from inspections.models import Traveler
from inspections.services.welds import revise
from inspections.traveler import assembly_url, fingerprint, gather, issue, read_stored
from tests.pages_travelers import build_assembly

pytestmark = pytest.mark.pdf


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def pdf_text(content: bytes) -> tuple[str, int]:
    reader = PdfReader(io.BytesIO(content))
    return "\n".join(page.extract_text() for page in reader.pages), len(reader.pages)


def test_it_gathers_three_and_twenty_welds_in_the_same_number_of_queries(make, django_assert_num_queries):
    small = build_assembly(make, welds=3, photos=1)
    large = build_assembly(make, welds=20, photos=4, job=small.job)
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    with CaptureQueriesContext(connection) as small_queries:
        gather(small.pk)
    with django_assert_num_queries(len(small_queries)):
        snapshot = gather(large.pk)
    assert len(snapshot["welds"]) == 20
    assert len(small_queries) <= 12  # assembly, welds, welders, 2 status, fit-up, photos, 2-3 welder records


def test_a_traveler_prints_the_header_welds_wps_and_page_numbers(make, users):
    assembly = build_assembly(make, welds=3, photos=1, piece_mark="B12", drawing="E-212", drawing_revision="3")
    traveler, created = issue(assembly, users["qa_lead"])
    assert created
    content = read_stored(traveler)
    text, pages = pdf_text(content)
    assert traveler.pages == pages
    for expected in ("Traveler · B12", assembly.job.number, assembly.job.customer.name, "E-212 rev 3", "W01", "W02",
                     "W03", f"{assembly.welds.first().wps.number} rev 0", "Caution", "ANSI Z49.1",
                     traveler.document_number, f"Page 1 of {pages}", traveler.snapshot_sha256[:16]):
        assert expected in text, expected
    assert "NOT RELEASED" in text  # the assembly is awaiting release, and the traveler says so


def test_the_stored_sha256_is_the_hash_of_the_file_and_of_its_sidecar(make, users):
    traveler, _ = issue(build_assembly(make, welds=1), users["qa_lead"])
    content = read_stored(traveler)
    assert traveler.sha256 == hashlib.sha256(content).hexdigest()
    with default_storage.open(traveler.file.name + ".sha256") as sidecar:
        assert sidecar.read().decode() == f"{traveler.sha256}  {traveler.filename}\n"
    assert traveler.size_bytes == len(content)


def test_issuing_again_without_a_change_hands_back_the_same_revision_and_bytes(make, users, monkeypatch):
    assembly = build_assembly(make, welds=2)
    first, _ = issue(assembly, users["qa_lead"])
    monkeypatch.setattr(traveler_module, "render", lambda *a, **k: pytest.fail("re-rendered an issued traveler"))
    again, created = issue(assembly, users["qa_lead"])
    assert not created and again.pk == first.pk
    assert read_stored(again) == read_stored(first)


def test_a_change_after_issue_makes_the_next_issue_a_new_revision(make, users):
    assembly = build_assembly(make, welds=2)
    first, _ = issue(assembly, users["qa_lead"])
    weld = assembly.welds.order_by("mark").last()
    weld.size = parse_length("5/16 in")
    revise(weld, users["qa_lead"], "Drawing E-204 rev 3: 5/16 leg")
    second, created = issue(assembly, users["qa_lead"])
    assert created and (first.revision, second.revision) == (0, 1)
    assert second.document_number.endswith("-R1") and second.sha256 != first.sha256
    assert list(assembly.travelers.values_list("revision", flat=True)) == [1, 0]
    text, _ = pdf_text(read_stored(second))
    assert "5/16\"" in text and "(revision 1)" in text


def test_an_issued_traveler_is_never_edited_or_deleted(make, users):
    traveler, _ = issue(build_assembly(make, welds=1), users["qa_lead"])
    with pytest.raises(RecordLocked):
        traveler.save()
    with pytest.raises(RecordLocked):
        traveler.delete()
    with pytest.raises(RecordLocked):
        Traveler.objects.filter(pk=traveler.pk).update(pages=9)


def test_only_the_qa_lead_may_issue(make, users):
    from django.core.exceptions import PermissionDenied

    assembly = build_assembly(make, welds=1)
    for role in ("welding_engineer", "inspector", "viewer"):
        with pytest.raises(PermissionDenied):
            issue(assembly, users[role])
    assert not Traveler.objects.exists()


def test_the_qr_code_carries_the_assembly_url_and_is_embedded(make, users, monkeypatch, settings):
    settings.LEGWORK_BASE_URL = "http://127.0.0.1:8160/"
    assembly = build_assembly(make, welds=1)
    encoded = []
    real = traveler_module.qr_data_uri
    monkeypatch.setattr(traveler_module, "qr_data_uri", lambda payload: encoded.append(payload) or real(payload))
    traveler, _ = issue(assembly, users["qa_lead"])
    url = f"http://127.0.0.1:8160/inspections/a/{assembly.pk}/"
    assert assembly_url(assembly.pk) == url and encoded == [url] and traveler.snapshot["url"] == url
    # The QR code is a small PNG whose modules are exactly segno's matrix for the URL (so it scans as the URL).
    uri = real(url)
    assert uri.startswith("data:image/png;base64,")
    with Image.open(io.BytesIO(base64.b64decode(uri.split(",", 1)[1]))) as image:
        png = image.convert("1")
    matrix = segno.make(url, error="m").matrix
    scale, border = traveler_module.QR_SCALE, 2
    assert png.size == ((len(matrix) + 2 * border) * scale,) * 2
    for row, modules in enumerate(matrix):
        for col, dark in enumerate(modules):
            pixel = png.getpixel(((col + border) * scale + scale // 2, (row + border) * scale + scale // 2))
            assert (pixel == 0) == bool(dark), (row, col)
    reader = PdfReader(io.BytesIO(read_stored(traveler)))
    first = reader.pages[0]
    assert url in first.extract_text().replace("\n", "")
    # Embedded on the first page as that very image: same pixel size, black and white, not interpolated.
    qr_images = [img for img in first.images if img.image.size == png.size]
    assert len(qr_images) == 1
    assert qr_images[0].image.convert("1").tobytes() == png.tobytes()
    xobjects = [x.get_object() for x in first["/Resources"]["/XObject"].values()]
    (qr_xobject,) = [x for x in xobjects if x.get("/Subtype") == "/Image" and x.get("/Width") == png.size[0]]
    assert qr_xobject["/Interpolate"].value is False  # image-rendering: pixelated keeps the module edges sharp


def test_photos_are_embedded_downscaled_and_captioned(make, users):
    assembly = build_assembly(make, welds=2, photos=2)
    traveler, _ = issue(assembly, users["qa_lead"])
    reader = PdfReader(io.BytesIO(read_stored(traveler)))
    qr_png = traveler_module.qr_data_uri(traveler.snapshot["url"]).split(",", 1)[1]
    with Image.open(io.BytesIO(base64.b64decode(qr_png))) as qr:
        qr_size = qr.size
    images = [image for page in reader.pages for image in page.images if image.image.size != qr_size]  # not the QR
    assert len(images) == 2
    assert all(max(image.image.size) <= traveler_module.PHOTO_MAX_PX for image in images)
    assert "Photos" in reader.pages[-1].extract_text() or "Photos" in pdf_text(read_stored(traveler))[0]


def test_welder_qualification_is_judged_on_the_weld_date(make, users):
    assembly = build_assembly(make, welds=1)
    snapshot = gather(assembly.pk)
    welder = snapshot["welds"][0]["welders"][0]
    assert welder["allowed"] is True
    weld = assembly.welds.get()
    weld.welded_on = None
    revise(weld, users["qa_lead"], "The weld date was not known")
    welder = gather(assembly.pk)["welds"][0]["welders"][0]
    assert welder["allowed"] is None  # undated: not judged on "today", which would change by itself
    assert any("no weld date" in item for item in gather(assembly.pk)["open_items"])


def test_capacity_is_summarised_where_a_required_strength_is_given(make, users):
    assembly = build_assembly(make, welds=2, required_every=2)
    capacity = gather(assembly.pk)["capacity"]
    assert [row["mark"] for row in capacity] == ["W01"]
    row = capacity[0]
    # W01 was measured at 3/16 in against a 1/4 in leg: the as-inspected figure is smaller than as specified.
    # AISC Manual 15th ed. Part 8, 1.392 D kip/in (E70, LRFD): 12 in at D = 4 is 66.8 kip, at D = 3 is 50.1 kip.
    assert (row["specified"], row["as_inspected"], row["required"]) == ("66.81 kip", "50.11 kip", "40 kip (177.93 kN)")
    assert row["ratio"] == "0.798" and row["ok"] is True  # as the calculation sheet prints it
    assert "AISC 360-16 J2.4" in row["source"]


def test_open_items_and_cautions_are_listed(make, users):
    assembly = build_assembly(make, welds=2, inspect=False)
    snapshot = gather(assembly.pk)
    assert snapshot["open_items"] == ["Weld W01 has no final visual inspection.", "Weld W02 has no final visual "
                                      "inspection.", "The assembly is not released (in fabrication)."]
    assert snapshot["cautions"][0].startswith("NOT RELEASED: 3 open items listed on this traveler must be closed")
    text, _ = pdf_text(issue(assembly, users["qa_lead"])[0].file.read())
    assert "no final visual inspection" in text


def test_the_fingerprint_ignores_nothing_but_order_of_keys():
    assert fingerprint({"a": 1, "b": [1, 2]}) == fingerprint({"b": [1, 2], "a": 1})
    assert fingerprint({"a": 1}) != fingerprint({"a": 2})
    assert re.fullmatch(r"[0-9a-f]{64}", fingerprint({}))


def test_an_si_job_prints_iso_symbols_in_millimetres(make, users):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    assembly = make.make_assembly(job=job)
    make.make_weld(assembly=assembly, mark="S1", size=parse_length("6 mm"), length=parse_length("300 mm"),
                   thickness1=parse_length("10 mm"), thickness2=parse_length("12 mm"))
    snapshot = gather(assembly.pk)
    # the throat a first (ISO 2553), then the leg z the drawing gives
    assert snapshot["convention"] == "ISO 2553:2019" and snapshot["welds"][0]["size"] == "a4.24 z6"
    svg = traveler_module.symbol_svg(snapshot["welds"][0], "SI")
    assert "z6" in svg and "ws-id-line" in svg
