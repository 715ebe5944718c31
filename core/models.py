"""The shop's people (one role each; core.roles decides what a role may do) and the one history of every record."""

from django.conf import settings
from django.contrib.auth.models import AbstractUser, UserManager
from django.contrib.contenttypes.fields import GenericForeignKey
from django.contrib.contenttypes.models import ContentType
from django.db import models
from django.utils import timezone

from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock
from core.roles import Role


class LegworkUserManager(UserManager.from_queryset(GuardedQuerySet)):
    pass


class User(Guarded, AbstractUser):
    """A person with one role. Edited in place (the admin), by version; role and stamp changes keep their history."""

    role = models.CharField(max_length=20, choices=Role.choices, default=Role.VIEWER)
    stamp = models.CharField(
        max_length=20, blank=True, help_text="Inspector's or engineer's stamp or certificate number, printed on records"
    )
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = LegworkUserManager()
    lock = Lock("user", name=("username",))
    quiet_fields = frozenset({"last_login"})  # every sign-in saves it: no history row, no version
    secret_fields = frozenset({"password"})

    class Meta(AbstractUser.Meta):
        swappable = "AUTH_USER_MODEL"
        base_manager_name = "objects"

    def __str__(self):
        return self.get_full_name() or self.username

    @property
    def role_label(self):
        return Role(self.role).label if self.role in Role.values else "—"


class Event(Guarded):
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

    objects = GuardedQuerySet.as_manager()
    lock = Lock("history row", frozen=ALWAYS, advice="history only grows: record a new event instead.")
    keeps_history = False  # the history has no history of its own

    class Meta:
        ordering = ["at", "pk"]
        indexes = [models.Index(fields=["subject_type", "subject_id", "at"], name="event_subject_at")]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.subject_type.model} {self.subject_id}: {self.action} at {self.at:%Y-%m-%d %H:%M}"

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


class Seal(Guarded):
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

    objects = GuardedQuerySet.as_manager()
    lock = Lock("seal", frozen=ALWAYS, advice="the chain only grows.")
    keeps_history = False  # the chain is its own record

    class Meta:
        base_manager_name = "objects"
        ordering = ["sequence"]
        constraints = [models.UniqueConstraint(fields=["kind", "record_type", "record_id"],
                                               name="one_seal_per_signing")]
        indexes = [models.Index(fields=["record_type", "record_id"], name="seal_record")]

    def __str__(self):
        return f"seal #{self.sequence} {self.kind} {self.record_type} {self.record_id}"


class SealHead(models.Model):
    """The chain's last sequence and hash, in one row: locking it serialises appends (core.seals.lock_chain)."""

    sequence = models.PositiveBigIntegerField()
    chain_sha256 = models.CharField(max_length=64)

    def __str__(self):
        return f"chain head #{self.sequence}"
