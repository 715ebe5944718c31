"""Write one job's whole record (JSON tables and stored files) to a zip, in the layout of docs/export-format.md."""

from pathlib import Path

from django.core.management import BaseCommand, CommandError

from inspections import export
from inspections.models import Job


class Command(BaseCommand):
    help = "Export a job's whole record as JSON plus its files (docs/export-format.md)."

    def add_arguments(self, parser):
        parser.add_argument("job", help="The job number, e.g. J-2401")
        parser.add_argument("--output", help="The zip to write (default: legwork-job-<number>.zip here)")

    def handle(self, *args, job, output=None, **options):
        found = Job.objects.filter(number=job).first()
        if found is None:
            raise CommandError(f"No job numbered {job!r}.")
        path = Path(output or f"{export.folder_name(found)}.zip")
        if path.exists():
            raise CommandError(f"{path} exists; name another file or remove it first.")
        partial = path.with_name(path.name + ".partial")
        try:
            with partial.open("wb") as handle:
                description = export.write_zip(found, handle)
            partial.rename(path)
        finally:
            partial.unlink(missing_ok=True)
        rows = sum(table["rows"] for table in description["tables"])
        self.stdout.write(self.style.SUCCESS(
            f"Exported job {found.number}: {rows} rows in {len(description['tables'])} tables and "
            f"{len(description['files'])} files to {path}."))
        if description["missing_files"]:
            self.stderr.write(f"{len(description['missing_files'])} stored files named by the records are missing "
                              f"(listed in export.json): {', '.join(description['missing_files'][:5])}")
