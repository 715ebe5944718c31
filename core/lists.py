"""Every list page, one mechanism: a django-filter FilterSet, sort (`o`), 50 rows a page, and "CSV of this list"
(the same URL with `format=csv`) streaming exactly the filtered rows. See docs/decisions/2026-12-05-list-pages.md.

A view builds its FilterSet over a queryset already passed through core.visibility.visible() and hands it to
`list_page()`. Bad or unknown parameters never raise: a value the form refuses is shown as that field's error
and the filter is left out (django-filter drops a field missing from cleaned_data); an unreadable page number
gives the first or last page. The page costs a fixed number of queries (the count, the rows, whatever the
template's select boxes read) whatever the size of the data, and the CSV reads `values_list(...).iterator()`
in chunks, so its memory does not grow with the rows.

The contract's parameters (job, state, welder, wps, process, <field>_after/_before, o, page, format) are the
filter names below; pages add their own.
"""

from __future__ import annotations

import csv
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass

import django_filters
from django import forms
from django.core.exceptions import ValidationError
from django.core.paginator import Paginator
from django.db import connections
from django.db.models import QuerySet
from django.forms.utils import flatatt
from django.http import StreamingHttpResponse
from django.shortcuts import render
from django.utils.functional import cached_property
from django.utils.html import format_html
from django.utils.safestring import mark_safe

PAGE_SIZE = 50  # the contract: 50 rows a page
CSV_CHUNK = 2000  # rows fetched at a time by the CSV stream


@dataclass(frozen=True)
class Column:
    """One CSV column: its header, the values_list() path it reads, and an optional formatter of the value
    (called with the value alone; keep it cheap: it runs once per cell)."""

    header: str
    path: str
    format: Callable | None = None


class DateInput(forms.DateInput):
    input_type = "date"


YEARS = (1900, 2999)  # a date outside these is a typing slip; at 0001 or 9999 the time zone shift overflows


class _DateRangeField(django_filters.fields.DateRangeField):
    def compress(self, data_list):
        for day in data_list or ():
            if day and not YEARS[0] <= day.year <= YEARS[1]:
                raise ValidationError(f"Give a date between {YEARS[0]} and {YEARS[1]}.")
        return super().compress(data_list)


class _DateRangeFilter(django_filters.DateFromToRangeFilter):
    field_class = _DateRangeField


def date_range(field_name, label):
    """`<name>_after` / `<name>_before` (YYYY-MM-DD) on a date or datetime field: DateFromToRangeFilter."""
    return _DateRangeFilter(
        field_name=field_name, label=label,
        widget=django_filters.widgets.DateRangeWidget(attrs={"type": "date", "class": "form-control"}))


class FastSelect(forms.Select):
    """A <select> written by string joins rather than a template per option: a filter of 500 procedures or 200
    welders renders in a millisecond instead of tens (Django's Select renders each option through a template)."""

    def render(self, name, value, attrs=None, renderer=None):
        attrs = self.build_attrs(self.attrs, attrs)
        chosen = {str(v) for v in (value if isinstance(value, (list, tuple)) else [value]) if v is not None}
        options = "".join(
            format_html('<option value="{}"{}>{}</option>', key, " selected" if str(key) in chosen else "", label)
            for key, label in ((str(k.value if hasattr(k, "value") else k), text) for k, text in self.choices))
        return format_html('<select name="{}"{}>{}</select>', name, flatatt(attrs), mark_safe(options))


class ListFilterSet(django_filters.FilterSet):
    """Base of every list page's FilterSet: Bootstrap classes on the widgets, nothing required, selects written
    fast (FastSelect)."""

    def __init__(self, data=None, *args, **kwargs):
        super().__init__(data, *args, **kwargs)
        for field in self.form.fields.values():
            field.required = False
            if type(field.widget) is forms.Select:
                field.widget = FastSelect(attrs=field.widget.attrs, choices=field.widget.choices)
            widget = field.widget
            widgets = getattr(widget, "widgets", [widget])
            for w in widgets:
                css = "form-select" if isinstance(w, forms.Select) else "form-control"
                w.attrs.setdefault("class", css)


def sort_by(fields):
    """The `o` parameter: sort by these (field, parameter name) pairs, `-name` the other way round."""
    return django_filters.OrderingFilter(fields=fields, label="Sort", empty_label="As listed")


class _Echo:
    """A file-like object whose write() hands back what it is given: csv.writer then yields lines."""

    def write(self, value):
        return value


def csv_lines(header: Iterable[str], rows: Iterable[Iterable]) -> Iterator[str]:
    """CSV text, one line at a time (header first)."""
    writer = csv.writer(_Echo())
    yield writer.writerow(list(header))
    for row in rows:
        yield writer.writerow(row)


def stream_csv(lines: Iterator[str], filename: str) -> StreamingHttpResponse:
    response = StreamingHttpResponse(lines, content_type="text/csv; charset=utf-8")
    response["Content-Disposition"] = f'attachment; filename="{filename}"'
    return response


def csv_rows(queryset, columns: list[Column]) -> Iterator[list]:
    """The columns of each row, read with values_list() in chunks (never model objects)."""
    formats = [c.format for c in columns]
    rows = queryset.values_list(*[c.path for c in columns]).iterator(chunk_size=CSV_CHUNK)
    for row in rows:
        yield ["" if value is None else (fmt(value) if fmt else value) for fmt, value in zip(formats, row, strict=True)]


def csv_response(queryset, columns: list[Column], filename: str) -> StreamingHttpResponse:
    return stream_csv(csv_lines([c.header for c in columns], csv_rows(queryset, columns)), filename)


def query_without(request, *names) -> str:
    """The request's query string without these parameters (pagination and sort links keep the rest)."""
    query = request.GET.copy()
    for name in names:
        query.pop(name, None)
    return query.urlencode()


def wants_csv(request) -> bool:
    return request.GET.get("format") == "csv"


COUNT_CAP = 5000  # a list counts its rows up to here ("5,000+"): counting 300,000 joined rows costs more than the page


def _grouped(query) -> bool:
    """A query whose rows are not one per id (DISTINCT, GROUP BY, UNION) or already cut: read as it is."""
    return bool(query.distinct or query.group_by or query.combinator or query.is_sliced)


class CappedPaginator(Paginator):
    """Counts a queryset only up to COUNT_CAP + 1 rows (COUNT over a LIMIT subquery), so the count stays as cheap as
    the page however many rows match; past the cap the pager says "5,000+" and the CSV gives every row."""

    @cached_property
    def count(self):
        if isinstance(self.object_list, QuerySet):
            # Unordered: the rows counted need no order, and an ORDER BY inside the LIMIT made the database sort
            # every matching row first (a viewer's 100,000 inspections: 90 ms for the count alone).
            # Only ids: a row's per-row figures (an assembly's weld and NCR counts) are not worked out to count it.
            rows = self.object_list.order_by()
            return (rows if _grouped(rows.query) else rows.values("pk"))[:COUNT_CAP + 1].count()
        return len(self.object_list)

    @property
    def capped(self):
        return self.count > COUNT_CAP

    def page(self, number):
        """The page's rows chosen by their ids first (a narrow sort), then read whole: in one query, `WHERE id IN
        (SELECT id ... ORDER BY ... LIMIT 50)`. Sorting every matching row with all the columns the page selects
        (a viewer's 100,000 inspections with their welds and WPSs) cost three times the sort of ids alone. SQLite
        only: PostgreSQL plans the top 50 itself, and given the ids it hash-joined every row again (54 -> 245 ms)."""
        page = super().page(number)
        rows, query = page.object_list, self.object_list.query if isinstance(self.object_list, QuerySet) else None
        if query is not None and not _grouped(query) and connections[self.object_list.db].vendor == "sqlite":
            chosen = self.object_list.values("pk")[rows.query.low_mark:rows.query.high_mark]
            page.object_list = self.object_list.filter(pk__in=chosen)
        return page


def paginate(request, rows, per_page=PAGE_SIZE):
    """A page of a queryset or list; a page number that cannot be read gives the first or last page."""
    return CappedPaginator(rows, per_page).get_page(request.GET.get("page"))


def list_page(request, filterset, template, context=None, *, columns=None, filename="list.csv", rows=None):
    """Render a list page (or its CSV): the filterset's rows, sorted by its `o`, paginated, with the filter form.

    rows: a function of the filtered queryset giving what to paginate instead (a list of derived rows), for a page
    whose filter needs something the database does not hold (the welder list's continuity states)."""
    queryset = filterset.qs
    if columns is not None and wants_csv(request):
        return csv_response(queryset, columns, filename)
    page = paginate(request, rows(queryset) if rows else queryset)
    context = {
        **(context or {}), "filter": filterset, "page": page, "query": query_without(request, "page"),
        "sort_query": query_without(request, "page", "o"), "sort": request.GET.get("o", ""),
        "csv_link": columns is not None, "csv_query": query_without(request, "page", "format"),
    }
    return render(request, template, context)
