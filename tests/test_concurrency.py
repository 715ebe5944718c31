"""Races on PostgreSQL, with real threads and a connection each (SQLite takes one writer at a time anyway).

Per-job numbers are taken under a lock on the job row (inspections.services.numbering): eight inspectors
rejecting welds of one job at the same moment get eight consecutive NCR numbers and no error. Two people saving
one record at the same moment: one save wins, the other is refused as stale, nothing is overwritten.
benchmarks/race_rejections.py and benchmarks/race_editors.py do the same through the pages under gunicorn.
"""

import threading

import pytest
from django.db import connection

from core.errors import Stale
from inspections.models import NCR, Job, Weld
from inspections.services.inspect import sign_inspection
from tests.factory import L

pytestmark = [
    pytest.mark.django_db(transaction=True),
    pytest.mark.skipif(connection.vendor != "postgresql", reason="threads with a connection each: PostgreSQL"),
]

REJECTED = {"min_size": L("3/16 in"), "undersize_length": L("3 in")}  # 1/4 in fillet, 12 in long: too much


def _together(work, n):
    """Run work(i) for i in range(n) in n threads released at once; the exceptions they raised."""
    barrier, errors = threading.Barrier(n), []

    def run(i):
        try:
            barrier.wait(timeout=30)
            work(i)
        except Exception as exc:  # noqa: BLE001 - every failure is the finding
            errors.append(exc)
        finally:
            connection.close()  # this thread's own connection

    threads = [threading.Thread(target=run, args=(i,)) for i in range(n)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=60)
    assert not any(thread.is_alive() for thread in threads), "a thread did not finish"
    return errors


def test_eight_inspectors_rejecting_welds_of_one_job_at_once_get_consecutive_numbers(make):
    job = make.make_job()
    welds = [make.make_weld(assembly=make.make_assembly(job=job)).pk for _ in range(8)]
    inspectors = [make.make_user("inspector") for _ in range(8)]

    def reject(i):
        weld = Weld.objects.select_related("assembly__job__client_criteria").get(pk=welds[i])
        sign_inspection(weld, REJECTED, "final", inspectors[i])

    errors = _together(reject, 8)
    assert errors == []
    numbers = sorted(NCR.objects.filter(weld__assembly__job=job).values_list("number", flat=True))
    assert numbers == [f"NCR-{job.number}-{n:03d}" for n in range(1, 9)]


def test_two_people_saving_one_record_at_once_one_wins_and_nothing_is_overwritten(make):
    job = make.make_job(name="Harlan Transit Garage, level 2 framing")
    copies = [Job.objects.get(pk=job.pk), Job.objects.get(pk=job.pk)]  # both opened at version 1
    copies[0].name, copies[1].name = "Level 2 framing (A)", "Level 2 framing (B)"

    errors = _together(lambda i: copies[i].save(), 2)
    assert len(errors) == 1 and isinstance(errors[0], Stale)
    stored = Job.objects.get(pk=job.pk)
    assert stored.version == 2 and stored.name in ("Level 2 framing (A)", "Level 2 framing (B)")
