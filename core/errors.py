"""The one family of refusals: every step the records do not allow raises one of these.

All are ValidationErrors, so a form or a view shows their messages (a string, a list, or a dict of field ->
messages) beside the field or the button that asked, in the shop's words.
"""

from django.core.exceptions import ValidationError


class Refused(ValidationError):
    """A step whose precondition does not hold (wrong state, missing reason, a blocker); the messages say why."""


class RecordLocked(Refused):
    """A signed, approved, issued or released record cannot change in place; a new record supersedes it."""


class Stale(Refused):
    """Someone saved the record after the form was opened: nothing was saved.

    `events` are the history rows written since (core.models.Event, oldest first; possibly empty when the
    change left no row), `version` the record's version now, `current` the record as stored now.
    """

    def __init__(self, message, *, events=(), version=None, current=None):
        super().__init__(message, code="stale")
        self.events = list(events)
        self.version = version
        self.current = current
