"""Procedure (WPS, PQR) and welder pages."""

from django.urls import path  # noqa: F401

from procedures.views import welders as welder_views

app_name = "procedures"

urlpatterns = [
    # --- WPS and PQR pages ---
    # --- welder pages ---
    path("welders/", welder_views.welder_list, name="welder_list"),
    path("welders/new/", welder_views.welder_create, name="welder_create"),
    path("welders/<int:pk>/", welder_views.welder_detail, name="welder_detail"),
    path("welders/<int:pk>/tests/new/", welder_views.qualification_create, name="qualification_create"),
    path("welders/<int:pk>/continuity/new/", welder_views.continuity_create, name="continuity_create"),
    path("welders/<int:pk>/deactivate/", welder_views.welder_deactivate, name="welder_deactivate"),
    path("welders/<int:pk>/reactivate/", welder_views.welder_reactivate, name="welder_reactivate"),
    path("welders/<int:pk>/summary.pdf", welder_views.welder_pdf, name="welder_pdf"),
    path("welder-tests/<int:pk>/report/", welder_views.qualification_report, name="qualification_report"),
]
