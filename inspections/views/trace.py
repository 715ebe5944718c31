"""Register pages: inspector credentials (and gauges). Shop-internal: a customer's viewer is refused the lists
(403) and finds no record (404, core.visibility); it reads a credential only as printed on its travelers.
Writes are the QA lead's (register.manage); every state change goes through inspections.services.trace."""

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.db import transaction
from django.shortcuts import redirect, render
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import faults, history
from core.documents import send_document
from core.errors import Refused
from core.roles import role_required
from core.storage import files_or_nothing
from core.visibility import get_visible_or_404, sees_everything
from inspections import credentials as engine
from inspections.forms.trace import CredentialForm
from inspections.models import InspectorCredential
from inspections.services import trace
from procedures.forms.welders import ReasonForm


def shop_only(request):
    """The registers are the shop's own: a viewer account is refused."""
    if not sees_everything(request.user):
        raise PermissionDenied("The shop's registers are not shown to customer accounts.")


@require_safe
def credential_list(request):
    shop_only(request)
    today = timezone.localdate()
    return render(request, "inspections/credential_list.html", {
        "rows": trace.credential_rows(today), "today": today, "notice_days": engine.LAPSE_NOTICE_DAYS})


@role_required(trace.REGISTERS)
@require_http_methods(["GET", "POST"])
def credential_create(request):
    form = CredentialForm(request.POST or None, request.FILES or None)
    if request.method == "POST" and form.is_valid():
        credential = form.save(commit=False)
        try:
            with files_or_nothing(), transaction.atomic():  # the copy of the card goes with the row, or neither
                trace.record_credential(credential, request.user)
        except Refused as exc:
            form.add_error("inspector", " ".join(exc.messages))
        except OSError as exc:
            message = faults.storage_message(exc, "copy of the card")
            if message is None:
                raise
            form.add_error("document", message)
            return _form_page(request, form, status=503)
        else:
            messages.success(request, f"Recorded: {credential} for {credential.inspector}.")
            return redirect(credential)
    return _form_page(request, form, status=400 if form.errors else 200)


def _form_page(request, form, status=200):
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": "Record an inspector's credential", "submit": "Record credential",
        "multipart": True, "back": "inspections:credential_list", "back_label": "Inspector credentials",
        "intro": "Type it as the card prints it. It is never edited afterwards: a mistake is withdrawn with a reason "
                 "and recorded again; a renewal is a new record."}, status=status)


def _credential(request, pk):
    return get_visible_or_404(request.user, InspectorCredential.objects.select_related("inspector", "recorded_by"),
                              pk=pk)


@require_safe
def credential_detail(request, pk):
    credential = _credential(request, pk)
    return _detail_page(request, credential, ReasonForm())


def _detail_page(request, credential, form, status=200):
    today = timezone.localdate()
    signed = credential.inspections.select_related("weld__assembly__job").order_by("-inspected_at", "-pk")
    return render(request, "inspections/credential_detail.html", {
        "credential": credential, "currency": credential.currency(today), "today": today, "form": form,
        "signed": signed[:50], "signed_count": signed.count(), "history": history.panel(credential)},
        status=status)


@require_POST
@role_required(trace.REGISTERS)
def credential_withdraw(request, pk):
    credential = _credential(request, pk)
    form = ReasonForm(request.POST)
    if form.is_valid():
        try:
            trace.withdraw_credential(credential, request.user, form.cleaned_data["reason"])
        except Refused as exc:
            form.add_error(None, " ".join(exc.messages))
        else:
            messages.success(request, f"{credential} withdrawn.")
            return redirect(credential)
    return _detail_page(request, credential, form, status=400)


@require_safe
def credential_document(request, pk):
    return send_document(_credential(request, pk).document, "copy of the card")
