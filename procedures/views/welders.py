"""Welder pages: the list with each welder's state, the welder page, tests, continuity, deactivation, the PDF.

Views stay thin: the forms read the input, the models change state (Welder.deactivate, ContinuityEntry.log_manual),
procedures.eligibility gathers the facts and procedures.qualification (the engine) judges them. Reading needs only
a login; every write names its action in core.roles. Test reports are served only through qualification_report,
after the login check; media is never public.
"""


from django.contrib import messages
from django.core.exceptions import ValidationError
from django.db import transaction
from django.http import Http404
from django.shortcuts import redirect, render
from django.utils import timezone
from django.utils.text import slugify
from django.views.decorators.http import require_http_methods, require_safe

from core import faults, lists
from core.documents import send_document
from core.errors import Refused
from core.pdf import pdf_response, render_pdf
from core.roles import role_required
from core.storage import files_or_nothing
from core.visibility import continuity_for, get_visible_or_404, require_visible, visible
from procedures import eligibility, printing
from procedures.eligibility import State
from procedures.forms.welders import ContinuityForm, QualificationForm, ReasonForm, WeldCheckForm, WelderForm
from procedures.lists import CONTINUITY, WelderFilter
from procedures.models.welders import Qualification, Welder
from procedures.services import welders as welder_steps


def _welder(request, pk):
    require_visible(request.user, Welder, pk)
    try:
        return printing.welder_with_records(pk, continuity=False)
    except Welder.DoesNotExist:
        raise Http404("No such welder.")


def _welder_context(request, welder):
    """The welder page: its continuity history a page at a time (newest first), its runs in full."""
    page = lists.paginate(request, printing.continuity_entries().filter(welder=welder))
    context = printing.welder_context(welder, continuity=page.object_list)
    context["continuity"] = continuity_for(request.user, context["continuity"])
    context.update(page=page, query=lists.query_without(request, "page"))
    return context


@require_safe
def welder_list(request):
    """Welders with their state today, read from the continuity runs (a few rows a welder, whatever the history).

    Search, process and active filter in the database; continuity (and state) are judged per welder from the runs,
    so those two filter the judged rows before the page is cut (bounded by the number of welders, not entries)."""
    data = request.GET.copy()
    if data.get("active") not in ("1", "0", ""):
        data["active"] = "1"  # the active list unless asked otherwise (active= shows all)
    welders = visible(request.user, Welder.objects.all())  # eligibility._load reads their records in two queries
    filterset = WelderFilter(data, queryset=welders.order_by("stamp"))
    today = timezone.localdate()
    cleaned = filterset.form.cleaned_data if filterset.is_valid() else {}
    state = CONTINUITY.get(cleaned.get("continuity") or "") or (data.get("state") if data.get("state") in
                                                                  dict(State.CHOICES) else "")
    process = cleaned.get("process") or ""
    tally = {value: 0 for value, _ in State.CHOICES}

    def judged(queryset):
        statuses = list(eligibility.welder_statuses(queryset, on=today).values())
        for status in statuses:
            tally[status.state] += 1
        return [s for s in statuses if (not state or s.state == state)
                and (not process or process in s.processes)]

    if lists.wants_csv(request):
        rows = judged(filterset.qs)
        lines = lists.csv_lines(
            ["Stamp", "Name", "Employer", "State", "Lapses on", "Processes"],
            ([s.welder.stamp, s.welder.name, s.welder.employer, s.label,
              s.lapses_on.isoformat() if s.lapses_on else "",
              " ".join(f"{p} to {r.status.valid_until}" if r.status.valid_until else p
                       for p, r in s.processes.items())] for s in rows))
        return lists.stream_csv(lines, "welders.csv")
    return lists.list_page(request, filterset, "procedures/welder_list.html", {
        "states": State.CHOICES, "today": today, "warn_days": eligibility.WARN_DAYS, "state": state,
        "counts": lambda: [(value, label, tally[value]) for value, label in State.CHOICES],
        "active": data.get("active", ""),
    }, columns=[], rows=judged)


@role_required("welder.manage")
@require_http_methods(["GET", "POST"])
def welder_create(request):
    form = WelderForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        welder = form.save()
        messages.success(request, f"Welder {welder} added. Record a qualification test next.")
        return redirect(welder)
    return render(request, "procedures/welder_form.html", {
        "form": form, "title": "Add a welder", "submit": "Add welder", "back": "procedures:welder_list"})


@role_required("welder.manage")
@require_http_methods(["GET", "POST"])
def welder_edit(request, pk):
    """Correct a welder's name, employer or stamp (the stamp only until records bear it), by version."""
    welder = get_visible_or_404(request.user, Welder, pk=pk)
    form = WelderForm(request.POST or None, instance=welder)
    status = 200
    if request.method == "POST" and form.is_valid():
        if form.save_or_explain() is not None:
            messages.success(request, f"Welder {welder} saved.")
            return redirect(welder)
        status = 409
    return render(request, "procedures/welder_form.html", {
        "form": form, "welder": welder, "title": f"Edit {welder}", "submit": "Save welder"}, status=status)


@require_safe
def welder_detail(request, pk):
    welder = _welder(request, pk)
    check_form, check = None, None
    if "thickness" in request.GET:  # the "could this welder make this weld?" box was filled in
        check_form = WeldCheckForm(request.GET)
        if check_form.is_valid():
            data = check_form.cleaned_data
            check = eligibility.check_welder(welder, data["demand"], data["on"])
    return render(request, "procedures/welder_detail.html", {
        **_welder_context(request, welder), "check_form": check_form or WeldCheckForm(), "check": check})


@role_required("welder.manage")
@require_http_methods(["GET", "POST"])
def qualification_create(request, pk):
    welder = get_visible_or_404(request.user, Welder, pk=pk)
    if not welder.active:
        messages.error(request, f"{welder} is inactive: reactivate the welder before recording a test.")
        return redirect(welder)
    form = QualificationForm(request.POST or None, request.FILES or None, welder=welder)
    if request.method == "POST" and form.is_valid():
        qualification = form.save(commit=False)
        qualification.welder = welder
        qualification.recorded_by = request.user
        try:
            with files_or_nothing(), transaction.atomic():  # the report file goes with the row, or neither
                qualification.save()
        except OSError as exc:  # disk full, folder not writable: said beside the report, the rest kept
            message = faults.storage_message(exc, "test report")
            if message is None:
                raise
            form.add_error("report", message)
            return _qualification_page(request, form, welder, status=503)
        messages.success(request, f"Test recorded: {qualification.process} {qualification.test_position} of "
                                  f"{qualification.test_date:%Y-%m-%d}.")
        return redirect(welder)
    return _qualification_page(request, form, welder)


def _qualification_page(request, form, welder, status=200):
    return render(request, "procedures/welder_form.html", {
        "form": form, "welder": welder, "title": f"Record a qualification test for {welder}",
        "submit": "Record test", "multipart": True,
        "intro": "The ranges this test qualifies and the date it lapses are worked out from it; they are not typed.",
    }, status=status)


@require_safe
def qualification_report(request, pk):
    """The attached test report, only to a signed-in user (LoginRequiredMiddleware), never from a public URL."""
    qualification = get_visible_or_404(request.user, Qualification, pk=pk)
    return send_document(qualification.report, "report")


@role_required("continuity.log")
@require_http_methods(["GET", "POST"])
def continuity_create(request, pk):
    welder = get_visible_or_404(request.user, Welder, pk=pk)
    form = ContinuityForm(request.POST or None, welder=welder)
    if request.method == "POST" and form.is_valid():
        data = form.cleaned_data
        try:
            welder_steps.log_continuity(welder, data["process"], data["date"], data["note"], request.user)
        except ValidationError as exc:
            form.add_error(None, exc)
        else:
            messages.success(request, f"Continuity logged: {data['process']} on {data['date']:%Y-%m-%d}.")
            return redirect(welder)
    return render(request, "procedures/welder_form.html", {
        "form": form, "welder": welder, "title": f"Log continuity for {welder}", "submit": "Log continuity",
        "intro": "For work outside Legwork. Production welds recorded in Legwork add their own entries.",
    })


def _state_change(request, pk, active):
    welder = get_visible_or_404(request.user, Welder, pk=pk)
    form = ReasonForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        try:
            change = welder_steps.reactivate if active else welder_steps.deactivate
            change(welder, request.user, form.cleaned_data["reason"])
        except Refused as exc:
            messages.error(request, " ".join(exc.messages))
        else:
            messages.success(request, f"{welder} is now {'active' if active else 'inactive'}.")
        return redirect(welder)
    verb = "Reactivate" if active else "Deactivate"
    intro = ("Inactive welders leave the active list and are refused for welds from today; their records stay."
             if not active else "The welder's tests and continuity are judged as before.")
    return render(request, "procedures/welder_form.html", {
        "form": form, "welder": welder, "title": f"{verb} {welder}", "submit": verb, "intro": intro,
        "danger": not active,
    })


@role_required("welder.manage")
@require_http_methods(["GET", "POST"])
def welder_deactivate(request, pk):
    return _state_change(request, pk, active=False)


@role_required("welder.manage")
@require_http_methods(["GET", "POST"])
def welder_reactivate(request, pk):
    return _state_change(request, pk, active=True)


@require_safe
def welder_pdf(request, pk):
    """The printable qualification summary: each test, its ranges, its lapse date, the continuity behind it."""
    welder = _welder(request, pk)
    entries, total = printing.continuity_evidence(welder)
    context = printing.welder_context(welder, continuity=entries)
    context.update(continuity=continuity_for(request.user, context["continuity"]), continuity_total=total)
    rendered = render_pdf("pdf/welder_summary.html", context,
                          f"welder-{slugify(welder.stamp) or welder.pk}-qualifications-{context['today']:%Y%m%d}.pdf")
    return pdf_response(rendered)
