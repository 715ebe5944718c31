"""State changes of jobs, assemblies and NCRs: each a named function that checks, locks, saves and records why.

Views call these and never set a state themselves. A refused step raises a StepRefused (a ValidationError)
whose messages a view shows next to the button that asked for it.
"""

from django.core.exceptions import ValidationError


class StepRefused(ValidationError):
    """A state change whose precondition does not hold; the messages say why, in the shop's words."""


__all__ = ["StepRefused"]
