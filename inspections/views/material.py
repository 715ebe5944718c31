"""Material pages: the register of mill certificates (heats), an assembly's parts, the parts a weld joins. The
register is the shop's (a viewer: 403 on the list, 404 on a certificate); an assembly's parts are its job's (a viewer
of the customer reads them). Certificates are the QA lead's (register.manage); parts whoever keeps weld maps
(job.manage). Every change goes through inspections.services.material."""

import django_filters
from django.contrib import messages
from django.db.models import Count
from django.shortcuts import redirect, render
from django.views.decorators.http import require_http_methods, require_POST, require_safe

from core import history, lists
from core.documents import send_document
from core.errors import RecordLocked, Refused, Stale
from core.lists import Column, ListFilterSet, date_range, sort_by
from core.roles import can, role_required
from core.visibility import get_visible_or_404, sees_everything
from inspections import material as engine
from inspections.forms.material import MillCertificateForm, PartForm, WeldPartsForm
from inspections.models import Assembly, MaterialState, MillCertificate, Part, Weld
from inspections.services import material
from inspections.services.trace import REGISTERS
from inspections.views.trace import _with_reason, shop_only, stored_with_file
from procedures.forms.welders import ReasonForm

HEAT_EXAMPLE = "e.g. Heat number mistyped; recorded again"
PART_EXAMPLE = "e.g. Cut from another heat; recorded again with it"
PARTS_SHOWN = 50


class HeatFilter(ListFilterSet):
    q = django_filters.CharFilter(label="Heat or grade", method="search", max_length=40)
    certificate_type = django_filters.ChoiceFilter(choices=list(engine.CERTIFICATE_TYPES.items()), empty_label="Any",
                                                   label="Certificate")
    state = django_filters.ChoiceFilter(choices=MaterialState.choices, empty_label="Any")
    issued = date_range("issued_on", "Certificate date")
    o = sort_by((("issued_on", "issued"), ("heat_number", "heat"), ("producer", "producer")))

    class Meta:
        model = MillCertificate
        fields = []

    def search(self, queryset, name, value):
        words = value.strip()
        if not words:
            return queryset
        return queryset.filter(heat_number__icontains=words) | queryset.filter(grade__icontains=words)


HEAT_COLUMNS = [Column("Heat", "heat_number"), Column("Producer", "producer"), Column("Grade", "grade"),
                Column("Product", "product"), Column("Certificate", "certificate_type"),
                Column("Certificate date", "issued_on", lambda d: d.isoformat()), Column("State", "state"),
                Column("Certificate SHA-256", "document_sha256")]


@require_safe
def heat_list(request):
    shop_only(request)
    heats = MillCertificate.objects.annotate(used=Count("parts")).order_by("-issued_on", "-pk")
    filterset = HeatFilter(request.GET, queryset=heats, request=request)
    return lists.list_page(request, filterset, "inspections/heat_list.html", {"register": "heats"},
                           columns=HEAT_COLUMNS, filename="heats.csv")


@role_required(REGISTERS)
@require_http_methods(["GET", "POST"])
def heat_create(request):
    form = MillCertificateForm(request.POST or None, request.FILES or None)
    if request.method == "POST" and form.is_valid():
        certificate = form.save(commit=False)
        if stored_with_file(form, material.record_certificate, certificate, request.user, "mill certificate"):
            messages.success(request, f"Recorded: {certificate}.")
            return redirect(certificate)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": "Record a mill certificate", "submit": "Record heat", "multipart": True,
        "back": "inspections:heat_list", "back_label": "Heats",
        "intro": "As the certificate prints it: the heat number, grade(s), chemistry and mechanical values, with the "
                 "scan. Never edited afterwards: a mistake is withdrawn with a reason and recorded again."},
        status=400 if form.errors else 200)


def _heat(request, pk):
    return get_visible_or_404(request.user, MillCertificate.objects.select_related("recorded_by"), pk=pk)


@require_safe
def heat_detail(request, pk):
    return _heat_page(request, _heat(request, pk), ReasonForm(example=HEAT_EXAMPLE))


def _heat_page(request, heat, form, status=200):
    parts = heat.parts.select_related("assembly__job").order_by("assembly__job__number", "assembly__piece_mark",
                                                                  "mark")
    # the first parts only: a plate heat may feed a thousand; the recall page and its CSV list them all
    return render(request, "inspections/heat_detail.html", {
        "heat": heat, "parts": list(parts[:PARTS_SHOWN]), "part_count": heat.parts.count(), "form": form,
        "history": history.panel(heat),
        "chemistry": [(heat._meta.get_field(n).verbose_name, f"{getattr(heat, n).normalize():f}")
                      for n in (*engine.ELEMENTS, "ce") if getattr(heat, n) is not None]},
        status=status)


@require_POST
@role_required(REGISTERS)
def heat_withdraw(request, pk):
    heat = _heat(request, pk)
    return _with_reason(request, heat, material.withdraw_certificate, f"{heat} withdrawn.",
                        lambda form: _heat_page(request, heat, form, status=400), example=HEAT_EXAMPLE)


@require_safe
def heat_document(request, pk):
    return send_document(_heat(request, pk).document, "mill certificate")


# --- an assembly's parts -----------------------------------------------------------------------------------------

def _assembly(request, pk):
    return get_visible_or_404(request.user, Assembly.objects.select_related("job__client_criteria"), pk=pk)


@require_safe
def assembly_parts(request, pk):
    """The parts of an assembly with each one's heat and what the chain finds (every role that sees the job)."""
    assembly = _assembly(request, pk)
    form = PartForm(assembly=assembly) if can(request.user, material.PARTS) else None
    return _parts_page(request, assembly, form)


@require_POST
@role_required(material.PARTS)
def part_create(request, pk):
    assembly = _assembly(request, pk)
    form = PartForm(request.POST, assembly=assembly)
    if form.is_valid():
        part = form.save(commit=False)
        part.assembly = assembly
        try:
            material.record_part(part, request.user)
        except Refused as exc:
            form.add_error(None, " ".join(exc.messages))
        else:
            problems = material.part_problems(part, assembly.job)
            if problems:
                messages.warning(request, f"Part {part.mark} recorded: {problems[0][0]}")
            else:
                messages.success(request, f"Part {part.mark} recorded.")
            return redirect("inspections:assembly_parts", assembly.pk)
    return _parts_page(request, assembly, form, status=400)


def _parts_page(request, assembly, form, status=200, reason_form=None):
    parts = material.parts_of([assembly.pk])[assembly.pk]
    withdrawn = list(Part.objects.filter(assembly=assembly).exclude(state=MaterialState.ON_FILE)
                     .select_related("heat").order_by("mark", "pk"))
    rows = [(p, material.part_problems(p, assembly.job)) for p in parts]
    return render(request, "inspections/assembly_parts.html", {
        "assembly": assembly, "job": assembly.job, "rows": rows, "withdrawn": withdrawn, "form": form,
        "reason_form": reason_form or ReasonForm(example=PART_EXAMPLE),
        "required": assembly.job.requires_mill_certificates,
        "system": assembly.job.unit_system, "sees_registers": sees_everything(request.user)}, status=status)


@require_POST
@role_required(material.PARTS)
def part_withdraw(request, pk):
    part = get_visible_or_404(request.user, Part.objects.select_related("assembly__job__client_criteria"), pk=pk)
    form = ReasonForm(request.POST, example=PART_EXAMPLE)
    if form.is_valid():
        try:
            material.withdraw_part(part, request.user, form.cleaned_data["reason"])
        except Refused as exc:
            form.add_error(None, " ".join(exc.messages))
        else:
            messages.success(request, f"Part {part.mark} withdrawn.")
            return redirect("inspections:assembly_parts", part.assembly_id)
    return _parts_page(request, part.assembly, None, status=400, reason_form=form)


@role_required(material.PARTS)
@require_http_methods(["GET", "POST"])
def weld_parts(request, pk):
    """Name the parts a weld joins; its base-metal thicknesses may be taken from them."""
    weld = get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "part1", "part2"), pk=pk)
    form = WeldPartsForm(request.POST or None, weld=weld,
                         initial={"part1": weld.part1_id, "part2": weld.part2_id, "take_thickness": True})
    status = 200
    if request.method == "POST":
        status = 400
        if form.is_valid():
            data = form.cleaned_data
            try:
                material.record_weld_parts(weld, data["part1"], data["part2"], request.user,
                                           take_thickness=data["take_thickness"])
            except (RecordLocked, Stale) as exc:
                form.add_error(None, " ".join(exc.messages) + " Revise the weld to change the parts it joins.")
                status = 409
            except Refused as exc:
                form.add_error(None, " ".join(exc.messages))
            else:
                messages.success(request, f"Weld {weld.mark}: parts recorded.")
                return redirect(weld)
    differences = material.thickness_differences(weld)
    return render(request, "inspections/trace_form.html", {
        "form": form, "title": f"Parts joined by weld {weld.mark}", "submit": "Record parts",
        "back": "inspections:assembly_list", "back_label": "Assemblies",
        "intro": ("The weld's thicknesses now: " + "; ".join(differences) + ".") if differences else
                 "Choose the parts of the assembly this weld joins (record them on the assembly's parts page)."},
        status=status)
