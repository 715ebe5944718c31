"""Continuity as a fact: each welder's unbroken runs of use per process (procedures.models.ContinuityRun), kept
in step with the continuity entries in the same transaction.

Every write of an entry (a production weld, a repair, a hand entry, a deletion) reaches refresh() through the
model signals below or, for queryset updates that send none, an explicit call (eligibility.record_production).
refresh() recomputes the runs of the welders touched from their dates alone (one indexed query of dates per
call) with the engine's continuity_runs, so the fact always equals the history scan; readers
(procedures.eligibility) never read the history to judge continuity. See
docs/decisions/2026-12-05-continuity-facts.md.
"""

from __future__ import annotations

from collections import defaultdict

from django.db import transaction
from django.db.models.signals import post_delete, post_save

from procedures import qualification as engine


def runs_from(rows) -> dict[tuple[int, str], list[tuple]]:
    """{(welder id, process): [(first, last), ...]} from (welder id, process, date) rows."""
    days = defaultdict(list)
    for welder_id, process, day in rows:
        days[(welder_id, process)].append(day)
    return {key: engine.continuity_runs(found) for key, found in days.items()}


def write_runs(run_model, runs, welder_ids, *, using="default"):
    """Replace the stored runs of these welders by `runs` (also used by the data migration)."""
    run_model.objects.using(using).filter(welder_id__in=welder_ids).delete()
    run_model.objects.using(using).bulk_create(
        [run_model(welder_id=welder_id, process=process, first_use=first, last_use=last,
                   valid_until=engine.continuity_until(last))
         for (welder_id, process), found in sorted(runs.items()) for first, last in found],
        batch_size=1000)


def refresh(welder_ids) -> None:
    """Recompute the runs of these welders from their entries (inside the caller's transaction)."""
    from procedures.models import ContinuityEntry, ContinuityRun

    welder_ids = sorted(set(welder_ids))
    if not welder_ids:
        return
    with transaction.atomic():
        rows = ContinuityEntry.objects.filter(welder_id__in=welder_ids).values_list("welder_id", "process", "date")
        write_runs(ContinuityRun, runs_from(rows.order_by()), welder_ids)


def rebuild() -> int:
    """Every welder's runs again from the whole history (after a bulk load); returns the number of runs."""
    from procedures.models import ContinuityRun, Welder

    with transaction.atomic():
        ids = list(Welder.objects.values_list("pk", flat=True))
        for start in range(0, len(ids), 200):
            refresh(ids[start:start + 200])
        return ContinuityRun.objects.count()


def _entry_changed(sender, instance, raw=False, **kwargs):
    if not raw:
        refresh([instance.welder_id])


def connect():
    from procedures.models import ContinuityEntry

    post_save.connect(_entry_changed, sender=ContinuityEntry, dispatch_uid="continuity-run-save")
    post_delete.connect(_entry_changed, sender=ContinuityEntry, dispatch_uid="continuity-run-delete")
