"""Load the invented demo shop: Brannock Steelworks, its people, welders, procedures and three jobs.

Nothing here describes a real shop, structure or person. Safe to run again: when the demo shop is
already there it only adds demo accounts that are missing; `--reset` empties the database first.
"""

from django.core.management import BaseCommand, call_command
from django.db import transaction

from demo import scenario as demo


class Command(BaseCommand):
    help = "Load the invented demo shop (Brannock Steelworks) with one account per role."

    def add_arguments(self, parser):
        parser.add_argument("--reset", action="store_true", help="Empty the database before loading.")

    def handle(self, *args, reset=False, **options):
        if reset:
            call_command("flush", interactive=False, verbosity=0)
        with transaction.atomic():
            loaded = demo.load()
        self.stdout.write(self.style.SUCCESS("Demo shop loaded." if loaded else "Demo shop already loaded."))
        self.stdout.write("Sign in with one of these demo accounts (development password for all: "
                          f"{demo.PASSWORD}):")
        for username, name, role in demo.accounts():
            self.stdout.write(f"  {username:<10} {name:<18} {role}")
        self.stdout.write(f"The viewer sees only {demo.VIEWER_CUSTOMER}'s jobs (a customer's account).")
