"""Template filters that print stored quantities in a job's unit system, through core.units only.

{% load quantities %} {{ weld.size|length:job.unit_system }} {{ weld.required_strength|force:"US" }}
"""

from django import template

from core import units

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
    return _shown(value, units.format_length, system)


@register.filter
def force(value, system="US"):
    return _shown(value, units.format_force, system)


@register.filter
def temperature(value, system="US"):
    return _shown(value, units.format_temperature, system)
