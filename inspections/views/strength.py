"""The fillet weld calculator and the calculation sheets (HTML and PDF) of the calculator, a weld and an inspection.

Reading is allowed to every signed-in role, the viewer included: nothing here changes a record, and a customer's
or third-party inspector's account may check the same arithmetic the shop relies on (for its own customers'
welds and inspections only: core.visibility). The figures come from
inspections.strength through inspections.services.capacity; these views only gather and render.
"""

from django.shortcuts import redirect, render
from django.urls import reverse
from django.utils.text import get_valid_filename
from django.views.decorators.http import require_safe

from core.pdf import paper_for, pdf_response, render_pdf
from core.visibility import get_visible_or_404
from inspections.forms.strength import StrengthCalculatorForm
from inspections.models import Inspection, Weld
from inspections.services.capacity import capacity_for_inspection, capacity_for_weld

# Query-string keys the calculator reads; anything else in the URL is ignored.
_KEYS = tuple(StrengthCalculatorForm.base_fields)


def _calculator_form(request):
    data = request.GET if any(key in request.GET for key in _KEYS) else None
    return StrengthCalculatorForm(data)


def _sheet_links(request):
    query = request.GET.urlencode()
    return {"sheet": f"{reverse('inspections:strength_sheet')}?{query}",
            "pdf": f"{reverse('inspections:strength_sheet_pdf')}?{query}",
            "edit": f"{reverse('inspections:strength_calculator')}?{query}"}


def _calculator_page(request, form, status=200):
    snapshot = form.snapshot if form.is_bound and form.is_valid() else None
    if snapshot is not None:
        snapshot["links"] = _sheet_links(request)
    return render(request, "inspections/strength_calculator.html", {"form": form, "snapshot": snapshot},
                  status=status)


@require_safe
def strength_calculator(request):
    return _calculator_page(request, _calculator_form(request))


def _calculated(request):
    """(snapshot, None) for valid inputs, or (None, response): the calculator with its errors, or the empty one."""
    form = _calculator_form(request)
    if not form.is_bound:
        return None, redirect("inspections:strength_calculator")
    if not form.is_valid():
        return None, _calculator_page(request, form, status=400)
    snapshot = form.snapshot
    snapshot["links"] = _sheet_links(request)
    return snapshot, None


@require_safe
def strength_sheet(request):
    snapshot, response = _calculated(request)
    return response or _sheet_page(request, snapshot)


@require_safe
def strength_sheet_pdf(request):
    snapshot, response = _calculated(request)
    return response or _sheet_pdf(snapshot, "fillet-weld-calculation.pdf")


def _method(request) -> str:
    return "ASD" if request.GET.get("method") == "ASD" else "LRFD"


def _with_method(snapshot, method):
    if method == "ASD":
        snapshot["links"] = {name: f"{url}?method=ASD" for name, url in snapshot["links"].items()}
    return snapshot


def _weld(request, pk):
    return get_visible_or_404(request.user, Weld.objects.select_related("assembly__job", "wps"), pk=pk)


def _inspection(request, pk):
    return get_visible_or_404(request.user, Inspection.objects.select_related(
        "weld__assembly__job", "weld__wps", "inspector"), pk=pk)


@require_safe
def weld_capacity(request, pk):
    weld = _weld(request, pk)
    snapshot = _with_method(capacity_for_weld(weld, _method(request)), _method(request))
    return _sheet_page(request, snapshot, back=(weld.get_absolute_url(), f"Weld {weld.mark}"))


@require_safe
def weld_capacity_pdf(request, pk):
    weld = _weld(request, pk)
    snapshot = capacity_for_weld(weld, _method(request))
    return _sheet_pdf(snapshot, f"capacity-{weld.assembly.job.number}-{weld.assembly.piece_mark}-{weld.mark}.pdf")


@require_safe
def inspection_capacity(request, pk):
    inspection = _inspection(request, pk)
    snapshot = _with_method(capacity_for_inspection(inspection, _method(request)), _method(request))
    return _sheet_page(request, snapshot, back=(inspection.get_absolute_url(), "the inspection"))


@require_safe
def inspection_capacity_pdf(request, pk):
    inspection = _inspection(request, pk)
    snapshot = capacity_for_inspection(inspection, _method(request))
    weld = inspection.weld
    return _sheet_pdf(snapshot, f"capacity-{weld.assembly.job.number}-{weld.assembly.piece_mark}-{weld.mark}-"
                                f"inspection-{inspection.pk}.pdf")


def _sheet_page(request, snapshot, back=None):
    return render(request, "inspections/strength_sheet.html", {"snapshot": snapshot, "back": back,
                                                                "method": snapshot["method"]})


def _sheet_pdf(snapshot, filename):
    return pdf_response(render_pdf("pdf/calculation_sheet.html", {"snapshot": snapshot},
                                   get_valid_filename(filename), paper=paper_for(snapshot.get("system"))))
