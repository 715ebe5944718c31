"""Role matrix rows for the traceability registers (read by tests/test_role_matrix.py). The registers are the
shop's own: a viewer is refused the lists (403) and finds no record (404)."""

from tests.test_role_matrix import only

SHOP = {"welding_engineer": 200, "inspector": 200, "qa_lead": 200, "viewer": 403}
SHOP_RECORD = {**SHOP, "viewer": 404}


def _credential(make):
    return {"pk": make.make_credential().pk}


PAGES = {
    "inspections:credential_list": (lambda make: {}, SHOP),
    "inspections:credential_create": (lambda make: {}, only("qa_lead")),
    "inspections:credential_detail": (_credential, SHOP_RECORD),
    # No copy attached: 404 to everyone signed in; copies are tested in tests/test_trace_credentials.py.
    "inspections:credential_document": (_credential, {"welding_engineer": 404, "inspector": 404, "qa_lead": 404,
                                                      "viewer": 404}),
}

NOT_PAGES = {
    "inspections:credential_withdraw": _credential,
}
