"""{% capacity_summary weld=weld %} / inspection=... / ncr=...: the fillet weld capacity card for a record.

One line in a detail template, no change to its view: {% load strength_tags %}{% capacity_summary ncr=ncr %}.
The figures come from inspections.services.capacity (engine: inspections.strength).
"""

from django import template

from inspections.services.capacity import capacity_context

register = template.Library()


@register.inclusion_tag("inspections/partials/capacity_summary.html")
def capacity_summary(weld=None, inspection=None, ncr=None, method="LRFD"):
    return capacity_context(weld=weld, inspection=inspection, ncr=ncr, method=method)
