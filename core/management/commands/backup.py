"""Write one consistent backup archive (database snapshot, every media file, a manifest) while Legwork runs."""

from django.core.management import BaseCommand, CommandError

from core import archive


class Command(BaseCommand):
    help = "Back up the database and the media files into one archive with a manifest of SHA-256 sums."

    def add_arguments(self, parser):
        parser.add_argument("--output", required=True, help="The archive to write, e.g. legwork-2026-12-05.tar")

    def handle(self, *args, output, **options):
        try:
            manifest = archive.backup(output)
        except archive.ArchiveError as exc:
            raise CommandError(str(exc)) from None
        rows = sum(manifest["tables"].values())
        head = manifest["chain_head"]
        self.stdout.write(self.style.SUCCESS(
            f"Backed up {manifest['database']['vendor']} ({rows} rows in {len(manifest['tables'])} tables) and "
            f"{manifest['media_files']} media files to {output}"
            + (f"; record chain head #{head['sequence']} {head['sha256']}." if head else ".")))
        self.stdout.write("Keep a copy off this machine. Check it with: manage.py restore --check " + output)
