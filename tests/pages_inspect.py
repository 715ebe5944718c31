"""Role-matrix rows for the tablet inspection pages."""

from tests.conftest import ROLES

OK, DENIED = 200, 403
ALL_OK = {role: OK for role in ROLES}
INSPECTOR_ONLY = {role: (OK if role == "inspector" else DENIED) for role in ROLES}


PAGES = {
    "inspections:inspect_home": (lambda make: {}, ALL_OK),
    "inspections:inspect_assembly": (lambda make: {"pk": make.make_weld().assembly.pk}, ALL_OK),
    "inspections:inspect_weld": (lambda make: {"pk": make.make_weld().pk}, INSPECTOR_ONLY),
    "inspections:inspection_detail": (lambda make: {"pk": make.make_inspection().pk}, ALL_OK),
    "inspections:inspection_correct": (lambda make: {"pk": make.make_inspection().pk}, INSPECTOR_ONLY),
    "inspections:photo_file": (lambda make: {"pk": make.make_photo().pk}, ALL_OK),
    "inspections:photo_thumbnail": (lambda make: {"pk": make.make_photo().pk}, ALL_OK),
}

NOT_PAGES = {
    "inspections:inspect_preview": lambda make: {"pk": make.make_weld().pk},
    "inspections:photo_add": lambda make: {"pk": make.make_inspection().pk},
}
