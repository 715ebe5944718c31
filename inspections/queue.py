"""The inspector's queue: assemblies and welds waiting for inspection, by job and stage, with what is overdue.

Stages, in the order an assembly meets them:
- Fit-up: a weld not yet welded (no weld date) and never inspected, or whose fit-up was sent back;
- Final visual: a weld welded (its weld date or completion time recorded) with no current final inspection;
- Re-inspection: a weld whose NCR was dispositioned as a repair and waits for the accepted re-inspection that
  closes it.
Released and scrapped assemblies wait for nothing. A final visual is overdue when it has waited longer than
LEGWORK_INSPECTION_DUE_DAYS (default 2 days, a shop setting: common practice, no source) since the weld was
completed, or since it first became possible for steels that wait 48 h (inspections.visual_timing); a re-inspection
when the repair was dispositioned that long ago. Two queries, whatever the number of welds.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timedelta

from django.conf import settings
from django.utils import timezone

from inspections.models import NCR, AssemblyState, InspectionStage, Weld
from inspections.models.ncr import Disposition, NCRState
from inspections.services.inspect import completion_of, final_visual_timing

STAGES = (("fit_up", "Fit-up"), ("final", "Final visual"), ("repair", "Re-inspection after repair"))
OPEN_STATES = (AssemblyState.IN_FABRICATION, AssemblyState.AWAITING_INSPECTION, AssemblyState.REJECTED)


def due_days() -> int:
    return int(getattr(settings, "LEGWORK_INSPECTION_DUE_DAYS", 2))


@dataclass
class Waiting:
    """One assembly's welds waiting at one stage."""

    assembly: object
    welds: list = field(default_factory=list)
    since: datetime | None = None  # the oldest wait (None: no date to count from)
    overdue: bool = False
    not_before: datetime | None = None  # the earliest a delayed final visual may be made, when it is still ahead
    delayed_steels: tuple = ()

    @property
    def marks(self) -> str:
        return ", ".join(w.mark for w in self.welds)


@dataclass
class StageQueue:
    key: str
    title: str
    assemblies: list = field(default_factory=list)

    @property
    def overdue(self) -> int:
        return sum(1 for a in self.assemblies if a.overdue)


@dataclass
class JobQueue:
    job: object
    stages: list = field(default_factory=list)

    @property
    def overdue(self) -> int:
        return sum(s.overdue for s in self.stages)


def _add(found: dict, job, stage: str, weld, since, overdue, not_before=None, steels=()):
    stages = found.setdefault(job.pk, (job, {}))[1]
    waiting = stages.setdefault(stage, {}).setdefault(weld.assembly_id, Waiting(weld.assembly))
    waiting.welds.append(weld)
    if since is not None and (waiting.since is None or since < waiting.since):
        waiting.since = since
    waiting.overdue = waiting.overdue or overdue
    if not_before is not None and (waiting.not_before is None or not_before > waiting.not_before):
        waiting.not_before = not_before
        waiting.delayed_steels = steels


def waiting(now: datetime | None = None) -> list[JobQueue]:
    """Every job with something waiting, by job number; in each stage the overdue first, then the oldest."""
    now = now or timezone.now()
    due = timedelta(days=due_days())
    found: dict = {}
    repairs = {}
    for ncr in (NCR.objects.filter(state=NCRState.DISPOSITIONED, disposition=Disposition.REPAIR,
                                   weld__assembly__state__in=OPEN_STATES).order_by("dispositioned_at")):
        repairs.setdefault(ncr.weld_id, ncr)
    welds = (Weld.objects.filter(assembly__state__in=OPEN_STATES)
             .select_related("assembly__job", "latest_inspection", "latest_final")
             .order_by("assembly__job__number", "assembly__piece_mark", "mark"))
    for weld in welds:
        job = weld.assembly.job
        ncr = repairs.get(weld.pk)
        if ncr is not None:
            since = ncr.dispositioned_at
            _add(found, job, "repair", weld, since, since is not None and now - since > due)
            continue
        if weld.latest_final is not None:
            continue
        completed = completion_of(weld)
        if completed is None:
            latest = weld.latest_inspection
            if latest is None or (latest.stage == InspectionStage.FIT_UP and not latest.accepted):
                _add(found, job, "fit_up", weld, latest.inspected_at if latest else None, False)
            continue
        timing = final_visual_timing(weld)
        if not timing.delayed:
            _add(found, job, "final", weld, completed, now - completed > due)
            continue
        start = timing.earliest
        ahead = start if start > now else None
        _add(found, job, "final", weld, start, ahead is None and now - start > due, ahead, timing.steels)
    queues = []
    for job, stages in sorted(found.values(), key=lambda pair: pair[0].number):
        queue = JobQueue(job)
        for key, title in STAGES:
            if key in stages:
                items = sorted(stages[key].values(), key=lambda w: (not w.overdue, w.since is None,
                                                                     w.since or now, w.assembly.piece_mark))
                queue.stages.append(StageQueue(key, title, items))
        queues.append(queue)
    return queues


__all__ = ["STAGES", "JobQueue", "StageQueue", "Waiting", "due_days", "waiting"]
