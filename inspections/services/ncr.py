"""NCR steps: opened from a rejected inspection, dispositioned by the QA lead, closed.

open -> dispositioned (repair: to an approved WPS, by a welder qualified for the weld)
dispositioned -> closed (an accepted final re-inspection of the weld: close_ncrs_for)
open -> closed (use-as-is: an engineer's name and date, with the as-inspected capacity attached; or scrap)
Every step writes an NCREvent and recomputes the assembly's state.
"""

import copy
from datetime import date

from django.db import transaction
from django.utils import timezone

from inspections.models import NCR, InspectionStage
from inspections.models.ncr import Disposition, NCREvent, NCRState
from inspections.services import StepRefused
from inspections.services import assemblies as assembly_steps
from legwork.roles import require
from procedures.models.wps import WPSState


def _event(ncr, old, user, reason):
    NCREvent.objects.create(ncr=ncr, from_state=old, to_state=ncr.state, reason=reason, user=user)


def _locked(ncr) -> NCR:
    # Lock the NCR so two QA leads cannot disposition it twice from the same stale page.
    return NCR.objects.select_for_update().select_related("weld__assembly__job", "inspection").get(pk=ncr.pk)


def _next_number(job) -> str:
    # The caller holds the write transaction; the unique constraint on number backs this up.
    count = NCR.objects.filter(weld__assembly__job=job).count()
    return f"NCR-{job.number}-{count + 1:03d}"


def open_ncr(inspection, user, description):
    """Raise an NCR from a rejected inspection (one per inspection: a second call returns the first)."""
    require(user, "ncr.raise")
    description = (description or "").strip()
    if not description:
        raise StepRefused("Say what is nonconforming.", code="description")
    if inspection.accepted:
        raise StepRefused("This inspection accepted the weld: an NCR is raised from a rejected inspection.",
                          code="accepted")
    with transaction.atomic():
        existing = NCR.objects.filter(inspection=inspection).first()
        if existing is not None:
            return existing
        job = inspection.weld.assembly.job
        ncr = NCR(number=_next_number(job), weld=inspection.weld, inspection=inspection, description=description,
                  raised_by=user)
        ncr.save()
        _event(ncr, "", user, description)
    assembly_steps.refresh_assembly_state(inspection.weld.assembly, user, f"{ncr} raised")
    return ncr


def _check_open(ncr):
    if ncr.state != NCRState.OPEN:
        raise StepRefused(f"{ncr} is {ncr.get_state_display().lower()}; only an open NCR takes a disposition.",
                          code="state")


def _disposition_fields(ncr, user, disposition, notes):
    ncr.disposition = disposition
    ncr.disposition_notes = (notes or "").strip()
    ncr.dispositioned_by = user
    ncr.dispositioned_at = timezone.now()
    return ["state", "disposition", "disposition_notes", "dispositioned_by", "dispositioned_at"]


def repair_problems(ncr, wps, welder, on=None) -> dict[str, list[str]]:
    """Why this WPS or welder cannot be named for the repair, by field; empty when both are fine."""
    problems = {}
    if wps is None:
        problems["repair_wps"] = ["Name the WPS the repair is welded to."]
    elif wps.state != WPSState.APPROVED:
        problems["repair_wps"] = [f"{wps} is {wps.get_state_display().lower()}: a repair is welded to an approved WPS."]
    if welder is None:
        problems["repair_welder"] = ["Name the welder who makes the repair."]
    else:
        # The repair is welded to the repair WPS: judge the welder for the weld made with that procedure.
        repaired = copy.copy(ncr.weld)
        if wps is not None:
            repaired.wps = wps
        check = assembly_steps.check_welder(welder, repaired, on=on or timezone.localdate())
        if not check.allowed:
            problems["repair_welder"] = [f"{welder} may not make this weld: " + " ".join(check.reasons)]
    return problems


def disposition_repair(ncr, user, wps, welder, notes=""):
    """Repair to an approved WPS by a welder qualified for the weld; the NCR closes on an accepted re-inspection."""
    require(user, "ncr.disposition")
    with transaction.atomic():
        locked = _locked(ncr)
        _check_open(locked)
        problems = repair_problems(locked, wps, welder)
        if problems:
            raise StepRefused(problems, code="repair")
        old = locked.state
        fields = _disposition_fields(locked, user, Disposition.REPAIR, notes)
        locked.state = NCRState.DISPOSITIONED
        locked.repair_wps, locked.repair_welder = wps, welder
        locked.save(update_fields=[*fields, "repair_wps", "repair_welder"])
        _event(locked, old, user, f"Repair to {wps} by {welder}. {locked.disposition_notes}".strip())
    assembly_steps.refresh_assembly_state(locked.weld.assembly, user, f"{locked} dispositioned: repair")
    return locked


def _capacity():
    """inspections.services.capacity (over inspections.strength), or None while the strength engine is missing."""
    try:
        from inspections.services import capacity
    except ImportError:
        return None
    return capacity


def capacity_calculation(ncr) -> dict | None:
    """The as-inspected capacity snapshot of the NCR's weld (inspections.services.capacity, AISC 360-16 J2.4 via
    inspections.strength), as stored JSON; None when the strength engine is not there."""
    capacity = _capacity()
    if capacity is None:
        return None
    return capacity.capacity_for_inspection(ncr.inspection)


def disposition_use_as_is(ncr, user, engineer_name, approved_on, notes=""):
    """Accept the weld as it is, on an engineer's approval, with its as-inspected capacity attached; closes the NCR.

    Refused when the weld has a required strength and either the strength engine is missing or the weld as
    inspected does not carry it.
    """
    require(user, "ncr.disposition")
    engineer_name = (engineer_name or "").strip()
    problems = {}
    if not engineer_name:
        problems["engineer_name"] = ["Use-as-is needs the name of the engineer who approves it."]
    if not isinstance(approved_on, date):
        problems["engineer_approved_on"] = ["Give the date the engineer approved it."]
    elif approved_on > timezone.localdate():
        problems["engineer_approved_on"] = ["The approval date cannot be in the future."]
    if problems:
        raise StepRefused(problems, code="use_as_is")
    with transaction.atomic():
        locked = _locked(ncr)
        _check_open(locked)
        calculation = capacity_calculation(locked)
        if locked.weld.required_strength is not None:
            if calculation is None:
                raise StepRefused("This weld has a required strength, and the strength calculation is not "
                                  "available: use-as-is cannot be approved without it.", code="no_strength")
            if calculation.get("error"):
                raise StepRefused(f"This weld has a required strength: {calculation['error']}", code="capacity")
            if calculation.get("ok") is False:
                short = [f["message"] for f in calculation.get("findings", []) if not f.get("ok", True)]
                raise StepRefused(["As inspected, the weld does not carry its required strength: repair or scrap.",
                                   *short], code="capacity")
        old = locked.state
        fields = _disposition_fields(locked, user, Disposition.USE_AS_IS, notes)
        locked.state = NCRState.CLOSED
        locked.engineer_name, locked.engineer_approved_on = engineer_name, approved_on
        locked.capacity_calculation = calculation
        locked.closed_at = timezone.now()
        locked.save(update_fields=[*fields, "engineer_name", "engineer_approved_on", "capacity_calculation",
                                   "closed_at"])
        _event(locked, old, user, f"Use as is, approved by {engineer_name} on {approved_on:%Y-%m-%d}. "
                                  f"{locked.disposition_notes}".strip())
    assembly_steps.refresh_assembly_state(locked.weld.assembly, user, f"{locked} closed: use as is")
    return locked


def disposition_scrap(ncr, user, notes):
    """Scrap the assembly the weld belongs to; closes the NCR. The piece is made again under a new record."""
    require(user, "ncr.disposition")
    if not (notes or "").strip():
        raise StepRefused({"disposition_notes": ["Say why the assembly is scrapped."]}, code="scrap")
    with transaction.atomic():
        locked = _locked(ncr)
        _check_open(locked)
        old = locked.state
        fields = _disposition_fields(locked, user, Disposition.SCRAP, notes)
        locked.state = NCRState.CLOSED
        locked.closed_at = timezone.now()
        locked.save(update_fields=[*fields, "closed_at"])
        _event(locked, old, user, f"Scrap. {locked.disposition_notes}")
        assembly_steps.scrap(locked.weld.assembly, user, f"Scrapped by {locked}: {locked.disposition_notes}")
    return locked


_repair_waiting_sql = assembly_steps.CompiledQuery(
    NCR, lambda weld_id: NCR.objects.filter(weld_id=weld_id, state=NCRState.DISPOSITIONED).values_list("pk")[:1])


def close_ncrs_for(inspection) -> list:
    """After an accepted final inspection: close the weld's NCRs dispositioned for repair. Returns those closed.

    Called by the inspection flow once the inspection is saved; an NCR still awaiting disposition stays open.
    """
    if not inspection.accepted or inspection.stage != InspectionStage.FINAL:
        return []
    # The usual accepted inspection has no repair waiting on it: one plain EXISTS, no savepoint, no lock.
    if not _repair_waiting_sql.rows(inspection.weld_id):
        return []
    closed = []
    with transaction.atomic():
        waiting = (NCR.objects.select_for_update()
                   .filter(weld_id=inspection.weld_id, state=NCRState.DISPOSITIONED, disposition=Disposition.REPAIR,
                           inspection__inspected_at__lte=inspection.inspected_at)
                   .exclude(inspection=inspection))
        for ncr in waiting:
            old = ncr.state
            ncr.state = NCRState.CLOSED
            ncr.closed_by_inspection = inspection
            ncr.closed_at = timezone.now()
            ncr.save(update_fields=["state", "closed_by_inspection", "closed_at"])
            _event(ncr, old, inspection.inspector, f"Repair accepted by re-inspection #{inspection.pk}")
            closed.append(ncr)
    if closed:
        assembly_steps.refresh_assembly_state(inspection.weld.assembly, inspection.inspector,
                                              f"{', '.join(str(n) for n in closed)} closed by re-inspection")
    return closed
