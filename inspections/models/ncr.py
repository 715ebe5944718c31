"""Nonconformance reports: opened from a rejected inspection, dispositioned by the QA lead, closed by an
accepted re-inspection (repair), an engineer's approval (use-as-is) or scrap."""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, Move


class NCRState(models.TextChoices):
    OPEN = "open", "Open"
    DISPOSITIONED = "dispositioned", "Dispositioned"
    CLOSED = "closed", "Closed"


class Disposition(models.TextChoices):
    REPAIR = "repair", "Repair"
    USE_AS_IS = "use_as_is", "Use as is"
    SCRAP = "scrap", "Scrap"


DISPOSITION_FIELDS = ("disposition", "disposition_notes", "repair_wps", "repair_welder", "engineer_name",
                      "engineer_approved_on", "capacity_calculation", "dispositioned_by", "dispositioned_at")


class NCR(Guarded):
    """Signed when raised: changed by no edit, only by its steps (inspections.services.ncr), never deleted."""

    number = models.CharField(max_length=30, unique=True)
    weld = models.ForeignKey("inspections.Weld", on_delete=models.PROTECT, related_name="ncrs")
    inspection = models.ForeignKey("inspections.Inspection", on_delete=models.PROTECT, related_name="ncrs",
                                   help_text="The rejected inspection that opened it")
    description = models.TextField()
    state = models.CharField(max_length=14, choices=NCRState.choices, default=NCRState.OPEN, editable=False)
    raised_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    raised_at = models.DateTimeField(default=timezone.now)

    disposition = models.CharField(max_length=10, choices=Disposition.choices, blank=True)
    disposition_notes = models.TextField(blank=True)
    repair_wps = models.ForeignKey("procedures.WPS", null=True, blank=True, on_delete=models.PROTECT,
                                   related_name="+")
    repair_welder = models.ForeignKey("procedures.Welder", null=True, blank=True, on_delete=models.PROTECT,
                                      related_name="+")
    engineer_name = models.CharField("engineer approving use-as-is", max_length=120, blank=True)
    engineer_approved_on = models.DateField(null=True, blank=True)
    capacity_calculation = models.JSONField(null=True, blank=True,
                                            help_text="As-inspected strength calculation attached to use-as-is")
    dispositioned_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                                         related_name="+")
    dispositioned_at = models.DateTimeField(null=True, blank=True)

    closed_by_inspection = models.ForeignKey("inspections.Inspection", null=True, blank=True,
                                             on_delete=models.PROTECT, related_name="+")
    closed_at = models.DateTimeField(null=True, blank=True)

    objects = GuardedQuerySet.as_manager()
    lock = Lock(
        "NCR", state="state", frozen=ALWAYS, name=("number",),
        advice="it moves on only by its disposition steps, and is closed, never deleted.",
        moves=[Move(NCRState.OPEN, NCRState.DISPOSITIONED, DISPOSITION_FIELDS),
               Move(NCRState.OPEN, NCRState.CLOSED, (*DISPOSITION_FIELDS, "closed_at")),
               Move(NCRState.DISPOSITIONED, NCRState.CLOSED, ("closed_by_inspection", "closed_at"))],
    )

    class Meta:
        ordering = ["-raised_at", "-pk"]
        verbose_name = "NCR"
        verbose_name_plural = "NCRs"
        base_manager_name = "objects"

    def __str__(self):
        return f"NCR {self.number}"

    def get_absolute_url(self):
        return reverse("inspections:ncr_detail", args=[self.pk])

    @property
    def is_open(self):
        """Not closed: blocks the assembly's release (a repair stays open until an accepted re-inspection)."""
        return self.state != NCRState.CLOSED
