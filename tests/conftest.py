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
