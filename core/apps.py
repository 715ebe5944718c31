from django.apps import AppConfig


class CoreConfig(AppConfig):
    """What every part of Legwork shares: people and roles, units, quantity fields, history, PDFs."""

    name = "core"
    verbose_name = "People, roles and history"

    def ready(self):
        from core import lookups  # noqa: F401 - registers the integer `in` lookup that ignores impossible ids
