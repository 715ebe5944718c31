"""Which WPSs and welders each job uses: a fact kept by inspections.uses, read by core.visibility."""

from django.db import models


class JobWPS(models.Model):
    """A WPS named on a job, by one of its welds or by a repair disposition of one of its NCRs. Never edited by
    hand: inspections.uses keeps it in step with the welds and NCRs in the same transaction, so a customer's viewer
    is shown the WPSs of its jobs by reading a few rows per job instead of every weld of every job."""

    job = models.ForeignKey("inspections.Job", on_delete=models.CASCADE, related_name="+")
    wps = models.ForeignKey("procedures.WPS", on_delete=models.CASCADE, related_name="+")

    class Meta:
        verbose_name = "WPS used on a job"
        constraints = [models.UniqueConstraint(fields=["job", "wps"], name="one_job_wps_row")]

    def __str__(self):
        return f"job {self.job_id} uses WPS {self.wps_id}"


class JobWelder(models.Model):
    """A welder named on a job, by one of its welds or as the repair welder of one of its NCRs (see JobWPS)."""

    job = models.ForeignKey("inspections.Job", on_delete=models.CASCADE, related_name="+")
    welder = models.ForeignKey("procedures.Welder", on_delete=models.CASCADE, related_name="+")

    class Meta:
        verbose_name = "welder used on a job"
        constraints = [models.UniqueConstraint(fields=["job", "welder"], name="one_job_welder_row")]

    def __str__(self):
        return f"job {self.job_id} uses welder {self.welder_id}"
