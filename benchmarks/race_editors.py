"""Race (not a test): two editors of one record saving at the same moment, round after round.

    .venv/bin/python benchmarks/race_editors.py [--db sqlite|postgresql|both] [--rounds 30]

Each round, two engineers open the edit page of the same draft WPS (and, alternately, of the same job), change
the same field to different values, wait at a barrier and save at once. Exactly one save may win; the other must
be refused (409) with nothing saved, its input kept and the winner named. Checks: per round one 302 and one 409,
the stored value is the winner's, the history holds every winning edit and no losing one, and no version was
saved over twice. Targets: 0 server errors, 0 silently overwritten writes.
"""

import threading
import time

import harness


def run(args):
    with harness.Stack(args.db) as stack:
        from core.roles import Role

        editors = harness.make_users(Role.QA_LEAD, 2, "editor")
        engineers = harness.make_users(Role.WELDING_ENGINEER, 2, "engineer")
        wps = harness.make_draft_wps("BSW-R1")
        job, _welds = harness.make_job("J-EDIT", assemblies=1, welds_each=1)
        stack.start()
        print(f"\n== {stack.label}; 2 editors saving one record at once, {args.rounds} rounds "
              f"(load average {harness.load_average()})")
        barrier = threading.Barrier(2)
        lock = threading.Lock()
        outcomes = []  # (round, kind, editor, status, value, winner named on the refusal page)
        ms_all = []

        def form(kind, r, i, opened):
            value = f"round {r} editor {i + 1}"
            if kind == "wps":
                return value, {**harness.WPS_FORM, "number": wps.number, "notes": value, **opened}
            return value, {"number": job.number, "name": job.name, "customer": value, "unit_system": "US",
                           "criteria": "builtin:aws-d1.1-2020-static", **opened}

        def editor(i, stop_at):
            clients = {"wps": harness.Client(stack.port, engineers[i]), "job": harness.Client(stack.port, editors[i])}
            for r in range(args.rounds):
                kind = "wps" if r % 2 == 0 else "job"
                path = f"/procedures/wps/{wps.pk}/edit/" if kind == "wps" else f"/inspections/jobs/{job.pk}/edit/"
                client = clients[kind]
                status, _loc, page, _ms = client.get(path)
                opened = {k: v for k, v in harness.hidden_inputs(page).items() if k.startswith("opened_")}
                value, data = form(kind, r, i, opened)
                try:
                    barrier.wait(timeout=120)
                except threading.BrokenBarrierError:
                    return
                status, _loc, body, ms = client.post(path, data)
                other = (engineers if kind == "wps" else editors)[1 - i]
                with lock:
                    ms_all.append(ms)
                    outcomes.append((r, kind, i, status, value, str(other) in body))
                try:
                    barrier.wait(timeout=120)  # both saved before the next round opens the page again
                except threading.BrokenBarrierError:
                    return
            for client in clients.values():
                client.close()

        started = time.perf_counter()
        hung = harness.run_threads(editor, 2, seconds=args.rounds * 30)
        elapsed = time.perf_counter() - started
        stack.stop()
        return check(args, stack, wps, job, outcomes, ms_all, elapsed, hung)


def check(args, stack, wps, job, outcomes, ms_all, elapsed, hung):
    from core.history import history_of

    problems, server_errors = [], stack.server_errors_logged()
    winners = {}
    for r in range(args.rounds):
        mine = [o for o in outcomes if o[0] == r]
        statuses = sorted(o[3] for o in mine)
        server_errors += sum(1 for s in statuses if s >= 500 or s == 0)
        if statuses != [302, 409]:
            problems.append(f"round {r}: answers {statuses}, not one save and one refusal")
            continue
        loser = next(o for o in mine if o[3] == 409)
        if not loser[5]:
            problems.append(f"round {r}: the refusal does not name who saved first")
        winners[r] = next(o for o in mine if o[3] == 302)
    stored = {"wps": type(wps).objects.get(pk=wps.pk), "job": type(job).objects.get(pk=job.pk)}
    recorded = {
        "wps": [e.changes.get("notes", [None, None])[1] for e in history_of(stored["wps"]).filter(action="edited")],
        "job": [e.changes.get("customer", [None, None])[1] for e in history_of(stored["job"]).filter(action="edited")],
    }
    losers = {o[4] for o in outcomes if o[3] == 409}
    for kind, values in recorded.items():
        won = [w[4] for w in winners.values() if w[1] == kind]
        if sorted(values) != sorted(won):
            problems.append(f"the {kind}'s history does not hold exactly the winning edits")
        if losers & set(values):
            problems.append(f"a refused edit of the {kind} is in its history (it overwrote the other)")
        field = "notes" if kind == "wps" else "customer"
        if won and getattr(stored[kind], field) != won[-1]:
            problems.append(f"the {kind}'s stored value is not the last winning edit")
    ok_rounds = len(winners)
    print(f"  {args.rounds} rounds in {elapsed:.1f} s: {ok_rounds} with one save and one refusal; "
          f"{len(losers)} refusals, each saving nothing")
    print(harness.timing("save at once (both editors)", ms_all))
    if hung:
        problems.append(f"{len(hung)} editors did not finish")
    lost = sum(1 for p in problems if "overwrote" in p or "winning edits" in p)
    return harness.report_targets(problems, server_errors, lost)


if __name__ == "__main__":
    arguments = harness.arguments(__doc__.splitlines()[0], rounds=(30, 2, 500, "rounds (alternately WPS and job)"))
    raise SystemExit(harness.each_database(arguments, run))
