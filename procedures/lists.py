"""The procedure pages' lists (core.lists): WPSs, PQRs, welders; their filters, sorts and CSV columns."""

import django_filters
from django.db.models import Q

from core.lists import Column, ListFilterSet, sort_by
from core.vocabulary import Process
from procedures.eligibility import State
from procedures.models import PQR, WPS, Welder
from procedures.models.wps import WPSState


def _search(fields):
    def search(queryset, name, value):
        value = value.strip()
        if not value:
            return queryset
        query = Q()
        for field in fields:
            query |= Q(**{f"{field}__icontains": value})
        return queryset.filter(query)
    return search


class WPSFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Search", method=_search(("number", "title", "electrode")), max_length=80)
    state = django_filters.ChoiceFilter(choices=WPSState.choices, empty_label="Any")
    process = django_filters.ChoiceFilter(choices=Process.choices, empty_label="Any")
    electrode = django_filters.CharFilter(lookup_expr="iexact", max_length=40)
    base_metal = django_filters.CharFilter(field_name="base_metals", lookup_expr="icontains", max_length=80,
                                           label="Base metal")
    o = sort_by((("number", "number"), ("process", "process"), ("state", "state"),
                                              ("approved_at", "approved")))

    class Meta:
        model = WPS
        fields = []


WPS_COLUMNS = [Column("WPS", "number"), Column("Revision", "revision"), Column("Title", "title"),
               Column("Process", "process"), Column("Electrode", "electrode"), Column("Positions", "positions"),
               Column("Basis", "basis"), Column("State", "state"),
               Column("Approved", "approved_at", lambda d: d.date().isoformat())]


class PQRFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Search", method=_search(("number", "electrode", "base_metal")),
                                  max_length=80)
    process = django_filters.ChoiceFilter(choices=Process.choices, empty_label="Any")
    o = sort_by((("number", "number"), ("test_date", "tested"), ("process", "process")))

    class Meta:
        model = PQR
        fields = []


PQR_COLUMNS = [Column("PQR", "number"), Column("Code", "code"), Column("Tested", "test_date"),
               Column("Process", "process"), Column("Electrode", "electrode"), Column("Position", "position"),
               Column("Base metal", "base_metal")]

# continuity=: the contract's words for the welder states (lapsing = within eligibility.WARN_DAYS days)
CONTINUITY = {"current": State.QUALIFIED, "lapsing": State.LAPSING, "lapsed": State.LAPSED}


class WelderFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Search", method=_search(("stamp", "name")), max_length=80)
    continuity = django_filters.ChoiceFilter(
        choices=[("current", "In continuity"), ("lapsing", "Lapses within 30 days"), ("lapsed", "Lapsed")],
        method="keep", empty_label="Any", label="Continuity")
    process = django_filters.ChoiceFilter(choices=Process.choices, empty_label="Any",
                                          method="with_process", label="Process qualified")
    active = django_filters.ChoiceFilter(choices=[("1", "Active"), ("0", "Inactive")], empty_label="All",
                                         method="on_the_list", label="On the list")
    o = sort_by((("stamp", "stamp"), ("name", "name")))

    class Meta:
        model = Welder
        fields = []

    def keep(self, queryset, name, value):
        return queryset  # judged per welder from the continuity runs (procedures.views.welders.welder_list)

    def with_process(self, queryset, name, value):
        return queryset.filter(qualifications__process=value).distinct()

    def on_the_list(self, queryset, name, value):
        return queryset.filter(active=value == "1")


WELDER_COLUMNS = [Column("Stamp", "stamp"), Column("Name", "name"), Column("Employer", "employer"),
                  Column("Active", "active", lambda a: "yes" if a else "no")]
