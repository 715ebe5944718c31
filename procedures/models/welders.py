"""Welders, their qualification tests, and the continuity that keeps a qualification alive.

Ranges and lapse dates are never typed: procedures.qualification derives them from the test and from
the continuity entries (production welds recorded in Legwork add their own entries).
"""

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.urls import reverse
from django.utils import timezone

from core.documents import hash_document
from core.errors import RecordLocked
from core.fields import LengthField
from core.locking import Guarded, GuardedQuerySet, Lock
from core.vocabulary import Backing, JointType, Process, Progression, UnitSystem
from procedures.models.wps import Transfer


class WelderLock(Lock):
    """A welder is edited in place, by version; the stamp, once a test record, a continuity entry or a weld bears
    it, stays: those records print it. Active or not changes only by its steps (procedures.services.welders)."""

    steps_only = ("active",)
    on_record = Q(qualifications__isnull=False) | Q(continuity__isnull=False) | Q(welds__isnull=False)

    def check_change(self, stored, changed):
        super().check_change(stored, changed)
        if "stamp" in changed and self.referenced(stored):
            raise RecordLocked({"stamp": [f"{stored}'s stamp is on test records or welds and cannot change; "
                                          "add the welder again under the new stamp if the shop reissued it."]})

    def referenced(self, stored):
        return (stored.qualifications.exists() or stored.continuity.exists()
                or stored.welds.exists())

    def refusing(self, names):
        if names & self.step_fields:
            return super().refusing(names)
        if "stamp" in names:
            return self.on_record
        return None

    def undeletable(self):
        return self.on_record

    def sql_frozen(self):
        return ('(EXISTS (SELECT 1 FROM "procedures_qualification" q WHERE q."welder_id" = OLD."id") '
                'OR EXISTS (SELECT 1 FROM "procedures_continuityentry" c WHERE c."welder_id" = OLD."id") '
                'OR EXISTS (SELECT 1 FROM "inspections_weld_welders" w WHERE w."welder_id" = OLD."id"))')

    def sql_allowances(self):
        # A welder on record: everything but the stamp may change (name, employer, the active steps).
        return [("1 = 1", tuple(c for c in self.model_columns() if c != "stamp"))]

    def model_columns(self):
        return [f.column for f in self.model._meta.concrete_fields]

    def sql_undeletable(self):
        return self.sql_frozen()

    def sql_words(self, doing="changed"):
        if doing == "changed":
            return "stamp cannot change once test records or welds bear it (a database rule of Legwork)"
        return super().sql_words(doing)


class Welder(Guarded):
    name = models.CharField(max_length=120)
    stamp = models.CharField("identification stamp", max_length=20, unique=True)
    employer = models.CharField(max_length=120)
    active = models.BooleanField(default=True)
    deactivated_at = models.DateTimeField(null=True, blank=True, editable=False)
    deactivation_reason = models.CharField(max_length=200, blank=True, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = WelderLock("welder", name=("stamp",), advice="test records, continuity or welds name this welder.")

    class Meta:
        ordering = ["stamp"]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.stamp} {self.name}"

    def get_absolute_url(self):
        return reverse("procedures:welder_detail", args=[self.pk])


class QualificationCode(models.TextChoices):
    AWS = "AWS D1.1:2020", "AWS D1.1/D1.1M:2020"
    ISO = "ISO 9606-1:2012", "ISO 9606-1:2012"


class Qualification(Guarded):
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
    # Essential variables beyond position and thickness (AWS D1.1:2020 Table 6.12, ISO 9606-1; from memory).
    # Blank: not recorded on the test record, so not checked (and the check says so).
    transfer = models.CharField("transfer mode (GMAW)", max_length=16, choices=Transfer.choices, blank=True,
                                help_text="GMAW only: short-circuiting (GMAW-S) qualifies apart from the others")
    progression = models.CharField("vertical progression", max_length=4, choices=Progression.choices, blank=True,
                                   help_text="For a test in a vertical position (3G, 3F, PF, PG)")
    backing = models.CharField("backing", max_length=12, choices=Backing.choices, blank=True,
                               help_text="For a groove (butt) test")
    wps = models.ForeignKey("procedures.WPS", null=True, blank=True, on_delete=models.PROTECT, related_name="+",
                            verbose_name="WPS used")
    test_date = models.DateField()
    result = models.CharField(max_length=4, choices=Result.choices)
    examiner = models.CharField(max_length=120)
    report = models.FileField(upload_to="qualification-reports/%Y/", blank=True)
    report_sha256 = models.CharField("SHA-256 of the report", max_length=64, blank=True, editable=False,
                                     help_text="Of the bytes stored; `manage.py verify_records` checks the file")
    iso_revalidation = models.CharField(
        "ISO 9606-1 revalidation route", max_length=2, blank=True,
        choices=[("a", "9.3 a) retest every 3 years"), ("b", "9.3 b) every 2 years, production welds tested"),
                 ("c", "9.3 c) kept by the manufacturer's ISO 3834-2 system")],
    )
    recorded_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, on_delete=models.PROTECT, related_name="+",
                                    editable=False)
    recorded_at = models.DateTimeField(default=timezone.now, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("welder test record")

    class Meta:
        ordering = ["welder", "-test_date"]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.welder.stamp} {self.process} {self.test_position} {self.test_date:%Y-%m-%d}"

    def save(self, *args, **kwargs):
        digest = hash_document(self.report)  # a report attached now: hash the bytes about to be stored
        if digest:
            self.report_sha256 = digest
            if kwargs.get("update_fields") is not None:
                kwargs["update_fields"] = {*kwargs["update_fields"], "report_sha256"}
        super().save(*args, **kwargs)


class ContinuityEntry(Guarded):
    """Proof that a welder used a process on a date: from a production weld, or entered by hand."""

    class Source(models.TextChoices):
        PRODUCTION = "production", "Production weld in Legwork"
        REPAIR = "repair", "Repair weld in Legwork"
        MANUAL = "manual", "Entered by hand"

    welder = models.ForeignKey(Welder, on_delete=models.PROTECT, related_name="continuity")
    process = models.CharField(max_length=8, choices=Process.choices)
    date = models.DateField()
    source = models.CharField(max_length=12, choices=Source.choices)
    weld = models.ForeignKey("inspections.Weld", null=True, blank=True, on_delete=models.PROTECT,
                             related_name="continuity_entries")
    repair = models.ForeignKey("inspections.WeldRepair", null=True, blank=True, on_delete=models.PROTECT,
                               related_name="continuity_entries")
    note = models.CharField(max_length=200, blank=True)
    entered_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                                   related_name="+")
    entered_at = models.DateTimeField(default=timezone.now, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("continuity entry")

    class Meta:
        ordering = ["welder", "-date"]
        base_manager_name = "objects"
        verbose_name_plural = "continuity entries"
        constraints = [
            models.UniqueConstraint(fields=["welder", "weld", "process"], condition=models.Q(weld__isnull=False),
                                    name="one_continuity_entry_per_weld_and_process"),
            models.UniqueConstraint(fields=["welder", "repair", "process"], condition=models.Q(repair__isnull=False),
                                    name="one_continuity_entry_per_repair_and_process"),
            models.CheckConstraint(condition=models.Q(source="production", weld__isnull=False, repair__isnull=True)
                                   | models.Q(source="repair", weld__isnull=True, repair__isnull=False)
                                   | models.Q(source="manual", weld__isnull=True, repair__isnull=True),
                                   name="continuity_source_matches_weld"),
        ]

    def __str__(self):
        return f"{self.welder.stamp} {self.process} {self.date:%Y-%m-%d}"

    @property
    def weld_used(self):
        """The weld the process was used on: the production weld, or the weld a repair was made on (None by hand)."""
        if self.repair_id:
            return self.repair.weld
        return self.weld if self.weld_id else None


class ContinuityRun(models.Model):
    """A welder's unbroken run of uses of a process (each within six months of the one before): a fact derived from
    the continuity entries and kept with them in the same transaction by procedures.continuity, so the welder list
    and every eligibility check read a few rows per welder and process rather than the whole history. The latest
    run of a welder and process is its current continuity: last use and valid-until. Never edited by hand; rebuilt
    from the entries whenever they change (procedures.continuity.refresh)."""

    welder = models.ForeignKey(Welder, on_delete=models.CASCADE, related_name="continuity_runs")
    process = models.CharField(max_length=8, choices=Process.choices)
    first_use = models.DateField()
    last_use = models.DateField()
    valid_until = models.DateField(help_text="continuity_until(last_use): the last day the run keeps a test alive")

    class Meta:
        ordering = ["welder", "process", "first_use"]
        constraints = [models.UniqueConstraint(fields=["welder", "process", "first_use"],
                                               name="one_continuity_run_per_start")]

    def __str__(self):
        return f"{self.welder_id} {self.process} {self.first_use:%Y-%m-%d}..{self.last_use:%Y-%m-%d}"
