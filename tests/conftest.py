"""Shared fixtures: one user per role, clients signed in as each, and the invented demo shop."""

import pytest

from legwork.roles import Role

ROLES = [r.value for r in Role]


@pytest.fixture
def make(db):
    """A Factory for records of the invented demo scenario (see tests/factory.py)."""
    from tests.factory import Factory  # imported here so engine tests run without Django set up

    return Factory()


@pytest.fixture
def users(db, make):
    return {role: make.make_user(role) for role in ROLES}


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
