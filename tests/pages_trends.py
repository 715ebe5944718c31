"""Role-matrix rows for the quality trends page and its CSV (every role reads; a viewer its customers' figures)."""

from tests.conftest import ROLES

PAGES = {
    "inspections:trends": (lambda make: {}, {role: 200 for role in ROLES}),
    "inspections:trends_csv": (lambda make: {"chart": "causes"}, {role: 200 for role in ROLES}),
}
