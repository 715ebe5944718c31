"""WPS steps: draft -> submitted -> approved -> superseded, approved -> withdrawn, submitted -> draft.

Each step is one function that calls core.transitions.transition (lock, check, save, history). Only a draft
is edited; a change to an approved WPS is a new revision that supersedes it once approved.
"""

from django.db import models, transaction
from django.utils import timezone

from core import history, seals
from core.errors import Refused
from core.roles import require
from core.transitions import required_reason, transition
from procedures.models.wps import WPS, WPSState


def submit(wps, user):
    """Draft -> submitted, for the QA lead to approve; refused while the review shows errors."""

    def no_errors(locked):
        errors = [f for f in locked.findings() if f.severity == "error"]
        if errors:
            raise Refused("Fix the errors in the review before submitting: " + "; ".join(f.message for f in errors),
                          code="findings")

    return transition(wps, user=user, permission="procedure.submit", allowed_from={WPSState.DRAFT},
                      to=WPSState.SUBMITTED, check=no_errors, reason="Submitted for approval")


def return_to_draft(wps, user, reason):
    """Submitted -> draft, with the QA lead's reason, so the engineer can change it."""
    reason = required_reason(reason, "returning it to the engineer")
    return transition(wps, user=user, permission="procedure.approve", allowed_from={WPSState.SUBMITTED},
                      to=WPSState.DRAFT, reason=reason)


def approve(wps, user, reason=""):
    """Submitted -> approved, with approver and date; the revision it supersedes becomes superseded in the same
    transaction. Refused while approval_blockers() names anything."""

    def approvable(locked):
        blockers = locked.approval_blockers()
        if blockers:
            raise Refused("Cannot approve: " + " ".join(blockers), code="findings")

    with seals.sealing():  # the chain first, then the two revisions (core.seals, lock order)
        approved = transition(wps, user=user, permission="procedure.approve", allowed_from={WPSState.SUBMITTED},
                              to=WPSState.APPROVED, check=approvable, reason=reason or "Approved",
                              approved_by=user, approved_at=timezone.now())
        if approved.supersedes_id:
            previous = WPS.objects.get(pk=approved.supersedes_id)
            if previous.state == WPSState.APPROVED:
                transition(previous, user=user, allowed_from={WPSState.APPROVED}, to=WPSState.SUPERSEDED,
                           reason=f"Superseded by revision {approved.revision}")
        seals.seal(approved, "wps.approved")
    return approved


def withdraw(wps, user, reason):
    """Approved -> withdrawn, with a reason: no longer to be used, and no revision replaces it."""
    reason = required_reason(reason, "withdrawing it")
    return transition(wps, user=user, permission="procedure.withdraw", allowed_from={WPSState.APPROVED},
                      to=WPSState.WITHDRAWN, reason=reason, withdrawn_at=timezone.now())


def new_revision(wps, user, reason=""):
    """A new draft copied from this approved WPS, revision + 1, that supersedes it once approved."""
    require(user, "procedure.draft")
    with transaction.atomic():
        locked = WPS.objects.select_for_update().get(pk=wps.pk)
        if locked.state != WPSState.APPROVED:
            raise Refused(f"{locked} is {locked.get_state_display().lower()}; only an approved WPS gets a new "
                          "revision.", code="state")
        pending = WPS.objects.filter(supersedes=locked).first()
        if pending is not None:
            raise Refused(f"{pending} is already the next revision of {locked}; edit that one.", code="pending")
        latest = WPS.objects.filter(number=locked.number).aggregate(models.Max("revision"))["revision__max"]
        copy = WPS.objects.get(pk=locked.pk)
        copy.pk = copy.id = None
        copy._state.adding = True
        copy.revision = latest + 1
        copy.state = WPSState.DRAFT
        copy.supersedes = locked
        copy.created_by = user
        copy.created_at = timezone.now()
        copy.approved_by = copy.approved_at = copy.withdrawn_at = None
        copy.version = 1
        with history.one_entry():  # the new draft and its PQRs: one history row
            copy.save(user=user, reason=reason or f"Revision {copy.revision}, from revision {locked.revision}")
            copy.pqrs.set(locked.pqrs.all())
    return copy
