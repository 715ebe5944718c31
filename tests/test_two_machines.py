"""benchmarks/two_machines.py end to end: two app processes (gunicorn) and a db_worker on one PostgreSQL database
and one S3-compatible store; a photo and a packet made through app A are read back through app B, byte for byte.

It needs PostgreSQL on 127.0.0.1:5432 (trust), as the PostgreSQL run of .ci/run has; without it, it is skipped.
Some 20 s: one inspected assembly instead of the demo shop (--records small).
"""

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
pytestmark = [pytest.mark.s3, pytest.mark.pdf]


def _postgresql_answers() -> bool:
    try:
        import psycopg

        with psycopg.connect("postgresql://postgres@127.0.0.1:5432/postgres", connect_timeout=3):
            return True
    except Exception:  # noqa: BLE001 - any failure to connect means "not here"
        return False


@pytest.mark.skipif(not _postgresql_answers(), reason="needs PostgreSQL on 127.0.0.1:5432 (trust)")
def test_a_photo_and_a_packet_cross_from_one_app_machine_to_the_other():
    done = subprocess.run([sys.executable, str(ROOT / "benchmarks" / "two_machines.py"), "--records", "small",
                           "--database", f"legwork_two_machines_test_{os.getpid()}"],
                          cwd=ROOT, capture_output=True, text=True, timeout=240)
    assert done.returncode == 0 and "PASS" in done.stdout, done.stdout + done.stderr[-3000:]
    for step in ("photo read back through app B", "packet downloaded through app B",
                 "no file written to any machine's local media folder", "verify_records"):
        assert step in done.stdout
