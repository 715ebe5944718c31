"""Admin for procedures and welders: approved, superseded and withdrawn procedures are read-only here too."""

from django.contrib import admin

from core.admin import GuardedAdmin, ReadOnlyAdmin
from procedures.models import PQR, WPS, ContinuityEntry, Qualification, Welder


@admin.register(WPS)
class WPSAdmin(GuardedAdmin):
    """Only a draft is edited here; a submitted, approved, superseded or withdrawn WPS is read-only."""

    list_display = ["number", "revision", "title", "state", "process", "electrode"]
    list_filter = ["state", "process"]
    search_fields = ["number", "title", "electrode"]


@admin.register(PQR)
class PQRAdmin(GuardedAdmin):
    """A PQR behind a procedure beyond draft records a test that happened: read-only."""

    list_display = ["number", "process", "electrode", "test_date"]


@admin.register(Welder)
class WelderAdmin(GuardedAdmin):
    """Active or not changes by the welder page's steps (with a reason), never here."""

    readonly_fields = ["active"]
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
