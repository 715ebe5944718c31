"""Role-matrix rows for the tablet inspection pages."""

from tests.conftest import ROLES

OK, DENIED = 200, 403
ALL_OK = {role: OK for role in ROLES}
INSPECTOR_ONLY = {role: (OK if role == "inspector" else DENIED) for role in ROLES}
# A held photo is its inspector's only: another inspector is told it does not exist, other roles may not record.
OWNER_ONLY = {role: (404 if role == "inspector" else DENIED) for role in ROLES}


def _held_photo(make):
    """A photo held in a draft of another inspector (the matrix's inspector does not own it)."""
    from django.core.files.base import ContentFile

    from inspections.models import DraftPhoto
    from inspections.services.inspect import keep_draft
    from tests.factory import png_bytes

    draft = keep_draft(make.make_weld(), make.make_user("inspector"), {})
    return DraftPhoto.objects.create(draft=draft, width=40, height=30, sha256="0" * 64,
                                     image=ContentFile(png_bytes(), name="held.png"),
                                     thumbnail=ContentFile(png_bytes(), name="held-thumb.jpg")).pk


PAGES = {
    "inspections:inspect_home": (lambda make: {}, ALL_OK),
    "inspections:inspect_queue": (lambda make: {}, ALL_OK),
    "inspections:draft_photo_file": (lambda make: {"pk": _held_photo(make)}, OWNER_ONLY),
    "inspections:inspect_assembly": (lambda make: {"pk": make.make_weld().assembly.pk}, ALL_OK),
    "inspections:inspect_weld": (lambda make: {"pk": make.make_weld().pk}, INSPECTOR_ONLY),
    "inspections:inspection_detail": (lambda make: {"pk": make.make_inspection().pk}, ALL_OK),
    "inspections:inspection_pdf": (lambda make: {"pk": make.make_inspection().pk}, ALL_OK),
    "inspections:inspection_correct": (lambda make: {"pk": make.make_inspection().pk}, INSPECTOR_ONLY),
    "inspections:photo_file": (lambda make: {"pk": make.make_photo().pk}, ALL_OK),
    "inspections:photo_thumbnail": (lambda make: {"pk": make.make_photo().pk}, ALL_OK),
}

NOT_PAGES = {
    "inspections:inspect_preview": lambda make: {"pk": make.make_weld().pk},
    "inspections:photo_add": lambda make: {"pk": make.make_inspection().pk},
    "inspections:draft_photo_remove": lambda make: {"pk": _held_photo(make)},
}
