"""Database triggers that refuse, through raw SQL too, what core.locking refuses in Python.

Built from each guarded model's Lock (core.locking), for SQLite and PostgreSQL:

- UPDATE of a frozen row is refused unless only its bookkeeping columns change, or it makes one of the declared
  state moves changing only that move's columns (what core.transitions.transition writes);
- a state column changes only along the declared moves, on any row;
- DELETE of a frozen row (every history row, every signed inspection...) is refused;
- INSERT where the lock says so (a photo for a released assembly's inspection);
- many-to-many link rows of a frozen row are neither added nor removed.

A refusal is an integrity error on both databases (django.db.IntegrityError). PostgreSQL's message names the
record ("WPS BSW-101 rev 2 cannot be changed ..."); SQLite's RAISE() takes only a fixed text, so its message names
the kind of record and the table.

install() is idempotent: the migration core.0003 installs the triggers, and a post_migrate handler installs them
again after every migrate (SQLite drops a table's triggers when a migration rebuilds the table) and after flush.
drop() is for `manage.py flush` (SQLite empties tables with DELETE, which the triggers refuse).
"""

from django.db import connections

from core.locking import guarded_models, sql_text

PREFIX = "legwork_lock_"
INTEGRITY = "23000"  # PostgreSQL's integrity_constraint_violation: psycopg raises IntegrityError


def install(connection=None, models=None):
    """Create (or replace) every guard trigger on the connection's database."""
    connection = connection or connections["default"]
    with connection.cursor() as cursor:
        tables = set(connection.introspection.table_names(cursor))
        for statement in _statements(connection, cursor, models or guarded_models(), tables):
            cursor.execute(statement)


def drop(connection=None, models=None):
    """Remove every guard trigger (and PostgreSQL's trigger functions)."""
    connection = connection or connections["default"]
    with connection.cursor() as cursor:
        tables = set(connection.introspection.table_names(cursor))
        for table in _tables(models or guarded_models()):
            if table not in tables:
                continue
            if connection.vendor == "postgresql":
                cursor.execute(f'DROP TRIGGER IF EXISTS legwork_lock ON "{table}"')
                cursor.execute(f"DROP FUNCTION IF EXISTS {PREFIX}{table}()")
            else:
                for op in ("update", "state", "delete", "insert"):
                    cursor.execute(f"DROP TRIGGER IF EXISTS {PREFIX}{table}_{op}")


def installed(connection=None) -> set:
    """The tables that have a guard trigger now (for tests and `manage.py check`)."""
    connection = connection or connections["default"]
    with connection.cursor() as cursor:
        if connection.vendor == "postgresql":
            cursor.execute("SELECT DISTINCT event_object_table FROM information_schema.triggers "
                           "WHERE trigger_name = 'legwork_lock'")
        else:
            cursor.execute("SELECT DISTINCT tbl_name FROM sqlite_master WHERE type = 'trigger' AND name LIKE %s",
                           [PREFIX + "%"])
        return {row[0] for row in cursor.fetchall()}


def expected_tables(models=None) -> set:
    """The tables that should have a guard trigger."""
    return set(_tables(models or guarded_models()))


def _tables(models):
    for model in models:
        lock = model.lock
        if lock.sql_frozen() is None and lock.sql_state_moves() is None and lock.sql_insert_refused() is None:
            continue
        yield model._meta.db_table
        for through, _column, frozen in lock.sql_children():
            if frozen is not None:
                yield through._meta.db_table


def _statements(connection, cursor, models, tables):
    for model in models:
        lock = model.lock
        table = model._meta.db_table
        if table not in tables:
            continue  # not created yet at this point of the migrations: post_migrate installs it later
        if connection.vendor == "postgresql":
            yield from _postgresql(lock, table)
        elif connection.vendor == "sqlite":
            columns = [c.name for c in connection.introspection.get_table_description(cursor, table)]
            yield from _sqlite(lock, table, columns)
        else:  # pragma: no cover - Legwork runs on SQLite and PostgreSQL only
            raise NotImplementedError(f"No record-lock triggers for {connection.vendor}.")
        for through, column, frozen in lock.sql_children():
            if frozen is None or through._meta.db_table not in tables:
                continue
            yield from _child(connection.vendor, lock, through._meta.db_table, column, frozen)


# --- the conditions ------------------------------------------------------------------------------------------

def _unchanged_except(vendor, columns, all_columns=None):
    """Every column but these is the same in NEW as in OLD."""
    if vendor == "postgresql":
        if not columns:
            return "to_jsonb(NEW) = to_jsonb(OLD)"
        keep = "ARRAY[" + ", ".join(sql_text(c) for c in columns) + "]::text[]"
        return f"(to_jsonb(NEW) - {keep}) = (to_jsonb(OLD) - {keep})"
    others = [c for c in all_columns if c not in columns]
    if not others:
        return "1 = 1"
    return "NOT (" + " OR ".join(f'OLD."{c}" IS NOT NEW."{c}"' for c in others) + ")"


def _update_refused(vendor, lock, all_columns=None):
    frozen = lock.sql_frozen()
    if frozen is None:
        return None
    allowed = " OR ".join(f"(({condition}) AND {_unchanged_except(vendor, columns, all_columns)})"
                          for condition, columns in lock.sql_allowances())
    return f"({frozen}) AND NOT ({allowed})"


def _state_refused(lock):
    moves = lock.sql_state_moves()
    if moves is None:
        return None
    column, pairs = moves
    legal = " OR ".join(f'(OLD."{column}" = {sql_text(a)} AND NEW."{column}" = {sql_text(b)})' for a, b in pairs)
    return f'OLD."{column}" <> NEW."{column}"' + (f" AND NOT ({legal})" if legal else "")


# --- SQLite ------------------------------------------------------------------------------------------------------

def _raise_sqlite(lock, table, doing, words=None):
    return f"SELECT RAISE(ABORT, {sql_text(f'{lock.noun} ({table}) ' + (words or lock.sql_words(doing)))})"


def _sqlite(lock, table, columns):
    triggers = {
        "update": ("UPDATE", _update_refused("sqlite", lock, columns), _raise_sqlite(lock, table, "changed")),
        "state": ("UPDATE", _state_refused(lock),
                  _raise_sqlite(lock, table, "", "changes state only by its steps (a database rule of Legwork)")),
        "delete": ("DELETE", lock.sql_undeletable(), _raise_sqlite(lock, table, "deleted")),
        "insert": ("INSERT", lock.sql_insert_refused(), _raise_sqlite(lock, table, "added")),
    }
    for op, (event, condition, action) in triggers.items():
        name = f"{PREFIX}{table}_{op}"
        yield f"DROP TRIGGER IF EXISTS {name}"
        if condition is not None:
            yield (f'CREATE TRIGGER {name} BEFORE {event} ON "{table}" FOR EACH ROW WHEN {condition} '
                   f"BEGIN {action}; END")


# --- PostgreSQL ------------------------------------------------------------------------------------------------

def _raise_pg(lock, row, doing, words=None):
    message = f"concat({lock.sql_name(row)}, {sql_text(' ' + (words or lock.sql_words(doing)))})"
    return f"RAISE EXCEPTION USING ERRCODE = '{INTEGRITY}', MESSAGE = {message};"


def _postgresql(lock, table):
    update, state = _update_refused("postgresql", lock), _state_refused(lock)
    delete, insert = lock.sql_undeletable(), lock.sql_insert_refused()
    body, events = [], []
    if delete is not None:
        events.append("DELETE")
        body.append(f"IF TG_OP = 'DELETE' THEN IF {delete} THEN {_raise_pg(lock, 'OLD', 'deleted')} END IF; "
                    "RETURN OLD; END IF;")
    if insert is not None:
        events.append("INSERT")
        body.append(f"IF TG_OP = 'INSERT' THEN IF {insert} THEN {_raise_pg(lock, 'NEW', 'added')} END IF; "
                    "RETURN NEW; END IF;")
    if update is not None or state is not None:
        events.append("UPDATE")
        if state is not None:
            body.append(f"IF {state} THEN "
                        f"{_raise_pg(lock, 'OLD', '', 'changes state only by its steps (a database rule of Legwork)')}"
                        " END IF;")
        if update is not None:
            body.append(f"IF {update} THEN {_raise_pg(lock, 'OLD', 'changed')} END IF;")
    body.append("IF TG_OP = 'DELETE' THEN RETURN OLD; END IF; RETURN NEW;")
    function = f"{PREFIX}{table}"
    if not events:  # nothing frozen on this table (a user, a job): no trigger
        yield f'DROP TRIGGER IF EXISTS legwork_lock ON "{table}"'
        yield f"DROP FUNCTION IF EXISTS {function}()"
        return
    yield (f"CREATE OR REPLACE FUNCTION {function}() RETURNS trigger LANGUAGE plpgsql AS $legwork$ BEGIN "
           + " ".join(body) + " END $legwork$")
    yield f'DROP TRIGGER IF EXISTS legwork_lock ON "{table}"'
    yield (f'CREATE TRIGGER legwork_lock BEFORE {" OR ".join(events)} ON "{table}" FOR EACH ROW '
           f"EXECUTE FUNCTION {function}()")


# --- many-to-many link tables ----------------------------------------------------------------------------------

def _child(vendor, lock, table, column, frozen):
    parent = lock.table
    words = f"links of a frozen {lock.noun} do not change (a database rule of Legwork)"

    def test(row):
        return f'EXISTS (SELECT 1 FROM "{parent}" p WHERE p."id" = {row}."{column}" AND ({frozen}))'

    if vendor == "postgresql":
        function = f"{PREFIX}{table}"
        message = (f"concat({sql_text(lock.noun + ' ')}, COALESCE(OLD.\"{column}\", NEW.\"{column}\"), "
                   f"{sql_text(': ' + words)})")
        yield (f"CREATE OR REPLACE FUNCTION {function}() RETURNS trigger LANGUAGE plpgsql AS $legwork$ BEGIN "
               f"IF TG_OP = 'INSERT' THEN IF {test('NEW')} THEN "
               f"RAISE EXCEPTION USING ERRCODE = '{INTEGRITY}', MESSAGE = {message.replace('OLD.', 'NEW.')}; "
               f"END IF; RETURN NEW; END IF; "
               f"IF {test('OLD')} THEN RAISE EXCEPTION USING ERRCODE = '{INTEGRITY}', "
               f"MESSAGE = {message.replace('NEW.', 'OLD.')}; END IF; "
               f"IF TG_OP = 'DELETE' THEN RETURN OLD; END IF; RETURN NEW; END $legwork$")
        yield f'DROP TRIGGER IF EXISTS legwork_lock ON "{table}"'
        yield (f'CREATE TRIGGER legwork_lock BEFORE INSERT OR UPDATE OR DELETE ON "{table}" FOR EACH ROW '
               f"EXECUTE FUNCTION {function}()")
        return
    raise_ = f"SELECT RAISE(ABORT, {sql_text(f'{lock.noun} ({table}): ' + words)})"
    for op, event, row in (("insert", "INSERT", "NEW"), ("update", "UPDATE", "OLD"), ("delete", "DELETE", "OLD")):
        name = f"{PREFIX}{table}_{op}"
        yield f"DROP TRIGGER IF EXISTS {name}"
        yield f'CREATE TRIGGER {name} BEFORE {event} ON "{table}" FOR EACH ROW WHEN {test(row)} BEGIN {raise_}; END'
