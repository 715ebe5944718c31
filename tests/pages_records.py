"""Role-matrix rows for checking documents against the sealed records and exporting a job's whole record."""

from tests.conftest import ROLES

OK, DENIED = 200, 403

PAGES = {
    # A viewer is a customer's or a third-party inspector's account: it may check a copy it holds.
    "inspections:document_check": (lambda make: {},
                                   {role: (OK if role in ("qa_lead", "viewer") else DENIED) for role in ROLES}),
    "inspections:job_export": (lambda make: {"pk": make.make_job().pk},
                               {role: (OK if role == "qa_lead" else DENIED) for role in ROLES}),
}
