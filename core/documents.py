"""Scanned documents attached to records (a welder's test report, an inspector's card, a gauge's calibration
certificate, later mill and filler certificates): one allow-list, one size limit, one way out.

clean_document() answers an upload with itself or a ValidationError beside the field: only PDF, PNG and JPEG,
by name AND by content (a renamed file is refused), at most LEGWORK_REPORT_MAX_BYTES. hash_document() is the
SHA-256 of the bytes about to be stored (`manage.py verify_records` checks it). send_document() serves a stored
file only from a view (login required everywhere, the record loaded through core.visibility), sandboxed, never
from a public URL. Unlike photos, documents are stored as uploaded: a certificate is evidence, not re-encoded.
"""

import hashlib
import mimetypes
from pathlib import PurePath

from django.conf import settings
from django.core.exceptions import ValidationError
from django.http import FileResponse, Http404

KINDS = {".pdf": "PDF", ".png": "PNG", ".jpg": "JPEG", ".jpeg": "JPEG"}
ACCEPT = ".pdf,.png,.jpg,.jpeg,application/pdf,image/png,image/jpeg"


def clean_document(upload, what: str, max_bytes: int | None = None):
    """The upload, checked (name, size, content); a field's value passes through when nothing new was uploaded."""
    if not upload or not hasattr(upload, "content_type"):  # nothing new uploaded
        return upload
    max_bytes = max_bytes or settings.LEGWORK_REPORT_MAX_BYTES
    name = upload.name.lower()
    kind = next((k for ext, k in KINDS.items() if name.endswith(ext)), None)
    if kind is None:
        raise ValidationError(f"Attach the {what} as a PDF, PNG or JPEG file.", code="report_type")
    if upload.size > max_bytes:
        raise ValidationError(f"The {what} is {upload.size // (1024 * 1024)} MB; the limit is "
                              f"{max_bytes // (1024 * 1024)} MB. Scan it at a lower resolution.", code="report_size")
    if sniff(upload) != kind:
        raise ValidationError(f"This file is not a readable {kind} (its name says {kind}, its content does not).",
                              code="report_content")
    return upload


def sniff(upload) -> str | None:
    """What the file really is: 'PDF', 'PNG', 'JPEG', or None."""
    upload.seek(0)
    head = upload.read(8)
    upload.seek(0)
    if head.startswith(b"%PDF-"):
        return "PDF"
    try:
        from PIL import Image

        Image.MAX_IMAGE_PIXELS = getattr(settings, "LEGWORK_PHOTO_MAX_PIXELS", 40_000_000)
        with Image.open(upload) as image:
            image.verify()
            kind = image.format
    except Exception:  # noqa: BLE001 - Pillow raises many kinds of error for a bad file; any is "not an image"
        kind = None
    finally:
        upload.seek(0)
    return kind if kind in ("PNG", "JPEG") else None


def hash_document(field) -> str | None:
    """SHA-256 of a file field's bytes when a file was attached now (not yet stored); None otherwise."""
    if not field or field._committed:
        return None
    digest = hashlib.sha256()
    for chunk in field.chunks():
        digest.update(chunk)
    return digest.hexdigest()


def send_document(field, what: str):
    """A stored document as a download, sandboxed (a PDF's scripts or an image's tricks run nowhere)."""
    if not field:
        raise Http404(f"No {what} attached.")
    try:
        handle = field.open("rb")
    except FileNotFoundError:
        raise Http404(f"The {what} file is missing from storage.") from None
    name = PurePath(field.name).name
    content_type = mimetypes.guess_type(name)[0] or "application/octet-stream"
    response = FileResponse(handle, content_type=content_type, filename=name)
    response["Content-Security-Policy"] = "sandbox; default-src 'none'; img-src 'self'; style-src 'unsafe-inline'"
    return response
