"""Benchmark (not a test): how long release_blockers() takes for an assembly of many welds, and its query count.

    .venv/bin/python benchmarks/release_chain.py [--welds 20 200] [--runs 7]

Builds a throwaway SQLite database in a temporary directory, seeds one invented assembly per size (each weld to
one approved WPS by two qualified welders, accepted at final visual, one weld repaired and re-inspected) and
times inspections.services.assemblies.release_blockers on each: the median and the slowest of --runs runs, and the
number of queries (fixed whatever the size: tests/test_release_chain.py pins it). The load average is printed.
"""

import argparse
import os
import secrets
import shutil
import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--welds", type=int, nargs="+", default=[20, 200])
    parser.add_argument("--runs", type=int, default=7)
    args = parser.parse_args()
    folder = Path(tempfile.mkdtemp(prefix="legwork-bench-chain-"))
    try:
        throwaway_sqlite(folder)
        print(f"load average {os.getloadavg()[0]:.2f}; {args.runs} runs each")
        for n in args.welds:
            print(_measure(n, args.runs))
    finally:
        shutil.rmtree(folder, ignore_errors=True)


PG_ADMIN = "postgresql://postgres@127.0.0.1:5432/postgres"


def throwaway_postgresql(folder: Path, name: str) -> None:
    """As throwaway_sqlite, on a new PostgreSQL database `name` on 127.0.0.1:5432 (dropped first if left over);
    drop_postgresql(name) removes it at the end."""
    import psycopg

    with psycopg.connect(PG_ADMIN, autocommit=True) as conn:
        conn.execute(f"DROP DATABASE IF EXISTS {name} WITH (FORCE)")
        conn.execute(f"CREATE DATABASE {name}")
    os.environ["DATABASE_URL"] = f"postgres://postgres@127.0.0.1:5432/{name}"
    throwaway_sqlite(folder, keep_url=True)


def drop_postgresql(name: str) -> None:
    import psycopg
    from django.db import connections

    connections.close_all()
    with psycopg.connect(PG_ADMIN, autocommit=True) as conn:
        conn.execute(f"DROP DATABASE IF EXISTS {name} WITH (FORCE)")


def throwaway_sqlite(folder: Path, keep_url: bool = False) -> None:
    """Point Django at a new SQLite database in `folder` (settings from the environment), set it up and migrate.
    Shared by the in-process benchmarks (this one, recall.py). keep_url: a DATABASE_URL set by the caller stays."""
    if not keep_url:
        os.environ.pop("DATABASE_URL", None)
    os.environ.update({
        "DJANGO_SETTINGS_MODULE": "legwork.settings", "LEGWORK_VAR_DIR": str(folder),
        "LEGWORK_SQLITE_PATH": str(folder / "bench.sqlite3"), "LEGWORK_MEDIA_ROOT": str(folder / "media"),
        "LEGWORK_DEBUG": "0", "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40), "LEGWORK_ALLOWED_HOSTS": "127.0.0.1",
        "LEGWORK_SSL_REDIRECT": "0", "LEGWORK_TASKS_INLINE": "1", "LEGWORK_LOG_LEVEL": "ERROR",
    })
    sys.path.insert(0, str(ROOT))
    import django

    django.setup()
    from django.core.management import call_command

    call_command("migrate", verbosity=0)


def _seed(n):
    from django.utils import timezone

    from inspections.services.ncr import disposition_repair
    from inspections.services.repairs import record_repair
    from tests.factory import Factory

    make = Factory()
    qa, inspector = make.make_user("qa_lead"), make.make_user("inspector")
    assembly = make.make_assembly()
    welders = [make.make_qualified_welder(), make.make_qualified_welder()]
    first = None
    for i in range(n):
        weld = make.make_sound_weld(assembly=assembly, mark=f"W{i:04d}", welders=welders)
        make.make_inspection(weld, accepted=True, user=inspector)
        first = first or weld
    ncr = make.make_inspection(first, accepted=False, supersedes=first.latest_final, reason="Review").ncrs.get()
    disposition_repair(ncr, qa, first.wps, welders[0])
    record_repair(ncr, inspector, wps=first.wps, welders=welders[:1], welded_on=timezone.localdate())
    make.make_inspection(first, accepted=True, user=inspector)
    return assembly


def _measure(n, runs):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    from inspections.models import Assembly
    from inspections.services.assemblies import release_blockers

    pk = _seed(n).pk
    times = []
    for _ in range(runs):
        assembly = Assembly.objects.get(pk=pk)
        with CaptureQueriesContext(connection) as queries:
            start = time.perf_counter()
            blockers = release_blockers(assembly)
            times.append(time.perf_counter() - start)
        assert blockers == [], blockers
    return (f"{n:>5} welds: median {statistics.median(times) * 1000:.1f} ms, slowest {max(times) * 1000:.1f} ms, "
            f"{len(queries)} queries")


if __name__ == "__main__":
    main()
