"""Load (not a test): 16 inspectors signing and 4 engineers editing drafts for a fixed time, through the pages.

    .venv/bin/python benchmarks/load_mixed.py [--db sqlite|postgresql|both] [--seconds 60]
                                              [--inspectors 16] [--engineers 4]

The app runs under gunicorn on 127.0.0.1 (3 workers x 4 threads) on a throwaway database. Inspectors sign final
visual inspections of welds of two jobs (one in five rejected, so NCRs are numbered under load); engineers open a
draft WPS (two engineers per draft), change its notes and save. Then it checks:

  * every acknowledged signing (a redirect to the new inspection) is stored with its history row;
  * every acknowledged edit is in the WPS's history, and no two acknowledged edits of one draft started from the
    same version (two would mean one overwrote the other unseen); a refused edit (409, stale) saved nothing;
  * the records agree: one NCR per rejected final inspection, NCR numbers 1..n per job, each weld pointing at its
    newest inspection, each assembly's state what its welds say.

Targets: 0 server errors, 0 lost or silently overwritten writes, on both databases.
"""

import random
import threading
import time
from collections import Counter

import harness


def run(args):
    with harness.Stack(args.db) as stack:
        load = Load.prepare(stack, args.inspectors, args.engineers)
        stack.start()
        print(f"\n== {stack.label}; {args.inspectors} inspectors + {args.engineers} engineers for {args.seconds} s "
              f"(load average {harness.load_average()})")
        load.run(args.seconds)
        stack.stop()
        return load.report(stack)


class Load:
    """Inspectors signing and engineers editing drafts through the pages, and what they were told."""

    def __init__(self, stack, inspectors, engineers, welds, drafts):
        self.stack, self.inspectors, self.engineers, self.welds, self.drafts = (
            stack, inspectors, engineers, welds, drafts)
        self.lock = threading.Lock()
        self.signed, self.sign_ms, self.edit_ms, self.statuses = [], [], [], Counter()
        self.edits = []  # (wps pk, opened_version, notes) of each acknowledged edit
        self.refused_stale = 0
        self.in_flight = 0
        self.elapsed = 0.0
        self.hung = []

    @classmethod
    def prepare(cls, stack, n_inspectors, n_engineers):
        from core.roles import Role

        inspectors = harness.make_users(Role.INSPECTOR, n_inspectors, "inspector")
        engineers = harness.make_users(Role.WELDING_ENGINEER, n_engineers, "engineer")
        welds = []
        for n in range(2):
            welds += [w.pk for w in harness.make_job(f"J-LOAD{n + 1}", assemblies=20, welds_each=5)[1]]
        drafts = [harness.make_draft_wps(f"BSW-L{n + 1}") for n in range(max(1, n_engineers // 2))]
        return cls(stack, inspectors, engineers, welds, drafts)

    def _send(self, client, method, path, data=None):
        with self.lock:
            self.in_flight += 1
        try:
            return client.request(method, path, data)
        finally:
            with self.lock:
                self.in_flight -= 1

    def inspector(self, i, stop_at):
        client = harness.Client(self.stack.port, self.inspectors[i])
        rng = random.Random(i)
        while time.monotonic() < stop_at:
            weld = rng.choice(self.welds)
            data = harness.SIGN_REJECTED if rng.random() < 0.2 else harness.SIGN_ACCEPTED
            data = client.shown(weld, data)  # what the panel showed, asked before the timed signature
            status, location, _body, ms = self._send(client, "POST", f"/inspections/inspect/weld/{weld}/", data)
            pk = harness.pk_from(location, r"/inspections/inspection/(\d+)/") if status == 302 else None
            with self.lock:
                self.statuses[("sign", status)] += 1
                if pk:
                    self.signed.append(pk)
                    self.sign_ms.append(ms)
        client.close()

    def engineer(self, i, stop_at):
        client = harness.Client(self.stack.port, self.engineers[i])
        wps = self.drafts[i % len(self.drafts)]
        path = f"/procedures/wps/{wps.pk}/edit/"
        rng = random.Random(100 + i)
        k = 0
        while time.monotonic() < stop_at:
            status, _loc, page, _ms = self._send(client, "GET", path)
            if status != 200:
                with self.lock:
                    self.statuses[("open", status)] += 1
                continue
            opened = harness.hidden_inputs(page)
            k += 1
            notes = f"engineer {i + 1} edit {k}"
            data = {**harness.WPS_FORM, "number": wps.number, "notes": notes,
                    "opened_version": opened.get("opened_version", ""), "opened_at": opened.get("opened_at", "")}
            time.sleep(rng.uniform(0.0, 0.05))  # reading the page before saving
            status, _loc, body, ms = self._send(client, "POST", path, data)
            with self.lock:
                self.statuses[("edit", status)] += 1
                if status == 302:
                    self.edits.append((wps.pk, int(opened["opened_version"]), notes))
                    self.edit_ms.append(ms)
                elif status == 409 and "Nothing was saved" in body:
                    self.refused_stale += 1
        client.close()

    def run(self, seconds):
        n_inspectors = len(self.inspectors)

        def work(i, stop_at):
            if i < n_inspectors:
                self.inspector(i, stop_at)
            else:
                self.engineer(i - n_inspectors, stop_at)

        started = time.perf_counter()
        self.hung = harness.run_threads(work, n_inspectors + len(self.engineers), seconds=seconds)
        self.elapsed = time.perf_counter() - started

    def report(self, stack, extra_problems=(), broken_is_error=True):
        """Print the figures and the checks; True when the targets are met. A request cut off (connection broken)
        is a server error, unless the script broke it (fault_kill.py kills workers)."""
        broken = sum(n for (_kind, status), n in self.statuses.items() if status == 0)
        answered_5xx = sum(n for (_kind, status), n in self.statuses.items() if status >= 500)
        logged = stack.server_errors_logged()
        print(f"  ran {self.elapsed:.1f} s; {len(self.signed)} signings acknowledged "
              f"({len(self.signed) / self.elapsed:.1f}/s), {len(self.edits)} edits saved, {self.refused_stale} "
              "edits refused as stale (nothing saved, the editor told who changed it)")
        print(f"  responses: {dict(sorted((f'{k} {s}', n) for (k, s), n in self.statuses.items()))}")
        print(f"  server errors: {answered_5xx} answered 5xx, {logged} logged by the server; {broken} requests cut "
              "off (status 0: connection broken, nothing acknowledged)")
        print(harness.timing("sign (POST -> redirect)", self.sign_ms))
        print(harness.timing("edit a draft (POST -> redirect)", self.edit_ms))
        problems = list(extra_problems) + harness.check_inspections(self.signed) + check_edits(self.edits) \
            + harness.check_consistency()
        if self.hung:
            problems.append(f"{len(self.hung)} client threads did not finish")
        lost = sum(1 for p in problems if "not in the database" in p or "saved over twice" in p)
        return harness.report_targets(problems, answered_5xx + logged + (broken if broken_is_error else 0), lost)


def check_edits(edits):
    """Each acknowledged edit is in its draft's history, and no two started from the same version."""
    from core.history import history_of
    from procedures.models import WPS

    problems = []
    by_wps = {}
    for pk, version, notes in edits:
        by_wps.setdefault(pk, []).append((version, notes))
    for pk, saved in by_wps.items():
        wps = WPS.objects.get(pk=pk)
        recorded = [e.changes.get("notes", [None, None])[1] for e in history_of(wps).filter(action="edited")]
        missing = [notes for _v, notes in saved if notes not in recorded]
        if missing:
            problems.append(f"{len(missing)} acknowledged edits of {wps} are not in the database: {missing[:3]}")
        versions = Counter(v for v, _n in saved)
        twice = [v for v, n in versions.items() if n > 1]
        if twice:
            problems.append(f"{wps}: {len(twice)} versions were saved over twice (one edit overwrote another)")
        if wps.notes != max(saved)[1]:
            problems.append(f"{wps}: stored notes are not those of the last acknowledged edit")
    return problems


if __name__ == "__main__":
    arguments = harness.arguments(
        __doc__.splitlines()[0],
        seconds=(60, 5, 600, "how long the load runs"),
        inspectors=(16, 1, 64, "inspectors signing at once"),
        engineers=(4, 0, 32, "engineers editing drafts (two per draft)"),
    )
    raise SystemExit(harness.each_database(arguments, run))
