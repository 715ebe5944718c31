from django.contrib import admin, messages
from django.contrib.auth.admin import UserAdmin
from django.contrib.auth.forms import UserChangeForm
from django.core.exceptions import PermissionDenied
from django.shortcuts import redirect
from django.utils import timezone
from django.utils.html import format_html, format_html_join

from core import history, units
from core.errors import RecordLocked, Stale
from core.fields import _QuantityField
from core.forms import VersionedModelForm
from core.locking import EVERY_ROW, stale
from core.models import Event, Seal, User

_FORMATS = {"LengthField": units.format_length, "TemperatureField": units.format_temperature,
            "ForceField": units.format_force, "SpeedField": units.format_speed, "FlowField": units.format_flow}


def unit_system_of(obj) -> str:
    """The unit system a record's quantities print in: its own, its job's (through weld or assembly), else US."""
    for path in ("unit_system", "job.unit_system", "assembly.job.unit_system", "weld.assembly.job.unit_system",
                 "inspection.weld.assembly.job.unit_system"):
        value = obj
        try:
            for part in path.split("."):
                value = getattr(value, part)
        except (AttributeError, ValueError):
            continue
        if value in units.SYSTEMS:
            return value
    return "US"


def _shown(field):
    """A read-only column that prints a quantity as the pages do (3/16", 50 °F, 12.5 kip), not its dataclass."""

    def shown(obj):
        value = getattr(obj, field.name)
        if value is None:
            return "—"
        return _FORMATS[type(field).__name__](value, unit_system_of(obj))

    shown.short_description = field.verbose_name
    shown.admin_order_field = field.name
    return shown


class QuantityAdmin(admin.ModelAdmin):
    """The admin prints quantities as the pages print them: a read-only quantity, and a quantity in a list, goes
    through core.units in the record's unit system. (Django's own display of a DecimalField would pad the text of
    a Length with zeros, '76.2 mm000', and show a Speed as its dataclass.)"""

    def _quantities(self):
        return [f for f in self.model._meta.concrete_fields if isinstance(f, _QuantityField)]

    def __init__(self, model, admin_site):
        super().__init__(model, admin_site)
        for field in self._quantities():  # on this admin (one per model), so two models' fields never mix
            setattr(self, f"{field.name}_shown", _shown(field))

    def _swap(self, names):
        quantities = {f.name for f in self._quantities()}
        return [f"{name}_shown" if name in quantities else name for name in names]

    def get_list_display(self, request):
        return self._swap(super().get_list_display(request))

    def get_fields(self, request, obj=None):
        fields = super().get_fields(request, obj)
        if obj is not None and not self.has_change_permission(request, obj):
            return self._swap(fields)
        return fields

    def get_readonly_fields(self, request, obj=None):
        readonly = list(super().get_readonly_fields(request, obj))
        if obj is not None and not self.has_change_permission(request, obj):
            readonly += [f"{f.name}_shown" for f in self._quantities()]
        return self._swap(readonly)


class GuardedAdminForm(VersionedModelForm):
    """The admin's form of a guarded record: refuses a stale save at validation, with the input kept."""

    def _post_clean(self):
        super()._post_clean()  # the instance now holds the posted values
        instance, version = self.instance, self.cleaned_data.get("opened_version")
        if instance.pk is None or self.errors:
            return
        stored = type(instance)._base_manager.get(pk=instance.pk)
        if instance.lock.versioned and version is not None and stored.version != version:
            self.add_error(None, stale(instance, stored).messages)
            return
        changed = [f.name for f in instance._meta.concrete_fields
                   if not f.primary_key and f.name != "version"
                   and getattr(stored, f.attname) != getattr(instance, f.attname)]
        try:
            instance.lock.check_change(stored, changed)  # a welder's stamp once records bear it, say
        except RecordLocked as exc:
            if hasattr(exc, "error_dict"):
                for name, errors in exc.message_dict.items():
                    self.add_error(name if name in self.fields else None, errors)
            else:
                self.add_error(None, exc.messages)


class GuardedAdmin(QuantityAdmin):
    """A guarded record (core.locking) in the admin: read-only once frozen, saved by version, with its history."""

    form = GuardedAdminForm

    def get_readonly_fields(self, request, obj=None):
        return [*super().get_readonly_fields(request, obj), "record_history"]

    @admin.display(description="History")
    def record_history(self, obj):
        rows = history.panel(obj, limit=30) if obj is not None and obj.pk else []
        if not rows:
            return "Nothing recorded yet."
        return format_html("<ol>{}</ol>", format_html_join(
            "", "<li>{} · {} · {}{}</li>",
            ((f"{timezone.localtime(e.at):%Y-%m-%d %H:%M}", e.user or "Legwork",
              f"{e.from_label} → {e.to_label}" if e.to_state and e.from_state else e.action,
              "".join(f"; {label}: {old or '—'} → {new or '—'}" for label, (old, new) in e.changes.items())
              + (f": {e.reason}" if e.reason else "")) for e in rows)))

    def _frozen(self, obj):
        return obj is not None and obj.pk is not None and obj.lock.frozen_row(obj)

    def has_change_permission(self, request, obj=None):
        return super().has_change_permission(request, obj) and not self._frozen(obj)

    def has_delete_permission(self, request, obj=None):
        if not super().has_delete_permission(request, obj):
            return False
        if obj is None or obj.pk is None:
            return True
        refused = obj.lock.undeletable()
        if refused is None:
            return True
        return refused is not EVERY_ROW and not type(obj)._base_manager.filter(refused, pk=obj.pk).exists()

    def delete_queryset(self, request, queryset):
        try:
            super().delete_queryset(request, queryset)
        except RecordLocked as exc:  # the bulk action chose a frozen row: nothing is deleted
            raise PermissionDenied(" ".join(exc.messages)) from None

    def changeform_view(self, request, object_id=None, form_url="", extra_context=None):
        try:
            return super().changeform_view(request, object_id, form_url, extra_context)
        except (Stale, RecordLocked) as exc:  # saved or frozen by someone else between the check and the save
            messages.error(request, " ".join(exc.messages))
            return redirect(request.path)

    def _changeform_view(self, request, object_id, form_url, extra_context):
        with history.one_entry():  # inside the admin's transaction: the record, its links and one history row
            return super()._changeform_view(request, object_id, form_url, extra_context)


class LegworkUserChangeForm(GuardedAdminForm, UserChangeForm):
    pass


@admin.register(User)
class LegworkUserAdmin(GuardedAdmin, UserAdmin):
    form = LegworkUserChangeForm
    fieldsets = [*UserAdmin.fieldsets, ("Legwork", {"fields": ["role", "stamp", "opened_version", "opened_at"]}),
                 ("History", {"fields": ["record_history"]})]
    list_display = ["username", "first_name", "last_name", "role", "is_active"]
    list_filter = ["role", "is_active"]

    def get_fieldsets(self, request, obj=None):
        return self.add_fieldsets if obj is None else self.fieldsets


class ReadOnlyAdmin(QuantityAdmin):
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
