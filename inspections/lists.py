"""The jobs side's lists (core.lists): jobs, assemblies, NCRs, inspections, travelers, packets; their filters,
sorts and CSV columns, named as the list contract says (job, state, welder, wps, process, <date>_after/_before,
o, page, format=csv)."""

import django_filters
from django.db import connection
from django.db.models import Exists, OuterRef, Q

from core.lists import Column, ListFilterSet, date_range, sort_by
from core.visibility import visible
from core.vocabulary import Process
from inspections.models import NCR, Assembly, AssemblyState, Inspection, InspectionStage, Job, Weld
from inspections.models.ncr import NCRState
from inspections.models.traveler import JobPacket, PacketState, Traveler
from inspections.observations import CRITERIA
from procedures.models import WPS, Welder


def _date(value):
    return value.date().isoformat() if hasattr(value, "date") else value.isoformat()


# The filters' choices read only what their labels print: 500 WPSs of 45 columns each cost more than the page.
def _jobs(request):
    rows = Job.objects.only("pk", "number", "name").order_by("number")
    return visible(request.user, rows) if request else Job.objects.none()


def _welders(request):
    rows = Welder.objects.only("pk", "stamp", "name").order_by("stamp")
    return visible(request.user, rows) if request else Welder.objects.none()


def _wpss(request):
    rows = WPS.objects.only("pk", "number", "revision").order_by("number", "-revision")
    return visible(request.user, rows) if request else WPS.objects.none()


def job_filter(path):
    return django_filters.ModelChoiceFilter(field_name=path, queryset=_jobs, empty_label="Any", label="Job")


def welder_filter(path):
    return django_filters.ModelChoiceFilter(field_name=path, queryset=_welders, empty_label="Any", label="Welder",
                                            distinct=True)


CRITERION_CHOICES = sorted(CRITERIA.items(), key=lambda item: item[1])


def failed_on(prefix, name):
    """Rows whose inspection (at `prefix`) has a finding of criterion `name` that did not pass.

    PostgreSQL asks jsonb containment; SQLite reads the findings' stored JSON text, written by
    inspections.services.inspect.findings_json with "criterion" and then "ok" as its first keys."""
    if connection.vendor == "postgresql":
        return Q(**{f"{prefix}findings__contains": [{"criterion": name, "ok": False}]})
    return Q(**{f"{prefix}findings__icontains": f'"criterion": "{name}", "ok": false'})


def criterion_filter(prefix):
    def method(queryset, _name, value):
        return queryset.filter(failed_on(prefix, value))
    return django_filters.ChoiceFilter(choices=CRITERION_CHOICES, method=method, empty_label="Any",
                                       label="Criterion failed")


# --- jobs ------------------------------------------------------------------------------------------------------

class JobFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Search", method="search", max_length=80)
    created = date_range("created_at", "Opened")
    o = sort_by((("number", "number"), ("name", "name"), ("created_at", "created")))

    class Meta:
        model = Job
        fields = []

    def search(self, queryset, name, value):
        value = value.strip()
        return queryset.filter(Q(number__icontains=value) | Q(name__icontains=value)) if value else queryset


JOB_COLUMNS = [Column("Job", "number"), Column("Name", "name"), Column("Customer", "customer__name"),
               Column("Criteria set", "criteria_key"), Column("Units", "unit_system"),
               Column("Opened", "created_at", _date)]


# --- assemblies ------------------------------------------------------------------------------------------------

def waiting_for(stage):
    """Assemblies with a weld waiting for this inspection stage (the inspector's queue, inspections.queue, asked of
    the database): fit-up, not yet welded and never inspected or sent back at fit-up; in-process, fit up and
    being welded (inspected, not yet welded or completed); final, welded with no final visual yet."""
    welds = Weld.objects.filter(assembly=OuterRef("pk"), latest_final__isnull=True)
    not_welded = Q(welded_on__isnull=True, completed_at__isnull=True)
    if stage == "fit_up":
        welds = welds.filter(not_welded, Q(latest_inspection__isnull=True)
                             | Q(latest_inspection__stage=InspectionStage.FIT_UP, latest_inspection__accepted=False))
    elif stage == "in_process":
        welds = welds.filter(not_welded, latest_inspection__isnull=False).exclude(
            latest_inspection__stage=InspectionStage.FIT_UP, latest_inspection__accepted=False)
    else:
        welds = welds.exclude(not_welded)
    return Exists(welds)


WAITING = [("fit_up", "Fit-up"), ("in_process", "In-process (being welded)"), ("final", "Final visual")]


class AssemblyFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Piece mark", field_name="piece_mark", lookup_expr="icontains",
                                  max_length=30)
    job = job_filter("job")
    state = django_filters.ChoiceFilter(choices=AssemblyState.choices, empty_label="Any")
    waiting = django_filters.ChoiceFilter(choices=WAITING, method="waiting_at", empty_label="Any",
                                          label="Waiting for")
    o = sort_by((("id", "created"), ("piece_mark", "piece_mark"),
                                              ("job__number", "job"), ("state", "state")))

    class Meta:
        model = Assembly
        fields = []

    def waiting_at(self, queryset, name, value):
        return queryset.filter(waiting_for(value), state__in=(AssemblyState.IN_FABRICATION,
                                                              AssemblyState.AWAITING_INSPECTION,
                                                              AssemblyState.REJECTED))


ASSEMBLY_COLUMNS = [Column("Job", "job__number"), Column("Piece mark", "piece_mark"), Column("Drawing", "drawing"),
                    Column("Revision", "drawing_revision"), Column("Quantity", "quantity"),
                    Column("State", "state"), Column("Released", "released_at", _date)]


# --- NCRs ------------------------------------------------------------------------------------------------------

class NCRFilter(ListFilterSet):
    state = django_filters.ChoiceFilter(choices=NCRState.choices, empty_label="Any")
    job = job_filter("weld__assembly__job")
    welder = welder_filter("weld__welders")
    criterion = criterion_filter("inspection__")
    opened = date_range("raised_at", "Opened")
    o = sort_by((("raised_at", "opened"), ("number", "number")))

    class Meta:
        model = NCR
        fields = []


NCR_COLUMNS = [Column("NCR", "number"), Column("Job", "weld__assembly__job__number"),
               Column("Piece mark", "weld__assembly__piece_mark"), Column("Weld", "weld__mark"),
               Column("State", "state"), Column("Disposition", "disposition"), Column("Opened", "raised_at", _date),
               Column("Closed", "closed_at", _date)]


# --- inspections ----------------------------------------------------------------------------------------------

class InspectionFilter(ListFilterSet):
    job = job_filter("weld__assembly__job")
    welder = welder_filter("weld__welders")
    wps = django_filters.ModelChoiceFilter(field_name="weld__wps", queryset=_wpss, empty_label="Any", label="WPS")
    process = django_filters.ChoiceFilter(field_name="weld__wps__process", choices=Process.choices,
                                          empty_label="Any", label="Process")
    stage = django_filters.ChoiceFilter(choices=InspectionStage.choices, empty_label="Any")
    verdict = django_filters.ChoiceFilter(choices=[("accepted", "Accepted"), ("rejected", "Rejected")],
                                          method="with_verdict", empty_label="Any", label="Verdict")
    criterion = criterion_filter("")
    signed = date_range("inspected_at", "Signed")
    o = sort_by((("inspected_at", "signed"),))

    class Meta:
        model = Inspection
        fields = []

    def with_verdict(self, queryset, name, value):
        # IN, not =: on SQLite Django writes `accepted = False` as `NOT accepted`, which no index serves, and the
        # list then walked 300,000 inspections newest first to find 2,000 rejected (0.5 s); `IN (0)` uses the
        # verdict index (migration 0004) and takes a millisecond.
        return queryset.filter(accepted__in=[value == "accepted"])


INSPECTION_COLUMNS = [Column("Signed", "inspected_at", lambda d: d.isoformat(timespec="minutes")),
                      Column("Job", "weld__assembly__job__number"), Column("Piece mark", "weld__assembly__piece_mark"),
                      Column("Weld", "weld__mark"), Column("WPS", "weld__wps__number"), Column("Stage", "stage"),
                      Column("Accepted", "accepted", lambda a: "yes" if a else "no"),
                      Column("Inspector", "inspector__username")]


# --- travelers and packets ------------------------------------------------------------------------------------

class TravelerFilter(ListFilterSet):
    job = job_filter("assembly__job")
    issued = date_range("generated_at", "Issued")
    o = sort_by((("generated_at", "issued"), ("document_number", "number")))

    class Meta:
        model = Traveler
        fields = []


TRAVELER_COLUMNS = [Column("Document", "document_number"), Column("Job", "assembly__job__number"),
                    Column("Piece mark", "assembly__piece_mark"), Column("Issued", "generated_at", _date),
                    Column("SHA-256", "sha256")]


class PacketFilter(ListFilterSet):
    job = job_filter("job")
    state = django_filters.ChoiceFilter(choices=PacketState.choices, empty_label="Any")
    requested = date_range("requested_at", "Requested")
    o = sort_by((("requested_at", "requested"), ("document_number", "number")))

    class Meta:
        model = JobPacket
        fields = []


PACKET_COLUMNS = [Column("Document", "document_number"), Column("Job", "job__number"), Column("State", "state"),
                  Column("Pages", "pages"), Column("Requested", "requested_at", _date),
                  Column("Finished", "finished_at", _date), Column("SHA-256", "sha256")]
