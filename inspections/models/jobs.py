"""Jobs, their assemblies (piece marks) and each assembly's weld map."""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.fields import ForceField, LengthField
from core.units import Length
from core.vocabulary import WELD_POSITION_CHOICES, JointType, Position, UnitSystem
from inspections.strength import effective_throat


class Job(models.Model):
    number = models.CharField(max_length=30, unique=True)
    name = models.CharField(max_length=120)
    customer = models.CharField(max_length=120)
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
    def loading(self) -> str | None:
        """'cyclic' or 'static' for an AWS D1.1 job (its criteria set, or the set a client set derives from, says
        which), None for other codes: what the WPS review reads where a job is known."""
        from inspections.criteria import resolve

        try:
            cset = resolve(self.criteria_for_evaluation())
        except ValueError:
            return None
        if not cset.standard.upper().startswith("AWS D1.1"):
            return None
        words = f"{cset.key} {cset.base_key or ''} {cset.title}".lower()
        return "cyclic" if "cyclic" in words else "static"

    @property
    def criteria_label(self) -> str:
        """The criteria set as a person names it: 'ISO 5817:2014 quality level C', or the client set's title."""
        if self.client_criteria_id:
            return str(self.client_criteria)
        return criteria_words(self.criteria_key)


def criteria_words(key: str) -> str:
    """A built-in criteria set's key in words ('aws-d1.1-2020-static' -> 'AWS D1.1/D1.1M:2020 visual acceptance'
    with its loading); any other key (a client set's own) as it is."""
    from inspections.criteria import REGISTRY

    cset = REGISTRY.get(key)
    return cset.title if cset is not None else str(key)


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
    size = LengthField("specified leg", help_text="Nominal fillet leg z; the vertical leg when legs differ")
    size2 = LengthField("second leg", null=True, blank=True, help_text="Only for unequal legs")
    # ISO 2553 drawings give the throat a, the leg z, or both. A weld whose drawing gives only a keeps the leg that
    # throat needs (leg_for_throat) in `size`, so strength and fit-up read a leg, and says so here.
    throat = LengthField("specified throat a", null=True, blank=True,
                         help_text="ISO drawings: the design throat a, when the drawing gives it")
    size_on_drawing = models.BooleanField("the drawing gives the leg", default=True,
                                          help_text="Off when the drawing gives only the throat a")
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
    completed_at = models.DateTimeField(
        "weld completed and cooled", null=True, blank=True,
        help_text="When the weld was finished and cooled to ambient; the delayed final visual of quenched and "
                  "tempered steels counts from it")
    base_metals = models.CharField(
        max_length=200, blank=True,
        help_text="The steels of the parts joined, when the drawing names them: e.g. ASTM A514, ASTM A572 Gr 50")
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

    # --- the weld's size, said once: every page, PDF and service reads these -------------------------------

    @property
    def smaller_leg(self) -> Length:
        """The smaller specified leg (unequal legs) or the leg."""
        return min(self.size, self.size2) if self.size2 is not None else self.size

    @property
    def nominal_throat(self) -> Length:
        """The specified throat a: as the drawing gives it, else the effective throat of the specified legs
        (inspections.strength.effective_throat, AISC 360-16 J2.2a; ISO 5817's nominal a)."""
        if self.throat is not None:
            return self.throat
        return effective_throat(self.size, self.size2)

    @property
    def base_metal_list(self) -> list[str]:
        return [part.strip() for part in self.base_metals.split(",") if part.strip()]

    @property
    def thicker_part(self):
        return max(self.thickness1, self.thickness2)
