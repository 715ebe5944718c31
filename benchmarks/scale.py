"""Ten years of a busy shop (issue 16): the pages each role opens, at demo size and at big size, side by side.

    .venv/bin/python benchmarks/scale.py --db sqlite --scale 0.1
    .venv/bin/python benchmarks/scale.py --db postgresql --scale 1

One run: a throwaway database (SQLite in a temporary folder, or a PostgreSQL database created on 127.0.0.1 and
dropped at the end), migrated with its triggers, the demo shop loaded; every page of every role measured (query
count, p50 and p95 of --repeat requests through the Django test client, in process, DEBUG off); then the big
shop built on top of it and the same pages measured again. It prints one table: queries and times at both sizes
and the big/demo ratio of the p50, with the issue's targets (ratio <= 3, p95 <= 300 ms), and the weld-map
export of the biggest job (time and peak memory under tracemalloc) beside a bare csv writer over values_list.

The big shop at --scale 1 is the issue's: 50 jobs, 5,000 assemblies, 100,000 welds, 300,000 inspections,
2,000 NCRs, 205 welders with 100,000 continuity entries, 507 WPSs. --scale shrinks the jobs, assemblies, welds,
inspections, NCRs and entries in proportion (welders and WPSs stay at full count). Invented, deterministic
(random.Random(16)), Brannock Steelworks style. Rows go in by bulk inserts with the triggers in place: nothing
the triggers forbid is written (welds are inserted before their inspections, the weld pointers are the free
bookkeeping fields, and every assembly stays open). Half the assemblies belong to the first job, so its weld
map (half the welds) is the export measured. The inspections are not sealed (core.seals): this data set
is for timing pages, not for `verify_records`.
"""

import argparse
import csv
import os
import random
import statistics
import sys
import tempfile
import time
import tracemalloc
from datetime import date, datetime, timedelta
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
PG_ADMIN = "postgresql://postgres@127.0.0.1:5432/postgres"
PG_NAME = "legwork_scale_bench"
FULL = {"jobs": 50, "assemblies": 5000, "welds": 100_000, "inspections": 300_000, "ncrs": 2000,
        "entries": 100_000}
WELDERS, WPSS = 205, 507
TARGET_RATIO, TARGET_P95_MS = 3.0, 300.0


def arguments():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--db", choices=["sqlite", "postgresql"], default="sqlite")
    parser.add_argument("--scale", type=float, default=0.1, help="fraction of the issue's big shop (0.01 to 1)")
    parser.add_argument("--repeat", type=int, default=7, help="requests per page and size (3 to 50)")
    args = parser.parse_args()
    if not 0.01 <= args.scale <= 1 or not 3 <= args.repeat <= 50:
        raise SystemExit("keep it bounded: --scale from 0.01 to 1, --repeat from 3 to 50")
    return args


def setup(kind):
    folder = tempfile.mkdtemp(prefix="legwork-scale-")
    os.environ["LEGWORK_VAR_DIR"] = folder
    os.environ["LEGWORK_DEBUG"] = "0"
    os.environ.setdefault("LEGWORK_SECRET_KEY", "benchmark-only-" + "x" * 40)
    os.environ["LEGWORK_ALLOWED_HOSTS"] = "testserver"
    os.environ["DJANGO_SETTINGS_MODULE"] = "legwork.settings"
    if kind == "postgresql":
        import psycopg

        with psycopg.connect(PG_ADMIN, autocommit=True) as conn:
            conn.execute(f"DROP DATABASE IF EXISTS {PG_NAME}")
            conn.execute(f"CREATE DATABASE {PG_NAME}")
        os.environ["DATABASE_URL"] = f"postgres://postgres@127.0.0.1:5432/{PG_NAME}"
    else:
        os.environ.pop("DATABASE_URL", None)
    import django

    django.setup()
    import io

    from django.core.management import call_command

    call_command("migrate", verbosity=0)
    call_command("collectstatic", verbosity=0, interactive=False)  # DEBUG off serves from the manifest
    call_command("load_demo", verbosity=0, stdout=io.StringIO())
    return folder


def teardown(kind, folder):
    import shutil

    from django.db import connections

    connections.close_all()
    if kind == "postgresql":
        import psycopg

        with psycopg.connect(PG_ADMIN, autocommit=True) as conn:
            conn.execute(f"DROP DATABASE IF EXISTS {PG_NAME} WITH (FORCE)")
    shutil.rmtree(folder, ignore_errors=True)


# --- the big shop ---------------------------------------------------------------------------------------------

def build(scale):
    """Add the big shop to the demo one; returns the counts made."""
    from django.contrib.auth import get_user_model
    from django.db import connection
    from django.utils import timezone

    from core.units import parse_length as L
    from inspections import uses
    from inspections.models import NCR, Assembly, AssemblyState, Customer, Inspection, Job, Weld
    from procedures import continuity
    from procedures.models import WPS, ContinuityEntry, Welder
    from procedures.models.wps import WPSState

    rng = random.Random(16)
    n = {key: max(1, round(value * scale)) for key, value in FULL.items()}
    users = {u.role: u for u in get_user_model().objects.all()}
    customers = list(Customer.objects.order_by("pk"))
    now = timezone.now()
    ten_years = [date.today() - timedelta(days=d) for d in range(3650, 0, -1)]

    template = WPS.objects.filter(state=WPSState.APPROVED, unit_system="US").order_by("pk").first()
    wpss = []
    for i in range(WPSS):
        w = WPS(**{f.attname: getattr(template, f.attname) for f in WPS._meta.concrete_fields
                   if f.attname not in ("id", "supersedes_id")})
        w.number, w.revision, w.title = f"BSW-S{i:04d}", 0, f"FCAW fillet, shop procedure {i}"
        wpss.append(w)
    WPS.objects.bulk_create(wpss, batch_size=500)
    wpss = list(WPS.objects.filter(number__startswith="BSW-S"))

    welders = Welder.objects.bulk_create([Welder(name=f"Shop welder {i}", stamp=f"S-{i:03d}",
                                                 employer="Brannock Steelworks") for i in range(WELDERS)])
    welders = list(Welder.objects.filter(stamp__startswith="S-"))
    from procedures.models import Qualification

    Qualification.objects.bulk_create([Qualification(
        welder=w, code="AWS D1.1:2020", process="FCAW", joint="groove", test_position="3G+4G",
        test_thickness=L("1 in"), electrode="E71T-1C", test_date=ten_years[rng.randrange(0, 600)], result="pass",
        examiner="R. Quint, CWI") for w in welders])

    jobs = Job.objects.bulk_create([Job(
        number=f"J-{3000 + i}", name=f"Brannock order {3000 + i}", customer=customers[i % len(customers)],
        unit_system="US", criteria_key="aws-d1.1-2020-static") for i in range(n["jobs"])])
    jobs = list(Job.objects.filter(number__startswith="J-3"))
    # half the assemblies on the first job: one big job's weld map for the export (the rest spread over the others)
    assemblies = Assembly.objects.bulk_create([Assembly(
        job=jobs[0] if i % 2 else jobs[i % len(jobs)], piece_mark=f"M{i:05d}", drawing=f"E-{i % 400}",
        drawing_revision="1",
        state=AssemblyState.AWAITING_INSPECTION if i % 3 else AssemblyState.IN_FABRICATION)
        for i in range(n["assemblies"])], batch_size=1000)
    assemblies = list(Assembly.objects.filter(piece_mark__startswith="M").order_by("pk"))

    sizes = [L("3/16 in"), L("1/4 in"), L("5/16 in"), L("3/8 in")]
    welds = []
    for i in range(n["welds"]):
        welds.append(Weld(assembly=assemblies[i % len(assemblies)], mark=f"W{i // len(assemblies) + 1:03d}",
                          joint_type="fillet", size=rng.choice(sizes), length=L(f"{rng.randrange(4, 60)} in"),
                          count=1, thickness1=L("3/8 in"), thickness2=L("1/2 in"), position="F",
                          wps=rng.choice(wpss), welded_on=rng.choice(ten_years)))
    Weld.objects.bulk_create(welds, batch_size=2000)
    weld_ids = list(Weld.objects.filter(assembly__piece_mark__startswith="M").values_list("pk", "welded_on"))
    through = Weld.welders.through
    through.objects.bulk_create([through(weld_id=pk, welder_id=rng.choice(welders).pk) for pk, _ in weld_ids],
                                batch_size=5000)

    entries = [ContinuityEntry(welder=rng.choice(welders), process="FCAW", date=rng.choice(ten_years),
                               source="manual", note="shop log", entered_by=users["qa_lead"])
               for _ in range(n["entries"])]
    ContinuityEntry.objects.bulk_create(entries, batch_size=5000)
    continuity.rebuild()

    findings_ok = [{"criterion": "undersize", "ok": True, "message": "", "source": "AWS D1.1:2020 Table 8.1",
                    "limit": None, "measured": None}]
    findings_bad = [{"criterion": rng.choice(["undercut", "porosity", "undersize", "crater"]), "ok": False,
                     "message": "over the limit", "source": "AWS D1.1:2020 Table 8.1", "limit": None,
                     "measured": None}]
    inspections, bad = [], []
    for i in range(n["inspections"]):
        pk, welded_on = weld_ids[i % len(weld_ids)]
        rejected = len(bad) < n["ncrs"] and rng.random() < 0.05
        when = datetime.combine(welded_on, datetime.min.time(), tzinfo=now.tzinfo) + timedelta(hours=9 + i % 8)
        inspections.append(Inspection(weld_id=pk, stage="final", inspector=users["inspector"], inspected_at=when,
                                      accepted=not rejected, findings=findings_bad if rejected else findings_ok,
                                      criteria_key="aws-d1.1-2020-static", criteria_version=1,
                                      min_size=L("1/4 in")))
        if rejected:
            bad.append(i)
        if len(inspections) == 5000:
            Inspection.objects.bulk_create(inspections)
            inspections = []
    Inspection.objects.bulk_create(inspections)
    latest = {}
    for pk, weld_id in Inspection.objects.filter(weld__assembly__piece_mark__startswith="M").order_by(
            "inspected_at", "pk").values_list("pk", "weld_id"):
        latest[weld_id] = pk
    rejected = list(Inspection.objects.filter(accepted=False, weld__assembly__piece_mark__startswith="M")
                    .values_list("pk", "weld_id", "inspected_at"))
    NCR.objects.bulk_create([NCR(number=f"NCR-S{i:05d}", weld_id=weld_id, inspection_id=pk, description="Rejected",
                                 raised_by=users["inspector"], raised_at=at)
                             for i, (pk, weld_id, at) in enumerate(rejected)], batch_size=2000)
    pointers = [Weld(pk=weld_id, latest_inspection_id=pk, latest_final_id=pk) for weld_id, pk in latest.items()]
    Weld.objects.bulk_update(pointers, ["latest_inspection", "latest_final"], batch_size=2000)
    uses.rebuild()  # bulk inserts send no signals: the WPSs and welders each job uses, from its welds
    if connection.vendor == "postgresql":  # fresh planner statistics, as autovacuum gathers after a bulk load
        with connection.cursor() as cursor:
            cursor.execute("ANALYZE")
    return {**n, "ncrs": len(rejected), "welders": WELDERS, "wpss": WPSS}


# --- the pages --------------------------------------------------------------------------------------------------

def pages(user):
    """(label, url) of every page this role opens, on the records a person would open: the biggest job it sees, an
    assembly of 20 welds or the largest, the welder with the longest history, the latest open NCR."""
    from django.db.models import Count
    from django.urls import reverse

    from core.visibility import visible
    from inspections.models import NCR, Assembly, Job
    from procedures.models import Welder

    job = visible(user, Job.objects.annotate(n=Count("assemblies")).order_by("-n", "pk")).first()
    assembly = visible(user, Assembly.objects.annotate(n=Count("welds")).filter(n__lte=20).order_by("-n", "pk")).first()
    welder = visible(user, Welder.objects.annotate(n=Count("continuity")).order_by("-n", "pk")).first()
    ncr = visible(user, NCR.objects.filter(state="open").order_by("-raised_at")).first()
    found = [(name, reverse(f"procedures:{name}")) for name in ("wps_list", "pqr_list", "welder_list")]
    found += [(name, reverse(f"inspections:{name}")) for name in (
        "job_list", "assembly_list", "ncr_list", "inspection_list", "traveler_index", "packet_index")]
    found += [("ncr_list (all)", reverse("inspections:ncr_list") + "?show=all"),
              ("inspection_list (rejected)", reverse("inspections:inspection_list") + "?verdict=rejected")]
    if job:
        found += [("job_detail", job.get_absolute_url()), ("packet chooser", reverse("inspections:packet_list",
                                                                                   args=[job.pk]))]
    if assembly:
        found.append(("assembly_detail", assembly.get_absolute_url()))
    if welder:
        found += [("welder_detail", welder.get_absolute_url())]
    if ncr:
        found.append(("ncr_detail", ncr.get_absolute_url()))
    return found


def measure(users, repeat):
    from django.db import connection
    from django.test import Client
    from django.test.utils import CaptureQueriesContext

    results = {}
    for role, user in sorted(users.items()):
        client = Client()
        client.force_login(user)
        for label, url in pages(user):
            client.get(url, secure=True)  # warm (DEBUG off: https only, as in production)
            times = []
            for _ in range(repeat):
                with CaptureQueriesContext(connection) as ctx:
                    start = time.perf_counter()
                    response = client.get(url, secure=True)
                    times.append((time.perf_counter() - start) * 1000)
            assert response.status_code == 200, (role, url, response.status_code)
            times.sort()
            results[(role, label)] = (len(ctx.captured_queries), statistics.median(times),
                                      times[min(len(times) - 1, round(0.95 * (len(times) - 1)))], len(response.content))
    return results


def export_figures():
    """The weld-map export of the biggest job (time, peak memory) beside a bare csv writer over values_list."""
    from django.db.models import Count
    from django.test import Client
    from django.urls import reverse

    from inspections.models import Job, Weld

    job = Job.objects.annotate(n=Count("assemblies__welds")).order_by("-n").first()
    client = Client()
    client.force_login(__import__("django.contrib.auth", fromlist=["get_user_model"]).get_user_model()
                       .objects.get(username="inspector"))

    def app():
        response = client.get(reverse("inspections:weldmap_export", args=[job.pk]), secure=True)
        return sum(len(c) for c in response.streaming_content)

    class Null:
        def write(self, text):
            return len(text)

    from inspections.services.weldmap_csv import EXPORT_FIELDS

    def bare():  # the same rows and columns, lengths written as stored (no formatting), no request
        writer = csv.writer(Null())
        for row in Weld.objects.filter(assembly__job=job).order_by("assembly__piece_mark", "mark").values_list(
                *EXPORT_FIELDS).iterator(chunk_size=2000):
            writer.writerow(row)
        return 0

    figures = {}
    for name, run in (("export", app), ("bare csv writer", bare)):
        tracemalloc.start()
        start = time.perf_counter()
        run()
        seconds = time.perf_counter() - start
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
        figures[name] = (seconds, peak / 2**20)
    return job.n, figures


def main():
    args = arguments()
    folder = setup(args.db)
    try:
        from django.contrib.auth import get_user_model

        users = {u.role: u for u in get_user_model().objects.filter(
            username__in=["engineer", "inspector", "qalead", "viewer"])}
        demo = measure(users, args.repeat)
        started = time.perf_counter()
        made = build(args.scale)
        built = time.perf_counter() - started
        big = measure(users, args.repeat)
        welds, export = export_figures()
    finally:
        teardown(args.db, folder)
    print(f"# benchmarks/scale.py --db {args.db} --scale {args.scale} --repeat {args.repeat}  ({date.today()}, "
          f"load {os.getloadavg()[0]:.1f})")
    print("big shop added: " + ", ".join(f"{v:,} {k}" for k, v in made.items()) + f"  (built in {built:.0f} s)")
    print(f"{'role':<17}{'page':<28}{'queries':>9}{'p50 demo':>10}{'p50 big':>9}{'p95 big':>9}{'ratio':>7}"
          f"{'KB big':>8}  ok")
    failures = 0
    for key in sorted(big):
        role, label = key
        q_big, p50_big, p95_big, size_big = big[key]
        q_demo, p50_demo, _p95_demo, _ = demo.get(key, (None, None, None, None))
        ratio = p50_big / p50_demo if p50_demo else float("nan")
        ok = (ratio <= TARGET_RATIO or p50_demo is None) and p95_big <= TARGET_P95_MS
        failures += not ok
        queries = f"{q_demo}/{q_big}" if q_demo is not None else f"-/{q_big}"
        demo_text = f"{p50_demo:.1f}" if p50_demo is not None else "-"
        print(f"{role:<17}{label:<28}{queries:>9}{demo_text:>10}{p50_big:>9.1f}{p95_big:>9.1f}{ratio:>7.2f}"
              f"{size_big / 1024:>8.0f}  {'yes' if ok else 'NO'}")
    (app_s, app_mb), (bare_s, bare_mb) = export["export"], export["bare csv writer"]
    print(f"weld-map export of {welds:,} welds: {app_s:.2f} s, peak {app_mb:.1f} MB; bare csv writer "
          f"{bare_s:.2f} s, peak {bare_mb:.1f} MB; time ratio {app_s / bare_s:.2f} (target <= 2, <= 150 MB)")
    print(f"pages over target (ratio > {TARGET_RATIO} or p95 > {TARGET_P95_MS:.0f} ms): {failures}")
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
