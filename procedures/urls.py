"""Procedure (WPS, PQR) and welder pages."""

from django.urls import path  # noqa: F401

app_name = "procedures"

urlpatterns = [
    # --- WPS and PQR pages ---
    # --- welder pages ---
]
