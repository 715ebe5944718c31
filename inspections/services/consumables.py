"""Consumable control's steps and answers: the oven register (the QA lead's), the oven log (whoever stands at the
oven: readings, electrodes issued and returned or discarded, rebakes), and the judgment of each issue against
inspections.consumables (AWS D1.1/D1.1M:2020 clause 7.3, from memory).

A weld is tied to an issue by its lot, its welder and its date: an issue of lot L to welder W, taken out on day d1
and back on day d2 (today while still out), covers W's welds with L dated d1 to d2. An issue past its exposure
limit flags the welds it covers dated on or after the day the limit ran out; an issue taken from an oven whose last
reading before it was below the minimum, or drawn from a batch rebaked more than once or outside the rebake range,
flags every weld it covers (docs/decisions/2026-12-05-consumable-control.md).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, time, timedelta

from django.db import transaction
from django.db.models import Count, OuterRef, Q, Subquery
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from core.roles import require
from core.transitions import required_reason, transition
from core.units import Temperature
from inspections import consumables as engine
from inspections.models import (
    ElectrodeIssue,
    ElectrodeOven,
    FluxEvent,
    FluxRecord,
    IssueState,
    OvenReading,
    OvenState,
    Rebake,
)
from inspections.services.trace import REGISTERS, record
from procedures.electrodes import decode

LOG = "consumable.log"


# --- the register ------------------------------------------------------------------------------------------------

def record_oven(oven: ElectrodeOven, user) -> ElectrodeOven:
    return record(oven, user)


def retire_oven(oven: ElectrodeOven, user, reason: str) -> ElectrodeOven:
    """Take an oven out of use; its log stays, and the issues still out may be returned to another oven."""
    reason = required_reason(reason, "retiring the oven")
    return transition(oven, to=OvenState.RETIRED, allowed_from={OvenState.IN_SERVICE}, user=user,
                      permission=REGISTERS, reason=reason, retired_reason=reason[:200], retired_at=timezone.now())


def _in_service(oven_id, doing: str) -> ElectrodeOven:
    oven = ElectrodeOven.objects.select_for_update().get(pk=oven_id)
    if oven.state != OvenState.IN_SERVICE:
        raise Refused(f"Oven {oven} is retired: it takes no more {doing}.", code="retired")
    return oven


def _not_future(at, what: str):
    if at > timezone.now() + timedelta(minutes=5):  # a tablet's clock a little ahead is not a mistake
        raise Refused(f"{what} is in the future: check the date and time.", code="future")


# --- the log -----------------------------------------------------------------------------------------------------

def _log(entry, user, doing: str, at, what: str, check=None):
    """Put an entry of an oven's log on record: the log's role, an oven in service, not in the future, the entry's
    own check (it raises Refused), then the row with its history, in one transaction."""
    require(user, LOG)
    with transaction.atomic():
        _in_service(entry.oven_id, doing)
        _not_future(at, what)
        if check is not None:
            check()
        entry.recorded_by = user
        entry.save(user=user)
    return entry


def record_reading(reading: OvenReading, user) -> OvenReading:
    """A temperature reading of an oven in service, recorded by the person who read it."""
    return _log(reading, user, "readings", reading.read_at, "The reading")


def _covered_electrode(lot) -> None:
    """The oven log is for covered (SMAW) electrodes; wire and flux lots are refused."""
    if "SMAW" not in _processes(lot.classification):
        raise Refused(f"{lot} is not a covered electrode: the oven log is for SMAW electrodes.", code="lot")


def record_issue(issue: ElectrodeIssue, user) -> ElectrodeIssue:
    """Electrodes of a lot taken out of an oven in service by a welder (still out until closed)."""
    def check():
        _covered_electrode(issue.lot)
        if issue.rebake_id and issue.rebake.lot_id != issue.lot_id:
            raise Refused(f"{issue.rebake} is of another lot than {issue.lot}.", code="rebake")
    return _log(issue, user, "issues", issue.taken_out_at, "The time taken out", check)


def close_issue(issue: ElectrodeIssue, user, back_at, returned_to: ElectrodeOven | None) -> ElectrodeIssue:
    """Close an issue once: returned to an oven in service (`returned_to`), or discarded (None)."""
    require(user, LOG)
    _not_future(back_at, "The time back")
    if back_at < issue.taken_out_at:
        raise Refused(f"Back at {timezone.localtime(back_at):%Y-%m-%d %H:%M}, before it was taken out "
                      f"({timezone.localtime(issue.taken_out_at):%Y-%m-%d %H:%M}): check the time.", code="back_at")
    if returned_to is not None and returned_to.state != OvenState.IN_SERVICE:
        raise Refused(f"Oven {returned_to} is retired: return the electrodes to an oven in service.", code="oven")
    to = IssueState.RETURNED if returned_to is not None else IssueState.DISCARDED
    return transition(issue, to=to, allowed_from={IssueState.OUT}, user=user, back_at=back_at,
                      **({"returned_to": returned_to} if returned_to is not None else {}))


def record_rebake(rebake: Rebake, user) -> Rebake:
    """A rebake of electrodes of one lot; its number counts the rebakes of those electrodes (previous batch + 1)."""
    def check():
        _covered_electrode(rebake.lot)
        if rebake.previous_id:
            if rebake.previous.lot_id != rebake.lot_id:
                raise Refused(f"{rebake.previous} is of another lot than {rebake.lot}.", code="previous")
            rebake.number = rebake.previous.number + 1
    return _log(rebake, user, "rebakes", rebake.started_at, "The rebake", check)


def _flux(lot) -> None:
    """The flux rows are for SAW flux lots (an AWS A5.17 flux-wire lot, e.g. F7A2-EM12K); other lots are refused."""
    if not _is_saw(lot.classification):
        raise Refused(f"{lot} is not a SAW flux lot: record its flux under its flux-wire classification "
                      "(e.g. F7A2-EM12K).", code="lot")


def record_flux(entry: FluxRecord, user) -> FluxRecord:
    """A fact of a flux lot's condition in an oven's log: a package opened (intact or damaged), a drying (with its
    temperature and hours), or flux found wet or contaminated and discarded (clause 7.3.3.2, from memory)."""
    def check():
        _flux(entry.lot)
        dried = entry.event == FluxEvent.DRIED
        if dried and (entry.temperature is None or entry.hours is None):
            raise Refused("A drying gives its temperature and hours.", code="dried")
        if not dried:
            entry.temperature, entry.hours = None, None
    return _log(entry, user, "flux records", entry.at, "The flux record", check)


def flux_lots(records, at=None, system="US") -> list[dict]:
    """Each flux lot among `records` (rows of FluxRecord, any order) with its standing at `at` (now) and its last
    fact: usable or not, and why (inspections.consumables.flux_at). No query beyond the records'."""
    at = at or timezone.now()
    by_lot = {}
    for entry in records:
        by_lot.setdefault(entry.lot_id, []).append(entry)
    rows = []
    for rows_of_lot in by_lot.values():
        last = max(rows_of_lot, key=lambda r: (r.at, r.pk))
        usable, reason = engine.flux_at([r.facts() for r in rows_of_lot], at, system)
        rows.append({"lot": last.lot, "last": last, "usable": usable, "reason": reason,
                     "discarded": last.event in (FluxEvent.WET, FluxEvent.CONTAMINATED)})
    return sorted(rows, key=lambda row: (row["usable"], row["lot"].lot_number))


def flux_unusable(now=None) -> list[dict]:
    """Flux lots not usable now and not discarded by their last record: still in a hopper (the morning page). One
    query."""
    records = FluxRecord.objects.select_related("lot", "oven")
    return [row for row in flux_lots(records, now) if not row["usable"] and not row["discarded"]]


# --- judging issues ----------------------------------------------------------------------------------------------

def with_oven_reading(issues):
    """Annotate each issue with its oven's last reading at or before it was taken out (one query for all)."""
    last = OvenReading.objects.filter(oven=OuterRef("oven"), read_at__lte=OuterRef("taken_out_at")).order_by(
        "-read_at", "-pk")
    return issues.select_related("oven", "lot", "welder", "rebake", "returned_to").annotate(
        oven_read_at=Subquery(last.values("read_at")[:1]), oven_read_c=Subquery(last.values("temperature")[:1]))


@dataclass
class Judged:
    """One issue judged: its exposure, the oven it came from, its rebake batch; `problems` in words."""

    issue: ElectrodeIssue
    exposure: engine.Exposure | None
    problems: list[str] = field(default_factory=list)  # every weld it covers is flagged
    late: str = ""  # past the exposure limit: the welds from the day the limit ran out are flagged

    @property
    def ok(self) -> bool:
        return not self.problems and not self.late

    @property
    def status(self) -> str:
        if self.exposure is None:
            return "not judged"
        if not self.exposure.limit.controlled:
            return "not controlled"
        words = engine.duration(self.exposure.elapsed) + (" so far" if self.exposure.open else "")
        if self.exposure.limit.hours is None:
            return f"{words}; no limit known"
        return f"{words} of {engine._hours(self.exposure.limit.hours)}" + ("" if self.exposure.within else " (past)")


def judge(issue: ElectrodeIssue, now=None) -> Judged:
    """One issue (annotated by with_oven_reading) against the engine: no query."""
    now = now or timezone.now()
    try:
        answer = engine.exposure(issue.lot.classification, issue.taken_out_at, issue.back_at, now)
    except ValueError as exc:
        return Judged(issue, None, [f"issue {issue.pk} cannot be judged: {exc}"])
    judged = Judged(issue, answer)
    if not answer.limit.controlled:
        return judged
    system = issue.oven.system
    read_c = getattr(issue, "oven_read_c", None)
    if read_c is not None and issue.oven.holds_electrodes:
        reading = engine.OvenReading(None, issue.oven_read_at, _temperature(read_c))
        standing = engine.oven_at([reading], issue.taken_out_at, system)
        if not standing.ok:
            judged.problems.append(f"taken from oven {issue.oven} when {standing.reason}")
    if issue.rebake_id:
        batch = issue.rebake
        verdict = engine.rebake(issue.lot.classification, batch.temperature, batch.hours, batch.number, system)
        judged.problems += [f"drawn from rebake batch {batch.pk}, {why}" for why in verdict.reasons]
    if not answer.within:
        judged.late = answer.reason
    return judged


def _local_day(moment):
    return timezone.localtime(moment).date()


def covers(judged: Judged, weld_day, now=None) -> str:
    """What this issue says against a weld dated `weld_day` of its lot and welder ("" when nothing, or when the
    issue does not cover that day)."""
    issue = judged.issue
    end = issue.back_at or now or timezone.now()
    if weld_day is None or not _local_day(issue.taken_out_at) <= weld_day <= _local_day(end):
        return ""
    found = list(judged.problems)
    if judged.late and weld_day >= _local_day(judged.exposure.over_at):
        found.append(judged.late)
    if not found:
        return ""
    out = timezone.localtime(issue.taken_out_at)
    return (f"lot {issue.lot.lot_number} issued to {issue.welder.stamp} from oven {issue.oven} at "
            f"{out:%Y-%m-%d %H:%M}: " + "; ".join(found))


def issue_url(issue) -> str:
    return reverse("inspections:oven_detail", args=[issue.oven_id]) + f"#issue-{issue.pk}"


def weld_exposures(welds, now=None) -> dict[tuple, list[tuple[str, str]]]:
    """{(kind, pk): [(problem, url of the issue)]} for the welds (kind "Weld") and repairs ("WeldRepair") naming a
    low-hydrogen SMAW lot (their filler_lot loaded, welders prefetched): one query when any does, none otherwise.
    Every issue covering one is also left on it as `_exposures` (Judged), for the traveler."""
    now = now or timezone.now()
    controlled, saw = [], []
    for weld in welds:
        lot = weld.filler_lot if weld.filler_lot_id else None
        if lot is not None and weld.welded_on is not None and _controlled(lot.classification):
            controlled.append(weld)
        elif lot is not None and weld.welded_on is not None and _is_saw(lot.classification):
            saw.append(weld)
    found = _flux_problems(saw) if saw else {}
    if not controlled:
        return found
    lots = {w.filler_lot_id for w in controlled}
    welders = {welder.pk for w in controlled for welder in w.welders.all()}
    first = min(w.welded_on for w in controlled)
    issues = {}
    for issue in with_oven_reading(ElectrodeIssue.objects.filter(
            lot_id__in=lots, welder_id__in=welders).filter(Q(back_at__isnull=True) | Q(back_at__date__gte=first))
            .order_by("taken_out_at", "pk")):
        issues.setdefault((issue.lot_id, issue.welder_id), []).append(judge(issue, now))
    for weld in controlled:
        covering = []
        for welder in weld.welders.all():
            for judged in issues.get((weld.filler_lot_id, welder.pk), []):
                end = judged.issue.back_at or now
                if _local_day(judged.issue.taken_out_at) <= weld.welded_on <= _local_day(end):
                    covering.append(judged)
                    problem = covers(judged, weld.welded_on, now)
                    if problem:
                        found.setdefault((type(weld).__name__, weld.pk), []).append(
                            (problem, issue_url(judged.issue)))
        weld._exposures = covering
    return found


def _processes(classification: str) -> frozenset:
    """The processes a classification decodes to (procedures.electrodes.decode); none when it does not decode."""
    try:
        return decode(classification).processes
    except ValueError:
        return frozenset()


def _is_saw(classification: str) -> bool:
    return "SAW" in _processes(classification)


def _flux_problems(welds) -> dict[tuple, list[tuple[str, str]]]:
    """SAW welds whose flux-wire lot's flux was not usable at some moment of the weld's day (its standing at the
    day's start, or after any record of that day: the weld records no hour, so the flag errs towards asking; clause
    7.3.3.2, from memory). No flux record for the lot: not flagged, as a weld without an issue. One query."""
    records = {}
    last_day = max(w.welded_on for w in welds)
    for entry in FluxRecord.objects.filter(lot_id__in={w.filler_lot_id for w in welds},
                                            at__date__lte=last_day + timedelta(days=1)).select_related("oven"):
        records.setdefault(entry.lot_id, []).append(entry)
    found = {}
    zone = timezone.get_current_timezone()
    for weld in welds:
        rows = records.get(weld.filler_lot_id)
        if not rows:
            continue
        start = timezone.make_aware(datetime.combine(weld.welded_on, time.min), zone)
        moments = [start] + [r.at for r in rows if _local_day(r.at) == weld.welded_on]
        facts = [r.facts() for r in rows]
        for moment in moments:
            usable, reason = engine.flux_at(facts, moment, rows[0].oven.system)
            if not usable:
                last = max((r for r in rows if r.at <= moment), key=lambda r: (r.at, r.pk))
                found.setdefault((type(weld).__name__, weld.pk), []).append((
                    f"flux of lot {weld.filler_lot.lot_number} not usable on {weld.welded_on:%Y-%m-%d}: {reason}",
                    reverse("inspections:oven_detail", args=[last.oven_id]) + "#flux"))
                break
    return found


def _controlled(classification: str) -> bool:
    try:
        return engine.exposure_limit(classification).controlled
    except ValueError:
        return False


# --- pages -------------------------------------------------------------------------------------------------------

def oven_rows(now=None) -> list[dict]:
    """Every oven with its last reading (judged), whether a reading is due, and how many issues are out. One query."""
    now = now or timezone.now()
    last = OvenReading.objects.filter(oven=OuterRef("pk")).order_by("-read_at", "-pk")
    ovens = ElectrodeOven.objects.annotate(
        last_at=Subquery(last.values("read_at")[:1]), last_c=Subquery(last.values("temperature")[:1]),
        out=Count("issues", filter=Q(issues__state=IssueState.OUT))).order_by("number")
    rows = []
    for oven in ovens:
        ok = None
        if oven.last_c is not None:
            ok = oven.reading_ok(_temperature(oven.last_c))
        rows.append({"oven": oven, "last_at": oven.last_at, "last": _temperature(oven.last_c) if oven.last_c is not
                     None else None, "ok": ok, "due": oven.state == OvenState.IN_SERVICE and
                     engine.reading_due(oven.last_at, now), "out": oven.out})
    return rows


def _temperature(value) -> Temperature:
    """A reading annotated through a subquery comes back as the field's Temperature (or its number of degC)."""
    return value if isinstance(value, Temperature) else Temperature(value)


def open_past_limit(now=None) -> list[Judged]:
    """The issues still out past their exposure limit (the morning page): one query."""
    now = now or timezone.now()
    judged = [judge(i, now) for i in with_oven_reading(ElectrodeIssue.objects.filter(state=IssueState.OUT))
              .order_by("taken_out_at", "pk")]
    return [j for j in judged if j.late]


def ovens_due(now=None) -> list[dict]:
    """Ovens in service with no reading for a shift (the morning page): one query."""
    return [row for row in oven_rows(now) if row["due"]]
