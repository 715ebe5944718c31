"""The tablet pages: find an assembly, the inspector's queue, tap a weld (or a pass over identical welds), record and
sign its inspection with photos taken before signing, go on to the next weld.

Reading needs a login (everyone); recording needs `inspection.record`. The live preview judges what is typed and
saves nothing; signing judges once (inspections.services.inspect) and refuses a verdict other than the one the
panel showed. A draft (kept for later) is its inspector's only. Photos are served only through views that check
the user, never as public media.
"""

from django.contrib import messages
from django.core.exceptions import ValidationError
from django.core.files.base import ContentFile
from django.db.models import Exists, OuterRef, Q
from django.http import FileResponse, Http404, QueryDict
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import reverse
from django.utils import timezone
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import faults, history, seals
from core.errors import RecordLocked, Refused
from core.inputs import parse_id
from core.roles import can, role_required
from core.storage import files_or_nothing
from core.visibility import get_visible_or_404, visible
from core.vocabulary import JointType
from inspections import queue as inspection_queue
from inspections.forms.inspect import CorrectionForm, FindAssemblyForm, InspectionForm, PhotoForm
from inspections.models import NCR, Assembly, DraftPhoto, Inspection, InspectionDraft, Photo, Weld
from inspections.models.ncr import Disposition, NCRState
from inspections.photos import PhotoError, clean_photo
from inspections.services import inspect as service
from inspections.services import trace
from inspections.services.assemblies import weld_statuses
from inspections.services.capacity import capacity_cards
from inspections.services.chain import wps_checks
from inspections.services.flags import weld_flags

SEARCH_LIMIT = 30
WELD_RELATED = ("assembly__job__client_criteria", "wps")
SIGN_RELATED = ("assembly__job__client_criteria",)
MAX_HELD_PHOTOS = 12  # photos held in one draft: more is a slip of the shutter, not a record of one weld


@require_safe
def inspect_home(request):
    """A big search box: a piece mark that names one assembly goes straight to it. Below: the inspector's drafts."""
    form = FindAssemblyForm(request.GET or None)
    results = None
    if form.is_valid():
        q = form.cleaned_data["q"]
        found = list(visible(request.user, Assembly.objects.select_related("job").filter(piece_mark__istartswith=q))
                     .order_by("piece_mark", "job__number")[:SEARCH_LIMIT])
        exact = [a for a in found if a.piece_mark.lower() == q.lower()]
        if len(exact) == 1:
            return redirect("inspections:inspect_assembly", pk=exact[0].pk)
        results = found
    drafts = list(InspectionDraft.objects.filter(inspector=request.user)
                  .select_related("weld__assembly").order_by("-updated_at")[:20])
    return render(request, "inspections/inspect_home.html", {"form": form, "results": results,
                                                             "limit": SEARCH_LIMIT, "drafts": drafts})


@require_safe
def inspect_queue(request):
    """What waits for inspection, by job and stage, overdue first: a fixed number of queries."""
    return render(request, "inspections/inspect_queue.html", {
        "jobs": inspection_queue.waiting(), "due_days": inspection_queue.due_days(),
        "drafts": list(InspectionDraft.objects.filter(inspector=request.user)
                       .select_related("weld__assembly").order_by("-updated_at")[:20]),
    })


@require_safe
def inspect_assembly(request, pk):
    """One assembly's welds as cards (the URL a traveler's QR code carries), identical welds offered as one pass.

    A weld whose WPS was not approved on the weld date, or does not cover the weld, shows as blocked with why
    (inspections.services.chain.wps_checks)."""
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job__client_criteria"), pk=pk)
    welds = list(Weld.objects.filter(assembly=assembly).select_related("wps").order_by("mark"))
    for weld in welds:
        weld.assembly = assembly
        weld.flags = weld_flags(weld)
    statuses = weld_statuses([w.pk for w in welds])
    wps = wps_checks(welds, assembly.job)
    drafts = set(InspectionDraft.objects.filter(inspector=request.user, weld__in=welds)
                 .values_list("weld_id", flat=True))
    cards = [(weld, statuses[weld.pk], wps[weld.pk].errors if weld.wps_id else []) for weld in welds]
    return render(request, "inspections/inspect_assembly.html", {
        "assembly": assembly, "job": assembly.job, "cards": cards, "system": assembly.job.unit_system,
        "may_record": can(request.user, "inspection.record"), "drafts": drafts,
        "passes": _identical_passes(welds, statuses) if not assembly.is_closed else [],
    })


def _identical_passes(welds, statuses):
    """Groups of two or more identical welds not yet accepted: each can be inspected in one pass."""
    groups = {}
    for weld in welds:
        if statuses[weld.pk].word in ("accepted", "use_as_is"):
            continue
        groups.setdefault(service.batch_key(weld), []).append(weld)
    return [group for group in groups.values() if len(group) > 1]


def _weld(request, pk, related=WELD_RELATED):
    return get_visible_or_404(request.user, Weld.objects.select_related(*related), pk=pk)


def _batch_of(weld, request):
    """The identical welds of the same assembly named by ?with=pk,pk (GET) or the posted 'with' (POST)."""
    raw = request.POST.get("with") if request.method == "POST" else request.GET.get("with")
    ids = [pk for pk in (parse_id(part) for part in (raw or "").split(",")[:50]) if pk is not None]
    if not ids:
        return []
    others = [w for w in Weld.objects.filter(assembly_id=weld.assembly_id, pk__in=ids).exclude(pk=weld.pk)
              .order_by("mark")]
    for other in others:
        other.assembly = weld.assembly
    key = service.batch_key(weld)
    return [w for w in others if service.batch_key(w) == key]


def _draft_initial(draft):
    """A kept draft as the form's initial values (typed text as it was; switches and ticks as they were)."""
    if draft is None or not draft.data:
        return {}
    data = QueryDict(mutable=True)
    for key, values in draft.data.items():
        data.setlist(key, values if isinstance(values, list) else [values])
    initial = {}
    for key in data:
        values = data.getlist(key)
        if key == "welds":
            initial[key] = values
        elif values:
            initial[key] = True if values[-1] == "on" else values[-1]
    return initial


def _posted(request) -> dict:
    return {key: request.POST.getlist(key) for key in request.POST if key != "csrfmiddlewaretoken"}


@require_http_methods(["GET", "POST"])
@role_required("inspection.record")
def inspect_weld(request, pk):
    """The inspection form for one weld (or a pass over identical welds): preview as typed, keep for later, add
    photos, sign."""
    weld = _weld(request, pk, related=SIGN_RELATED if request.method == "POST" else WELD_RELATED)
    batch = _batch_of(weld, request)
    draft = service.draft_for(weld, request.user)
    if request.method == "GET":
        form = InspectionForm(weld=weld, batch=batch, initial=_draft_initial(draft) or None)
        return _form_page(request, form, weld, draft=draft)
    action = request.POST.get("action", "sign")
    if action == "discard":
        if draft is not None:
            service.discard_draft(draft)
        messages.info(request, f"Draft of weld {weld.mark} thrown away.")
        return redirect(reverse("inspections:inspect_weld", args=[weld.pk])
                        + (f"?with={request.POST.get('with')}" if batch else ""))
    if action in ("keep", "photo") or request.FILES.getlist("photo"):
        draft = service.keep_draft(weld, request.user, _posted(request))
        photo_errors = _hold_photos(request, weld, draft)
        if action == "keep":
            messages.success(request, f"Weld {weld.mark} kept as a draft: only you see it, nothing is signed.")
            return redirect("inspections:inspect_assembly", pk=weld.assembly_id)
        if action == "photo":
            if request.headers.get("HX-Request"):
                return _held_partial(request, weld, draft, photo_errors)
            form = InspectionForm(request.POST, weld=weld, batch=batch)
            return _form_page(request, form, weld, draft=draft, photo_errors=photo_errors, judge=False)
        if photo_errors:
            form = InspectionForm(request.POST, weld=weld, batch=batch)
            return _form_page(request, form, weld, draft=draft, photo_errors=photo_errors, status=400, judge=False)
    form = InspectionForm(request.POST, weld=weld, batch=batch)
    if form.is_valid():
        inspections = _sign(request, form, form.selected_batch(), draft=draft)
        if inspections:
            return redirect(inspections[0])
    return _form_page(request, form, weld, draft=draft, status=400 if form.errors else 200)


def _hold_photos(request, weld, draft) -> list[str]:
    """Clean and hold the photos of this request in the draft; the messages of the ones refused."""
    errors = []
    files = request.FILES.getlist("photo")
    room = MAX_HELD_PHOTOS - draft.photos.count()
    caption = request.POST.get("photo_caption", "").strip()[:200]
    for upload in files:
        if room <= 0:
            errors.append(f"At most {MAX_HELD_PHOTOS} photos wait for one signature; sign, then add more.")
            break
        try:
            clean = clean_photo(upload)
        except PhotoError as exc:
            errors.append(f"{upload.name}: {exc}")
            continue
        service.add_draft_photo(weld, request.user, clean, caption)
        room -= 1
    return errors


def _held_partial(request, weld, draft, errors=(), status=200):
    return render(request, "inspections/inspect_weld.html#held", {
        "weld": weld, "held": list(draft.photos.all()) if draft is not None else [], "photo_errors": errors},
        status=status)


def _sign(request, form, welds, supersedes=None, draft=None):
    data = form.cleaned_data
    try:
        inspections = service.sign_batch(
            welds, form.observed(), data["stage"], request.user, supersedes=supersedes,
            reason=data.get("correction_reason", ""), remarks=data.get("remarks", ""), draft=draft,
            shown=data.get("shown_verdict") or "", gauge=data.get("gauge"))
    except service.VerdictChanged as exc:
        form.changed_verdict = exc.verdict
        form.add_error(None, _message(exc) if data.get("shown_verdict") else
                       "Check the verdict beside the form: it is what signing records. Then sign again.")
        return None
    except (Refused, ValidationError, ValueError) as exc:
        form.add_error(None, _message(exc))
        return None
    first = inspections[0]
    marks = ", ".join(i.weld.mark for i in inspections)
    ncrs = [n for i in inspections if not i.accepted for n in i.ncrs.all()]
    if first.accepted:
        messages.success(request, f"Signed: weld{'s' if len(inspections) > 1 else ''} {marks} accepted.")
    elif ncrs:
        messages.error(request, f"Signed: weld{'s' if len(inspections) > 1 else ''} {marks} rejected. "
                                f"{', '.join(str(n) for n in ncrs)} opened.")
    else:
        messages.warning(request, f"Signed: weld{'s' if len(inspections) > 1 else ''} {marks} rejected.")
    return inspections


def _message(exc):
    if isinstance(exc, ValidationError):
        return " ".join(exc.messages)
    return str(exc)


def _judged(form, weld):
    """(verdict, digest) of what the bound form holds, or (None, ""): the panel shows exactly this."""
    changed = getattr(form, "changed_verdict", None)
    if changed is not None:
        return changed, service.verdict_digest(changed)
    if not form.is_bound or not form.is_valid():
        return None, ""
    welds = form.selected_batch()
    try:
        verdict = service.judge(welds[0] if welds else weld, form.observed(), form.cleaned_data["stage"])
    except ValueError as exc:
        form.add_error(None, str(exc))
        return None, ""
    return verdict, service.verdict_digest(verdict)


def _form_page(request, form, weld, correcting=None, draft=None, photo_errors=(), status=200, judge=True):
    verdict, digest = _judged(form, weld) if judge else (None, "")
    if form.is_bound and "shown_verdict" in form.fields:
        form.data = form.data.copy()
        form.data["shown_verdict"] = digest  # what the panel shows now is what signing will accept
    return render(request, "inspections/inspect_weld.html", {
        "form": form, "weld": weld, "assembly": weld.assembly, "job": weld.assembly.job,
        "system": weld.assembly.job.unit_system, "verdict": verdict, "digest": digest, "correcting": correcting,
        "draft": draft, "held": list(draft.photos.all()) if draft is not None else [],
        "photo_errors": photo_errors, "too_early": service.final_visual_refusal(weld), "flags": weld_flags(weld),
        "no_credential": trace.credential_refusal(request.user, timezone.localdate()),
        "batch_ids": ",".join(str(w.pk) for w in form.batch),
    }, status=status)


@require_POST
@role_required("inspection.record")
def inspect_preview(request, pk):
    """The findings for what is typed so far (htmx partial), with the fingerprint of that verdict for the sign
    button. Judges only; saves nothing."""
    weld = _weld(request, pk)
    form = InspectionForm(request.POST, weld=weld, batch=_batch_of(weld, request))
    if not form.typed_anything():  # the page has just opened: nothing to judge yet, nothing wrong either
        return render(request, "inspections/inspect_weld.html#preview", {
            "form": InspectionForm(weld=weld), "verdict": None, "digest": "", "preview": True})
    verdict, digest = _judged(form, weld)
    return render(request, "inspections/inspect_weld.html#preview", {
        "form": form, "verdict": verdict, "digest": digest, "system": weld.assembly.job.unit_system,
        "preview": True})


def _inspection(request, pk):
    return get_visible_or_404(
        request.user, Inspection.objects.select_related(
            "weld__assembly__job__client_criteria", "weld__wps", "inspector", "credential", "gauge_calibration__gauge",
            "supersedes__inspector",
            "superseded_by__inspector"), pk=pk)


@require_safe
def inspection_detail(request, pk):
    inspection = _inspection(request, pk)
    return _detail_page(request, inspection, PhotoForm())


@require_safe
def inspection_pdf(request, pk):
    """The inspection as a printable report: what was recorded (the table of observations' words), the verdict with
    every finding and its source, the photos; on the job's paper."""
    from core.pdf import pdf_response, render_pdf
    from inspections import wording
    from inspections.traveler import _thumbnail_uri, job_paper

    inspection = _inspection(request, pk)
    weld, job = inspection.weld, inspection.weld.assembly.job
    system = job.unit_system
    findings = sorted((f for f in inspection.findings or [] if isinstance(f, dict)), key=lambda f: bool(f.get("ok")))
    photos = [{"caption": p.caption, "uri": _thumbnail_uri(p.thumbnail.name)} for p in inspection.photos.all()]
    rendered = render_pdf("pdf/inspection.html", {
        "inspection": inspection, "weld": weld, "assembly": weld.assembly, "job": job, "system": system,
        "size": wording.weld_size(weld), "length": wording.run_length(weld.length, system),
        "recorded": inspection.recorded(system), "findings": findings, "photos": photos,
        "ncrs": [str(n) for n in inspection.ncrs.all()], "superseded": not inspection.is_current,
    }, f"inspection-{job.number}-{weld.assembly.piece_mark}-{weld.mark}-{inspection.pk}.pdf".replace(" ", "_"),
        paper=job_paper(job))
    return pdf_response(rendered)


def next_weld(inspection):
    """The weld to go to after this one: the next by mark (wrapping round) still waiting for the inspector (no
    current final inspection, or a repair waiting for its re-inspection); None when none. One query."""
    weld = inspection.weld
    repair = NCR.objects.filter(weld=OuterRef("pk"), state=NCRState.DISPOSITIONED, disposition=Disposition.REPAIR)
    waiting = list(Weld.objects.filter(assembly_id=weld.assembly_id)
                   .filter(Q(latest_final__isnull=True) | Exists(repair)).exclude(pk=weld.pk)
                   .order_by("mark").only("pk", "mark"))
    after = [w for w in waiting if w.mark > weld.mark]
    return (after or waiting or [None])[0]


def _detail_page(request, inspection, photo_form, status=200):
    earlier, later = _chain(inspection)
    job = inspection.weld.assembly.job
    batch = []
    if inspection.batch is not None:
        batch = list(Inspection.objects.filter(batch=inspection.batch).exclude(pk=inspection.pk)
                     .select_related("weld").order_by("weld__mark"))
    photos = list(inspection.photos.all())
    return render(request, "inspections/inspection_detail.html", {
        "inspection": inspection, "weld": inspection.weld, "assembly": inspection.weld.assembly,
        "job": job, "photos": photos,
        "history": history.panel(inspection, *photos), "history_mixed": bool(photos),
        "ncrs": list(inspection.ncrs.all()), "earlier": earlier, "later": later,
        "is_current": not later, "photo_form": photo_form, "batch": batch,
        "recorded": inspection.recorded(job.unit_system),
        "capacities": (capacity_cards(inspection=inspection)
                       if inspection.weld.joint_type == JointType.FILLET else []),
        "may_record": can(request.user, "inspection.record"),
        "next_weld": next_weld(inspection) if not inspection.weld.assembly.is_closed else None,
    }, status=status)


def _chain(inspection, limit=50):
    """(older inspections it supersedes, newer ones superseding it), nearest first. One query per link."""
    earlier, node = [], inspection.supersedes
    while node is not None and len(earlier) < limit:
        earlier.append(node)
        node = Inspection.objects.select_related("inspector", "supersedes").get(pk=node.pk).supersedes
    later = []
    node = _superseded_by(inspection)
    while node is not None and len(later) < limit:
        later.append(node)
        node = _superseded_by(node)
    return earlier, later


def _superseded_by(inspection):
    return Inspection.objects.select_related("inspector").filter(supersedes=inspection).first()


@require_http_methods(["GET", "POST"])
@role_required("inspection.record")
def inspection_correct(request, pk):
    """Record a correction: a new inspection of the same weld that supersedes this one, with a reason."""
    old = _inspection(request, pk)
    weld = _weld(request, old.weld_id)
    if not old.is_current:
        messages.warning(request, "That inspection has already been corrected: this is the latest one.")
        return redirect(_chain(old)[1][-1])
    if request.method == "POST":
        form = CorrectionForm(request.POST, weld=weld)
        if form.is_valid():
            inspections = _sign(request, form, [weld], supersedes=old)
            if inspections:
                return redirect(inspections[0])
    else:
        form = CorrectionForm(weld=weld, initial=_initial_from(old))
    return _form_page(request, form, weld, correcting=old)


def _initial_from(inspection):
    initial = {name: getattr(inspection, name) for name in InspectionForm.Meta.fields}
    initial["fit_up_ok"] = inspection.stage == "fit_up" and inspection.accepted
    return initial


@require_POST
@role_required("inspection.record")
def photo_add(request, pk):
    """Attach a photo (straight from the camera) to a signed inspection; cleaned before it is stored."""
    inspection = _inspection(request, pk)
    if not inspection.is_current:
        messages.warning(request, "Attach photos to the correction that supersedes this inspection.")
        return redirect(inspection)
    form = PhotoForm(request.POST, request.FILES)
    if not form.is_valid():
        return _detail_page(request, inspection, form, status=400)
    clean = form.photo
    stem = f"{inspection.pk}-{clean.sha256[:16]}"
    photo = Photo(
        inspection=inspection, caption=form.cleaned_data["caption"], width=clean.width, height=clean.height,
        content_type=clean.content_type, sha256=clean.sha256, uploaded_by=request.user,
        image=ContentFile(clean.content, name=f"{stem}.{clean.extension}"),
        thumbnail=ContentFile(clean.thumbnail, name=f"{stem}-thumb.jpg"),
    )
    try:
        # A photo is evidence: sealed with the stored files' SHA-256 (core.seals); refused once the assembly is
        # released or scrapped (core.locking). The photo, its thumbnail and the row: all or nothing.
        with files_or_nothing(), seals.sealing():
            photo.save(user=request.user)
            seals.seal(photo, "photo.attached")
    except RecordLocked as exc:
        form.add_error(None, exc.messages)
        return _detail_page(request, inspection, form, status=409)
    except OSError as exc:  # disk full, folder not writable: said beside the photo, the caption kept
        message = faults.storage_message(exc, "photo")
        if message is None:
            raise
        form.add_error("image", message)
        return _detail_page(request, inspection, form, status=503)
    messages.success(request, "Photo attached.")
    return redirect(reverse("inspections:inspection_detail", args=[inspection.pk]) + "#photos")


def _send(field, name, content_type):
    try:
        handle = field.open("rb")
    except (FileNotFoundError, ValueError):
        raise Http404("The photo file is missing.") from None
    response = FileResponse(handle, content_type=content_type, filename=name)
    response["Cache-Control"] = "private, max-age=3600"
    return response


@require_safe
def photo_file(request, pk, size="full"):
    """A photo or its thumbnail, to logged-in users only (login is required everywhere), never cached (no-store,
    core.middleware.PrivacyHeaders: a shared tablet keeps no copy)."""
    photo = get_visible_or_404(request.user, Photo, pk=pk)
    field = photo.thumbnail if size == "thumbnail" else photo.image
    content_type = "image/jpeg" if size == "thumbnail" else photo.content_type
    extension = "jpg" if size == "thumbnail" else field.name.rsplit(".", 1)[-1]
    return _send(field, f"inspection-{photo.inspection_id}-photo-{photo.pk}"
                        f"{'-thumb' if size == 'thumbnail' else ''}.{extension}", content_type)


@require_safe
@role_required("inspection.record")
def draft_photo_file(request, pk):
    """A photo held in a draft, to the draft's inspector only (to anyone else it does not exist)."""
    photo = get_object_or_404(DraftPhoto, pk=pk, draft__inspector=request.user)
    return _send(photo.thumbnail, f"draft-photo-{photo.pk}-thumb.jpg", "image/jpeg")


@require_POST
@role_required("inspection.record")
def draft_photo_remove(request, pk):
    """Take a held photo out of the inspector's own draft (before signing; a signed photo is never removed)."""
    photo = get_object_or_404(DraftPhoto.objects.select_related("draft__weld"), pk=pk, draft__inspector=request.user)
    weld, draft = photo.draft.weld, photo.draft
    photo.image.delete(save=False)
    photo.thumbnail.delete(save=False)
    photo.delete()
    if request.headers.get("HX-Request"):
        return _held_partial(request, weld, draft)
    return redirect("inspections:inspect_weld", pk=weld.pk)
