"""Role matrix rows for consumable control (read by tests/test_role_matrix.py). The oven register is the shop's own:
a viewer is refused the list (403) and finds no oven (404); the log is kept by every shop role (consumable.log)."""

from tests.test_role_matrix import only

SHOP = {"welding_engineer": 200, "inspector": 200, "qa_lead": 200, "viewer": 403}
SHOP_RECORD = {**SHOP, "viewer": 404}
LOG = only("welding_engineer", "inspector", "qa_lead")


def _oven(make):
    return {"pk": make.make_oven().pk}


def _issue(make):
    from django.utils import timezone

    from inspections.models import ElectrodeIssue

    issue = ElectrodeIssue(oven=make.make_oven(), lot=make.make_filler_lot("E7018"), welder=make.make_welder(),
                           quantity=10, taken_out_at=timezone.now())
    issue.save()
    return {"pk": issue.pk}


PAGES = {
    "inspections:oven_list": (lambda make: {}, SHOP),
    "inspections:oven_create": (lambda make: {}, only("qa_lead")),
    "inspections:oven_detail": (_oven, SHOP_RECORD),
    "inspections:oven_reading_create": (_oven, LOG),
    "inspections:oven_issue_create": (_oven, LOG),
    "inspections:oven_rebake_create": (_oven, LOG),
    "inspections:oven_flux_create": (_oven, LOG),
    "inspections:oven_issue_close": (_issue, LOG),
}

NOT_PAGES = {
    "inspections:oven_retire": _oven,
}
