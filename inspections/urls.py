"""Jobs, assemblies, weld maps, inspections, NCRs, criteria sets, strength calculations, travelers."""

from django.urls import path  # noqa: F401

from inspections.views import consumables as consumable_views
from inspections.views import criteria as criteria_views
from inspections.views import inspect as inspect_views
from inspections.views import jobs as job_views
from inspections.views import lists as list_views
from inspections.views import material as material_views
from inspections.views import ncr as ncr_views
from inspections.views import records as record_views
from inspections.views import strength as strength_views
from inspections.views import trace as trace_views
from inspections.views import travelers as traveler_views
from inspections.views import trends as trend_views

app_name = "inspections"

urlpatterns = [
    # --- jobs, assemblies, weld maps, tablet inspection, NCRs, photos ---
    # jobs, assemblies, weld maps, NCRs, criteria sets (inspections.views.jobs, .ncr, .criteria)
    path("jobs/", job_views.job_list, name="job_list"),
    path("jobs/new/", job_views.job_create, name="job_create"),
    path("jobs/<int:pk>/", job_views.job_detail, name="job_detail"),
    path("jobs/<int:pk>/edit/", job_views.job_edit, name="job_edit"),
    path("jobs/<int:pk>/assemblies/new/", job_views.assembly_create, name="assembly_create"),
    path("jobs/<int:pk>/weld-map/import/", job_views.weldmap_import, name="weldmap_import"),
    path("jobs/<int:pk>/weld-map.csv", job_views.weldmap_export, name="weldmap_export"),
    path("assemblies/", list_views.assembly_list, name="assembly_list"),
    path("assemblies/find/", job_views.assembly_find, name="assembly_find"),
    path("inspections/", list_views.inspection_list, name="inspection_list"),
    path("travelers/", list_views.traveler_index, name="traveler_index"),
    path("packets/", list_views.packet_index, name="packet_index"),
    path("assemblies/<int:pk>/", job_views.assembly_detail, name="assembly_detail"),
    path("assemblies/<int:pk>/edit/", job_views.assembly_edit, name="assembly_edit"),
    path("assemblies/<int:pk>/submit/", job_views.assembly_submit, name="assembly_submit"),
    path("assemblies/<int:pk>/release/", job_views.assembly_release, name="assembly_release"),
    path("assemblies/<int:pk>/welds/new/", job_views.weld_create, name="weld_create"),
    path("assemblies/<int:pk>/weld-check/", job_views.weld_check, name="weld_check"),
    path("welds/<int:pk>/", job_views.weld_detail, name="weld_detail"),
    path("welds/<int:pk>/edit/", job_views.weld_edit, name="weld_edit"),
    path("welds/<int:pk>/revise/", job_views.weld_revise, name="weld_revise"),
    path("ncrs/", ncr_views.ncr_list, name="ncr_list"),
    path("ncrs/<int:pk>/", ncr_views.ncr_detail, name="ncr_detail"),
    path("ncrs/<int:pk>/disposition/<slug:kind>/", ncr_views.ncr_disposition, name="ncr_disposition"),
    path("ncrs/<int:pk>/repair/", ncr_views.ncr_repair, name="ncr_repair"),
    path("criteria/", criteria_views.criteria_list, name="criteria_list"),
    path("criteria/derive/", criteria_views.criteria_derive, name="criteria_derive"),
    path("criteria/client/<int:pk>/", criteria_views.criteria_client_detail, name="criteria_client_detail"),
    path("criteria/<str:key>/", criteria_views.criteria_detail, name="criteria_detail"),
    # end of jobs, assemblies, weld maps, NCRs, criteria sets
    # tablet inspection and photos (inspections.views.inspect)
    path("inspect/", inspect_views.inspect_home, name="inspect_home"),
    path("inspect/queue/", inspect_views.inspect_queue, name="inspect_queue"),
    path("a/<int:pk>/", inspect_views.inspect_assembly, name="inspect_assembly"),
    path("inspect/weld/<int:pk>/", inspect_views.inspect_weld, name="inspect_weld"),
    path("inspect/weld/<int:pk>/preview/", inspect_views.inspect_preview, name="inspect_preview"),
    path("inspect/held-photos/<int:pk>/", inspect_views.draft_photo_file, name="draft_photo_file"),
    path("inspect/held-photos/<int:pk>/remove/", inspect_views.draft_photo_remove, name="draft_photo_remove"),
    path("inspection/<int:pk>/", inspect_views.inspection_detail, name="inspection_detail"),
    path("inspection/<int:pk>/correct/", inspect_views.inspection_correct, name="inspection_correct"),
    path("inspection/<int:pk>.pdf", inspect_views.inspection_pdf, name="inspection_pdf"),
    path("inspection/<int:pk>/photos/", inspect_views.photo_add, name="photo_add"),
    path("photos/<int:pk>/", inspect_views.photo_file, name="photo_file"),
    path("photos/<int:pk>/thumbnail/", inspect_views.photo_file, {"size": "thumbnail"}, name="photo_thumbnail"),
    # end of tablet inspection
    # --- strength calculator and calculation sheets ---
    path("strength/", strength_views.strength_calculator, name="strength_calculator"),
    path("strength/sheet/", strength_views.strength_sheet, name="strength_sheet"),
    path("strength/sheet.pdf", strength_views.strength_sheet_pdf, name="strength_sheet_pdf"),
    path("weld/<int:pk>/capacity/", strength_views.weld_capacity, name="weld_capacity"),
    path("weld/<int:pk>/capacity.pdf", strength_views.weld_capacity_pdf, name="weld_capacity_pdf"),
    path("inspection/<int:pk>/capacity/", strength_views.inspection_capacity, name="inspection_capacity"),
    path("inspection/<int:pk>/capacity.pdf", strength_views.inspection_capacity_pdf,
         name="inspection_capacity_pdf"),
    # end of strength calculator and calculation sheets
    # --- traceability registers: inspector credentials, gauges (inspections.views.trace) ---
    path("credentials/", trace_views.credential_list, name="credential_list"),
    path("credentials/new/", trace_views.credential_create, name="credential_create"),
    path("credentials/<int:pk>/", trace_views.credential_detail, name="credential_detail"),
    path("credentials/<int:pk>/withdraw/", trace_views.credential_withdraw, name="credential_withdraw"),
    path("credentials/<int:pk>/card/", trace_views.credential_document, name="credential_document"),
    path("gauges/", trace_views.gauge_list, name="gauge_list"),
    path("gauges/new/", trace_views.gauge_create, name="gauge_create"),
    path("gauges/<int:pk>/", trace_views.gauge_detail, name="gauge_detail"),
    path("gauges/<int:pk>/calibrations/new/", trace_views.calibration_create, name="calibration_create"),
    path("gauges/<int:pk>/retire/", trace_views.gauge_retire, name="gauge_retire"),
    path("calibrations/<int:pk>/", trace_views.calibration_detail, name="calibration_detail"),
    path("calibrations/<int:pk>/certificate/", trace_views.calibration_document, name="calibration_document"),
    path("filler-lots/", trace_views.filler_lot_list, name="filler_lot_list"),
    path("filler-lots/new/", trace_views.filler_lot_create, name="filler_lot_create"),
    path("filler-lots/<int:pk>/", trace_views.filler_lot_detail, name="filler_lot_detail"),
    path("filler-lots/<int:pk>/certificate/", trace_views.filler_lot_document, name="filler_lot_document"),
    path("welds/<int:pk>/filler/", trace_views.weld_filler, name="weld_filler"),
    path("recall/", trace_views.recall, name="recall"),
    path("recall.csv", trace_views.recall_csv, name="recall_csv"),
    # --- material: heats (mill certificates) and parts (inspections.views.material) ---
    path("heats/", material_views.heat_list, name="heat_list"),
    path("heats/new/", material_views.heat_create, name="heat_create"),
    path("heats/<int:pk>/", material_views.heat_detail, name="heat_detail"),
    path("heats/<int:pk>/withdraw/", material_views.heat_withdraw, name="heat_withdraw"),
    path("heats/<int:pk>/certificate/", material_views.heat_document, name="heat_document"),
    path("assemblies/<int:pk>/parts/", material_views.assembly_parts, name="assembly_parts"),
    path("assemblies/<int:pk>/parts/new/", material_views.part_create, name="part_create"),
    path("parts/<int:pk>/withdraw/", material_views.part_withdraw, name="part_withdraw"),
    path("welds/<int:pk>/parts/", material_views.weld_parts, name="weld_parts"),
    # end of traceability registers
    # --- consumable control: electrode ovens and their log (inspections.views.consumables) ---
    path("ovens/", consumable_views.oven_list, name="oven_list"),
    path("ovens/new/", consumable_views.oven_create, name="oven_create"),
    path("ovens/<int:pk>/", consumable_views.oven_detail, name="oven_detail"),
    path("ovens/<int:pk>/retire/", consumable_views.oven_retire, name="oven_retire"),
    path("ovens/<int:pk>/readings/new/", consumable_views.reading_create, name="oven_reading_create"),
    path("ovens/<int:pk>/issues/new/", consumable_views.issue_create, name="oven_issue_create"),
    path("ovens/<int:pk>/rebakes/new/", consumable_views.rebake_create, name="oven_rebake_create"),
    path("ovens/<int:pk>/flux/new/", consumable_views.flux_create, name="oven_flux_create"),
    path("electrode-issues/<int:pk>/close/", consumable_views.issue_close, name="oven_issue_close"),
    # end of consumable control
    # --- travelers and packets ---
    path("assemblies/<int:pk>/travelers/", traveler_views.traveler_list, name="traveler_list"),
    path("assemblies/<int:pk>/travelers/issue/", traveler_views.traveler_issue, name="traveler_issue"),
    path("travelers/<int:pk>.pdf", traveler_views.traveler_download, name="traveler_download"),
    path("travelers/<int:pk>.pdf.sha256", traveler_views.traveler_sha256, name="traveler_sha256"),
    path("jobs/<int:pk>/packets/", traveler_views.packet_list, name="packet_list"),
    path("jobs/<int:pk>/packets/start/", traveler_views.packet_start, name="packet_start"),
    path("packets/<int:pk>/", traveler_views.packet_detail, name="packet_detail"),
    path("packets/<int:pk>/progress/", traveler_views.packet_progress, name="packet_progress"),
    path("packets/<int:pk>.pdf", traveler_views.packet_download, name="packet_download"),
    # end of travelers and packets
    # --- checking documents against the sealed records; a job's whole record exported ---
    path("documents/check/", record_views.document_check, name="document_check"),
    path("jobs/<int:pk>/export.zip", record_views.job_export, name="job_export"),
    # end of checking and export
    # --- quality trends (inspections.views.trends) ---
    path("trends/", trend_views.trends_page, name="trends"),
    path("trends/<slug:chart>.csv", trend_views.trends_csv, name="trends_csv"),
    # end of quality trends
]
