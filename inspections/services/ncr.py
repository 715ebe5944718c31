"""NCR steps: opened from a rejected inspection, dispositioned by the QA lead, closed.

open -> dispositioned (repair: to an approved WPS, by a welder qualified for the weld)
dispositioned: the repair is recorded as welded (inspections.services.repairs.record_repair: who, which WPS, when)
dispositioned -> closed (an accepted final re-inspection of the weld after the repair: close_ncrs_for)
open -> closed (use-as-is: an engineer's name and date, with the as-inspected capacity attached; or scrap)
Every step goes through core.transitions.transition (lock, check, save, history) and recomputes the assembly's
state.
"""

import copy
from datetime import date

from django.db import transaction
from django.utils import timezone

from core import seals
from core.errors import Refused
from core.roles import require
from core.transitions import transition
from inspections.models import NCR, InspectionStage
from inspections.models.ncr import Disposition, NCRState
from inspections.services import assemblies as assembly_steps
from inspections.services import capacity, chain
from inspections.services.numbering import next_in_job
from procedures.models.wps import WPSState


def _next_number(job) -> str:
    return f"NCR-{job.number}-{next_in_job(job, NCR.objects.filter(weld__assembly__job=job)):03d}"


def open_ncr(inspection, user, description):
    """Raise an NCR from a rejected inspection (one per inspection: a second call returns the first).

    The signing that rejected the weld calls this and then refreshes the assembly's state once for both.
    """
    require(user, "ncr.raise")
    description = (description or "").strip()
    if not description:
        raise Refused("Say what is nonconforming.", code="description")
    if inspection.accepted:
        raise Refused("This inspection accepted the weld: an NCR is raised from a rejected inspection.",
                      code="accepted")
    with transaction.atomic():
        existing = NCR.objects.filter(inspection=inspection).first()
        if existing is not None:
            return existing
        job = inspection.weld.assembly.job
        ncr = NCR(number=_next_number(job), weld=inspection.weld, inspection=inspection, description=description,
                  raised_by=user)
        ncr.save(user=user, reason=description)  # its created row in the history, with the description
    return ncr


def _loaded(ncr) -> NCR:
    """The NCR with the records every step reads (its inspection, weld, assembly, job), in one query."""
    loaded = NCR.objects.select_related("inspection__inspector", "weld__assembly__job__client_criteria",
                                        "weld__wps").get(pk=ncr.pk)
    loaded.inspection.weld = loaded.weld  # the same row: read once
    return loaded


def _disposition(ncr, user, disposition, to, notes, reason, check=None, **fields):
    """Open -> `to` with the disposition, its notes, who and when (the caller's NCR is brought up to date).

    Sealed in the same transaction: dispositioned, and closed too when the disposition closes it."""
    with seals.sealing():
        transition(ncr, user=user, permission="ncr.disposition", allowed_from={NCRState.OPEN}, to=to,
                   check=check, reason=reason, disposition=disposition, disposition_notes=notes,
                   dispositioned_by=user, dispositioned_at=timezone.now(), **fields)
        seals.seal(ncr, "ncr.dispositioned")
        if to == NCRState.CLOSED:
            seals.seal(ncr, "ncr.closed")
    return ncr


def repair_problems(ncr, wps, welder, on=None) -> dict[str, list[str]]:
    """Why this WPS or welder cannot be named for the repair, by field; empty when both are fine."""
    problems = {}
    if wps is None:
        problems["repair_wps"] = ["Name the WPS the repair is welded to."]
    elif wps.state != WPSState.APPROVED:
        problems["repair_wps"] = [f"{wps} is {wps.get_state_display().lower()}: a repair is welded to an approved WPS."]
    else:  # it must cover the weld too (the same check as the weld map's: inspections.services.chain)
        errors = chain.wps_check(ncr.weld, wps, ncr.weld.assembly.job, on or timezone.localdate()).errors
        if errors:
            problems["repair_wps"] = errors
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

    ncr = _loaded(ncr)

    def repairable(_locked):  # the weld a repair is judged against is the NCR's, loaded above
        problems = repair_problems(ncr, wps, welder)
        if problems:
            raise Refused(problems, code="repair")

    notes = (notes or "").strip()
    ncr = _disposition(ncr, user, Disposition.REPAIR, NCRState.DISPOSITIONED, notes,
                       f"Repair to {wps} by {welder}. {notes}".strip(), check=repairable,
                       repair_wps=wps, repair_welder=welder)
    assembly_steps.refresh_assembly_state(ncr.weld.assembly, user, f"{ncr} dispositioned: repair")
    return ncr


def capacity_calculation(ncr) -> dict:
    """The as-inspected capacity snapshot of the NCR's weld (inspections.services.capacity, AISC 360-16 J2.4 via
    inspections.strength), as stored JSON."""
    return capacity.capacity_for_inspection(ncr.inspection)


def disposition_use_as_is(ncr, user, engineer_name, approved_on, notes=""):
    """Accept the weld as it is, on an engineer's approval, with its as-inspected capacity attached; closes the NCR.

    Refused when the weld has a required strength and the weld as inspected does not carry it (or its capacity
    cannot be worked out).
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
        raise Refused(problems, code="use_as_is")
    # The calculation reads the NCR's signed inspection, which never changes: made once, checked, then stored.
    ncr = _loaded(ncr)
    calculation = capacity_calculation(ncr)
    if ncr.weld.required_strength is not None:
        if calculation.get("error"):
            raise Refused(f"This weld has a required strength: {calculation['error']}", code="capacity")
        if calculation.get("ok") is False:
            short = [f["message"] for f in calculation.get("findings", []) if not f.get("ok", True)]
            raise Refused(["As inspected, the weld does not carry its required strength: repair or scrap.", *short],
                          code="capacity")
    notes = (notes or "").strip()
    ncr = _disposition(ncr, user, Disposition.USE_AS_IS, NCRState.CLOSED, notes,
                       f"Use as is, approved by {engineer_name} on {approved_on:%Y-%m-%d}. {notes}".strip(),
                       engineer_name=engineer_name, engineer_approved_on=approved_on,
                       capacity_calculation=calculation, closed_at=timezone.now())
    assembly_steps.refresh_assembly_state(ncr.weld.assembly, user, f"{ncr} closed: use as is")
    return ncr


def disposition_scrap(ncr, user, notes):
    """Scrap the assembly the weld belongs to; closes the NCR. The piece is made again under a new record."""
    notes = (notes or "").strip()
    if not notes:
        raise Refused({"disposition_notes": ["Say why the assembly is scrapped."]}, code="scrap")
    with seals.sealing():  # the chain first, then the NCR and the assembly (core.seals, lock order)
        ncr = _disposition(_loaded(ncr), user, Disposition.SCRAP, NCRState.CLOSED, notes, f"Scrap. {notes}",
                           closed_at=timezone.now())
        assembly_steps.scrap(ncr.weld.assembly, user, f"Scrapped by {ncr}: {notes}")
    return ncr


def close_ncrs_for(inspection) -> list:
    """After an accepted final inspection: close the weld's NCRs dispositioned for repair whose repair is recorded
    as welded on or before the day of this inspection (inspections.services.repairs.record_repair). Returns those
    closed.

    Called by the inspection flow once the inspection is saved; an NCR still awaiting disposition, or whose repair
    is not recorded yet, stays open: an inspection before the repair is not an inspection of the repair.
    """
    if not inspection.accepted or inspection.stage != InspectionStage.FINAL:
        return []
    waiting = list(NCR.objects.filter(weld_id=inspection.weld_id, state=NCRState.DISPOSITIONED,
                                      disposition=Disposition.REPAIR,
                                      inspection__inspected_at__lte=inspection.inspected_at,
                                      repair__welded_on__lte=timezone.localdate(inspection.inspected_at))
                   .exclude(inspection=inspection).only("pk"))  # transition() reads each afresh, under its lock
    closed = []
    for ncr in waiting:
        closed.append(transition(ncr, user=inspection.inspector, allowed_from={NCRState.DISPOSITIONED},
                                 to=NCRState.CLOSED, reason=f"Repair accepted by re-inspection #{inspection.pk}",
                                 closed_by_inspection=inspection, closed_at=timezone.now()))
        seals.seal(ncr, "ncr.closed")  # inside the signing's transaction, which locked the chain first
    return closed  # the signing that called this refreshes the assembly's state once
