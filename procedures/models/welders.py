"""Welders, their qualification tests, and the continuity that keeps a qualification alive.

Ranges and lapse dates are never typed: procedures.qualification derives them from the test and from
the continuity entries (production welds recorded in Legwork add their own entries).
"""

from django.conf import settings
from django.core.exceptions import ValidationError
from django.db import models, transaction
from django.urls import reverse
from django.utils import timezone

from legwork.fields import LengthField
from procedures.models.base import JointType, Process, UnitSystem


class WelderStateError(ValidationError):
    """A welder state change that does not apply (deactivating a welder who is already inactive)."""


class Welder(models.Model):
    name = models.CharField(max_length=120)
    stamp = models.CharField("identification stamp", max_length=20, unique=True)
    employer = models.CharField(max_length=120)
    active = models.BooleanField(default=True)
    deactivated_at = models.DateTimeField(null=True, blank=True, editable=False)
    deactivation_reason = models.CharField(max_length=200, blank=True, editable=False)

    class Meta:
        ordering = ["stamp"]

    def __str__(self):
        return f"{self.stamp} {self.name}"

    def get_absolute_url(self):
        return reverse("procedures:welder_detail", args=[self.pk])

    def deactivate(self, user, reason):
        """Take the welder off the active list (left the shop, stood down); history keeps who and why."""
        return self._set_active(False, user, reason)

    def reactivate(self, user, reason):
        """Put an inactive welder back on the active list; qualifications and continuity are judged as before."""
        return self._set_active(True, user, reason)

    def _set_active(self, active, user, reason):
        reason = (reason or "").strip()
        if not reason:
            raise WelderStateError("Give a reason.", code="reason_required")
        with transaction.atomic():
            # Lock the row: two people pressing "deactivate" at once must not write two history rows.
            locked = Welder.objects.select_for_update().get(pk=self.pk)
            if locked.active == active:
                state = "active" if active else "inactive"
                raise WelderStateError(f"{locked} is already {state}.", code="no_change")
            locked.active = active
            locked.deactivated_at = None if active else timezone.now()
            locked.deactivation_reason = "" if active else reason[:200]
            locked.save(update_fields=["active", "deactivated_at", "deactivation_reason"])
            WelderEvent.objects.create(
                welder=locked, from_state=WelderEvent.state_of(not active), to_state=WelderEvent.state_of(active),
                reason=reason, user=user,
            )
        self.active, self.deactivated_at, self.deactivation_reason = (
            locked.active, locked.deactivated_at, locked.deactivation_reason)
        return self


class WelderEvent(models.Model):
    """One change of a welder's active state, with who, when and why; append-only."""

    class State(models.TextChoices):
        ACTIVE = "active", "Active"
        INACTIVE = "inactive", "Inactive"

    welder = models.ForeignKey(Welder, on_delete=models.PROTECT, related_name="events")
    from_state = models.CharField(max_length=10, choices=State.choices)
    to_state = models.CharField(max_length=10, choices=State.choices)
    reason = models.TextField()
    user = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    at = models.DateTimeField(default=timezone.now)

    class Meta:
        ordering = ["at", "pk"]

    def __str__(self):
        return f"{self.welder.stamp}: {self.from_state} -> {self.to_state}"

    @classmethod
    def state_of(cls, active):
        return cls.State.ACTIVE if active else cls.State.INACTIVE


class QualificationCode(models.TextChoices):
    AWS = "AWS D1.1:2020", "AWS D1.1/D1.1M:2020"
    ISO = "ISO 9606-1:2012", "ISO 9606-1:2012"


class Qualification(models.Model):
    """A welder qualification test record (WPQ): the facts of the test; ranges are derived."""

    class Result(models.TextChoices):
        PASS = "pass", "Pass"
        FAIL = "fail", "Fail"

    welder = models.ForeignKey(Welder, on_delete=models.PROTECT, related_name="qualifications")
    code = models.CharField(max_length=20, choices=QualificationCode.choices, default=QualificationCode.AWS)
    process = models.CharField(max_length=8, choices=Process.choices)
    joint = models.CharField("joint type", max_length=8, choices=JointType.choices)
    test_position = models.CharField(max_length=12, help_text="AWS 1G-4G, 1F-4F, 3G+4G; ISO PA-PJ")
    test_thickness = LengthField()
    unit_system = models.CharField(
        "units of the test record", max_length=2, choices=UnitSystem.choices, default=UnitSystem.US,
        help_text="AWS D1.1M SI figures apply to a test recorded in millimetres",
    )
    electrode = models.CharField("electrode classification", max_length=40)
    wps = models.ForeignKey("procedures.WPS", null=True, blank=True, on_delete=models.PROTECT, related_name="+",
                            verbose_name="WPS used")
    test_date = models.DateField()
    result = models.CharField(max_length=4, choices=Result.choices)
    examiner = models.CharField(max_length=120)
    report = models.FileField(upload_to="qualification-reports/%Y/", blank=True)
    iso_revalidation = models.CharField(
        "ISO 9606-1 revalidation route", max_length=2, blank=True,
        choices=[("a", "9.3 a) retest every 3 years"), ("b", "9.3 b) every 2 years, production welds tested"),
                 ("c", "9.3 c) kept by the manufacturer's ISO 3834-2 system")],
    )
    recorded_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, on_delete=models.PROTECT, related_name="+",
                                    editable=False)
    recorded_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["welder", "-test_date"]

    def __str__(self):
        return f"{self.welder.stamp} {self.process} {self.test_position} {self.test_date:%Y-%m-%d}"


class ContinuityEntry(models.Model):
    """Proof that a welder used a process on a date: from a production weld, or entered by hand."""

    class Source(models.TextChoices):
        PRODUCTION = "production", "Production weld in Legwork"
        MANUAL = "manual", "Entered by hand"

    welder = models.ForeignKey(Welder, on_delete=models.PROTECT, related_name="continuity")
    process = models.CharField(max_length=8, choices=Process.choices)
    date = models.DateField()
    source = models.CharField(max_length=12, choices=Source.choices)
    weld = models.ForeignKey("inspections.Weld", null=True, blank=True, on_delete=models.PROTECT,
                             related_name="continuity_entries")
    note = models.CharField(max_length=200, blank=True)
    entered_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                                   related_name="+")
    entered_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["welder", "-date"]
        verbose_name_plural = "continuity entries"
        constraints = [
            models.UniqueConstraint(fields=["welder", "weld", "process"], condition=models.Q(weld__isnull=False),
                                    name="one_continuity_entry_per_weld_and_process"),
            models.CheckConstraint(condition=models.Q(source="production", weld__isnull=False)
                                   | models.Q(source="manual", weld__isnull=True),
                                   name="continuity_source_matches_weld"),
        ]

    def __str__(self):
        return f"{self.welder.stamp} {self.process} {self.date:%Y-%m-%d}"

    @classmethod
    def log_manual(cls, welder, process, on, note, user):
        """Record by hand that a welder used a process on a day (work outside Legwork), with a note."""
        note = (note or "").strip()
        if not note:
            raise ValidationError({"note": "Say what the welder welded, e.g. the job or the work order."})
        if on > timezone.localdate():
            raise ValidationError({"date": "Continuity cannot be logged for a day that has not come yet."})
        if process not in Process.values:
            raise ValidationError({"process": f"Choose one of {', '.join(Process.values)}."})
        return cls.objects.create(welder=welder, process=process, date=on, source=cls.Source.MANUAL,
                                  note=note[:200], entered_by=user)
