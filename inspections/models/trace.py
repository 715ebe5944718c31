"""The records around a weld that an auditor asks for next: the inspector's certification, and (later in this
file) the measuring instruments. Registers of the shop: a customer's viewer never opens them (core.visibility);
it reads a credential or a gauge only as printed on its travelers.

A credential is recorded as the card prints it and never edited: a typing mistake or a card taken away is
withdrawn with a reason (inspections.services.trace), a renewal is a new record. Signed inspections name the
credential they were signed under.
"""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.documents import hash_document
from core.fields import LengthField
from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, Move
from inspections import credentials as engine


def document_path(record, filename):
    return f"trace/{type(record).__name__.lower()}/{timezone.now():%Y/%m}/{filename}"


class DocumentMixin:
    """A record with one scanned document (`document`) and its SHA-256 (`document_sha256`), hashed when attached."""

    def save(self, *args, **kwargs):
        digest = hash_document(self.document)
        if digest:
            self.document_sha256 = digest
        super().save(*args, **kwargs)


class Recorded(models.Model):
    """Who put a register's row on record, and when (the history row says the same; pages print these)."""

    recorded_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, on_delete=models.PROTECT,
                                    related_name="+", editable=False)
    recorded_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        abstract = True


class CredentialState(models.TextChoices):
    ON_FILE = "on_file", "On file"
    WITHDRAWN = "withdrawn", "Withdrawn"


class InspectorCredential(DocumentMixin, Recorded, Guarded):
    """One certification of one inspector (AWS CWI, ISO 9712 VT, a national scheme), as the card prints it."""

    inspector = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="credentials")
    scheme = models.CharField(max_length=12, choices=list(engine.SCHEMES.items()))
    scheme_name = models.CharField("scheme and body", max_length=80, blank=True,
                                   help_text="For a national scheme: its name and certifying body")
    number = models.CharField("certificate number", max_length=40)
    level = models.CharField(max_length=20, blank=True, help_text="ISO 9712: 1, 2 or 3; blank for AWS")
    endorsements = models.CharField(max_length=200, blank=True,
                                    help_text="As printed, e.g. AWS D1.1 endorsement; sector for ISO 9712")
    issued_on = models.DateField("valid from")
    expires_on = models.DateField("expires on", help_text="The last day printed as valid")
    eye_exam_on = models.DateField("eye examination", help_text="Date of the latest near-vision examination")
    document = models.FileField("copy of the card", upload_to=document_path, blank=True)
    document_sha256 = models.CharField(max_length=64, blank=True, editable=False)
    state = models.CharField(max_length=12, choices=CredentialState.choices, default=CredentialState.ON_FILE,
                             editable=False)
    withdrawn_reason = models.CharField(max_length=200, blank=True, editable=False)
    withdrawn_at = models.DateTimeField(null=True, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("inspector credential", state="state", frozen=ALWAYS, name=("number",),
                advice="withdraw it with a reason and record the card again.",
                moves=[Move(CredentialState.ON_FILE, CredentialState.WITHDRAWN, ("withdrawn_reason", "withdrawn_at"))])

    class Meta:
        ordering = ["inspector", "-expires_on", "-pk"]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.short} {self.number}"

    def get_absolute_url(self):
        return reverse("inspections:credential_detail", args=[self.pk])

    @property
    def short(self) -> str:
        """The scheme in a few words, as printed beside a name."""
        if self.scheme == engine.NATIONAL:
            return self.scheme_name or "National scheme"
        words = {engine.CWI: "AWS CWI", engine.SCWI: "AWS SCWI", engine.ISO_9712: "ISO 9712 VT"}[self.scheme]
        return f"{words} level {self.level}" if self.level else words

    def printed(self) -> str:
        """The credential as a traveler prints it beside the inspector's name."""
        return f"{self.short} {self.number}, valid to {self.expires_on.isoformat()}"

    def facts(self) -> engine.Facts:
        return engine.Facts(scheme=self.scheme, issued_on=self.issued_on, expires_on=self.expires_on,
                            eye_exam_on=self.eye_exam_on, withdrawn=self.state == CredentialState.WITHDRAWN)

    def currency(self, on):
        return engine.currency(self.facts(), on)


# --- measuring instruments -------------------------------------------------------------------------------------

class GaugeKind(models.TextChoices):
    FILLET = "fillet", "Fillet weld gauge"
    UNDERCUT = "undercut", "Undercut / pit depth gauge"
    MULTI = "multi", "Multi-purpose weld gauge"
    RULE = "rule", "Rule or tape"
    THERMOMETER = "thermometer", "Contact thermometer"
    CRAYON = "crayon", "Temperature-indicating crayon"
    METER = "meter", "Welding-machine meter (amperes, volts)"
    OTHER = "other", "Other instrument"


class GaugeState(models.TextChoices):
    IN_SERVICE = "in_service", "In service"
    RETIRED = "retired", "Retired"


class Gauge(Recorded, Guarded):
    """A measuring instrument of the shop's register. Never edited: a mistake is retired and recorded again."""

    number = models.CharField("register number", max_length=30, unique=True, help_text="e.g. FG-03")
    kind = models.CharField(max_length=12, choices=GaugeKind.choices)
    description = models.CharField(max_length=120, blank=True, help_text="Make, model, range")
    serial_number = models.CharField(max_length=60, blank=True)
    state = models.CharField(max_length=12, choices=GaugeState.choices, default=GaugeState.IN_SERVICE,
                             editable=False)
    retired_reason = models.CharField(max_length=200, blank=True, editable=False)
    retired_at = models.DateTimeField(null=True, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("gauge", state="state", frozen=ALWAYS, name=("number",),
                advice="retire it with a reason and record it again.",
                moves=[Move(GaugeState.IN_SERVICE, GaugeState.RETIRED, ("retired_reason", "retired_at"))])

    class Meta:
        ordering = ["number"]
        base_manager_name = "objects"

    def __str__(self):
        return self.number

    def get_absolute_url(self):
        return reverse("inspections:gauge_detail", args=[self.pk])

    def standing(self, on, calibrations=None):
        """inspections.calibration's answer on the day (pass the calibrations when they are prefetched)."""
        from inspections import calibration

        rows = calibrations if calibrations is not None else list(self.calibrations.all())
        return calibration.standing([c.facts() for c in rows], on, retired=self.state == GaugeState.RETIRED)


class CalibrationResult(models.TextChoices):
    IN_TOLERANCE = "in_tolerance", "Found in tolerance"
    OUT_OF_TOLERANCE = "out_of_tolerance", "Found out of tolerance"


class GaugeCalibration(DocumentMixin, Recorded, Guarded):
    """One calibration (or check against a reference) of a gauge, with its certificate; a fact, never edited.
    Inspections name the calibration their gauge was used under."""

    gauge = models.ForeignKey(Gauge, on_delete=models.PROTECT, related_name="calibrations")
    calibrated_on = models.DateField()
    due_on = models.DateField("due on", help_text="The last day it may be used (a crayon: the lot's expiry)")
    result = models.CharField(max_length=20, choices=CalibrationResult.choices)
    performed_by = models.CharField(max_length=120, help_text="Laboratory, or the person and the reference used")
    note = models.CharField(max_length=200, blank=True)
    document = models.FileField("certificate", upload_to=document_path, blank=True)
    document_sha256 = models.CharField(max_length=64, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("gauge calibration", frozen=ALWAYS, name=("id",),
                advice="record another calibration; the one before stays on record.")

    class Meta:
        ordering = ["gauge", "-calibrated_on", "-pk"]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.gauge} {self.get_result_display().lower()} {self.calibrated_on.isoformat()}"

    def get_absolute_url(self):
        return reverse("inspections:calibration_detail", args=[self.pk])

    def facts(self):
        from inspections import calibration

        return calibration.Calibration(self.pk, self.calibrated_on, self.due_on, self.result)

    def printed(self) -> str:
        """The gauge as a traveler prints it beside an inspection."""
        return (f"{self.gauge.number} {self.gauge.get_kind_display().lower()}, calibrated "
                f"{self.calibrated_on.isoformat()}, due {self.due_on.isoformat()}")


# --- filler metal lots -------------------------------------------------------------------------------------------

class FillerLot(DocumentMixin, Recorded, Guarded):
    """One lot (or heat) of filler metal as received, with its certificate; a fact, never edited. A weld names the
    lot it was made with (Weld.filler_lot); the proof chain compares its classification with the WPS's."""

    classification = models.CharField("AWS classification", max_length=40, help_text="e.g. E71T-1C, ER70S-6, E7018")
    specification = models.CharField(max_length=40, blank=True, help_text="e.g. AWS A5.20/A5.20M; ISO 17632-A")
    diameter = LengthField()
    lot_number = models.CharField("lot or heat number", max_length=40)
    manufacturer = models.CharField(max_length=80)
    received_on = models.DateField()
    document = models.FileField("certificate", upload_to=document_path, blank=True,
                                help_text="The manufacturer's certificate of conformance (EN 10204 3.1 on ISO jobs)")
    document_sha256 = models.CharField(max_length=64, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("filler lot", frozen=ALWAYS, name=("lot_number",), advice="record the lot again if it was mistyped.")

    class Meta:
        ordering = ["-received_on", "-pk"]
        base_manager_name = "objects"
        constraints = [models.UniqueConstraint(fields=["manufacturer", "classification", "diameter", "lot_number"],
                                               name="filler_lot_unique")]

    def __str__(self):
        return f"{self.classification} lot {self.lot_number}"

    def get_absolute_url(self):
        return reverse("inspections:filler_lot_detail", args=[self.pk])

    def printed(self, system: str = "US") -> str:
        from core.units import format_length

        return (f"{self.classification} {format_length(self.diameter, system)} lot {self.lot_number} "
                f"({self.manufacturer})")
