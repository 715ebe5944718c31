"""Indexes across jobs (core.lists): assemblies, inspections, travelers, packets; each filtered, sorted,
paginated and exported as CSV the same way, each narrowed by core.visibility first."""

from django.views.decorators.http import require_safe

from core import lists
from core.visibility import visible
from inspections.lists import (
    ASSEMBLY_COLUMNS,
    INSPECTION_COLUMNS,
    PACKET_COLUMNS,
    TRAVELER_COLUMNS,
    AssemblyFilter,
    InspectionFilter,
    PacketFilter,
    TravelerFilter,
)
from inspections.models import Assembly, Inspection, JobPacket, Traveler


def _page(request, filter_class, queryset, template, columns, filename):
    filterset = filter_class(request.GET, queryset=visible(request.user, queryset), request=request)
    return lists.list_page(request, filterset, template, columns=columns, filename=filename)


@require_safe
def assembly_list(request):
    assemblies = Assembly.objects.select_related("job").order_by("job__number", "piece_mark")
    return _page(request, AssemblyFilter, assemblies, "inspections/assembly_list.html", ASSEMBLY_COLUMNS,
                 "assemblies.csv")


@require_safe
def inspection_list(request):
    inspections = (Inspection.objects.select_related("weld__assembly__job", "weld__wps", "inspector")
                   .order_by("-inspected_at", "-pk"))
    return _page(request, InspectionFilter, inspections, "inspections/inspection_list.html", INSPECTION_COLUMNS,
                 "inspections.csv")


@require_safe
def traveler_index(request):
    travelers = (Traveler.objects.select_related("assembly__job", "generated_by")
                 .order_by("-generated_at", "-pk"))
    return _page(request, TravelerFilter, travelers, "inspections/traveler_index.html", TRAVELER_COLUMNS,
                 "travelers.csv")


@require_safe
def packet_index(request):
    packets = JobPacket.objects.select_related("job", "requested_by").order_by("-requested_at", "-pk")
    return _page(request, PacketFilter, packets, "inspections/packet_index.html", PACKET_COLUMNS, "packets.csv")
