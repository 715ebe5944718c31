from django.apps import AppConfig


class LegworkConfig(AppConfig):
    name = "legwork"
    verbose_name = "Legwork accounts"
