"""Welder steps: stood down (deactivated) and back, and continuity logged by hand."""

from django.core.exceptions import ValidationError
from django.utils import timezone

from core.roles import require
from core.transitions import required_reason, transition
from core.vocabulary import Process
from procedures.models.welders import ContinuityEntry

ON_THE_LIST = {True: "active", False: "inactive"}


def deactivate(welder, user, reason):
    """Take the welder off the active list (left the shop, stood down); history keeps who and why."""
    reason = required_reason(reason, "taking the welder off the active list")
    return transition(welder, user=user, permission="welder.manage", field="active", allowed_from={True}, to=False,
                      labels=ON_THE_LIST, reason=reason, deactivated_at=timezone.now(),
                      deactivation_reason=reason[:200])


def reactivate(welder, user, reason):
    """Put an inactive welder back on the active list; qualifications and continuity are judged as before."""
    reason = required_reason(reason, "putting the welder back on the active list")
    return transition(welder, user=user, permission="welder.manage", field="active", allowed_from={False}, to=True,
                      labels=ON_THE_LIST, reason=reason, deactivated_at=None, deactivation_reason="")


def log_continuity(welder, process, on, note, user):
    """Record by hand that a welder used a process on a day (work outside Legwork), with a note."""
    require(user, "continuity.log")
    note = (note or "").strip()
    if not note:
        raise ValidationError({"note": "Say what the welder welded, e.g. the job or the work order."})
    if on > timezone.localdate():
        raise ValidationError({"date": "Continuity cannot be logged for a day that has not come yet."})
    if process not in Process.values:
        raise ValidationError({"process": f"Choose one of {', '.join(Process.values)}."})
    entry = ContinuityEntry(welder=welder, process=process, date=on, source=ContinuityEntry.Source.MANUAL,
                            note=note[:200], entered_by=user)
    entry.save(user=user, reason=note[:200])
    return entry
