"""Jobs, assemblies, weld maps, inspections, NCRs, criteria sets, strength calculations, travelers."""

from django.urls import path  # noqa: F401

app_name = "inspections"

urlpatterns = [
    # --- jobs, assemblies, weld maps, tablet inspection, NCRs, photos ---
    # --- strength calculator and calculation sheets ---
    # --- travelers and packets ---
]
