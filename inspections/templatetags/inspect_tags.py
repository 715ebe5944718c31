"""Template filters for the tablet pages: a weld's size and length in its job's words, a weld's status in the shop's
words, a finding's heading from the table of observations."""

from django import template
from django.db.models import QuerySet
from django.template.defaultfilters import length as count

from core.units import Length, format_length
from inspections import observations, wording

register = template.Library()

STATUS = {
    "not_inspected": ("Not inspected", "lw-st-none"),
    "in_process": ("In process", "lw-st-progress"),
    "accepted": ("Accepted", "lw-st-pass"),
    "use_as_is": ("Accepted as is (NCR)", "lw-st-pass"),
    "rejected": ("Rejected", "lw-st-fail"),
    "ncr": ("Open NCR", "lw-st-fail"),
}


@register.filter
def length(value, system="US"):
    """3/16" on a US job, 4.76 mm on an SI job; empty for no value. A list, a string or a queryset keeps
    Django's meaning of |length (how many), which this filter's name would otherwise hide."""
    if isinstance(value, (list, tuple, str, QuerySet)):
        return count(value)
    if not isinstance(value, Length):
        return ""
    return format_length(value, system)


@register.filter
def run_length(value, system="US"):
    """A length along a weld or member: 30'-0" from 2 ft on a US job (core.units.format_length_long)."""
    if not isinstance(value, Length):
        return ""
    return wording.run_length(value, system)


@register.filter
def weld_size(weld):
    """The specified size as the job writes it: 5/16", or on ISO jobs a4 z6 (inspections.wording)."""
    return wording.weld_size(weld)


@register.filter
def status_label(word):
    return STATUS.get(word, (word, ""))[0]


@register.filter
def status_class(word):
    return STATUS.get(word, ("", "lw-st-none"))[1]


@register.filter
def criterion_label(name):
    return observations.criterion_label(name)


@register.filter
def criteria_words(key):
    """A criteria set key as a person names the set (inspections.models.jobs.criteria_words)."""
    from inspections.models.jobs import criteria_words as words

    return words(key)
