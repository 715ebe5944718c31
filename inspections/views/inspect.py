"""The tablet pages: find an assembly, tap a weld, record and sign its inspection, attach photos.

Reading needs a login (everyone); recording needs `inspection.record`. The live preview judges what is typed
and saves nothing. Photos are served only through photo_file, never as public media.
"""

from django.contrib import messages
from django.core.exceptions import ValidationError
from django.core.files.base import ContentFile
from django.db import transaction
from django.http import FileResponse, Http404
from django.shortcuts import redirect, render
from django.urls import reverse
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import faults
from core.errors import Refused
from core.roles import can, role_required
from core.storage import files_or_nothing
from core.visibility import get_visible_or_404, visible
from core.vocabulary import JointType
from inspections.forms.inspect import CorrectionForm, FindAssemblyForm, InspectionForm, PhotoForm
from inspections.models import Assembly, Inspection, Photo, Weld
from inspections.models.inspection import FLAG_OBSERVATIONS
from inspections.services.assemblies import weld_statuses
from inspections.services.capacity import capacity_cards
from inspections.services.inspect import judge, sign_inspection

SEARCH_LIMIT = 30
WELD_RELATED = ("assembly__job__client_criteria", "wps")
SIGN_RELATED = ("assembly__job__client_criteria",)
MORE_FIELDS = ("porosity_sum_1in", "porosity_sum_12in", "pore_max", "pores_per_4in", "convexity", "face_width",
               "throat", "crater_depth")


@require_safe
def inspect_home(request):
    """A big search box: a piece mark that names one assembly goes straight to it."""
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
    return render(request, "inspections/inspect_home.html", {"form": form, "results": results,
                                                             "limit": SEARCH_LIMIT})


@require_safe
def inspect_assembly(request, pk):
    """One assembly's welds as cards (the URL a traveler's QR code carries). Four queries, whatever the welds."""
    assembly = get_visible_or_404(request.user, Assembly.objects.select_related("job"), pk=pk)
    welds = list(Weld.objects.filter(assembly=assembly).select_related("wps").order_by("mark"))
    statuses = weld_statuses([w.pk for w in welds])
    cards = [(weld, statuses[weld.pk]) for weld in welds]
    return render(request, "inspections/inspect_assembly.html", {
        "assembly": assembly, "job": assembly.job, "cards": cards, "system": assembly.job.unit_system,
        "may_record": can(request.user, "inspection.record"),
    })


def _weld(request, pk, related=WELD_RELATED):
    return get_visible_or_404(request.user, Weld.objects.select_related(*related), pk=pk)


@require_http_methods(["GET", "POST"])
@role_required("inspection.record")
def inspect_weld(request, pk):
    """The inspection form for one weld; saving signs it."""
    if request.method == "POST":
        # Signing needs the weld, its assembly, job and criteria; the WPS only shows if the form comes back with
        # errors (then read on demand), so the save does not join and convert the WPS row.
        weld = _weld(request, pk, related=SIGN_RELATED)
        form = InspectionForm(request.POST, weld=weld)
        if form.is_valid():
            inspection = _sign(request, form, weld)
            if inspection is not None:
                return redirect(inspection)
    else:
        weld = _weld(request, pk)
        form = InspectionForm(weld=weld)
    return _form_page(request, form, weld)


def _sign(request, form, weld, supersedes=None):
    data = form.cleaned_data
    try:
        inspection = sign_inspection(weld, data, data["stage"], request.user, supersedes=supersedes,
                                     reason=data.get("correction_reason", ""), remarks=data.get("remarks", ""))
    except (Refused, ValidationError, ValueError) as exc:
        form.add_error(None, _message(exc))
        return None
    ncr = None if inspection.accepted else inspection.ncrs.first()
    if inspection.accepted:
        messages.success(request, f"Signed: weld {weld.mark} accepted.")
    elif ncr is not None:
        messages.error(request, f"Signed: weld {weld.mark} rejected. {ncr} opened.")
    else:
        messages.warning(request, f"Signed: weld {weld.mark} rejected.")
    return inspection


def _message(exc):
    if isinstance(exc, ValidationError):
        return " ".join(exc.messages)
    return str(exc)


def _form_page(request, form, weld, correcting=None):
    return render(request, "inspections/inspect_weld.html", {
        "form": form, "weld": weld, "assembly": weld.assembly, "job": weld.assembly.job,
        "system": weld.assembly.job.unit_system, "verdict": None, "correcting": correcting,
        "flag_fields": [form[name] for name in FLAG_OBSERVATIONS],
        "more_open": any(form[name].value() not in (None, "") or form[name].errors for name in MORE_FIELDS),
    })


@require_POST
@role_required("inspection.record")
def inspect_preview(request, pk):
    """The findings for what is typed so far (htmx partial). Judges only; saves nothing."""
    weld = _weld(request, pk)
    form = InspectionForm(request.POST, weld=weld)  # a correction's reason is asked on save, not here
    verdict = None
    if form.is_valid():
        try:
            verdict = judge(weld, form.cleaned_data, form.cleaned_data["stage"])
        except ValueError as exc:
            form.add_error(None, str(exc))
    return render(request, "inspections/inspect_weld.html#findings", {
        "form": form, "verdict": verdict, "system": weld.assembly.job.unit_system, "preview": True})


def _inspection(request, pk):
    return get_visible_or_404(
        request.user, Inspection.objects.select_related("weld__assembly__job", "inspector", "supersedes__inspector",
                                          "superseded_by__inspector"), pk=pk)


@require_safe
def inspection_detail(request, pk):
    inspection = _inspection(request, pk)
    return _detail_page(request, inspection, PhotoForm())


def _detail_page(request, inspection, photo_form, status=200):
    earlier, later = _chain(inspection)
    return render(request, "inspections/inspection_detail.html", {
        "inspection": inspection, "weld": inspection.weld, "assembly": inspection.weld.assembly,
        "job": inspection.weld.assembly.job, "photos": list(inspection.photos.all()),
        "ncrs": list(inspection.ncrs.all()), "earlier": earlier, "later": later,
        "is_current": not later, "photo_form": photo_form,
        "capacities": (capacity_cards(inspection=inspection)
                       if inspection.weld.joint_type == JointType.FILLET else []),
        "may_record": can(request.user, "inspection.record"),
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
            inspection = _sign(request, form, weld, supersedes=old)
            if inspection is not None:
                return redirect(inspection)
    else:
        form = CorrectionForm(weld=weld, initial=_initial_from(old))
    return _form_page(request, form, weld, correcting=old)


def _initial_from(inspection):
    fields = InspectionForm.Meta.fields
    return {name: getattr(inspection, name) for name in fields}


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
    try:
        with files_or_nothing(), transaction.atomic():  # the photo, its thumbnail and the row: all or nothing
            Photo.objects.create(
                inspection=inspection, caption=form.cleaned_data["caption"], width=clean.width, height=clean.height,
                content_type=clean.content_type, sha256=clean.sha256, uploaded_by=request.user,
                image=ContentFile(clean.content, name=f"{stem}.{clean.extension}"),
                thumbnail=ContentFile(clean.thumbnail, name=f"{stem}-thumb.jpg"),
            )
    except OSError as exc:  # disk full, folder not writable: said beside the photo, the caption kept
        message = faults.storage_message(exc, "photo")
        if message is None:
            raise
        form.add_error("image", message)
        return _detail_page(request, inspection, form, status=503)
    messages.success(request, "Photo attached.")
    return redirect(reverse("inspections:inspection_detail", args=[inspection.pk]) + "#photos")


@require_safe
def photo_file(request, pk, size="full"):
    """A photo or its thumbnail, to logged-in users only (login is required everywhere), never cached (no-store,
    core.middleware.PrivacyHeaders: a shared tablet keeps no copy)."""
    photo = get_visible_or_404(request.user, Photo, pk=pk)
    field = photo.thumbnail if size == "thumbnail" else photo.image
    try:
        handle = field.open("rb")
    except (FileNotFoundError, ValueError):
        raise Http404("The photo file is missing.") from None
    content_type = "image/jpeg" if size == "thumbnail" else photo.content_type
    extension = "jpg" if size == "thumbnail" else field.name.rsplit(".", 1)[-1]
    response = FileResponse(handle, content_type=content_type,
                            filename=f"inspection-{photo.inspection_id}-photo-{photo.pk}"
                                     f"{'-thumb' if size == 'thumbnail' else ''}.{extension}")
    return response
