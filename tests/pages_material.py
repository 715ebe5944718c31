"""Role matrix rows for material traceability (read by tests/test_role_matrix.py): the heat register is the shop's
(a viewer: 403 on the list, 404 on a certificate); an assembly's parts belong to its job (the customer's viewer reads
them); recording parts and the parts a weld joins is job.manage."""

from tests.pages_trace import NO_FILE, SHOP, SHOP_RECORD
from tests.test_role_matrix import ALL_OK, only


def _heat(make):
    return {"pk": make.make_heat().pk}


def _assembly(make):
    return {"pk": make.use_on_job().assembly_id}  # the viewer's customer's assembly


def _weld(make):
    return {"pk": make.use_on_job().pk}


def _part(make):
    return {"pk": make.make_part().pk}


PAGES = {
    "inspections:heat_list": (lambda make: {}, SHOP),
    "inspections:heat_create": (lambda make: {}, only("qa_lead")),
    "inspections:heat_detail": (_heat, SHOP_RECORD),
    "inspections:heat_document": (_heat, NO_FILE),
    "inspections:assembly_parts": (_assembly, ALL_OK),
    "inspections:weld_parts": (_weld, only("welding_engineer", "qa_lead")),
}

NOT_PAGES = {
    "inspections:heat_withdraw": _heat,
    "inspections:part_withdraw": _part,
    "inspections:part_create": _assembly,
}
