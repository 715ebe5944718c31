from django.apps import AppConfig


class InspectionsConfig(AppConfig):
    name = "inspections"
    verbose_name = "Jobs, assemblies and inspections"

    def ready(self):
        from inspections import uses

        uses.connect()
