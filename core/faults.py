"""When something outside Legwork fails: say what happened, in words, on a page that needs nothing to render.

The database unreachable (or busy beyond its timeout) is a 503 "try again"; a file that cannot be stored (disk
full, folder not writable) is a 503 that says nothing was saved; anything else is a 500. Pages carry no internal
detail (no exception text, no path); the log carries it all. error_page() renders templates/<status>.html from
templates/error_base.html without the request, so it touches no session, user or query, and works with the
database down.
"""

import errno
import logging

from django.db import InterfaceError, OperationalError
from django.http import HttpResponse
from django.template.loader import render_to_string

from core.roles import CAUTIONS
from core.storage import ObjectStoreError

log = logging.getLogger("legwork.faults")

STORAGE_ERRNOS = {errno.ENOSPC, errno.EDQUOT, errno.EROFS, errno.EACCES, errno.EPERM, errno.ENOTDIR, errno.EIO}


def database_unreachable(exc) -> bool:
    return isinstance(exc, (OperationalError, InterfaceError))


def storage_problem(exc) -> str | None:
    """What a person is told when storing a file failed with this error; None when it is not such an error."""
    if not isinstance(exc, OSError) or exc.errno not in STORAGE_ERRNOS:
        return None
    if isinstance(exc, ObjectStoreError):
        return "The file store (object storage) did not take the file."
    if exc.errno in (errno.ENOSPC, errno.EDQUOT):
        return "The server's disk is full."
    if exc.errno == errno.EIO:
        return "The server's disk reported an error."
    return "The server may not write to its file folder."


def storage_message(exc, what: str) -> str | None:
    """The words beside a form field when storing its file failed (logged), or None for another error."""
    reason = storage_problem(exc)
    if reason is None:
        return None
    log.error("File storage failed while saving %s: %s", what, exc, exc_info=exc)
    return (f"{reason} The {what} was not stored and nothing was saved; what you typed is kept below. Try again "
            "later, and tell the person who looks after the server.")


def error_page(status: int, title: str, message: str, advice: str = "", *, retry_after: int | None = None,
               back: str = "/", back_label: str = "") -> HttpResponse:
    template = f"{status}.html" if status in (400, 500, 503) else "error_base.html"
    body = render_to_string(template, {"status": status, "title": title, "message": message, "advice": advice,
                                       "back": back, "back_label": back_label, "cautions": CAUTIONS})
    response = HttpResponse(body, status=status)
    if retry_after is not None:
        response["Retry-After"] = str(retry_after)
    return response


def database_page() -> HttpResponse:
    return error_page(503, "The records are out of reach",
                      "Legwork cannot reach its database just now, so nothing you sent was saved.",
                      "Try again in a minute (go back: what you typed is still in the form). If it goes on, tell "
                      "the person who looks after the server.", retry_after=60)


def storage_page(reason: str) -> HttpResponse:
    return error_page(503, "The file could not be stored",
                      f"{reason} Nothing was saved: no record and no part of a file.",
                      "Try again later, and tell the person who looks after the server.", retry_after=300)


def server_error_page() -> HttpResponse:
    return error_page(500, "Something went wrong",
                      "Legwork could not finish this request; it changed nothing that a page did not confirm.",
                      "Try again. If it happens again, tell the person who looks after the server the time it "
                      "happened.")


def bad_request_page() -> HttpResponse:
    return error_page(400, "That request could not be read",
                      "What the browser sent was malformed or too large, so it was not read.",
                      "Go back, reload the page and try again.")


def page_for(exc) -> HttpResponse | None:
    """A 503 page for a database or storage failure (logged with its traceback), else None."""
    if database_unreachable(exc):
        log.error("Database unreachable: %s", exc, exc_info=exc)
        return database_page()
    reason = storage_problem(exc)
    if reason is not None:
        log.error("File storage failed: %s", exc, exc_info=exc)
        return storage_page(reason)
    return None
