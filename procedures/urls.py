"""Procedure (WPS, PQR) and welder pages."""

from django.urls import path  # noqa: F401

from procedures.views import welders as welder_views
from procedures.views import wps as wps_views

app_name = "procedures"

urlpatterns = [
    # --- WPS and PQR pages ---
    path("wps/", wps_views.wps_list, name="wps_list"),
    path("wps/new/", wps_views.wps_create, name="wps_create"),
    path("wps/review/", wps_views.wps_review, name="wps_review"),
    path("wps/<int:pk>/", wps_views.wps_detail, name="wps_detail"),
    path("wps/<int:pk>/edit/", wps_views.wps_edit, name="wps_edit"),
    path("wps/<int:pk>/review/", wps_views.wps_review, name="wps_review_draft"),
    path("wps/<int:pk>/submit/", wps_views.wps_submit, name="wps_submit"),
    path("wps/<int:pk>/approve/", wps_views.wps_approve, name="wps_approve"),
    path("wps/<int:pk>/return/", wps_views.wps_return, name="wps_return"),
    path("wps/<int:pk>/withdraw/", wps_views.wps_withdraw, name="wps_withdraw"),
    path("wps/<int:pk>/revise/", wps_views.wps_new_revision, name="wps_new_revision"),
    path("wps/<int:pk>/pdf/", wps_views.wps_pdf, name="wps_pdf"),
    path("pqr/", wps_views.pqr_list, name="pqr_list"),
    path("pqr/new/", wps_views.pqr_create, name="pqr_create"),
    path("pqr/<int:pk>/", wps_views.pqr_detail, name="pqr_detail"),
    path("pqr/<int:pk>/edit/", wps_views.pqr_edit, name="pqr_edit"),
    # --- welder pages ---
    path("welders/", welder_views.welder_list, name="welder_list"),
    path("welders/new/", welder_views.welder_create, name="welder_create"),
    path("welders/<int:pk>/", welder_views.welder_detail, name="welder_detail"),
    path("welders/<int:pk>/edit/", welder_views.welder_edit, name="welder_edit"),
    path("welders/<int:pk>/tests/new/", welder_views.qualification_create, name="qualification_create"),
    path("welders/<int:pk>/continuity/new/", welder_views.continuity_create, name="continuity_create"),
    path("welders/<int:pk>/deactivate/", welder_views.welder_deactivate, name="welder_deactivate"),
    path("welders/<int:pk>/reactivate/", welder_views.welder_reactivate, name="welder_reactivate"),
    path("welders/<int:pk>/summary.pdf", welder_views.welder_pdf, name="welder_pdf"),
    path("welder-tests/<int:pk>/report/", welder_views.qualification_report, name="qualification_report"),
]
