"""WPS and PQR pages: list, detail, draft and edit, the live review panel, state changes, the printed WPS.

Views stay thin: the forms read the input, the WPS model moves states (and refuses what its state, its
review or the user's role does not allow), the engines judge. Reading needs only a login; every write
names its action in legwork.roles.
"""

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.core.paginator import Paginator
from django.db import transaction
from django.db.models import Prefetch, Q
from django.shortcuts import get_object_or_404, redirect, render
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from legwork import units
from legwork.pdf import pdf_response, render_pdf
from legwork.roles import role_required
from procedures.electrodes import decode
from procedures.forms.wps import PQRForm, ReasonForm, WPSForm
from procedures.models.base import JointType, Process
from procedures.models.wps import PQR, WPS, ProcedureEvent, ProcedureStateError, WPSState

PAGE_SIZE = 25


# --- helpers ---------------------------------------------------------------------------------------

def _wps_queryset():
    return WPS.objects.select_related("approved_by", "created_by", "supersedes").prefetch_related(
        Prefetch("pqrs", queryset=PQR.objects.order_by("number")),
        Prefetch("events", queryset=ProcedureEvent.objects.select_related("user")),
    )


def _get_wps(pk):
    return get_object_or_404(_wps_queryset(), pk=pk)


def _refuse_unless_editable(request, wps):
    """A redirect with the reason when the WPS may not be edited in place, else None."""
    if wps.is_editable:
        return None
    messages.error(request, f"{wps} is {wps.get_state_display().lower()} and cannot be changed."
                   + (" Start a new revision from it." if wps.state == WPSState.APPROVED else ""))
    return redirect(wps)


def _range(low, high, fmt):
    if low is None and high is None:
        return "—"
    if low is None or high is None or low == high:
        return fmt(low if low is not None else high)
    return f"{fmt(low)} to {fmt(high)}"


def _electrode(wps):
    try:
        return decode(wps.electrode), ""
    except ValueError as exc:
        return None, str(exc)


def variables(wps):
    """Every variable of the WPS as (section, [(label, text)]) in its own unit system; pages and the PDF."""
    system = wps.unit_system

    def length(value):
        return units.format_length(value, system) if value is not None else "—"

    def temp(value):
        return units.format_temperature(value, system) if value is not None else "—"

    def speed(value):
        return units.format_speed(value, system)

    def flow(value):
        return units.format_flow(value, system)

    def plain(unit):
        return lambda value: f"{units._plain(value)} {unit}"

    heat = wps.heat_input_range()
    process = wps.get_process_display()
    if wps.process == Process.GMAW and wps.transfer:
        process += f"; transfer: {wps.get_transfer_display()}"
    return [
        ("Process and filler metal", [
            ("Process", process),
            ("Electrode", wps.electrode),
            ("Electrode diameter", diameter(wps.electrode_diameter, system)),
            ("Current and polarity", wps.get_current_display()),
        ]),
        ("Electrical and travel", [
            ("Current", _range(wps.amperage_min, wps.amperage_max, plain("A"))),
            ("Arc voltage", _range(wps.voltage_min, wps.voltage_max, plain("V"))),
            ("Wire feed speed", _range(wps.wire_feed_min, wps.wire_feed_max, speed)),
            ("Travel speed", _range(wps.travel_speed_min, wps.travel_speed_max, speed)),
            ("Heat input", _heat_text(heat, system)),
            ("Contact tip to work (stick-out)", _range(wps.ctwd_min, wps.ctwd_max, length)),
        ]),
        ("Technique", [
            ("Technique", wps.get_technique_display()),
            ("Passes", wps.get_passes_display()),
            ("Work angle", wps.work_angle or "—"),
            ("Travel angle", wps.travel_angle or "—"),
            ("Interpass cleaning", wps.interpass_cleaning or "—"),
            ("Shielding gas", wps.shielding_gas or "None (self-shielded or flux)"),
            ("Gas flow", _range(wps.gas_flow_min, wps.gas_flow_max, flow)),
        ]),
        ("Joints and base metal", [
            ("Positions", ", ".join(wps.position_list) or "—"),
            ("Joint types", ", ".join(JointType(j).label for j in wps.joint_type_list if j in JointType.values) or "—"),
            ("Base metals", wps.base_metals or "—"),
            ("Base metal thickness", _range(wps.thickness_min, wps.thickness_max, length)),
            ("Fillet size", _range(wps.fillet_size_min, wps.fillet_size_max, length)),
            ("Largest single-pass fillet", length(wps.single_pass_size_max)),
        ]),
        ("Temperatures", [
            ("Minimum preheat", temp(wps.preheat_min)),
            ("Maximum interpass", temp(wps.interpass_max)),
        ]),
    ]


def diameter(value, system):
    """Wire is sold by decimal inch (0.045"), rod by fraction (1/8"): a fraction only when it is exact."""
    if value is None:
        return "—"
    if system == "US" and not units.inch_fraction(value.inch)[3]:
        return f'{units._plain(value.inch)}"'
    return units.format_length(value, system)


def in_order(codes, order=("F", "H", "V", "OH")):
    return ", ".join(sorted(codes, key=lambda c: order.index(c) if c in order else len(order)))


def _heat_text(heat, system):
    if heat is None:
        return "— (needs volts, amps and travel speed ranges)"
    other = "SI" if system == "US" else "US"
    return (f"{units.format_heat_input(heat.minimum, system)} to {units.format_heat_input(heat.maximum, system)} "
            f"({units.format_heat_input(heat.minimum, other)} to {units.format_heat_input(heat.maximum, other)})")


def _detail_context(wps):
    findings = wps.findings()
    decoded, decode_error = _electrode(wps)
    return {
        "wps": wps,
        "findings": findings,
        "errors": [f for f in findings if f.severity == "error"],
        "blockers": wps.approval_blockers(findings),
        "sections": variables(wps),
        "decoded": decoded,
        "decoded_positions": in_order(decoded.positions) if decoded else "",
        "decoded_currents": in_order(decoded.currents, ("AC", "DCEP", "DCEN")) if decoded else "",
        "decoded_processes": ", ".join(sorted(decoded.processes)) if decoded else "",
        "decode_error": decode_error,
        "pqrs": list(wps.pqrs.all()),
        "events": list(wps.events.all()),
        "heat": wps.heat_input_range(),
        "next_revision": WPS.objects.filter(supersedes=wps).only("pk", "number", "revision").first(),
    }


# --- WPS list, detail ------------------------------------------------------------------------------

@require_safe
def wps_list(request):
    """All procedures, searchable by number, title and electrode; filtered by state, process, electrode, metal."""
    wps = WPS.objects.select_related("approved_by")
    q = request.GET.get("q", "").strip()[:80]
    if q:
        wps = wps.filter(Q(number__icontains=q) | Q(title__icontains=q) | Q(electrode__icontains=q))
    filters = {
        "state": request.GET.get("state", ""),
        "process": request.GET.get("process", ""),
        "electrode": request.GET.get("electrode", "").strip()[:40],
        "base_metal": request.GET.get("base_metal", "").strip()[:80],
    }
    if filters["state"] in WPSState.values:
        wps = wps.filter(state=filters["state"])
    if filters["process"] in Process.values:
        wps = wps.filter(process=filters["process"])
    if filters["electrode"]:
        wps = wps.filter(electrode__iexact=filters["electrode"])
    if filters["base_metal"]:
        wps = wps.filter(base_metals__icontains=filters["base_metal"])
    page = Paginator(wps.order_by("number", "-revision"), PAGE_SIZE).get_page(request.GET.get("page"))
    electrodes = WPS.objects.order_by("electrode").values_list("electrode", flat=True).distinct()
    return render(request, "procedures/wps_list.html", {
        "page": page, "q": q, "filters": filters, "states": WPSState.choices, "processes": Process.choices,
        "electrodes": list(electrodes), "query": _query_without_page(request),
    })


@require_safe
def wps_detail(request, pk):
    return render(request, "procedures/wps_detail.html", _detail_context(_get_wps(pk)))


# --- draft and edit, with the live review panel -----------------------------------------------------

def _review_context(form):
    """Review what the form holds now, valid or not: fields with errors are left out of the review."""
    candidate = form.instance
    pqrs = None
    form_errors = []
    if form.is_bound:
        form.is_valid()
        concrete = {f.name for f in WPS._meta.concrete_fields}
        for name in form.errors:
            if name in concrete:
                field = WPS._meta.get_field(name)
                setattr(candidate, name, None if field.null or not field.empty_strings_allowed else "")
        if "pqrs" not in form.errors:
            pqrs = list(form.cleaned_data.get("pqrs") or [])
        labels = {name: field.label for name, field in form.fields.items()}
        form_errors = [(labels.get(name, "Form"), message) for name, errs in form.errors.items() for message in errs]
    elif candidate.pk is None:
        return {"findings": None}
    findings = candidate.findings(pqrs=pqrs)
    return {
        "findings": findings,
        "blockers": candidate.approval_blockers(findings),
        "form_errors": form_errors,
        "heat": _heat_text(candidate.heat_input_range(), candidate.unit_system or "US"),
    }


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def wps_create(request):
    form = WPSForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        with transaction.atomic():
            wps = form.save(commit=False)
            wps.created_by = request.user
            wps.save()
            form.save_m2m()
            wps.record_drafted(request.user)
        messages.success(request, f"{wps} saved as a draft.")
        return redirect(wps)
    return render(request, "procedures/wps_form.html", {"form": form, "wps": None, **_review_context(form)})


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def wps_edit(request, pk):
    wps = get_object_or_404(WPS, pk=pk)
    refused = _refuse_unless_editable(request, wps)
    if refused:
        return refused
    form = WPSForm(request.POST or None, instance=wps)
    if request.method == "POST" and form.is_valid():
        try:
            form.save()
        except ProcedureStateError as exc:  # submitted by someone else between the page load and the save
            messages.error(request, " ".join(exc.messages))
            return redirect(wps)
        messages.success(request, f"{wps} saved.")
        return redirect(wps)
    return render(request, "procedures/wps_form.html", {"form": form, "wps": wps, **_review_context(form)})


@require_POST
@role_required("procedure.draft")
def wps_review(request, pk=None):
    """The review panel for what the engineer has typed so far (htmx posts the form here as they type)."""
    instance = get_object_or_404(WPS, pk=pk) if pk else WPS()
    if pk and not instance.is_editable:
        raise PermissionDenied(f"{instance} is {instance.get_state_display().lower()}; it is not reviewed as a draft.")
    form = WPSForm(request.POST, instance=instance)
    return render(request, "procedures/wps_form.html#review-panel", _review_context(form))


# --- state changes ---------------------------------------------------------------------------------

def _transition(request, wps, move, done):
    try:
        move()
    except ProcedureStateError as exc:
        messages.error(request, " ".join(exc.messages))
    else:
        messages.success(request, done)
    return redirect(wps)


@require_POST
@role_required("procedure.submit")
def wps_submit(request, pk):
    wps = get_object_or_404(WPS, pk=pk)
    return _transition(request, wps, lambda: wps.submit(request.user), f"{wps} submitted for approval.")


@require_POST
@role_required("procedure.approve")
def wps_approve(request, pk):
    wps = get_object_or_404(WPS, pk=pk)
    return _transition(request, wps, lambda: wps.approve(request.user), f"{wps} approved.")


@require_POST
@role_required("procedure.draft")
def wps_new_revision(request, pk):
    wps = get_object_or_404(WPS, pk=pk)
    try:
        revision = wps.new_revision(request.user)
    except ProcedureStateError as exc:
        messages.error(request, " ".join(exc.messages))
        return redirect(wps)
    messages.success(request, f"{revision} drafted from revision {wps.revision}. It supersedes it once approved.")
    return redirect("procedures:wps_edit", pk=revision.pk)


def _reason_page(request, pk, action, state, title, verb, move):
    """A page asking why (withdraw, return to the engineer): GET shows the form, POST acts."""
    wps = get_object_or_404(WPS, pk=pk)
    if wps.state != state:
        messages.error(request, f"{wps} is {wps.get_state_display().lower()}; nothing to {verb}.")
        return redirect(wps)
    form = ReasonForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        try:
            move(wps, form.cleaned_data["reason"])
        except ProcedureStateError as exc:
            form.add_error("reason", exc)
        else:
            messages.success(request, f"{wps}: {title.lower()} done.")
            return redirect(wps)
    return render(request, "procedures/wps_reason.html", {"wps": wps, "form": form, "title": title, "verb": verb})


@require_http_methods(["GET", "POST"])
@role_required("procedure.withdraw")
def wps_withdraw(request, pk):
    return _reason_page(request, pk, "procedure.withdraw", WPSState.APPROVED, "Withdraw", "withdraw",
                        lambda wps, reason: wps.withdraw(request.user, reason))


@require_http_methods(["GET", "POST"])
@role_required("procedure.approve")
def wps_return(request, pk):
    return _reason_page(request, pk, "procedure.approve", WPSState.SUBMITTED, "Return to the engineer", "return",
                        lambda wps, reason: wps.return_to_draft(request.user, reason))


# --- print -----------------------------------------------------------------------------------------

def wps_snapshot(wps):
    """Everything the printed WPS shows, gathered before rendering (the renderer never queries)."""
    context = _detail_context(wps)
    context["approved"] = wps.state in (WPSState.APPROVED, WPSState.SUPERSEDED) and wps.approved_by_id is not None
    return context


@require_safe
def wps_pdf(request, pk):
    wps = _get_wps(pk)
    filename = f"WPS-{wps.number}-rev{wps.revision}.pdf".replace(" ", "_").replace("/", "-")
    return pdf_response(render_pdf("pdf/wps.html", wps_snapshot(wps), filename))


# --- PQR -------------------------------------------------------------------------------------------

@require_safe
def pqr_list(request):
    pqrs = PQR.objects.order_by("number")
    q = request.GET.get("q", "").strip()[:80]
    if q:
        pqrs = pqrs.filter(Q(number__icontains=q) | Q(electrode__icontains=q) | Q(base_metal__icontains=q))
    page = Paginator(pqrs, PAGE_SIZE).get_page(request.GET.get("page"))
    return render(request, "procedures/pqr_list.html", {"page": page, "q": q, "query": _query_without_page(request)})


def pqr_rows(pqr):
    """The coupon's values as (label, text) in the PQR's unit system."""
    system = pqr.unit_system
    heat = pqr.heat_input
    other = "SI" if system == "US" else "US"
    return [
        ("Process", pqr.get_process_display()),
        ("Electrode", pqr.electrode),
        ("Electrode diameter", diameter(pqr.electrode_diameter, system)),
        ("Current and polarity", pqr.get_current_display()),
        ("Current", f"{units._plain(pqr.amperage)} A"),
        ("Arc voltage", f"{units._plain(pqr.voltage)} V"),
        ("Travel speed", units.format_speed(pqr.travel_speed, system)),
        ("Heat input", f"{units.format_heat_input(heat, system)} ({units.format_heat_input(heat, other)})"
         if heat else "—"),
        ("Test position", pqr.position),
        ("Base metal", pqr.base_metal),
        ("Coupon thickness", units.format_length(pqr.thickness, system)),
        ("Shielding gas", pqr.shielding_gas or "—"),
        ("Preheat", units.format_temperature(pqr.preheat, system) if pqr.preheat else "—"),
    ]


@require_safe
def pqr_detail(request, pk):
    pqr = get_object_or_404(PQR, pk=pk)
    procedures = pqr.procedures.order_by("number", "-revision")
    return render(request, "procedures/pqr_detail.html", {"pqr": pqr, "procedures": procedures,
                                                          "rows": pqr_rows(pqr)})


def _query_without_page(request):
    query = request.GET.copy()
    query.pop("page", None)
    return query.urlencode()


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def pqr_create(request):
    form = PQRForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        pqr = form.save()
        messages.success(request, f"{pqr} recorded.")
        return redirect(pqr)
    return render(request, "procedures/pqr_form.html", {"form": form})

