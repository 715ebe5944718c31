"""Role-matrix rows for the tablet inspection pages, and small builders the inspection tests share."""

import io

from PIL import Image

from legwork.units import parse_length
from tests.conftest import ROLES

OK, DENIED = 200, 403
ALL_OK = {role: OK for role in ROLES}
INSPECTOR_ONLY = {role: (OK if role == "inspector" else DENIED) for role in ROLES}


def make_inspection(make, weld=None, *, user=None, stage="final", supersedes=None, reason="", **observed):
    """A signed inspection through the one signing path (accepted by default: a full 1/4 in leg)."""
    from inspections.services.inspect import sign_inspection

    weld = weld or make.make_weld()
    user = user or make.make_user("inspector")
    observed.setdefault("min_size", parse_length("1/4 in"))
    observed = {k: (parse_length(v) if isinstance(v, str) else v) for k, v in observed.items()}
    return sign_inspection(weld, observed, stage, user, supersedes=supersedes, reason=reason)


def png_bytes(size=(40, 30), color=(200, 60, 20), fmt="PNG", **save):
    out = io.BytesIO()
    Image.new("RGB", size, color).save(out, fmt, **save)
    return out.getvalue()


def make_photo(make, inspection=None, content=None):
    """A stored photo (files go to the default storage) cleaned as an upload would be."""
    from django.core.files.base import ContentFile

    from inspections.models import Photo
    from inspections.photos import clean_photo

    inspection = inspection or make_inspection(make)
    clean = clean_photo(io.BytesIO(content or png_bytes()))
    return Photo.objects.create(
        inspection=inspection, width=clean.width, height=clean.height, content_type=clean.content_type,
        sha256=clean.sha256, uploaded_by=inspection.inspector,
        image=ContentFile(clean.content, name=f"{inspection.pk}-test.{clean.extension}"),
        thumbnail=ContentFile(clean.thumbnail, name=f"{inspection.pk}-test-thumb.jpg"))


PAGES = {
    "inspections:inspect_home": (lambda make: {}, ALL_OK),
    "inspections:inspect_assembly": (lambda make: {"pk": make.make_weld().assembly.pk}, ALL_OK),
    "inspections:inspect_weld": (lambda make: {"pk": make.make_weld().pk}, INSPECTOR_ONLY),
    "inspections:inspection_detail": (lambda make: {"pk": make_inspection(make).pk}, ALL_OK),
    "inspections:inspection_correct": (lambda make: {"pk": make_inspection(make).pk}, INSPECTOR_ONLY),
    "inspections:photo_file": (lambda make: {"pk": make_photo(make).pk}, ALL_OK),
    "inspections:photo_thumbnail": (lambda make: {"pk": make_photo(make).pk}, ALL_OK),
}

NOT_PAGES = {
    "inspections:inspect_preview": lambda make: {"pk": make.make_weld().pk},
    "inspections:photo_add": lambda make: {"pk": make_inspection(make).pk},
}
