"""Travelers (issue, list of revisions, download) and job packets (choose, start, progress, download).

Files are never served from media by URL: each download checks the login (LoginRequiredMiddleware) and
sends the stored bytes with their SHA-256 in the X-Content-SHA256 header.
"""

from django.contrib import messages
from django.core.exceptions import PermissionDenied
from django.db.models import Count, OuterRef, Subquery
from django.http import FileResponse, Http404, HttpResponse
from django.shortcuts import redirect, render
from django.views.decorators.http import require_POST, require_safe

from core import faults, history
from core.errors import Refused
from core.inputs import parse_ids
from core.roles import can, role_required
from core.visibility import get_visible_or_404
from inspections import packets
from inspections import traveler as travelers
from inspections.forms.jobs import PacketRuleForm, add_step_errors
from inspections.models import Assembly, Job, JobPacket, PacketState, Traveler


def _file_response(field, filename, sha256, inline=True):
    try:
        handle = field.open("rb")
    except (FileNotFoundError, ValueError):
        raise Http404("The stored file is missing; ask the administrator to restore it from the backup.")
    response = FileResponse(handle, content_type="application/pdf", as_attachment=not inline, filename=filename)
    response["X-Content-SHA256"] = sha256
    return response


# --- travelers ------------------------------------------------------------------------------------------------

@require_safe
def traveler_list(request, pk):
    """Every issued revision of the assembly's traveler, newest first, and whether the records changed since."""
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    revisions = list(assembly.travelers.select_related("generated_by").order_by("-revision"))
    latest = revisions[0] if revisions else None
    changed = None
    if can(request.user, "traveler.issue"):
        # Only the person who can issue needs to know whether issuing would make a new revision.
        changed = latest is None or latest.snapshot_sha256 != travelers.fingerprint(travelers.gather(assembly.pk))
    return render(request, "inspections/traveler_list.html", {
        "assembly": assembly, "job": assembly.job, "revisions": revisions, "latest": latest, "changed": changed,
        "history": history.panel(*revisions)})


@role_required("traveler.issue")
@require_POST
def traveler_issue(request, pk):
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    try:
        traveler, created = travelers.issue(assembly, request.user)
    except OSError as exc:  # disk full, folder not writable: no traveler row, no part of a PDF
        message = faults.storage_message(exc, "traveler")
        if message is None:
            raise
        messages.error(request, message)
        return redirect("inspections:traveler_list", pk=assembly.pk)
    if created:
        messages.success(request, f"Issued {traveler.document_number} ({traveler.pages} pages).")
    else:
        messages.info(request, f"Nothing changed since {traveler.document_number}: it is the current traveler "
                               "(the stored file, unchanged).")
    return redirect("inspections:traveler_list", pk=assembly.pk)


@require_safe
def traveler_download(request, pk):
    traveler = get_visible_or_404(request.user, Traveler, pk=pk)
    return _file_response(traveler.file, traveler.filename, traveler.sha256, inline=request.GET.get("dl") != "1")


@require_safe
def traveler_sha256(request, pk):
    """The sidecar line, as `sha256sum -c` reads it."""
    traveler = get_visible_or_404(request.user, Traveler, pk=pk)
    response = HttpResponse(f"{traveler.sha256}  {traveler.filename}\n", content_type="text/plain; charset=utf-8")
    response["Content-Disposition"] = f'attachment; filename="{traveler.filename}.sha256"'
    return response


# --- packets --------------------------------------------------------------------------------------------------

CHECKBOXES = 150  # up to this many assemblies the page offers a checkbox each; above, rules (PacketRuleForm)


def _packet_page(request, job, errors=None, chosen=None, status=200, rule_form=None):
    """A small job: a checkbox per assembly with its latest traveler. A big one: counts by state and the rule form,
    so the page weighs the same for 200 or 20,000 assemblies."""
    counts = dict(job.assemblies.values_list("state").annotate(n=Count("pk")).order_by())
    total = sum(counts.values())
    rows = []
    if total <= CHECKBOXES:
        # one row per assembly with its latest traveler's number (a subquery), never every revision
        latest = Traveler.objects.filter(assembly=OuterRef("pk")).order_by("-revision").values("document_number")[:1]
        assemblies = list(job.assemblies.only("pk", "piece_mark", "state", "job_id")
                          .annotate(traveler_number=Subquery(latest)).order_by("piece_mark"))
        rows = [(a, {"document_number": a.traveler_number} if a.traveler_number else None) for a in assemblies]
        if rule_form is not None:  # a rule refused on a job now small (a page left open): its errors above the boxes
            errors = [*(errors or []), *(e for found in rule_form.errors.values() for e in found)]
            rule_form = None
    first_rule = {"rule": "state"} if total > packets.MAX_ASSEMBLIES else None  # "every one" would be refused
    return render(request, "inspections/packet_list.html", {
        "job": job, "rows": rows, "errors": errors or [], "total": total,
        "rule_form": rule_form or (PacketRuleForm(counts=counts, initial=first_rule) if total > CHECKBOXES else None),
        "chosen": set(chosen) if chosen is not None else {a.pk for a, _t in rows},
        "packets": list(job.packets.select_related("requested_by")[:20]),
    }, status=status)


@require_safe
def packet_list(request, pk):
    job = get_visible_or_404(request.user, Job, pk=pk)
    return _packet_page(request, job)


@role_required("traveler.issue")
@require_POST
def packet_start(request, pk):
    job = get_visible_or_404(request.user, Job, pk=pk)
    if "rule" in request.POST:  # a big job: assemblies chosen by rule
        form = PacketRuleForm(request.POST)
        if form.is_valid():
            try:
                data = form.cleaned_data
                chosen = packets.choose_assemblies(job, data["rule"], data["state"], data["marks"])
                return redirect(packets.start_packet(job, chosen, request.user))
            except Refused as exc:
                add_step_errors(form, exc)
        return _packet_page(request, job, status=400, rule_form=form)
    chosen = parse_ids(request.POST.getlist("assemblies"), limit=packets.MAX_ASSEMBLIES)
    if chosen is None:
        return _packet_page(request, job, ["The assemblies chosen could not be read; choose them again."], [], 400)
    try:
        packet = packets.start_packet(job, chosen, request.user)
    except Refused as exc:
        return _packet_page(request, job, exc.messages, chosen, 400)
    return redirect(packet)


def _packet(request, pk):
    return get_visible_or_404(request.user, JobPacket.objects.select_related("job", "requested_by"), pk=pk)


@require_safe
def packet_detail(request, pk):
    packet = _packet(request, pk)
    return render(request, "inspections/packet_detail.html", {"packet": packet, "history": history.panel(packet)})


@require_safe
def packet_progress(request, pk):
    """The progress block alone; htmx polls it every second until the packet is done or failed."""
    return render(request, "inspections/packet_progress.html", {"packet": _packet(request, pk)})


@require_safe
def packet_download(request, pk):
    packet = _packet(request, pk)
    if packet.state != PacketState.DONE:
        raise Http404("The packet is not built yet.")
    if not packet.file:
        raise PermissionDenied("The packet has no file.")
    return _file_response(packet.file, packet.filename, packet.sha256, inline=request.GET.get("dl") != "1")
