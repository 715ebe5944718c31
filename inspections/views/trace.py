"""Register pages: inspector credentials, gauges, filler lots, and the filler lot of a weld. Shop-internal: a
customer's viewer is refused the lists (403) and finds no record (404, core.visibility); it reads a credential, a
gauge or a lot only as printed on its travelers. Register writes are the QA lead's (register.manage); a weld's lot
is recorded by whoever records welds (weld.record); every change goes through inspections.services.trace."""

import csv

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.db import transaction
from django.db.models import Count
from django.http import HttpResponse
from django.shortcuts import redirect, render
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import faults, history
from core.documents import send_document
from core.errors import RecordLocked, Refused, Stale
from core.roles import role_required
from core.storage import files_or_nothing
from core.visibility import get_visible_or_404, sees_everything
from inspections import calibration
from inspections import credentials as engine
from inspections.forms.jobs import add_step_errors
from inspections.forms.trace import (
    CalibrationForm,
    CredentialForm,
    FillerLotForm,
    GaugeForm,
    RecallForm,
    WeldFillerForm,
)
from inspections.models import (
    CalibrationResult,
    FillerLot,
    Gauge,
    GaugeCalibration,
    Inspection,
    InspectorCredential,
    Weld,
)
from inspections.services import trace
from inspections.services.chain import filler_mismatch
from inspections.services.weldmap_csv import _safe as formula_safe  # the one guard against CSV formulas
from procedures.forms.welders import ReasonForm

RETIRE_EXAMPLE = "e.g. Jaw bent; taken out of use"
LOT_WELDS_SHOWN = 50
CARD_EXAMPLE = "e.g. Number mistyped; the card is recorded again"


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
    return _detail_page(request, credential, ReasonForm(example=CARD_EXAMPLE))


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
    return _with_reason(request, credential, trace.withdraw_credential, f"{credential} withdrawn.",
                        lambda form: _detail_page(request, credential, form, status=400), example=CARD_EXAMPLE)


def _with_reason(request, record, step, done: str, page, example=None):
    """A step that takes a reason (withdraw, retire): the record's page again with the refusal beside the form."""
    form = ReasonForm(request.POST, example=example)
    if form.is_valid():
        try:
            step(record, request.user, form.cleaned_data["reason"])
        except Refused as exc:
            form.add_error(None, " ".join(exc.messages))
        else:
            messages.success(request, done)
            return redirect(record)
    return page(form)


@require_safe
def credential_document(request, pk):
    return send_document(_credential(request, pk).document, "copy of the card")


# --- gauges ------------------------------------------------------------------------------------------------------

@require_safe
def gauge_list(request):
    shop_only(request)
    today = timezone.localdate()
    return render(request, "inspections/gauge_list.html", {
        "rows": trace.gauge_rows(today), "today": today, "notice_days": engine.LAPSE_NOTICE_DAYS,
        "source": calibration.SOURCE})


@role_required(trace.REGISTERS)
@require_http_methods(["GET", "POST"])
def gauge_create(request):
    form = GaugeForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        gauge = trace.record_gauge(form.save(commit=False), request.user)
        messages.success(request, f"Gauge {gauge} recorded: record its calibration before it can be chosen.")
        return redirect(gauge)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": "Add a gauge to the register", "submit": "Add gauge", "back": "inspections:gauge_list",
        "back_label": "Gauges", "intro": "Never edited afterwards: a mistake is retired with a reason and added "
                                         "again."}, status=400 if form.errors else 200)


def _gauge(request, pk):
    return get_visible_or_404(request.user, Gauge.objects.prefetch_related("calibrations"), pk=pk)


@require_safe
def gauge_detail(request, pk):
    return _gauge_page(request, _gauge(request, pk), CalibrationForm(), ReasonForm(example=RETIRE_EXAMPLE))


def _gauge_page(request, gauge, calibration_form, retire_form, status=200):
    today = timezone.localdate()
    calibrations = list(gauge.calibrations.all())
    used = (Inspection.objects.filter(gauge_calibration__gauge=gauge).values("gauge_calibration")
            .annotate(n=Count("pk")))
    counts = {row["gauge_calibration"]: row["n"] for row in used}
    return render(request, "inspections/gauge_detail.html", {
        "gauge": gauge, "standing": gauge.standing(today, calibrations), "today": today,
        "calibrations": [(c, counts.get(c.pk, 0)) for c in calibrations], "form": calibration_form,
        "retire_form": retire_form, "history": history.panel(gauge, *calibrations), "history_mixed": True,
        "source": calibration.SOURCE}, status=status)


@role_required(trace.REGISTERS)
@require_POST
def calibration_create(request, pk):
    gauge = _gauge(request, pk)
    form = CalibrationForm(request.POST, request.FILES)
    if form.is_valid():
        record = form.save(commit=False)
        record.gauge = gauge
        try:
            with files_or_nothing(), transaction.atomic():  # the certificate goes with the row, or neither
                trace.record_calibration(record, request.user)
        except Refused as exc:
            form.add_error(None, " ".join(exc.messages))
        except OSError as exc:
            message = faults.storage_message(exc, "certificate")
            if message is None:
                raise
            form.add_error("document", message)
            return _gauge_page(request, gauge, form, ReasonForm(example=RETIRE_EXAMPLE), status=503)
        else:
            if record.result == CalibrationResult.OUT_OF_TOLERANCE:
                messages.warning(request, f"Gauge {gauge} found out of tolerance: the inspections made with it "
                                          "since its last good calibration are listed below.")
            else:
                messages.success(request, f"Calibration recorded: {gauge} due {record.due_on.isoformat()}.")
            return redirect(record)
    return _gauge_page(request, gauge, form, ReasonForm(example=RETIRE_EXAMPLE), status=400)


@role_required(trace.REGISTERS)
@require_POST
def gauge_retire(request, pk):
    gauge = _gauge(request, pk)
    return _with_reason(request, gauge, trace.retire_gauge, f"Gauge {gauge} retired.",
                        lambda form: _gauge_page(request, gauge, CalibrationForm(), form, status=400),
                        example=RETIRE_EXAMPLE)


def _calibration(request, pk):
    return get_visible_or_404(request.user, GaugeCalibration.objects.select_related("gauge", "recorded_by"), pk=pk)


@require_safe
def calibration_detail(request, pk):
    """A calibration; when it found the gauge out of tolerance, every inspection made with the gauge since its last
    good calibration (trace.suspect_inspections: two queries whatever their number)."""
    record = _calibration(request, pk)
    good, suspects = trace.suspect_inspections(record)
    signed = (Inspection.objects.filter(gauge_calibration=record)
              .select_related("weld__assembly__job__customer", "inspector").order_by("inspected_at", "pk"))
    return render(request, "inspections/calibration_detail.html", {
        "record": record, "good": good, "suspects": list(suspects),
        "signed": list(signed) if record.result == CalibrationResult.IN_TOLERANCE else []})


@require_safe
def calibration_document(request, pk):
    return send_document(_calibration(request, pk).document, "certificate")


# --- filler lots -------------------------------------------------------------------------------------------------

@require_safe
def filler_lot_list(request):
    shop_only(request)
    lots = FillerLot.objects.annotate(used=Count("welds")).order_by("-received_on", "-pk")
    return render(request, "inspections/filler_lot_list.html", {"lots": lots, "register": "filler"})


@role_required(trace.REGISTERS)
@require_http_methods(["GET", "POST"])
def filler_lot_create(request):
    form = FillerLotForm(request.POST or None, request.FILES or None)
    if request.method == "POST" and form.is_valid():
        lot = form.save(commit=False)
        if stored_with_file(form, trace.record_filler_lot, lot, request.user, "certificate"):
            messages.success(request, f"Recorded: {lot}.")
            return redirect(lot)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": "Record a filler lot", "submit": "Record lot", "multipart": True,
        "back": "inspections:filler_lot_list", "back_label": "Filler lots",
        "intro": "As received: the classification and lot as printed on the package, with the manufacturer's "
                 "certificate. Never edited afterwards."}, status=400 if form.errors else 200)


def stored_with_file(form, step, record, user, what) -> bool:
    """Store a register's new row with its document, both or neither; a storage fault becomes the message beside the
    document field (False)."""
    try:
        with files_or_nothing(), transaction.atomic():
            step(record, user)
    except OSError as exc:
        message = faults.storage_message(exc, what)
        if message is None:
            raise
        form.add_error("document", message)
        return False
    return True


def _lot(request, pk):
    return get_visible_or_404(request.user, FillerLot.objects.select_related("recorded_by"), pk=pk)


@require_safe
def filler_lot_detail(request, pk):
    lot = _lot(request, pk)
    welds = lot.welds.select_related("assembly__job__customer", "wps").order_by("-welded_on", "-pk")
    # the latest welds only: a lot of ten thousand welds is read in full on the recall page and its CSV
    return render(request, "inspections/filler_lot_detail.html", {
        "lot": lot, "welds": list(welds[:LOT_WELDS_SHOWN]), "weld_count": lot.welds.count(),
        "history": history.panel(lot)})


@require_safe
def filler_lot_document(request, pk):
    return send_document(_lot(request, pk).document, "certificate")


@role_required("weld.record")
@require_http_methods(["GET", "POST"])
def weld_filler(request, pk):
    """Name the filler lot a weld was made with."""
    weld = get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "wps", "filler_lot"), pk=pk)
    form = WeldFillerForm(request.POST or None, initial={"lot": weld.filler_lot_id}, weld=weld)
    status = 200
    if request.method == "POST":
        status = 400
        if form.is_valid():
            try:
                trace.record_weld_filler(weld, form.cleaned_data["lot"], request.user)
            except (RecordLocked, Stale) as exc:
                form.add_error(None, " ".join(exc.messages) + " Revise the weld to change what it was made with.")
                status = 409
            except Refused as exc:
                add_step_errors(form, exc)
            else:
                mismatch = filler_mismatch(weld.filler_lot, weld.wps)
                (messages.warning if mismatch else messages.success)(
                    request, f"Weld {weld.mark}: {mismatch}." if mismatch else f"Weld {weld.mark}: {weld.filler_lot} "
                                                                              "recorded.")
                return redirect(weld)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": f"Filler lot of weld {weld.mark}", "submit": "Record lot",
        "back": "inspections:filler_lot_list", "back_label": "Filler lots",
        "intro": f"{weld.wps} specifies {weld.wps.electrode}." if weld.wps else "The weld has no WPS yet."},
        status=status)


# --- recall --------------------------------------------------------------------------------------------------------

def _recall(request):
    form = RecallForm(request.GET if "kind" in request.GET else None)
    if not form.is_bound or not form.is_valid():
        return form, None
    data = form.cleaned_data
    return form, trace.recall(data["kind"], data[data["kind"]], data.get("date_from"), data.get("date_to"))


def _recall_columns(form) -> dict:
    return trace.recall_columns(form.cleaned_data.get("kind", "") if form.is_bound and form.is_valid() else "")


@require_safe
def recall(request):
    """Which welds, assemblies and jobs a filler lot, a gauge or an inspector touched between dates."""
    shop_only(request)
    form, rows = _recall(request)
    columns = _recall_columns(form)
    return render(request, "inspections/recall.html", {
        "form": form, "rows": rows, "columns": list(columns.values()), "heat": "part" in columns,
        "query": request.GET.urlencode()},
        status=400 if form.is_bound and form.errors else 200)


@require_safe
def recall_csv(request):
    shop_only(request)
    form, rows = _recall(request)
    if rows is None:
        return recall(request)
    response = HttpResponse(content_type="text/csv; charset=utf-8")
    response["Content-Disposition"] = 'attachment; filename="recall.csv"'
    writer = csv.writer(response)
    columns = _recall_columns(form)
    writer.writerow(columns.values())
    for row in rows:
        writer.writerow([formula_safe(row[c]) for c in columns])
    return response

