"""The start page each role lands on, and the error pages (400, 403, 404, 500 or 503, and a refused CSRF token).

400, 500 and 503 render without the request (core.faults): they must work when the session or the database
does not. No page shows an exception's text, a path or a setting.
"""

import sys

from django.contrib import messages
from django.contrib.auth.views import LoginView
from django.core.exceptions import PermissionDenied
from django.shortcuts import redirect, render
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_safe

from core import faults, security
from core.inputs import parse_id
from core.roles import role_required
from inspections.services import today as morning


class SignIn(LoginView):
    """Django's sign-in page, saying how many wrong passwords pause it (core.security)."""

    def get_context_data(self, **kwargs):
        return {**super().get_context_data(**kwargs), "throttle": security.throttle_note()}


@role_required("signin.unlock")
@require_http_methods(["GET", "POST"])
def lockouts(request):
    """Sign-in pauses now in force, and the QA lead's button to lift one."""
    if request.method == "POST":
        pk = parse_id(request.POST.get("attempt"))
        if pk is not None and security.lift_pause(pk, request.user):
            messages.success(request, "Pause lifted: that user name can sign in from that address again.")
        else:
            messages.info(request, "That pause had already ended.")
        return redirect("lockouts")
    return render(request, "registration/lockouts.html", {"pauses": security.current_pauses(),
                                                          "throttle": security.throttle_note()})


@require_safe
def home(request):
    """Each role's morning page: what needs action today (inspections.services.today)."""
    today = timezone.localdate()
    return render(request, "home.html", {"sections": morning.for_user(request.user, today), "today": today})


def bad_request(request, exception=None):
    return faults.bad_request_page()


def forbidden(request, exception=None):
    # Legwork's own refusals (core.roles, the views) say what the role may not do; nothing else is shown.
    reason = str(exception) if isinstance(exception, PermissionDenied) and exception.args else ""
    return render(request, "403.html", {"reason": reason}, status=403)


def csrf_failure(request, reason=""):
    faults.log.warning("CSRF refused on %s: %s", request.path, reason)
    return render(request, "403.html", {
        "reason": "This form had expired or was not sent from this page. Go back, reload the page and send it "
                  "again."}, status=403)


def not_found(request, exception=None):
    return render(request, "404.html", status=404)


def server_error(request):
    """A failure outside the views (the session's database read, say) arrives here: the same words as
    core.middleware.FaultPages gives a view's."""
    return faults.page_for(sys.exc_info()[1]) or faults.server_error_page()
