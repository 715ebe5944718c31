"""For auditors: check a traveler or packet PDF (or a chain head printed on a packet) against the sealed records;
and, for the QA lead, export a job's whole record.

The uploaded PDF is hashed as it arrives (HashingUploadHandler): it is never written to disk or kept in memory
whole, and an upload past LEGWORK_CHECK_MAX_BYTES is read to its end and discarded.
"""

import hashlib
import tempfile

from django import forms
from django.conf import settings
from django.core.files.uploadedfile import UploadedFile
from django.core.files.uploadhandler import FileUploadHandler, StopUpload
from django.http import FileResponse
from django.shortcuts import render
from django.utils import timezone
from django.views.decorators.csrf import csrf_exempt, csrf_protect
from django.views.decorators.http import require_http_methods, require_safe

from core import seals
from core.models import Seal
from core.roles import role_required
from core.visibility import get_visible_or_404
from inspections import export
from inspections.models import Job, JobPacket, PacketState, Traveler


class HashedUpload(UploadedFile):
    """What is left of an upload once hashed: its name, size and SHA-256 (no content)."""

    def __init__(self, name, size, sha256, content_type):
        super().__init__(file=None, name=name, content_type=content_type, size=size)
        self.sha256 = sha256

    def open(self, mode=None):
        raise ValueError("A checked upload keeps no content.")

    def close(self):
        pass  # nothing was kept


class HashingUploadHandler(FileUploadHandler):
    """Hash the `document` field's bytes as they arrive; keep none of them."""

    chunk_size = 256 * 1024

    def __init__(self, request=None, limit=None):
        super().__init__(request)
        self.limit = limit
        self.too_large = False
        self.digest = self.size = None

    def new_file(self, field_name, *args, **kwargs):
        super().new_file(field_name, *args, **kwargs)
        self.digest, self.size = hashlib.sha256(), 0

    def receive_data_chunk(self, raw_data, start):
        self.size += len(raw_data)
        if self.size > self.limit:
            self.too_large = True
            raise StopUpload(connection_reset=False)  # read the rest of the request and throw it away
        if self.field_name == "document":
            self.digest.update(raw_data)
        return None

    def file_complete(self, file_size):
        if self.field_name != "document":
            return None
        return HashedUpload(self.file_name, self.size, self.digest.hexdigest(), self.content_type)


class DocumentForm(forms.Form):
    document = forms.FileField(label="Traveler or packet PDF",
                               help_text="The file as it was sent to you. It is hashed here and not kept.")


class AnchorForm(forms.Form):
    sequence = forms.IntegerField(label="Seal number", min_value=1)
    sha256 = forms.RegexField(label="SHA-256", regex=r"^\s*[0-9a-fA-F]{64}\s*$", max_length=80,
                              error_messages={"invalid": "A SHA-256 is 64 characters 0-9 and a-f."})


def _mb(n):
    return f"{n / (1024 * 1024):.0f} MB"


@role_required("records.verify")
@require_http_methods(["GET", "POST"])
@csrf_exempt  # the upload handler must be set before anything reads the body; CSRF is checked just below
def document_check(request):
    """Drop a PDF: does its SHA-256 match an issued traveler or a built packet, and do their seals hold?"""
    handler = HashingUploadHandler(request, limit=settings.LEGWORK_CHECK_MAX_BYTES)
    request.upload_handlers = [handler]
    return _document_check(request, handler)


@csrf_protect
def _document_check(request, handler):
    context = {"form": DocumentForm(), "anchor_form": AnchorForm(request.GET or None), "head": seals.head(),
               "limit": _mb(settings.LEGWORK_CHECK_MAX_BYTES)}
    status = 200
    if request.method == "POST":
        form = DocumentForm(request.POST, request.FILES)
        context["form"] = form
        if handler.too_large:
            form.add_error("document", f"The file is larger than {_mb(settings.LEGWORK_CHECK_MAX_BYTES)}, the "
                                       "limit for a check; no traveler or packet Legwork makes is that large.")
        if form.is_valid():
            upload = form.cleaned_data["document"]
            context.update(upload=upload, matches=_matches(upload.sha256))
        else:
            status = 400
    if context["anchor_form"].is_bound and context["anchor_form"].is_valid():
        data = context["anchor_form"].cleaned_data
        found = Seal.objects.filter(sequence=data["sequence"]).first()
        context["anchor"] = {"sequence": data["sequence"], "sha256": data["sha256"].strip().lower(), "seal": found,
                             "ok": found is not None and found.chain_sha256 == data["sha256"].strip().lower()}
    return render(request, "inspections/document_check.html", context, status=status)


def _matches(digest: str) -> list[dict]:
    """Every issued traveler and built packet whose stored file has this SHA-256, with its seals checked."""
    found = []
    for traveler in Traveler.objects.filter(sha256=digest).select_related("assembly__job", "generated_by"):
        newer = (Traveler.objects.filter(assembly_id=traveler.assembly_id, revision__gt=traveler.revision)
                 .order_by("-revision").first())
        found.append({"kind": "traveler", "record": traveler, "job": traveler.assembly.job,
                      "when": traveler.generated_at, "by": traveler.generated_by, "newer": newer,
                      **_sealed(traveler)})
    for packet in (JobPacket.objects.filter(sha256=digest, state=PacketState.DONE)
                   .select_related("job", "requested_by")):
        found.append({"kind": "packet", "record": packet, "job": packet.job, "when": packet.finished_at,
                      "by": packet.requested_by, "newer": None, **_sealed(packet)})
    return found


def _sealed(record) -> dict:
    seal = Seal.objects.filter(record_type=seals.label_of(type(record)), record_id=record.pk).first()
    problems = seals.check_record(record) if seal else []
    return {"seal": seal, "problems": [str(p) for p in problems]}


@role_required("records.export")
@require_safe
def job_export(request, pk):
    """The job's whole record as a zip: JSON tables and the stored files (docs/export-format.md)."""
    job = get_visible_or_404(request.user, Job, pk=pk)
    handle = tempfile.TemporaryFile()  # removed when the response closes it
    export.write_zip(job, handle, exported_by=request.user)
    handle.seek(0)
    name = f"{export.folder_name(job)}-{timezone.localtime():%Y%m%d-%H%M}.zip"
    return FileResponse(handle, as_attachment=True, filename=name, content_type="application/zip")
