"""Nonconformance reports: opened from a rejected inspection, dispositioned by the QA lead, closed by an
accepted re-inspection (repair), an engineer's approval (use-as-is) or scrap."""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked


class NCRState(models.TextChoices):
    OPEN = "open", "Open"
    DISPOSITIONED = "dispositioned", "Dispositioned"
    CLOSED = "closed", "Closed"


class Disposition(models.TextChoices):
    REPAIR = "repair", "Repair"
    USE_AS_IS = "use_as_is", "Use as is"
    SCRAP = "scrap", "Scrap"


class NCR(models.Model):
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

    class Meta:
        ordering = ["-raised_at", "-pk"]
        verbose_name = "NCR"
        verbose_name_plural = "NCRs"

    def __str__(self):
        return f"NCR {self.number}"

    def save(self, *args, **kwargs):
        # Only the named steps in inspections.services.ncr move an NCR on (core.transitions, past this guard).
        if self.pk and not self._state.adding:
            raise RecordLocked(f"{self} is a signed record; use its disposition steps, not an edit.")
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        raise RecordLocked(f"{self} cannot be deleted; close it with a disposition.")

    def get_absolute_url(self):
        return reverse("inspections:ncr_detail", args=[self.pk])

    @property
    def is_open(self):
        """Not closed: blocks the assembly's release (a repair stays open until an accepted re-inspection)."""
        return self.state != NCRState.CLOSED
