from django.contrib import admin
from django.contrib.auth.admin import UserAdmin

from core.models import Event, Seal, User


@admin.register(User)
class LegworkUserAdmin(UserAdmin):
    fieldsets = [*UserAdmin.fieldsets, ("Legwork", {"fields": ["role", "stamp"]})]
    list_display = ["username", "first_name", "last_name", "role", "is_active"]
    list_filter = ["role", "is_active"]


class ReadOnlyAdmin(admin.ModelAdmin):
    """Signed records and history: visible, never added, changed or deleted here (the pages' steps do that)."""

    def has_add_permission(self, request, obj=None):
        return False

    def has_change_permission(self, request, obj=None):
        return False

    def has_delete_permission(self, request, obj=None):
        return False


@admin.register(Event)
class EventAdmin(ReadOnlyAdmin):
    list_display = ["at", "subject_type", "subject_id", "action", "from_state", "to_state", "user"]
    list_filter = ["subject_type", "action"]
    list_select_related = ["subject_type", "user"]


@admin.register(Seal)
class SealAdmin(ReadOnlyAdmin):
    """The record chain, read-only: `manage.py verify_records` checks it."""

    list_display = ["sequence", "kind", "record_type", "record_id", "sealed_at", "chain_sha256"]
    list_filter = ["kind"]
    search_fields = ["chain_sha256", "content_sha256"]
