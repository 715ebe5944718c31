"""NCRs: the list (open first), one NCR with its history, and the QA lead's dispositions."""

from django.contrib import messages
from django.db.models import Case, IntegerField, Value, When
from django.http import Http404
from django.shortcuts import redirect, render
from django.views.decorators.http import require_POST, require_safe

from core import history, lists
from core.errors import Refused
from core.roles import can, role_required
from core.visibility import get_visible_or_404, visible
from core.vocabulary import JointType
from inspections.forms.jobs import RepairForm, RepairRecordForm, ScrapForm, UseAsIsForm, add_step_errors
from inspections.lists import NCR_COLUMNS, NCRFilter
from inspections.models import NCR, WeldRepair
from inspections.models.ncr import Disposition, NCRState
from inspections.services import ncr as ncr_steps
from inspections.services import repairs as repair_steps
from inspections.services.capacity import capacity_cards

FORMS = {"repair": RepairForm, "use_as_is": UseAsIsForm, "scrap": ScrapForm}


@require_safe
def ncr_list(request):
    """Open NCRs first (then newest), filtered per the list contract; without a state asked, show=all adds the
    closed ones."""
    ncrs = (visible(request.user, NCR.objects.select_related("weld__assembly__job", "raised_by"))
            .annotate(open_first=Case(When(state=NCRState.CLOSED, then=Value(1)), default=Value(0),
                                      output_field=IntegerField()))
            .order_by("open_first", "-raised_at", "-pk"))
    show = "all" if request.GET.get("show") == "all" or request.GET.get("state") else "open"
    if show != "all":
        ncrs = ncrs.exclude(state=NCRState.CLOSED)
    return lists.list_page(request, NCRFilter(request.GET, queryset=ncrs, request=request),
                           "inspections/ncr_list.html", {"show": show}, columns=NCR_COLUMNS, filename="ncrs.csv")


def _description(ncr, findings) -> list[str]:
    """The NCR's description without the lines that only repeat a finding listed below it with its source: each
    sentence is printed once."""
    messages = {f.get("message", "") for f in findings}
    return [line for line in ncr.description.splitlines()
            if line.strip() and not any(message and line.endswith(message) for message in messages)]


def _ncr_page(request, ncr, forms=None, status=200, repair_form=None):
    forms = forms or {}
    repair = WeldRepair.objects.filter(ncr=ncr).select_related("wps", "recorded_by", "filler_lot").prefetch_related(
        "welders").first()
    awaiting_repair = (ncr.state == NCRState.DISPOSITIONED and ncr.disposition == Disposition.REPAIR
                       and repair is None)
    ncr.inspection.weld = ncr.weld  # the same row, loaded with its job and WPS: the capacity card reads it
    findings = [f for f in (ncr.inspection.findings or []) if isinstance(f, dict) and not f.get("ok", True)]
    events = list(history.panel(ncr))
    for event in events:
        if event.reason and event.reason.strip() == ncr.description.strip():
            event.reason = "raised with the description above"  # shown, never saved: the record keeps it all
    system = ncr.weld.assembly.job.unit_system
    # the repair forms offer the WPSs that cover the weld and the welders qualified for it (a bounded list)
    wanted = ((ncr.state == NCRState.OPEN and can(request.user, "ncr.disposition"))
              or (awaiting_repair and repair_steps.may_record(request.user)))
    choices = repair_steps.repair_choices(ncr) if wanted else None
    context = {
        "repair": repair, "awaiting_repair": awaiting_repair,
        "may_record_repair": repair_steps.may_record(request.user),
        "repair_form": repair_form or (RepairRecordForm(ncr=ncr, choices=choices) if awaiting_repair else None),
        "ncr": ncr, "weld": ncr.weld, "assembly": ncr.weld.assembly, "job": ncr.weld.assembly.job,
        "history": events, "description": _description(ncr, findings),
        "capacities": capacity_cards(ncr=ncr) if ncr.weld.joint_type == JointType.FILLET else [],
        "forms": {kind: forms.get(kind) or cls(prefix=kind, **({"choices": choices} if kind == "repair" else {}))
                  for kind, cls in FORMS.items()},
        "findings": findings, "recorded": ncr.inspection.recorded(system),
    }
    return render(request, "inspections/ncr_detail.html", context, status=status)


def _get(request, pk):
    return get_visible_or_404(request.user, NCR.objects.select_related(
        "weld__assembly__job", "weld__wps", "inspection__inspector", "raised_by", "repair_wps", "repair_welder",
        "dispositioned_by", "closed_by_inspection"), pk=pk)


@require_safe
def ncr_detail(request, pk):
    return _ncr_page(request, _get(request, pk))


@role_required("weld.record", "job.manage")
@require_POST
def ncr_repair(request, pk):
    """Record the NCR's repair as welded: who, to which WPS, when (checked like the original weld)."""
    ncr = _get(request, pk)
    form = RepairRecordForm(request.POST, ncr=ncr)
    if form.is_valid():
        data = form.cleaned_data
        try:
            repair_steps.record_repair(ncr, request.user, wps=data["wps"], welders=list(data["welders"]),
                                       welded_on=data["welded_on"], notes=data["notes"],
                                       filler_lot=data.get("filler_lot"))
        except Refused as exc:
            add_step_errors(form, exc)
        else:
            messages.success(request, f"{ncr}: repair recorded. A final re-inspection of the weld closes the NCR.")
            return redirect(ncr)
    return _ncr_page(request, _get(request, pk), status=400, repair_form=form)


@role_required("ncr.disposition")
@require_POST
def ncr_disposition(request, pk, kind):
    if kind not in FORMS:
        raise Http404("No such disposition.")
    ncr = _get(request, pk)
    form = FORMS[kind](request.POST, prefix=kind)
    if form.is_valid():
        data = form.cleaned_data
        try:
            if kind == "repair":
                ncr_steps.disposition_repair(ncr, request.user, data["repair_wps"], data["repair_welder"],
                                             data["disposition_notes"])
            elif kind == "use_as_is":
                ncr_steps.disposition_use_as_is(ncr, request.user, data["engineer_name"],
                                                data["engineer_approved_on"], data["disposition_notes"])
            else:
                ncr_steps.disposition_scrap(ncr, request.user, data["disposition_notes"])
        except Refused as exc:
            add_step_errors(form, exc)
        else:
            messages.success(request, f"{ncr} dispositioned.")
            return redirect(ncr)
    return _ncr_page(request, _get(request, pk), forms={kind: form}, status=400)
