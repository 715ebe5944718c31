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


class CredentialState(models.TextChoices):
    ON_FILE = "on_file", "On file"
    WITHDRAWN = "withdrawn", "Withdrawn"


class InspectorCredential(DocumentMixin, Guarded):
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
    recorded_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, on_delete=models.PROTECT,
                                    related_name="+", editable=False)
    recorded_at = models.DateTimeField(default=timezone.now, editable=False)

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
