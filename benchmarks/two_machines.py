"""Two app machines, one PostgreSQL, one object store: a photo and a packet cross from one to the other.

Starts an S3-compatible server (moto, tests/s3server.py) on loopback, creates a fresh PostgreSQL database on
127.0.0.1:5432 (trust; default name legwork_two_machines), migrates it and loads the demo shop, then starts
app A and app B (gunicorn, each with its own var/ folder, so nothing is shared through a local disk) and one
`manage.py db_worker`, all sharing the database and the bucket. Through A it signs in as the demo QA lead,
attaches a photo to a signed inspection and asks for a job packet; through B, with the same session, it reads
the photo back, waits for the worker to build the packet and downloads it; each file's bytes are compared with
the SHA-256 the record holds and with the object read from the bucket with boto3. It prints each step and PASS or
FAIL (exit 0 or 1), then stops everything it started and drops the database (--keep leaves it).

    .venv/bin/python benchmarks/two_machines.py [--database NAME] [--keep] [--records demo|small]

tests/test_two_machines.py runs it with --records small (one inspected assembly instead of the demo shop) when
PostgreSQL answers on 127.0.0.1:5432.
"""

import argparse
import hashlib
import http.client
import io
import os
import re
import secrets
import shutil
import subprocess
import sys
import tempfile
import time
from http.cookies import SimpleCookie
from pathlib import Path
from urllib.parse import urlencode

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from tests.s3server import HOST, S3Server, free_port  # noqa: E402 - after the project root is importable

PG_ADMIN = f"postgresql://postgres@{HOST}:5432/postgres"
DEMO_PASSWORD = "brannock-demo"  # demo/scenario.py: the inspector attaches photos, the QA lead builds packets
PYTHON = sys.executable


def sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


class Browser:
    """One person's cookies, used against either app: the session lives in the shared database."""

    def __init__(self):
        self.cookies = {}

    def request(self, port, method, path, body=None, headers=None):
        conn = http.client.HTTPConnection(HOST, port, timeout=60)
        sent = {"Host": HOST, **(headers or {})}
        if self.cookies:
            sent["Cookie"] = "; ".join(f"{k}={v}" for k, v in self.cookies.items())
        if "csrftoken" in self.cookies and method == "POST":
            sent["X-CSRFToken"] = self.cookies["csrftoken"]
            sent["Referer"] = f"http://{HOST}:{port}/"
        conn.request(method, path, body=body, headers=sent)
        response = conn.getresponse()
        data = response.read()
        for header in response.headers.get_all("Set-Cookie") or []:
            for name, morsel in SimpleCookie(header).items():
                self.cookies[name] = morsel.value
        conn.close()
        return response.status, response.getheader("Location", ""), data, response

    def form(self, port, path, fields):
        return self.request(port, "POST", path, urlencode(fields, doseq=True),
                            {"Content-Type": "application/x-www-form-urlencoded"})

    def upload(self, port, path, fields, file_field, filename, content, content_type):
        boundary = secrets.token_hex(12)
        out = io.BytesIO()
        for name, value in fields.items():
            out.write(f'--{boundary}\r\nContent-Disposition: form-data; name="{name}"\r\n\r\n{value}\r\n'.encode())
        out.write(f'--{boundary}\r\nContent-Disposition: form-data; name="{file_field}"; filename="{filename}"\r\n'
                  f"Content-Type: {content_type}\r\n\r\n".encode())
        out.write(content)
        out.write(f"\r\n--{boundary}--\r\n".encode())
        return self.request(port, "POST", path, out.getvalue(),
                            {"Content-Type": f"multipart/form-data; boundary={boundary}"})


class Run:
    def __init__(self, database, keep, records="demo"):
        self.database, self.keep, self.records = database, keep, records
        self.folder = Path(tempfile.mkdtemp(prefix="legwork-two-machines-"))
        self.processes, self.failures = [], []
        self.bucket = "legwork-two-machines"
        self.s3 = None

    def say(self, text):
        print(text, flush=True)

    def check(self, ok, text):
        self.say(f"  [{'ok' if ok else 'FAILED'}] {text}")
        if not ok:
            self.failures.append(text)
        return ok

    # --- set-up -----------------------------------------------------------------------------------------------

    def env(self, machine):
        var = self.folder / machine
        return {**os.environ, **self.s3.env(self.bucket), "PYTHONPATH": str(ROOT),
                "DJANGO_SETTINGS_MODULE": "legwork.settings",
                "DATABASE_URL": f"postgres://postgres@{HOST}:5432/{self.database}",
                "LEGWORK_VAR_DIR": str(var), "LEGWORK_SECRET_KEY": self.secret, "LEGWORK_DEBUG": "1",
                "LEGWORK_TASKS_INLINE": "0", "LEGWORK_LOG_LEVEL": "ERROR",
                "LEGWORK_BASE_URL": f"http://{HOST}:{self.ports['A']}"}

    def manage(self, machine, *args):
        done = subprocess.run([PYTHON, "manage.py", *args], cwd=ROOT, env=self.env(machine), capture_output=True,
                              text=True, timeout=300)
        if done.returncode != 0:
            raise RuntimeError(f"manage.py {' '.join(args)} failed:\n{done.stderr[-2000:]}")
        return done.stdout

    def spawn(self, machine, command):
        log = (self.folder / f"{machine}.log").open("ab")
        process = subprocess.Popen(command, cwd=ROOT, env=self.env(machine), stdout=log, stderr=subprocess.STDOUT,
                                   start_new_session=True)
        self.processes.append((machine, process))
        return process

    def wait_for_port(self, port, process, what):
        deadline = time.monotonic() + 60
        while time.monotonic() < deadline:
            if process.poll() is not None:
                raise RuntimeError(f"{what} exited (see its log in {self.folder})")
            try:
                status, *_ = Browser().request(port, "GET", "/accounts/login/")
                if status == 200:
                    return
            except OSError:
                pass
            time.sleep(0.2)
        raise RuntimeError(f"{what} did not answer on port {port}")

    def setup(self):
        import psycopg

        self.secret = secrets.token_urlsafe(40)  # one key for every machine: sessions and CSRF cross between them
        self.ports = {"A": free_port(), "B": free_port()}
        self.s3 = S3Server(log=(self.folder / "s3.log").open("ab")).start()
        self.s3.client().create_bucket(Bucket=self.bucket)
        self.say(f"S3-compatible server (moto) on {self.s3.endpoint}, bucket {self.bucket}")
        with psycopg.connect(PG_ADMIN, autocommit=True) as admin:
            admin.execute(f'DROP DATABASE IF EXISTS "{self.database}" WITH (FORCE)')
            admin.execute(f'CREATE DATABASE "{self.database}"')
        self.say(f"PostgreSQL database {self.database} created on {HOST}:5432")
        self.manage("setup", "migrate", "--noinput", "-v0")
        if self.records == "demo":
            self.manage("setup", "load_demo")
            self.say("Migrated and loaded the demo shop")
        else:
            self.small_records()
            self.say("Migrated; made one inspected assembly, an inspector and a QA lead (tests/factory.py)")
        started = {machine: self.spawn(machine, [PYTHON, "-m", "gunicorn", "--bind", f"{HOST}:{self.ports[machine]}",
                                                 "--workers", "1", "--threads", "2", "--timeout", "60",
                                                 "--log-level", "error", "legwork.wsgi:application"])
                   for machine in ("A", "B")}
        self.spawn("worker", [PYTHON, "manage.py", "db_worker", "--no-reload", "--no-startup-delay", "--interval",
                              "0.2"])
        for machine, process in started.items():
            self.wait_for_port(self.ports[machine], process, f"app {machine}")
            self.say(f"App {machine}: gunicorn on {HOST}:{self.ports[machine]}, its own var/ folder")
        self.say("Worker: manage.py db_worker (django-tasks database backend)")

    # --- the walk -----------------------------------------------------------------------------------------------

    def django(self):
        """Django in this script's process, on the same database and bucket (it looks records up)."""
        os.environ.update(self.env("script"))
        import django

        django.setup()

    def small_records(self):
        """Instead of the demo (--records small, the test's choice: seconds, not tens of seconds)."""
        self.django()
        from tests.factory import Factory
        from tests.pages_travelers import build_assembly

        make = Factory()
        make.password = DEMO_PASSWORD
        make.make_user("qa_lead", username="qalead")
        make.make_user("inspector", username="inspector")
        build_assembly(make, welds=1)

    def walk(self):
        self.django()
        from django.urls import reverse

        from inspections.models import AssemblyState, Inspection, JobPacket, PacketState, Photo
        from tests.factory import png_bytes

        a, b = self.ports["A"], self.ports["B"]
        person = self.sign_in(a, "inspector")

        inspection = next(i for i in Inspection.objects.select_related("weld__assembly").order_by("-pk")
                          if i.is_current and i.weld.assembly.state not in (AssemblyState.RELEASED,
                                                                             AssemblyState.SCRAPPED))
        content = png_bytes((320, 240))
        status, location, *_ = person.upload(a, reverse("inspections:photo_add", args=[inspection.pk]),
                                             {"caption": "two machines"}, "image", "weld.png", content, "image/png")
        photo = Photo.objects.filter(inspection=inspection, caption="two machines").first()
        if not self.check(status == 302 and photo is not None, f"photo attached to inspection {inspection.pk} "
                                                               f"through app A (HTTP {status})"):
            return
        status, _loc, body, _r = person.request(b, "GET", reverse("inspections:photo_file", args=[photo.pk]))
        in_bucket = self.object(photo.image.name)
        self.check(status == 200 and sha(body) == photo.sha256 == sha(in_bucket),
                   f"photo read back through app B: {len(body)} bytes, SHA-256 {photo.sha256[:16]}..., the same "
                   f"bytes as s3://{self.bucket}/{photo.image.name}")

        person = self.sign_in(a, "qalead")
        job = inspection.weld.assembly.job
        assemblies = list(job.assemblies.order_by("piece_mark").values_list("pk", flat=True)[:2])
        status, location, *_ = person.form(a, reverse("inspections:packet_start", args=[job.pk]),
                                           {"assemblies": assemblies})
        packet = JobPacket.objects.filter(job=job).order_by("-pk").first()
        if not self.check(status == 302 and packet is not None,
                          f"packet for job {job.number} ({len(assemblies)} assemblies) asked for through app A"):
            return
        deadline = time.monotonic() + 120
        while packet.state not in (PacketState.DONE, PacketState.FAILED) and time.monotonic() < deadline:
            time.sleep(0.5)
            packet.refresh_from_db()
        if not self.check(packet.state == PacketState.DONE,
                          f"the worker built packet {packet.document_number}: {packet.state}"
                          + (f" ({packet.error})" if packet.error else "")):
            return
        status, _loc, body, response = person.request(b, "GET", reverse("inspections:packet_download",
                                                                        args=[packet.pk]))
        in_bucket = self.object(packet.file.name)
        self.check(status == 200 and body.startswith(b"%PDF") and sha(body) == packet.sha256 == sha(in_bucket)
                   and response.getheader("X-Content-SHA256") == packet.sha256,
                   f"packet downloaded through app B: {packet.pages} pages, {len(body)} bytes, SHA-256 "
                   f"{packet.sha256[:16]}..., the same bytes as s3://{self.bucket}/{packet.file.name}")
        local = [p for m in ("A", "B", "worker", "setup", "script")
                 for p in (self.folder / m / "media").rglob("*") if p.is_file()]
        self.check(not local, "no file written to any machine's local media folder")
        self.manage("setup", "verify_records")
        self.check(True, "manage.py verify_records: every seal and every stored file's SHA-256, read from the bucket")

    def sign_in(self, port, username):
        person = Browser()
        person.request(port, "GET", "/accounts/login/")
        status, *_ = person.form(port, "/accounts/login/", {
            "username": username, "password": DEMO_PASSWORD, "csrfmiddlewaretoken": person.cookies["csrftoken"]})
        self.check(status == 302 and "sessionid" in person.cookies, f"signed in as {username} through app A")
        return person

    def object(self, key):
        return self.s3.client().get_object(Bucket=self.bucket, Key=key)["Body"].read()

    # --- tear-down ----------------------------------------------------------------------------------------------

    def stop(self):
        import signal

        for _machine, process in reversed(self.processes):
            if process.poll() is None:
                os.killpg(process.pid, signal.SIGTERM)  # the process group this script started
        for machine, process in self.processes:
            try:
                process.wait(timeout=15)
            except subprocess.TimeoutExpired:
                os.killpg(process.pid, signal.SIGKILL)
                process.wait(timeout=15)
            self.say(f"Stopped {machine}")
        if self.s3 is not None:
            self.s3.stop()
            self.say("Stopped the S3 server")
        try:
            from django.db import connections

            connections.close_all()
        except Exception:  # noqa: BLE001 - Django may never have been set up when set-up failed
            pass
        if not self.keep:
            import psycopg

            with psycopg.connect(PG_ADMIN, autocommit=True) as admin:
                admin.execute(f'DROP DATABASE IF EXISTS "{self.database}" WITH (FORCE)')
            self.say(f"Dropped the database {self.database}")
        if self.failures:
            self.say(f"Logs kept in {self.folder}")
        else:
            shutil.rmtree(self.folder, ignore_errors=True)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--database", default="legwork_two_machines",
                        help="the PostgreSQL database to create on 127.0.0.1:5432 (dropped first if it exists)")
    parser.add_argument("--keep", action="store_true", help="leave the database in place at the end")
    parser.add_argument("--records", choices=["demo", "small"], default="demo",
                        help="load the demo shop (default), or make one inspected assembly (faster)")
    args = parser.parse_args(argv)
    if not re.fullmatch(r"[a-z_][a-z0-9_]{0,62}", args.database):
        raise SystemExit("--database: lower-case letters, digits and _ only")
    run, started = Run(args.database, args.keep, args.records), time.monotonic()
    try:
        run.setup()
        run.walk()
    except Exception as exc:  # noqa: BLE001 - any failure is reported as FAIL after everything is stopped
        run.failures.append(f"{type(exc).__name__}: {exc}")
        run.say(f"  [FAILED] {type(exc).__name__}: {exc}")
    finally:
        run.stop()
    verdict = "FAIL" if run.failures else "PASS"
    print(f"{verdict} ({time.monotonic() - started:.0f} s)", flush=True)
    return 1 if run.failures else 0


if __name__ == "__main__":
    sys.exit(main())
