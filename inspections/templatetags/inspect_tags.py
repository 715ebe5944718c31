"""Template filters for the tablet pages: a length in the job's system, a weld's status in the shop's words."""

from django import template

from core.units import Length, format_length

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
    """3/16" on a US job, 4.76 mm on an SI job; empty for no value."""
    if not isinstance(value, Length):
        return ""
    return format_length(value, system)


@register.filter
def status_label(word):
    return STATUS.get(word, (word, ""))[0]


@register.filter
def status_class(word):
    return STATUS.get(word, ("", "lw-st-none"))[1]


CRITERIA = {
    "undersize": "Undersize", "undercut": "Undercut", "porosity": "Porosity", "convexity": "Convexity",
    "crack": "Cracks", "fusion": "Fusion", "crater": "Craters", "overlap": "Overlap", "arc_strike": "Arc strikes",
    "throat": "Throat", "surface_pore": "Surface pores", "crater_pipe": "End crater pipe", "fit_up": "Fit-up",
}


@register.filter
def criterion_label(name):
    return CRITERIA.get(name, str(name).replace("_", " ").capitalize())
