"""Benchmark (not a test): the recall of a filler lot, and of a heat of steel, among 100,000 welds; their query counts.

    .venv/bin/python benchmarks/recall.py [--welds 100000] [--share 10] [--runs 5] [--db sqlite|postgresql]

Builds a throwaway database (SQLite in a temporary directory, or PostgreSQL on 127.0.0.1:5432, dropped at the end),
seeds --welds invented welds (bulk inserts: 100 assemblies per job, 10 welds per assembly, welded over the last 200
days), one filler lot on every --share-th weld and another lot on the rest, then times
inspections.services.trace.recall for the first lot: all dates, and the last 30 days. Prints the median and slowest
of --runs runs, the rows found and the queries (one: fixed whatever the number, tests/test_trace_recall.py pins it).
Each assembly has one part, cut from the recalled heat on every --share-th assembly, and every weld names it: the
heat's recall (its parts and their welds: two queries, tests/test_material.py) is timed the same way. The load
average is printed.
"""

import argparse
import os
import shutil
import statistics
import sys
import tempfile
import time
from datetime import timedelta
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--welds", type=int, default=100_000)
    parser.add_argument("--share", type=int, default=10)
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--db", choices=["sqlite", "postgresql"], default="sqlite",
                        help="postgresql: a throwaway database on 127.0.0.1:5432, dropped at the end")
    args = parser.parse_args()
    if not (1 <= args.welds <= 200_000 and 1 <= args.share <= 1000 and 1 <= args.runs <= 20):
        raise SystemExit("keep it bounded: --welds 1..200000, --share 1..1000, --runs 1..20")
    folder = Path(tempfile.mkdtemp(prefix="legwork-bench-recall-"))
    sys.path.insert(0, str(ROOT))
    from benchmarks.release_chain import drop_postgresql, throwaway_postgresql, throwaway_sqlite

    name = "legwork_bench_recall"
    try:
        if args.db == "postgresql":
            throwaway_postgresql(folder, name)
        else:
            throwaway_sqlite(folder)
        start = time.perf_counter()
        lot, heat = _seed(args.welds, args.share)
        print(f"{args.db}: seeded {args.welds:,} welds in {time.perf_counter() - start:.0f} s; load average "
              f"{os.getloadavg()[0]:.2f}; {args.runs} runs each")
        print(_measure(lot, args.runs, days=None))
        print(_measure(lot, args.runs, days=30))
        print(_measure(heat, args.runs, days=None, kind="heat"))
        print(_measure(heat, args.runs, days=30, kind="heat"))
    finally:
        if args.db == "postgresql":
            drop_postgresql(name)
        shutil.rmtree(folder, ignore_errors=True)


def _seed(n, share):
    from django.utils import timezone

    from inspections.models import Assembly, Part, Weld
    from tests.factory import Factory

    make = Factory()
    wps = make.approved_wps()
    recalled, other = make.make_filler_lot(), make.make_filler_lot()
    heat, other_heat = make.make_heat(), make.make_heat()
    today = timezone.localdate()
    per_assembly, per_job = 10, 100
    job = None
    for a in range(-(-n // per_assembly)):
        if a % per_job == 0:
            job = make.make_job()
        assembly = Assembly.objects.create(job=job, piece_mark=f"B{a}", drawing=f"E-{a}", drawing_revision="1",
                                           quantity=1, description="Bench beam")
        part = Part(assembly=assembly, mark="P1", role="main", specified_grade="ASTM A992", thickness=make_size(),
                    heat=heat if a % share == 0 else other_heat)
        Part.objects.bulk_create([part])
        welds = []
        for i in range(min(per_assembly, n - a * per_assembly)):
            k = a * per_assembly + i
            welds.append(Weld(assembly=assembly, mark=f"W{i}", joint_type="fillet", size=make_size(), count=1,
                              length=make_length(), thickness1=make_size(), thickness2=make_size(), position="F",
                              wps=wps, welded_on=today - timedelta(days=k % 200),
                              filler_lot=recalled if k % share == 0 else other, part1=part))
        Weld.objects.bulk_create(welds)
    return recalled, heat


def make_size():
    from core.units import parse_length

    return parse_length("3/8 in")


def make_length():
    from core.units import parse_length

    return parse_length("12 in")


def _measure(subject, runs, days, kind="lot"):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext
    from django.utils import timezone

    from inspections.services import trace

    start_day = timezone.localdate() - timedelta(days=days) if days else None
    times, rows = [], []
    for _ in range(runs):
        with CaptureQueriesContext(connection) as queries:
            start = time.perf_counter()
            rows = trace.recall(kind, subject, start_day, None)
            times.append(time.perf_counter() - start)
    what = f"last {days} days" if days else "all dates"
    return (f"recall of one {kind}, {what}: {len(rows):,} rows found, median {statistics.median(times) * 1000:.0f} ms, "
            f"slowest {max(times) * 1000:.0f} ms, {len(queries)} queries")


if __name__ == "__main__":
    main()
