"""Admin for procedures and welders: approved, superseded and withdrawn procedures are read-only here too."""

from django.contrib import admin

from core.admin import QuantityAdmin, ReadOnlyAdmin
from procedures.models import PQR, WPS, ContinuityEntry, Qualification, Welder


@admin.register(WPS)
class WPSAdmin(QuantityAdmin):
    list_display = ["number", "revision", "title", "state", "process", "electrode"]
    list_filter = ["state", "process"]
    search_fields = ["number", "title", "electrode"]

    def has_change_permission(self, request, obj=None):
        return super().has_change_permission(request, obj) and (obj is None or obj.is_editable)

    def has_delete_permission(self, request, obj=None):
        return super().has_delete_permission(request, obj) and (obj is None or obj.is_editable)


@admin.register(PQR)
class PQRAdmin(QuantityAdmin):
    """A PQR behind a procedure that is (or was) approved records a test that happened: read-only."""

    list_display = ["number", "process", "electrode", "test_date"]

    def _in_use(self, obj):
        return obj is not None and obj.procedures.exclude(state="draft").exists()

    def has_change_permission(self, request, obj=None):
        return super().has_change_permission(request, obj) and not self._in_use(obj)

    def has_delete_permission(self, request, obj=None):
        return super().has_delete_permission(request, obj) and not self._in_use(obj)


@admin.register(Welder)
class WelderAdmin(QuantityAdmin):
    list_display = ["stamp", "name", "employer", "active"]
    search_fields = ["stamp", "name"]


@admin.register(Qualification)
class QualificationAdmin(ReadOnlyAdmin):
    """A welder's test record states what happened at the test: recorded through the welder page, never edited."""

    list_display = ["welder", "process", "joint", "test_position", "test_date", "result"]
    list_select_related = ["welder"]


@admin.register(ContinuityEntry)
class ContinuityEntryAdmin(ReadOnlyAdmin):
    list_display = ["welder", "process", "date", "source"]
    list_select_related = ["welder"]
