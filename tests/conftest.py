"""Shared fixtures: one user per role, clients signed in as each, and the invented demo shop.

Also the one Hypothesis profile of the suite: no test may depend on how fast the machine is, so there is no
deadline and no "too slow" health check, and a fixed example budget. CI loads the `ci` profile
(HYPOTHESIS_PROFILE=ci), which also derandomizes, so a run is repeatable from its commit alone.
"""

import os

import pytest
from hypothesis import HealthCheck, settings

from core.roles import Role

settings.register_profile("legwork", deadline=None, max_examples=100,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("ci", parent=settings.get_profile("legwork"), derandomize=True, database=None,
                          print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "legwork"))


ROLES = [r.value for r in Role]


@pytest.fixture
def make(db):
    """A Factory for records of the invented demo scenario (see tests/factory.py)."""
    from tests.factory import Factory  # imported here so engine tests run without Django set up

    return Factory()


@pytest.fixture
def users(db, make):
    """One user per role; the viewer is the account of the factory's customer (it sees that customer's jobs)."""
    made = {role: make.make_user(role) for role in ROLES}
    make.make_customer(viewers=[made["viewer"]])
    return made


@pytest.fixture
def client_as(client, users):
    """client_as("qa_lead") -> a test client signed in with that role (None: anonymous)."""

    def sign_in(role):
        client.logout()
        if role is not None:
            client.force_login(users[role])
        return client

    return sign_in


@pytest.fixture(autouse=True)
def _fast_passwords(request):
    """Hashing demo passwords with the production hasher costs seconds per test; tests need no strength."""
    if request.config.pluginmanager.hasplugin("django"):  # engine tests may run without Django
        request.getfixturevalue("settings").PASSWORD_HASHERS = ["django.contrib.auth.hashers.MD5PasswordHasher"]


@pytest.fixture(autouse=True)
def _media_in_a_temp_folder(request, tmp_path_factory):
    """Photos, reports and PDFs written by tests go to a throwaway folder, never the project's var/media."""
    if request.config.pluginmanager.hasplugin("django"):
        request.getfixturevalue("settings").MEDIA_ROOT = str(tmp_path_factory.mktemp("media"))


@pytest.fixture(scope="session")
def s3_server():
    """An S3-compatible server (moto, a separate process on a loopback port) for the whole run (tests/s3server.py)."""
    from tests.s3server import S3Server

    with S3Server() as server:
        yield server


@pytest.fixture
def object_storage(settings, monkeypatch, s3_server):
    """Legwork's files in a fresh bucket of the S3 server, configured through the LEGWORK_S3_* variables as a
    deployment would; yields a helper that reads an object's bytes back with boto3 directly."""
    from uuid import uuid4

    from legwork.env import default_storage_from_env

    bucket = f"legwork-{uuid4().hex[:16]}"
    client = s3_server.client()
    client.create_bucket(Bucket=bucket)
    for name, value in s3_server.env(bucket).items():
        monkeypatch.setenv(name, value)
    settings.STORAGES = {**settings.STORAGES, "default": default_storage_from_env()}

    class Bucket:
        name = bucket
        server = s3_server
        s3 = client

        @staticmethod
        def read(key):
            return client.get_object(Bucket=bucket, Key=key)["Body"].read()

        @staticmethod
        def keys():
            return sorted(o["Key"] for o in client.list_objects_v2(Bucket=bucket).get("Contents", []))

    return Bucket
