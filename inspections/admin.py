"""Admin for jobs and inspections: signed inspections and history are read-only here too."""

from django.contrib import admin

from core.admin import ReadOnlyAdmin
from inspections.models import NCR, Assembly, ClientCriteriaSet, Customer, Inspection, Job, Photo, Weld
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
class JobAdmin(admin.ModelAdmin):
    list_display = ["number", "name", "customer", "unit_system", "criteria_key"]
    list_select_related = ["customer"]
    list_filter = ["customer"]


@admin.register(Assembly)
class AssemblyAdmin(admin.ModelAdmin):
    list_display = ["piece_mark", "job", "drawing", "state"]
    list_filter = ["state", "job"]
    list_select_related = ["job"]


@admin.register(Weld)
class WeldAdmin(admin.ModelAdmin):
    list_display = ["mark", "assembly", "joint_type", "wps"]
    list_select_related = ["assembly", "wps"]


for model in (Inspection, Photo, ClientCriteriaSet, Traveler, JobPacket):
    admin.site.register(model, ReadOnlyAdmin)


@admin.register(NCR)
class NCRAdmin(ReadOnlyAdmin):
    list_display = ["number", "weld", "state", "disposition"]
