"""A client's criteria set, derived from a built-in one (inspections.criteria); versioned and never edited."""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock


class ClientCriteriaSet(Guarded):
    key = models.SlugField(max_length=60, help_text="e.g. acme-bridge-static")
    version = models.PositiveIntegerField(default=1)
    title = models.CharField(max_length=120)
    base_key = models.CharField(max_length=60, help_text="The built-in set it was derived from")
    definition = models.JSONField(help_text="The whole set as inspections.criteria serialises it")
    signed_by_engineer = models.CharField(max_length=120, blank=True,
                                          help_text="Required when any limit is looser than the base set's")
    created_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    created_at = models.DateTimeField(default=timezone.now)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("client criteria set", frozen=ALWAYS, name=("key", " v", "version"),
                advice="verdicts name it; derive a new version.")

    class Meta:
        ordering = ["key", "-version"]
        constraints = [models.UniqueConstraint(fields=["key", "version"], name="client_criteria_key_version")]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.title} ({self.key} v{self.version})"

    def get_absolute_url(self):
        return reverse("inspections:criteria_client_detail", args=[self.pk])

    def criteria_set(self):
        """The stored set as inspections.criteria reads it."""
        from inspections.criteria import from_dict

        return from_dict(self.definition)
