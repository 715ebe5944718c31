"""WPS and PQR pages: list, detail, draft and edit, the live review panel, state changes, the printed WPS.

Views stay thin: the forms read the input, the WPS model moves states (and refuses what its state, its
review or the user's role does not allow), the engines judge. Reading needs only a login; every write
names its action in core.roles.
"""

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.db.models import Prefetch
from django.forms.utils import pretty_name
from django.shortcuts import redirect, render
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import history, lists
from core.errors import Refused
from core.pdf import paper_for, pdf_response, render_pdf
from core.roles import role_required
from core.visibility import get_visible_or_404, visible
from procedures import printing
from procedures.forms.wps import PQRForm, ReasonForm, WPSForm
from procedures.lists import PQR_COLUMNS, WPS_COLUMNS, PQRFilter, WPSFilter
from procedures.models.wps import PQR, WPS, WPSState
from procedures.services import wps as wps_steps

# --- helpers ---------------------------------------------------------------------------------------

def _wps_queryset():
    return WPS.objects.select_related("approved_by", "created_by", "supersedes").prefetch_related(
        Prefetch("pqrs", queryset=PQR.objects.order_by("number")),
    )


def _get_wps(request, pk):
    return get_visible_or_404(request.user, _wps_queryset(), pk=pk)


def _refuse_unless_editable(request, wps):
    """A redirect with the reason when the WPS may not be edited in place, else None."""
    if wps.is_editable:
        return None
    messages.error(request, f"{wps} is {wps.get_state_display().lower()} and cannot be changed."
                   + (" Start a new revision from it." if wps.state == WPSState.APPROVED else ""))
    return redirect(wps)


# --- WPS list, detail ------------------------------------------------------------------------------

@require_safe
def wps_list(request):
    """All procedures: searchable by number, title and electrode; filtered by state, process, electrode, metal."""
    wps = visible(request.user, WPS.objects.select_related("approved_by")).order_by("number", "-revision")
    return lists.list_page(request, WPSFilter(request.GET, queryset=wps), "procedures/wps_list.html",
                           columns=WPS_COLUMNS, filename="procedures.csv")


@require_safe
def wps_detail(request, pk):
    return render(request, "procedures/wps_detail.html", printing.wps_context(_get_wps(request, pk)))


# --- draft and edit, with the live review panel -----------------------------------------------------

def _review_context(form):
    """Review what the form holds now, valid or not: fields with errors are left out of the review."""
    candidate = form.instance
    pqrs = None
    form_errors = []
    if form.is_bound:
        form.is_valid()
        concrete = {f.name for f in WPS._meta.concrete_fields}
        # A stale save's notes (who changed a field meanwhile) are not mistakes in the input: not reviewed as such.
        errors = {name: [e for e in found if e.code != "stale"] for name, found in form.errors.as_data().items()}
        errors = {name: [m for e in found for m in e.messages] for name, found in errors.items() if found}
        for name in errors:
            if name in concrete:
                field = WPS._meta.get_field(name)
                setattr(candidate, name, None if field.null or not field.empty_strings_allowed else "")
        if "pqrs" not in errors:
            pqrs = list(form.cleaned_data.get("pqrs") or [])
        labels = {name: field.label or pretty_name(name) for name, field in form.fields.items()}
        form_errors = [(labels.get(name, "The form"), message) for name, errs in errors.items() for message in errs]
    elif candidate.pk is None:
        return {"findings": None}
    findings = candidate.findings(pqrs=pqrs)
    return {
        "findings": findings,
        "blockers": candidate.approval_blockers(findings),
        "form_errors": form_errors,
        "heat": printing.heat_text(candidate.heat_input_range(), candidate.unit_system or "US"),
    }


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def wps_create(request):
    form = WPSForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        form.instance.created_by = request.user
        wps = form.save()
        messages.success(request, f"{wps} saved as a draft.")
        return redirect(wps)
    return render(request, "procedures/wps_form.html", {"form": form, "wps": None, **_review_context(form)})


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def wps_edit(request, pk):
    wps = get_visible_or_404(request.user, WPS, pk=pk)
    if request.method == "GET":
        refused = _refuse_unless_editable(request, wps)
        if refused:
            return refused
    form = WPSForm(request.POST or None, instance=wps)
    status = 200
    if request.method == "POST" and not wps.is_editable:  # submitted or approved since the page was opened
        form.is_valid()
        form.add_error(None, WPS.lock.refusal(wps, "changed"))
        status = 409
    elif request.method == "POST" and form.is_valid():
        # Compared and set on the version the page was opened at: a save by someone else meanwhile, or a
        # submission, refuses this one with the input kept (core.forms.VersionedModelForm).
        if form.save_or_explain() is not None:
            messages.success(request, f"{wps} saved.")
            return redirect(wps)
        status = 409
    return render(request, "procedures/wps_form.html", {"form": form, "wps": wps, **_review_context(form)},
                  status=status)


@require_POST
@role_required("procedure.draft")
def wps_review(request, pk=None):
    """The review panel for what the engineer has typed so far (htmx posts the form here as they type)."""
    instance = get_visible_or_404(request.user, WPS, pk=pk) if pk else WPS()
    if pk and not instance.is_editable:
        raise PermissionDenied(f"{instance} is {instance.get_state_display().lower()}; it is not reviewed as a draft.")
    form = WPSForm(request.POST, instance=instance)
    return render(request, "procedures/wps_form.html#review-panel", _review_context(form))


# --- state changes ---------------------------------------------------------------------------------

def _transition(request, wps, move, done):
    try:
        move()
    except Refused as exc:
        messages.error(request, " ".join(exc.messages))
    else:
        messages.success(request, done)
    return redirect(wps)


@require_POST
@role_required("procedure.submit")
def wps_submit(request, pk):
    wps = get_visible_or_404(request.user, WPS, pk=pk)
    return _transition(request, wps, lambda: wps_steps.submit(wps, request.user), f"{wps} submitted for approval.")


@require_POST
@role_required("procedure.approve")
def wps_approve(request, pk):
    wps = get_visible_or_404(request.user, WPS, pk=pk)
    return _transition(request, wps, lambda: wps_steps.approve(wps, request.user), f"{wps} approved.")


@require_POST
@role_required("procedure.draft")
def wps_new_revision(request, pk):
    wps = get_visible_or_404(request.user, WPS, pk=pk)
    try:
        revision = wps_steps.new_revision(wps, request.user)
    except Refused as exc:
        messages.error(request, " ".join(exc.messages))
        return redirect(wps)
    messages.success(request, f"{revision} drafted from revision {wps.revision}. It supersedes it once approved.")
    return redirect("procedures:wps_edit", pk=revision.pk)


def _reason_page(request, pk, action, state, title, verb, move):
    """A page asking why (withdraw, return to the engineer): GET shows the form, POST acts."""
    wps = get_visible_or_404(request.user, WPS, pk=pk)
    if wps.state != state:
        messages.error(request, f"{wps} is {wps.get_state_display().lower()}; nothing to {verb}.")
        return redirect(wps)
    form = ReasonForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        try:
            move(wps, form.cleaned_data["reason"])
        except Refused as exc:
            form.add_error("reason", exc)
        else:
            messages.success(request, f"{wps}: {title.lower()} done.")
            return redirect(wps)
    return render(request, "procedures/wps_reason.html", {"wps": wps, "form": form, "title": title, "verb": verb})


@require_http_methods(["GET", "POST"])
@role_required("procedure.withdraw")
def wps_withdraw(request, pk):
    return _reason_page(request, pk, "procedure.withdraw", WPSState.APPROVED, "Withdraw", "withdraw",
                        lambda wps, reason: wps_steps.withdraw(wps, request.user, reason))


@require_http_methods(["GET", "POST"])
@role_required("procedure.approve")
def wps_return(request, pk):
    return _reason_page(request, pk, "procedure.approve", WPSState.SUBMITTED, "Return to the engineer", "return",
                        lambda wps, reason: wps_steps.return_to_draft(wps, request.user, reason))


# --- print -----------------------------------------------------------------------------------------

@require_safe
def wps_pdf(request, pk):
    wps = _get_wps(request, pk)
    filename = f"WPS-{wps.number}-rev{wps.revision}.pdf".replace(" ", "_").replace("/", "-")
    return pdf_response(render_pdf("pdf/wps.html", printing.wps_document(wps), filename,
                                   paper=paper_for(wps.unit_system, wps.code)))


# --- PQR -------------------------------------------------------------------------------------------

@require_safe
def pqr_list(request):
    pqrs = visible(request.user, PQR.objects.order_by("number"))
    return lists.list_page(request, PQRFilter(request.GET, queryset=pqrs), "procedures/pqr_list.html",
                           columns=PQR_COLUMNS, filename="pqrs.csv")


@require_safe
def pqr_detail(request, pk):
    pqr = get_visible_or_404(request.user, PQR, pk=pk)
    procedures = list(visible(request.user, pqr.procedures.order_by("number", "-revision")))
    return render(request, "procedures/pqr_detail.html", {
        "pqr": pqr, "procedures": procedures, "rows": printing.pqr_rows(pqr), "history": history.panel(pqr),
        "in_use": any(p.state != WPSState.DRAFT for p in procedures)})


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def pqr_create(request):
    form = PQRForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        pqr = form.save()
        messages.success(request, f"{pqr} recorded.")
        return redirect(pqr)
    return render(request, "procedures/pqr_form.html", {"form": form})


@require_http_methods(["GET", "POST"])
@role_required("procedure.draft")
def pqr_edit(request, pk):
    """Correct a PQR while no procedure beyond a draft names it (then it records a test that happened)."""
    pqr = get_visible_or_404(request.user, PQR, pk=pk)
    if request.method == "GET" and PQR.lock.frozen_row(pqr):
        messages.error(request, PQR.lock.refusal(pqr, "changed"))
        return redirect(pqr)
    form = PQRForm(request.POST or None, instance=pqr)
    status = 200
    if request.method == "POST" and form.is_valid():
        if form.save_or_explain() is not None:  # by version; refused once a procedure beyond draft names it
            messages.success(request, f"{pqr} saved.")
            return redirect(pqr)
        status = 409
    return render(request, "procedures/pqr_form.html", {"form": form, "pqr": pqr}, status=status)

