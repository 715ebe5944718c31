from django.apps import AppConfig
from django.db.models.signals import post_migrate


class CoreConfig(AppConfig):
    """What every part of Legwork shares: people and roles, units, quantity fields, history, PDFs."""

    name = "core"
    verbose_name = "People, roles and history"

    def ready(self):
        from core import checks, locking, lookups  # noqa: F401 - checks and lookups register themselves

        locking.connect_m2m_guards(locking.guarded_models())
        post_migrate.connect(_install_triggers, sender=self, dispatch_uid="legwork_install_triggers")


def _install_triggers(using="default", **kwargs):
    """After every migrate (and flush): the record-lock triggers, again (core.triggers explains why)."""
    from django.db import connections

    from core import triggers

    triggers.install(connections[using])
