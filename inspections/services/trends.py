"""Quality trends: the figures behind the trends page, each counted by the database in one aggregate query.

    gather(user, filters) -> dict[key, Trend]       every chart's figures (fixed number of queries)

How each figure is counted (docs/decisions/2026-12-05-morning-page.md):
- An inspection counts when it is a current (not superseded) final visual inspection signed in the date range; a
  correction replaces the inspection it supersedes. Fit-up and in-process inspections are not counted.
- Reject rate per week = rejected / inspected, per week starting Monday, by job, by welder (a weld made by two
  welders counts for both) and by WPS (the weld's WPS).
- Causes of rejection (Pareto): each failed finding's criterion (inspections.observations.CRITERIA words) on the
  rejected inspections; an inspection rejected for two causes counts once under each.
- First-pass acceptance per job: of the welds whose first current final inspection falls in the range, the share
  accepted at that first inspection.
- Repairs per 100 welds per job: repairs welded in the range (WeldRepair.welded_on) per 100 welds welded in the
  range (Weld.welded_on).
- Welder continuity: the days each welder used the process (continuity entries) and the six months each use keeps
  a qualification in effect (procedures.qualification.continuity_until); not the full qualification status, which
  the welder's page gives.
Filters: date range, job, process (the weld's process, else its WPS's). A viewer's figures are its customers' only
(core.visibility).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta

from django.db import connection
from django.db.models import Count, OuterRef, Q, Subquery
from django.db.models.functions import TruncWeek
from django.utils import timezone

from core import charts
from core.visibility import visible
from inspections.models import Inspection, InspectionStage, Weld, WeldRepair
from inspections.observations import criterion_label
from procedures import qualification
from procedures.models import Welder
from procedures.models.welders import ContinuityEntry

SERIES_SHOWN = 5  # lines per reject-rate chart: the busiest, by inspections in the range (the table has them all)
DEFAULT_WEEKS = 26


@dataclass
class Filters:
    start: date
    end: date
    job: object = None  # a visible Job, or None
    process: str = ""


@dataclass
class Trend:
    key: str
    title: str
    headers: list[str]
    rows: list[list] = field(default_factory=list)
    svg: str = ""
    note: str = ""


def default_filters(today: date | None = None) -> Filters:
    today = today or timezone.localdate()
    return Filters(start=today - timedelta(weeks=DEFAULT_WEEKS), end=today)


def _bounds(filters: Filters):
    tz = timezone.get_current_timezone()
    return (timezone.make_aware(datetime.combine(filters.start, datetime.min.time()), tz),
            timezone.make_aware(datetime.combine(filters.end + timedelta(days=1), datetime.min.time()), tz))


def _process_q(filters: Filters, prefix: str) -> Q:
    if not filters.process:
        return Q()
    return Q(**{f"{prefix}process": filters.process}) | Q(**{f"{prefix}process": "", f"{prefix}wps__process":
                                                            filters.process})


def final_inspections(user, filters: Filters):
    """The inspections every figure counts: current final visual inspections signed in the range, filtered."""
    low, high = _bounds(filters)
    qs = (visible(user, Inspection.objects.current())
          .filter(stage=InspectionStage.FINAL, inspected_at__gte=low, inspected_at__lt=high)
          .filter(_process_q(filters, "weld__")))
    if filters.job is not None:
        qs = qs.filter(weld__assembly__job=filters.job)
    return qs


def _weeks(filters: Filters) -> list[date]:
    first = filters.start - timedelta(days=filters.start.weekday())
    return [first + timedelta(weeks=n) for n in range((filters.end - first).days // 7 + 1)]


def _percent(part, whole):
    return round(100.0 * part / whole, 1) if whole else None


def reject_rate(user, filters: Filters, key: str, group: str, name_of, title: str) -> Trend:
    """Rejected / inspected per week for each value of `group` (one query)."""
    rows = (final_inspections(user, filters).annotate(week=TruncWeek("inspected_at"))
            .values("week", *group).annotate(n=Count("pk", distinct=True),
                                             rejected=Count("pk", distinct=True, filter=Q(accepted=False)))
            .order_by("week"))
    weeks = _weeks(filters)
    cells, volume = {}, {}
    for row in rows:
        name = name_of(row)
        week = row["week"].date() if isinstance(row["week"], datetime) else row["week"]
        cells[(name, week)] = (row["rejected"], row["n"])
        volume[name] = volume.get(name, 0) + row["n"]
    names = sorted(volume, key=lambda n: (-volume[n], n))
    trend = Trend(key, title, ["week", "group", "inspected", "rejected", "reject rate %"])
    for week in weeks:
        for name in names:
            if (name, week) in cells:
                rejected, n = cells[(name, week)]
                trend.rows.append([week.isoformat(), name, n, rejected, _percent(rejected, n)])
    series = [charts.Series(name, tuple(_percent(*cells[(name, w)]) if (name, w) in cells else None for w in weeks))
              for name in names[:SERIES_SHOWN]]
    trend.svg = charts.line_chart(title, [f"{w:%d %b}" for w in weeks], series)
    if len(names) > SERIES_SHOWN:
        trend.note = f"The chart draws the {SERIES_SHOWN} busiest of {len(names)}; the table lists them all."
    return trend


def causes(user, filters: Filters) -> Trend:
    """Rejected inspections counted by the criterion of each failed finding, largest first (one query)."""
    inner, params = (final_inspections(user, filters).filter(accepted=False).values("pk").query
                     .sql_with_params())
    if connection.vendor == "postgresql":
        sql = ("SELECT f->>'criterion' AS c, COUNT(DISTINCT i.id) FROM inspections_inspection i "
               "CROSS JOIN LATERAL jsonb_array_elements(i.findings) f "
               f"WHERE i.id IN ({inner}) AND (f->>'ok')::boolean = false GROUP BY c")
    else:
        sql = ("SELECT json_extract(f.value, '$.criterion') AS c, COUNT(DISTINCT i.id) "
               "FROM inspections_inspection i, json_each(i.findings) f "
               f"WHERE i.id IN ({inner}) AND json_extract(f.value, '$.ok') = 0 GROUP BY c")
    with connection.cursor() as cursor:
        cursor.execute(sql, params)
        counted = sorted(((criterion_label(c), n) for c, n in cursor.fetchall()), key=lambda r: (-r[1], r[0]))
    total = sum(n for _c, n in counted)
    trend = Trend("causes", "Causes of rejection (Pareto)", ["cause", "rejected inspections", "cumulative %"])
    running = 0
    for cause, n in counted:
        running += n
        trend.rows.append([cause, n, _percent(running, total)])
    trend.svg = charts.bar_chart(trend.title, counted, cumulative=True)
    trend.note = "An inspection rejected for two causes counts under each."
    return trend


def first_pass(user, filters: Filters) -> Trend:
    """Per job: welds whose first current final inspection is in the range, and how many passed it (one query)."""
    first = (Inspection.objects.current().filter(weld=OuterRef("weld"), stage=InspectionStage.FINAL)
             .order_by("inspected_at", "pk").values("pk")[:1])
    rows = (final_inspections(user, filters).filter(pk=Subquery(first))
            .values("weld__assembly__job__number").annotate(n=Count("pk"), ok=Count("pk", filter=Q(accepted=True)))
            .order_by("weld__assembly__job__number"))
    trend = Trend("first_pass", "First-pass acceptance per job", ["job", "welds first inspected", "accepted first time",
                                                                   "first-pass %"])
    for row in rows:
        trend.rows.append([row["weld__assembly__job__number"], row["n"], row["ok"], _percent(row["ok"], row["n"])])
    trend.svg = charts.bar_chart(trend.title, [(r[0], r[3]) for r in trend.rows], unit="%", x_max=100)
    return trend


def repairs(user, filters: Filters) -> Trend:
    """Per job: repairs welded in the range per 100 welds welded in the range (two queries)."""
    welds = visible(user, Weld.objects.filter(welded_on__range=(filters.start, filters.end)))
    # A repair is seen with its weld (core.visibility knows welds, not repairs).
    fixes = WeldRepair.objects.filter(welded_on__range=(filters.start, filters.end),
                                      weld__in=visible(user, Weld.objects.all()).values("pk"))
    welds = welds.filter(_process_q(filters, ""))
    fixes = fixes.filter(Q(wps__process=filters.process) if filters.process else Q())
    if filters.job is not None:
        welds, fixes = welds.filter(assembly__job=filters.job), fixes.filter(weld__assembly__job=filters.job)
    made = dict(welds.values_list("assembly__job__number").annotate(n=Count("pk")).order_by())
    fixed = dict(fixes.values_list("weld__assembly__job__number").annotate(n=Count("pk")).order_by())
    trend = Trend("repairs", "Repairs per 100 welds per job", ["job", "welds welded", "repairs welded",
                                                                "repairs per 100 welds"])
    for job in sorted(set(made) | set(fixed)):
        n, r = made.get(job, 0), fixed.get(job, 0)
        trend.rows.append([job, n, r, round(100.0 * r / n, 1) if n else None])
    trend.svg = charts.bar_chart(trend.title, [(row[0], row[3]) for row in trend.rows])
    return trend


def continuity(user, filters: Filters) -> Trend:
    """Each active welder's days of use in the range and the continuity they keep (one query for the days, one
    for the welders)."""
    welders = {w.pk: w for w in visible(user, Welder.objects.filter(active=True)).order_by("stamp")}
    # Uses up to six months before the range still keep continuity inside it.
    since = filters.start - timedelta(days=186)
    entries = ContinuityEntry.objects.filter(welder_id__in=list(welders), date__range=(since, filters.end))
    if filters.process:
        entries = entries.filter(process=filters.process)
    days: dict[int, list[date]] = {}
    for welder_id, day in entries.values_list("welder_id", "date").distinct().order_by("welder_id", "date"):
        days.setdefault(welder_id, []).append(day)
    trend = Trend("continuity", "Welder continuity", ["welder", "in continuity from", "to", "days welded in range"])
    rows = []
    for pk, welder in welders.items():
        spans = []
        for day in days.get(pk, []):
            until = qualification.continuity_until(day)
            if spans and day <= spans[-1][1] + timedelta(days=1):
                spans[-1] = (spans[-1][0], max(spans[-1][1], until))
            else:
                spans.append((day, until))
        spans = [(max(a, filters.start), min(b, filters.end)) for a, b in spans if b >= filters.start]
        marks = tuple(d for d in days.get(pk, []) if d >= filters.start)
        rows.append(charts.TimelineRow(welder.stamp, tuple(spans), marks))
        for a, b in spans or [(None, None)]:
            trend.rows.append([welder.stamp, a.isoformat() if a else "", b.isoformat() if b else "", len(marks)])
    trend.svg = charts.timeline("Welder continuity: days welded and the six months each keeps", filters.start,
                                filters.end, rows)
    trend.note = ("Bands: six months after each day of use (AWS D1.1/D1.1M:2020 clause 6.2.3.1, clause number from "
                  "memory; ISO 9606-1:2012 9.2). Ticks: days welded. The welder's page gives the full status.")
    return trend


def _job_name(row):
    return row["weld__assembly__job__number"]


def _welder_name(row):
    return row["weld__welders__stamp"] or "no welder recorded"


def _wps_name(row):
    if row["weld__wps__number"] is None:
        return "no WPS named"
    return f"{row['weld__wps__number']} rev {row['weld__wps__revision']}"


CHARTS = ("by_job", "by_welder", "by_wps", "causes", "first_pass", "repairs", "continuity")


def gather(user, filters: Filters, only: str | None = None) -> dict[str, Trend]:
    """Every chart's figures (or only one, for its CSV): a fixed number of queries whatever the data."""
    makers = {
        "by_job": lambda: reject_rate(user, filters, "by_job", ("weld__assembly__job__number",), _job_name,
                                      "Reject rate per week by job"),
        "by_welder": lambda: reject_rate(user, filters, "by_welder", ("weld__welders__stamp",), _welder_name,
                                         "Reject rate per week by welder"),
        "by_wps": lambda: reject_rate(user, filters, "by_wps", ("weld__wps__number", "weld__wps__revision"),
                                      _wps_name, "Reject rate per week by WPS"),
        "causes": lambda: causes(user, filters),
        "first_pass": lambda: first_pass(user, filters),
        "repairs": lambda: repairs(user, filters),
        "continuity": lambda: continuity(user, filters),
    }
    return {key: makers[key]() for key in CHARTS if only in (None, key)}
