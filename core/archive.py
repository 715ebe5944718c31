"""Backups that restore: one tar holding a consistent database snapshot, every media file and a manifest.

backup(): the database first (SQLite's online backup API, or pg_dump in custom format inside an exported
REPEATABLE READ snapshot, so the row counts, migrations and chain head written to the manifest are those of the
dump), then the media files. Legwork writes a stored file before the row that names it commits and never replaces
or deletes one, so every file the snapshot names is already on disk when the media are copied; files written
after the snapshot come along as harmless extras. The tar is written beside the output as `.partial` and renamed
when complete.

restore(): reads the whole archive once and checks every member's size and SHA-256 against the manifest, its
names, the database kind and the migrations BEFORE it touches anything; refuses a target database or media folder
that holds records unless forced; unpacks the media to a staging folder (checked again), restores the database
(SQLite online backup into the target file; pg_restore --clean in one transaction), puts the media in place, and
compares every table's row count with the manifest. The layout is in docs/decisions/2026-12-04-backup-archive.md.

Both read and write the local media folder only. With the files in an object store (LEGWORK_STORAGE=s3, several
machines) they refuse before doing anything: the bucket is backed up by the store itself (versioning, replication)
and the database with pg_dump; `manage.py verify_records` checks every stored file's SHA-256 through the storage
API whichever the backend.
"""

from __future__ import annotations

import hashlib
import io
import json
import os
import shutil
import sqlite3
import subprocess
import tarfile
import tempfile
from dataclasses import dataclass, field
from functools import partial
from pathlib import Path, PurePosixPath

from django.apps import apps
from django.conf import settings
from django.core.files.storage import FileSystemStorage, default_storage
from django.db import connections, transaction
from django.db.migrations.loader import MigrationLoader
from django.utils import timezone

from core.version import legwork_version

FORMAT = "legwork-backup 1"
MANIFEST = "manifest.json"
DATABASE_MEMBER = {"sqlite": "database/legwork.sqlite3", "postgresql": "database/legwork.pgdump"}
MEDIA = "media/"
RECORD_APPS = ("core", "procedures", "inspections")
CHUNK = 1 << 20


class ArchiveError(Exception):
    """The archive or the target is not fit to restore; the message says what and what to do."""


@dataclass
class Restored:
    manifest: dict
    rows: int = 0
    files: int = 0
    moved_aside: list[str] = field(default_factory=list)
    pending_migrations: list[str] = field(default_factory=list)


# --- backup ---------------------------------------------------------------------------------------------------------

def _local_media(media_root) -> Path:
    """The media folder to back up or restore; refused when the files live in an object store, not on this disk."""
    if media_root is None and not isinstance(default_storage, FileSystemStorage):
        raise ArchiveError("The files are in an object store (LEGWORK_STORAGE=s3), not in a media folder on this "
                           "machine: backup and restore handle the local disk only. Back up the bucket with the "
                           "store's own versioning or replication and the database with pg_dump (README, "
                           "\"Deployment on several machines\"); manage.py verify_records checks the files.")
    return Path(media_root or settings.MEDIA_ROOT)


def backup(output, *, using="default", media_root=None) -> dict:
    """Write one consistent archive of the database and the media to `output`; returns its manifest."""
    output = Path(output)
    if output.exists():
        raise ArchiveError(f"{output} exists: name a new file (backups are never overwritten).")
    media_root = _local_media(media_root)
    connection = connections[using]
    if connection.vendor not in DATABASE_MEMBER:
        raise ArchiveError(f"Backups support SQLite and PostgreSQL, not {connection.vendor}.")
    output.parent.mkdir(parents=True, exist_ok=True)
    unfinished = output.with_name(output.name + ".partial")
    with tempfile.TemporaryDirectory(prefix="legwork-backup-") as work:
        snapshot = (_sqlite_snapshot if connection.vendor == "sqlite" else _postgresql_snapshot)(connection,
                                                                                                  Path(work))
        try:
            with tarfile.open(unfinished, "w", format=tarfile.PAX_FORMAT) as tar:
                members = [_add(tar, snapshot.pop("path"), DATABASE_MEMBER[connection.vendor])]
                for path in _media_files(media_root):
                    members.append(_add(tar, path, MEDIA + path.relative_to(media_root).as_posix()))
                manifest = {
                    "format": FORMAT, "created_at": timezone.now().isoformat(timespec="microseconds"),
                    "legwork_version": legwork_version(), **snapshot, "members": members,
                    "media_files": len(members) - 1,
                }
                data = json.dumps(manifest, indent=1, sort_keys=True).encode()
                info = tarfile.TarInfo(MANIFEST)
                info.size, info.mtime, info.mode = len(data), int(timezone.now().timestamp()), 0o644
                tar.addfile(info, io.BytesIO(data))
            with unfinished.open("rb+") as handle:
                os.fsync(handle.fileno())
            unfinished.rename(output)
        finally:
            unfinished.unlink(missing_ok=True)
    return manifest


def _media_files(root: Path):
    if not root.is_dir():
        return []
    found = []
    for folder, dirs, files in os.walk(root, followlinks=False):
        dirs.sort()
        for name in sorted(files):
            path = Path(folder) / name
            if path.is_file() and not path.is_symlink():
                found.append(path)
    return found


class _Hashing:
    def __init__(self, handle):
        self.handle, self.digest = handle, hashlib.sha256()

    def read(self, size=-1):
        data = self.handle.read(size)
        self.digest.update(data)
        return data


def _add(tar: tarfile.TarFile, path: Path, name: str) -> dict:
    with path.open("rb") as handle:
        stat = os.fstat(handle.fileno())
        info = tarfile.TarInfo(name)
        info.size, info.mtime, info.mode = stat.st_size, int(stat.st_mtime), 0o644
        reader = _Hashing(handle)
        tar.addfile(info, reader)
    return {"path": name, "size": info.size, "sha256": reader.digest.hexdigest()}


def _sqlite_snapshot(connection, work: Path) -> dict:
    """SQLite's online backup API: a consistent copy while others go on writing (WAL)."""
    target = work / "legwork.sqlite3"
    connection.ensure_connection()
    copy = sqlite3.connect(target)
    try:
        connection.connection.backup(copy)
    finally:
        copy.close()
    with sqlite3.connect(target) as db:
        facts = _facts(db.cursor(), [r[0] for r in db.execute(
            "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name")],
            quote=lambda name: '"' + name.replace('"', '""') + '"')
    db.close()
    return {"path": target, "database": {"vendor": "sqlite", "member": DATABASE_MEMBER["sqlite"],
                                         "tool": f"SQLite online backup API, SQLite {sqlite3.sqlite_version}"},
            **facts}


def _postgresql_snapshot(connection, work: Path) -> dict:
    """pg_dump in custom format, inside an exported snapshot the manifest's facts are read from too."""
    target = work / "legwork.pgdump"
    tool = _tool("pg_dump")
    connection.ensure_connection()
    with transaction.atomic(using=connection.alias), connection.cursor() as cursor:
        cursor.execute("SET TRANSACTION ISOLATION LEVEL REPEATABLE READ, READ ONLY")
        cursor.execute("SELECT pg_export_snapshot()")
        snapshot_id = cursor.fetchone()[0]
        _run([tool, "--format=custom", "--compress=6", f"--snapshot={snapshot_id}", "--file", str(target)],
             connection)
        facts = _facts(cursor, connection.introspection.table_names(cursor), quote=connection.ops.quote_name)
        cursor.execute("SHOW server_version")
        server = cursor.fetchone()[0]
    version = subprocess.run([tool, "--version"], capture_output=True, text=True, check=False).stdout.strip()
    return {"path": target, "database": {"vendor": "postgresql", "member": DATABASE_MEMBER["postgresql"],
                                         "tool": f"{version}, custom format", "server_version": server}, **facts}


def _facts(cursor, tables, quote) -> dict:
    """Applied migrations, every table's row count and the record chain's head, as the snapshot holds them."""
    counts = {}
    for table in sorted(tables):
        cursor.execute(f"SELECT COUNT(*) FROM {quote(table)}")  # noqa: S608 - names from the catalogue, quoted
        counts[table] = cursor.fetchone()[0]
    schema = {}
    if "django_migrations" in counts:
        cursor.execute("SELECT app, name FROM django_migrations ORDER BY app, name")
        for app, name in cursor.fetchall():
            schema.setdefault(app, []).append(name)
    head = None
    if counts.get("core_seal"):
        cursor.execute("SELECT sequence, chain_sha256 FROM core_seal ORDER BY sequence DESC LIMIT 1")
        sequence, digest = cursor.fetchone()
        head = {"sequence": sequence, "sha256": digest}
    return {"schema": schema, "tables": counts, "chain_head": head}


def _tool(name: str) -> str:
    found = shutil.which(name)
    if not found:
        raise ArchiveError(f"{name} is not installed: on Debian, apt-get install postgresql-client "
                           "(the same major version as the server, or newer).")
    return found


def _run(command, connection):
    """Run a PostgreSQL client tool against the connection's database; its own error text on failure."""
    params = connection.settings_dict
    wanted = {"PGDATABASE": params["NAME"], "PGHOST": params.get("HOST"), "PGPORT": params.get("PORT"),
              "PGUSER": params.get("USER"), "PGPASSWORD": params.get("PASSWORD"), "PGCONNECT_TIMEOUT": "10"}
    env = {**os.environ, **{key: str(value) for key, value in wanted.items() if value}}
    done = subprocess.run(command, env=env, capture_output=True, text=True, check=False)
    if done.returncode != 0:
        raise ArchiveError(f"{Path(command[0]).name} failed: {done.stderr.strip() or done.stdout.strip()}")
    return done


# --- check ----------------------------------------------------------------------------------------------------------

def check(path) -> dict:
    """Read the whole archive: every member where the manifest says, with its size and SHA-256. Touches nothing."""
    path = Path(path)
    if not path.is_file():
        raise ArchiveError(f"{path} is not a file.")
    found, manifest_bytes = {}, None
    try:
        with tarfile.open(path, "r:*") as tar:
            for member in tar:
                _safe(member)
                if member.name in found or (member.name == MANIFEST and manifest_bytes is not None):
                    raise ArchiveError(f"{member.name} appears twice in the archive.")
                handle = tar.extractfile(member)
                if member.name == MANIFEST:
                    manifest_bytes = handle.read(64 * CHUNK)
                    continue
                digest = hashlib.sha256()
                for chunk in iter(partial(handle.read, CHUNK), b""):
                    digest.update(chunk)
                found[member.name] = (member.size, digest.hexdigest())
    except (tarfile.TarError, EOFError, OSError) as exc:
        raise ArchiveError(f"{path} is not a readable backup archive ({exc}).") from None
    if manifest_bytes is None:
        raise ArchiveError(f"{path} has no {MANIFEST}: it is not a Legwork backup.")
    try:
        manifest = json.loads(manifest_bytes)
    except ValueError:
        raise ArchiveError(f"{MANIFEST} is not readable JSON.") from None
    if not isinstance(manifest, dict) or manifest.get("format") != FORMAT:
        raise ArchiveError(f"{MANIFEST} says format {manifest.get('format') if isinstance(manifest, dict) else '?'}"
                           f"; this Legwork restores {FORMAT}.")
    listed = {m["path"]: m for m in manifest.get("members", [])}
    for name in sorted(set(listed) - set(found)):
        raise ArchiveError(f"{name} is in the manifest but not in the archive.")
    for name in sorted(set(found) - set(listed)):
        raise ArchiveError(f"{name} is in the archive but not in the manifest.")
    for name, (size, digest) in found.items():
        if (size, digest) != (listed[name]["size"], listed[name]["sha256"]):
            raise ArchiveError(f"{name} does not match the manifest: SHA-256 {digest}, the manifest says "
                               f"{listed[name]['sha256']}. The archive is damaged; use another backup.")
    if manifest.get("database", {}).get("member") not in found:
        raise ArchiveError("The archive holds no database.")
    return manifest


def _safe(member: tarfile.TarInfo):
    name = member.name
    parts = PurePosixPath(name).parts
    if not member.isfile():
        raise ArchiveError(f"{name}: only regular files belong in a Legwork backup.")
    if name.startswith("/") or "\\" in name or ".." in parts or not parts:
        raise ArchiveError(f"{name}: a member name outside the archive's folders.")
    if name != MANIFEST and name not in DATABASE_MEMBER.values() and not name.startswith(MEDIA):
        raise ArchiveError(f"{name}: not a member a Legwork backup holds.")


# --- restore --------------------------------------------------------------------------------------------------------

def not_empty(using="default", media_root=None) -> list[str]:
    """Why the target is not empty: tables of records that hold rows, and files in the media folder."""
    connection = connections[using]
    existing = set(connection.introspection.table_names())
    reasons = []
    for model in apps.get_models():
        table = model._meta.db_table
        if model._meta.app_label in RECORD_APPS and table in existing and not model._meta.proxy:
            with connection.cursor() as cursor:
                cursor.execute(f"SELECT COUNT(*) FROM {connection.ops.quote_name(table)}")  # noqa: S608
                rows = cursor.fetchone()[0]
            if rows:
                reasons.append(f"{table} holds {rows} row{'s' if rows != 1 else ''}")
    if len(reasons) > 3:
        reasons[3:] = [f"{len(reasons) - 3} more tables hold rows"]
    media_root = _local_media(media_root)
    files = sum(1 for _ in _media_files(media_root))
    if files:
        reasons.append(f"the media folder {media_root} holds {files} files")
    return reasons


def restore(path, *, force=False, using="default", media_root=None) -> Restored:
    """Check the archive, then restore the database and the media into an empty target (or `force`)."""
    media_root = _local_media(media_root)
    manifest = check(path)
    connection = connections[using]
    vendor = manifest["database"].get("vendor")
    if vendor != connection.vendor:
        raise ArchiveError(f"This is a backup of a {vendor} database; the target is {connection.vendor}. Restore "
                           f"into a {vendor} database (to move a job's records elsewhere, use export_job).")
    known = {(app, name) for app, name in MigrationLoader(None, ignore_no_migrations=True).disk_migrations}
    archived = {(app, name) for app, names in manifest.get("schema", {}).items() for name in names}
    newer = sorted(f"{app}.{name}" for app, name in archived - known
                   if app in {config.label for config in apps.get_app_configs()})
    if newer:
        raise ArchiveError("The backup was made by a newer Legwork (migrations this one does not have: "
                           f"{', '.join(newer[:5])}). Restore it with that version or newer.")
    if connection.vendor == "sqlite":
        target = Path(str(connection.settings_dict["NAME"]))
        if str(target) == ":memory:" or "mode=memory" in str(target):
            raise ArchiveError("The target SQLite database is in memory; restore into a database file.")
    else:
        _tool("pg_restore")
    reasons = not_empty(using, media_root)
    if reasons and not force:
        raise ArchiveError("The target is not empty (" + "; ".join(reasons) + "). Restore into an empty database "
                           "and media folder, or add --force to replace them (the media folder and an SQLite "
                           "file are moved aside, not deleted).")
    result = Restored(manifest)
    stamp = timezone.now().strftime("%Y%m%d-%H%M%S")
    media_root.parent.mkdir(parents=True, exist_ok=True)
    staging = media_root.with_name(f"{media_root.name}.restoring-{stamp}")
    with tempfile.TemporaryDirectory(prefix="legwork-restore-", dir=media_root.parent) as work:
        database_file = Path(work) / "database"
        try:
            result.files = _unpack(path, manifest, staging, database_file)
            connection.close()
            if connection.vendor == "sqlite":
                result.moved_aside += _restore_sqlite(database_file, target, stamp, keep=bool(reasons))
            else:
                _run([_tool("pg_restore"), "--clean", "--if-exists", "--no-owner", "--no-privileges",
                      "--single-transaction", "--exit-on-error", "--dbname", connection.settings_dict["NAME"],
                      str(database_file)], connection)
            if media_root.exists():
                if any(media_root.iterdir()):
                    aside = media_root.with_name(f"{media_root.name}.before-restore-{stamp}")
                    media_root.rename(aside)
                    result.moved_aside.append(str(aside))
                else:
                    media_root.rmdir()
            staging.rename(media_root)
        finally:
            if staging.exists():
                shutil.rmtree(staging, ignore_errors=True)
    connection.close()
    result.rows = _compare_counts(connection, manifest)
    applied = {(app, name) for app, name in MigrationLoader(connection, ignore_no_migrations=True).applied_migrations}
    result.pending_migrations = sorted(f"{app}.{name}" for app, name in known - applied)
    return result


def _unpack(path, manifest, staging: Path, database_file: Path) -> int:
    """Media to the staging folder, the database to a work file; each member's SHA-256 checked again on the way."""
    listed = {m["path"]: m for m in manifest["members"]}
    files = 0
    staging.mkdir(parents=True)
    with tarfile.open(path, "r:*") as tar:
        for member in tar:
            _safe(member)
            if member.name == MANIFEST:
                continue
            target = database_file if member.name == manifest["database"]["member"] else \
                staging / PurePosixPath(member.name[len(MEDIA):])
            if target != database_file and staging.resolve() not in target.resolve().parents:
                raise ArchiveError(f"{member.name}: a member name outside the media folder.")
            target.parent.mkdir(parents=True, exist_ok=True)
            digest = hashlib.sha256()
            source = tar.extractfile(member)
            with target.open("xb") as out:
                for chunk in iter(partial(source.read, CHUNK), b""):
                    digest.update(chunk)
                    out.write(chunk)
                out.flush()
                os.fsync(out.fileno())
            if digest.hexdigest() != listed[member.name]["sha256"]:
                raise ArchiveError(f"{member.name} changed while it was unpacked; nothing was restored.")
            files += target != database_file
    return files


def _restore_sqlite(source: Path, target: Path, stamp: str, keep: bool) -> list[str]:
    """Copy the archived database into the target file through SQLite's backup API (pages, in one go)."""
    moved = []
    target.parent.mkdir(parents=True, exist_ok=True)
    if keep and target.exists():
        aside = target.with_name(f"{target.name}.before-restore-{stamp}")
        with sqlite3.connect(target) as current, sqlite3.connect(aside) as copy:
            current.backup(copy)
        current.close()
        copy.close()
        moved.append(str(aside))
    archived = sqlite3.connect(source)
    into = sqlite3.connect(target, timeout=20)
    try:
        archived.backup(into)
    finally:
        into.close()
        archived.close()
    return moved


def _compare_counts(connection, manifest) -> int:
    """Every table's row count as the manifest recorded it; returns the rows restored."""
    existing = set(connection.introspection.table_names())
    total = 0
    for table, expected in sorted(manifest.get("tables", {}).items()):
        if table not in existing:
            raise ArchiveError(f"After the restore the table {table} is missing.")
        with connection.cursor() as cursor:
            cursor.execute(f"SELECT COUNT(*) FROM {connection.ops.quote_name(table)}")  # noqa: S608
            rows = cursor.fetchone()[0]
        if rows != expected:
            raise ArchiveError(f"After the restore {table} has {rows} rows; the backup had {expected}.")
        total += rows
    return total
