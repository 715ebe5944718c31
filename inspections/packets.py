"""A job's packet: cover and index, each assembly's issued traveler, the WPSs used, the welders' qualification
summaries, and the open items, merged into one PDF with bookmarks.

Memory stays bounded: assemblies are gathered and rendered one at a time (each is an issued traveler with its
own revision, hash and "page X of Y", so it is never re-rendered: a traveler already issued for the same data
is reused as stored), every part is spooled to a temporary file, and pypdf merges the parts at the end. The
cover is rendered last, once the page numbers of the index are known.

start_packet() is what a view calls: it records the packet (queued) and enqueues build_packet_task after commit.
The task (django-tasks: inline in development and tests, `manage.py db_worker` in production) takes the packet's
primary key only and runs build_packet(pk), with progress saved after every step.
"""

from __future__ import annotations

import hashlib
import logging
import re
import shutil
import tempfile
from dataclasses import dataclass
from pathlib import Path

from django.core.files import File
from django.db import transaction
from django.db.models.functions import Lower
from django.utils import timezone
from django_tasks import task

from core import faults, seals
from core.errors import Refused
from core.pdf import render_pdf
from core.roles import require
from core.storage import files_or_nothing
from core.transitions import transition
from inspections import traveler as travelers
from inspections.models import Assembly, AssemblyState, JobPacket, PacketState
from inspections.services.numbering import next_in_job
from procedures import printing
from procedures.models import WPS

log = logging.getLogger(__name__)
COVER_TEMPLATE = "pdf/packet_cover.html"
MAX_ASSEMBLIES = 2000  # one packet; a bigger job is packed in parts (by state or piece marks)
ALL, BY_STATE, BY_MARKS = "all", "state", "marks"


def choose_assemblies(job, rule: str, state: str = "", marks: str = "") -> list[int]:
    """The ids of the job's assemblies a rule picks (every one, those in a state, or the piece marks typed: commas,
    spaces or lines between them), in one query; Refused, with the field to blame, when it picks none or an unknown
    mark. How a big job's packet is chosen without a checkbox per assembly."""
    rows = Assembly.objects.filter(job=job)
    if rule == BY_STATE:
        if state not in AssemblyState.values:
            raise Refused({"state": ["Choose a state."]}, code="choice")
        rows = rows.filter(state=state)
    elif rule == BY_MARKS:
        # piece marks are unique in a job whatever their case (AssemblyForm.clean_piece_mark): "b1" typed is B1.
        # Commas, semicolons and lines separate marks; spaces too, unless the job has a mark with that space in it
        # ("B 101"): both readings are looked up in one query.
        tokens = [" ".join(t.split()) for t in re.split(r"[,;\n]", marks) if t.strip()]
        if not tokens:
            raise Refused({"marks": ["Type the piece marks, separated by commas, spaces or lines."]}, code="choice")
        if len(tokens) > MAX_ASSEMBLIES:
            raise Refused({"marks": [f"At most {MAX_ASSEMBLIES:,} piece marks in one packet."]}, code="choice")
        candidates = {t.lower() for t in tokens} | {w.lower() for t in tokens for w in t.split()}
        found = dict(rows.annotate(mark=Lower("piece_mark")).filter(mark__in=candidates).values_list("mark", "pk"))
        typed = {}
        for token in tokens:
            for mark in [token] if token.lower() in found else token.split():
                typed.setdefault(mark.lower(), mark)
        wanted = list(typed)
        if len(wanted) > MAX_ASSEMBLIES:
            raise Refused({"marks": [f"At most {MAX_ASSEMBLIES:,} piece marks in one packet."]}, code="choice")
        unknown = [typed[m] for m in wanted if m not in found]
        if unknown:
            more = f" and {len(unknown) - 5} more" if len(unknown) > 5 else ""
            raise Refused({"marks": [f"Not on job {job.number}: {', '.join(unknown[:5])}{more}."]}, code="choice")
        return [found[m] for m in wanted]
    elif rule != ALL:
        raise Refused({"rule": ["Choose which assemblies go in the packet."]}, code="choice")
    ids = list(rows.order_by("piece_mark").values_list("pk", flat=True)[:MAX_ASSEMBLIES + 1])
    if not ids:
        raise Refused({"rule": ["No assembly of the job is in that state."]}, code="choice")
    if len(ids) > MAX_ASSEMBLIES:
        raise Refused({"rule": [f"That is more than {MAX_ASSEMBLIES:,} assemblies, the most one packet holds: "
                                "pack the job in parts, by state or by piece marks."]}, code="choice")
    return ids




def start_packet(job, assembly_pks, user) -> JobPacket:
    """Record a queued packet for these assemblies of the job and enqueue its build after commit."""
    require(user, "traveler.issue")
    wanted = list(dict.fromkeys(int(pk) for pk in assembly_pks))
    if not wanted:
        raise Refused("Choose at least one assembly.")
    found = set(Assembly.objects.filter(job=job, pk__in=wanted).values_list("pk", flat=True))
    if found != set(wanted):
        raise Refused("Some of the assemblies chosen are not on this job.")
    order = {pk: mark for pk, mark in Assembly.objects.filter(pk__in=wanted).values_list("pk", "piece_mark")}
    wanted.sort(key=lambda pk: order[pk])
    with transaction.atomic():
        number = next_in_job(job, JobPacket.objects.filter(job=job))  # locks the job row: one request at a time
        waiting = [p for p in JobPacket.objects.filter(job=job, state__in=[PacketState.QUEUED, PacketState.RUNNING])
                   if list(p.assembly_pks) == wanted]
        if waiting:  # "Build packet" pressed twice: the packet already on its way, not a second one
            return waiting[0]
        packet = JobPacket(job=job, document_number=f"PKT-{job.number}-{number:03d}-{timezone.now():%Y%m%d%H%M%S}",
                           assembly_pks=wanted, requested_by=user)
        packet.save(user=user)
        # Enqueue only once the packet row is committed: a worker must find it (STYLE.md, pretix's rule).
        transaction.on_commit(lambda: _enqueue(packet.pk))
    return packet


# --- packet steps: queued -> running -> done | failed, each through core.transitions ---------------------------

def start(packet, total: int):
    """queued -> running, with the number of steps the progress bar counts (a retried task finds it running)."""
    return transition(packet, allowed_from={PacketState.QUEUED}, to=PacketState.RUNNING, reason="Build started",
                      started_at=timezone.now(), progress_total=total, progress_done=0, step="Starting")


def advance(packet, done: int, step: str):
    """Record progress while running (the page polls it); progress is not history, so no row is written."""
    with transaction.atomic():
        locked = JobPacket.objects.select_for_update().get(pk=packet.pk)
        if locked.state != PacketState.RUNNING:
            raise Refused(f"{locked} is {locked.get_state_display().lower()}, not building.", code="state")
        packet.progress_done, packet.step = min(done, locked.progress_total), step[:120]
        JobPacket.objects.filter(pk=packet.pk).update(progress_done=packet.progress_done, step=packet.step)


def finish(packet, file, sha256: str, pages: int, index: list):
    """running -> done: the file is stored once and never replaced, and sealed in the same transaction.

    The packet row is locked before the chain: no step that seals first locks a packet, so the order is safe,
    and the file (which can be large) is hashed before the chain lock is taken (core.seals)."""
    with transaction.atomic():
        built = transition(packet, allowed_from={PacketState.RUNNING}, to=PacketState.DONE, reason="Built",
                           file=file, sha256=sha256, pages=pages, index=index, progress_done=packet.progress_total,
                           step="Every part merged into one file", finished_at=timezone.now())
        seals.seal(built, "packet.built")
    return built


def fail(packet, message: str):
    """queued | running -> failed, with what went wrong in words."""
    return transition(packet, allowed_from={PacketState.QUEUED, PacketState.RUNNING}, to=PacketState.FAILED,
                      reason=message[:2000], error=message[:2000], step="Failed", finished_at=timezone.now())


def _enqueue(pk):
    result = build_packet_task.enqueue(pk)
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


@task()
def build_packet_task(packet_pk: int) -> int:
    """Build one queued job packet; returns the packet's pk (its state says done or failed)."""
    return build_packet(packet_pk).pk


def build_packet(packet_pk: int) -> JobPacket:
    """Build a queued packet; on any failure the packet says so (failed, with the error) instead of hanging."""
    packet = JobPacket.objects.select_related("job__customer", "requested_by").get(pk=packet_pk)
    try:
        start(packet, total=len(packet.assembly_pks) + 3)  # each assembly, the WPSs, the welders, cover and merge
    except Refused:
        return packet  # a retried task finds it running or done: nothing to do
    directory = Path(tempfile.mkdtemp(prefix="legwork-packet-"))
    try:
        _build(packet, directory)
    except Exception as exc:  # noqa: BLE001 - any failure must reach the page, never leave it "building"
        log.exception("Packet %s failed", packet.pk)
        reason = faults.storage_problem(exc)  # a full disk is said in words, without the server's paths
        fail(packet, f"{reason} The packet was not stored; build it again later." if reason
             else f"{type(exc).__name__}: {exc}")
    finally:
        shutil.rmtree(directory, ignore_errors=True)
    packet.refresh_from_db()
    return packet


def _build(packet: JobPacket, directory: Path):
    user = packet.requested_by
    paper = travelers.job_paper(packet.job)
    pks = list(packet.assembly_pks)
    parts: list[Part] = []
    wps_pks, welder_pks, open_items, rows = {}, {}, [], []
    heats, lots = {}, {}  # the packet's summary of material: printed heat or lot -> where used
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
                     "open": len(snapshot["open_items"]), "released": snapshot["assembly"]["released"]})
        for wps in snapshot["wps_used"]:
            wps_pks[wps["pk"]] = wps
        for welder in snapshot["welders_used"]:
            welder_pks[welder["pk"]] = welder
        open_items += [f"{mark}: {item}" for item in snapshot["open_items"]]
        _note_materials(heats, lots, mark, snapshot)
        advance(packet, done, f"Traveler {mark} ({done} of {len(pks)})")
        del snapshot  # one assembly's records in memory at a time

    for wps in WPS.objects.filter(pk__in=wps_pks).order_by("number", "revision"):
        rendered = render_pdf("pdf/wps.html", printing.wps_document(wps), f"wps-{wps.pk}.pdf", paper=paper)
        parts.append(Part(f"WPS {wps.number} rev {wps.revision}", _spool(directory, f"wps-{wps.pk}.pdf",
                                                                         rendered.content),
                          travelers.page_count(rendered.content), "wps"))
    advance(packet, len(pks) + 1, "WPSs")

    for welder_pk in sorted(welder_pks, key=lambda pk: welder_pks[pk]["stamp"]):
        content = _welder_summary(welder_pk, packet.job, paper)
        parts.append(Part(f"Welder {welder_pks[welder_pk]['stamp']} {welder_pks[welder_pk]['name']}: "
                          "qualification summary", _spool(directory, f"welder-{welder_pk}.pdf", content),
                          travelers.page_count(content), "welder"))
    advance(packet, len(pks) + 2, "Welder qualification summaries")

    # The record chain's head as the packet is built: a customer holding the packet holds this anchor, so a
    # later rewrite of the chain before it shows (`manage.py verify_records --anchor SEQUENCE:HASH`).
    released = [r for r in rows if r["released"]]
    context = {"packet": packet, "job": packet.job, "rows": rows, "open_items": open_items, "paper": paper,
               "requested_by": travelers._person(user), "released": len(released),
               "not_released": [r["piece_mark"] for r in rows if not r["released"]], "chain_head": seals.head(),
               "heats": sorted(heats.items()), "lots": sorted(lots.items())}
    rendered = render_pdf(COVER_TEMPLATE, {**context, "part": "open_items"}, "open-items.pdf", paper=paper)
    parts.append(Part("Open items", _spool(directory, "open-items.pdf", rendered.content),
                      travelers.page_count(rendered.content), "open_items"))

    cover, index = _cover(context, parts)
    path, sha256, pages = _merge(directory, cover, parts)
    with path.open("rb") as handle, files_or_nothing():  # no stored file without its finished packet row
        finish(packet, File(handle, name=packet.filename), sha256, pages, index)


def _note_materials(heats, lots, mark, snapshot):
    """The heats of the assembly's parts and the filler lots of its welds, as its traveler printed them."""
    for part in snapshot.get("parts", []):
        if part["heat"]:
            heats.setdefault(part["heat"], []).append(f"{mark}/{part['mark']}")
    for weld in snapshot["welds"]:
        if weld["filler"]:
            lots.setdefault(weld["filler"], []).append(f"{mark}/{weld['mark']}")


def _welder_summary(welder_pk, job, paper=None) -> bytes:
    """The welder's qualification summary as the welder pages print it (procedures.printing); production welds on
    other customers' jobs are shown without their job (the packet goes to this job's customer)."""
    welder = printing.welder_with_records(welder_pk, continuity=False)
    entries, total = printing.continuity_evidence(welder)
    context = printing.welder_context(welder, continuity=entries)
    context["continuity_total"] = total
    context["continuity"] = [(entry, url, hidden or bool(entry.weld_used and entry.weld_used.assembly.job.customer_id
                                                          != job.customer_id))
                             for entry, url, hidden in context["continuity"]]
    return render_pdf("pdf/welder_summary.html", context, f"welder-{welder_pk}.pdf", paper=paper).content


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
                              "cover.pdf", paper=context["paper"])
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
