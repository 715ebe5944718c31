from django.apps import AppConfig


class ProceduresConfig(AppConfig):
    name = "procedures"
    verbose_name = "Procedures and welders"

    def ready(self):
        from procedures import continuity

        continuity.connect()
