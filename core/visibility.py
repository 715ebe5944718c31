"""Who sees which records: the one place that decides, and every view asks it.

The shop's roles (welding engineer, inspector, QA lead) see everything. A viewer is a customer's account (or its
third-party inspector's): it is tied to one or more customers (inspections.Customer.viewers) and sees only their
jobs and what hangs from them: assemblies, welds, inspections, photos, NCRs, travelers, packets and weld-map
exports; the WPSs, their PQRs and the welders used on those welds (and named by their NCRs' repairs), with the
welders' qualification records; and the client criteria sets those jobs are judged by. Anything else answers 404,
exactly as a record that does not exist (templates/404.html says "not yours to see").

    jobs_visible_to(user)                 the jobs
    visible(user, queryset)               any queryset of the models below, narrowed to what the user may see
    get_visible_or_404(user, qs, **kw)    get_object_or_404 on the narrowed queryset
    require_visible(user, Model, pk)      404 unless the user may see that row (for views that load otherwise)

For a shop role visible() returns the queryset untouched, so the shop's pages run the same queries as before; for
a viewer it adds one subquery to the same query.
"""

from django.http import Http404
from django.shortcuts import get_object_or_404

from core.roles import Role
from inspections.models import (
    NCR,
    Assembly,
    ClientCriteriaSet,
    Customer,
    ElectrodeIssue,
    ElectrodeOven,
    FillerLot,
    FluxRecord,
    Gauge,
    GaugeCalibration,
    Inspection,
    InspectorCredential,
    Job,
    JobWelder,
    JobWPS,
    OvenReading,
    Photo,
    Rebake,
    Weld,
)
from inspections.models.material import MillCertificate, Part
from inspections.models.traveler import JobPacket, Traveler
from procedures.models import PQR, WPS, Qualification, Welder
from procedures.models.welders import ContinuityEntry

SHOP_ROLES = {Role.WELDING_ENGINEER, Role.INSPECTOR, Role.QA_LEAD}

# The shop's own registers: a viewer reads them only as printed on its travelers (docs/decisions, traceability).
SHOP_REGISTERS = (InspectorCredential, Gauge, GaugeCalibration, FillerLot, MillCertificate)
SHOP_REGISTERS += (ElectrodeOven, OvenReading, ElectrodeIssue, Rebake, FluxRecord)  # consumable control

# Records that belong to one job: the path from the record to its job.
JOB_PATHS = {
    Job: "pk",
    Assembly: "job",
    Weld: "assembly__job",
    Inspection: "weld__assembly__job",
    Photo: "inspection__weld__assembly__job",
    NCR: "weld__assembly__job",
    Traveler: "assembly__job",
    JobPacket: "job",
    Part: "assembly__job",
}


def sees_everything(user) -> bool:
    """A shop role (or a superuser, who administers the whole database anyway)."""
    if not getattr(user, "is_authenticated", False) or not user.is_active:
        return False
    return user.is_superuser or getattr(user, "role", None) in SHOP_ROLES


def jobs_visible_to(user):
    if sees_everything(user):
        return Job.objects.all()
    if not getattr(user, "is_authenticated", False):
        return Job.objects.none()
    return Job.objects.filter(customer__in=Customer.objects.filter(viewers=user).values("pk"))


def _job_ids(user):
    return jobs_visible_to(user).values("pk")


def _wps_ids(user):
    """The WPSs named on the user's jobs (by a weld or an NCR's repair): the fact inspections.uses keeps."""
    return JobWPS.objects.filter(job__in=_job_ids(user)).values("wps")


def _welder_ids(user):
    """The welders named on the user's jobs (on a weld or as an NCR's repair welder), from the same fact."""
    return JobWelder.objects.filter(job__in=_job_ids(user)).values("welder")


def _narrow(user, queryset):
    model = queryset.model
    if model in JOB_PATHS:
        return queryset.filter(**{f"{JOB_PATHS[model]}__in": _job_ids(user)})
    if model is WPS:
        return queryset.filter(pk__in=_wps_ids(user))
    if model is PQR:
        return queryset.filter(pk__in=WPS.pqrs.through.objects.filter(wps__in=_wps_ids(user)).values("pqr"))
    if model is Welder:
        return queryset.filter(pk__in=_welder_ids(user))
    if model in (Qualification, ContinuityEntry):
        return queryset.filter(welder__in=_welder_ids(user))
    if model is ClientCriteriaSet:
        return queryset.filter(pk__in=jobs_visible_to(user).exclude(client_criteria=None).values("client_criteria"))
    if model is Customer:
        return queryset.filter(viewers=user)
    if model in SHOP_REGISTERS:
        return queryset.none()
    raise ValueError(f"core.visibility does not know who may see {model.__name__}: add it there.")


def visible(user, queryset):
    """The queryset narrowed to the rows the user may see (untouched for the shop's roles)."""
    if sees_everything(user):
        return queryset
    if not getattr(user, "is_authenticated", False):
        return queryset.none()
    return _narrow(user, queryset)


def get_visible_or_404(user, queryset, **lookup):
    """get_object_or_404 over what the user may see: a record of another customer is 'not found'."""
    if not hasattr(queryset, "model"):  # a model class
        queryset = queryset._default_manager.all()
    return get_object_or_404(visible(user, queryset), **lookup)


def require_visible(user, model, pk) -> None:
    """Raise Http404 unless the user may see the row (no query for the shop's roles)."""
    if sees_everything(user):
        return
    if not visible(user, model._default_manager.filter(pk=pk)).exists():
        raise Http404(f"No such {model._meta.verbose_name}.")


def continuity_for(user, continuity):
    """A welder's continuity rows [(entry, url, hidden)] as the user may read them: for a viewer, a production weld
    on a job it may not see keeps its date and process (they are what keeps the welder qualified) but loses its
    job, piece mark and link."""
    if sees_everything(user):
        return continuity

    def weld_of(entry):  # a repair's entry is judged by the weld it repaired
        return entry.repair.weld_id if entry.repair_id else entry.weld_id

    weld_ids = {weld_of(entry) for entry, _url, _hidden in continuity if weld_of(entry)}
    shown = set(visible(user, Weld.objects.filter(pk__in=weld_ids)).values_list("pk", flat=True))
    return [(entry, url if weld_of(entry) in shown else None,
             hidden or bool(weld_of(entry) and weld_of(entry) not in shown)) for entry, url, hidden in continuity]
