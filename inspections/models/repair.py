"""A repair weld: the NCR's repair as it was actually welded (who, to which WPS, when), on the weld's record.

The NCR's repair disposition names the WPS and welder intended; the repair record states what was done, and is
checked like the original weld (the WPS in force on the repair date and covering the weld; each welder qualified
and in continuity on that date). It is made once by inspections.services.repairs.record_repair and never edited:
the NCR closes on an accepted final re-inspection made on or after the repair date.
"""

from django.conf import settings
from django.db import models
from django.utils import timezone

from core.errors import RecordLocked


class WeldRepair(models.Model):
    weld = models.ForeignKey("inspections.Weld", on_delete=models.PROTECT, related_name="repairs")
    ncr = models.OneToOneField("inspections.NCR", on_delete=models.PROTECT, related_name="repair",
                               verbose_name="NCR")
    wps = models.ForeignKey("procedures.WPS", on_delete=models.PROTECT, related_name="repairs",
                            verbose_name="WPS welded to")
    welders = models.ManyToManyField("procedures.Welder", related_name="repairs")
    welded_on = models.DateField("date repaired")
    filler_lot = models.ForeignKey("inspections.FillerLot", null=True, blank=True, on_delete=models.PROTECT,
                                   related_name="repairs", verbose_name="filler lot used")
    notes = models.TextField(blank=True)
    recorded_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    recorded_at = models.DateTimeField(default=timezone.now)

    class Meta:
        ordering = ["weld", "welded_on", "pk"]

    def __str__(self):
        return f"Repair of weld {self.weld.mark} ({self.ncr.number})"

    def save(self, *args, **kwargs):
        if self.pk is not None and not self._state.adding:
            raise RecordLocked("A recorded repair is not changed; the NCR and its re-inspection carry the story.")
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        raise RecordLocked("A recorded repair cannot be deleted.")

    def get_absolute_url(self):
        return self.ncr.get_absolute_url()
