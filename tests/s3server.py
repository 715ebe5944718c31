"""An S3-compatible server for tests and scripts: moto's server, run as a separate process on a loopback port.

Not a mock inside the test process: boto3 in Legwork talks HTTP to it exactly as to a real object store, and a
test reads the bytes back with its own boto3 client. Nothing leaves the machine.
"""

import socket
import subprocess
import sys
import time
import urllib.request

HOST = "127.0.0.1"
ACCESS_KEY = "legwork-test-access"  # moto accepts any credentials; these only prove none leak into messages
SECRET_KEY = "legwork-test-secret-do-not-print"
REGION = "us-east-1"


def free_port() -> int:
    with socket.socket() as s:
        s.bind((HOST, 0))
        return s.getsockname()[1]


class S3Server:
    """Start with start(), stop with stop() (or use as a context manager); `endpoint` is its URL."""

    def __init__(self, log=None):
        self.port = free_port()
        self.endpoint = f"http://{HOST}:{self.port}"
        self.process = None
        self.log = log

    def start(self, timeout=30):
        self.process = subprocess.Popen(
            [sys.executable, "-m", "moto.server", "-H", HOST, "-p", str(self.port)],
            stdout=self.log or subprocess.DEVNULL, stderr=subprocess.STDOUT)
        deadline = time.monotonic() + timeout
        while time.monotonic() < deadline:
            if self.process.poll() is not None:
                raise RuntimeError(f"the S3 server (moto) exited with status {self.process.returncode}")
            try:
                with urllib.request.urlopen(f"{self.endpoint}/moto-api/", timeout=1):
                    return self
            except OSError:
                time.sleep(0.1)
        self.stop()
        raise RuntimeError(f"the S3 server (moto) did not answer on {self.endpoint} within {timeout} s")

    def stop(self):
        if self.process is not None and self.process.poll() is None:
            self.process.terminate()
            try:
                self.process.wait(timeout=10)
            except subprocess.TimeoutExpired:
                self.process.kill()
                self.process.wait(timeout=10)
        self.process = None

    def __enter__(self):
        return self.start()

    def __exit__(self, *exc):
        self.stop()
        return False

    def client(self):
        """A boto3 client of its own, to read back what Legwork stored."""
        import boto3

        return boto3.client("s3", endpoint_url=self.endpoint, region_name=REGION, aws_access_key_id=ACCESS_KEY,
                            aws_secret_access_key=SECRET_KEY)

    def env(self, bucket: str) -> dict:
        """The LEGWORK_* variables that point Legwork's storage at this server and bucket."""
        return {"LEGWORK_STORAGE": "s3", "LEGWORK_S3_ENDPOINT_URL": self.endpoint, "LEGWORK_S3_BUCKET": bucket,
                "LEGWORK_S3_REGION": REGION, "LEGWORK_S3_ACCESS_KEY_ID": ACCESS_KEY,
                "LEGWORK_S3_SECRET_ACCESS_KEY": SECRET_KEY}
