"""A repair is a weld too: record who welded the NCR's repair, to which WPS, and when, checked like the original.

record_repair() is the one step. It is refused unless the NCR is dispositioned for repair and has no repair yet;
the WPS must be in force on the repair date and cover the weld (inspections.services.chain.wps_check: the same
check the weld map and release use); every welder must be qualified and in continuity on that date for the weld
made to that WPS (procedures.eligibility). The record, its history row (and one on the NCR) and the continuity it
gives its welders are written in one transaction. The NCR then closes on an accepted final re-inspection made on
or after the repair date (inspections.services.ncr.close_ncrs_for).
"""

from datetime import date

from django.core.exceptions import PermissionDenied
from django.db import transaction
from django.utils import timezone

from core import history
from core.errors import Refused
from core.roles import ACTIONS, can
from inspections.models import NCR, WeldRepair
from inspections.models.ncr import Disposition, NCRState
from inspections.services import chain
from procedures import eligibility

ROLE_ACTIONS = ("weld.record", "job.manage")  # who records production welding records
REPAIRED = "repair welded"  # the NCR's history action


def may_record(user) -> bool:
    return any(can(user, action) for action in ROLE_ACTIONS)


def repair_problems(ncr, wps, welders, welded_on, filler_lot=None) -> dict[str, list[str]]:
    """Why this repair cannot be recorded as given, by form field; empty when it can."""
    problems = {}
    if filler_lot is None and ncr.weld.assembly.job.filler_lot_required:
        problems["filler_lot"] = ["This job requires the filler lot of every weld: name the lot the repair was "
                                  "welded with."]
    elif wps is not None and (mismatch := chain.filler_mismatch(filler_lot, wps)):
        problems["filler_lot"] = [mismatch[0].upper() + mismatch[1:] + "."]
    elif filler_lot is not None and isinstance(welded_on, date) and filler_lot.received_on > welded_on:
        # a lot is not welded with before the shop has it (common practice, no source)
        problems["filler_lot"] = [f"Lot {filler_lot.lot_number} was received on "
                                  f"{filler_lot.received_on.isoformat()}, after the repair date."]
    if not isinstance(welded_on, date):
        problems["welded_on"] = ["Give the date the repair was welded."]
    elif welded_on > timezone.localdate():
        problems["welded_on"] = ["The repair date cannot be in the future."]
    elif welded_on < timezone.localdate(ncr.raised_at):
        problems["welded_on"] = [f"{ncr} was raised on {timezone.localdate(ncr.raised_at).isoformat()}: the repair "
                                 "cannot be welded before it."]
    if wps is None:
        problems["wps"] = ["Name the WPS the repair was welded to."]
    if not welders:
        problems["welders"] = ["Name the welder(s) who welded the repair."]
    if problems:
        return problems
    weld = ncr.weld
    job = weld.assembly.job
    check = chain.wps_check(weld, wps, job, welded_on, label=f"Weld {weld.mark} as repaired")
    if check.errors:
        problems["wps"] = check.errors
    repaired = chain.repaired_weld(weld, wps, welded_on)
    answer = eligibility.check_work([eligibility.Work("repair", repaired, tuple(welders), welded_on)])["repair"]
    refused = [f"{c.welder.stamp}: {' '.join(c.reasons)}" for c in answer.checks if not c.allowed]
    if refused:
        problems["welders"] = [f"Not qualified and in continuity on {welded_on.isoformat()} for this weld to {wps}: "
                               + " ".join(refused)]
    return problems


def record_repair(ncr, user, *, wps, welders, welded_on, notes="", filler_lot=None):
    """Record the NCR's repair as welded; refused (Refused with messages by field) while anything does not hold."""
    if not may_record(user):
        raise PermissionDenied(f"Your role may not: {ACTIONS['weld.record'].lower()}.")
    welders = list(dict.fromkeys(welders or []))
    notes = (notes or "").strip()
    with transaction.atomic():
        locked = (NCR.objects.select_for_update(of=("self",))
                  .select_related("weld__assembly__job__client_criteria", "repair_wps", "repair_welder")
                  .get(pk=ncr.pk))
        if locked.state != NCRState.DISPOSITIONED or locked.disposition != Disposition.REPAIR:
            raise Refused(f"{locked} is {locked.get_state_display().lower()}"
                          f"{', ' + locked.get_disposition_display().lower() if locked.disposition else ''}: a repair "
                          "is recorded on an NCR dispositioned for repair.", code="state")
        if WeldRepair.objects.filter(ncr=locked).exists():
            raise Refused(f"{locked} already has its repair recorded.", code="recorded")
        problems = repair_problems(locked, wps, welders, welded_on, filler_lot)
        if problems:
            raise Refused(problems, code="repair")
        repair = WeldRepair.objects.create(weld=locked.weld, ncr=locked, wps=wps, welded_on=welded_on, notes=notes,
                                           filler_lot=filler_lot, recorded_by=user)
        repair.welders.set(welders)
        stamps = ", ".join(sorted(w.stamp for w in welders))
        said = f"Repair welded on {welded_on.isoformat()} by {stamps} to {wps}."
        if filler_lot is not None:
            said += f" Filler {filler_lot}."
        differs = []
        if locked.repair_wps_id and locked.repair_wps_id != wps.pk:
            differs.append(f"the disposition named {locked.repair_wps}")
        if locked.repair_welder_id and locked.repair_welder_id not in {w.pk for w in welders}:
            differs.append(f"the disposition named welder {locked.repair_welder.stamp}")
        if differs:
            said += " Differs from the disposition: " + "; ".join(differs) + "."
        reason = f"{said} {notes}".strip()
        history.record(repair, user, history.CREATED, reason=reason)
        history.record(locked, user, REPAIRED, reason=reason)  # no state change: "Repair welded: ..."
        eligibility.record_repair(repair)
    ncr.refresh_from_db()
    return repair


# --- what the repair forms offer ---------------------------------------------------------------------------------

CHOICES = 40  # how many covering WPSs and qualified welders a repair form lists at most (a bounded list)


def repair_choices(ncr, on=None, wps=None):
    """(WPSs, welders) a repair of the NCR's weld may name on `on` (default today): approved WPSs that cover the
    weld (chain.wps_check, of the same code as the weld's WPS when it has one) and active welders qualified and in
    continuity for the weld made to `wps` (default the NCR's repair WPS, else the weld's own). At most CHOICES
    each, in number and stamp order; the step checks whatever is sent again (repair_problems), so the list only
    spares the QA lead the 500 procedures and 200 welders that cannot be used."""
    from procedures.models import WPS, Welder

    on = on or timezone.localdate()
    weld, job = ncr.weld, ncr.weld.assembly.job
    candidates = WPS.objects.approved().order_by("number", "-revision")
    if weld.wps_id is not None:
        candidates = candidates.filter(code=weld.wps.code)
    candidates = list(candidates)  # two queries whatever the number of procedures (this and their successors)
    chain.prime_successors(candidates)
    covering = []
    for candidate in candidates:
        if not chain.wps_check(weld, candidate, job, on).errors:
            covering.append(candidate)
            if len(covering) == CHOICES:
                break
    target = wps or ncr.repair_wps or weld.wps
    welders = []
    if target is not None:
        checks = eligibility.eligible_welders(chain.repaired_weld(weld, target, on),
                                              Welder.objects.filter(active=True).order_by("stamp"), on)
        welders = [c.welder for c in checks if c.allowed][:CHOICES]
    return covering[:CHOICES], welders
