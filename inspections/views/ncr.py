"""NCRs: the list (open first), one NCR with its history, and the QA lead's dispositions."""

from django.contrib import messages
from django.db.models import Case, IntegerField, Value, When
from django.http import Http404
from django.shortcuts import redirect, render
from django.views.decorators.http import require_POST, require_safe

from core.errors import Refused
from core.history import history_of
from core.roles import role_required
from core.visibility import get_visible_or_404, visible
from core.vocabulary import JointType
from inspections.forms.jobs import RepairForm, ScrapForm, UseAsIsForm, add_step_errors
from inspections.models import NCR
from inspections.models.ncr import NCRState
from inspections.services import ncr as ncr_steps
from inspections.services.capacity import capacity_cards

FORMS = {"repair": RepairForm, "use_as_is": UseAsIsForm, "scrap": ScrapForm}


@require_safe
def ncr_list(request):
    show = request.GET.get("show", "open")
    ncrs = (visible(request.user, NCR.objects.select_related("weld__assembly__job", "raised_by"))
            .annotate(open_first=Case(When(state=NCRState.CLOSED, then=Value(1)), default=Value(0),
                                      output_field=IntegerField()))
            .order_by("open_first", "-raised_at", "-pk"))
    if show != "all":
        ncrs = ncrs.exclude(state=NCRState.CLOSED)
    return render(request, "inspections/ncr_list.html", {"ncrs": ncrs, "show": show})


def _ncr_page(request, ncr, forms=None, status=200):
    forms = forms or {}
    context = {
        "ncr": ncr, "weld": ncr.weld, "assembly": ncr.weld.assembly, "job": ncr.weld.assembly.job,
        "history": list(history_of(ncr)),
        "capacities": capacity_cards(ncr=ncr) if ncr.weld.joint_type == JointType.FILLET else [],
        "forms": {kind: forms.get(kind) or cls(prefix=kind) for kind, cls in FORMS.items()},
        "findings": [f for f in (ncr.inspection.findings or []) if isinstance(f, dict) and not f.get("ok", True)],
    }
    return render(request, "inspections/ncr_detail.html", context, status=status)


def _get(request, pk):
    return get_visible_or_404(request.user, NCR.objects.select_related(
        "weld__assembly__job", "weld__wps", "inspection__inspector", "raised_by", "repair_wps", "repair_welder",
        "dispositioned_by", "closed_by_inspection"), pk=pk)


@require_safe
def ncr_detail(request, pk):
    return _ncr_page(request, _get(request, pk))


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
