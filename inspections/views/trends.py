"""Quality trends drawn on the server (inspections.services.trends, core.charts), and each chart's figures as CSV."""

import csv

from django.http import Http404, HttpResponse
from django.shortcuts import render
from django.utils import timezone
from django.views.decorators.http import require_safe

from inspections.forms.trends import TrendFilterForm
from inspections.services import trends


def _form(request):
    return TrendFilterForm(request.GET or None, request.user, timezone.localdate())


@require_safe
def trends_page(request):
    form = _form(request)
    filters = form.filters()
    return render(request, "inspections/trends.html", {
        "form": form, "filters": filters, "trends": trends.gather(request.user, filters).values(),
        "query": request.GET.urlencode()})


@require_safe
def trends_csv(request, chart):
    if chart not in trends.CHARTS:
        raise Http404("No such chart.")
    filters = _form(request).filters()
    trend = trends.gather(request.user, filters, only=chart)[chart]
    response = HttpResponse(content_type="text/csv; charset=utf-8")
    response["Content-Disposition"] = (f'attachment; filename="legwork-{chart}-{filters.start.isoformat()}-'
                                       f'{filters.end.isoformat()}.csv"')
    writer = csv.writer(response)
    writer.writerow(trend.headers)
    writer.writerows(["" if cell is None else cell for cell in row] for row in trend.rows)
    return response
