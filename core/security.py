"""Sign-in throttling (django-axes, configured in legwork/settings.py) as Legwork words and counts it.

A user name and the address it is tried from are counted together: after LEGWORK_LOGIN_FAILURES wrong passwords
the pair is paused for LEGWORK_LOGIN_LOCKOUT_MINUTES, no password is checked meanwhile (so a paused guesser costs
the server no hashing), and the sign-in page says so. A QA lead lifts a pause from the "Sign-in pauses" page
(core.views.lockouts); an administrator can also delete the attempt in the admin. Failures, pauses and lifts
are logged (logger "legwork.security", and axes' own).
"""

import ipaddress
import logging

from django.conf import settings
from django.contrib.auth.forms import AuthenticationForm
from django.shortcuts import render
from django.utils import timezone

log = logging.getLogger("legwork.security")


def client_ip(request) -> str | None:
    """The address a request came from: the socket's, or behind our own proxy (LEGWORK_BEHIND_PROXY) the last
    address in X-Forwarded-For, which that proxy appended. Never an address the client could choose; None when
    there is no readable address (a request made inside the process, such as a test's force_login)."""
    address = request.META.get("REMOTE_ADDR") if request is not None else None
    if request is not None and settings.LEGWORK_BEHIND_PROXY:
        forwarded = [part.strip() for part in request.META.get("HTTP_X_FORWARDED_FOR", "").split(",") if part.strip()]
        if forwarded:
            address = forwarded[-1]
    try:
        return str(ipaddress.ip_address((address or "").strip()))
    except ValueError:
        return None


def attempted_username(request, credentials) -> str:
    """The user name a sign-in tried, as the counter keys it (case and surrounding spaces do not make a new one)."""
    name = (credentials or {}).get("username")
    if name is None and request is not None:
        name = request.POST.get("username", "")
    return str(name or "").strip().casefold()[:150]


def pause_minutes() -> int:
    return int(settings.AXES_COOLOFF_TIME.total_seconds() // 60)


def throttle_note() -> str:
    return (f"After {settings.AXES_FAILURE_LIMIT} wrong passwords, signing in with that user name from this device "
            f"pauses for {pause_minutes()} minutes.")


def lockout_response(request, original_response=None, credentials=None):
    """The sign-in page again, saying why it will not sign in now (429 Too Many Requests)."""
    username = attempted_username(request, credentials)
    log.warning("Sign-in paused for user name %r from %s after %s failures", username, client_ip(request),
                settings.AXES_FAILURE_LIMIT)
    form = AuthenticationForm(request, initial={"username": username})
    return render(request, "registration/login.html", {
        "form": form, "next": request.POST.get("next", "") if request.method == "POST" else "",
        "locked": (f"Too many wrong passwords for this user name from this device: signing in is paused for "
                   f"{pause_minutes()} minutes. A QA lead can lift the pause sooner."),
        "throttle": throttle_note(),
    }, status=429)


def current_pauses():
    """Attempts that are paused now: (attempt, until), newest first."""
    from axes.models import AccessAttempt

    since = timezone.now() - settings.AXES_COOLOFF_TIME
    attempts = AccessAttempt.objects.filter(failures_since_start__gte=settings.AXES_FAILURE_LIMIT,
                                            attempt_time__gte=since).order_by("-attempt_time")
    return [(attempt, attempt.attempt_time + settings.AXES_COOLOFF_TIME) for attempt in attempts]


def lift_pause(attempt_pk: int, user) -> bool:
    """Lift one pause (the QA lead's step); logged with who lifted it. False when there was none."""
    from axes.models import AccessAttempt
    from axes.utils import reset

    attempt = AccessAttempt.objects.filter(pk=attempt_pk).first()
    if attempt is None:
        return False
    reset(ip=attempt.ip_address, username=attempt.username)
    log.warning("Sign-in pause lifted for user name %r from %s by %s", attempt.username, attempt.ip_address,
                user.get_username())
    return True
