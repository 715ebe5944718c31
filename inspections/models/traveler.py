"""Issued travelers (one PDF per assembly revision) and job packets built in the background.

An issued traveler is a stored file with its SHA-256, never rendered again in place: printing it again
serves the same bytes, and issuing after a change writes a new revision beside it. A packet is built
by a background task (inspections.packets) and moves queued -> running -> done | failed (inspections.packets,
each step through core.transitions); once done its file, like a traveler's, is never replaced.
"""

from django.conf import settings
from django.db import models
from django.urls import reverse
from django.utils import timezone

from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, Move


def traveler_path(traveler, filename):
    return f"travelers/{timezone.now():%Y/%m}/{filename}"


def packet_path(packet, filename):
    return f"packets/{timezone.now():%Y/%m}/{filename}"


class Traveler(Guarded):
    """One issued revision of an assembly's traveler: the PDF, its hash, and the data it was made from."""

    assembly = models.ForeignKey("inspections.Assembly", on_delete=models.PROTECT, related_name="travelers")
    revision = models.PositiveIntegerField()
    document_number = models.CharField(max_length=80, unique=True)
    file = models.FileField(upload_to=traveler_path)
    sha256 = models.CharField("SHA-256 of the file", max_length=64)
    snapshot_sha256 = models.CharField(
        "SHA-256 of the data", max_length=64,
        help_text="Fingerprint of the gathered records (printed on the traveler); equal data, equal fingerprint")
    pages = models.PositiveIntegerField()
    size_bytes = models.PositiveIntegerField()
    generator_version = models.CharField(max_length=80)
    generated_at = models.DateTimeField(default=timezone.now)
    generated_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    snapshot = models.JSONField(help_text="Everything the PDF shows, as gathered when it was issued")

    objects = GuardedQuerySet.as_manager()
    lock = Lock("traveler", frozen=ALWAYS, name=("document_number",),
                advice="customers hold copies of it; issue a new revision.")

    class Meta:
        ordering = ["assembly", "-revision"]
        constraints = [models.UniqueConstraint(fields=["assembly", "revision"], name="traveler_revision_unique")]
        base_manager_name = "objects"

    def __str__(self):
        return self.document_number

    def get_absolute_url(self):
        return reverse("inspections:traveler_download", args=[self.pk])

    @property
    def filename(self):
        return f"{self.document_number}.pdf"


class PacketState(models.TextChoices):
    QUEUED = "queued", "Queued"
    RUNNING = "running", "Building"
    DONE = "done", "Done"
    FAILED = "failed", "Failed"


class JobPacket(Guarded):
    """A job's packet: cover, index, each assembly's issued traveler, the WPSs and welder summaries, open items.

    Built by its steps (inspections.packets); once done or failed it never changes (the worker's task id aside).
    """

    job = models.ForeignKey("inspections.Job", on_delete=models.PROTECT, related_name="packets")
    document_number = models.CharField(max_length=80, unique=True)
    assembly_pks = models.JSONField(help_text="The assemblies chosen, in packet order, as chosen")
    travelers = models.ManyToManyField(Traveler, blank=True, related_name="packets",
                                       help_text="The traveler revisions the packet holds")
    state = models.CharField(max_length=8, choices=PacketState.choices, default=PacketState.QUEUED, editable=False)
    progress_done = models.PositiveIntegerField(default=0, editable=False)
    progress_total = models.PositiveIntegerField(default=0, editable=False)
    step = models.CharField(max_length=120, blank=True, editable=False, help_text="What the worker is doing now")
    file = models.FileField(upload_to=packet_path, blank=True, editable=False)
    sha256 = models.CharField(max_length=64, blank=True, editable=False)
    pages = models.PositiveIntegerField(null=True, blank=True, editable=False)
    index = models.JSONField(default=list, editable=False, help_text="[{title, first_page, pages}] as printed")
    error = models.TextField(blank=True, editable=False)
    task_id = models.CharField(max_length=64, blank=True, editable=False)
    requested_by = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    requested_at = models.DateTimeField(default=timezone.now, editable=False)
    started_at = models.DateTimeField(null=True, blank=True, editable=False)
    finished_at = models.DateTimeField(null=True, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock(
        "packet", state="state", frozen=(PacketState.DONE, PacketState.FAILED), name=("document_number",),
        free=("task_id",), advice="build a new packet.",
        moves=[Move(PacketState.QUEUED, PacketState.RUNNING),
               Move(PacketState.RUNNING, PacketState.DONE), Move(PacketState.QUEUED, PacketState.FAILED),
               Move(PacketState.RUNNING, PacketState.FAILED)],
    )

    class Meta:
        ordering = ["-requested_at", "-pk"]
        base_manager_name = "objects"

    def __str__(self):
        return self.document_number

    def get_absolute_url(self):
        return reverse("inspections:packet_detail", args=[self.pk])

    @property
    def percent(self) -> int:
        if self.state == PacketState.DONE:
            return 100
        if not self.progress_total:
            return 0
        return min(99, int(100 * self.progress_done / self.progress_total))

    @property
    def finished(self) -> bool:
        return self.state in (PacketState.DONE, PacketState.FAILED)

    @property
    def filename(self):
        return f"{self.document_number}.pdf"
