"""The one family of refusals: every step the records do not allow raises one of these.

Both are ValidationErrors, so a form or a view shows their messages (a string, a list, or a dict of field ->
messages) beside the field or the button that asked, in the shop's words.
"""

from django.core.exceptions import ValidationError


class Refused(ValidationError):
    """A step whose precondition does not hold (wrong state, missing reason, a blocker); the messages say why."""


class RecordLocked(Refused):
    """A signed, approved, issued or released record cannot change in place; a new record supersedes it."""
