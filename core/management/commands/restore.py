"""Restore a backup archive: every member checked against the manifest first, then database and media.

Stop Legwork (the web server and the db_worker) first. The target database and media folder must be empty
(a freshly migrated database is empty) unless --force is given.
"""

from django.core.management import BaseCommand, CommandError

from core import archive as archives
from core import seals


class Command(BaseCommand):
    help = "Restore the database and media files from a backup archive (checked in full before anything changes)."

    def add_arguments(self, parser):
        parser.add_argument("archive", help="The backup archive (manage.py backup --output ...)")
        parser.add_argument("--check", action="store_true",
                            help="Only check the archive against its manifest; change nothing.")
        parser.add_argument("--force", action="store_true",
                            help="Replace a target that holds records (the media folder and an SQLite file are "
                                 "moved aside, not deleted; a PostgreSQL database is replaced).")

    def handle(self, *args, archive: str, check=False, force=False, **options):
        try:
            manifest = archives.check(archive)
            self.stdout.write(f"Archive checked: {len(manifest['members'])} members match the manifest "
                              f"(backup of {manifest['created_at']}, Legwork {manifest['legwork_version']}, "
                              f"{manifest['database']['vendor']}).")
            if check:
                return
            result = archives.restore(archive, force=force)
        except archives.ArchiveError as exc:
            raise CommandError(str(exc)) from None
        for path in result.moved_aside:
            self.stdout.write(f"Moved aside: {path}")
        self.stdout.write(self.style.SUCCESS(
            f"Restored {result.rows} rows (every table's count as in the backup) and {result.files} media files."))
        if result.pending_migrations:
            self.stdout.write(f"This Legwork has {len(result.pending_migrations)} migrations the backup predates: "
                              "run manage.py migrate, then manage.py verify_records.")
            return
        report = seals.verify()
        if not report.ok:
            raise CommandError(f"Restored, but the records do not verify: {report.problems[0]}")
        self.stdout.write(f"Records verified: {report.seals} seals and {report.files} stored files intact.")
