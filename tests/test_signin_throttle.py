"""Sign-in throttling (django-axes, core.security): a user name and the address it is tried from are paused after
LEGWORK_LOGIN_FAILURES wrong passwords; the page says so; no password is checked while paused; a QA lead lifts
a pause, and it is logged. The suite's own sign-ins (force_login) never go through it."""

import logging
from datetime import timedelta

import pytest
from axes.models import AccessAttempt
from django.contrib.auth.backends import ModelBackend
from django.test import Client
from django.urls import reverse
from django.utils import timezone

LOGIN = "/accounts/login/"


@pytest.fixture
def qalead(make):
    user = make.make_user("qa_lead", username="hank")
    return user, make.password


def _try(password, username="hank", address="10.0.0.7", **extra):
    return Client(REMOTE_ADDR=address, **extra).post(LOGIN, {"username": username, "password": password})


def _signed_in(response):
    return response.status_code == 302 and response.url == reverse("home")


def test_the_sign_in_page_says_how_many_wrong_passwords_pause_it(client, settings):
    text = client.get(LOGIN).content.decode()
    assert f"After {settings.AXES_FAILURE_LIMIT} wrong passwords" in text and "15 minutes" in text


def test_after_the_limit_even_the_right_password_is_refused_and_the_page_says_why(qalead, settings):
    _user, password = qalead
    for _ in range(settings.AXES_FAILURE_LIMIT - 1):
        assert _try("wrong-password").status_code == 200
    assert _try("wrong-password").status_code == 429  # the last wrong one starts the pause
    response = _try(password)
    assert response.status_code == 429 and not _signed_in(response)
    assert "signing in is paused for 15 minutes" in response.content.decode()
    assert "A QA lead can lift the pause" in response.content.decode()


def test_below_the_limit_the_right_password_works_and_clears_the_count(qalead, settings):
    _user, password = qalead
    for _ in range(settings.AXES_FAILURE_LIMIT - 1):
        _try("wrong-password")
    assert _signed_in(_try(password))
    assert not AccessAttempt.objects.filter(failures_since_start__gt=0).exists()


def test_a_paused_sign_in_checks_no_password(qalead, settings, monkeypatch):
    """The cost of a guess (0.5 s of hashing in production) is not paid while paused."""
    _user, password = qalead
    for _ in range(settings.AXES_FAILURE_LIMIT):
        _try("wrong-password")
    checked = []
    real = ModelBackend.authenticate
    monkeypatch.setattr(ModelBackend, "authenticate", lambda self, *a, **k: checked.append(1) or real(self, *a, **k))
    for _ in range(5):
        assert _try(password).status_code == 429
    assert checked == []


def test_the_pause_is_by_user_name_and_address_together(qalead, make, settings):
    _user, password = qalead
    other = make.make_user("inspector", username="rosa")
    for _ in range(settings.AXES_FAILURE_LIMIT):
        _try("wrong-password", address="10.0.0.7")
    assert _try(password, address="10.0.0.7").status_code == 429
    assert _signed_in(_try(password, address="10.0.0.8"))  # the same user from another tablet
    assert _signed_in(_try(password, username="rosa", address="10.0.0.7"))  # another user from the same tablet
    assert other.username == "rosa"


def test_case_and_spaces_do_not_make_a_new_user_name_to_guess_with(qalead, settings):
    _user, password = qalead
    for name in ["hank", "HANK", " Hank ", "hAnK", "hank "][: settings.AXES_FAILURE_LIMIT]:
        _try("wrong-password", username=name)
    assert _try(password).status_code == 429


def test_the_pause_ends_by_itself_after_the_cool_off(qalead, settings):
    _user, password = qalead
    for _ in range(settings.AXES_FAILURE_LIMIT):
        _try("wrong-password")
    AccessAttempt.objects.update(attempt_time=timezone.now() - settings.AXES_COOLOFF_TIME - timedelta(seconds=1))
    assert _signed_in(_try(password))


def test_the_forwarded_address_is_not_believed_without_a_proxy(qalead, settings):
    _user, password = qalead
    assert settings.LEGWORK_BEHIND_PROXY is False
    for n in range(settings.AXES_FAILURE_LIMIT):  # a new claimed address for every guess
        _try("wrong-password", HTTP_X_FORWARDED_FOR=f"192.0.2.{n}")
    assert _try(password, HTTP_X_FORWARDED_FOR="192.0.2.200").status_code == 429


def test_behind_the_proxy_the_address_it_appended_counts(qalead, settings):
    _user, password = qalead
    settings.LEGWORK_BEHIND_PROXY = True
    for _ in range(settings.AXES_FAILURE_LIMIT):  # the client's own claim comes first; the proxy appends the truth
        _try("wrong-password", address="127.0.0.1", HTTP_X_FORWARDED_FOR="192.0.2.1, 203.0.113.9")
    assert _try(password, address="127.0.0.1", HTTP_X_FORWARDED_FOR="203.0.113.9").status_code == 429
    assert _signed_in(_try(password, address="127.0.0.1", HTTP_X_FORWARDED_FOR="203.0.113.10"))


def test_a_qa_lead_sees_and_lifts_a_pause_and_it_is_logged(qalead, make, settings, client_as, caplog):
    _user, password = qalead
    for _ in range(settings.AXES_FAILURE_LIMIT):
        _try("wrong-password")
    page = client_as("qa_lead").get(reverse("lockouts")).content.decode()
    assert "hank" in page and "10.0.0.7" in page and "Lift the pause" in page
    attempt = AccessAttempt.objects.get()
    with caplog.at_level(logging.WARNING, logger="legwork.security"):
        response = client_as("qa_lead").post(reverse("lockouts"), {"attempt": attempt.pk})
    assert response.status_code == 302
    assert any("lifted" in r.getMessage() and "hank" in r.getMessage() for r in caplog.records)
    assert _signed_in(_try(password))


@pytest.mark.parametrize("role", ["welding_engineer", "inspector", "viewer"])
def test_only_a_qa_lead_lifts_a_pause(role, make, client_as):
    attempt = make.make_signin_pause(username="hank")
    assert client_as(role).post(reverse("lockouts"), {"attempt": attempt.pk}).status_code == 403
    assert AccessAttempt.objects.filter(pk=attempt.pk).exists()


def test_a_pause_is_logged_when_it_starts(qalead, settings, caplog):
    with caplog.at_level(logging.WARNING):
        for _ in range(settings.AXES_FAILURE_LIMIT + 1):
            _try("wrong-password")
    assert any("paused" in r.getMessage().lower() or "locked" in r.getMessage().lower() for r in caplog.records)


def test_force_login_does_not_count(users, client, settings):
    for _ in range(settings.AXES_FAILURE_LIMIT * 2):
        client.force_login(users["inspector"])
    assert client.get(reverse("home")).status_code == 200
    assert not AccessAttempt.objects.exists()


def test_an_address_is_read_only_when_it_is_one(rf, settings):
    from core.security import client_ip

    assert client_ip(rf.get("/", REMOTE_ADDR="10.0.0.7")) == "10.0.0.7"
    assert client_ip(rf.get("/", REMOTE_ADDR="")) is None
    settings.LEGWORK_BEHIND_PROXY = True
    assert client_ip(rf.get("/", REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR="1.2.3.4, not-an-address")) is None
    assert client_ip(rf.get("/", REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR=" 2001:db8::1 ")) == "2001:db8::1"
