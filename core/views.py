"""The start page each role lands on, and the error pages."""

from django.shortcuts import render
from django.views.decorators.http import require_safe

from inspections.models import NCR, Assembly, AssemblyState
from inspections.models.ncr import NCRState
from procedures.models import WPS
from procedures.models.wps import WPSState


@require_safe
def home(request):
    context = {
        "wps_submitted": WPS.objects.filter(state=WPSState.SUBMITTED).count(),
        "wps_drafts": WPS.objects.filter(state=WPSState.DRAFT).count(),
        "ncrs_open": NCR.objects.exclude(state=NCRState.CLOSED).count(),
        "assemblies_waiting": Assembly.objects.filter(state=AssemblyState.AWAITING_INSPECTION).count(),
        "assemblies_rejected": Assembly.objects.filter(state=AssemblyState.REJECTED).count(),
    }
    return render(request, "home.html", context)


def forbidden(request, exception=None):
    return render(request, "403.html", {"reason": str(exception) if exception else ""}, status=403)


def not_found(request, exception=None):
    return render(request, "404.html", status=404)
