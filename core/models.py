"""The shop's people (one role each; core.roles decides what a role may do) and the one history of every record."""

from django.conf import settings
from django.contrib.auth.models import AbstractUser
from django.contrib.contenttypes.fields import GenericForeignKey
from django.contrib.contenttypes.models import ContentType
from django.db import models
from django.utils import timezone

from core.errors import RecordLocked
from core.roles import Role


class User(AbstractUser):
    role = models.CharField(max_length=20, choices=Role.choices, default=Role.VIEWER)
    stamp = models.CharField(
        max_length=20, blank=True, help_text="Inspector's or engineer's stamp or certificate number, printed on records"
    )

    def __str__(self):
        return self.get_full_name() or self.username

    @property
    def role_label(self):
        return Role(self.role).label if self.role in Role.values else "—"


class EventQuerySet(models.QuerySet):
    """History only grows: no bulk change or delete."""

    def update(self, **kwargs):
        raise RecordLocked("A history row is never changed; record a new event instead.")

    def delete(self):
        raise RecordLocked("A history row is never deleted.")


class Event(models.Model):
    """One change of one record: who, when, from which state to which, which fields changed, and why.

    Every record's history is these rows (core.history writes and reads them); they are never changed or
    deleted. `changes` maps a field's label to [old, new] as a person reads them.
    """

    subject_type = models.ForeignKey(ContentType, on_delete=models.PROTECT, related_name="+")
    subject_id = models.PositiveBigIntegerField()
    subject = GenericForeignKey("subject_type", "subject_id")
    action = models.CharField(max_length=40)
    from_state = models.CharField(max_length=30, blank=True)
    to_state = models.CharField(max_length=30, blank=True)
    changes = models.JSONField(default=dict, blank=True)
    reason = models.TextField(blank=True)
    user = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                             related_name="+", help_text="Empty for the system itself (a background worker)")
    at = models.DateTimeField(default=timezone.now)

    objects = EventQuerySet.as_manager()

    class Meta:
        ordering = ["at", "pk"]
        indexes = [models.Index(fields=["subject_type", "subject_id", "at"], name="event_subject_at")]

    def __str__(self):
        return f"{self.subject_type.model} {self.subject_id}: {self.action} at {self.at:%Y-%m-%d %H:%M}"

    def save(self, *args, **kwargs):
        if self.pk is not None and not self._state.adding:
            raise RecordLocked("A history row is never changed; record a new event instead.")
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        raise RecordLocked("A history row is never deleted.")

    def _label(self, value):
        model = self.subject_type.model_class()
        try:
            choices = dict(model._meta.get_field("state").flatchoices)
        except Exception:  # noqa: BLE001 - a subject without a state field shows the stored words
            return value
        return choices.get(value, value)

    @property
    def from_label(self):
        return self._label(self.from_state) if self.from_state else ""

    @property
    def to_label(self):
        return self._label(self.to_state) if self.to_state else ""


class SealQuerySet(models.QuerySet):
    """The chain only grows: no bulk change or delete."""

    def update(self, **kwargs):
        raise RecordLocked("A seal is never changed; the chain only grows.")

    def delete(self):
        raise RecordLocked("A seal is never deleted; the chain only grows.")


class Seal(models.Model):
    """One signed record's fingerprint, linked to the seal before it: the record chain (core.seals).

    `content` is the record's canonical JSON as it was signed (the exact text hashed into content_sha256);
    chain_sha256 covers the sequence, kind, record, content hash, the previous seal's chain hash and the time,
    so a change to any signed record, or to any seal, breaks the chain from there on. Never changed or deleted.
    """

    sequence = models.PositiveBigIntegerField(unique=True)
    kind = models.CharField(max_length=40, help_text="What was signed, e.g. inspection.signed")
    record_type = models.CharField(max_length=60, help_text="app_label.model of the record sealed")
    record_id = models.PositiveBigIntegerField()
    content = models.TextField(help_text="Canonical JSON of the record as signed (the text hashed)")
    content_sha256 = models.CharField(max_length=64)
    previous_sha256 = models.CharField(max_length=64, help_text="chain_sha256 of the seal before (zeros: first)")
    chain_sha256 = models.CharField(max_length=64, unique=True)
    sealed_at = models.DateTimeField()

    objects = SealQuerySet.as_manager()

    class Meta:
        ordering = ["sequence"]
        constraints = [models.UniqueConstraint(fields=["kind", "record_type", "record_id"],
                                               name="one_seal_per_signing")]
        indexes = [models.Index(fields=["record_type", "record_id"], name="seal_record")]

    def __str__(self):
        return f"seal #{self.sequence} {self.kind} {self.record_type} {self.record_id}"

    def save(self, *args, **kwargs):
        if self.pk is not None and not self._state.adding:
            raise RecordLocked("A seal is never changed; the chain only grows.")
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        raise RecordLocked("A seal is never deleted; the chain only grows.")


class SealHead(models.Model):
    """The chain's last sequence and hash, in one row: locking it serialises appends (core.seals.lock_chain)."""

    sequence = models.PositiveBigIntegerField()
    chain_sha256 = models.CharField(max_length=64)

    def __str__(self):
        return f"chain head #{self.sequence}"
