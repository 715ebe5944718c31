"""Photos from the tablet: allow-listed formats, byte and pixel limits (bombs refused), orientation applied,
location metadata stripped, thumbnails made; served only to logged-in users through a view."""

import hashlib
import io
import struct
import zlib

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.urls import reverse
from PIL import Image

from inspections.models import Photo
from inspections.photos import THUMBNAIL_PX, PhotoError, clean_photo
from tests.factory import png_bytes


@pytest.fixture(autouse=True)
def _media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"


def _jpeg_with_gps_and_orientation(size=(60, 40), orientation=6):
    image = Image.new("RGB", size, (10, 120, 200))
    image.paste((255, 0, 0), (0, 0, 12, 12))  # a marker in the top-left corner, to follow the rotation
    exif = Image.Exif()
    exif[0x0112] = orientation  # Orientation: 6 = rotate 90° clockwise to display
    exif[0x010F] = "Brannock test camera"  # Make
    gps = exif.get_ifd(0x8825)
    gps[1], gps[2], gps[3], gps[4] = "N", (41.0, 30.0, 0.0), "W", (87.0, 38.0, 0.0)
    out = io.BytesIO()
    image.save(out, "JPEG", exif=exif, quality=95)
    return out.getvalue()


def test_it_accepts_a_png_and_makes_a_thumbnail():
    clean = clean_photo(io.BytesIO(png_bytes((800, 600))))
    assert clean.content_type == "image/png" and (clean.width, clean.height) == (800, 600)
    thumb = Image.open(io.BytesIO(clean.thumbnail))
    assert thumb.format == "JPEG" and max(thumb.size) == THUMBNAIL_PX
    assert len(clean.sha256) == 64


def test_it_strips_gps_and_camera_metadata():
    raw = _jpeg_with_gps_and_orientation()
    assert Image.open(io.BytesIO(raw)).getexif().get_ifd(0x8825)  # the test file does carry GPS
    clean = clean_photo(io.BytesIO(raw))
    stored = Image.open(io.BytesIO(clean.content))
    assert not stored.getexif()
    assert "exif" not in stored.info
    assert b"Brannock test camera" not in clean.content and b"GPS" not in clean.content


def test_it_applies_the_orientation_before_storing():
    clean = clean_photo(io.BytesIO(_jpeg_with_gps_and_orientation(size=(60, 40), orientation=6)))
    assert (clean.width, clean.height) == (40, 60)
    stored = Image.open(io.BytesIO(clean.content)).convert("RGB")
    red, green, blue = stored.getpixel((35, 4))  # top-left went to top-right under a 90° clockwise turn
    assert red > 150 and green < 100 and blue < 120


@pytest.mark.parametrize("fmt", ["GIF", "BMP", "TIFF"])
def test_it_refuses_formats_outside_the_allow_list(fmt):
    with pytest.raises(PhotoError, match="Only JPEG, PNG and WebP"):
        clean_photo(io.BytesIO(png_bytes(fmt=fmt)))


def test_it_refuses_a_file_that_is_not_an_image():
    with pytest.raises(PhotoError, match="Only JPEG, PNG and WebP"):
        clean_photo(io.BytesIO(b"<svg xmlns='http://www.w3.org/2000/svg'></svg>"))


def test_it_refuses_a_cut_short_image():
    data = png_bytes((300, 300), color=(1, 2, 3))
    with pytest.raises(PhotoError, match="damaged or cut short"):
        clean_photo(io.BytesIO(data[: len(data) // 2]))


def test_it_refuses_a_cut_short_image_even_after_weasyprint_relaxed_pillow(monkeypatch):
    from PIL import ImageFile

    monkeypatch.setattr(ImageFile, "LOAD_TRUNCATED_IMAGES", True)  # what importing weasyprint does
    data = png_bytes((300, 300), color=(1, 2, 3))
    with pytest.raises(PhotoError, match="damaged or cut short"):
        clean_photo(io.BytesIO(data[: len(data) // 2]))
    assert ImageFile.LOAD_TRUNCATED_IMAGES is True  # put back for the PDF renderer


def test_it_refuses_an_empty_file():
    with pytest.raises(PhotoError, match="empty"):
        clean_photo(io.BytesIO(b""))


def test_it_refuses_more_bytes_than_the_limit(settings):
    settings.LEGWORK_PHOTO_MAX_BYTES = 1000
    with pytest.raises(PhotoError, match="limit is"):
        clean_photo(SimpleUploadedFile("big.png", b"\x89PNG" + b"0" * 2000))


def test_it_refuses_more_pixels_than_the_limit(settings):
    settings.LEGWORK_PHOTO_MAX_PIXELS = 10_000
    with pytest.raises(PhotoError, match="pixels"):
        clean_photo(io.BytesIO(png_bytes((101, 100))))


def _png_claiming(width, height):
    """A small PNG whose header claims width x height pixels (the shape of a decompression bomb)."""
    data = bytearray(png_bytes((8, 8)))
    data[16:24] = struct.pack(">II", width, height)
    data[29:33] = struct.pack(">I", zlib.crc32(bytes(data[12:29])))
    return bytes(data)


def test_it_refuses_a_decompression_bomb(settings):
    # 20000 x 20000 claimed by a file of a few hundred bytes: refused from its header, before any decoding.
    settings.LEGWORK_PHOTO_MAX_PIXELS = 40_000_000
    with pytest.raises(PhotoError, match="pixels"):
        clean_photo(io.BytesIO(_png_claiming(20000, 20000)))
    with pytest.raises(PhotoError, match="pixels"):
        clean_photo(io.BytesIO(_png_claiming(100000, 100000)))  # past Pillow's own 2x limit as well


def test_pillows_own_bomb_error_becomes_a_clear_refusal(settings, monkeypatch):
    # Should Pillow raise before our own check (e.g. a format that decodes its size late), the message is ours.
    def bomb(*args, **kwargs):
        raise Image.DecompressionBombError("too big")

    monkeypatch.setattr(Image, "open", bomb)
    with pytest.raises(PhotoError, match="decompression bomb"):
        clean_photo(io.BytesIO(png_bytes()))


def test_the_photo_view_needs_a_login(make, client):
    photo = make.make_photo()
    url = reverse("inspections:photo_file", args=[photo.pk])
    response = client.get(url)
    assert response.status_code == 302 and response.url.startswith(reverse("login"))


def test_the_photo_view_sends_the_cleaned_file_with_a_disposition(make, client_as):
    photo = make.make_photo()
    response = client_as("viewer").get(reverse("inspections:photo_file", args=[photo.pk]))
    assert response.status_code == 200
    assert response["Content-Type"] == "image/png"
    assert response["Content-Disposition"].startswith("inline; filename=")
    assert response["Cache-Control"] == "no-store"  # a shared tablet's browser keeps no copy
    body = b"".join(response.streaming_content)
    assert hashlib.sha256(body).hexdigest() == photo.sha256
    thumb = client_as("viewer").get(reverse("inspections:photo_thumbnail", args=[photo.pk]))
    assert thumb["Content-Type"] == "image/jpeg"


def test_a_missing_photo_is_404(client_as):
    assert client_as("viewer").get(reverse("inspections:photo_file", args=[999999])).status_code == 404


def test_there_is_no_public_media_url(client_as, make, settings):
    photo = make.make_photo()
    assert not settings.MEDIA_URL or client_as("viewer").get(f"/{settings.MEDIA_URL.strip('/')}/"
                                                            f"{photo.image.name}").status_code == 404


def test_an_inspector_attaches_a_photo_to_a_signed_inspection(make, client_as, users):
    inspection = make.make_inspection(user=users["inspector"])
    upload = SimpleUploadedFile("weld.jpg", _jpeg_with_gps_and_orientation(), content_type="image/jpeg")
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[inspection.pk]),
                                           {"image": upload, "caption": "toe of W1"})
    assert response.status_code == 302
    photo = Photo.objects.get(inspection=inspection)
    assert photo.caption == "toe of W1" and photo.content_type == "image/jpeg"
    assert photo.uploaded_by == users["inspector"]
    with photo.image.open("rb") as f:
        assert not Image.open(f).getexif()


def test_a_refused_photo_is_a_field_error_and_stores_nothing(make, client_as):
    inspection = make.make_inspection()
    upload = SimpleUploadedFile("weld.gif", png_bytes(fmt="GIF"), content_type="image/gif")
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[inspection.pk]), {"image": upload})
    assert response.status_code == 400
    assert "Only JPEG, PNG and WebP" in response.content.decode()
    assert Photo.objects.count() == 0


@pytest.mark.parametrize("role", ["viewer", "qa_lead", "welding_engineer"])
def test_other_roles_cannot_attach_photos(make, client_as, role):
    inspection = make.make_inspection()
    upload = SimpleUploadedFile("weld.png", png_bytes(), content_type="image/png")
    response = client_as(role).post(reverse("inspections:photo_add", args=[inspection.pk]), {"image": upload})
    assert response.status_code == 403
    assert Photo.objects.count() == 0


def test_photos_go_on_the_current_inspection_only(make, client_as):
    old = make.make_inspection(min_size="1/8 in")
    make.make_inspection(old.weld, supersedes=old, reason="misread")
    upload = SimpleUploadedFile("weld.png", png_bytes(), content_type="image/png")
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[old.pk]), {"image": upload})
    assert response.status_code == 302 and Photo.objects.count() == 0


# --- every metadata and comment segment dropped; memory bounded by what is decoded ----------------------------

JPEG_KEPT = {0xD8, 0xE0, 0xDB, 0xC0, 0xC1, 0xC2, 0xC4, 0xDD, 0xDA}  # SOI, JFIF, tables, frame, restart, scan


def _jpeg_markers(data):
    """The marker of every segment before the image data (a JPEG's metadata all sits there)."""
    assert data[:2] == b"\xff\xd8"
    markers, i = [0xD8], 2
    while i < len(data):
        assert data[i] == 0xFF
        marker = data[i + 1]
        markers.append(marker)
        if marker == 0xDA:
            return markers
        i += 2 + struct.unpack(">H", data[i + 2:i + 4])[0]
    return markers


def _png_chunks(data):
    chunks, i = [], 8
    while i < len(data):
        length, kind = struct.unpack(">I4s", data[i:i + 8])
        chunks.append(kind.decode())
        i += 12 + length
    return chunks


def _jpeg_with_everything(size=(64, 48)):
    """A JPEG carrying a COM comment (a script in it), EXIF with GPS, an ICC profile and XMP."""
    image = Image.new("RGB", size, (90, 90, 90))
    exif = Image.Exif()
    exif[0x010F] = "Brannock test camera"
    out = io.BytesIO()
    image.save(out, "JPEG", comment=b"<script>alert(1)</script>", exif=exif, icc_profile=b"\0" * 128 + b"ICCDATA",
               xmp=b"<x:xmpmeta>inspector-secret</x:xmpmeta>")
    return out.getvalue()


def test_a_jpeg_keeps_no_comment_and_no_metadata_segment():
    raw = _jpeg_with_everything()
    assert {0xFE, 0xE1, 0xE2} <= set(_jpeg_markers(raw))  # the upload carries COM, APP1 (EXIF, XMP), APP2 (ICC)
    clean = clean_photo(io.BytesIO(raw))
    for stored in (clean.content, clean.thumbnail):
        assert set(_jpeg_markers(stored)) <= JPEG_KEPT
        assert b"<script>" not in stored and b"ICCDATA" not in stored and b"inspector-secret" not in stored
    assert "comment" not in Image.open(io.BytesIO(clean.content)).info


def test_a_png_keeps_only_its_pixels():
    from PIL import PngImagePlugin

    info = PngImagePlugin.PngInfo()
    info.add_text("Comment", "<script>alert(1)</script>")
    info.add_itxt("XML:com.adobe.xmp", "inspector-secret")
    out = io.BytesIO()
    Image.new("RGBA", (40, 30), (1, 2, 3, 128)).save(out, "PNG", pnginfo=info, icc_profile=b"\0" * 128)
    assert {"tEXt", "iTXt", "iCCP"} <= set(_png_chunks(out.getvalue()))
    clean = clean_photo(io.BytesIO(out.getvalue()))
    assert set(_png_chunks(clean.content)) <= {"IHDR", "PLTE", "tRNS", "IDAT", "IEND"}
    assert b"<script>" not in clean.content and b"inspector-secret" not in clean.content


def test_a_jpeg_over_the_full_decode_limit_is_read_at_a_reduced_scale(settings):
    settings.LEGWORK_PHOTO_MAX_PIXELS = 10_000  # 100 x 100
    settings.LEGWORK_PHOTO_MAX_JPEG_PIXELS = 1_000_000
    clean = clean_photo(io.BytesIO(png_bytes((400, 300), fmt="JPEG")))
    # 1/2 scale (200 x 150) is still over the limit; 1/4 scale is 100 x 75: decoded and stored at that size
    assert (clean.width, clean.height) == (100, 75)
    assert Image.open(io.BytesIO(clean.content)).size == (100, 75)


def test_a_png_over_the_full_decode_limit_is_refused_where_a_jpeg_of_the_same_size_is_read(settings):
    settings.LEGWORK_PHOTO_MAX_PIXELS = 10_000
    settings.LEGWORK_PHOTO_MAX_JPEG_PIXELS = 1_000_000
    with pytest.raises(PhotoError, match="the limit is 10,000"):
        clean_photo(io.BytesIO(png_bytes((400, 300))))
    assert clean_photo(io.BytesIO(png_bytes((400, 300), fmt="JPEG"))).width == 100


def test_a_jpeg_over_its_own_limit_is_refused_from_its_header(settings):
    settings.LEGWORK_PHOTO_MAX_PIXELS = 10_000
    settings.LEGWORK_PHOTO_MAX_JPEG_PIXELS = 100_000
    with pytest.raises(PhotoError, match="pixels"):
        clean_photo(io.BytesIO(png_bytes((400, 300), fmt="JPEG")))


def test_the_defaults_decode_at_most_16_megapixels(settings):
    assert settings.LEGWORK_PHOTO_MAX_PIXELS == 16_000_000
    assert settings.LEGWORK_PHOTO_MAX_JPEG_PIXELS == 64_000_000  # read at 1/2 scale or less: 16 MP at most
