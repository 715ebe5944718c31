"""{% sort_header "number" "WPS" %}: a column header that sorts the list by it (again: the other way round),
keeping the filters (core.lists puts sort_query and sort in the context)."""

from django import template
from django.utils.html import format_html

register = template.Library()


@register.simple_tag(takes_context=True)
def sort_header(context, column, label):
    current = context.get("sort", "")
    ascending = current == column
    target = f"-{column}" if ascending else column
    mark = " ▲" if ascending else (" ▼" if current == f"-{column}" else "")
    query = context.get("sort_query", "")
    return format_html('<a class="link-body-emphasis" href="?{}o={}">{}{}</a>',
                       f"{query}&" if query else "", target, label, mark)
