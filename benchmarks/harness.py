"""What the load, race and fault scripts share (not a script itself).

Stack: a throwaway database (SQLite in a temporary folder, or a PostgreSQL database created on 127.0.0.1 and
dropped at the end), migrated, with the app under gunicorn on 127.0.0.1 (3 workers x 4 threads, DEBUG off), and
signed-in HTTP clients. Every script runs one database per process (Django reads its settings once), so
`--db both` runs the script again for each database and prints both reports.

Everything is bounded (seconds, clients, rounds) and loopback only; what a script creates is removed at the end.
"""

import argparse
import html.parser
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
PG_ADMIN = f"postgresql://postgres@{HOST}:5432/postgres"


def arguments(description, **bounds):
    """The common arguments: --db sqlite|postgresql|both, and each script's own bounded numbers."""
    parser = argparse.ArgumentParser(description=description)
    parser.add_argument("--db", choices=["sqlite", "postgresql", "both"], default="both")
    for name, (default, _low, _high, text) in bounds.items():
        parser.add_argument(f"--{name.replace('_', '-')}", type=type(default), default=default, help=text)
    args = parser.parse_args()
    for name, (_default, low, high, _text) in bounds.items():
        value = getattr(args, name)
        if not low <= value <= high:
            raise SystemExit(f"keep it bounded: --{name.replace('_', '-')} from {low} to {high}")
    return args


def each_database(args, run):
    """run(args) for the database asked, or for SQLite then PostgreSQL (each in its own process). Exit status:
    0 when every report met its targets."""
    if args.db != "both":
        return 0 if run(args) else 1
    failed = False
    for kind in ("sqlite", "postgresql"):
        argv = [sys.executable, sys.argv[0], *[a for a in _argv_without_db()], "--db", kind]
        failed |= subprocess.call(argv, cwd=ROOT) != 0
    return 1 if failed else 0


def _argv_without_db():
    argv, skip = [], False
    for a in sys.argv[1:]:
        if skip:
            skip = False
            continue
        if a == "--db":
            skip = True
            continue
        if a.startswith("--db="):
            continue
        argv.append(a)
    return argv


class Stack:
    """The app on one database under gunicorn on 127.0.0.1. Use as a context manager; call start() to serve."""

    def __init__(self, kind, workers=3, threads=4):
        self.kind, self.workers, self.threads = kind, workers, threads
        self.folder = Path(tempfile.mkdtemp(prefix=f"legwork-{kind}-"))
        self.database = None
        self.server = None
        self.port = None

    def __enter__(self):
        env = {
            "DJANGO_SETTINGS_MODULE": "legwork.settings",
            "LEGWORK_VAR_DIR": str(self.folder),
            "LEGWORK_MEDIA_ROOT": str(self.folder / "media"),
            "LEGWORK_STATIC_ROOT": str(self.folder / "static"),
            "LEGWORK_DEBUG": "0",  # as deployed: no query log, no debug pages
            "LEGWORK_SECRET_KEY": secrets.token_urlsafe(40),
            "LEGWORK_ALLOWED_HOSTS": HOST,
            "LEGWORK_SSL_REDIRECT": "0",
            "LEGWORK_TASKS_INLINE": "1",
            "LEGWORK_LOG_LEVEL": "ERROR",
            "PYTHONPATH": str(ROOT),
        }
        if self.kind == "postgresql":
            import psycopg

            self.database = f"legwork_bench_{os.getpid()}_{secrets.token_hex(3)}"
            with psycopg.connect(PG_ADMIN, autocommit=True) as admin:
                admin.execute(f'CREATE DATABASE "{self.database}"')
            env["DATABASE_URL"] = f"postgres://postgres@{HOST}:5432/{self.database}"
        else:
            os.environ.pop("DATABASE_URL", None)
            env["LEGWORK_SQLITE_PATH"] = str(self.folder / "legwork.sqlite3")
        self.env = {**os.environ, **env}
        os.environ.update(env)
        sys.path.insert(0, str(ROOT))
        import django
        from django.core.management import call_command

        django.setup()
        call_command("migrate", verbosity=0)
        call_command("collectstatic", verbosity=0, interactive=False)  # DEBUG off serves from the manifest
        return self

    def start(self):
        self.port = _free_port()
        gunicorn = Path(sys.executable).with_name("gunicorn")
        self.log = (self.folder / "server.log").open("ab")
        self.server = subprocess.Popen(
            [str(gunicorn), "--bind", f"{HOST}:{self.port}", "--workers", str(self.workers), "--threads",
             str(self.threads), "--timeout", "60", "--graceful-timeout", "5", "--log-level", "error",
             "legwork.wsgi:application"],
            cwd=ROOT, env=self.env, start_new_session=True, stdout=self.log, stderr=subprocess.STDOUT)
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline:
            try:
                with socket.create_connection((HOST, self.port), timeout=0.5):
                    break
            except OSError:
                if self.server.poll() is not None:
                    raise SystemExit("gunicorn did not start")
                time.sleep(0.2)
        else:
            raise SystemExit("gunicorn did not answer within 30 s")
        for _ in range(50):  # every worker up
            if len(self.worker_pids()) == self.workers:
                return self
            time.sleep(0.1)
        return self

    def worker_pids(self):
        """The gunicorn workers serving now (children of the master this script started)."""
        path = Path(f"/proc/{self.server.pid}/task/{self.server.pid}/children")
        try:
            return [int(pid) for pid in path.read_text().split()]
        except OSError:
            return []

    def stop(self):
        if self.server is not None and self.server.poll() is None:
            os.killpg(self.server.pid, signal.SIGTERM)  # the gunicorn this script started, and its workers
            try:
                self.server.wait(timeout=15)
            except subprocess.TimeoutExpired:
                os.killpg(self.server.pid, signal.SIGKILL)
                self.server.wait(timeout=15)
        self.server = None

    def server_errors_logged(self):
        """How many requests the server logged as failing inside the app (tracebacks, 'Internal Server Error')."""
        try:
            text = (self.folder / "server.log").read_text(errors="replace")
        except OSError:
            return 0
        return text.count("Internal Server Error") + text.count("Traceback (most recent call last)")

    def __exit__(self, *exc):
        self.stop()
        try:
            from django.db import connections

            connections.close_all()
        except Exception:  # noqa: BLE001 - cleaning up after a failure: go on removing what was made
            pass
        if self.database:
            import psycopg

            with psycopg.connect(PG_ADMIN, autocommit=True) as admin:
                admin.execute(f'DROP DATABASE IF EXISTS "{self.database}" WITH (FORCE)')
        shutil.rmtree(self.folder, ignore_errors=True)
        return False

    @property
    def label(self):
        from django.db import connection

        if self.kind == "sqlite":
            version = ".".join(map(str, connection.Database.sqlite_version_info))
        else:
            number = connection.cursor().connection.info.server_version
            version = f"{number // 10000}.{number % 10000}"
        return f"{self.kind} {version}, gunicorn {self.workers} workers x {self.threads} threads"


def _free_port():
    with socket.socket() as s:
        s.bind((HOST, 0))
        return s.getsockname()[1]


def session_key(user):
    """A signed-in session for the user, as the login page would make."""
    from django.contrib.auth import BACKEND_SESSION_KEY, HASH_SESSION_KEY, SESSION_KEY
    from django.contrib.sessions.backends.db import SessionStore

    session = SessionStore()
    session[SESSION_KEY] = str(user.pk)
    session[BACKEND_SESSION_KEY] = "django.contrib.auth.backends.ModelBackend"
    session[HASH_SESSION_KEY] = user.get_session_auth_hash()
    session.create()
    return session.session_key


class Client:
    """One keep-alive connection for one signed-in user, with a CSRF token of its own. Reconnects after a reset."""

    def __init__(self, port, user):
        self.port, self.session = port, session_key(user)
        self.name = str(user)
        self.token = secrets.token_hex(16)  # 32 characters: Django's unmasked secret format
        self.conn = None

    def _headers(self, form=False):
        headers = {"Cookie": f"sessionid={self.session}; csrftoken={self.token}", "X-CSRFToken": self.token,
                   "Host": HOST}
        if form:
            headers["Content-Type"] = "application/x-www-form-urlencoded"
        return headers

    def request(self, method, path, data=None):
        """(status, location, body text, milliseconds); status 0 when the connection broke (nothing acknowledged)."""
        if self.conn is None:
            self.conn = http.client.HTTPConnection(HOST, self.port, timeout=60)
        started = time.perf_counter()
        try:
            body = urlencode(data, doseq=True) if data is not None else None
            self.conn.request(method, path, body=body, headers=self._headers(form=data is not None))
            response = self.conn.getresponse()
            text = response.read().decode("utf-8", "replace")
        except (OSError, http.client.HTTPException):
            self.close()
            return 0, "", "", (time.perf_counter() - started) * 1000
        return response.status, response.getheader("Location", ""), text, (time.perf_counter() - started) * 1000

    def get(self, path):
        return self.request("GET", path)

    def post(self, path, data):
        return self.request("POST", path, data)

    def shown(self, weld_pk, data) -> dict:
        """The sign form's data with the verdict the tablet's panel showed for it (the inspection form refuses a
        signature whose verdict the inspector was not shown): the panel's preview is asked first, not timed."""
        _status, _location, page, _ms = self.post(f"/inspections/inspect/weld/{weld_pk}/preview/", data)
        found = re.search(r'name="shown_verdict" id="lw-shown" value="([0-9a-f]*)"', page)
        return {**data, "shown_verdict": found.group(1) if found else ""}

    def close(self):
        if self.conn is not None:
            self.conn.close()
        self.conn = None


class _Inputs(html.parser.HTMLParser):
    def __init__(self):
        super().__init__()
        self.values = {}

    def handle_starttag(self, tag, attrs):
        attrs = dict(attrs)
        if tag == "input" and attrs.get("type") == "hidden" and attrs.get("name"):
            self.values[attrs["name"]] = attrs.get("value", "")


def hidden_inputs(page):
    """The hidden inputs of a page: the version a form was opened at (opened_version, opened_at)."""
    parser = _Inputs()
    parser.feed(page)
    return parser.values


def pk_from(location, pattern):
    found = re.search(pattern, location or "")
    return int(found.group(1)) if found else None


def pct(values, p):
    values = sorted(values)
    if not values:
        return float("nan")
    return values[max(0, min(len(values) - 1, round(p / 100 * (len(values) - 1))))]


def timing(label, values):
    if not values:
        return f"  {label:<30} n=   0"
    return (f"  {label:<30} n={len(values):>5}  p50 {pct(values, 50):7.1f} ms  p95 {pct(values, 95):7.1f} ms  "
            f"max {max(values):7.1f} ms  mean {statistics.fmean(values):7.1f} ms")


def run_threads(work, n, seconds=None):
    """Run work(i, stop_at) in n threads; they stop by `seconds` (monotonic deadline) at the latest."""
    stop_at = time.monotonic() + seconds if seconds else None
    threads = [threading.Thread(target=work, args=(i, stop_at), daemon=True) for i in range(n)]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=(seconds or 600) + 120)
    return [t for t in threads if t.is_alive()]


def load_average():
    try:
        return Path("/proc/loadavg").read_text().split()[0]
    except OSError:
        return "?"


# --- the records the scripts work on ---------------------------------------------------------------------------

SIGN_ACCEPTED = {"stage": "final", "min_size": "1/4", "undercut_depth": "1/64", "remarks": "load"}
SIGN_REJECTED = {"stage": "final", "min_size": "3/16", "undersize_length": "3", "remarks": "load: undersize"}

WPS_FORM = {
    "number": "", "title": "FCAW fillet, wide-flange connections", "code": "AWS D1.1:2020", "unit_system": "US",
    "basis": "prequalified", "process": "FCAW", "transfer": "", "electrode": "E71T-1C", "electrode_diameter": "0.045",
    "current": "DCEP", "amperage_min": "160", "amperage_max": "220", "voltage_min": "22", "voltage_max": "27",
    "wire_feed_min": "", "wire_feed_max": "", "travel_speed_min": "8", "travel_speed_max": "16 in/min",
    "ctwd_min": "1/2", "ctwd_max": "3/4", "work_angle": "", "travel_angle": "", "technique": "stringer",
    "passes": "both", "interpass_cleaning": "", "shielding_gas": "100% CO2", "gas_flow_min": "", "gas_flow_max": "",
    "positions": ["F", "H", "V", "OH"], "joint_types": ["fillet"], "base_metals": "ASTM A992, ASTM A572 Gr 50",
    "thickness_min": "1/4", "thickness_max": "1-1/2 in", "fillet_size_min": "3/16", "fillet_size_max": "1/2",
    "single_pass_size_max": "5/16", "preheat_min": "50 F", "interpass_max": "", "notes": "",
}


def make_users(role, n, prefix):
    """n users of the role; inspectors hold a current credential (a final visual is signed under one)."""
    from datetime import timedelta

    from django.utils import timezone

    from core.models import User
    from inspections.models import InspectorCredential

    users = [User.objects.create(username=f"{prefix}{i + 1}", first_name=prefix.title(), last_name=str(i + 1),
                                 role=role) for i in range(n)]
    if role == "inspector":
        today = timezone.localdate()
        for user in users:
            InspectorCredential.objects.create(
                inspector=user, scheme="aws_cwi", number=f"CWI LOAD-{user.pk}", issued_on=today - timedelta(days=365),
                expires_on=today + timedelta(days=730), eye_exam_on=today - timedelta(days=30))
    return users


def make_job(number, assemblies, welds_each, wps=None):
    """A job with assemblies of welds (a 1/4 in fillet, 12 in long, on 3/8 and 1/2 in plate)."""
    from core.units import parse_length as L
    from inspections.models import Assembly, Customer, Job, Weld

    customer, _ = Customer.objects.get_or_create(name="Brannock Steelworks (load)")
    job = Job.objects.create(number=number, name=f"Load {number}", customer=customer,
                             unit_system="US", criteria_key="aws-d1.1-2020-static")
    welds = []
    for a in range(assemblies):
        assembly = Assembly.objects.create(job=job, piece_mark=f"B{a + 1}", drawing=f"E-{a + 1}")
        for w in range(welds_each):
            welds.append(Weld.objects.create(assembly=assembly, mark=f"W{w + 1}", size=L("1/4 in"),
                                             length=L("12 in"), thickness1=L("3/8 in"), thickness2=L("1/2 in"),
                                             wps=wps))
    return job, welds


def make_draft_wps(number):
    from core.units import parse_length as L
    from core.units import parse_speed, parse_temperature
    from procedures.models import WPS

    return WPS.objects.create(
        number=number, title=WPS_FORM["title"], process="FCAW", electrode="E71T-1C", electrode_diameter=L("0.045 in"),
        current="DCEP", amperage_min=160, amperage_max=220, voltage_min=22, voltage_max=27,
        travel_speed_min=parse_speed("8 in/min"), travel_speed_max=parse_speed("16 in/min"), ctwd_min=L("1/2 in"),
        ctwd_max=L("3/4 in"), shielding_gas="100% CO2", positions="F, H, V, OH", joint_types="fillet",
        base_metals="ASTM A992, ASTM A572 Gr 50", thickness_min=L("1/4 in"), thickness_max=L("1-1/2 in"),
        fillet_size_min=L("3/16 in"), fillet_size_max=L("1/2 in"), single_pass_size_max=L("5/16 in"),
        preheat_min=parse_temperature("50 F"))


# --- what every script checks at the end -----------------------------------------------------------------------

def check_inspections(acknowledged):
    """Every acknowledged signing is stored, with its history row; problems in words (empty: none)."""
    from core.models import Event
    from inspections.models import Inspection

    problems = []
    stored = set(Inspection.objects.filter(pk__in=acknowledged).values_list("pk", flat=True))
    missing = set(acknowledged) - stored
    if missing:
        problems.append(f"{len(missing)} acknowledged inspections are not in the database: {sorted(missing)[:5]}")
    unrecorded = stored - set(Event.objects.filter(subject_type__model="inspection", action="created",
                                                   subject_id__in=stored).values_list("subject_id", flat=True))
    if unrecorded:
        problems.append(f"{len(unrecorded)} inspections have no history row: {sorted(unrecorded)[:5]}")
    return problems


def check_consistency():
    """The records agree with each other after whatever happened (a killed worker, a race); problems in words."""
    from django.db.models import Count

    from inspections.models import Assembly, Inspection, Weld
    from inspections.services.assemblies import _state_facts

    problems = []
    # Each rejected final inspection opened exactly one NCR; numbers are unique and consecutive per job.
    rejected = Inspection.objects.filter(stage="final", accepted=False)
    without = rejected.annotate(n=Count("ncrs")).exclude(n=1)
    if without.exists():
        problems.append(f"{without.count()} rejected final inspections without exactly one NCR")
    for job_number, numbers in _ncr_numbers().items():
        expected = [f"NCR-{job_number}-{n:03d}" for n in range(1, len(numbers) + 1)]
        if sorted(numbers) != expected:
            problems.append(f"NCR numbers of {job_number} are not 1..{len(numbers)} without gaps or repeats")
    # Each weld points at its newest inspection (and newest final one).
    for weld in Weld.objects.exclude(latest_inspection=None).only("pk", "latest_inspection", "latest_final"):
        newest = Inspection.objects.filter(weld=weld).order_by("-inspected_at", "-pk").first()
        final = Inspection.objects.filter(weld=weld, stage="final").order_by("-inspected_at", "-pk").first()
        if newest.pk != weld.latest_inspection_id or (final and final.pk != weld.latest_final_id):
            problems.append(f"weld {weld.pk} does not point at its newest inspection")
    unpointed = Weld.objects.filter(latest_inspection=None, inspections__isnull=False, revision=0).distinct()
    if unpointed.exists():
        problems.append(f"{unpointed.count()} inspected welds point at no inspection")
    # Each open assembly's state is what its welds and NCRs say.
    for assembly in Assembly.objects.exclude(state__in=["released", "scrapped"]):
        rejected_now, any_final = _state_facts(assembly.pk)
        if rejected_now != (assembly.state == "rejected"):
            problems.append(f"assembly {assembly.piece_mark} ({assembly.job_id}) is {assembly.state}, its welds say "
                            f"{'rejected' if rejected_now else 'not rejected'}")
        elif assembly.state == "in_fabrication" and any_final:
            problems.append(f"assembly {assembly.piece_mark} has a final inspection but is still in fabrication")
    return problems


def _ncr_numbers():
    from inspections.models import NCR

    found = {}
    for number, job in NCR.objects.values_list("number", "weld__assembly__job__number"):
        found.setdefault(job, []).append(number)
    return found


def report_targets(problems, server_errors, lost):
    ok = not problems and server_errors == 0 and lost == 0
    for problem in problems:
        print(f"  PROBLEM: {problem}")
    print("  targets (0 server errors, 0 lost or overwritten writes, records consistent):",
          "met" if ok else "NOT met")
    return ok
