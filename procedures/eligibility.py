"""The Django side of "may this welder make this weld": database rows in, the engine's answer out.

Every range and date rule lives in procedures.qualification (the engine). This module only gathers the facts
the engine asks for (the test records, and the continuity runs that keep them alive: procedures.continuity keeps
them from the entries), with a fixed number of queries and rows whatever the number of welders, welds and
entries, and hands back the engine's Eligibility and status objects.

- check_welder(welder, weld_or_demand, on): one welder, one weld.
- check_welds(welds, on): every welder of every weld (weld map, travelers): five queries at most.
- eligible_welders(weld, welders, on): which of these welders may make this weld.
- welder_status(welder, on) / welder_statuses(welders, on): qualified, lapsing, lapsed, inactive or untested.
- check_work(works): welders of any welding (original welds and repairs) on their own days, fixed queries.
- record_production(weld): the continuity a production weld gives its welders (idempotent).
- record_repair(repair): the continuity a repair weld gives its welders.
- describe(qualification): the ranges of one test record in plain words, for pages and PDFs.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date, timedelta

from django.db import IntegrityError, transaction
from django.db.models import Q, prefetch_related_objects
from django.utils import timezone

from core.units import Length, format_length
from procedures import continuity
from procedures import qualification as engine
from procedures.models import ContinuityEntry, ContinuityRun, Qualification, Welder

WARN_DAYS = 30  # the list flags a qualification that lapses within this many days

# A WPS names its procedure standard; the welder qualification standard that goes with it.
_WELDER_CODE_FOR_WPS = {
    "AWS D1.1:2020": engine.AWS,
    "ISO 15609-1:2019": engine.ISO,
}


# --- welder states --------------------------------------------------------------------------------------------

class State:
    QUALIFIED = "qualified"
    LAPSING = "lapsing"
    LAPSED = "lapsed"
    INACTIVE = "inactive"
    UNTESTED = "untested"

    LABELS = {
        QUALIFIED: "Qualified, in continuity",
        LAPSING: f"Lapses within {WARN_DAYS} days",
        LAPSED: "Lapsed",
        INACTIVE: "Inactive",
        UNTESTED: "No passed test on record",
    }
    CHOICES = list(LABELS.items())


_RANK = {State.QUALIFIED: 2, State.LAPSING: 1, State.LAPSED: 0}


@dataclass(frozen=True)
class RecordStatus:
    """The engine's status of one test record on a day (status is None when the record cannot be evaluated)."""

    qualification: Qualification
    status: engine.QualificationStatus

    @property
    def state(self):
        return self.status.state


@dataclass(frozen=True)
class WelderStatus:
    """A welder's state on a day, and the status of each test record behind it."""

    welder: Welder
    state: str
    reason: str
    lapses_on: date | None  # the first day something in force stops being valid (the earliest)
    records: tuple[RecordStatus, ...]

    @property
    def label(self):
        return State.LABELS[self.state]

    @property
    def processes(self) -> dict[str, RecordStatus]:
        """The best record per process: the one in force that stays valid longest."""
        return _best_per_process(self.records)


def _best_per_process(records) -> dict[str, RecordStatus]:
    best = {}
    for record in records:
        current = best.get(record.qualification.process)
        if current is None or _better(record, current):
            best[record.qualification.process] = record
    return dict(sorted(best.items()))


def _better(a: RecordStatus, b: RecordStatus) -> bool:
    key_a = (_RANK[a.state], a.status.valid_until or date.min)
    key_b = (_RANK[b.state], b.status.valid_until or date.min)
    return key_a > key_b


# --- gathering facts (fixed number of queries) ----------------------------------------------------------------

@dataclass
class _Records:
    qualifications: list
    runs: dict  # process -> [(first use, last use)] oldest first (ContinuityRun rows)
    near: dict  # process -> sorted dates of use close before the days asked about that fall inside a run


# The last use on or before a day inside a run lies at most six calendar months (184 days) before it: the runs'
# rule (qualification.continuity_runs). The window read around such days, with a margin.
_NEAR_DAYS = 190


def _load(welders: Iterable[Welder], days: Iterable[date] = ()) -> dict[int, _Records]:
    """Test records and continuity runs of these welders: prefetched caches if present, else two queries; a third
    reads the dates of use just before any asked day that falls inside a run (a check of a past weld by a welder
    who kept welding), bounded by the spread of the days asked, never the whole history."""
    welders = list({w.pk: w for w in welders}.values())
    days = sorted(set(days))
    loaded = {}
    missing = []
    for welder in welders:
        cache = getattr(welder, "_prefetched_objects_cache", {})
        if "qualifications" in cache and "continuity_runs" in cache:
            loaded[welder.pk] = _records(cache["qualifications"], cache["continuity_runs"])
        else:
            missing.append(welder.pk)
    if missing:
        quals, runs = defaultdict(list), defaultdict(list)
        for q in Qualification.objects.filter(welder_id__in=missing).order_by("-test_date", "-pk"):
            quals[q.welder_id].append(q)
        for run in ContinuityRun.objects.filter(welder_id__in=missing):
            runs[run.welder_id].append(run)
        for pk in missing:
            loaded[pk] = _records(quals[pk], runs[pk])
    inside = {(pk, process) for pk, records in loaded.items() for process, spans in records.runs.items()
              if any(first <= day < last for first, last in spans for day in days)}
    if inside:
        asked = [day for day in days if any(first <= day < last for pk, process in inside
                                            for first, last in loaded[pk].runs[process])]
        entries = ContinuityEntry.objects.filter(_windows(asked), welder_id__in={pk for pk, _ in inside}).values_list(
            "welder_id", "process", "date").order_by("date")
        for pk, process, day in entries:
            if (pk, process) in inside:
                loaded[pk].near.setdefault(process, []).append(day)
    return loaded


def _windows(days) -> Q:
    """The dates within _NEAR_DAYS before each day asked (sorted), overlapping windows merged: days far apart (an
    assembly's welds of different years) read two short windows, not every use between them."""
    spans = []
    for day in days:
        start = day - timedelta(days=_NEAR_DAYS)
        if spans and start <= spans[-1][1]:
            spans[-1][1] = day
        else:
            spans.append([start, day])
    condition = Q()
    for start, end in spans:
        condition |= Q(date__gte=start, date__lte=end)
    return condition


def _records(qualifications, runs) -> _Records:
    by_process = defaultdict(list)
    for run in runs:
        by_process[run.process].append((run.first_use, run.last_use))
    return _Records(sorted(qualifications, key=lambda q: (q.test_date, q.pk), reverse=True),
                    {process: sorted(spans) for process, spans in by_process.items()}, {})


def _last_use(qualification: Qualification, runs: list, near: list[date], on: date) -> date | None:
    """The end of the unbroken chain of uses of the process since the test, up to the day asked about.

    The engine wants the last use of an unbroken chain (QualificationFacts.last_use_of_process). Whether each use
    keeps the chain alive is the engine's continuity_until; a use after a gap does not revive a lapsed test. The
    chain lives in one run (qualification.continuity_runs): the one holding the test date, or the first after it
    if it starts within continuity_until of the test. Inside that run, the last use on or before the day is read
    from `near` (the dates loaded around the days asked about).
    """
    test = qualification.test_date
    for first, last in runs:
        if last < test:
            continue
        if first > on or (first >= test and first > engine.continuity_until(test, qualification.code)):
            return None
        if last <= on:
            return last
        before = [day for day in near if test <= day <= on]
        return before[-1] if before else None
    return None


def facts(qualification: Qualification, runs: list | None = None, on: date | None = None, near=()):
    """The engine's QualificationFacts for a test record (ValueError if the record cannot be read); runs are the
    welder's continuity runs of the record's process, near the dates of use loaded around the day."""
    on = on or timezone.localdate()
    return engine.QualificationFacts(
        process=qualification.process,
        joint=qualification.joint,
        test_position=qualification.test_position,
        test_thickness=qualification.test_thickness,
        test_date=qualification.test_date,
        passed=qualification.result == Qualification.Result.PASS,
        electrode=qualification.electrode or None,
        last_use_of_process=_last_use(qualification, runs or [], list(near), on),
        code=qualification.code,
        welder=qualification.welder.stamp if _welder_cached(qualification) else "",
        iso_revalidation=qualification.iso_revalidation or None,
        unit_system=qualification.unit_system or None,
        progression=qualification.progression or None,
        backing=qualification.backing or None,
        transfer=(qualification.transfer or None) if qualification.process == "GMAW" else None,
    )


def _welder_cached(qualification):
    return Qualification.welder.is_cached(qualification)


def _facts_for(welder: Welder, records: _Records, on: date):
    """(facts the engine can read, reasons for records it cannot)."""
    good, bad = [], []
    for q in records.qualifications:
        q.welder = welder  # already loaded: label records by stamp without another query
        try:
            good.append((q, facts(q, records.runs.get(q.process, []), on, records.near.get(q.process, ()))))
        except ValueError as exc:
            bad.append((q, f"Test record of {q.test_date.isoformat()} ({q.process} {q.test_position}) cannot be "
                           f"read: {exc}"))
    return good, bad


# --- the check ------------------------------------------------------------------------------------------------

def weld_demand(weld) -> list[engine.WeldDemand]:
    """What a weld of the weld map asks of its welder, as engine WeldDemands (ValueError with the reason if the
    weld does not say enough).

    One demand per part joined when the parts differ in thickness: both parts must lie in the qualified range.
    The essential variables the weld map does not hold come from the WPS it is welded to: GMAW transfer, vertical
    progression (an ISO 6947 PF or PG on the weld map says it itself) and, for groove welds, backing.
    """
    wps = weld.wps
    if wps is None:
        raise ValueError(f"Weld {weld.mark} names no WPS, so its process and electrode are unknown: "
                         "choose the WPS on the weld map first.")
    code = _WELDER_CODE_FOR_WPS.get(wps.code, wps.code)
    thicknesses = sorted({weld.thickness1, weld.thickness2} - {None}, key=lambda t: t.mm)
    if not thicknesses:
        raise ValueError(f"Weld {weld.mark} gives no thickness of the parts joined.")
    progression = _ISO_PROGRESSION.get(weld.position) or getattr(wps, "progression", "") or None
    backing = (getattr(wps, "backing", "") or None) if weld.joint_type == "groove" else None
    transfer = (wps.transfer or None) if wps.process == "GMAW" else None
    return [engine.WeldDemand(process=wps.process, joint=weld.joint_type, position=weld.position, thickness=t,
                              electrode=wps.electrode or None, code=code, progression=progression,
                              backing=backing, transfer=transfer)
            for t in thicknesses]


_ISO_PROGRESSION = {"PF": "up", "PG": "down"}  # ISO 6947 (published)


def _refused(*reasons) -> engine.Eligibility:
    return engine.Eligibility(False, tuple(reasons), None)


def _inactive_reason(welder: Welder, on: date) -> str | None:
    if welder.active or welder.deactivated_at is None:
        return None
    since = timezone.localdate(welder.deactivated_at)
    if on < since:
        return None
    why = f": {welder.deactivation_reason}" if welder.deactivation_reason else ""
    return f"Welder {welder.stamp} was made inactive on {since.isoformat()}{why}."


def _check(welder: Welder, records: _Records, demands, on: date, memo: dict | None = None) -> engine.Eligibility:
    """Combine the engine's answers for each demand (each part joined) into one answer.

    memo: {(welder pk, day): facts} shared across many checks, so a welder's records are read into facts once per
    day rather than once per weld (the continuity chain is walked per record)."""
    inactive = _inactive_reason(welder, on)
    if memo is None:
        good, bad = _facts_for(welder, records, on)
    else:
        if (welder.pk, on) not in memo:
            memo[(welder.pk, on)] = _facts_for(welder, records, on)
        good, bad = memo[(welder.pk, on)]
    answers = [engine.check_welder([f for _, f in good], demand, on) for demand in demands]
    reasons = []
    if inactive:
        reasons.append(inactive)
    if all(a.allowed for a in answers) and not inactive:
        allowed = answers[-1]  # the thicker part: the record named covers the thinner one too
        return engine.Eligibility(True, tuple(dict.fromkeys(r for a in answers for r in a.reasons)),
                                  allowed.qualification, min(a.valid_until for a in answers))
    for answer in answers:
        if not answer.allowed:
            reasons.extend(answer.reasons)
    reasons.extend(reason for _, reason in bad)
    return _refused(*dict.fromkeys(reasons))


def _demands_or_refusal(weld_or_demand):
    if isinstance(weld_or_demand, engine.WeldDemand):
        return [weld_or_demand], None
    try:
        return weld_demand(weld_or_demand), None
    except ValueError as exc:
        return None, _refused(str(exc))


def _day(on, weld_or_demand) -> date:
    if on is not None:
        return on
    return getattr(weld_or_demand, "welded_on", None) or timezone.localdate()


def check_welder(welder: Welder, weld_or_demand, on: date | None = None) -> engine.Eligibility:
    """May this welder make this weld (a Weld of the weld map, or an engine WeldDemand) on this day?

    The day defaults to the date the weld was welded, else today. Two queries (three if the weld's WPS is not
    loaded yet), or none when the welder's qualifications and continuity are prefetched.
    """
    on = _day(on, weld_or_demand)
    demands, refusal = _demands_or_refusal(weld_or_demand)
    if refusal:
        return refusal
    return _check(welder, _load([welder], [on])[welder.pk], demands, on)


@dataclass(frozen=True)
class WelderCheck:
    welder: Welder
    eligibility: engine.Eligibility

    @property
    def allowed(self):
        return self.eligibility.allowed

    @property
    def reasons(self):
        return self.eligibility.reasons


@dataclass(frozen=True)
class WeldCheck:
    """Every welder of one weld, checked; a weld with no welder recorded is not allowed (nothing to show)."""

    weld: object
    checks: tuple[WelderCheck, ...]
    on: date

    @property
    def allowed(self):
        return bool(self.checks) and all(c.allowed for c in self.checks)

    @property
    def reasons(self):
        if not self.checks:
            return ("No welder is recorded for this weld.",)
        return tuple(f"{c.welder.stamp}: {r}" for c in self.checks if not c.allowed for r in c.reasons)


def check_welds(welds, on: date | None = None) -> dict[int, WeldCheck]:
    """Every welder of every weld, for the weld map and travelers: {weld.pk: WeldCheck}.

    At most four queries whatever the number of welds and welders (welders and WPS of the welds when not
    prefetched, then the welders' test records and continuity). Each weld is judged on `on`, else the day it
    was welded, else today.
    """
    welds = list(welds)
    if not welds:
        return {}
    prefetch_related_objects([w for w in welds if not _m2m_cached(w)], "welders")
    prefetch_related_objects([w for w in welds if not type(w).wps.is_cached(w)], "wps")
    welders = [welder for weld in welds for welder in weld.welders.all()]
    records = _load(welders, {_day(on, weld) for weld in welds})
    result = {}
    for weld in welds:
        day = _day(on, weld)
        demands, refusal = _demands_or_refusal(weld)
        checks = tuple(
            WelderCheck(welder, refusal or _check(welder, records[welder.pk], demands, day))
            for welder in sorted(weld.welders.all(), key=lambda w: w.stamp)
        )
        result[weld.pk] = WeldCheck(weld, checks, day)
    return result


@dataclass(frozen=True)
class Work:
    """Welding to check: a weld (or a weld-like record: a repair's weld with the repair's WPS), its welders and the
    day it was welded. key names it in the answer."""

    key: object
    weld: object
    welders: tuple
    on: date


def check_work(works) -> dict[object, WeldCheck]:
    """Every welder of every piece of work on its own day: {work.key: WeldCheck}, two queries for the welders'
    test records and continuity whatever the number of works (none when those are prefetched)."""
    works = list(works)
    records = _load([welder for work in works for welder in work.welders], {work.on for work in works})
    result, memo = {}, {}
    for work in works:
        demands, refusal = _demands_or_refusal(work.weld)
        checks = tuple(WelderCheck(welder, refusal or _check(welder, records[welder.pk], demands, work.on, memo))
                       for welder in sorted(work.welders, key=lambda w: w.stamp))
        result[work.key] = WeldCheck(work.weld, checks, work.on)
    return result


def _m2m_cached(weld) -> bool:
    return "welders" in getattr(weld, "_prefetched_objects_cache", {})


def eligible_welders(weld_or_demand, welders=None, on: date | None = None) -> list[WelderCheck]:
    """Check these welders (default: every active welder) for one weld: three queries, allowed ones first."""
    on = _day(on, weld_or_demand)
    if welders is None:
        welders = Welder.objects.filter(active=True)
    welders = list(welders)
    demands, refusal = _demands_or_refusal(weld_or_demand)
    records = _load(welders, [on]) if refusal is None else {}
    checks = [WelderCheck(w, refusal or _check(w, records[w.pk], demands, on)) for w in welders]
    return sorted(checks, key=lambda c: (not c.allowed, c.welder.stamp))


# --- welder state ---------------------------------------------------------------------------------------------

def _status(welder: Welder, records: _Records, on: date, warn_days: int) -> WelderStatus:
    good, bad = _facts_for(welder, records, on)
    statuses = [RecordStatus(q, engine.status_on(f, on, warn_days)) for q, f in good]
    statuses += [RecordStatus(q, engine.QualificationStatus(State.LAPSED, None, None, reason)) for q, reason in bad]
    statuses.sort(key=lambda r: (r.qualification.test_date, r.qualification.pk), reverse=True)
    records_tuple = tuple(statuses)
    if not welder.active:
        reason = f"Inactive since {timezone.localdate(welder.deactivated_at).isoformat()}" if welder.deactivated_at \
            else "Inactive"
        if welder.deactivation_reason:
            reason += f": {welder.deactivation_reason}"
        return WelderStatus(welder, State.INACTIVE, reason + ".", None, records_tuple)
    passed = [r for r in statuses if r.qualification.result == Qualification.Result.PASS]
    if not passed:
        return WelderStatus(welder, State.UNTESTED, "No passed qualification test on record.", None, records_tuple)
    in_force = [r for r in passed if r.state in (State.QUALIFIED, State.LAPSING)]
    if not in_force:
        latest = max(passed, key=lambda r: r.status.valid_until or date.min)
        return WelderStatus(welder, State.LAPSED, latest.status.reason, latest.status.lapses_on, records_tuple)
    # A process still in force counts; the earliest lapse among them is what the QA lead must act on.
    live = [r for r in _best_per_process(statuses).values() if r.state in (State.QUALIFIED, State.LAPSING)]
    soonest = min(live, key=lambda r: r.status.lapses_on)
    state = State.LAPSING if any(r.state == State.LAPSING for r in live) else State.QUALIFIED
    return WelderStatus(welder, state, soonest.status.reason, soonest.status.lapses_on, records_tuple)


def welder_status(welder: Welder, on: date | None = None, warn_days: int = WARN_DAYS) -> WelderStatus:
    """Qualified (in continuity), lapsing within warn_days, lapsed, inactive or untested, on a day (default today)."""
    on = on or timezone.localdate()
    return _status(welder, _load([welder], [on])[welder.pk], on, warn_days)


def welder_statuses(welders, on: date | None = None, warn_days: int = WARN_DAYS) -> dict[int, WelderStatus]:
    """welder_status for many welders: two queries (none when qualifications and continuity are prefetched)."""
    on = on or timezone.localdate()
    welders = list(welders)
    records = _load(welders, [on])
    return {w.pk: _status(w, records[w.pk], on, warn_days) for w in welders}


# --- continuity from production welds -------------------------------------------------------------------------

def record_production(weld) -> list[ContinuityEntry]:
    """Keep the continuity a production weld gives its welders in step with the weld (call after saving it).

    A weld with a date and a WPS gives each of its welders one entry (source production) for the WPS process on
    that date. Calling it again changes nothing; after the date, WPS or welders of the weld changed, the weld's
    entries follow (an entry for a welder taken off the weld is removed: it no longer proves anything).
    """
    with transaction.atomic():
        # Lock the weld: two saves of the same weld at once must not leave entries of the older state.
        weld = type(weld).objects.select_for_update(of=("self",)).select_related("wps").get(pk=weld.pk)
        wps = weld.wps
        existing = ContinuityEntry.objects.filter(weld=weld)
        if weld.welded_on is None or wps is None or not wps.process:
            existing.delete()
            return []
        welder_ids = set(weld.welders.values_list("pk", flat=True))
        existing.exclude(welder_id__in=welder_ids, process=wps.process).delete()
        if existing.filter(process=wps.process).exclude(date=weld.welded_on).update(date=weld.welded_on):
            continuity.refresh(welder_ids)  # a queryset update sends no signal: keep the runs in step here
        have = set(existing.filter(process=wps.process).values_list("welder_id", flat=True))
        for welder_id in sorted(welder_ids - have):
            try:
                with transaction.atomic():  # a concurrent call may have made it: the unique constraint decides
                    ContinuityEntry.objects.create(welder_id=welder_id, process=wps.process, date=weld.welded_on,
                                                   source=ContinuityEntry.Source.PRODUCTION, weld=weld)
            except IntegrityError:
                pass
        return list(ContinuityEntry.objects.filter(weld=weld).order_by("welder__stamp"))


def record_repair(repair) -> list[ContinuityEntry]:
    """The continuity a recorded repair gives its welders: one entry each (source repair) for the repair WPS's
    process on the repair date. Made once with the repair (a repair record is never edited); calling it again
    changes nothing."""
    with transaction.atomic():
        process = repair.wps.process
        for welder_id in sorted(repair.welders.values_list("pk", flat=True)):
            try:
                with transaction.atomic():
                    ContinuityEntry.objects.get_or_create(
                        welder_id=welder_id, repair=repair, process=process,
                        defaults={"date": repair.welded_on, "source": ContinuityEntry.Source.REPAIR})
            except IntegrityError:
                pass
        return list(ContinuityEntry.objects.filter(repair=repair).order_by("welder__stamp"))


# --- ranges in plain words ------------------------------------------------------------------------------------

_POSITION_WORDS = {
    "F": "flat", "H": "horizontal", "V": "vertical", "OH": "overhead",
    # ISO 6947 position names
    "PA": "PA (flat)", "PB": "PB (horizontal-vertical)", "PC": "PC (horizontal)",
    "PD": "PD (horizontal-overhead)", "PE": "PE (overhead)", "PF": "PF (vertical up)",
    "PG": "PG (vertical down)", "PH": "PH (pipe, vertical up)", "PJ": "PJ (pipe, vertical down)",
}


def _words(items) -> str:
    items = list(items)
    if len(items) <= 1:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def _positions_text(positions, code) -> str:
    order = engine.AWS_POSITIONS if code == engine.AWS else engine.ISO_POSITIONS
    return _words(_POSITION_WORDS[p] for p in order if p in positions)


def length_text(length: Length, system: str) -> str:
    """3/8" [9.53 mm] on a US record, 10 mm [3/8"] on an SI one."""
    system = system if system in ("US", "SI") else "US"
    other = "SI" if system == "US" else "US"
    return f"{format_length(length, system)} [{format_length(length, other)}]"


@dataclass(frozen=True)
class Ranges:
    """What one test record qualifies, in words (error is the engine's message when it cannot be read)."""

    fillet: str = ""
    groove: str = ""
    thickness: str = ""
    electrode: str = ""
    error: str = ""

    @property
    def sentence(self) -> str:
        if self.error:
            return self.error
        parts = [self.fillet, self.groove, self.thickness]
        text = "; ".join(p for p in parts if p)
        return text[:1].upper() + text[1:] + "."


def describe(qualification: Qualification) -> Ranges:
    """"Fillet welds in flat, horizontal and vertical positions; groove welds in ...; plate 1/8" and over"."""
    q = qualification
    try:
        f = facts(q, [], q.test_date)
        positions = engine.positions_qualified(f.test_position, f.code, joint=f.joint)
        low, high = engine.thickness_qualified(f.test_thickness, f.joint, f.code, system=f.unit_system)
        groups = None
        if f.code == engine.AWS and f.process == "SMAW" and f.electrode:
            groups = engine.electrode_groups_qualified(f.electrode)
            tested = engine.smaw_electrode_group(f.electrode)
    except ValueError as exc:
        return Ranges(error=f"The ranges of this record cannot be derived: {exc}")
    system = f.unit_system or "US"
    fillet = (f"fillet welds in {_positions_text(positions['fillet'], f.code)} positions" if positions["fillet"]
              else "no fillet welds")
    groove = (f"groove welds in {_positions_text(positions['groove'], f.code)} positions" if positions["groove"]
              else "no groove welds")
    if f.code == engine.ISO:
        groove = groove.replace("groove welds", "butt welds")
    thickness = (f"plate {length_text(low, system)} and over" if high is None
                 else f"plate {length_text(low, system)} to {length_text(high, system)}")
    if groups:
        electrode = (f"SMAW electrode groups {', '.join(sorted(groups, reverse=True))} "
                     f"(tested with {f.electrode}, group {tested})")
    else:
        electrode = f"Tested with {f.electrode}" if f.electrode else "No electrode recorded"
    return Ranges(fillet=fillet, groove=groove, thickness=thickness, electrode=electrode)
