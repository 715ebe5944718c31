"""Each role's morning page: what needs action today, every item a link to the filtered list or the record.

    for_user(user, today=None) -> list[Section]

inspector      the inspector's queue (inspections.queue) by job: welds waiting for final visual, fit-up and
               re-inspection after repair, overdue and oldest first; the assemblies waiting longest
welding eng.   procedure drafts (those the QA lead returned, with the reason); welds whose WPS does not apply
QA lead        procedures waiting for approval; open NCRs by age with the oldest; assemblies waiting for release,
               ready or blocked (with the first blocker); welders whose qualification lapses within 30 days or has
               lapsed; inspectors whose credential lapses within 30 days or has lapsed, and gauges whose
               calibration falls due within 30 days or has (the registers of inspections.services.trace)
viewer         its jobs' progress (core.visibility: its customers' jobs only)

Every figure is a database aggregate (Count, Min) over the visible rows, in a fixed number of queries whatever
the number of records (tests/test_today.py pins the counts per role). Four questions need rules written in Python
and so run there, each over a bounded set loaded in a fixed number of queries: the inspector's queue over the open
welds (inspections.queue), the release chain of the assemblies awaiting inspection (chain.inspection_blockers,
then chain.check_assemblies), whether the WPS of each weld not yet finally inspected applies (chain.wps_check),
and each active welder's qualification status (procedures.eligibility.welder_statuses).
The list links carry the GET parameters of the list-filter contract (docs/decisions/2026-12-05-morning-page.md).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date, datetime, timedelta
from urllib.parse import urlencode

from django.contrib.auth import get_user_model
from django.db.models import Count, OuterRef, Q, Subquery
from django.urls import reverse
from django.utils import timezone

from core.models import Event
from core.roles import Role
from core.visibility import sees_everything, visible
from inspections.models import NCR, Assembly, AssemblyState, Job, Weld
from inspections.models.jobs import CLOSED_STATES
from inspections.models.ncr import NCRState
from procedures import eligibility
from procedures.models import WPS, Welder
from procedures.models.wps import WPSState

# Open NCRs are counted in these age bands (days since raised): common practice, no source.
NCR_AGE_BANDS = ((0, 7), (8, 30), (31, None))

SHOWN = 8  # the longest list of single records a section shows; the rest is behind its "all" link

def list_url(name: str, **params) -> str:
    """The address of a list page with its filter parameters (the list-filter contract), empty ones left out."""
    path = reverse(name)
    query = urlencode([(k, v) for k, v in params.items() if v not in (None, "")])
    return f"{path}?{query}" if query else path


# --- what the page shows -------------------------------------------------------------------------------------------

@dataclass
class Item:
    """One line: words, a link, an optional figure, how long it has waited, whether it is overdue, a note."""

    text: str
    url: str
    count: int | None = None
    since: date | None = None
    days: int | None = None
    overdue: bool = False
    note: str = ""
    note_url: str = ""
    word: str = "overdue"  # said beside an item marked overdue (a lapsed welder is marked, not "overdue")


@dataclass
class Section:
    key: str
    title: str
    items: list[Item] = field(default_factory=list)
    empty: str = "Nothing waiting."
    total: int | None = None  # the figure in the heading
    all_url: str = ""  # the whole filtered list
    help: str = ""


def for_user(user, today: date | None = None) -> list[Section]:
    today = today or timezone.localdate()
    role = getattr(user, "role", None)
    if role == Role.INSPECTOR:
        return inspector(user, today)
    if role == Role.WELDING_ENGINEER:
        return engineer(user, today)
    if role == Role.QA_LEAD or (user.is_superuser and sees_everything(user)):
        return qa_lead(user, today)
    return viewer(user, today)


# --- inspector ---------------------------------------------------------------------------------------------------

def _open_welds(user):
    return visible(user, Weld.objects.exclude(assembly__state__in=CLOSED_STATES))


def inspector(user, today) -> list[Section]:
    """The inspector's queue (inspections.queue: its stages, and its rule for overdue) summed up by job, each stage
    oldest and overdue first, and the assemblies waiting longest (the queue reads the open welds in two queries)."""
    from inspections import queue

    now = timezone.now()
    queues = queue.waiting(now)
    by_stage = {key: [] for key, _title in queue.STAGES}
    waiting = []
    for job_queue in queues:
        job = job_queue.job
        for stage in job_queue.stages:
            # A delayed final visual (steels that wait 48 h) counts from when it becomes possible: not yet, no age.
            dated = [w.since for w in stage.assemblies if w.since is not None and w.not_before is None]
            since = timezone.localdate(min(dated)) if dated else None
            if stage.key == "repair":
                url = list_url("inspections:ncr_list", job=job.pk, state=NCRState.DISPOSITIONED, o="opened")
            else:
                url = list_url("inspections:assembly_list", job=job.pk, waiting=stage.key, o="created")
            late = stage.overdue
            by_stage[stage.key].append(Item(
                f"{job.number} {job.name}", url, count=sum(len(w.welds) for w in stage.assemblies), since=since,
                days=(today - since).days if since else None, overdue=bool(late),
                note=f"{late} assembl{'y' if late == 1 else 'ies'} overdue" if late else ""))
            waiting += [(w, stage, job) for w in stage.assemblies]
    for items in by_stage.values():
        items.sort(key=lambda i: (not i.overdue, i.since is None, i.since or today, i.text))
    waiting.sort(key=lambda t: (not t[0].overdue, t[0].since is None, t[0].since or now, t[0].assembly.piece_mark))
    oldest = []
    for w, stage, job in waiting[:SHOWN]:
        since = timezone.localdate(w.since) if w.since and w.not_before is None else None
        ahead = f"not before {timezone.localtime(w.not_before):%Y-%m-%d %H:%M}" if w.not_before else ""
        oldest.append(Item(f"{w.assembly.piece_mark} ({job.number}), {stage.title.lower()}: {w.marks}",
                           reverse("inspections:inspect_assembly", args=[w.assembly.pk]), since=since,
                           days=(today - since).days if since else None, overdue=w.overdue, note=ahead))
    rule = (f"Overdue: waiting longer than {queue.due_days()} days since the weld was completed, or since the "
            "repair was dispositioned (LEGWORK_INSPECTION_DUE_DAYS; common practice, no source).")
    titles = dict(queue.STAGES)
    return [
        Section("final", f"Welds waiting for {titles['final'].lower()} inspection, by job", by_stage["final"],
                total=sum(i.count for i in by_stage["final"]),
                all_url=list_url("inspections:assembly_list", waiting="final", o="created"), help=rule),
        Section("assemblies", "Assemblies waiting longest", oldest, total=len(waiting),
                all_url=reverse("inspections:inspect_queue")),
        Section("fit_up", "Welds waiting for fit-up inspection, by job", by_stage["fit_up"],
                total=sum(i.count for i in by_stage["fit_up"]),
                all_url=list_url("inspections:assembly_list", waiting="fit_up", o="created")),
        Section("repair", "Repairs waiting for re-inspection, by job", by_stage["repair"],
                total=sum(i.count for i in by_stage["repair"]),
                all_url=list_url("inspections:ncr_list", state=NCRState.DISPOSITIONED, o="opened"),
                empty="No repair waits for re-inspection."),
    ]


# --- welding engineer ------------------------------------------------------------------------------------------

def _last_event(model, field_name):
    """A subquery: one field of the latest history row of each record of the model (core.models.Event)."""
    from django.contrib.contenttypes.models import ContentType

    kind = ContentType.objects.get_for_model(model)  # cached by Django after its first use
    return Subquery(Event.objects.filter(subject_type=kind, subject_id=OuterRef("pk"))
                    .order_by("-at", "-pk").values(field_name)[:1])


def engineer(user, today) -> list[Section]:
    drafts = list(visible(user, WPS.objects.filter(state=WPSState.DRAFT))
                  .annotate(last_from=_last_event(WPS, "from_state"), last_reason=_last_event(WPS, "reason"),
                            last_at=_last_event(WPS, "at"))
                  .order_by("created_at", "pk").only("pk", "number", "revision", "title", "created_at"))
    returned = [w for w in drafts if w.last_from == WPSState.SUBMITTED]
    fresh = [w for w in drafts if w.last_from != WPSState.SUBMITTED]
    returned_items = [Item(f"{w} {w.title}", w.get_absolute_url(), since=_day(w.last_at),
                           note=f"Returned: {w.last_reason}") for w in returned]
    draft_items = [Item(f"{w} {w.title}", w.get_absolute_url(), since=_day(w.created_at)) for w in fresh[:SHOWN]]
    not_applying = wps_not_applying(user, today)
    return [
        Section("returned", "Procedures returned by the QA lead", returned_items, total=len(returned),
                all_url=list_url("procedures:wps_list", state=WPSState.DRAFT), empty="No procedure came back."),
        Section("drafts", "Procedure drafts", draft_items, total=len(fresh),
                all_url=list_url("procedures:wps_list", state=WPSState.DRAFT), empty="No draft."),
        Section("wps", "Welds whose WPS does not apply", not_applying[:SHOWN], total=len(not_applying),
                all_url=list_url("inspections:assembly_list", waiting="final"),
                empty="Every weld waiting for inspection names a WPS that applies.",
                help="Welds not yet finally inspected, on open assemblies: the WPS is missing, not in force on the "
                     "weld date, or does not cover the weld (its code, process, joint, position, thickness or size)."),
    ]


def _day(moment):
    return timezone.localdate(moment) if isinstance(moment, datetime) else moment


def wps_not_applying(user, today) -> list[Item]:
    """Welds of open assemblies not yet finally inspected whose WPS link fails (chain.wps_check): two queries."""
    from inspections.services import chain

    welds = list(_open_welds(user).filter(latest_final__isnull=True)
                 .select_related("wps", "assembly__job__client_criteria").order_by("assembly__job__number",
                                                                                  "assembly__piece_mark", "mark"))
    chain.prime_successors([w.wps for w in welds])
    items = []
    for weld in welds:
        check = chain.wps_check(weld, weld.wps, weld.assembly.job, weld.welded_on or today)
        if not check.ok:
            problem = check.errors[0] if check.errors else "no WPS is named"
            items.append(Item(f"Weld {weld.mark} of {weld.assembly.piece_mark} ({weld.assembly.job.number})",
                              reverse("inspections:weld_detail", args=[weld.pk]), note=problem))
    return items


# --- QA lead -----------------------------------------------------------------------------------------------------

def qa_lead(user, today) -> list[Section]:
    return [_approvals(user), _ncrs(user, today), *_release(user), _welders(user, today), _registers(today),
            _consumables()]


def _approvals(user) -> Section:
    waiting = list(visible(user, WPS.objects.filter(state=WPSState.SUBMITTED))
                   .annotate(sent=_last_event(WPS, "at")).order_by("sent", "pk")
                   .only("pk", "number", "revision", "title"))
    items = [Item(f"{w} {w.title}", w.get_absolute_url(), since=_day(w.sent)) for w in waiting[:SHOWN]]
    return Section("approvals", "Procedures waiting for approval", items, total=len(waiting),
                   all_url=list_url("procedures:wps_list", state=WPSState.SUBMITTED))


def ncr_ages(user, today) -> dict:
    """NCRs awaiting disposition counted by age band, and those dispositioned and not yet closed, in one aggregate
    query: {"open": n, "dispositioned": n, (low, high): n}. Age: calendar days since raised."""
    now = timezone.make_aware(datetime.combine(today + timedelta(days=1), datetime.min.time()))
    is_open = Q(state=NCRState.OPEN)
    bands = {}
    for low, high in NCR_AGE_BANDS:
        q = is_open & Q(raised_at__lt=now - timedelta(days=low))
        if high is not None:
            q &= Q(raised_at__gte=now - timedelta(days=high + 1))
        bands[(low, high)] = Count("pk", filter=q)
    found = visible(user, NCR.objects.exclude(state=NCRState.CLOSED)).aggregate(
        open=Count("pk", filter=is_open), dispositioned=Count("pk", filter=Q(state=NCRState.DISPOSITIONED)),
        **{f"b{n}": agg for n, agg in enumerate(bands.values())})
    return {"open": found["open"], "dispositioned": found["dispositioned"],
            **{band: found[f"b{n}"] for n, band in enumerate(bands)}}


def _ncrs(user, today) -> Section:
    ages = ncr_ages(user, today)
    items = []
    for low, high in NCR_AGE_BANDS:
        words = f"{low} to {high} days old" if high is not None else f"more than {low - 1} days old"
        after = (today - timedelta(days=high)).isoformat() if high is not None else ""
        before = (today - timedelta(days=low)).isoformat()
        items.append(Item(f"Awaiting disposition, {words}",
                          list_url("inspections:ncr_list", state=NCRState.OPEN, opened_after=after,
                                   opened_before=before, o="opened"),
                          count=ages[(low, high)], overdue=high is None and ages[(low, high)] > 0))
    oldest = (visible(user, NCR.objects.filter(state=NCRState.OPEN))
              .select_related("weld__assembly__job").order_by("raised_at", "pk").first())
    if oldest is not None:
        raised = timezone.localdate(oldest.raised_at)
        items.append(Item(f"Oldest: {oldest.number}, weld {oldest.weld.mark} of {oldest.weld.assembly.piece_mark} "
                          f"({oldest.weld.assembly.job.number})", oldest.get_absolute_url(), since=raised,
                          days=(today - raised).days))
    items.append(Item("Dispositioned, waiting for repair or re-inspection",
                      list_url("inspections:ncr_list", state=NCRState.DISPOSITIONED, o="opened"),
                      count=ages["dispositioned"]))
    return Section("ncrs", "NCRs awaiting disposition, by age", items, total=ages["open"],
                   all_url=list_url("inspections:ncr_list", state=NCRState.OPEN, o="opened"),
                   help="Age in calendar days since the NCR was raised; more than 30 days is marked.")


def _release(user) -> list[Section]:
    """Assemblies awaiting inspection: ready for release (the chain holds for every weld) or blocked, with the first
    blocker and how many. The inspection link is read from the database for all of them at once
    (chain.inspection_blockers); the whole chain, engines and all, runs only for those it does not already stop
    (chain.check_assemblies): fixed queries either way, and the engines' time spent only where release is near."""
    from inspections.services import chain

    assemblies = list(visible(user, Assembly.objects.filter(state=AssemblyState.AWAITING_INSPECTION))
                      .select_related("job__client_criteria").order_by("job__number", "piece_mark"))
    stopped = chain.inspection_blockers(assemblies)
    candidates = [a for a in assemblies if not stopped[a.pk]]
    chains = chain.check_assemblies(candidates)
    ready, blocked = [], []
    for assembly in assemblies:
        found = stopped[assembly.pk] or chain.blockers_of(chains[assembly.pk])
        name = f"{assembly.piece_mark} ({assembly.job.number})"
        if not found:
            ready.append(Item(name, assembly.get_absolute_url()))
        else:
            more = f" (and {len(found) - 1} more)" if len(found) > 1 else ""
            blocked.append(Item(name, assembly.get_absolute_url(), note=f"{found[0]}{more}",
                                note_url=found[0].url))
    state = AssemblyState.AWAITING_INSPECTION
    return [
        Section("ready", "Assemblies ready for release", ready[:SHOWN], total=len(ready),
                all_url=list_url("inspections:assembly_list", state=state), empty="None ready."),
        Section("blocked", "Assemblies awaiting inspection, blocked", blocked[:SHOWN], total=len(blocked),
                all_url=list_url("inspections:assembly_list", state=state), empty="None blocked.",
                help="Welds not inspected or with an NCR open come first; then the procedure, welder and hold-point "
                     "links. The assembly page lists every blocker."),
    ]


def active_welders(user):
    """The visible active welders with their test records and continuity runs (procedures/continuity.py): three
    queries, one row per welder, test and run, whatever the length of their production history."""
    return visible(user, Welder.objects.filter(active=True)).prefetch_related("qualifications", "continuity_runs")


def _welders(user, today) -> Section:
    statuses = eligibility.welder_statuses(active_welders(user), on=today)
    lapsed, lapsing = eligibility.State.LAPSED, eligibility.State.LAPSING
    rows = sorted((s for s in statuses.values() if s.state in (lapsed, lapsing)),
                  key=lambda s: (s.lapses_on or date.min, s.welder.stamp))
    counts = [Item("Lapsed", list_url("procedures:welder_list", continuity="lapsed"), overdue=True, word="",
                   count=sum(1 for s in rows if s.state == lapsed)),
              Item(f"Lapsing within {eligibility.WARN_DAYS} days", list_url("procedures:welder_list",
                                                                          continuity="lapsing"),
                   count=sum(1 for s in rows if s.state == lapsing))]
    # "since" a day past; a lapse ahead is said in the note alone
    items = [Item(f"{s.welder.stamp} {s.welder.name}", s.welder.get_absolute_url(),
                  since=s.lapses_on if s.state == lapsed else None,
                  overdue=s.state == lapsed, word="",
                  note=("lapsed" if s.state == lapsed else "lapses") +
                  (f" on {s.lapses_on.isoformat()}" if s.lapses_on else "")) for s in rows]
    return Section("welders", f"Welders lapsing within {eligibility.WARN_DAYS} days or lapsed",
                   counts + items[:SHOWN] if rows else [], total=len(rows),
                   all_url=list_url("procedures:welder_list", continuity="lapsing"),
                   empty="Every active welder is qualified and in continuity.",
                   help="Active welders only: each test's continuity, use of the process at least once in any 6 months "
                        "(AWS D1.1/D1.1M:2020 clause 6; ISO 9606-1:2012 9.2).")


def _registers(today) -> Section:
    """Lapses ahead in the shop's registers, like welder continuity: each active inspector whose best credential
    lapses within the notice days (or who has none current), and each gauge in service due within them or past due.
    Three queries (credentials with their inspectors, the active inspectors, gauges with their calibrations)."""
    from inspections import credentials as engine
    from inspections.models.trace import GaugeState
    from inspections.services import trace

    notice = engine.LAPSE_NOTICE_DAYS
    best = {}  # inspector id -> the current credential that lapses last, or None
    for row in trace.credential_rows(today):
        credential, answer = row["credential"], row["currency"]
        held = best.get(credential.inspector_id)
        if answer.current and (held is None or answer.lapses_on > held["currency"].lapses_on):
            best[credential.inspector_id] = row
        else:
            best.setdefault(credential.inspector_id, None)
    people = get_user_model().objects.filter(is_active=True, role=Role.INSPECTOR).order_by("last_name", "username")
    items = []
    for person in people:
        row = best.get(person.pk)
        name = person.get_full_name() or person.username
        if row is None:
            items.append((date.min, Item(f"Inspector {name}", list_url("inspections:credential_list"), overdue=True,
                                         word="", note="no current credential: cannot sign a final visual")))
        elif row["days_left"] <= notice:
            lapses = row["currency"].lapses_on
            items.append((lapses, Item(f"Inspector {name}", row["credential"].get_absolute_url(),
                                       note=f"{row['credential'].short} lapses on {lapses.isoformat()}")))
    for row in trace.gauge_rows(today):
        gauge, answer = row["gauge"], row["standing"]
        if gauge.state != GaugeState.IN_SERVICE:
            continue
        if not answer.ok:
            items.append((date.min, Item(f"Gauge {gauge.number}", gauge.get_absolute_url(), overdue=True, word="",
                                         note=f"cannot be used: {answer.reason}")))
        elif row["soon"]:
            items.append((answer.due_on, Item(f"Gauge {gauge.number}", gauge.get_absolute_url(),
                                              note=f"calibration due on {answer.due_on.isoformat()}")))
    items = [item for _day, item in sorted(items, key=lambda t: (t[0], t[1].text))]
    return Section("registers", f"Inspector credentials and gauges lapsing within {notice} days or lapsed",
                   items[:SHOWN], total=len(items), all_url=list_url("inspections:credential_list"),
                   empty="Every inspector holds a current credential and every gauge in service is in calibration.",
                   help="Credentials: the expiry printed on the card and the eye examination (every 3 years for "
                        "AWS QC1, yearly for ISO 9712; from memory); gauges: the due date of the last calibration. "
                        "The registers list every credential and gauge.")


def _consumables() -> Section:
    """Electrode ovens in service with no reading for a shift, electrodes still out past their exposure limit, and
    SAW flux not usable and not discarded (inspections.services.consumables; three queries)."""
    from inspections.services import consumables

    due = consumables.ovens_due()
    late = consumables.open_past_limit()
    items = [Item(f"Oven {row['oven']}: no reading for a shift", row["oven"].get_absolute_url(), since=_day(
        row["last_at"]) if row["last_at"] else None, note="" if row["last_at"] else "never read") for row in due]
    items += [Item(f"Lot {j.issue.lot.lot_number} with {j.issue.welder.stamp}, {j.status}",
                   consumables.issue_url(j.issue), overdue=True, word="past its limit",
                   note=f"from oven {j.issue.oven} since {timezone.localtime(j.issue.taken_out_at):%H:%M}")
              for j in late]
    items += [Item(f"Flux lot {row['lot'].lot_number} not usable", row["last"].oven.get_absolute_url() + "#flux",
                   overdue=True, word="not usable", note=row["reason"]) for row in consumables.flux_unusable()]
    return Section("consumables", "Electrode ovens and electrodes out", items[:SHOWN], total=len(items),
                   all_url=reverse("inspections:oven_list"), empty="Every oven read this shift; nothing out past its "
                                                                   "limit.",
                   help="A reading every shift (12 h: common practice, no source); exposure limits AWS "
                        "D1.1/D1.1M:2020 Table 7.1 (from memory).")


# --- viewer ------------------------------------------------------------------------------------------------------

def job_progress(user, limit=20) -> list[Job]:
    """The visible jobs with something still open (newest first, at most `limit`), each with its progress counted
    by the database: four queries, one GROUP BY per table, whatever the number of jobs, assemblies and welds."""
    open_assemblies = Assembly.objects.exclude(state__in=CLOSED_STATES)
    jobs = list(visible(user, Job.objects.all()).filter(pk__in=open_assemblies.values("job"))
                .order_by("-created_at", "-pk")[:limit])
    ids = [job.pk for job in jobs]
    assemblies = {row["job"]: row for row in Assembly.objects.filter(job__in=ids).values("job").annotate(
        n=Count("pk"), released=Count("pk", filter=Q(state=AssemblyState.RELEASED))).order_by()}
    welds = {row["assembly__job"]: row for row in Weld.objects.filter(assembly__job__in=ids)
             .values("assembly__job").annotate(n=Count("pk"), accepted=Count("pk", filter=Q(
                 latest_final__accepted=True))).order_by()}
    ncrs = dict(NCR.objects.filter(weld__assembly__job__in=ids).exclude(state=NCRState.CLOSED)
                .values_list("weld__assembly__job").annotate(n=Count("pk")).order_by())
    for job in jobs:
        job.n_assemblies = assemblies.get(job.pk, {}).get("n", 0)
        job.released = assemblies.get(job.pk, {}).get("released", 0)
        job.n_welds = welds.get(job.pk, {}).get("n", 0)
        job.accepted = welds.get(job.pk, {}).get("accepted", 0)
        job.ncrs_open = ncrs.get(job.pk, 0)
    return jobs


def viewer(user, today) -> list[Section]:
    items = []
    for job in job_progress(user):
        note = f"{job.accepted} of {job.n_welds} welds accepted at final visual"
        if job.ncrs_open:
            note += f"; {job.ncrs_open} open NCR{'s' if job.ncrs_open != 1 else ''}"
        items.append(Item(f"{job.number} {job.name}: {job.released} of {job.n_assemblies} assemblies released",
                          job.get_absolute_url(), note=note,
                          note_url=list_url("inspections:assembly_list", job=job.pk)))
    return [Section("jobs", "Your jobs in progress", items, all_url=list_url("inspections:job_list"),
                    empty="No job of yours is in progress.")]
