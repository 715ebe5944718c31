"""URLs for benchmarks/inspection_save.py only: the app's own URLs plus one bare view to compare against."""

from django.http import HttpResponse
from django.urls import include, path
from django.views.decorators.http import require_POST

from core.units import parse_length
from inspections.models import Inspection, Weld

FINDINGS = [{"criterion": "undersize", "ok": True, "message": "bare insert", "source": "benchmark", "limit": None,
             "measured": None}]


@require_POST
def bare_insert(request, pk):
    """One comparable row, no form, no engine, no NCR or assembly step: what an insert costs in this stack."""
    Inspection.objects.create(weld=Weld(pk=pk), stage="final", inspector=request.user,
                              min_size=parse_length("1/4 in"), accepted=True, findings=FINDINGS,
                              criteria_key="aws-d1.1-2020-static", criteria_version=1)
    return HttpResponse(status=204)


urlpatterns = [
    path("bench/bare/<int:pk>/", bare_insert),
    path("", include("legwork.urls")),
]
