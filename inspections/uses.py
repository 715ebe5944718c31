"""Which WPSs and welders each job uses, as a fact (inspections.models.JobWPS, JobWelder), kept in step with the
welds and NCRs in the same transaction.

A customer's viewer sees the WPSs and welders named on its jobs' welds and NCR repairs (core.visibility). Found
from the welds themselves, every viewer's list scanned all of its jobs' welds on every request; the fact makes it
a few rows per job. Every write that can change it reaches this module: model signals for saves, deletions and
the weld's welder list (a weld, an NCR, an assembly moved to another job), an explicit call for bulk inserts
(inspections.services.weldmap_csv, benchmarks). Adding a use writes the row if missing; removing one asks the
welds and NCRs whether the job still uses it (indexed, a few rows), so the fact always equals what a scan of the
welds computes (tests/test_job_uses.py checks it after every kind of write). rebuild() recomputes it all.
"""

from __future__ import annotations

from django.db import transaction
from django.db.models.signals import m2m_changed, post_delete, post_save, pre_delete, pre_save

WPS_FIELDS = {"wps", "wps_id", "assembly", "assembly_id"}
NCR_FIELDS = {"repair_wps", "repair_wps_id", "repair_welder", "repair_welder_id", "weld", "weld_id"}


def computed(job_ids, *, models=None, using="default") -> tuple[set, set]:
    """({(job, wps)}, {(job, welder)}) from the welds and NCRs of these jobs (None: every job): the truth."""
    from inspections.models import NCR, Weld

    weld_model, ncr_model = models or (Weld, NCR)
    through = weld_model.welders.through
    welds = weld_model.objects.using(using).order_by()
    ncrs = ncr_model.objects.using(using).order_by()
    welders = through.objects.using(using).order_by()
    if job_ids is not None:
        welds = welds.filter(assembly__job_id__in=job_ids)
        ncrs = ncrs.filter(weld__assembly__job_id__in=job_ids)
        welders = welders.filter(weld__assembly__job_id__in=job_ids)
    wps = set(welds.exclude(wps=None).values_list("assembly__job_id", "wps_id").distinct())
    wps |= set(ncrs.exclude(repair_wps=None).values_list("weld__assembly__job_id", "repair_wps_id").distinct())
    people = set(welders.values_list("weld__assembly__job_id", "welder_id").distinct())
    people |= set(ncrs.exclude(repair_welder=None).values_list("weld__assembly__job_id", "repair_welder_id")
                  .distinct())
    return wps, people


def write(job_ids, *, models=None, using="default") -> None:
    """Replace the stored rows of these jobs (None: every job) by the computed ones (also the data migration's)."""
    from inspections.models import NCR, JobWelder, JobWPS, Weld

    weld_model, ncr_model, wps_model, welder_model = models or (Weld, NCR, JobWPS, JobWelder)
    wps, people = computed(job_ids, models=(weld_model, ncr_model), using=using)
    for model in (wps_model, welder_model):
        rows = model.objects.using(using)
        (rows.all() if job_ids is None else rows.filter(job_id__in=job_ids)).delete()
    wps_model.objects.using(using).bulk_create([wps_model(job_id=j, wps_id=w) for j, w in sorted(wps)],
                                               batch_size=1000)
    welder_model.objects.using(using).bulk_create([welder_model(job_id=j, welder_id=w) for j, w in sorted(people)],
                                                  batch_size=1000)


def refresh(job_ids) -> None:
    """Recompute the rows of these jobs from their welds and NCRs (inside the caller's transaction)."""
    job_ids = sorted({j for j in job_ids if j is not None})
    if job_ids:
        with transaction.atomic():
            write(job_ids)


def rebuild() -> None:
    """Every job's rows again (after a bulk load that sent no signals)."""
    with transaction.atomic():
        write(None)


def add(wps=(), welders=()) -> None:
    """Record uses that a write has just made: (job id, WPS id) and (job id, welder id) pairs; one insert each kind."""
    from inspections.models import JobWelder, JobWPS

    wps = {(j, w) for j, w in wps if j is not None and w is not None}
    welders = {(j, w) for j, w in welders if j is not None and w is not None}
    if wps:
        JobWPS.objects.bulk_create([JobWPS(job_id=j, wps_id=w) for j, w in sorted(wps)], ignore_conflicts=True)
    if welders:
        JobWelder.objects.bulk_create([JobWelder(job_id=j, welder_id=w) for j, w in sorted(welders)],
                                      ignore_conflicts=True)


def recheck(wps=(), welders=()) -> None:
    """After a write that may have ended uses: keep each pair only while a weld or NCR of the job still names it."""
    from inspections.models import NCR, JobWelder, JobWPS, Weld

    for job_id, wps_id in {(j, w) for j, w in wps if j is not None and w is not None}:
        used = (Weld.objects.filter(assembly__job_id=job_id, wps_id=wps_id).exists()
                or NCR.objects.filter(weld__assembly__job_id=job_id, repair_wps_id=wps_id).exists())
        if used:
            add(wps=[(job_id, wps_id)])
        else:
            JobWPS.objects.filter(job_id=job_id, wps_id=wps_id).delete()
    for job_id, welder_id in {(j, w) for j, w in welders if j is not None and w is not None}:
        used = (Weld.welders.through.objects.filter(weld__assembly__job_id=job_id, welder_id=welder_id).exists()
                or NCR.objects.filter(weld__assembly__job_id=job_id, repair_welder_id=welder_id).exists())
        if used:
            add(welders=[(job_id, welder_id)])
        else:
            JobWelder.objects.filter(job_id=job_id, welder_id=welder_id).delete()


# --- the signals -------------------------------------------------------------------------------------------------


def _touches(update_fields, fields) -> bool:
    return update_fields is None or bool(set(update_fields) & fields)


def _job_of_assembly(assembly_id):
    from inspections.models import Assembly

    return Assembly.objects.filter(pk=assembly_id).values_list("job_id", flat=True).first()


def _weld_job(weld):
    from inspections.models import Weld

    if Weld.assembly.is_cached(weld) and weld.assembly is not None and weld.assembly.pk == weld.assembly_id:
        return weld.assembly.job_id
    return _job_of_assembly(weld.assembly_id)


def _weld_before(sender, instance, raw=False, update_fields=None, **kwargs):
    instance._uses_before = None
    if raw or instance.pk is None or not _touches(update_fields, WPS_FIELDS):
        return
    instance._uses_before = (sender._base_manager.filter(pk=instance.pk)
                             .values_list("assembly__job_id", "wps_id").first())


def _weld_saved(sender, instance, created=False, raw=False, update_fields=None, **kwargs):
    if raw or not _touches(update_fields, WPS_FIELDS):
        return
    job_id = _weld_job(instance)
    add(wps=[(job_id, instance.wps_id)])
    before = getattr(instance, "_uses_before", None)
    instance._uses_before = None
    if before is None or before == (job_id, instance.wps_id):
        return
    old_job, old_wps = before
    recheck(wps=[(old_job, old_wps)])
    if old_job != job_id:  # moved to an assembly of another job: its welders moved with it
        welder_ids = list(sender.welders.through.objects.filter(weld_id=instance.pk)
                          .values_list("welder_id", flat=True))
        add(welders=[(job_id, w) for w in welder_ids])
        recheck(welders=[(old_job, w) for w in welder_ids])


def _weld_deleting(sender, instance, **kwargs):
    instance._uses_gone = (_weld_job(instance), instance.wps_id,
                           list(sender.welders.through.objects.filter(weld_id=instance.pk)
                                .values_list("welder_id", flat=True)))


def _weld_deleted(sender, instance, **kwargs):
    job_id, wps_id, welder_ids = getattr(instance, "_uses_gone", (None, None, []))
    recheck(wps=[(job_id, wps_id)], welders=[(job_id, w) for w in welder_ids])


def _welders_changed(sender, instance, action, reverse, pk_set, **kwargs):
    from inspections.models import Weld

    if action == "pre_clear":  # the ids are gone after the clear: remember them
        through = sender.objects.filter(**({"welder_id": instance.pk} if reverse else {"weld_id": instance.pk}))
        instance._uses_cleared = set(through.values_list("weld_id" if reverse else "welder_id", flat=True))
        return
    if action not in ("post_add", "post_remove", "post_clear"):
        return
    ids = getattr(instance, "_uses_cleared", set()) if action == "post_clear" else set(pk_set or ())
    if not ids:
        return
    if reverse:  # welder.welds.add(...): the welds' jobs
        jobs = Weld.objects.filter(pk__in=ids).values_list("assembly__job_id", flat=True).distinct()
        pairs = [(job_id, instance.pk) for job_id in jobs]
    else:
        job_id = _weld_job(instance)
        pairs = [(job_id, welder_id) for welder_id in ids]
    if action == "post_add":
        add(welders=pairs)
    else:
        recheck(welders=pairs)


def _ncr_before(sender, instance, raw=False, update_fields=None, **kwargs):
    instance._uses_before = None
    if raw or instance.pk is None or not _touches(update_fields, NCR_FIELDS):
        return
    row = (sender._base_manager.filter(pk=instance.pk)
           .values_list("weld__assembly__job_id", "repair_wps_id", "repair_welder_id", "weld_id").first())
    instance._uses_before, instance._uses_weld_before = (row[:3], row[3]) if row else (None, None)


def _ncr_saved(sender, instance, raw=False, update_fields=None, **kwargs):
    from inspections.models import Weld

    if raw or not _touches(update_fields, NCR_FIELDS):
        return
    if instance.repair_wps_id is None and instance.repair_welder_id is None and not getattr(instance, "_uses_before",
                                                                                            None):
        return  # an NCR raised (or changed) without a repair: no use added or ended
    before = getattr(instance, "_uses_before", None)
    instance._uses_before = None
    if before is not None and getattr(instance, "_uses_weld_before", None) == instance.weld_id:
        job_id = before[0]  # the same weld: its job was read with the values before
    else:
        job_id = Weld.objects.filter(pk=instance.weld_id).values_list("assembly__job_id", flat=True).first()
    add(wps=[(job_id, instance.repair_wps_id)], welders=[(job_id, instance.repair_welder_id)])
    if before is not None and before != (job_id, instance.repair_wps_id, instance.repair_welder_id):
        recheck(wps=[(before[0], before[1])], welders=[(before[0], before[2])])


def _ncr_deleted(sender, instance, **kwargs):
    from inspections.models import Weld

    if instance.repair_wps_id is None and instance.repair_welder_id is None:
        return
    job_id = Weld.objects.filter(pk=instance.weld_id).values_list("assembly__job_id", flat=True).first()
    recheck(wps=[(job_id, instance.repair_wps_id)], welders=[(job_id, instance.repair_welder_id)])


def _assembly_before(sender, instance, raw=False, update_fields=None, **kwargs):
    instance._uses_job_before = None
    if not raw and instance.pk is not None and _touches(update_fields, {"job", "job_id"}):
        instance._uses_job_before = sender._base_manager.filter(pk=instance.pk).values_list("job_id", flat=True).first()


def _assembly_saved(sender, instance, raw=False, **kwargs):
    before = getattr(instance, "_uses_job_before", None)
    instance._uses_job_before = None
    if before is not None and before != instance.job_id:  # every weld of it moved to another job
        refresh([before, instance.job_id])


def connect():
    from inspections.models import NCR, Assembly, Weld

    pre_save.connect(_weld_before, sender=Weld, dispatch_uid="job-uses-weld-before")
    post_save.connect(_weld_saved, sender=Weld, dispatch_uid="job-uses-weld-saved")
    pre_delete.connect(_weld_deleting, sender=Weld, dispatch_uid="job-uses-weld-deleting")
    post_delete.connect(_weld_deleted, sender=Weld, dispatch_uid="job-uses-weld-deleted")
    m2m_changed.connect(_welders_changed, sender=Weld.welders.through, dispatch_uid="job-uses-welders")
    pre_save.connect(_ncr_before, sender=NCR, dispatch_uid="job-uses-ncr-before")
    post_save.connect(_ncr_saved, sender=NCR, dispatch_uid="job-uses-ncr-saved")
    post_delete.connect(_ncr_deleted, sender=NCR, dispatch_uid="job-uses-ncr-deleted")
    pre_save.connect(_assembly_before, sender=Assembly, dispatch_uid="job-uses-assembly-before")
    post_save.connect(_assembly_saved, sender=Assembly, dispatch_uid="job-uses-assembly-saved")
