"""The weld revision: the one way an inspected weld's data changes.

A weld's drawing data freezes at its first inspection, and who welded it, when and to which WPS at its first
final visual inspection (inspections.models.jobs.WeldLock). When the drawing or the record was wrong, the
engineer or the QA lead revises the weld with a reason: the new data, the revision number moved on by one, and
the pointers to its latest inspections cleared, so the weld counts as not inspected and the assembly cannot be
released until it is inspected again. Its inspections stay on record, each judged against the data it saw; the
history row lists every value changed (old and new) with the reason.
"""

from django.db import transaction
from django.utils import timezone

from core import history
from core.errors import RecordLocked, Refused
from core.locking import stale
from core.roles import require
from core.transitions import required_reason, transition
from inspections.models import Weld
from inspections.models.jobs import CLOSED_STATES
from inspections.services.assemblies import record_production, refresh_assembly_state


def revise(weld, user, reason, *, welders=None):
    """Store the edited `weld` (an instance carrying the new values and the version the form was opened at) as its
    next revision, sending it back for inspection. welders: the new list, or None to keep them.

    Refused when the weld has not been inspected since its last revision (edit it instead), when its assembly is
    released or scrapped, without a reason; Stale when someone saved it after the form was opened.
    """
    require(user, "job.manage")
    reason = required_reason(reason, "revising an inspected weld")
    fields = [f.name for f in Weld._meta.concrete_fields
              if f.editable and not f.primary_key and f.name != "assembly"]
    with transaction.atomic():
        stored = Weld.lock.stored(weld)
        if stored.assembly.state in CLOSED_STATES:
            raise RecordLocked(Weld.lock.refusal(stored, "revised"))
        if weld.version != stored.version:
            raise stale(weld, stored)
        if stored.latest_inspection_id is None:
            raise Refused(f"Weld {stored.mark} has not been inspected since its last revision: edit it instead.",
                          code="not_inspected")
        changes = history.changes(stored, weld, fields, stored.history_system())
        old_welders = history.value_text(stored, Weld._meta.get_field("welders"))
        if welders is not None:
            new_welders = ", ".join(sorted(str(w) for w in welders))
            if new_welders != old_welders:
                changes[history.label_of(Weld._meta.get_field("welders"))] = [old_welders, new_welders]
        if not changes:
            raise Refused("Nothing was changed: a revision changes the weld's data.", code="unchanged")
        revision = stored.revision
        labels = {revision: f"revision {revision}", revision + 1: f"revision {revision + 1}"}
        transition(stored, field="revision", allowed_from={revision}, to=revision + 1, user=user, reason=reason,
                   labels=labels, action=history.REVISED, changes=changes, latest_inspection=None,
                   latest_final=None, revised_at=timezone.now(),
                   **{name: getattr(weld, name) for name in fields})
        if welders is not None:
            with history.quiet():  # listed in the revision's row above, not a row of its own
                stored.welders.set(welders)
        record_production(stored)
        refresh_assembly_state(stored.assembly, user, f"Weld {stored.mark} revised: inspect it again")
    for name in ("revision", "version", "latest_inspection", "latest_final", "revised_at"):
        setattr(weld, name, getattr(stored, name))
    return stored
