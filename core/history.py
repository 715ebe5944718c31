"""Write and read the one history every record keeps (core.models.Event).

record() writes one row; history_of() reads the rows of one or more records for a history panel; changes()
turns a record before and after an edit into {field label: [old, new]} as a person reads them.

Who acts: the request's user (core.middleware.acting_user sets it for every request), a service's explicit
`user`, or `acting(user)` around code that runs outside a request. Saves of guarded records (core.locking)
write their created and edited rows themselves; state changes write theirs through core.transitions.

one_entry(): everything saved inside the block (a record's fields and its many-to-many links, as a form saves
them) becomes one row per record, written when the block ends.
"""

from contextlib import contextmanager
from contextvars import ContextVar
from decimal import Decimal

from django.contrib.contenttypes.models import ContentType
from django.db import models
from django.db.models import Q

from core import units
from core.models import Event

CREATED, EDITED, STATE, DELETED, REVISED = "created", "edited", "state", "deleted", "revised"
SECRET = "(changed)"

_actor = ContextVar("legwork_actor", default=None)
_entry = ContextVar("legwork_history_entry", default=None)
_quiet = ContextVar("legwork_history_quiet", default=False)


# --- who acts --------------------------------------------------------------------------------------------------

@contextmanager
def acting(user):
    """Attribute what is saved inside the block to `user` (a User, None, or a callable returning one)."""
    token = _actor.set(user)
    try:
        yield
    finally:
        _actor.reset(token)


def actor():
    """The user the current request or `acting()` block acts for; None for the system itself."""
    value = _actor.get()
    value = value() if callable(value) else value
    return value if getattr(value, "pk", None) else None


# --- write -----------------------------------------------------------------------------------------------------

def record(subject, user, action, *, from_state="", to_state="", reason="", changes=None) -> Event:
    """Append one row to the subject's history."""
    return Event.objects.create(
        subject_type=ContentType.objects.get_for_model(type(subject)), subject_id=subject.pk, action=action,
        from_state=_word(from_state), to_state=_word(to_state), reason=(reason or "").strip(),
        changes=changes or {}, user=user if getattr(user, "pk", None) else None)


def record_many(subjects, user, action, *, reason="") -> list:
    """One row each for many records saved at once (a weld map imported with bulk_create): one query."""
    subjects = list(subjects)
    if not subjects:
        return []
    types = {model: ct.pk for model, ct in ContentType.objects.get_for_models(*{type(s) for s in subjects}).items()}
    user_id = getattr(user, "pk", None)
    reason = (reason or "").strip()
    return Event.objects.bulk_create([  # ids, not objects: 5,000 rows skip 10,000 relation assignments
        Event(subject_type_id=types[type(s)], subject_id=s.pk, action=action, reason=reason, user_id=user_id)
        for s in subjects])


@contextmanager
def one_entry():
    """Gather what is saved inside the block into one history row per record, written at the end of the block.

    Nested blocks join the outer one. Nothing is written when the block raises.
    """
    if _entry.get() is not None:
        yield
        return
    entries = {}
    token = _entry.set(entries)
    try:
        yield
    finally:
        _entry.reset(token)
    for subject, user, action, fields in entries.values():
        record(subject, user, action, **fields)


@contextmanager
def quiet():
    """Saves inside the block write no created or edited rows: a step writes one row that lists them itself."""
    token = _quiet.set(True)
    try:
        yield
    finally:
        _quiet.reset(token)


def note(subject, user, action, *, changes=None, reason="", to_state=""):
    """A created or edited row for `subject`: written now, or merged into the enclosing one_entry() block."""
    if _quiet.get():
        return None
    entries = _entry.get()
    if entries is None:
        return record(subject, user, action, changes=changes, reason=reason, to_state=to_state)
    key = (type(subject)._meta.label, subject.pk)
    if key not in entries:
        entries[key] = (subject, user, action, {"changes": dict(changes or {}), "reason": reason,
                                                "to_state": to_state})
        return None
    _subject, first_user, first_action, fields = entries[key]
    merged = fields["changes"]
    for label, (old, new) in (changes or {}).items():
        merged[label] = [merged[label][0] if label in merged else old, new]
        if merged[label][0] == merged[label][1] and first_action != CREATED:
            del merged[label]  # changed and changed back within one save: nothing to show
    fields["reason"] = fields["reason"] or reason
    fields["to_state"] = fields["to_state"] or to_state
    # A record created in the block stays "created"; its links set in the same block show as its changes.
    entries[key] = (subject, first_user or user, CREATED if CREATED in (first_action, action) else first_action,
                    fields)
    return None


# --- read ------------------------------------------------------------------------------------------------------

def history_of(*subjects):
    """The history of one or more records (a welder and its tests, say), oldest first, with the users: one query.

    Records of several models are matched each by its own type; a record not yet saved has no history.
    """
    match = Q(pk__in=[])
    by_model = {}
    for subject in subjects:
        if subject is not None and subject.pk is not None:
            by_model.setdefault(type(subject), []).append(subject.pk)
    types = ContentType.objects.get_for_models(*by_model) if by_model else {}
    for model, pks in by_model.items():
        match |= Q(subject_type=types[model], subject_id__in=pks)
    return Event.objects.filter(match).select_related("user", "subject_type")


def panel(*subjects, limit=50):
    """The newest `limit` rows of the records' history, newest first, as the history panel lists them."""
    return list(history_of(*subjects).order_by("-at", "-pk")[:limit])


def since(subject, moment):
    """The subject's history rows written at or after `moment` (a datetime), oldest first."""
    return list(history_of(subject).filter(at__gte=moment)) if moment is not None else []


def latest(subject):
    """The subject's newest history row, or None."""
    return history_of(subject).order_by("-at", "-pk").first()


# --- what changed ----------------------------------------------------------------------------------------------

def changes(before, after, field_names, system="US", secret=()) -> dict:
    """{label: [old, new]} for the fields whose value differs between two copies of a record.

    secret: fields whose values are never written (a password): the row says only that it changed.
    """
    found = {}
    for name in field_names:
        field = after._meta.get_field(name)
        old, new = value_text(before, field, system), value_text(after, field, system)
        if old != new:
            found[label_of(field)] = ["", SECRET] if name in secret else [old, new]
    return found


def label_of(field) -> str:
    return str(field.verbose_name)


def value_text(obj, field, system="US") -> str:
    """A field's value as the history keeps it: words a person reads, lengths in the record's units."""
    if isinstance(field, models.ManyToManyField):
        if obj.pk is None:
            return ""
        return ", ".join(sorted(str(item) for item in getattr(obj, field.name).all()))
    if field.is_relation:
        value = getattr(obj, field.name)
        return "" if value is None else str(value)
    value = getattr(obj, field.attname)
    if field.choices:
        return str(dict(field.flatchoices).get(value, value))
    return _text(value, system)


def _text(value, system):
    if value is None or value == "":
        return ""
    for kind, formatter in ((units.Length, units.format_length), (units.Temperature, units.format_temperature),
                            (units.Force, units.format_force), (units.Speed, units.format_speed),
                            (units.Flow, units.format_flow)):
        if isinstance(value, kind):
            return formatter(value, system)
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, Decimal):
        return units._plain(value)
    return str(value)


def _word(state):
    if isinstance(state, bool):
        return "yes" if state else "no"
    return "" if state is None else str(state)
