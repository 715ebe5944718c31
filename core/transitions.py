"""The one way a record changes state: lock the row, check the precondition, save, write the history row.

Every state change in Legwork (a WPS approved, a welder stood down, an assembly released, an NCR closed, a
packet built) is a service function that calls transition() once. Signed and approved records refuse a plain
save(); transition() is the one path past that guard, and it writes only the fields the step names.
"""

from django.db import models, transaction

from core import history
from core.errors import Refused
from core.locking import bump_version
from core.roles import require


def transition(record, *, to, allowed_from, user=None, permission=None, field="state", reason="", check=None,
               labels=None, action=history.STATE, changes=None, **fields):
    """Move `record` from one of `allowed_from` to `to` (on `field`), setting `fields` too; returns the locked row.

    permission: the core.roles action the user needs (checked first). check(locked): raises Refused when a
    precondition beyond the state does not hold; it sees the row as stored, under the lock. labels: the words
    for the field's values where it has no choices (a yes/no field: {True: "active", False: "inactive"}).
    changes: {label: [old, new]} for the history row, where the step changes data too (a weld's revision).
    A versioned record's version moves on with the step, so a form opened before it is stale. The caller's
    instance is brought up to date with what was saved.
    """
    if permission is not None:
        require(user, permission)
    model = type(record)
    with transaction.atomic():
        # Lock the row so two people acting at once cannot both move it from a stale state.
        locked = model._base_manager.select_for_update().get(pk=record.pk)
        current = getattr(locked, field)
        if current not in allowed_from:
            wanted = " or ".join(sorted(_label(model, field, s, labels) for s in allowed_from))
            raise Refused(f"{locked} is {_label(model, field, current, labels)}; this needs it {wanted}.",
                          code="state")
        if check is not None:
            check(locked)
        setattr(locked, field, to)
        for name, value in fields.items():
            setattr(locked, name, value)
        saved = [field, *fields, *bump_version(locked)]
        # Past the guard of Guarded.save(): the database triggers allow exactly the declared moves (core.locking).
        models.Model.save(locked, update_fields=saved)
        history.record(locked, user, action, from_state=_stored(model, field, current, labels),
                       to_state=_stored(model, field, to, labels), reason=reason, changes=changes)
    for name in saved:
        setattr(record, name, getattr(locked, name))
    return locked


def required_reason(reason, doing: str) -> str:
    """The reason, stripped; Refused when there is none ("Give a reason for withdrawing it.")."""
    reason = (reason or "").strip()
    if not reason:
        raise Refused(f"Give a reason for {doing}.", code="reason")
    return reason


def _label(model, field, value, labels=None) -> str:
    model_field = model._meta.get_field(field)
    if labels and value in labels:
        return labels[value]
    if model_field.choices:
        return str(dict(model_field.flatchoices).get(value, value)).lower()
    if isinstance(model_field, models.BooleanField):
        return str(model_field.verbose_name) if value else f"not {model_field.verbose_name}"
    return str(value)


def _stored(model, field, value, labels=None) -> str:
    """What the history keeps: a choice's stored value (shown by its label), or the words for another field."""
    return value if model._meta.get_field(field).choices else _label(model, field, value, labels)
