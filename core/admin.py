from django.contrib import admin
from django.contrib.auth.admin import UserAdmin

from core import units
from core.fields import _QuantityField
from core.models import Event, User

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


@admin.register(User)
class LegworkUserAdmin(UserAdmin):
    fieldsets = [*UserAdmin.fieldsets, ("Legwork", {"fields": ["role", "stamp"]})]
    list_display = ["username", "first_name", "last_name", "role", "is_active"]
    list_filter = ["role", "is_active"]


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
