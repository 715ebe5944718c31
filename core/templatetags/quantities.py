"""Template filters that print stored quantities in a job's unit system, through core.units only, and engine text
in the trade's notation (core.notation).

{% load quantities %} {{ weld.size|length:job.unit_system }} {{ weld.required_strength|force:"US" }}
{{ finding.message|trade }}
"""

from django import template
from django.db.models import QuerySet
from django.template.defaultfilters import length as count

from core import units
from core.notation import trade as trade_text

register = template.Library()


def _shown(value, formatter, system):
    if value is None or value == "":
        return "—"
    try:
        return formatter(value, system or "US")
    except ValueError:
        return str(value)


@register.filter
def length(value, system="US"):
    """A length in the job's system (a Length, or text with its unit); a list or a queryset keeps Django's |length
    (how many), which this filter's name would otherwise hide."""
    if isinstance(value, (list, tuple, QuerySet)):
        return count(value)
    return _shown(value, units.format_length, system)


@register.filter
def long_length(value, system="US"):
    """A length along a member: 30'-0" from 2 ft on US jobs."""
    return _shown(value, units.format_length_long, system)


@register.filter
def force(value, system="US"):
    return _shown(value, units.format_force, system)


@register.filter
def temperature(value, system="US"):
    return _shown(value, units.format_temperature, system)


@register.filter
def trade(value):
    """φRn, Ω, in², ≤, × for the ASCII the engines write (core.notation.trade)."""
    return trade_text(value)
