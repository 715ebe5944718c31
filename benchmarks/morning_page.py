"""Benchmark (not a test): the QA lead's morning page (and the others') with about 100,000 inspections stored.

    .venv/bin/python benchmarks/morning_page.py [--inspections 100000] [--rounds 30]
    .venv/bin/python benchmarks/morning_page.py --postgres postgres://postgres@127.0.0.1:5432   # on PostgreSQL

In a throwaway database (SQLite in a temporary folder, or a new PostgreSQL database dropped at the end) it builds
two years of a shop with fast bulk inserts that the record triggers accept (core/triggers.py): welds inserted
while their assemblies are open, inspections inserted (never changed), the weld rows' pointers to their latest
inspections set (bookkeeping the triggers leave free), NCRs inserted in their final state, continuity entries one
per weld and welder as record_production makes them, and only then the finished assemblies moved to released by
the one legal state move. About one weld in ten is rejected at its first final inspection and accepted after a
repair. The open work at the end: assemblies awaiting release (ready and blocked), welds waiting for the inspector,
NCRs awaiting disposition, procedures waiting for approval.

It then GETs the home page in-process (Django test client, DEBUG off, the session warmed) for each role and the
trends page for the QA lead, --rounds times each, and prints p50/p95 and the query count. Target: the QA lead's
morning page p95 under 300 ms (issue 17). Loopback only; everything it creates is removed.
"""

import argparse
import os
import secrets
import shutil
import statistics
import sys
import tempfile
import time
from datetime import timedelta
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def _setup(folder: Path, database_url: str | None):
    os.environ.update({"DJANGO_SETTINGS_MODULE": "legwork.settings", "LEGWORK_VAR_DIR": str(folder),
                       "LEGWORK_SQLITE_PATH": str(folder / "bench.sqlite3"), "LEGWORK_MEDIA_ROOT": str(folder / "m"),
                       "LEGWORK_STATIC_ROOT": str(folder / "static"),
                       "LEGWORK_DEBUG": "0", "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40),
                       "LEGWORK_ALLOWED_HOSTS": "127.0.0.1,testserver", "LEGWORK_SSL_REDIRECT": "0",
                       "LEGWORK_TASKS_INLINE": "1", "LEGWORK_LOG_LEVEL": "ERROR"})
    os.environ.pop("DATABASE_URL", None)
    if database_url:
        os.environ["DATABASE_URL"] = database_url
    sys.path.insert(0, str(ROOT))
    import django

    django.setup()
    from django.core.management import call_command

    call_command("migrate", verbosity=0)
    call_command("collectstatic", verbosity=0, interactive=False)  # DEBUG off serves from the manifest


def _seed(total: int):
    from django.db import connection, transaction
    from django.db.models import Max
    from django.utils import timezone

    from core.units import parse_length as L
    from inspections import uses
    from inspections.models import NCR, Assembly, Customer, Inspection, Job, Weld
    from inspections.models.ncr import Disposition, NCRState
    from inspections.services.inspect import findings_json, judge
    from procedures.models import WPS, ContinuityEntry, Qualification
    from procedures.models.wps import WPSState
    from tests.factory import Factory

    make = Factory()
    users = {role: make.make_user(role) for role in ("inspector", "welding_engineer", "qa_lead", "viewer")}
    wps = make.make_wps(state=WPSState.APPROVED)
    for _ in range(5):
        make.make_wps(state=WPSState.SUBMITTED)
        make.make_wps()
    today = timezone.localdate()
    welders = [make.make_welder() for _ in range(24)]
    for n, welder in enumerate(welders):
        Qualification.objects.create(welder=welder, code="AWS D1.1:2020", process="FCAW", joint="groove",
                                     test_position="3G+4G", test_thickness=L("1 in"), electrode="E71T-1C",
                                     test_date=today - timedelta(days=800 if n % 6 else 200), result="pass",
                                     examiner="R. Okafor, CWI")
    customers = [Customer.objects.create(name=f"Bench customer {i}") for i in range(4)]
    customers[0].viewers.add(users["viewer"])
    # One final inspection per weld, plus a rejected first one on one weld in ten: total = 1.1 x welds.
    n_welds = int(total / 1.1)
    per_assembly, per_job = 10, 250
    n_assemblies = n_welds // per_assembly
    n_jobs = max(1, n_assemblies // per_job)
    days = 730
    with transaction.atomic():
        jobs = Job.objects.bulk_create([Job(number=f"J-B{i:04d}", name=f"Bench job {i}", customer=customers[i % 4],
                                            criteria_key="aws-d1.1-2020-static") for i in range(n_jobs)])
        Assembly.objects.bulk_create([Assembly(job=jobs[i % n_jobs], piece_mark=f"B{i}", drawing=f"E-{i}",
                                               description="bench beam") for i in range(n_assemblies)],
                                     batch_size=2000)
        assemblies = list(Assembly.objects.order_by("pk"))
        Weld.objects.bulk_create(
            [Weld(assembly=assemblies[i // per_assembly], mark=f"W{i % per_assembly}", size=L("1/4 in"),
                  length=L("12 in"), thickness1=L("3/8 in"), thickness2=L("1/2 in"), wps=wps,
                  welded_on=today - timedelta(days=days - (i * days) // n_welds))
             for i in range(n_assemblies * per_assembly)], batch_size=2000)
        welds = list(Weld.objects.select_related("assembly__job").order_by("pk"))
        through = Weld.welders.through
        through.objects.bulk_create([through(weld_id=w.pk, welder_id=welders[i % len(welders)].pk)
                                     for i, w in enumerate(welds)], batch_size=5000)
        ContinuityEntry.objects.bulk_create(
            [ContinuityEntry(welder_id=welders[i % len(welders)].pk, process="FCAW", date=w.welded_on,
                             source="production", weld_id=w.pk) for i, w in enumerate(welds)], batch_size=5000)
        good = judge(welds[0], {"min_size": L("1/4 in")})
        bad = judge(welds[0], {"min_size": L("3/16 in"), "undersize_length": L("3 in")})
        fields = {True: (findings_json(good, "US"), L("1/4 in")), False: (findings_json(bad, "US"), L("3/16 in"))}

        def inspection(weld, accepted, hours):
            findings, leg = fields[accepted]
            moment = timezone.make_aware(timezone.datetime.combine(weld.welded_on, timezone.datetime.min.time())) \
                + timedelta(hours=hours)
            return Inspection(weld=weld, stage="final", inspector=users["inspector"], min_size=leg,
                              accepted=accepted, findings=findings, inspected_at=moment,
                              criteria_key=good.criteria_key, criteria_version=good.criteria_version)

        open_tail = 40  # the newest assemblies stay open: awaiting release, waiting for the inspector
        finished = welds[:-open_tail * per_assembly]
        rows = []
        for i, weld in enumerate(finished):
            if i % 10 == 3:
                rows.append(inspection(weld, False, 20))
            rows.append(inspection(weld, True, 72 if i % 10 == 3 else 20))
        for i, weld in enumerate(welds[-open_tail * per_assembly:]):
            if i % 3 == 0:
                rows.append(inspection(weld, i % 9 != 0, 20))  # some accepted, some rejected, the rest waiting
        Inspection.objects.bulk_create(rows, batch_size=5000)
        latest = dict(Inspection.objects.values_list("weld_id").annotate(Max("pk")))
        for weld in welds:
            weld.latest_inspection_id = weld.latest_final_id = latest.get(weld.pk)
        Weld.objects.bulk_update(welds, ["latest_inspection", "latest_final"], batch_size=5000)
        rejected = list(Inspection.objects.filter(accepted=False).select_related("weld").order_by("pk"))
        newest = {i.pk for i in rejected[-30:]}
        NCR.objects.bulk_create([NCR(
            number=f"NCR-B-{n:06d}", weld_id=r.weld_id, inspection=r, description="Leg undersize",
            raised_by=users["inspector"], raised_at=r.inspected_at,
            **({} if r.pk in newest else dict(state=NCRState.CLOSED, disposition=Disposition.REPAIR,
                                              dispositioned_by=users["qa_lead"], dispositioned_at=r.inspected_at,
                                              closed_at=r.inspected_at + timedelta(days=3))))
            for n, r in enumerate(rejected)], batch_size=5000)
        uses.rebuild()  # bulk inserts send no signals: the WPSs and welders each job uses (inspections.uses)
        # The finished assemblies move to released by the one legal state move (core/triggers.py allow it).
        finished_ids = [a.pk for a in assemblies[:-open_tail]]
        with connection.cursor() as cursor:
            for start in range(0, len(finished_ids), 900):
                chunk = finished_ids[start:start + 900]
                cursor.execute(f"UPDATE inspections_assembly SET state = %s, released_by_id = %s, released_at = %s "
                               f"WHERE id IN ({', '.join(['%s'] * len(chunk))})",
                               ["released", users["qa_lead"].pk, timezone.now(), *chunk])
            tail = [a.pk for a in assemblies[-open_tail:]]
            cursor.execute(f"UPDATE inspections_assembly SET state = %s WHERE id IN ({', '.join(['%s'] * len(tail))})",
                           ["awaiting_inspection", *tail])
    return users, Inspection.objects.count(), Weld.objects.count(), NCR.objects.count(), \
        ContinuityEntry.objects.count(), WPS.objects.count()


def _measure(user, path, rounds):
    from django.db import connection, reset_queries
    from django.test import Client

    client = Client()
    client.force_login(user)
    assert client.get(path).status_code == 200
    count = []
    with connection.execute_wrapper(lambda execute, *a: count.append(1) or execute(*a)):
        client.get(path)
    if os.environ.get("LEGWORK_BENCH_PROFILE") == "1":
        import cProfile
        import pstats

        profile = cProfile.Profile()
        profile.runcall(client.get, path)
        pstats.Stats(profile).sort_stats("tottime").print_stats(18)
    times = []
    for _ in range(rounds):
        reset_queries()
        started = time.perf_counter()
        response = client.get(path)
        times.append((time.perf_counter() - started) * 1000)
        assert response.status_code == 200
    times.sort()
    return statistics.median(times), times[max(0, int(len(times) * 0.95) - 1)], len(count)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--inspections", type=int, default=100_000)
    parser.add_argument("--rounds", type=int, default=30)
    parser.add_argument("--postgres", default="", help="base URL of a PostgreSQL server (a database is created)")
    args = parser.parse_args()
    if not 1_000 <= args.inspections <= 300_000 or not 3 <= args.rounds <= 200:
        raise SystemExit("keep it bounded: --inspections 1000..300000, --rounds 3..200")
    folder = Path(tempfile.mkdtemp(prefix="legwork-morning-"))
    name = f"legwork_bench_morning_{secrets.token_hex(4)}"
    url = f"{args.postgres.rstrip('/')}/{name}" if args.postgres else None
    if url:
        import psycopg

        with psycopg.connect(args.postgres.replace("postgres://", "postgresql://") + "/postgres",
                             autocommit=True) as db:
            db.execute(f'CREATE DATABASE "{name}"')
    try:
        _setup(folder, url)
        started = time.perf_counter()
        users, inspections, welds, ncrs, entries, procedures = _seed(args.inspections)
        print(f"database: {'PostgreSQL' if url else 'SQLite'}; built in {time.perf_counter() - started:.0f} s: "
              f"{inspections} inspections, {welds} welds, {ncrs} NCRs, {entries} continuity entries, "
              f"{procedures} procedures")
        print(f"load average: {os.getloadavg()[0]:.1f}")
        for role, path in (("qa_lead", "/"), ("inspector", "/"), ("welding_engineer", "/"), ("viewer", "/"),
                           ("qa_lead", "/inspections/trends/")):
            p50, p95, queries = _measure(users[role], path, args.rounds)
            print(f"{role:<17} {path:<22} p50 {p50:7.1f} ms   p95 {p95:7.1f} ms   {queries} queries")
    finally:
        from django.db import connections

        connections.close_all()
        shutil.rmtree(folder, ignore_errors=True)
        if url:
            import psycopg

            with psycopg.connect(args.postgres.replace("postgres://", "postgresql://") + "/postgres",
                                 autocommit=True) as db:
                db.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')


if __name__ == "__main__":
    main()
