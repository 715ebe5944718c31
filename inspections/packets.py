"""A job's packet: cover and index, each assembly's issued traveler, the WPSs used, the welders' qualification
summaries, and the open items, merged into one PDF with bookmarks.

Memory stays bounded: assemblies are gathered and rendered one at a time (each is an issued traveler with its
own revision, hash and "page X of Y", so it is never re-rendered: a traveler already issued for the same data
is reused as stored), every part is spooled to a temporary file, and pypdf merges the parts at the end. The
cover is rendered last, once the page numbers of the index are known.

start_packet() is what a view calls: it records the packet (queued) and enqueues the task after commit.
build_packet(pk) is what the task runs (inspections.tasks), with progress saved after every step.
"""

from __future__ import annotations

import hashlib
import logging
import shutil
import tempfile
from dataclasses import dataclass
from pathlib import Path

from django.core.files import File
from django.db import transaction
from django.utils import timezone

from inspections import traveler as travelers
from inspections.models import Assembly, JobPacket, PacketState
from inspections.models.traveler import PacketStateError
from legwork.pdf import render_pdf
from legwork.roles import require

log = logging.getLogger(__name__)
COVER_TEMPLATE = "pdf/packet_cover.html"


class PacketError(ValueError):
    """A packet that cannot be started as asked (no assemblies, assemblies of another job)."""


def start_packet(job, assembly_pks, user) -> JobPacket:
    """Record a queued packet for these assemblies of the job and enqueue its build after commit."""
    from inspections.tasks import build_packet_task

    require(user, "traveler.issue")
    wanted = list(dict.fromkeys(int(pk) for pk in assembly_pks))
    if not wanted:
        raise PacketError("Choose at least one assembly.")
    found = set(Assembly.objects.filter(job=job, pk__in=wanted).values_list("pk", flat=True))
    if found != set(wanted):
        raise PacketError("Some of the assemblies chosen are not on this job.")
    order = {pk: mark for pk, mark in Assembly.objects.filter(pk__in=wanted).values_list("pk", "piece_mark")}
    wanted.sort(key=lambda pk: order[pk])
    with transaction.atomic():
        count = JobPacket.objects.filter(job=job).count()
        packet = JobPacket.objects.create(job=job, document_number=f"PKT-{job.number}-{count + 1:03d}-"
                                          f"{timezone.now():%Y%m%d%H%M%S}", assembly_pks=wanted,
                                          requested_by=user)
        # Enqueue only once the packet row is committed: a worker must find it (STYLE.md, pretix's rule).
        transaction.on_commit(lambda: _enqueue(packet.pk, build_packet_task))
    return packet


def _enqueue(pk, task):
    result = task.enqueue(pk)
    # The immediate backend has already run it; the database backend gives the id the worker will use.
    JobPacket.objects.filter(pk=pk, task_id="").update(task_id=str(result.id)[:64])


@dataclass
class Part:
    title: str
    path: Path
    pages: int
    kind: str  # "traveler", "wps", "welder", "open_items"
    first_page: int = 0


def _spool(directory: Path, name: str, content: bytes) -> Path:
    path = directory / name
    path.write_bytes(content)
    return path


def build_packet(packet_pk: int) -> JobPacket:
    """Build a queued packet; on any failure the packet says so (failed, with the error) instead of hanging."""
    packet = JobPacket.objects.select_related("job", "requested_by").get(pk=packet_pk)
    if packet.state != PacketState.QUEUED:
        return packet  # a retried task finds it running or done: nothing to do
    directory = Path(tempfile.mkdtemp(prefix="legwork-packet-"))
    try:
        _build(packet, directory)
    except PacketStateError:
        raise
    except Exception as exc:  # noqa: BLE001 - any failure must reach the page, never leave it "building"
        log.exception("Packet %s failed", packet.pk)
        packet.fail(f"{type(exc).__name__}: {exc}")
    finally:
        shutil.rmtree(directory, ignore_errors=True)
    packet.refresh_from_db()
    return packet


def _build(packet: JobPacket, directory: Path):
    from procedures.models import WPS

    user = packet.requested_by
    pks = list(packet.assembly_pks)
    packet.start(total=len(pks) + 3)  # each assembly, the WPSs, the welder summaries, cover and merge
    parts: list[Part] = []
    wps_pks, welder_pks, open_items, rows = {}, {}, [], []
    for done, pk in enumerate(pks, start=1):
        assembly = Assembly.objects.select_related("job").get(pk=pk)
        snapshot = travelers.gather(pk)
        traveler, _created = travelers.issue(assembly, user, snapshot=snapshot)
        packet.travelers.add(traveler)
        path = directory / f"{done:04d}-traveler.pdf"
        with traveler.file.open("rb") as source, path.open("wb") as target:
            shutil.copyfileobj(source, target)
        mark = snapshot["assembly"]["piece_mark"]
        parts.append(Part(f"Traveler {mark} ({traveler.document_number})", path, traveler.pages, "traveler"))
        rows.append({"piece_mark": mark, "document_number": traveler.document_number, "sha256": traveler.sha256,
                     "state": snapshot["assembly"]["state"], "welds": len(snapshot["welds"]),
                     "open": len(snapshot["open_items"])})
        for wps in snapshot["wps_used"]:
            wps_pks[wps["pk"]] = wps
        for welder in snapshot["welders_used"]:
            welder_pks[welder["pk"]] = welder
        open_items += [f"{mark}: {item}" for item in snapshot["open_items"]]
        packet.advance(done, f"Traveler {mark} ({done} of {len(pks)})")
        del snapshot  # one assembly's records in memory at a time

    from procedures.views.wps import wps_snapshot  # the WPS print of the procedures pages

    for wps in WPS.objects.filter(pk__in=wps_pks).order_by("number", "revision"):
        rendered = render_pdf("pdf/wps.html", wps_snapshot(wps), f"wps-{wps.pk}.pdf")
        parts.append(Part(f"WPS {wps.number} rev {wps.revision}", _spool(directory, f"wps-{wps.pk}.pdf",
                                                                         rendered.content),
                          travelers.page_count(rendered.content), "wps"))
    packet.advance(len(pks) + 1, "WPSs")

    for welder_pk in sorted(welder_pks, key=lambda pk: welder_pks[pk]["stamp"]):
        content = _welder_summary(welder_pk)
        if content is None:
            continue
        parts.append(Part(f"Welder {welder_pks[welder_pk]['stamp']} {welder_pks[welder_pk]['name']}: "
                          "qualification summary", _spool(directory, f"welder-{welder_pk}.pdf", content),
                          travelers.page_count(content), "welder"))
    packet.advance(len(pks) + 2, "Welder qualification summaries")

    context = {"packet": packet, "job": packet.job, "rows": rows, "open_items": open_items,
               "requested_by": travelers._person(user)}
    rendered = render_pdf(COVER_TEMPLATE, {**context, "part": "open_items"}, "open-items.pdf")
    parts.append(Part("Open items", _spool(directory, "open-items.pdf", rendered.content),
                      travelers.page_count(rendered.content), "open_items"))

    cover, index = _cover(context, parts)
    path, sha256, pages = _merge(directory, cover, parts)
    with path.open("rb") as handle:
        packet.finish(File(handle, name=packet.filename), sha256, pages, index)


def _welder_summary(welder_pk) -> bytes | None:
    """The welder's qualification summary as the welder pages print it (procedures.views.welders)."""
    try:
        from procedures.views.welders import _detail_context, _welder_with_records
    except ImportError:
        return None
    welder = _welder_with_records(welder_pk)
    context = _detail_context(welder)
    context.pop("check_form", None)
    return render_pdf("pdf/welder_summary.html", context, f"welder-{welder_pk}.pdf").content


def _cover(context, parts) -> tuple[bytes, list]:
    """Render the cover and index; the index's page numbers depend on the cover's own length, so render again
    in the rare case that the first guess was wrong (at most three passes). The guess comes from the number
    of rows, so a large packet's cover is usually rendered once instead of twice."""
    cover_pages = _cover_pages_guess(len(parts), len(context["rows"]))
    for _attempt in range(3):
        page = cover_pages + 1
        index = []
        for part in parts:
            part.first_page = page
            index.append({"title": part.title, "kind": part.kind, "first_page": page, "pages": part.pages})
            page += part.pages
        rendered = render_pdf(COVER_TEMPLATE, {**context, "part": "cover", "index": index, "total_pages": page - 1},
                              "cover.pdf")
        actual = travelers.page_count(rendered.content)
        if actual == cover_pages:
            return rendered.content, [{"title": "Cover and index", "kind": "cover", "first_page": 1,
                                       "pages": cover_pages}, *index]
        cover_pages = actual
    raise RuntimeError("The packet index would not settle on a page count.")


def _cover_pages_guess(index_rows: int, traveler_rows: int) -> int:
    """Letter portrait, 8.5 pt, measured: the cover box and headings take about 100 mm, an index row about
    5.5 mm and a traveler row (its SHA-256 wraps) about 10 mm, of some 240 mm per page. Only a first guess:
    _cover checks it against the rendered page count."""
    height = 100 + index_rows * 5.5 + traveler_rows * 10
    return max(1, -(-int(height) // 240))


def _merge(directory: Path, cover: bytes, parts: list[Part]) -> tuple[Path, str, int]:
    from pypdf import PdfReader, PdfWriter

    writer = PdfWriter()
    cover_path = _spool(directory, "cover.pdf", cover)
    writer.append(PdfReader(cover_path), outline_item="Cover and index")
    for part in parts:
        writer.append(PdfReader(part.path), outline_item=part.title)
    writer.add_metadata({"/Title": "Job packet", "/Producer": travelers.generator_version()})
    out = directory / "packet.pdf"
    with out.open("wb") as handle:
        writer.write(handle)
    pages = len(writer.pages)
    digest = hashlib.sha256()
    with out.open("rb") as handle:
        for chunk in iter(lambda: handle.read(1 << 20), b""):
            digest.update(chunk)
    return out, digest.hexdigest(), pages
