"""Jobs, assemblies and their weld maps: lists, forms, release, CSV in and out."""

from dataclasses import dataclass

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.db import transaction
from django.db.models import Count, F, OuterRef, Subquery
from django.db.models.functions import Coalesce
from django.shortcuts import get_object_or_404, redirect, render
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import history, lists
from core.errors import Refused, Stale
from core.inputs import parse_id
from core.roles import can, role_required
from core.units import format_length
from core.visibility import get_visible_or_404, visible
from core.vocabulary import JointType
from inspections import wording
from inspections.forms.jobs import (
    AssemblyForm,
    JobForm,
    PieceMarkSearchForm,
    StepForm,
    WeldForm,
    WeldMapUploadForm,
    WeldRevisionForm,
    add_step_errors,
)
from inspections.lists import JOB_COLUMNS, JobFilter
from inspections.models import NCR, Assembly, Job, Weld
from inspections.models.ncr import NCRState
from inspections.services import assemblies as steps
from inspections.services import chain, weldmap_csv
from inspections.services import welds as weld_steps
from inspections.services.capacity import capacity_cards
from inspections.services.flags import weld_flags, wps_flags_for_job
from procedures.models import WPS, Welder
from procedures.models.wps import WPSState


def _count(queryset):
    """A correlated COUNT subquery: worked out only for the rows of the page shown, never for every row."""
    return Coalesce(Subquery(queryset.order_by().values("assembly").annotate(n=Count("pk")).values("n")), 0)


def _weld_count():
    return _count(Weld.objects.filter(assembly=OuterRef("pk")))


def _open_ncr_count():
    return _count(NCR.objects.filter(weld__assembly=OuterRef("pk")).exclude(state=NCRState.CLOSED)
                  .annotate(assembly=F("weld__assembly")))


@require_safe
def job_list(request):
    assemblies = Assembly.objects.filter(job=OuterRef("pk")).order_by().values("job").annotate(n=Count("pk"))
    jobs = visible(request.user, Job.objects.select_related("client_criteria", "customer")).annotate(
        n_assemblies=Coalesce(Subquery(assemblies.values("n")), 0)).order_by("number")  # the page's jobs only
    return lists.list_page(request, JobFilter(request.GET, queryset=jobs, request=request),
                           "inspections/job_list.html", {"search": PieceMarkSearchForm()},
                           columns=JOB_COLUMNS, filename="jobs.csv")


@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def job_create(request):
    form = JobForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        job = form.save()
        messages.success(request, f"Job {job.number} created.")
        return redirect(job)
    return render(request, "inspections/job_form.html", {"form": form})


@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def job_edit(request, pk):
    job = get_visible_or_404(request.user, Job.objects.select_related("client_criteria"), pk=pk)
    form = JobForm(request.POST or None, instance=job)
    status = 200
    if request.method == "POST" and form.is_valid():
        if form.save_or_explain() is not None:  # by version: a save by someone else meanwhile refuses this one
            messages.success(request, f"Job {job.number} saved.")
            return redirect(job)
        status = 409
    return render(request, "inspections/job_form.html", {"form": form, "job": job}, status=status)


@require_safe
def job_detail(request, pk):
    job = get_visible_or_404(request.user, Job.objects.select_related("client_criteria", "customer"), pk=pk)
    search = PieceMarkSearchForm(request.GET or None)
    assemblies = job.assemblies.order_by("piece_mark")
    query = search.cleaned_data["q"].strip() if search.is_valid() else ""
    if query:
        assemblies = assemblies.filter(piece_mark__icontains=query)
    page = lists.paginate(request, assemblies.annotate(n_welds=_weld_count(), n_open_ncrs=_open_ncr_count()))
    return render(request, "inspections/job_detail.html",
                  {"job": job, "page": page, "search": search, "query": lists.query_without(request, "page"),
                   "q": query, "history": history.panel(job)})


@require_safe
def assembly_find(request):
    """Find an assembly by piece mark across jobs: one exact match opens it."""
    search = PieceMarkSearchForm(request.GET or None)
    query = search.cleaned_data["q"].strip() if search.is_valid() else ""
    found = []
    if query:
        found = list(visible(request.user, Assembly.objects.filter(piece_mark__icontains=query)).select_related("job")
                     .order_by("piece_mark", "job__number")[:50])
        exact = [a for a in found if a.piece_mark.lower() == query.lower()]
        if len(exact) == 1:
            return redirect(exact[0])
    return render(request, "inspections/assembly_find.html", {"search": search, "query": query, "found": found})


@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def assembly_create(request, pk):
    job = get_visible_or_404(request.user, Job, pk=pk)
    form = AssemblyForm(request.POST or None, job=job)
    if request.method == "POST" and form.is_valid():
        form.instance.job = job
        assembly = form.save()
        messages.success(request, f"Assembly {assembly.piece_mark} added.")
        return redirect(assembly)
    return render(request, "inspections/assembly_form.html", {"form": form, "job": job})


@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def assembly_edit(request, pk):
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    if request.method == "GET" and assembly.is_closed:
        messages.error(request, f"{assembly.piece_mark} is {assembly.get_state_display().lower()} and cannot be "
                                "changed.")
        return redirect(assembly)
    form = AssemblyForm(request.POST or None, job=assembly.job, instance=assembly)
    status = 200
    if request.method == "POST" and form.is_valid():
        if form.save_or_explain() is not None:  # by version; refused once released (core.locking)
            messages.success(request, f"Assembly {assembly.piece_mark} saved.")
            return redirect(assembly)
        status = 409
    return render(request, "inspections/assembly_form.html", {"form": form, "job": assembly.job,
                                                              "assembly": assembly}, status=status)


@dataclass
class WeldRow:
    weld: Weld
    size: str
    length: str
    thickness: str
    status: object
    welders: list
    wps_approved: bool  # the WPS was in force on the weld date and covers the weld (the chain's WPS link)
    flags: list = ()  # inspections.services.flags: e.g. under the cyclic minimum fillet size
    chain: object = None  # inspections.services.chain.WeldChain


def _length(value, system):
    return format_length(value, system) if value is not None else ""


def weld_rows(assembly, welds, chains=None):
    """The weld map as the page shows it: every weld with its chain (status, WPS, welders), fixed queries. Sizes
    and lengths in the job's words (inspections.wording: a/z on ISO jobs, feet and inches for long US lengths)."""
    system = assembly.job.unit_system
    iso = wording.throat_first(assembly.job)
    chains = chains if chains is not None else chain.check_assembly(assembly, welds)
    rows = []
    for weld in welds:
        weld.assembly = assembly
        link = chains[weld.pk]
        thickness = f"{_length(weld.thickness1, system)} / {_length(weld.thickness2, system)}"
        welders = [steps.WelderCheck(c.welder, bool(c.allowed), tuple(c.reasons)) for c in link.welders.checks]
        rows.append(WeldRow(weld, wording.size_text(weld, system, iso), wording.run_length(weld.length, system),
                            thickness, link.status, welders, link.wps.ok, weld_flags(weld), link))
    return rows


def _assembly_page(request, assembly, release_errors=None, status=200):
    welds = list(assembly.welds.select_related("wps").prefetch_related("welders").order_by("mark"))
    chains = chain.check_assembly(assembly, welds)
    rows = weld_rows(assembly, welds, chains)
    blockers = steps.release_blockers(assembly, welds=welds, chains=chains)
    open_ncrs = [n for row in rows for n in row.status.open_ncrs]
    context = {
        "assembly": assembly, "job": assembly.job, "rows": rows, "blockers": blockers,
        "blocker_count": len(blockers),
        "release_errors": release_errors, "open_ncrs": open_ncrs, "step_form": StepForm(),
        "history": history.panel(assembly, limit=20),
        "can_submit": assembly.state == "in_fabrication" and can(request.user, "assembly.submit"),
    }
    return render(request, "inspections/assembly_detail.html", context, status=status)


@require_safe
def assembly_detail(request, pk):
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job", "released_by"), pk=pk)
    return _assembly_page(request, assembly)


def _step(request, pk, step, done):
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job", "released_by"), pk=pk)
    form = StepForm(request.POST)
    reason = form.cleaned_data["reason"] if form.is_valid() else ""
    try:
        step(assembly, request.user, reason)
    except Refused as exc:
        assembly.refresh_from_db()
        return _assembly_page(request, assembly, release_errors=exc.messages, status=409)
    messages.success(request, done.format(assembly=assembly))
    return redirect(assembly)


@role_required("assembly.submit")
@require_POST
def assembly_submit(request, pk):
    return _step(request, pk, steps.submit_for_inspection, "{assembly.piece_mark} sent for final inspection.")


@role_required("assembly.release")
@require_POST
def assembly_release(request, pk):
    return _step(request, pk, steps.release, "{assembly.piece_mark} released.")


# --- welds ------------------------------------------------------------------------------------------------

def _save_weld(request, form):
    """The weld as saved, its welders' continuity in step; None with the refusal on the form (stale or frozen)."""
    with transaction.atomic():
        weld = form.save_or_explain()
        if weld is not None and {"welders", "welded_on", "wps"} & set(form.changed_data):
            steps.record_production(weld)
    if weld is not None:
        for flag in getattr(form, "flags", []):
            messages.warning(request, flag)
    return weld


@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def weld_create(request, pk):
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    if assembly.is_closed:
        raise PermissionDenied(f"{assembly.piece_mark} is {assembly.get_state_display().lower()}: its weld map is "
                               "frozen.")
    form = WeldForm(request.POST or None, assembly=assembly, instance=Weld(assembly=assembly))
    status = 200
    if request.method == "POST" and form.is_valid():
        weld = _save_weld(request, form)
        if weld is not None:
            messages.success(request, f"Weld {weld.mark} added to {assembly.piece_mark}.")
            return redirect(assembly)
        status = 409
    return render(request, "inspections/weld_form.html", {"form": form, "assembly": assembly, "weld": None,
                                                           "check": _check_context(assembly, form.instance)},
                  status=status)


def _frozen_map(assembly):
    if assembly.is_closed:
        raise PermissionDenied(f"{assembly.piece_mark} is {assembly.get_state_display().lower()}: its weld map is "
                               "frozen.")


@require_http_methods(["GET", "POST"])
@role_required("job.manage", "weld.record")
def weld_edit(request, pk):
    """Edit a weld: all of it before its first inspection; who welded it, when and to which WPS until its final
    visual inspection; after that only a revision (weld_revise) changes it."""
    weld = get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "wps"), pk=pk)
    assembly = weld.assembly
    _frozen_map(assembly)
    if request.method == "GET" and weld.latest_final_id is not None:
        messages.info(request, f"Weld {weld.mark} has had its final visual inspection: it changes only by a "
                               "revision, with a reason, which sends it back for inspection.")
        return redirect("inspections:weld_revise" if can(request.user, "job.manage") else "inspections:weld_detail",
                        pk=weld.pk)
    inspected = weld.inspected
    locked = inspected or not can(request.user, "job.manage")
    form = WeldForm(request.POST or None, assembly=assembly, instance=weld, spec_locked=locked)
    status = 200
    if request.method == "POST" and form.is_valid():
        if _save_weld(request, form) is not None:
            messages.success(request, f"Weld {weld.mark} saved.")
            return redirect(assembly)
        status = 409
    return render(request, "inspections/weld_form.html", {
        "form": form, "assembly": assembly, "weld": weld, "inspected": inspected, "locked": locked,
        "check": _check_context(assembly, weld)}, status=status)


@require_http_methods(["GET", "POST"])
@role_required("job.manage")
def weld_revise(request, pk):
    """Revise an inspected weld (inspections.services.welds.revise): any of its data, with a reason; it goes back
    for inspection."""
    weld = get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "wps"), pk=pk)
    assembly = weld.assembly
    _frozen_map(assembly)
    if request.method == "GET" and not weld.inspected:
        messages.info(request, f"Weld {weld.mark} has not been inspected since its last revision: edit it.")
        return redirect("inspections:weld_edit", pk=weld.pk)
    form = WeldRevisionForm(request.POST or None, assembly=assembly, instance=weld)
    status = 200
    if request.method == "POST" and form.is_valid():
        try:
            weld_steps.revise(form.instance, request.user, form.cleaned_data["reason"],
                              welders=list(form.cleaned_data["welders"]))
        except Stale as exc:
            form.explain_stale(exc)
        except Refused as exc:
            add_step_errors(form, exc)
        else:
            messages.success(request, f"Weld {weld.mark} revised (revision {form.instance.revision}): inspect it "
                                      "again before release.")
            return redirect("inspections:weld_detail", pk=weld.pk)
        status = 409
    return render(request, "inspections/weld_form.html", {
        "form": form, "assembly": assembly, "weld": weld, "revising": True,
        "check": _check_context(assembly, weld)}, status=status)


@require_safe
def weld_detail(request, pk):
    weld = get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "wps", "part1", "part2")
                              .prefetch_related("welders"), pk=pk)
    row = weld_rows(weld.assembly, [weld])[0]
    inspections = weld.inspections.select_related("inspector", "supersedes").order_by("-inspected_at", "-pk")
    return render(request, "inspections/weld_detail.html", {
        "weld": weld, "assembly": weld.assembly, "row": row, "inspections": inspections,
        "wps_flags": wps_flags_for_job(weld.wps, weld.assembly.job),
        "ncrs": weld.ncrs.order_by("-raised_at"),
        "history": history.panel(weld),
        "capacities": capacity_cards(weld=weld) if weld.joint_type == JointType.FILLET else [],
        "may_edit": not weld.assembly.is_closed and weld.latest_final_id is None and (
            can(request.user, "job.manage") or can(request.user, "weld.record")),
        "may_revise": not weld.assembly.is_closed and weld.inspected and can(request.user, "job.manage"),
    })


def _check_context(assembly, weld, wps=None, welders=None, on=None):
    """The 'may this welder make this weld with this WPS' panel for the weld form."""
    wps = wps if wps is not None else weld.wps if weld.wps_id else None
    if welders is None:
        welders = list(weld.welders.all()) if weld.pk else []
    on = on or weld.welded_on or timezone.localdate()
    weld.wps = wps
    checks = [steps.check_welder(w, weld, on=on) for w in welders] if wps is not None else []
    wps_errors = []
    if wps is not None:
        complete = all(getattr(weld, name) is not None
                       for name in ("joint_type", "position", "thickness1", "thickness2", "size"))
        if complete:
            wps_errors = chain.wps_check(weld, wps, assembly.job, on).errors
        elif reason := wps.in_force_on(on):
            wps_errors = [reason]
    return {"wps": wps, "wps_approved": bool(wps and wps.state == WPSState.APPROVED), "wps_errors": wps_errors,
            "checks": checks, "welders": welders, "on": on, "wps_flags": wps_flags_for_job(wps, assembly.job)}


@require_safe
@role_required("job.manage", "weld.record")
def weld_check(request, pk):
    """htmx: the qualification panel for what the weld form holds now (nothing is saved)."""
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    weld = Weld(assembly=assembly)
    existing = parse_id(request.GET.get("weld", ""))
    if existing is not None:
        weld = get_object_or_404(Weld.objects.select_related("wps"), pk=existing, assembly=assembly)
    form = WeldForm(request.GET, assembly=assembly, instance=weld)
    form.is_valid()  # read what is readable; a half-filled form still gets an answer for its valid parts
    data = form.cleaned_data
    for name in ("joint_type", "position", "thickness1", "thickness2"):
        if data.get(name) is not None:
            setattr(weld, name, data[name])
    wps_id = parse_id(request.GET.get("wps", ""))
    wps = WPS.objects.filter(pk=wps_id).first() if wps_id is not None else None
    ids = [i for i in (parse_id(v) for v in request.GET.getlist("welders")[:50]) if i is not None]
    welders = list(Welder.objects.filter(pk__in=ids).order_by("stamp"))
    context = _check_context(assembly, weld, wps=wps, welders=welders, on=data.get("welded_on"))
    if weld.thickness1 is None or weld.thickness2 is None:
        context["checks"] = []
        context["need_thickness"] = True
    return render(request, "inspections/weld_check.html", {"check": context})


# --- weld map CSV ----------------------------------------------------------------------------------------

@role_required("job.manage")
@require_http_methods(["GET", "POST"])
def weldmap_import(request, pk):
    job = get_visible_or_404(request.user, Job, pk=pk)
    preview = None
    form = WeldMapUploadForm()
    csv_text = ""
    if request.method == "POST" and request.POST.get("step") == "confirm":
        csv_text = request.POST.get("csv_text", "")
        data = csv_text.encode("utf-8")
        try:
            welds = weldmap_csv.import_weld_map(data, job, request.user)
        except Refused:
            preview = weldmap_csv.read_weld_map(data, job)
            return render(request, "inspections/job_weldmap_import.html",
                          {"job": job, "form": form, "preview": preview, "csv_text": csv_text}, status=400)
        messages.success(request, f"{len(welds)} welds imported.")
        return redirect(job)
    if request.method == "POST":
        form = WeldMapUploadForm(request.POST, request.FILES)
        if form.is_valid():
            upload = form.cleaned_data["file"]
            if upload.size > weldmap_csv.MAX_BYTES:
                form.add_error("file", f"The file is larger than {weldmap_csv.MAX_BYTES // 1024} KB; split it by "
                               "assembly.")
            else:
                data = upload.read()
                preview = weldmap_csv.read_weld_map(data, job)
                if preview.file_errors:
                    for error in preview.file_errors:
                        form.add_error("file", error)
                    preview = None
                else:
                    csv_text = data.decode("utf-8-sig")
    status = 400 if request.method == "POST" and (form.errors or (preview and not preview.ok)) else 200
    return render(request, "inspections/job_weldmap_import.html",
                  {"job": job, "form": form, "preview": preview, "csv_text": csv_text,
                   "columns": weldmap_csv.COLUMNS}, status=status)


@require_safe
def weldmap_export(request, pk):
    job = get_visible_or_404(request.user, Job, pk=pk)
    safe_number = "".join(c if c.isalnum() or c in "-_" else "_" for c in job.number)
    return lists.stream_csv(weldmap_csv.export_lines(job), f"weld-map-{safe_number}.csv")
