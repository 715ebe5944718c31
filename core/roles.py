"""Who may do what. The one place that decides; views, templates and tests ask it.

A person has one role. The QA lead approves and releases; the welding engineer drafts procedures and
records welder tests; the inspector records inspections and raises NCRs; a viewer (a customer's or a
third-party inspector's account) reads the jobs of the customers it is tied to, and what hangs from them
(core.visibility decides which records), and changes nothing.
"""

from functools import wraps

from django.core.exceptions import PermissionDenied
from django.db import models


class Role(models.TextChoices):
    WELDING_ENGINEER = "welding_engineer", "Welding engineer"
    INSPECTOR = "inspector", "Inspector"
    QA_LEAD = "qa_lead", "QA lead"
    VIEWER = "viewer", "Viewer (read-only)"


# Every action a view can check. Reading needs only a login.
ACTIONS = {
    "procedure.draft": "Draft and edit procedures (WPS, PQR)",
    "procedure.submit": "Submit a draft procedure for approval",
    "procedure.approve": "Approve a procedure",
    "procedure.withdraw": "Withdraw an approved procedure",
    "welder.manage": "Add welders, record qualification tests, deactivate",
    "continuity.log": "Log continuity by hand",
    "job.manage": "Create jobs, assemblies and weld maps",
    "weld.record": "Record who welded what, and when",
    "inspection.record": "Record and sign inspections, attach photos",
    "ncr.raise": "Raise an NCR",
    "ncr.disposition": "Disposition an NCR",
    "assembly.submit": "Send an assembly for final inspection",
    "assembly.release": "Release an assembly",
    "criteria.derive": "Derive a client's criteria set",
    "traveler.issue": "Issue travelers and job packets",
    "register.manage": "Keep the registers of inspector credentials and gauges",
    "consumable.log": "Log electrode ovens: readings, electrodes issued and returned, rebakes",
    "records.verify": "Check a document or a printed chain head against the sealed records",
    "records.export": "Export a job's whole record (JSON and files)",
    "signin.unlock": "Lift a sign-in pause after too many wrong passwords",
}

_ALLOWED = {
    Role.WELDING_ENGINEER: {"procedure.draft", "procedure.submit", "welder.manage", "job.manage", "weld.record",
                            "assembly.submit"},
    Role.INSPECTOR: {"inspection.record", "ncr.raise", "weld.record", "assembly.submit"},
    Role.QA_LEAD: {
        "procedure.approve", "procedure.withdraw", "continuity.log", "ncr.raise", "ncr.disposition",
        "assembly.release", "criteria.derive", "traveler.issue", "job.manage", "assembly.submit", "register.manage",
        "records.verify", "records.export", "signin.unlock",
    },
    # A viewer (a customer's or a third-party inspector's account) changes nothing, but may check a copy it holds.
    Role.VIEWER: {"records.verify"},
}
for _role in (Role.WELDING_ENGINEER, Role.INSPECTOR, Role.QA_LEAD):  # the oven log: whoever stands at the oven
    _ALLOWED[_role] = _ALLOWED[_role] | {"consumable.log"}
assert all(action in ACTIONS for allowed in _ALLOWED.values() for action in allowed)


def can(user, action: str) -> bool:
    """May this user do this action? Unknown actions are a programming error, not a 'no'."""
    if action not in ACTIONS:
        raise ValueError(f"Unknown action {action!r}; known: {', '.join(sorted(ACTIONS))}")
    if not getattr(user, "is_authenticated", False) or not user.is_active:
        return False
    return action in _ALLOWED.get(getattr(user, "role", None), set())


def require(user, action: str) -> None:
    """Raise PermissionDenied (403) unless the user may do the action."""
    if not can(user, action):
        raise PermissionDenied(f"Your role may not: {ACTIONS[action].lower()}.")


def role_required(*actions: str):
    """View decorator: the user must be allowed one of the actions (login is already required everywhere)."""
    for action in actions:
        if action not in ACTIONS:
            raise ValueError(f"Unknown action {action!r}")

    def decorator(view):
        @wraps(view)
        def wrapped(request, *args, **kwargs):
            if not any(can(request.user, action) for action in actions):
                require(request.user, actions[0])
            return view(request, *args, **kwargs)

        wrapped.legwork_actions = actions  # the role matrix reads it (tests/test_role_matrix.py)
        return wrapped

    return decorator


class _Permissions:
    """`{% if perms_lw.procedure_approve %}` in templates, spelled with _ for the dot."""

    def __init__(self, user):
        self.user = user

    def __getattr__(self, name):
        action = name.replace("_", ".", 1)
        if action not in ACTIONS:
            raise AttributeError(name)
        return can(self.user, action)


def role_context(request):
    return {"lw": _Permissions(request.user), "cautions": CAUTIONS}


CAUTIONS = (
    "Legwork supports, and never replaces, the engineer of record, the certified welding inspector and the "
    "code and edition named in the contract. Verify every criteria set against that edition; local codes "
    "and licensed practice govern."
)
SAFETY_NOTE = (
    "Welding produces fumes, arc radiation, heat and fire risk: follow ANSI Z49.1 (Safety in Welding, "
    "Cutting, and Allied Processes) and local regulations."
)
