"""Signings at the same moment append to one chain: no fork, no gap, no deadlock (PostgreSQL, real threads).

Eight inspectors sign welds of one assembly while the QA lead issues its traveler, approves a WPS and releases
another assembly, all released by one barrier, three rounds. Each signing locks the chain head first and rows
after it (core.seals), so no two of them can each hold what the other waits for.
"""

import threading
from datetime import date

import pytest
from django.db import connection, connections

from core import seals
from core.models import Seal
from inspections.services.assemblies import release
from inspections.services.inspect import sign_inspection
from inspections.traveler import issue
from procedures.models.wps import WPSState
from procedures.services import wps as wps_steps
from tests.factory import L

pytestmark = pytest.mark.django_db(transaction=True)

SIGNERS = 8
ROUNDS = 3


def _run_at_once(jobs):
    """Start every callable behind one barrier, each on its own thread and connection; return their exceptions."""
    barrier = threading.Barrier(len(jobs))
    errors = []

    def run(job):
        try:
            barrier.wait(timeout=30)
            job()
        except Exception as exc:  # noqa: BLE001 - every failure is reported by the test
            errors.append(exc)
        finally:
            connections.close_all()

    threads = [threading.Thread(target=run, args=(job,)) for job in jobs]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=120)
    assert not any(thread.is_alive() for thread in threads), "a signing hung"
    return errors


@pytest.mark.pdf
def test_concurrent_signings_append_to_one_unbroken_chain(make):
    if connection.vendor != "postgresql":
        pytest.skip("PostgreSQL only: the SQLite test database is in memory with a shared cache, where a second "
                    "writer fails at once instead of waiting; on a file, SQLite's IMMEDIATE transaction already "
                    "serialises every write")
    wps = make.make_wps(state=WPSState.APPROVED)
    welder = make.make_welder()
    make.make_qualification(welder=welder)
    inspectors = [make.make_user("inspector") for _ in range(SIGNERS)]
    qa = make.make_user("qa_lead")
    busy = make.make_assembly(piece_mark="C1")
    welds = []
    for n in range(SIGNERS * ROUNDS):
        weld = make.make_weld(assembly=busy, mark=f"W{n:02d}", wps=wps, welded_on=date(2026, 4, 2))
        weld.welders.add(welder)
        welds.append(weld)
    ready = []
    for n in range(ROUNDS):
        assembly = make.make_assembly(job=busy.job, piece_mark=f"R{n}")
        make.make_inspection(make.make_sound_weld(assembly=assembly, mark="W1"), accepted=True)
        ready.append(assembly)
    drafts = [wps_steps.submit(make.make_wps(), make.make_user("welding_engineer")) for _ in range(ROUNDS)]
    before = Seal.objects.count()

    errors = []
    for r in range(ROUNDS):
        jobs = [lambda w=welds[r * SIGNERS + i], u=inspectors[i]: sign_inspection(w, {"min_size": L("1/4 in")},
                                                                                "final", u)
                for i in range(SIGNERS)]
        jobs += [lambda: issue(busy, qa), lambda a=ready[r]: release(a, qa),
                 lambda d=drafts[r]: wps_steps.approve(d, qa)]
        errors += _run_at_once(jobs)

    assert not errors, errors
    signed = SIGNERS * ROUNDS + 2 * ROUNDS  # inspections, releases and approvals; travelers as the data moved
    sequences = list(Seal.objects.order_by("sequence").values_list("sequence", flat=True))
    assert len(sequences) >= before + signed + 1
    assert sequences == list(range(1, len(sequences) + 1))  # no fork (a repeated number), no gap
    report = seals.verify()
    assert report.ok, [str(p) for p in report.problems]
