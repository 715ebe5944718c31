"""Benchmark (not a test): what the record chain costs at signing, and how long checks, backups and restores take.

    .venv/bin/python benchmarks/records.py [--inspections 3000] [--photos 300]
    .venv/bin/python benchmarks/records.py --postgres postgres://postgres@127.0.0.1:5432   # on PostgreSQL

In a throwaway database (SQLite in a temporary folder, or a new PostgreSQL database that is dropped at the end)
and media folder, it signs --inspections final inspections through sign_inspection (each sealed), half of them
timed with sealing switched off for comparison, attaches --photos photos (sealed; JPEG noise, a few hundred KB
each with its thumbnail), then times
`verify_records`, `backup`, `restore --check` and a restore into a second fresh target, with peak Python memory
of the verification. Loopback only; everything it creates is removed.
"""

import argparse
import io
import os
import secrets
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _environment(folder: Path, database_url: str | None) -> dict:
    env = {key: value for key, value in os.environ.items() if not key.startswith("LEGWORK_")}
    env.update({"DJANGO_SETTINGS_MODULE": "legwork.settings", "LEGWORK_VAR_DIR": str(folder),
                "LEGWORK_SQLITE_PATH": str(folder / "bench.sqlite3"), "LEGWORK_MEDIA_ROOT": str(folder / "media"),
                "LEGWORK_DEBUG": "0", "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40),
                "LEGWORK_ALLOWED_HOSTS": "127.0.0.1", "LEGWORK_TASKS_INLINE": "1"})
    env.pop("DATABASE_URL", None)
    if database_url:
        env["DATABASE_URL"] = database_url
    return env


def _admin(base: str, sql: str):
    import psycopg

    with psycopg.connect(base.replace("postgres://", "postgresql://") + "/postgres", autocommit=True) as db:
        db.execute(sql)


def _manage(env, *args):
    started = time.perf_counter()
    done = subprocess.run([sys.executable, "manage.py", *args], cwd=ROOT, env=env, capture_output=True, text=True,
                          timeout=3600, check=False)
    if done.returncode != 0:
        raise SystemExit(f"manage.py {' '.join(args)} failed:\n{done.stderr}{done.stdout}")
    return time.perf_counter() - started, done.stdout


def _ms(values):
    values = sorted(values)
    return f"p50 {statistics.median(values) * 1000:.1f} ms, p95 {values[int(len(values) * 0.95)] * 1000:.1f} ms"


def _mb(n):
    return f"{n / (1024 * 1024):.1f} MB"


def run(args, folder: Path, database_url: str | None, restore_url: str | None):
    env = _environment(folder, database_url)
    os.environ.update(env)
    sys.path.insert(0, str(ROOT))
    import django

    django.setup()
    from django.core.management import call_command

    call_command("migrate", verbosity=0)
    from core import seals
    from core.models import Seal
    from inspections.services.inspect import sign_inspection
    from tests.factory import Factory

    make = Factory()
    inspector = make.make_user("inspector")
    assembly = make.make_assembly()
    welds = [make.make_weld(assembly=assembly, mark=f"W{n:05d}") for n in range(args.inspections)]
    observed = {"min_size": welds[0].size}
    timings = {True: [], False: []}
    real_seal, real_lock = seals.seal, seals.lock_chain
    for n, weld in enumerate(welds):
        sealing = n % 2 == 0
        if not sealing:  # the comparison: the same signing with the chain switched off
            seals.seal, seals.lock_chain = (lambda *a, **k: None), (lambda: None)
        started = time.perf_counter()
        sign_inspection(weld, observed, "final", inspector)
        timings[sealing].append(time.perf_counter() - started)
        seals.seal, seals.lock_chain = real_seal, real_lock
    inspections = list(assembly.welds.values_list("latest_final", flat=True)[: args.photos])
    from PIL import Image

    from inspections.models import Inspection

    for pk in inspections:  # noise: it compresses as badly as a photo of a weld
        noise = Image.frombytes("RGB", (480, 360), secrets.token_bytes(480 * 360 * 3))
        content = io.BytesIO()
        noise.save(content, "JPEG", quality=90)
        make.make_photo(Inspection.objects.get(pk=pk), content=content.getvalue())
    # The unsealed half would be reported as not sealed: seal them now, as a backfill would.
    from django.db import transaction

    sealed = set(Seal.objects.filter(kind="inspection.signed").values_list("record_id", flat=True))
    with transaction.atomic():
        seals.lock_chain()
        for inspection in Inspection.objects.exclude(pk__in=sealed).order_by("pk"):
            seals.seal(inspection, "inspection.signed")
    count = Seal.objects.count()

    media = sum(p.stat().st_size for p in (folder / "media").rglob("*") if p.is_file())
    print(f"database: {'PostgreSQL' if database_url else 'SQLite (WAL)'}; {args.inspections} inspections, "
          f"{args.photos} photos, {count} seals, media {_mb(media)}")
    print(f"sign_inspection with its seal:    {_ms(timings[True])}")
    print(f"sign_inspection, chain switched off: {_ms(timings[False])}")

    tracemalloc.start()
    started = time.perf_counter()
    report = seals.verify()
    elapsed = time.perf_counter() - started
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    assert report.ok, report.problems[:3]
    print(f"verify: {report.seals} seals, {report.files} files in {elapsed:.2f} s "
          f"({report.seals / elapsed:.0f} seals/s), peak Python memory {_mb(peak)}")

    archive = folder / "backup.tar"
    took, _out = _manage(env, "backup", "--output", str(archive))
    print(f"backup: {took:.2f} s (process included), archive {_mb(archive.stat().st_size)}")
    took, _out = _manage(env, "restore", "--check", str(archive))
    print(f"restore --check: {took:.2f} s")
    target = _environment(folder / "restored", restore_url)
    (folder / "restored").mkdir()
    took, _out = _manage(target, "restore", str(archive))
    print(f"restore into a fresh target (and verify): {took:.2f} s")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--inspections", type=int, default=3000)
    parser.add_argument("--photos", type=int, default=300)
    parser.add_argument("--postgres", help="postgres://user@127.0.0.1:5432 (no database name): run on PostgreSQL")
    args = parser.parse_args()
    folder = Path(tempfile.mkdtemp(prefix="legwork-bench-records-"))
    names = [f"legwork_bench_records_{os.getpid()}", f"legwork_bench_records_{os.getpid()}_restored"]
    try:
        database_url = restore_url = None
        if args.postgres:
            base = args.postgres.rstrip("/")
            for name in names:
                _admin(base, f'CREATE DATABASE "{name}"')
            database_url, restore_url = (f"{base}/{name}" for name in names)
        print(f"machine: {os.cpu_count()} CPUs, load average {os.getloadavg()[0]:.1f}")
        run(args, folder, database_url, restore_url)
    finally:
        if args.postgres:
            from django.db import connections

            connections.close_all()
            for name in names:
                _admin(args.postgres.rstrip("/"), f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
        shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
