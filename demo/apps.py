from django.apps import AppConfig


class DemoConfig(AppConfig):
    """The invented demo shop (Brannock Steelworks) and the command that loads it."""

    name = "demo"
    verbose_name = "Demo shop"
