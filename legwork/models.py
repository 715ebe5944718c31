"""The shop's people: one role each (legwork.roles decides what a role may do)."""

from django.contrib.auth.models import AbstractUser
from django.db import models

from legwork.roles import Role


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
