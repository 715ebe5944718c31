"""`manage.py flush`, able to empty a database whose record-lock triggers refuse deletes.

SQLite empties tables with DELETE, which the triggers (core.triggers) refuse for signed records and history;
PostgreSQL's TRUNCATE does not fire them. Flushing destroys every record, signed or not, as dropping the database
does: the triggers are dropped for it and put back afterwards. Test cases that run in transactions
(TransactionTestCase, live-server tests) flush after each test through this command.
"""

from django.core.management.commands.flush import Command as DjangoFlush
from django.db import connections

from core import triggers


class Command(DjangoFlush):
    help = DjangoFlush.help + " Legwork's record-lock triggers are dropped for it and installed again."

    def handle(self, **options):
        if options["interactive"]:
            answer = input("This removes every record, signed ones and their history included, from the database "
                           f"'{options['database']}'. Type 'yes' to continue, or 'no' to cancel: ")
            if answer != "yes":
                self.stdout.write("Flush cancelled.")
                return
        connection = connections[options["database"]]
        triggers.drop(connection)
        try:
            super().handle(**{**options, "interactive": False})
        finally:
            triggers.install(connection)
