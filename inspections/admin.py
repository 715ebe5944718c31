"""Admin for jobs and inspections: signed inspections and history are read-only here too."""

from django.contrib import admin

from core.admin import GuardedAdmin, ReadOnlyAdmin
from inspections.models import NCR, Assembly, ClientCriteriaSet, Customer, Inspection, Job, Photo, Weld, WeldRepair
from inspections.models.traveler import JobPacket, Traveler


@admin.register(Customer)
class CustomerAdmin(admin.ModelAdmin):
    """Tie viewer accounts to a customer here: a viewer sees the jobs of its customers and nothing else."""

    list_display = ["name"]
    search_fields = ["name"]
    filter_horizontal = ["viewers"]

    def formfield_for_manytomany(self, db_field, request, **kwargs):
        if db_field.name == "viewers":
            from core.roles import Role

            kwargs["queryset"] = db_field.remote_field.model.objects.filter(role=Role.VIEWER).order_by("username")
        return super().formfield_for_manytomany(db_field, request, **kwargs)


@admin.register(Job)
class JobAdmin(GuardedAdmin):
    list_display = ["number", "name", "customer", "unit_system", "criteria_key"]
    list_select_related = ["customer"]
    list_filter = ["customer"]


@admin.register(Assembly)
class AssemblyAdmin(GuardedAdmin):
    """Read-only once released or scrapped; the state moves only by its steps."""

    list_display = ["piece_mark", "job", "drawing", "state"]
    list_filter = ["state", "job"]
    list_select_related = ["job"]


@admin.register(Weld)
class WeldAdmin(GuardedAdmin):
    """Read-only once inspected or its assembly closed: the weld page's revision step changes it then."""

    list_display = ["mark", "assembly", "joint_type", "size", "length", "wps"]
    list_select_related = ["assembly", "wps"]


for model in (Inspection, Photo, ClientCriteriaSet, Traveler, JobPacket, WeldRepair):
    admin.site.register(model, ReadOnlyAdmin)


@admin.register(NCR)
class NCRAdmin(ReadOnlyAdmin):
    list_display = ["number", "weld", "state", "disposition"]
