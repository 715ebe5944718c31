"""Request guards and response headers that hold for every page, in one place (legwork/settings.py MIDDLEWARE).

- RequestLimits, before anything reads the body: a body larger than LEGWORK_MAX_REQUEST_BYTES is refused with
  413 unread (Django would otherwise spool a 50 MB upload to disk before a form refused it); NUL characters are
  taken out of the query string (no search or filter can hold one, and PostgreSQL refuses one in a query with a
  server error), so every list filter reads text it can search for.
- FaultPages turns a database that cannot be reached, or a file that cannot be stored, into a 503 page that
  says so (core.faults); core.views.server_error does the same for failures in other middleware.
- PrivacyHeaders: `Cache-Control: no-store` on everything Legwork itself answers (pages, photos, PDFs; static
  files are served by WhiteNoise before this), so a shared tablet's browser keeps no copy of a signed-in page
  after sign-out; and a Permissions-Policy that lets the page use the camera and nothing else.
- acting_user: every record saved while answering a request is attributed to the signed-in user in its history
  (core.history.actor).
"""

from django.conf import settings
from django.http import QueryDict
from django.urls import reverse

from core import faults, history


class RequestLimits:
    def __init__(self, get_response):
        self.get_response = get_response

    def __call__(self, request):
        try:
            length = int(request.META.get("CONTENT_LENGTH") or 0)
        except ValueError:
            length = 0  # Django reads an unreadable length as no body
        limit = settings.LEGWORK_MAX_REQUEST_BYTES
        if request.path == reverse("inspections:document_check"):
            limit = max(limit, settings.LEGWORK_CHECK_MAX_BYTES)  # a packet PDF, hashed as it arrives, never stored
        if length > limit:
            faults.log.warning("Refused a %s-byte body to %s (limit %s)", length, request.path, limit)
            response = faults.error_page(
                413, "Too large to send",
                f"What was sent is {length / 1048576:.1f} MB; Legwork accepts at most {limit / 1048576:.0f} MB in "
                "one go, so it was not read.",
                "Take the photo at a lower resolution, or split the file, and send it again.")
            response["Connection"] = "close"  # the unread body is not waited for
            return response
        query = request.META.get("QUERY_STRING", "")
        if "%00" in query or "\x00" in query:
            cleaned = QueryDict(mutable=True)
            for key, values in request.GET.lists():
                cleaned.setlist(key.replace("\x00", ""), [value.replace("\x00", "") for value in values])
            cleaned._mutable = False
            request.GET = cleaned
        return self.get_response(request)


class FaultPages:
    def __init__(self, get_response):
        self.get_response = get_response

    def __call__(self, request):
        return self.get_response(request)

    def process_exception(self, request, exception):
        return faults.page_for(exception)


class PrivacyHeaders:
    def __init__(self, get_response):
        self.get_response = get_response

    def __call__(self, request):
        response = self.get_response(request)
        response["Cache-Control"] = "no-store"
        response.headers.setdefault("Permissions-Policy", settings.LEGWORK_PERMISSIONS_POLICY)
        return response


def acting_user(get_response):
    """Attribute every record saved while answering the request to the signed-in user."""

    def middleware(request):
        with history.acting(lambda: request.user if request.user.is_authenticated else None):
            return get_response(request)

    return middleware
