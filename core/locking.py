"""Records nobody can quietly change: what may change on a stored row, declared once per model.

A model that holds signed or shared records mixes in `Guarded` and declares `lock = Lock(...)` (or a Lock
subclass for a rule of its own, as the weld's). That one declaration is read by:

- `Guarded.save()` and `delete()`: a change to a frozen row raises RecordLocked; a state field moves only by its
  steps (core.transitions.transition); an editable row is saved by compare-and-set on its `version` (Stale when
  someone saved it after the form was opened); each creation and edit writes its history row with old and new
  values (core.history), attributed to the acting user;
- `GuardedQuerySet.update()`, `bulk_update()` and `delete()` (also the model's base manager, so
  `_base_manager` refuses the same);
- the many-to-many guard (a frozen WPS's PQRs, a final-inspected weld's welders, a built packet's travelers);
- core.triggers, which builds from it the database triggers that refuse the same through raw SQL.

transition() is the one path past the guard for a state step: it locks the row, checks the state, saves the
named fields with models.Model.save(update_fields=...) and writes the history row. The triggers allow exactly
the moves declared here, with the fields each move names.
"""

from contextlib import nullcontext
from dataclasses import dataclass

from django.core.exceptions import FieldDoesNotExist
from django.db import models, transaction
from django.db.models import F, Q
from django.db.models.signals import m2m_changed
from django.utils import timezone

from core.errors import RecordLocked, Stale

ALWAYS = "always"


class _EveryRow:
    def __repr__(self):
        return "EVERY_ROW"


EVERY_ROW = _EveryRow()  # refusing()/undeletable(): every row refuses, without asking the database
_ACTOR = object()  # save(user=...) not given: the acting user (core.history.actor)


@dataclass(frozen=True)
class Move:
    """A step that moves a stored row from one state to another, and the other fields it sets on the way."""

    source: str
    target: str
    fields: tuple = ()


def sql_text(text) -> str:
    """A string literal for SQL (both databases): single quotes doubled."""
    return "'" + str(text).replace("'", "''") + "'"


class Lock:
    """Which stored rows of a model are frozen, and what may still change on them.

    Lock(noun): nothing frozen; the record is edited in place by version, with history.
    state, frozen: rows whose stored `state` is one of `frozen` are frozen; frozen=ALWAYS: every stored row.
    moves: the state steps (core.transitions), each with the fields it sets. The state field changes by no
        other path, on any row.
    free: bookkeeping fields any path may set on a frozen row (a weld's pointers to its latest inspections).
    advice: what to do instead, ending the refusal ("start a new revision.").
    name: what names a row in the database's refusal: fields, and words between them ("number", " rev ", "revision").
    """

    steps_only = ()  # fields, besides the state, that only a step sets (the weld's revision)
    related = ()  # select_related when the guard reads the stored row
    lock_of = ("self",)  # rows locked with it (PostgreSQL's FOR UPDATE OF)

    def __init__(self, noun, *, state=None, frozen=(), moves=(), free=(), advice="", name=("id",)):
        self.noun = noun
        self.state = state
        self.frozen = frozen if frozen == ALWAYS else frozenset(frozen)
        self.moves = tuple(moves)
        self.free = frozenset(free)
        self.advice = advice
        self.name = tuple(name)
        self.model = None

    def __set_name__(self, owner, name):
        self.model = owner

    # --- facts about the model --------------------------------------------------------------------------------

    @property
    def versioned(self) -> bool:
        return any(f.name == "version" for f in self.model._meta.concrete_fields)

    @property
    def step_fields(self) -> frozenset:
        return frozenset(([self.state] if self.state else []) + list(self.steps_only))

    def column(self, name) -> str:
        return self.model._meta.get_field(name).column

    def columns(self, names) -> tuple:
        return tuple(self.column(n) for n in names)

    @property
    def table(self) -> str:
        return self.model._meta.db_table

    # --- the Python guard ------------------------------------------------------------------------------------

    def stored(self, record, lock_row=True):
        """The row as stored, locked against concurrent writers until the transaction ends."""
        rows = self.model._base_manager.select_related(*self.related)
        if lock_row:
            rows = rows.select_for_update(of=self.lock_of)
        return rows.get(pk=record.pk)

    def frozen_row(self, stored) -> bool:
        if self.frozen == ALWAYS:
            return True
        return bool(self.frozen) and getattr(stored, self.state) in self.frozen

    def changeable(self, stored):
        """The fields save() may change on this stored row; None: any (the state fields aside)."""
        return self.free if self.frozen_row(stored) else None

    def check_change(self, stored, changed):
        """Raise RecordLocked unless save() may make these changes (field names) to the stored row."""
        stepped = [n for n in changed if n in self.step_fields]
        if stepped:
            raise RecordLocked(f"{stored}: {self._labels(stepped)} changes only by its steps, never by an edit.")
        allowed = self.changeable(stored)
        if allowed is None:
            return
        refused = [n for n in changed if n not in allowed]
        if refused or (not changed and self.frozen_row(stored)):
            raise RecordLocked(self.refusal(stored, "changed"))

    def refusing(self, names):
        """Rows a queryset update of these fields must not touch: a Q, EVERY_ROW, or None (none)."""
        if names & self.step_fields:
            return EVERY_ROW
        if names <= self.free:
            return None
        if self.frozen == ALWAYS:
            return EVERY_ROW
        if not self.frozen:
            return None
        return Q(**{f"{self.state}__in": self.frozen})

    def undeletable(self):
        """Rows that must not be deleted: a Q, EVERY_ROW, or None."""
        if self.frozen == ALWAYS:
            return EVERY_ROW
        if not self.frozen:
            return None
        return Q(**{f"{self.state}__in": self.frozen})

    def check_delete(self, stored):
        refused = self.undeletable()
        if refused is EVERY_ROW or (refused is not None and self.model._base_manager.filter(refused, pk=stored.pk)
                                    .exists()):
            raise RecordLocked(self.refusal(stored, "deleted"))

    def check_insert(self, record):
        """Raise RecordLocked when a new row may not be added (a photo to a released assembly's inspection)."""

    def m2m_frozen(self, stored, name) -> bool:
        """May the links of this many-to-many field of the stored row no longer change?"""
        return self.frozen_row(stored)

    def refusal(self, stored, doing="changed") -> str:
        """The refusal in words: what the record is, and what to do instead."""
        if stored is None:
            return f"A {self.noun} of this kind cannot be {doing}; {self.advice}"
        if self.frozen != ALWAYS and self.state:
            label = stored._meta.get_field(self.state).flatchoices
            label = str(dict(label).get(getattr(stored, self.state), getattr(stored, self.state))).lower()
            return f"{stored} is {label} and cannot be {doing}; {self.advice}"
        return f"{stored} cannot be {doing}; {self.advice}"

    def _labels(self, names):
        return ", ".join(str(self.model._meta.get_field(n).verbose_name) for n in names)

    # --- the database triggers (core.triggers builds the statements from these) ------------------------------
    # Conditions are SQL both SQLite and PostgreSQL read: OLD."column", NEW."column", subqueries, IN lists.

    def sql_frozen(self):
        """When a stored row (OLD) is frozen; None: never."""
        if self.frozen == ALWAYS:
            return "1 = 1"
        if not self.frozen:
            return None
        return f'OLD."{self.column(self.state)}" IN ({", ".join(sql_text(s) for s in sorted(self.frozen))})'

    def sql_allowances(self):
        """What may still change on a frozen row: [(condition on OLD and NEW, columns that may differ)]."""
        free = self.columns(sorted(self.free | ({"version"} if self.versioned else set())))
        allowed = [("1 = 1", free)]
        if self.state:
            state = self.column(self.state)
            for move in self.moves:
                allowed.append((f'OLD."{state}" = {sql_text(move.source)} AND NEW."{state}" = '
                                f'{sql_text(move.target)}', (state, *self.columns(move.fields), *free)))
        return allowed

    def sql_state_moves(self):
        """The state column and its legal (from, to) pairs; None without a state field."""
        if not self.state:
            return None
        return self.column(self.state), [(m.source, m.target) for m in self.moves]

    def sql_undeletable(self):
        return self.sql_frozen()

    def sql_insert_refused(self):
        """When a new row (NEW) may not be added; None: always may."""
        return None

    def sql_children(self):
        """Many-to-many link tables frozen with their row: [(through model, column to this row, frozen SQL on
        the parent row aliased "p")]."""
        found = []
        for field in self.model._meta.local_many_to_many:
            through = field.remote_field.through
            column = through._meta.get_field(field.m2m_field_name()).column
            found.append((through, column, self.sql_m2m_frozen(field.name)))
        return found

    def sql_m2m_frozen(self, name):
        """When the links of many-to-many field `name` are frozen, on the parent row aliased "p"."""
        frozen = self.sql_frozen()
        return None if frozen is None else frozen.replace("OLD.", "p.")

    def sql_name(self, row="OLD"):
        """A PostgreSQL expression naming the row in the refusal ("WPS BSW-101 rev 2"): `name` lists fields and,
        between them, words (anything that is not a field of the model)."""
        parts = [sql_text(self.noun + " ")]
        for name in self.name:
            try:
                parts.append(f'{row}."{self.column(name)}"')
            except FieldDoesNotExist:
                parts.append(sql_text(name))
        return "concat(" + ", ".join(parts) + ")"

    def sql_words(self, doing="changed"):
        """The refusal's words after the record's name, for the triggers."""
        return f"cannot be {doing} (a database rule of Legwork); {self.advice}"


class GuardedQuerySet(models.QuerySet):
    """update(), bulk_update() (which calls update()) and delete() that refuse frozen rows.

    Used as `objects` and, through Meta.base_manager_name, as the base manager. An update of editable rows bumps
    their version (a form opened before it then finds its record stale) but writes no history: pages and
    services edit one record at a time with save(), or move it with core.transitions.transition.
    """

    def update(self, **kwargs):
        lock = self.model.lock
        names = frozenset(self.model._meta.get_field(n).name for n in kwargs)
        refusing = lock.refusing(names - {"version"})
        if refusing is EVERY_ROW:
            raise RecordLocked(lock.refusal(None, "changed") if not (names & lock.step_fields)
                               else f"{lock._labels(sorted(names & lock.step_fields))} of a {lock.noun} changes "
                                    "only by its steps (core.transitions), never by a bulk update.")
        if refusing is not None:
            hit = self.filter(refusing).first()
            if hit is not None:
                raise RecordLocked(lock.refusal(hit, "changed"))
        if lock.versioned and "version" not in names and not names <= lock.free:
            kwargs["version"] = F("version") + 1
        return super().update(**kwargs)

    update.alters_data = True

    def bulk_update(self, objs, fields, batch_size=None):
        # Checked here, before Django's own bulk_update opens its transaction: a refusal raised inside that block
        # would leave the caller's transaction unusable.
        objs = list(objs)
        lock = self.model.lock
        names = frozenset(self.model._meta.get_field(n).name for n in fields)
        refusing = lock.refusing(names - {"version"})
        if refusing is EVERY_ROW and objs:
            raise RecordLocked(lock.refusal(None, "changed"))
        if refusing is not None and objs:
            hit = self.filter(refusing, pk__in=[o.pk for o in objs]).first()
            if hit is not None:
                raise RecordLocked(lock.refusal(hit, "changed"))
        return super().bulk_update(objs, fields, batch_size=batch_size)

    bulk_update.alters_data = True

    def delete(self):
        from core import history  # core.history reads core.models, which imports this

        lock = self.model.lock
        refused = lock.undeletable()
        if refused is EVERY_ROW:
            raise RecordLocked(lock.refusal(None, "deleted"))
        if refused is not None:
            hit = self.filter(refused).first()
            if hit is not None:
                raise RecordLocked(lock.refusal(hit, "deleted"))
        with _transaction(self):
            if self.model.keeps_history:
                who = history.actor()
                for row in self.model._base_manager.filter(pk__in=self.values("pk")):
                    history.record(row, who, history.DELETED, reason=str(row))
            return super().delete()

    delete.alters_data = True
    delete.queryset_only = True


class Guarded(models.Model):
    """A record whose stored rows change only as its `lock` allows, by version, with history.

    save(user=..., reason=...): `user` is who acts (default: the acting user, core.history.actor); `reason`
    goes on the history row. quiet_fields: saves of only these write no history and need no version (a login's
    time); secret_fields: their history says only that they changed.
    """

    lock = None  # every guarded model declares its own Lock
    keeps_history = True
    quiet_fields = frozenset()
    secret_fields = frozenset()
    history_exclude = frozenset()  # computed or bookkeeping fields no history row lists

    class Meta:
        abstract = True

    def history_system(self):
        """The unit system the history writes this record's lengths in."""
        return getattr(self, "unit_system", None) or "US"

    def save(self, *args, user=_ACTOR, reason="", **kwargs):
        from core import history  # core.history reads core.models, which imports this

        user = history.actor() if user is _ACTOR else user
        if self._state.adding or self.pk is None:
            with _transaction(self):
                self.lock.check_insert(self)
                super().save(*args, **kwargs)
                if self.keeps_history:
                    state = getattr(self, self.lock.state, "") if self.lock.state else ""
                    history.note(self, user, history.CREATED, reason=reason, to_state=state)
            return
        update_fields = kwargs.get("update_fields")
        if update_fields is not None and frozenset(update_fields) <= self.quiet_fields:
            super().save(*args, **kwargs)
            return
        with _transaction(self):
            try:
                stored = self.lock.stored(self)
            except type(self).DoesNotExist:
                raise Stale(f"{self} was deleted after this page was opened; nothing was saved.") from None
            changed = [name for name in self._compared(update_fields)
                       if _differs(self._meta.get_field(name), stored, self)]
            self.lock.check_change(stored, changed)
            if self.lock.versioned and self.version != stored.version:
                raise stale(self, stored)
            if not changed:
                return
            if self.lock.versioned:
                kwargs = self._next_version(stored, kwargs)
            try:
                super().save(*args, **kwargs)
            except BaseException:
                if self.lock.versioned:
                    self.version = stored.version
                raise
            finally:
                self.__dict__.pop("_expected_version", None)
            shown = [n for n in changed if n not in self.history_exclude]
            if self.keeps_history and shown:
                history.note(self, user, history.EDITED, reason=reason,
                             changes=history.changes(stored, self, shown, stored.history_system(),
                                                     secret=self.secret_fields))

    save.alters_data = True

    def _next_version(self, stored, kwargs):
        self._expected_version = stored.version
        self.version = stored.version + 1
        if kwargs.get("update_fields") is not None:
            kwargs = {**kwargs, "update_fields": [*kwargs["update_fields"], "version"]}
        return kwargs

    def _do_update(self, base_qs, using, pk_val, values, update_fields, forced_update):
        # Compare-and-set: the UPDATE matches only the version the guard read. The guard holds the row lock, so
        # this fails only if something wrote the row past the lock; the row count says so and nothing is saved.
        expected = self.__dict__.get("_expected_version")
        if expected is None:
            return super()._do_update(base_qs, using, pk_val, values, update_fields, forced_update)
        if not super()._do_update(base_qs.filter(version=expected), using, pk_val, values, update_fields,
                                  forced_update):
            raise Stale(f"{self} was saved by someone else at the same moment; nothing was saved.")
        return True

    def _compared(self, update_fields):
        skip = {"version"} | set(self.quiet_fields)
        if update_fields is not None:
            return [self._meta.get_field(n).name for n in update_fields if n not in skip]
        return [f.name for f in self._meta.concrete_fields if not f.primary_key and f.name not in skip]

    def delete(self, *args, user=_ACTOR, **kwargs):
        from core import history  # core.history reads core.models, which imports this

        user = history.actor() if user is _ACTOR else user
        with _transaction(self):
            stored = self.lock.stored(self)
            self.lock.check_delete(stored)
            if self.keeps_history:
                history.record(self, user, history.DELETED, reason=str(stored))
            return super().delete(*args, **kwargs)

    delete.alters_data = True


def _transaction(record_or_queryset):
    """A transaction for the guard's read-check-write: the caller's, or one of its own.

    Not a nested atomic block: a refusal raised out of one would mark the caller's transaction as broken (and a
    savepoint costs two queries per save); the guard raises before it writes anything.
    """
    using = getattr(record_or_queryset, "db", None) or getattr(getattr(record_or_queryset, "_state", None), "db",
                                                                     None) or "default"
    connection = transaction.get_connection(using)
    return nullcontext() if connection.in_atomic_block else transaction.atomic(using=using)


def _differs(field, stored, record) -> bool:
    return getattr(stored, field.attname) != getattr(record, field.attname)


def stale(record, stored, last=None) -> Stale:
    """The Stale refusal for a form opened at `record.version`, naming who changed the record since and when
    (`last`: that history row when known; else the record's newest)."""
    from core import history  # core.history reads core.models, which imports this

    last = last or history.latest(stored)
    if last is not None and last.action != history.CREATED:
        who = str(last.user) if last.user else "Legwork"
        said = f"{who} changed {stored} at {timezone.localtime(last.at):%Y-%m-%d %H:%M}"
    else:
        said = f"{stored} was changed by someone else"
    return Stale(f"{said}, after you opened it. Nothing was saved: your input is kept below; check it against "
                 "the record as it is now and save again.", version=stored.version, current=stored,
                 events=[last] if last is not None else [])


def bump_version(record) -> list:
    """For a step (core.transitions): the version field to save with it, moved on; [] for an unversioned model."""
    lock = getattr(type(record), "lock", None)
    if lock is None or not lock.versioned:
        return []
    record.version += 1
    return ["version"]


# --- many-to-many links ----------------------------------------------------------------------------------------

def _m2m_guard(sender, instance, action, reverse, model, pk_set, **kwargs):
    """Refuse link changes of a frozen row, and keep their history (old and new list) like a field's."""
    from core import history  # core.history reads core.models, which imports this

    if action not in ("pre_add", "pre_remove", "pre_clear", "post_add", "post_remove", "post_clear"):
        return
    owner, name = _M2M.get(sender, (None, None))
    if owner is None:
        return
    lock = owner.lock
    if reverse:  # e.g. pqr.procedures.add(wps): the WPSs named are the rows whose links change
        if action.startswith("pre_"):
            parents = owner._base_manager.select_related(*lock.related)
            parents = (parents.filter(pk__in=pk_set) if pk_set is not None
                       else parents.filter(**{name: instance}))
            for parent in parents:
                if lock.m2m_frozen(parent, name):
                    raise RecordLocked(lock.refusal(parent, "changed"))
        return
    field = owner._meta.get_field(name)
    if action.startswith("pre_"):
        stored = lock.stored(instance, lock_row=False)
        if lock.m2m_frozen(stored, name):
            raise RecordLocked(lock.refusal(stored, "changed"))
        before = instance.__dict__.setdefault("_m2m_before", {})
        before.setdefault(name, history.value_text(instance, field))
        return
    old = instance.__dict__.get("_m2m_before", {}).pop(name, "")
    new = history.value_text(instance, field)
    if old != new and owner.keeps_history:
        history.note(instance, history.actor(), history.EDITED, changes={history.label_of(field): [old, new]})


_M2M = {}  # through model -> (guarded model, field name)


def connect_m2m_guards(models_):
    """Connect the many-to-many guard for every guarded model's links (core.apps.CoreConfig.ready)."""
    for model in models_:
        for field in model._meta.local_many_to_many:
            _M2M[field.remote_field.through] = (model, field.name)
    m2m_changed.connect(_m2m_guard, dispatch_uid="legwork_m2m_guard")


def guarded_models():
    from django.apps import apps

    return [m for m in apps.get_models() if issubclass(m, Guarded)]
