"""Inspections: signed on save and never edited. A correction is a new inspection that supersedes one."""

from django.conf import settings
from django.db import models
from django.db.models import Exists, OuterRef
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked
from core.fields import LengthField
from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, sql_text


class InspectionStage(models.TextChoices):
    FIT_UP = "fit_up", "Fit-up"
    IN_PROCESS = "in_process", "In-process"
    FINAL = "final", "Final visual"


class InspectionQuerySet(GuardedQuerySet):
    """A signed inspection is changed by no path, bulk updates and deletes included (core.locking)."""

    def current(self):
        """Inspections that no later inspection supersedes."""
        return self.filter(~Exists(Inspection.objects.filter(supersedes=OuterRef("pk"))))


def _closed_sql(weld_column_sql):
    """SQL: the assembly of the weld whose id is given is released or scrapped."""
    return ('((SELECT a."state" FROM "inspections_weld" w JOIN "inspections_assembly" a ON a."id" = w."assembly_id" '
            f'WHERE w."id" = {weld_column_sql}) IN ({sql_text("released")}, {sql_text("scrapped")}))')


class InspectionLock(Lock):
    def sql_insert_refused(self):
        return _closed_sql('NEW."weld_id"')


class PhotoLock(Lock):
    """A photo belongs to its signed inspection: never changed or deleted, never added once the assembly is closed."""

    def check_insert(self, record):
        from inspections.models.jobs import AssemblyState

        state = (Inspection.objects.filter(pk=record.inspection_id)
                 .values_list("weld__assembly__state", flat=True).first())
        if state in (AssemblyState.RELEASED, AssemblyState.SCRAPPED):
            raise RecordLocked(f"The assembly is {AssemblyState(state).label.lower()}: its inspections take no more "
                               "photos.")

    def sql_insert_refused(self):
        return _closed_sql('(SELECT i."weld_id" FROM "inspections_inspection" i WHERE i."id" = NEW."inspection_id")')


# Observation fields, named as inspections.acceptance.evaluate reads them.
LENGTH_OBSERVATIONS = ["min_size", "undersize_length", "undercut_depth", "undercut_length", "porosity_sum_1in",
                       "porosity_sum_12in", "pore_max", "convexity", "face_width", "throat", "crater_depth"]
COUNT_OBSERVATIONS = ["pores_per_4in"]
FLAG_OBSERVATIONS = ["crack", "incomplete_fusion", "unfilled_crater", "overlap", "arc_strike"]


class Inspection(Guarded):
    weld = models.ForeignKey("inspections.Weld", on_delete=models.PROTECT, related_name="inspections")
    stage = models.CharField(max_length=12, choices=InspectionStage.choices, default=InspectionStage.FINAL)
    inspector = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="inspections")
    inspected_at = models.DateTimeField(default=timezone.now)
    supersedes = models.OneToOneField("self", null=True, blank=True, on_delete=models.PROTECT,
                                      related_name="superseded_by")
    correction_reason = models.TextField(blank=True)

    min_size = LengthField("smallest leg measured", null=True, blank=True)
    undersize_length = LengthField("length under size", null=True, blank=True)
    undercut_depth = LengthField("deepest undercut", null=True, blank=True)
    undercut_length = LengthField("undercut length over the general limit (worst 12 in / 300 mm)",
                                  null=True, blank=True)
    porosity_sum_1in = LengthField("sum of pore diameters, worst 1 in / 25 mm", null=True, blank=True)
    porosity_sum_12in = LengthField("sum of pore diameters, worst 12 in / 300 mm", null=True, blank=True)
    pore_max = LengthField("largest pore", null=True, blank=True)
    pores_per_4in = models.PositiveIntegerField("pores in the worst 4 in / 100 mm", null=True, blank=True)
    convexity = LengthField(null=True, blank=True)
    face_width = LengthField(null=True, blank=True)
    throat = LengthField("measured throat", null=True, blank=True)
    crater_depth = LengthField("end crater pipe depth", null=True, blank=True)
    crack = models.BooleanField(default=False)
    incomplete_fusion = models.BooleanField(default=False)
    unfilled_crater = models.BooleanField(default=False)
    overlap = models.BooleanField(default=False)
    arc_strike = models.BooleanField(default=False)
    remarks = models.TextField(blank=True)

    accepted = models.BooleanField(editable=False)
    findings = models.JSONField(editable=False, help_text="The verdict's findings as judged when signed")
    criteria_key = models.CharField(max_length=60, editable=False)
    criteria_version = models.PositiveIntegerField(editable=False)

    objects = InspectionQuerySet.as_manager()
    lock = InspectionLock("inspection", frozen=ALWAYS, advice="record a correction that supersedes it.")

    class Meta:
        ordering = ["-inspected_at", "-pk"]
        indexes = [models.Index(fields=["weld", "-inspected_at"])]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.weld} {self.get_stage_display()} {self.inspected_at:%Y-%m-%d}"

    def get_absolute_url(self):
        return reverse("inspections:inspection_detail", args=[self.pk])

    @property
    def is_current(self) -> bool:
        """No correction supersedes this one (reads the reverse one-to-one: select_related it on lists)."""
        try:
            self.superseded_by  # noqa: B018 - the lookup is the question
        except Inspection.DoesNotExist:
            return True
        return False

    def observed(self) -> dict:
        """The observations as the acceptance engine reads them (absent = none seen)."""
        observed = {name: getattr(self, name) for name in LENGTH_OBSERVATIONS + COUNT_OBSERVATIONS
                    if getattr(self, name) is not None}
        observed.update({name: getattr(self, name) for name in FLAG_OBSERVATIONS})
        return observed


def photo_path(photo, filename):
    return f"photos/{timezone.now():%Y/%m}/{photo.inspection_id}-{filename}"


class Photo(Guarded):
    """A photo of a weld, cleaned on upload (orientation applied, metadata stripped); served through a view.

    Attached to a signed inspection and, like it, never changed or deleted.
    """

    inspection = models.ForeignKey(Inspection, on_delete=models.PROTECT, related_name="photos")
    image = models.ImageField(upload_to=photo_path)
    thumbnail = models.ImageField(upload_to=photo_path)
    caption = models.CharField(max_length=200, blank=True)
    width = models.PositiveIntegerField()
    height = models.PositiveIntegerField()
    content_type = models.CharField(max_length=20, default="image/jpeg", editable=False)
    sha256 = models.CharField(max_length=64, help_text="SHA-256 of the stored (cleaned) image")
    uploaded_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    uploaded_at = models.DateTimeField(default=timezone.now)

    objects = GuardedQuerySet.as_manager()
    lock = PhotoLock("photo", frozen=ALWAYS, name=("id",),
                     advice="it belongs to a signed inspection; attach another photo to a correction.")

    class Meta:
        ordering = ["uploaded_at", "pk"]
        base_manager_name = "objects"

    def __str__(self):
        return self.caption or f"Photo {self.pk}"
