"""Race (not a test): inspectors rejecting welds of one job at the same moment, round after round.

    .venv/bin/python benchmarks/race_rejections.py [--db sqlite|postgresql|both] [--inspectors 8] [--rounds 20]

Each round, every inspector waits at a barrier and then posts a rejected final visual inspection of a weld on
its own assembly of the same job, so every signing opens an NCR numbered in that job at the same moment (the
numbers are taken under a lock on the job row, inspections.services.numbering). Checks: every post acknowledged
(no server error), one NCR per rejection, numbers NCR-<job>-001 .. n with no repeat or gap.
"""

import threading
import time

import harness


def run(args):
    with harness.Stack(args.db) as stack:
        from core.roles import Role

        inspectors = harness.make_users(Role.INSPECTOR, args.inspectors, "inspector")
        job, welds = harness.make_job("J-RACE", assemblies=args.inspectors, welds_each=args.rounds)
        by_assembly = {}
        for weld in welds:
            by_assembly.setdefault(weld.assembly_id, []).append(weld.pk)
        lanes = list(by_assembly.values())  # inspector i rejects the welds of assembly i, one per round
        stack.start()
        print(f"\n== {stack.label}; {args.inspectors} inspectors rejecting at once, {args.rounds} rounds "
              f"(load average {harness.load_average()})")
        barrier = threading.Barrier(args.inspectors)
        lock = threading.Lock()
        signed, statuses, ms_all = [], {}, []

        def inspector(i, stop_at):
            client = harness.Client(stack.port, inspectors[i])
            for r in range(args.rounds):
                data = client.shown(lanes[i][r], harness.SIGN_REJECTED)  # what the panel showed, before the race
                try:
                    barrier.wait(timeout=120)
                except threading.BrokenBarrierError:
                    return
                status, location, _body, ms = client.post(f"/inspections/inspect/weld/{lanes[i][r]}/", data)
                with lock:
                    statuses[status] = statuses.get(status, 0) + 1
                    ms_all.append(ms)
                    pk = harness.pk_from(location, r"/inspections/inspection/(\d+)/") if status == 302 else None
                    if pk:
                        signed.append(pk)
            client.close()

        started = time.perf_counter()
        hung = harness.run_threads(inspector, args.inspectors, seconds=args.rounds * 60)
        elapsed = time.perf_counter() - started
        stack.stop()

        from inspections.models import NCR

        numbers = sorted(NCR.objects.filter(weld__assembly__job=job).values_list("number", flat=True))
        expected = [f"NCR-{job.number}-{n:03d}" for n in range(1, args.inspectors * args.rounds + 1)]
        server_errors = sum(n for status, n in statuses.items() if status >= 500 or status == 0)
        server_errors += stack.server_errors_logged()
        print(f"  {args.inspectors * args.rounds} rejections posted in {elapsed:.1f} s; responses {statuses}")
        print(harness.timing("reject (POST -> redirect)", ms_all))
        print(f"  NCRs: {len(numbers)}, numbered {numbers[0] if numbers else '-'} .. {numbers[-1] if numbers else '-'},"
              f" {len(numbers) - len(set(numbers))} repeated")
        problems = harness.check_inspections(signed) + harness.check_consistency()
        if numbers != expected:
            problems.append(f"NCR numbers are not {expected[0]} .. {expected[-1]} exactly once each")
        if len(signed) != args.inspectors * args.rounds:
            problems.append(f"{args.inspectors * args.rounds - len(signed)} rejections were not acknowledged")
        if hung:
            problems.append(f"{len(hung)} inspectors did not finish")
        lost = len([p for p in problems if "not in the database" in p])
        return harness.report_targets(problems, server_errors, lost)


if __name__ == "__main__":
    arguments = harness.arguments(
        __doc__.splitlines()[0],
        inspectors=(8, 2, 32, "inspectors rejecting at the same moment"),
        rounds=(20, 1, 200, "rounds"),
    )
    raise SystemExit(harness.each_database(arguments, run))
