"""Role-matrix rows for the strength calculator and the calculation sheets: reading is open to every role."""

from tests.conftest import ROLES

OK, FOUND = 200, 302
ALL_OK = {role: OK for role in ROLES}
ALL_REDIRECTED = {role: FOUND for role in ROLES}  # a sheet without inputs sends you to the calculator

PAGES = {
    "inspections:strength_calculator": (lambda make: {}, ALL_OK),
    "inspections:strength_sheet": (lambda make: {}, ALL_REDIRECTED),
    "inspections:strength_sheet_pdf": (lambda make: {}, ALL_REDIRECTED),
    "inspections:weld_capacity": (lambda make: {"pk": make.make_weld().pk}, ALL_OK),
    "inspections:weld_capacity_pdf": (lambda make: {"pk": make.make_weld().pk}, ALL_OK),
    "inspections:inspection_capacity": (lambda make: {"pk": make.make_inspection().pk}, ALL_OK),
    "inspections:inspection_capacity_pdf": (lambda make: {"pk": make.make_inspection().pk}, ALL_OK),
}
