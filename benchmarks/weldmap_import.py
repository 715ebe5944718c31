"""A 5,000-row weld-map import (issue 16 target: <= 2x a bare parse-and-insert), through the pages a person uses.

    .venv/bin/python benchmarks/weldmap_import.py [--rows 5000] [--repeat 3] [--distinct-lengths]

A throwaway SQLite database with the demo shop; 250 new assemblies on the demo's first job, and a CSV of --rows
welds spread over them, every row copied from a weld the demo's export already holds (so every row is valid:
its WPS is approved and covers it), so each value repeats down the file: the import cleans each distinct value of
a column once per file (inspections.services.weldmap_csv). --distinct-lengths gives every row its own length, a
value cleaned on every row. Measured, as the QA lead: the preview (upload, every row checked, the page
rendered) and the import (confirm: read again, checked again, inserted, a history row per weld), each rolled back
after timing so every repeat starts equal. Beside them, the bare floor: csv.reader, the lengths parsed, Weld
objects built and bulk-inserted, nothing checked. The three are timed in turn in each repeat, so a busy machine
slows all three alike. It prints the medians, the ratio import/bare and the preview page's size.
"""

import argparse
import csv
import io
import statistics
import sys
import time
from decimal import Decimal
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


class Rollback(Exception):
    """Raised inside an atomic block to undo what was timed."""


def arguments():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--rows", type=int, default=5000, help="welds in the file (100 to 5000, the import's limit)")
    parser.add_argument("--repeat", type=int, default=3, help="timed runs of each (1 to 10)")
    parser.add_argument("--distinct-lengths", action="store_true", help="every row its own length")
    args = parser.parse_args()
    if not 100 <= args.rows <= 5000 or not 1 <= args.repeat <= 10:
        raise SystemExit("keep it bounded: --rows from 100 to 5000, --repeat from 1 to 10")
    return args


def make_file(rows: int, distinct_lengths=False):
    """(job, CSV bytes): new assemblies on the demo's first job and `rows` welds copied from its weld map (with
    distinct_lengths, each row's length its own: the template's plus n/1000 of its unit)."""
    from core.units import parse_length
    from inspections.models import Assembly, Job
    from inspections.services.weldmap_csv import COLUMNS, export_weld_map

    job = Job.objects.order_by("number").first()
    template = next(csv.DictReader(io.StringIO(export_weld_map(job))))
    per = 20
    marks = [f"BM{n:04d}" for n in range(-(-rows // per))]
    Assembly.objects.bulk_create([Assembly(job=job, piece_mark=m, drawing="E-900", drawing_revision="1", quantity=1,
                                           description="Benchmark beam") for m in marks])
    out = io.StringIO()
    writer = csv.DictWriter(out, COLUMNS)
    writer.writeheader()
    unit = "in" if job.unit_system == "US" else "mm"
    base = parse_length(template["length"]).in_system(job.unit_system)
    for n in range(rows):
        length = f"{base + Decimal(n) / 1000} {unit}" if distinct_lengths else template["length"]
        writer.writerow({**template, "piece_mark": marks[n // per], "weld_mark": f"W{n % per + 1}", "length": length})
    return job, out.getvalue().encode()


def timed(steps, repeat):
    """[(median seconds, last result)] of each step, the steps run in turn `repeat` times, each rolled back."""
    from django.db import transaction

    times, results = [[] for _ in steps], [None] * len(steps)
    for _ in range(repeat):
        for n, step in enumerate(steps):
            started = time.perf_counter()
            try:
                with transaction.atomic():
                    results[n] = step()
                    times[n].append(time.perf_counter() - started)
                    raise Rollback
            except Rollback:
                pass
    return [(statistics.median(t), r) for t, r in zip(times, results, strict=True)]


def bare(job, data):
    """Parse and insert, nothing checked: the floor."""
    from core.units import parse_length
    from inspections.models import Assembly, Weld

    assemblies = dict(Assembly.objects.filter(job=job).values_list("piece_mark", "pk"))
    welds = []
    for row in csv.DictReader(io.StringIO(data.decode())):
        welds.append(Weld(assembly_id=assemblies[row["piece_mark"]], mark=row["weld_mark"], joint_type=row["joint"],
                          size=parse_length(row["size"]) if row["size"] else None, length=parse_length(row["length"]),
                          count=int(row["count"]), sides=row["sides"], thickness1=parse_length(row["thickness1"]),
                          thickness2=parse_length(row["thickness2"]), position=row["position"]))
    Weld.objects.bulk_create(welds)
    return len(welds)


def main():
    args = arguments()
    from benchmarks import scale

    folder = scale.setup("sqlite")
    try:
        from django.contrib.auth import get_user_model
        from django.core.files.uploadedfile import SimpleUploadedFile
        from django.test import Client
        from django.urls import reverse

        job, data = make_file(args.rows, args.distinct_lengths)
        client = Client()
        client.force_login(get_user_model().objects.get(username="qalead"))
        url = reverse("inspections:weldmap_import", args=[job.pk])

        def preview():
            response = client.post(url, {"file": SimpleUploadedFile("map.csv", data, "text/csv")}, secure=True)
            assert response.status_code == 200, response.status_code
            return len(response.content)

        def confirm():
            response = client.post(url, {"step": "confirm", "csv_text": data.decode()}, secure=True)
            assert response.status_code == 302, response.status_code
            return response

        (preview_s, page_bytes), (import_s, _), (bare_s, count) = timed(
            [preview, confirm, lambda: bare(job, data)], args.repeat)
    finally:
        scale.teardown("sqlite", folder)
    distinct = " --distinct-lengths" if args.distinct_lengths else ""
    print(f"# benchmarks/weldmap_import.py --rows {args.rows} --repeat {args.repeat}{distinct}  (SQLite, medians)")
    print(f"preview (upload, check every row, render): {preview_s:.2f} s, page {page_bytes / 1024:.0f} KB")
    print(f"import (confirm: read, check, insert, history): {import_s:.2f} s")
    print(f"bare csv parse and bulk insert of {count} welds: {bare_s:.2f} s")
    print(f"import / bare: {import_s / bare_s:.2f} (target <= 2); preview / bare: {preview_s / bare_s:.2f}")


if __name__ == "__main__":
    main()
