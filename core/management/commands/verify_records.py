"""Recompute the record chain and every stored file's SHA-256; exit 1 naming the first record that does not match.

What is checked (core.seals.verify): each seal's content recomputed from the database and the stored files, its
own hashes, its link to the seal before; the chain head row; every record in a signed state has its seal; every
stored file with a recorded SHA-256 (photos, travelers, packets, qualification test reports). `--anchor` checks a
chain head printed on a packet cover ("seal #1234, SHA-256 ...") against the chain.
"""

import re

from django.core.management import BaseCommand, CommandError

from core import seals

ANCHOR = re.compile(r"^#?(\d+)[:=/ ]([0-9a-fA-F]{64})$")


def anchor(text):
    match = ANCHOR.match(text.strip())
    if not match:
        raise ValueError(text)
    return int(match.group(1)), match.group(2).lower()


anchor.__name__ = "SEQUENCE:SHA256"  # argparse names the type in its error message


class Command(BaseCommand):
    help = "Check every signed record, the record chain and every stored file; exit 1 at the first mismatch."

    def add_arguments(self, parser):
        parser.add_argument("--anchor", action="append", type=anchor, default=[], metavar="SEQUENCE:SHA256",
                            help="A chain head printed on a packet cover, e.g. 1234:3fa9... (may repeat)")
        parser.add_argument("--show", type=int, default=50, help="How many problems to list (default 50).")

    def handle(self, *args, anchor=(), show=50, **options):
        try:
            report = seals.verify(anchors=anchor)
        except OSError as exc:  # the disk or the object store could not be read: nothing was checked to the end
            raise CommandError(f"The stored files could not be read, so the records were not checked: {exc}") from None
        if report.ok:
            head = f"#{report.head[0]} {report.head[1]}" if report.head else "empty"
            self.stdout.write(self.style.SUCCESS(
                f"Records intact: {report.seals} seals checked (chain head {head}), "
                f"{report.files} stored files checked, every signed record sealed."))
            for sequence, digest in anchor:
                self.stdout.write(f"Printed chain head #{sequence} {digest} is in the chain.")
            return
        self.stderr.write(f"{len(report.problems)} problem(s) in {report.seals} seals and {report.files} files:")
        for problem in report.problems[:show]:
            self.stderr.write(f"  {problem}")
        if len(report.problems) > show:
            self.stderr.write(f"  ... and {len(report.problems) - show} more (--show N lists more)")
        raise CommandError(f"First record that does not match: {report.problems[0]}")
