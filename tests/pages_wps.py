"""Role matrix rows for the WPS and PQR pages (tests/test_role_matrix.py walks them with every role).

Each procedure is used on a weld of the factory customer's job, as the viewer (that customer's account) may read
only the procedures used on its jobs (core.visibility)."""

from procedures.models.wps import WPSState
from tests.test_role_matrix import ALL_OK, only


def _used(make, wps):
    make.use_on_job(wps=wps)
    return {"pk": wps.pk}


def _draft(make):
    return _used(make, make.make_wps())


def _submitted(make):
    return _used(make, make.make_wps(state=WPSState.SUBMITTED))


def _approved(make):
    return _used(make, make.make_wps(state=WPSState.APPROVED))


def _pqr(make):
    pqr = make.make_pqr()
    make.use_on_job(pqr=pqr)
    return {"pk": pqr.pk}


PAGES = {
    "procedures:wps_list": (lambda make: {}, ALL_OK),
    "procedures:wps_detail": (_draft, ALL_OK),
    "procedures:wps_pdf": (_approved, ALL_OK),
    "procedures:wps_create": (lambda make: {}, only("welding_engineer")),
    "procedures:wps_edit": (_draft, only("welding_engineer")),
    "procedures:wps_withdraw": (_approved, only("qa_lead")),
    "procedures:wps_return": (_submitted, only("qa_lead")),
    "procedures:pqr_list": (lambda make: {}, ALL_OK),
    "procedures:pqr_detail": (_pqr, ALL_OK),
    "procedures:pqr_create": (lambda make: {}, only("welding_engineer")),
    "procedures:pqr_edit": (_pqr, only("welding_engineer")),
}

# POST-only: a GET answers 405 (before the role check, so the matrix asks as the QA lead).
NOT_PAGES = {
    "procedures:wps_review": lambda make: {},
    "procedures:wps_review_draft": _draft,
    "procedures:wps_submit": _draft,
    "procedures:wps_approve": _submitted,
    "procedures:wps_new_revision": _approved,
}
