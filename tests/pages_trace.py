"""Role matrix rows for the traceability registers (read by tests/test_role_matrix.py). The registers are the
shop's own: a viewer is refused the lists (403) and finds no record (404)."""

from tests.test_role_matrix import only

SHOP = {"welding_engineer": 200, "inspector": 200, "qa_lead": 200, "viewer": 403}
SHOP_RECORD = {**SHOP, "viewer": 404}
NO_FILE = {"welding_engineer": 404, "inspector": 404, "qa_lead": 404, "viewer": 404}  # nothing attached


def _credential(make):
    return {"pk": make.make_credential().pk}


def _gauge(make):
    return {"pk": make.make_gauge().pk}


def _calibration(make):
    return {"pk": make.make_gauge().calibrations.get().pk}


def _lot(make):
    return {"pk": make.make_filler_lot().pk}


def _weld(make):
    return {"pk": make.use_on_job().pk}  # a weld of the viewer's customer: the viewer may read it, not record


# Attached files are tested in tests/test_trace_credentials.py and tests/test_trace_gauges.py.
PAGES = {
    "inspections:credential_list": (lambda make: {}, SHOP),
    "inspections:credential_create": (lambda make: {}, only("qa_lead")),
    "inspections:credential_detail": (_credential, SHOP_RECORD),
    "inspections:credential_document": (_credential, NO_FILE),
    "inspections:gauge_list": (lambda make: {}, SHOP),
    "inspections:gauge_create": (lambda make: {}, only("qa_lead")),
    "inspections:gauge_detail": (_gauge, SHOP_RECORD),
    "inspections:calibration_detail": (_calibration, SHOP_RECORD),
    "inspections:calibration_document": (_calibration, NO_FILE),
    "inspections:filler_lot_list": (lambda make: {}, SHOP),
    "inspections:filler_lot_create": (lambda make: {}, only("qa_lead")),
    "inspections:filler_lot_detail": (_lot, SHOP_RECORD),
    "inspections:filler_lot_document": (_lot, NO_FILE),
    "inspections:weld_filler": (_weld, only("welding_engineer", "inspector")),
    "inspections:recall": (lambda make: {}, SHOP),
    "inspections:recall_csv": (lambda make: {}, SHOP),
}

NOT_PAGES = {
    "inspections:credential_withdraw": _credential,
    "inspections:calibration_create": _gauge,
    "inspections:gauge_retire": _gauge,
}
