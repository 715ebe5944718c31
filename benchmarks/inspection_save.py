"""Benchmark (not a test): the server time of signing an inspection with 100,000 inspections already stored.

    .venv/bin/python benchmarks/inspection_save.py [--existing 100000] [--requests 200] [--clients 16]

Builds a throwaway SQLite database in a temporary folder (WAL, as settings.py configures it), stores the existing
inspections with bulk_create, starts the app under gunicorn on 127.0.0.1 (bounded: 2 workers x 8 threads) and
measures, in the same run:

  * save: POST of the tablet form (inspections:inspect_weld): form + units + acceptance engine + the signing
    transaction (weld lock, insert, NCR step, assembly state refresh) + redirect;
  * bare: a Django view behind the same middleware that inserts one comparable Inspection row and nothing else.

Server time is measured inside the server process (a WSGI wrapper puts it in a Server-Timing header), so the
client's own Python does not count. Then --clients clients sign at once (each --per-client requests, bounded by
--max-seconds) and every error is reported. Targets (issue 5): save p95 < 25 ms with one client; no errors with 16.
Loopback only; the database, the media folder and the server are removed at the end.
"""

import argparse
import http.client
import os
import re
import secrets
import shutil
import signal
import socket
import statistics
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path
from urllib.parse import urlencode

ROOT = Path(__file__).resolve().parent.parent
HOST = "127.0.0.1"


# --- server side: imported by gunicorn as benchmarks.inspection_save:application ---------------------------

def _timed(app):
    def wrapper(environ, start_response):
        captured = {}

        def capture(status, headers, exc_info=None):
            captured["args"] = (status, headers, exc_info)
            return lambda data: None  # Django never uses the write() callable

        started = time.perf_counter()
        body = app(environ, capture)
        elapsed = (time.perf_counter() - started) * 1000
        status, headers, exc_info = captured["args"]
        start_response(status, [*headers, ("Server-Timing", f"app;dur={elapsed:.3f}")], exc_info)
        return body

    return wrapper


if os.environ.get("LEGWORK_BENCH_SERVE") == "1":
    from django.conf import settings
    from django.core.wsgi import get_wsgi_application

    settings.ROOT_URLCONF = "benchmarks.bench_urls"  # the app's URLs plus the bare view
    application = _timed(get_wsgi_application())


# --- client side ---------------------------------------------------------------------------------------------

def _environment(folder: Path) -> dict:
    return {
        **os.environ,
        "DJANGO_SETTINGS_MODULE": "legwork.settings",
        "LEGWORK_VAR_DIR": str(folder),
        "LEGWORK_SQLITE_PATH": str(folder / "bench.sqlite3"),
        "LEGWORK_MEDIA_ROOT": str(folder / "media"),
        "LEGWORK_STATIC_ROOT": str(folder / "static"),
        "LEGWORK_DEBUG": "0",  # as deployed: no query log, no debug pages
        "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40),
        "LEGWORK_ALLOWED_HOSTS": HOST,
        "LEGWORK_SSL_REDIRECT": "0",
        "LEGWORK_TASKS_INLINE": "1",
        "LEGWORK_LOG_LEVEL": "ERROR",
        "PYTHONPATH": str(ROOT),
    }


def _seed(existing: int, welds_per_assembly: int = 10, per_weld: int = 10):
    """Users, a job, assemblies and welds, and `existing` signed inspections (bulk_create: no per-row signing)."""
    import django
    from django.core.management import call_command

    django.setup()
    call_command("migrate", verbosity=0)
    call_command("collectstatic", verbosity=0, interactive=False)  # DEBUG off serves from the manifest
    from datetime import timedelta

    from django.contrib.auth import BACKEND_SESSION_KEY, HASH_SESSION_KEY, SESSION_KEY
    from django.contrib.sessions.backends.db import SessionStore
    from django.db import transaction
    from django.utils import timezone

    from core.models import User
    from core.units import parse_length as L
    from inspections.models import Assembly, Customer, Inspection, InspectorCredential, Job, Weld
    from inspections.services.inspect import findings_json, judge

    inspector = User.objects.create(username="bench-inspector", role="inspector", first_name="Bench")
    today = timezone.localdate()  # a final visual is signed under a current credential (inspections.credentials)
    InspectorCredential.objects.create(inspector=inspector, scheme="aws_cwi", number="CWI BENCH-01",
                                       issued_on=today - timedelta(days=365), expires_on=today + timedelta(days=730),
                                       eye_exam_on=today - timedelta(days=30))
    customer, _ = Customer.objects.get_or_create(name="Brannock Steelworks (bench)")
    job = Job.objects.create(number="J-BENCH", name="Benchmark framing", customer=customer,
                             unit_system="US", criteria_key="aws-d1.1-2020-static")
    n_welds = max(1, existing // per_weld)
    n_assemblies = max(1, n_welds // welds_per_assembly)
    with transaction.atomic():
        Assembly.objects.bulk_create(
            [Assembly(job=job, piece_mark=f"B{i}", drawing=f"E-{i}", description="bench beam")
             for i in range(n_assemblies)], batch_size=2000)
        assemblies = list(Assembly.objects.filter(job=job).order_by("pk"))
        Weld.objects.bulk_create(
            [Weld(assembly=assemblies[i % n_assemblies], mark=f"W{i // n_assemblies}", size=L("1/4 in"),
                  length=L("12 in"), thickness1=L("3/8 in"), thickness2=L("1/2 in")) for i in range(n_welds)],
            batch_size=2000)
    welds = list(Weld.objects.filter(assembly__job=job).select_related("assembly__job").order_by("pk"))
    verdict = judge(welds[0], {"min_size": L("1/4 in")})
    findings = findings_json(verdict, "US")
    batch = []
    with transaction.atomic():
        for i in range(existing):
            batch.append(Inspection(weld=welds[i % n_welds], stage="final", inspector=inspector,
                                    min_size=L("1/4 in"), accepted=True, findings=findings,
                                    criteria_key=verdict.criteria_key, criteria_version=verdict.criteria_version))
            if len(batch) == 5000:
                Inspection.objects.bulk_create(batch)
                batch = []
        Inspection.objects.bulk_create(batch)
        # What sign_inspection keeps on each weld: its latest (final) inspection.
        from django.db.models import Max
        latest = dict(Inspection.objects.values_list("weld_id").annotate(Max("pk")))
        for weld in welds:
            weld.latest_inspection_id = weld.latest_final_id = latest.get(weld.pk)
        Weld.objects.bulk_update(welds, ["latest_inspection", "latest_final"], batch_size=2000)
    session = SessionStore()
    session[SESSION_KEY] = str(inspector.pk)
    session[BACKEND_SESSION_KEY] = "django.contrib.auth.backends.ModelBackend"
    session[HASH_SESSION_KEY] = inspector.get_session_auth_hash()
    session.create()
    return session.session_key, [w.pk for w in welds], Inspection.objects.count()


def _free_port() -> int:
    with socket.socket() as s:
        s.bind((HOST, 0))
        return s.getsockname()[1]


def _start_server(env, port):
    gunicorn = Path(sys.executable).with_name("gunicorn")
    process = subprocess.Popen(
        [str(gunicorn), "--bind", f"{HOST}:{port}", "--workers", "2", "--threads", "8", "--timeout", "60",
         "--log-level", "warning", "benchmarks.inspection_save:application"],
        cwd=ROOT, env={**env, "LEGWORK_BENCH_SERVE": "1"}, start_new_session=True)
    deadline = time.monotonic() + 30
    while time.monotonic() < deadline:
        try:
            with socket.create_connection((HOST, port), timeout=0.5):
                return process
        except OSError:
            if process.poll() is not None:
                raise SystemExit("gunicorn did not start")
            time.sleep(0.2)
    process.terminate()
    raise SystemExit("gunicorn did not answer within 30 s")


class Client:
    """One keep-alive connection signed in as the inspector, with a CSRF token of its own."""

    def __init__(self, port, session_key):
        self.conn = http.client.HTTPConnection(HOST, port, timeout=30)
        self.token = secrets.token_hex(16)  # 32 characters: Django's unmasked secret format
        self.headers = {"Cookie": f"sessionid={session_key}; csrftoken={self.token}", "X-CSRFToken": self.token,
                        "Content-Type": "application/x-www-form-urlencoded", "Host": HOST}

    def post(self, path, data, body=False):
        started = time.perf_counter()
        self.conn.request("POST", path, body=urlencode(data), headers=self.headers)
        response = self.conn.getresponse()
        content = response.read()
        wall = (time.perf_counter() - started) * 1000
        timing = response.getheader("Server-Timing", "")
        server = float(timing.split("dur=")[1]) if "dur=" in timing else float("nan")
        return (response.status, server, wall, content) if body else (response.status, server, wall)

    def close(self):
        self.conn.close()


SAVE_DATA = {"stage": "final", "min_size": "1/4", "undercut_depth": "1/64", "remarks": "bench"}


_SHOWN = {}  # weld pk -> the verdict fingerprint the live panel showed (signing carries it, as the tablet does)


def _shown(client, weld_pk):
    """What the tablet's panel shows before the inspector taps Sign: asked once per weld, not timed."""
    if weld_pk not in _SHOWN:
        *_, content = client.post(f"/inspections/inspect/weld/{weld_pk}/preview/", SAVE_DATA, body=True)
        found = re.search(rb'name="shown_verdict" id="lw-shown" value="([0-9a-f]*)"', content)
        _SHOWN[weld_pk] = found.group(1).decode() if found else ""
    return _SHOWN[weld_pk]


def _save(client, weld_pk):
    return client.post(f"/inspections/inspect/weld/{weld_pk}/", {**SAVE_DATA, "shown_verdict": _shown(client, weld_pk)})


def _bare(client, weld_pk):
    return client.post(f"/bench/bare/{weld_pk}/", {})


def _pct(values, p):
    values = sorted(values)
    if not values:
        return float("nan")
    k = max(0, min(len(values) - 1, round(p / 100 * (len(values) - 1))))
    return values[k]


def _line(label, values):
    if not values:  # every request was refused (a 400 names why in the server's log above)
        return f"  {label:<34} n=   0  nothing answered as a signing does: see the server's log"
    return (f"  {label:<34} n={len(values):>4}  p50 {_pct(values, 50):7.2f} ms  p95 {_pct(values, 95):7.2f} ms  "
            f"max {max(values):7.2f} ms  mean {statistics.fmean(values):7.2f} ms")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--existing", type=int, default=100_000)
    parser.add_argument("--requests", type=int, default=200, help="sequential requests of each kind")
    parser.add_argument("--clients", type=int, default=16)
    parser.add_argument("--per-client", type=int, default=25)
    parser.add_argument("--max-seconds", type=float, default=120, help="bound on the concurrent phase")
    args = parser.parse_args()
    if not (0 < args.requests <= 5000 and 0 < args.clients <= 64 and 0 < args.per_client <= 500
            and 0 <= args.existing <= 2_000_000):
        raise SystemExit("keep it bounded: requests <= 5000, clients <= 64, per-client <= 500, existing <= 2e6")

    folder = Path(tempfile.mkdtemp(prefix="legwork-bench-"))
    env = _environment(folder)
    os.environ.update(env)
    sys.path.insert(0, str(ROOT))
    server = None
    try:
        t0 = time.perf_counter()
        session_key, weld_pks, stored = _seed(args.existing)
        print(f"seeded {stored:,} inspections on {len(weld_pks):,} welds in {time.perf_counter() - t0:.1f} s "
              f"(SQLite, WAL)")
        port = _free_port()
        server = _start_server(env, port)
        client = Client(port, session_key)
        for i in range(20):  # warm both workers' imports, templates and connections
            _save(client, weld_pks[i])
            _bare(client, weld_pks[i])

        saves, bares, errors = [], [], []
        saves_wall, bares_wall = [], []
        for i in range(args.requests):  # alternate, so both kinds see the same database
            weld = weld_pks[(i * 7919) % len(weld_pks)]
            status, server_ms, wall = _save(client, weld)
            (saves.append(server_ms), saves_wall.append(wall)) if status == 302 else errors.append(("save", status))
            status, server_ms, wall = _bare(client, weld)
            (bares.append(server_ms), bares_wall.append(wall)) if status == 204 else errors.append(("bare", status))
        client.close()
        print(f"\none client, {args.requests} of each, alternating (server time inside the app):")
        print(_line("save (sign an inspection)", saves))
        print(_line("bare insert of one row", bares))
        print(_line("save, as the client sees it", saves_wall))
        print(_line("bare, as the client sees it", bares_wall))
        if saves and bares:
            print(f"  save p95 - bare p95 = {_pct(saves, 95) - _pct(bares, 95):.2f} ms of form, engine and signing")
        print(f"  errors: {len(errors)} {errors[:5] if errors else ''}")

        results, failures = [], []
        lock = threading.Lock()
        stop_at = time.monotonic() + args.max_seconds

        def worker(n):
            c = Client(port, session_key)
            try:
                for i in range(args.per_client):
                    if time.monotonic() > stop_at:
                        with lock:
                            failures.append((n, "time bound reached"))
                        return
                    weld = weld_pks[(n * 1009 + i * 31) % len(weld_pks)]
                    try:
                        status, server_ms, wall = _save(c, weld)
                    except (OSError, http.client.HTTPException) as exc:
                        with lock:
                            failures.append((n, repr(exc)))
                        c.close()
                        c = Client(port, session_key)
                        continue
                    with lock:
                        (results.append((server_ms, wall)) if status == 302 else failures.append((n, status)))
            finally:
                c.close()

        threads = [threading.Thread(target=worker, args=(n,), daemon=True) for n in range(args.clients)]
        started = time.perf_counter()
        for t in threads:
            t.start()
        for t in threads:
            t.join(timeout=max(1.0, stop_at - time.monotonic() + 5))
        elapsed = time.perf_counter() - started
        print(f"\n{args.clients} clients at once, {args.per_client} saves each "
              f"({len(results)} done in {elapsed:.1f} s, {len(results) / elapsed:.0f} saves/s):")
        if results:
            print(_line("save, server time", [r[0] for r in results]))
            print(_line("save, as the clients see it", [r[1] for r in results]))
        print(f"  errors: {len(failures)} {failures[:5] if failures else ''}")

        import django.db

        django.db.connections.close_all()
        from inspections.models import Inspection

        print(f"\ninspections stored at the end: {Inspection.objects.count():,}")
        ok = bool(saves) and _pct(saves, 95) < 25 and not failures and not errors
        print(f"targets (save p95 < 25 ms with one client; no errors with {args.clients}): "
              f"{'met' if ok else 'NOT met'}")
    finally:
        if server is not None and server.poll() is None:
            os.killpg(server.pid, signal.SIGTERM)  # the gunicorn this script started, and its workers
            try:
                server.wait(timeout=10)
            except subprocess.TimeoutExpired:
                os.killpg(server.pid, signal.SIGKILL)
        shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    main()
