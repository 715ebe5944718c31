"""Consumable control pages: the oven register, an oven with its log, and the log's forms (a reading, electrodes
issued, their return or discard, a rebake). Shop-internal like the other registers: a viewer is refused the list
(403) and finds no oven (404, core.visibility). The register is the QA lead's (register.manage); the log is kept by
every shop role (consumable.log); every change goes through inspections.services.consumables."""

from django.contrib import messages
from django.shortcuts import redirect, render
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import history, lists
from core.errors import Refused
from core.roles import role_required
from core.visibility import get_visible_or_404
from inspections import consumables as engine
from inspections.forms.consumables import (
    DISCARDED,
    CloseIssueForm,
    FluxForm,
    IssueForm,
    OvenForm,
    ReadingForm,
    RebakeForm,
)
from inspections.models import ElectrodeIssue, ElectrodeOven, FluxRecord, IssueState, OvenState, Rebake
from inspections.services import consumables as steps
from inspections.services.trace import REGISTERS
from inspections.views.trace import _with_reason, shop_only
from procedures.forms.welders import ReasonForm

SOURCES = (f"Exposure: {engine.SOURCE_EXPOSURE}; ovens: {engine.SOURCE_OVEN}; rebakes: {engine.SOURCE_REBAKE}; "
           f"SAW flux: {engine.SOURCE_FLUX}. "
           "A reading is due every shift (12 h; common practice, no source).")

OVEN_EXAMPLE = "e.g. Thermostat failed; taken out of service"


@require_safe
def oven_list(request):
    shop_only(request)
    return render(request, "inspections/oven_list.html", {"rows": steps.oven_rows(), "sources": SOURCES})


@role_required(REGISTERS)
@require_http_methods(["GET", "POST"])
def oven_create(request):
    form = OvenForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        oven = steps.record_oven(form.save(commit=False), request.user)
        messages.success(request, f"Oven {oven} recorded: log its first reading.")
        return redirect(oven)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": "Add an electrode oven", "submit": "Add oven", "back": "inspections:oven_list",
        "back_label": "Electrode ovens", "intro": "Never edited afterwards: a mistake is retired with a reason and "
                                                  "added again."}, status=400 if form.errors else 200)


def _oven(request, pk):
    return get_visible_or_404(request.user, ElectrodeOven.objects.all(), pk=pk)


@require_safe
def oven_detail(request, pk):
    return _oven_page(request, _oven(request, pk), ReasonForm(example=OVEN_EXAMPLE))


def _oven_page(request, oven, retire_form, status=200):
    now = timezone.now()
    issues = steps.with_oven_reading(ElectrodeIssue.objects.filter(oven=oven)).order_by("-taken_out_at", "-pk")
    page = lists.paginate(request, issues)
    readings = lists.CappedPaginator(oven.readings.select_related("recorded_by").order_by("-read_at", "-pk"),
                                     lists.PAGE_SIZE).get_page(request.GET.get("readings"))
    rebakes = list(Rebake.objects.filter(oven=oven).select_related("lot", "recorded_by")[:20])
    last = readings.object_list[0] if readings.number == 1 and readings.object_list else None
    return render(request, "inspections/oven_detail.html", {
        "oven": oven, "page": page, "judged": [steps.judge(i, now) for i in page.object_list], "readings": readings,
        "last": last, "last_ok": last is not None and oven.reading_ok(last.temperature) is not False,
        "due": oven.state == OvenState.IN_SERVICE and engine.reading_due(last.read_at if last else None, now),
        "minimum": engine.oven_minimum(oven.system), "rebakes": [
            (r, engine.rebake(r.lot.classification, r.temperature, r.hours, r.number, oven.system)) for r in rebakes],
        "flux": steps.flux_lots(FluxRecord.objects.filter(lot__flux_records__oven=oven).distinct()
                                .select_related("lot", "recorded_by"), now, oven.system),
        "retire_form": retire_form, "history": history.panel(oven), "sources": SOURCES,
        "query": lists.query_without(request, "page")}, status=status)


@role_required(REGISTERS)
@require_POST
def oven_retire(request, pk):
    oven = _oven(request, pk)
    return _with_reason(request, oven, steps.retire_oven, f"Oven {oven} retired.",
                        lambda form: _oven_page(request, oven, form, status=400), example=OVEN_EXAMPLE)


def _log_form(request, oven, form, title, submit, step, done):
    """A form of the oven's log: the step refuses beside the form (nothing stored), or back to the oven."""
    status = 200
    if request.method == "POST":
        status = 400
        if form.is_valid():
            entry = form.save(commit=False)
            entry.oven = oven
            try:
                step(entry, request.user)
            except Refused as exc:
                form.add_error(None, " ".join(exc.messages))
            else:
                messages.success(request, done(entry))
                return redirect(oven)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": f"{title} · oven {oven}", "submit": submit, "back": "inspections:oven_list",
        "back_label": "Electrode ovens", "intro": SOURCES}, status=status)


@role_required(steps.LOG)
@require_http_methods(["GET", "POST"])
def reading_create(request, pk):
    oven = _oven(request, pk)
    form = ReadingForm(request.POST or None, oven=oven)

    def done(reading):
        ok = oven.reading_ok(reading.temperature) is not False
        return f"Reading recorded{'' if ok else ': BELOW the minimum; electrodes taken out now are flagged'}."
    return _log_form(request, oven, form, "Record a reading", "Record reading", steps.record_reading, done)


@role_required(steps.LOG)
@require_http_methods(["GET", "POST"])
def issue_create(request, pk):
    oven = _oven(request, pk)
    form = IssueForm(request.POST or None, oven=oven)
    return _log_form(request, oven, form, "Electrodes taken out", "Record issue", steps.record_issue,
                     lambda issue: f"Recorded: {issue}. Return or discard them before "
                                   f"{engine.exposure_limit(issue.lot.classification).reason}.")


@role_required(steps.LOG)
@require_http_methods(["GET", "POST"])
def rebake_create(request, pk):
    oven = _oven(request, pk)
    form = RebakeForm(request.POST or None, oven=oven)
    return _log_form(request, oven, form, "Record a rebake", "Record rebake", steps.record_rebake,
                     lambda rebake: f"Recorded: {rebake} (rebake number {rebake.number}).")


@role_required(steps.LOG)
@require_http_methods(["GET", "POST"])
def flux_create(request, pk):
    oven = _oven(request, pk)
    form = FluxForm(request.POST or None, oven=oven)

    def done(entry):
        usable, reason = engine.flux_at([r.facts() for r in entry.lot.flux_records.all()], timezone.now(), oven.system)
        return f"Recorded: {entry}. " + ("The flux is usable." if usable else f"NOT usable: {reason}.")
    return _log_form(request, oven, form, "SAW flux", "Record flux", steps.record_flux, done)


@role_required(steps.LOG)
@require_http_methods(["GET", "POST"])
def issue_close(request, pk):
    issue = get_visible_or_404(request.user, ElectrodeIssue.objects.select_related("oven", "lot", "welder"), pk=pk)
    form = CloseIssueForm(request.POST or None, issue=issue)
    status = 200
    if issue.state != IssueState.OUT:
        form.add_error(None, f"These electrodes were already {issue.get_state_display().lower()}.")
        status = 409
    elif request.method == "POST":
        status = 400
        if form.is_valid():
            data = form.cleaned_data
            try:
                steps.close_issue(issue, request.user, data["back_at"],
                                  None if data["outcome"] == DISCARDED else data["returned_to"])
            except Refused as exc:
                form.add_error(None, " ".join(exc.messages))
            else:
                judged = steps.judge(issue)
                (messages.warning if judged.late else messages.success)(
                    request, f"Closed: {issue}. {judged.late or judged.status}.")
                return redirect(issue.oven)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": f"Return or discard: {issue}", "submit": "Close issue", "back": "inspections:oven_list",
        "back_label": "Electrode ovens", "intro": steps.judge(issue).status}, status=status)
