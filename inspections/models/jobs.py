"""Jobs, their assemblies (piece marks) and each assembly's weld map."""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.fields import ForceField, LengthField
from core.vocabulary import WELD_POSITION_CHOICES, JointType, Position, UnitSystem


class Customer(models.Model):
    """Whom jobs are built for. A viewer account tied to a customer sees that customer's jobs and what hangs from
    them, and nothing else (core.visibility)."""

    name = models.CharField(max_length=120, unique=True)
    viewers = models.ManyToManyField(
        settings.AUTH_USER_MODEL, blank=True, related_name="customers",
        help_text="Viewer accounts (the customer's people, or its third-party inspector) that see this customer's "
                  "jobs")

    class Meta:
        ordering = ["name"]

    def __str__(self):
        return self.name


class Job(models.Model):
    number = models.CharField(max_length=30, unique=True)
    name = models.CharField(max_length=120)
    customer = models.ForeignKey(Customer, on_delete=models.PROTECT, related_name="jobs")
    unit_system = models.CharField(max_length=2, choices=UnitSystem.choices, default=UnitSystem.US)
    criteria_key = models.CharField(
        "criteria set", max_length=60, default="aws-d1.1-2020-static",
        help_text="Built-in set key (inspections.criteria) unless a client set is chosen",
    )
    client_criteria = models.ForeignKey("inspections.ClientCriteriaSet", null=True, blank=True,
                                        on_delete=models.PROTECT, related_name="jobs")
    created_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["-number"]

    def __str__(self):
        return f"{self.number} {self.name}"

    def get_absolute_url(self):
        return reverse("inspections:job_detail", args=[self.pk])

    def criteria_for_evaluation(self):
        """What inspections.acceptance.evaluate takes for this job: a built-in key, or a client set's stored dict."""
        if self.client_criteria_id:
            return self.client_criteria.definition
        return self.criteria_key

    def criteria_identity(self) -> tuple[str, int]:
        """(key, version) a verdict stores, so it keeps the set it was judged by after the set moves on."""
        if self.client_criteria_id:
            return self.client_criteria.key, self.client_criteria.version
        from inspections.criteria import get_criteria

        return self.criteria_key, get_criteria(self.criteria_key).version

    @property
    def criteria_label(self) -> str:
        if self.client_criteria_id:
            return str(self.client_criteria)
        return self.criteria_key


class AssemblyState(models.TextChoices):
    IN_FABRICATION = "in_fabrication", "In fabrication"
    AWAITING_INSPECTION = "awaiting_inspection", "Awaiting inspection"
    REJECTED = "rejected", "Rejected"
    RELEASED = "released", "Released"
    SCRAPPED = "scrapped", "Scrapped"


class Assembly(models.Model):
    job = models.ForeignKey(Job, on_delete=models.PROTECT, related_name="assemblies")
    piece_mark = models.CharField(max_length=30)
    drawing = models.CharField(max_length=40)
    drawing_revision = models.CharField(max_length=10, default="0")
    quantity = models.PositiveIntegerField(default=1)
    description = models.CharField(max_length=200, blank=True)
    state = models.CharField(max_length=20, choices=AssemblyState.choices, default=AssemblyState.IN_FABRICATION,
                             editable=False)
    released_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                                    related_name="+", editable=False)
    released_at = models.DateTimeField(null=True, blank=True, editable=False)

    class Meta:
        ordering = ["job", "piece_mark"]
        verbose_name_plural = "assemblies"
        constraints = [models.UniqueConstraint(fields=["job", "piece_mark"], name="piece_mark_unique_in_job")]

    def __str__(self):
        return f"{self.piece_mark} ({self.job.number})"

    def get_absolute_url(self):
        return reverse("inspections:assembly_detail", args=[self.pk])

    @property
    def is_closed(self):
        """Released or scrapped: the weld map is frozen."""
        return self.state in (AssemblyState.RELEASED, AssemblyState.SCRAPPED)


class Sides(models.TextChoices):
    ARROW = "arrow", "Arrow side"
    OTHER = "other", "Other side"
    BOTH = "both", "Both sides"


class Weld(models.Model):
    """A line of the weld map: what the drawing asks for, who welded it, to which WPS."""

    assembly = models.ForeignKey(Assembly, on_delete=models.PROTECT, related_name="welds")
    mark = models.CharField("weld mark", max_length=20)
    joint_type = models.CharField(max_length=8, choices=JointType.choices, default=JointType.FILLET)
    size = LengthField("specified leg", help_text="Nominal fillet leg; the vertical leg when legs differ")
    size2 = LengthField("second leg", null=True, blank=True, help_text="Only for unequal legs")
    length = LengthField("length of each weld")
    count = models.PositiveIntegerField(default=1, help_text="How many of this weld on one assembly")
    sides = models.CharField(max_length=5, choices=Sides.choices, default=Sides.ARROW)
    all_around = models.BooleanField(default=False)
    field_weld = models.BooleanField(default=False)
    pitch = LengthField("pitch (intermittent)", null=True, blank=True)
    thickness1 = LengthField("thickness of part 1")
    thickness2 = LengthField("thickness of part 2")
    position = models.CharField(max_length=2, choices=WELD_POSITION_CHOICES, default=Position.F)
    wps = models.ForeignKey("procedures.WPS", null=True, blank=True, on_delete=models.PROTECT, related_name="welds",
                            verbose_name="WPS")
    welders = models.ManyToManyField("procedures.Welder", blank=True, related_name="welds")
    welded_on = models.DateField("date welded", null=True, blank=True)
    primary_member = models.BooleanField(default=False)
    transverse_to_tension = models.BooleanField("transverse to tensile stress", default=False)
    required_strength = ForceField(null=True, blank=True, help_text="From the engineer of record, when given")
    load_angle = models.DecimalField("load angle to weld axis (°)", max_digits=5, decimal_places=2, default=0)
    # Kept by inspections.services.inspect.sign_inspection, the one path by which inspections are stored: the
    # weld's latest current inspection of any stage, and its latest current final visual inspection.
    latest_inspection = models.ForeignKey("inspections.Inspection", null=True, blank=True, editable=False,
                                          on_delete=models.PROTECT, related_name="+")
    latest_final = models.ForeignKey("inspections.Inspection", null=True, blank=True, editable=False,
                                     on_delete=models.PROTECT, related_name="+")

    class Meta:
        ordering = ["assembly", "mark"]
        constraints = [models.UniqueConstraint(fields=["assembly", "mark"], name="weld_mark_unique_in_assembly")]

    def __str__(self):
        return f"{self.assembly.piece_mark} / {self.mark}"

    def get_absolute_url(self):
        return reverse("inspections:weld_detail", args=[self.pk])

    @property
    def thinner_part(self):
        return min(self.thickness1, self.thickness2)

    @property
    def thicker_part(self):
        return max(self.thickness1, self.thickness2)
