"""Inspections: signed on save and never edited. A correction is a new inspection that supersedes one.

The observation columns are made from the one table of observations (inspections.observations): a length column
for each length, a whole number for each count, degrees for each angle, a yes/no for each flag, named as the
acceptance engine reads them. A draft (InspectionDraft) keeps what an inspector typed and photographed until it is
signed; it is visible to that inspector only and is not a record.
"""

from django.conf import settings
from django.db import models
from django.db.models import Exists, OuterRef
from django.urls import reverse
from django.utils import timezone

from core import units
from core.errors import RecordLocked
from core.fields import LengthField, TemperatureField
from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, sql_text
from inspections import observations


class InspectionStage(models.TextChoices):
    FIT_UP = "fit_up", "Fit-up"
    IN_PROCESS = "in_process", "In-process"
    FINAL = "final", "Final visual"


class TemperatureMethod(models.TextChoices):
    CONTACT = "contact", "Contact thermometer"
    CRAYON = "crayon", "Temperature-indicating crayon"
    INFRARED = "infrared", "Infrared thermometer"


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


def _words(observation) -> str:
    """The column's name in the admin: the label, with the SI words where they differ (windows in mm)."""
    if observation.us_label == observation.si_label:
        return observation.us_label
    return f"{observation.us_label} (SI: {observation.si_label.split(', ')[-1]})"


def observation_field(observation):
    """The column for one observation of the table."""
    words = _words(observation)
    if observation.kind == "length":
        return LengthField(words, null=True, blank=True)
    if observation.kind == "count":
        return models.PositiveIntegerField(words, null=True, blank=True)
    if observation.kind == "angle":
        return models.DecimalField(f"{words} (degrees)", max_digits=6, decimal_places=2, null=True, blank=True)
    return models.BooleanField(words, default=False)


class Inspection(Guarded):
    weld = models.ForeignKey("inspections.Weld", on_delete=models.PROTECT, related_name="inspections")
    stage = models.CharField(max_length=12, choices=InspectionStage.choices, default=InspectionStage.FINAL)
    inspector = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="inspections")
    inspected_at = models.DateTimeField(default=timezone.now)
    supersedes = models.OneToOneField("self", null=True, blank=True, on_delete=models.PROTECT,
                                      related_name="superseded_by")
    correction_reason = models.TextField(blank=True)

    # One column per observation of the table, in table order (class-body namespace: see observation_field).
    for _observation in observations.OBSERVATIONS:
        locals()[_observation.name] = observation_field(_observation)
    del _observation
    remarks = models.TextField(blank=True)
    # Several identical welds inspected in one pass share one verdict: each weld's inspection carries the batch.
    batch = models.UUIDField(null=True, blank=True, editable=False, db_index=True,
                             help_text="Inspections signed together in one pass over identical welds")
    leg_increase = LengthField(
        "leg increase for the root opening", null=True, blank=True, editable=False,
        help_text="Added to the specified leg for the root opening measured at fit-up (AWS D1.1 clause 7.21.1)")

    credential = models.ForeignKey(
        "inspections.InspectorCredential", null=True, blank=True, on_delete=models.PROTECT, editable=False,
        related_name="inspections", help_text="The inspector's certification current when signed (a final visual "
                                              "needs one: inspections.services.trace)")
    # Measured at fit-up or in-process, judged by inspections.preheat against the WPS (and Table 5.8).
    preheat_measured = TemperatureField("preheat measured", null=True, blank=True)
    interpass_measured = TemperatureField("interpass temperature measured", null=True, blank=True)
    # Nullable, unlike the other text columns: SQLite then adds the column in place instead of rebuilding this table
    # of signed rows (a rebuild trips the photo table's guard trigger, which reads this one).
    temperature_method = models.CharField("measured with", max_length=10, choices=TemperatureMethod.choices,  # noqa: DJ001
                                          null=True, blank=True)
    gauge_calibration = models.ForeignKey(
        "inspections.GaugeCalibration", null=True, blank=True, on_delete=models.PROTECT, editable=False,
        related_name="inspections", verbose_name="gauge used",
        help_text="The gauge and the calibration it was in when signed (inspections.calibration)")

    accepted = models.BooleanField(editable=False)
    findings = models.JSONField(editable=False, help_text="The verdict's findings as judged when signed")
    criteria_key = models.CharField(max_length=60, editable=False)
    criteria_version = models.PositiveIntegerField(editable=False)

    objects = InspectionQuerySet.as_manager()
    lock = InspectionLock("inspection", frozen=ALWAYS, advice="record a correction that supersedes it.")

    class Meta:
        ordering = ["-inspected_at", "-pk"]
        indexes = [models.Index(fields=["weld", "-inspected_at"]),
                   # the inspections list, newest first, a page at a time (core.lists): no sort of every row
                   models.Index(fields=["-inspected_at", "-id"], name="inspection_newest_first"),
                   # ... and its verdict filter (rejected ones are a few in a hundred)
                   models.Index(fields=["accepted", "-inspected_at", "-id"], name="inspection_verdict_newest")]
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

    @property
    def smallest_leg(self):
        """The smallest leg this inspection measured: the smaller of the two legs' readings, or, where only the
        throat a was gauged (ISO jobs), the equal leg of that throat (inspections.strength.leg_for_throat).
        None when neither was measured. Every capacity and undersize question reads this, never its own min()."""
        legs = [leg for leg in (self.min_size, self.min_size2) if leg is not None]
        if legs:
            return min(legs)
        if self.throat is not None:
            from inspections.strength import leg_for_throat

            return leg_for_throat(self.throat)
        return None

    def observed(self) -> dict:
        """The observations as the acceptance engine reads them (absent = none seen)."""
        observed = {}
        for o in observations.OBSERVATIONS:
            value = getattr(self, o.name)
            if o.kind == "flag":
                observed[o.name] = bool(value)
            elif value is not None:
                observed[o.name] = value
        return observed

    def recorded(self, system: str) -> list[tuple[str, str]]:
        """(label, value) in the job's words of what was measured or seen, in table order: what pages and PDFs
        print as "recorded" (a flag only when seen). The leg increase for the root opening comes last."""
        rows = []
        for o in observations.OBSERVATIONS:
            value = getattr(self, o.name)
            if value is None or value is False:
                continue
            if o.kind == "length":
                text = units.format_length(value, system)
            elif o.kind == "angle":
                text = f"{units._plain(value)}\u00b0"
            elif o.kind == "flag":
                text = "seen"
            else:
                text = str(value)
            rows.append((o.label(system), text))
        for label, value in (("Preheat measured", self.preheat_measured),
                             ("Interpass temperature measured", self.interpass_measured)):
            if value is not None:
                rows.append((label, f"{units.format_temperature(value, system)} "
                                    f"({(self.get_temperature_method_display() or 'method not recorded').lower()})"))
        if self.leg_increase:
            rows.append(("Specified leg increased for the root opening at fit-up",
                         f"+{units.format_length(self.leg_increase, system)}"))
        return rows


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
        return self.caption or "Photo of the weld"


def draft_photo_path(photo, filename):
    return f"photos/{timezone.now():%Y/%m}/draft-{photo.draft_id}-{filename}"


class InspectionDraft(models.Model):
    """What an inspector has typed and photographed for a weld (or a batch of identical welds), not yet signed.

    Kept so an inspection can be finished later (a break, lost Wi-Fi, a second look); visible to its inspector
    only; never a record: no verdict is stored, signing turns it into inspections and deletes it.
    """

    inspector = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.CASCADE, related_name="+")
    weld = models.ForeignKey("inspections.Weld", on_delete=models.CASCADE, related_name="drafts")
    data = models.JSONField(default=dict, help_text="The form as typed (text), including the batch's weld marks")
    created_at = models.DateTimeField(default=timezone.now)
    updated_at = models.DateTimeField(default=timezone.now)

    class Meta:
        constraints = [models.UniqueConstraint(fields=["inspector", "weld"], name="one_draft_per_weld_inspector")]
        ordering = ["-updated_at"]

    def __str__(self):
        return f"Draft inspection of {self.weld} by {self.inspector}"


class DraftPhoto(models.Model):
    """A photo taken before signing, cleaned like any other; it becomes a Photo of the inspection when signed."""

    draft = models.ForeignKey(InspectionDraft, on_delete=models.CASCADE, related_name="photos")
    image = models.ImageField(upload_to=draft_photo_path)
    thumbnail = models.ImageField(upload_to=draft_photo_path)
    caption = models.CharField(max_length=200, blank=True)
    width = models.PositiveIntegerField()
    height = models.PositiveIntegerField()
    content_type = models.CharField(max_length=20, default="image/jpeg")
    sha256 = models.CharField(max_length=64)
    uploaded_at = models.DateTimeField(default=timezone.now)

    class Meta:
        ordering = ["uploaded_at", "pk"]

    def __str__(self):
        return self.caption or "Photo of the weld"
