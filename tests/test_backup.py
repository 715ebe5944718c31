"""Backup and restore: one archive, checked in full before anything is touched, that restores every row (every time
to the microsecond), every file and every hash.

The backup runs in the test's process against the test database (committed: transaction=True); the restore runs
as an operator would run it, `manage.py restore` in a new process pointed at a fresh database and media folder
through the environment. Then every table of both databases is compared row by row, and every file by SHA-256.
"""

import datetime
import hashlib
import io
import os
import shutil
import subprocess
import sys
import tarfile
from pathlib import Path

import pytest
from django.core.management import call_command
from django.db import connection

from core import archive
from tests import shop_records

ROOT = Path(__file__).resolve().parent.parent

pytestmark = [pytest.mark.django_db(transaction=True), pytest.mark.pdf]


def _postgres_tools_or_skip():
    missing = [tool for tool in ("pg_dump", "pg_restore") if shutil.which(tool) is None]
    if missing:
        pytest.skip(f"{' and '.join(missing)} not installed: apt-get install postgresql-client (dev.sh names it)")


@pytest.fixture
def target(tmp_path):
    """Environment for a fresh restore target: a new SQLite file, or a new PostgreSQL database, and a media folder."""
    env = {key: value for key, value in os.environ.items() if not key.startswith("LEGWORK_") and key != "DATABASE_URL"}
    env["LEGWORK_MEDIA_ROOT"] = str(tmp_path / "restored-media")
    made = None
    if connection.vendor == "sqlite":
        env["LEGWORK_SQLITE_PATH"] = str(tmp_path / "restored.sqlite3")
    else:
        _postgres_tools_or_skip()
        params = connection.settings_dict
        made = f"{params['NAME']}_restore"
        _admin(f'DROP DATABASE IF EXISTS "{made}"')
        _admin(f'CREATE DATABASE "{made}"')
        auth = params["USER"] + (f":{params['PASSWORD']}" if params.get("PASSWORD") else "")
        env["DATABASE_URL"] = f"postgres://{auth}@{params['HOST'] or '127.0.0.1'}:{params['PORT'] or 5432}/{made}"
    yield env
    if made:
        _admin(f'DROP DATABASE IF EXISTS "{made}" WITH (FORCE)')


def _admin(sql):
    import psycopg

    params = connection.settings_dict
    with psycopg.connect(dbname="postgres", user=params["USER"], password=params.get("PASSWORD") or None,
                         host=params["HOST"] or None, port=params["PORT"] or None, autocommit=True) as admin:
        admin.execute(sql)


def _manage(env, *args):
    return subprocess.run([sys.executable, "manage.py", *args], cwd=ROOT, env=env, capture_output=True, text=True,
                          timeout=300, check=False)


def _rows(cursor, tables):
    """{table: sorted rows} with every column as the database driver returns it (times with microseconds)."""
    out = {}
    for table in tables:
        cursor.execute(f'SELECT * FROM "{table}"')  # noqa: S608 - table names from the catalogue
        out[table] = sorted((tuple(_plain(v) for v in row) for row in cursor.fetchall()), key=repr)
    return out


def _plain(value):
    """A time in UTC to the microsecond (the drivers name UTC's zone differently); bytes for binary."""
    if isinstance(value, datetime.datetime) and value.tzinfo is not None:
        return value.astimezone(datetime.UTC).isoformat(timespec="microseconds")
    if isinstance(value, memoryview):
        return bytes(value)
    return value


def _restored_rows(env, tables):
    if connection.vendor == "sqlite":
        import sqlite3

        # The converters Django registered (dates, times, booleans) apply to this connection too.
        db = sqlite3.connect(env["LEGWORK_SQLITE_PATH"], detect_types=sqlite3.PARSE_DECLTYPES | sqlite3.PARSE_COLNAMES)
        try:
            return _rows(db.cursor(), tables), {}
        finally:
            db.close()
    import psycopg
    from psycopg.types.string import TextLoader

    with psycopg.connect(env["DATABASE_URL"].replace("postgres://", "postgresql://")) as db, db.cursor() as cursor:
        for json_type in ("json", "jsonb"):  # as Django's connection reads them: text, parsed by the field
            cursor.adapters.register_loader(json_type, TextLoader)
        rows = _rows(cursor, tables)
        cursor.execute("SELECT sequencename, last_value FROM pg_sequences WHERE schemaname = 'public'")
        return rows, dict(cursor.fetchall())


def _sequences():
    if connection.vendor != "postgresql":
        return {}
    with connection.cursor() as cursor:
        cursor.execute("SELECT sequencename, last_value FROM pg_sequences WHERE schemaname = 'public'")
        return dict(cursor.fetchall())


def _files(root):
    root = Path(root)
    return {p.relative_to(root).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in root.rglob("*") if p.is_file()}


def test_a_backup_restores_every_row_time_file_and_hash(make, tmp_path, settings, target):
    shop_records.build(make, packet=True)
    backup = tmp_path / "legwork.tar"
    call_command("backup", output=str(backup))
    tables = connection.introspection.table_names()
    with connection.cursor() as cursor:
        before = _rows(cursor, tables)
    files_before = _files(settings.MEDIA_ROOT)
    sequences_before = _sequences()

    done = _manage(target, "restore", str(backup))
    assert done.returncode == 0, done.stderr + done.stdout
    assert "Records verified" in done.stdout

    after, sequences_after = _restored_rows(target, tables)
    for table in tables:
        assert after[table] == before[table], f"{table} differs after the restore"
    with connection.cursor() as cursor:
        cursor.execute("SELECT inspected_at FROM inspections_inspection")
        times = [row[0] for row in cursor.fetchall()]
    assert any(t.microsecond for t in times)  # the comparison covers microseconds, not just whole seconds
    assert len(before["core_seal"]) > 10 and len(before["inspections_photo"]) >= 1
    assert _files(target["LEGWORK_MEDIA_ROOT"]) == files_before and len(files_before) >= 6
    assert sequences_after == sequences_before  # new rows after a restore do not collide with restored ones
    verified = _manage(target, "verify_records")
    assert verified.returncode == 0 and "Records intact" in verified.stdout, verified.stderr


def test_a_restore_refuses_a_target_with_records_unless_forced(make, tmp_path, target):
    make.make_inspection()
    backup = tmp_path / "legwork.tar"
    call_command("backup", output=str(backup))
    assert _manage(target, "restore", str(backup)).returncode == 0
    again = _manage(target, "restore", str(backup))
    assert again.returncode != 0 and "The target is not empty" in again.stderr
    forced = _manage(target, "restore", "--force", str(backup))
    assert forced.returncode == 0, forced.stderr
    if connection.vendor == "sqlite":
        assert "Moved aside" in forced.stdout


def _rewritten(source: Path, out: Path, change):
    """Copy a tar member by member, letting change(name, data) -> data alter one."""
    with tarfile.open(source) as old, tarfile.open(out, "w", format=tarfile.PAX_FORMAT) as new:
        for member in old:
            data = old.extractfile(member).read()
            changed = change(member.name, data)
            if changed is None:
                continue
            info = tarfile.TarInfo(member.name)
            info.size = len(changed)
            new.addfile(info, io.BytesIO(changed))


def test_a_damaged_archive_is_refused_before_anything_is_touched(make, tmp_path, target):
    make.make_photo()
    backup = tmp_path / "legwork.tar"
    manifest = archive.backup(backup)
    photo = next(m["path"] for m in manifest["members"] if m["path"].startswith("media/photos/"))
    damaged = tmp_path / "damaged.tar"
    _rewritten(backup, damaged, lambda name, data: (b"X" + data[1:]) if name == photo else data)
    refused = _manage(target, "restore", str(damaged))
    assert refused.returncode != 0 and photo in refused.stderr and "does not match the manifest" in refused.stderr
    assert not Path(target["LEGWORK_MEDIA_ROOT"]).exists()
    if connection.vendor == "sqlite":
        assert not Path(target["LEGWORK_SQLITE_PATH"]).exists()  # not even opened


@pytest.mark.parametrize("change, message", [
    (lambda name, data: None if name.startswith("media/") else data, "in the manifest but not in the archive"),
    (lambda name, data: data if name != "manifest.json" else data.replace(b"legwork-backup 1", b"other 9"),
     "this Legwork restores legwork-backup 1"),
])
def test_check_names_what_is_wrong(make, tmp_path, change, message):
    make.make_photo()
    backup = tmp_path / "legwork.tar"
    archive.backup(backup)
    damaged = tmp_path / "damaged.tar"
    _rewritten(backup, damaged, change)
    with pytest.raises(archive.ArchiveError, match=message):
        archive.check(damaged)


def test_a_member_outside_the_archive_folders_is_refused(make, tmp_path):
    backup = tmp_path / "legwork.tar"
    archive.backup(backup)
    with tarfile.open(backup, "a") as tar:
        info = tarfile.TarInfo("media/../../escape.txt")
        info.size = 2
        tar.addfile(info, io.BytesIO(b"hi"))
    with pytest.raises(archive.ArchiveError, match="outside"):
        archive.check(backup)


def test_a_backup_never_overwrites_a_file(make, tmp_path):
    backup = tmp_path / "legwork.tar"
    backup.write_bytes(b"keep me")
    with pytest.raises(archive.ArchiveError, match="exists"):
        archive.backup(backup)
    assert backup.read_bytes() == b"keep me"
