"""Fault (not a test): gunicorn workers killed with SIGKILL while inspectors sign and engineers edit.

    .venv/bin/python benchmarks/fault_kill.py [--db sqlite|postgresql|both] [--seconds 30] [--kills 3]
                                              [--inspectors 16] [--engineers 4]

The load of load_mixed.py runs under gunicorn on 127.0.0.1 (3 workers x 4 threads); at evenly spaced moments the
script kills one worker outright (SIGKILL: no cleanup, a transaction in the middle of its work), and gunicorn
starts another. Requests on the killed worker are cut off (the client gets no answer: nothing was acknowledged).
Then it checks what load_mixed.py checks: every acknowledged save is stored with its history row, no edit
overwrote another, and the records agree with each other (no half-written signing: an inspection without its
history row, an NCR missing, a weld pointing at the wrong inspection, an assembly in the wrong state); and the
service answers again with all its workers.
"""

import os
import random
import signal
import threading
import time

import harness
from load_mixed import Load


def run(args):
    with harness.Stack(args.db) as stack:
        load = Load.prepare(stack, args.inspectors, args.engineers)
        stack.start()
        print(f"\n== {stack.label}; {args.inspectors} inspectors + {args.engineers} engineers for {args.seconds} s, "
              f"{args.kills} workers killed (load average {harness.load_average()})")
        kills = []

        def killer():
            rng = random.Random(7)
            for _ in range(args.kills):
                time.sleep(args.seconds / (args.kills + 1))
                workers = stack.worker_pids()
                if not workers:
                    continue
                victim = rng.choice(workers)
                in_flight = load.in_flight
                os.kill(victim, signal.SIGKILL)  # a worker of the gunicorn this script started
                kills.append((round(time.perf_counter() - started, 1), victim, in_flight))

        started = time.perf_counter()
        thread = threading.Thread(target=killer, daemon=True)
        thread.start()
        load.run(args.seconds)
        thread.join(timeout=10)
        for at, pid, in_flight in kills:
            print(f"  killed worker {pid} at {at} s with {in_flight} requests in flight")
        problems = []
        time.sleep(2)  # gunicorn starts replacements
        if len(stack.worker_pids()) != stack.workers:
            problems.append(f"{len(stack.worker_pids())} workers serving after the kills, not {stack.workers}")
        client = harness.Client(stack.port, load.inspectors[0])
        status = client.get("/")[0]
        client.close()
        if status != 200:
            problems.append(f"the home page answers {status} after the kills")
        if len(kills) != args.kills:
            problems.append(f"only {len(kills)} of {args.kills} kills happened")
        stack.stop()
        return load.report(stack, problems, broken_is_error=False)


if __name__ == "__main__":
    arguments = harness.arguments(
        __doc__.splitlines()[0],
        seconds=(30, 5, 600, "how long the load runs"),
        kills=(3, 1, 20, "workers killed, evenly spaced"),
        inspectors=(16, 1, 64, "inspectors signing at once"),
        engineers=(4, 0, 32, "engineers editing drafts (two per draft)"),
    )
    raise SystemExit(harness.each_database(arguments, run))
