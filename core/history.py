"""Write and read the one history every record keeps (core.models.Event).

record() writes one row; history_of() reads a record's rows for its history panel; changes() turns a record
before and after an edit into {field label: [old, new]} as a person reads them. State changes write their row
through core.transitions.transition, which calls record() inside its lock.
"""

from decimal import Decimal

from django.contrib.contenttypes.models import ContentType
from django.db import models

from core import units
from core.models import Event

CREATED, EDITED, STATE, DELETED = "created", "edited", "state", "deleted"


def record(subject, user, action, *, from_state="", to_state="", reason="", changes=None) -> Event:
    """Append one row to the subject's history."""
    return Event.objects.create(
        subject_type=ContentType.objects.get_for_model(type(subject)), subject_id=subject.pk, action=action,
        from_state=_word(from_state), to_state=_word(to_state), reason=(reason or "").strip(),
        changes=changes or {}, user=user if getattr(user, "pk", None) else None)


def history_of(subject):
    """The subject's history, oldest first, with the users (one query)."""
    return (Event.objects.filter(subject_type=ContentType.objects.get_for_model(type(subject)),
                                 subject_id=subject.pk)
            .select_related("user", "subject_type"))


def changes(before, after, field_names, system="US") -> dict:
    """{label: [old, new]} for the fields whose value differs between two copies of a record."""
    found = {}
    for name in field_names:
        field = after._meta.get_field(name)
        old, new = _value(before, field, system), _value(after, field, system)
        if old != new:
            found[str(field.verbose_name)] = [old, new]
    return found


def _value(obj, field, system):
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
