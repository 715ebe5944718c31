"""An assembly's traveler: gather its records into a snapshot, render the snapshot to PDF, issue it once.

gather(pk) reads everything the traveler shows in a FIXED number of queries whatever the number of welds,
welders, inspections and photos, and returns a JSON-ready dict of words and numbers as printed (the
snapshot). render(snapshot, ...) turns it into a PDF through core.pdf and never queries the database
(it reads the photo thumbnails from storage). issue(assembly, user) stores the PDF as a new Traveler
revision when the data changed since the last one, and otherwise hands back the last one: an issued
traveler is never rendered again, so printing it again gives the same bytes.

The SHA-256 on the page and the SHA-256 of the file: a file cannot carry its own hash (writing the hash
changes the bytes). The traveler prints the SHA-256 of its DATA (the canonical JSON of the snapshot,
`fingerprint`), which names exactly what was recorded; the SHA-256 of the FILE is stored with the
revision, shown on the traveler list, sent as the X-Content-SHA256 header of the download and written to a
sidecar file (`<name>.pdf.sha256`, in `sha256sum -c` format) beside the PDF in media storage.
"""

from __future__ import annotations

import base64
import hashlib
import io
import json

from django.conf import settings
from django.core.files.base import ContentFile
from django.core.files.storage import default_storage
from django.urls import reverse
from django.utils import timezone

from core import seals
from core.notation import trade
from core.pdf import RenderedPDF, paper_for, render_pdf
from core.roles import require
from core.storage import files_or_nothing
from core.units import Length, format_length
from inspections import weld_symbols, wording
from inspections.models import Assembly, Inspection, InspectionStage, Photo, Weld
from inspections.models.traveler import Traveler
from inspections.services import capacity as capacities
from inspections.services import chain as proof
from inspections.services import trace
from inspections.services.assemblies import weld_statuses

GENERATOR = "legwork-traveler 4"  # bump when the layout or the gathered data changes meaning
TEMPLATE = "pdf/traveler.html"
PHOTO_MAX_PX = 360  # thumbnails are 320 px (inspections.photos); anything larger is shrunk before embedding
PHOTOS_MAX = 24  # more than this many photos: the newest are embedded, the rest listed by caption


def generator_version() -> str:
    import weasyprint

    return f"{GENERATOR} / WeasyPrint {weasyprint.__version__}"


def assembly_url(pk: int) -> str:
    """The absolute address of the assembly's tablet page in Legwork: the QR code's payload."""
    return settings.LEGWORK_BASE_URL.rstrip("/") + reverse("inspections:inspect_assembly", args=[pk])


# --- gather ----------------------------------------------------------------------------------------------------

def _len(value: Length | None, system: str) -> str:
    return format_length(value, system) if value is not None else ""


def _exact(value: Length | None) -> str | None:
    """A length as exact text with its unit, for the symbol (which formats it itself)."""
    return f"{value.mm} mm" if value is not None else None


def _person(user) -> str:
    if user is None:
        return ""
    name = user.get_full_name() or user.get_username()
    stamp = getattr(user, "stamp", "")
    return f"{name} ({stamp})" if stamp else name


def _inspector(inspection: Inspection) -> str:
    """The inspector's name with the credential the inspection was signed under (the stamp where none was)."""
    name = inspection.inspector.get_full_name() or inspection.inspector.get_username()
    credential = trace.printed_credential(inspection)
    return f"{name} ({credential})" if credential else name


def _day(value) -> str:
    if value is None:
        return ""
    if hasattr(value, "hour"):
        value = timezone.localdate(value)
    return value.isoformat()


def _criteria(job) -> dict:
    from inspections.criteria import resolve

    key, version = job.criteria_identity()
    try:
        cset = resolve(job.criteria_for_evaluation())
        return {"key": key, "version": version, "title": cset.title, "standard": cset.standard}
    except ValueError as exc:
        return {"key": key, "version": version, "title": job.criteria_label, "standard": f"unreadable: {exc}"}


def job_paper(job) -> str:
    """The paper the job's documents print on (core.pdf.paper_for: the shop's choice, else A4 for SI or ISO jobs
    and Letter for the rest)."""
    return paper_for(job.unit_system, _criteria(job)["standard"])


def _convention(job) -> str:
    """The drawing standard of the job's symbols: AWS A2.4 for AWS jobs in either unit system, ISO 2553 for ISO."""
    try:
        return weld_symbols.drawing_standard(job.criteria_for_evaluation())
    except ValueError:
        return weld_symbols.AWS if job.unit_system == "US" else weld_symbols.ISO


def _inspection(inspection: Inspection | None, system: str) -> dict | None:
    """An inspection as the traveler prints it: who, when, the verdict and what was recorded, in the table of
    observations' words (inspections.observations through Inspection.recorded)."""
    if inspection is None:
        return None
    return {"pk": inspection.pk, "accepted": inspection.accepted, "inspector": _inspector(inspection),
            "date": _day(inspection.inspected_at), "stage": inspection.get_stage_display(),
            "gauge": inspection.gauge_calibration.printed() if inspection.gauge_calibration else "",
            "recorded": [f"{label} {value}" for label, value in inspection.recorded(system)]}


def _capacity(weld: Weld, final: Inspection | None, system: str) -> dict | None:
    """Required strength against the available strength, as the calculation sheet has it (LRFD): the same service
    (inspections.services.capacity) and so the same filler metal rule, never a figure of its own."""
    if weld.required_strength is None or weld.joint_type != "fillet":
        return None
    design = capacities.capacity_for_weld(weld)
    row = {"mark": weld.mark, "required": design["required"] or "", "fexx": design["fexx"] or "",
           "specified": "", "as_inspected": "", "ratio": "", "ok": None, "note": "", "not_counted": [],
           "source": "AISC 360-16 J2.4, B3 (LRFD)", "limits": capacities.NOT_COUNTED}
    if design["error"]:
        row["note"] = trade(design["error"])
        return row
    row["specified"] = design["results"][0]["main"]["lrfd"]
    figure = design
    if final is not None:
        final.weld = weld
        row["not_counted"] = capacities.defects_not_counted(final)
        if capacities.found_undersize(final, weld):
            inspected = capacities.capacity_for_inspection(final)
            if inspected["error"]:
                row["note"] = trade(inspected["error"])
                return row
            row["as_inspected"] = inspected["results"][0]["main"]["lrfd"]
            figure = inspected
    row["ratio"], row["ok"] = figure["ratio"] or "", figure["ok"]
    _fexx, source = capacities.fexx_for_weld(weld)
    if "assumed" in source:
        row["note"] = f"Filler metal: {source}."
    return row


def _photo_rows(photos, weld_marks) -> list[dict]:
    rows = []
    for photo in photos:
        rows.append({"pk": photo.pk, "sha256": photo.sha256, "thumbnail": photo.thumbnail.name,
                     "caption": photo.caption,
                     "weld": weld_marks.get(photo.inspection.weld_id, ""),
                     "stage": photo.inspection.get_stage_display(), "date": _day(photo.uploaded_at)})
    return rows


def _exposure(weld, link) -> dict:
    """Consumable control beside the filler lot: each issue of the lot to the weld's welders covering its date
    (services.consumables.weld_exposures left them on the weld), and whether any flags it."""
    covering = getattr(weld, "_exposures", [])
    text = "; ".join(f"{j.issue.welder.stamp} from oven {j.issue.oven} "
                     f"{timezone.localtime(j.issue.taken_out_at):%Y-%m-%d %H:%M}, {j.status}" for j in covering)
    return {"exposure": text, "exposure_problem": bool(link.exposure)}


def gather(assembly_pk: int) -> dict:
    """Everything one assembly's traveler prints, in words, in a fixed number of queries (see the tests).

    The open items are the release blockers (inspections.services.chain, the same list release waits for), so a
    released traveler has none and one printed before release says what is still open."""
    assembly = (Assembly.objects.select_related("job__client_criteria", "job__customer", "released_by")
                .get(pk=assembly_pk))
    job = assembly.job
    system = job.unit_system
    iso = wording.throat_first(job)
    convention = _convention(job)
    welds = list(Weld.objects.filter(assembly=assembly).select_related("wps", "filler_lot")
                 .prefetch_related("welders").order_by("mark"))
    for weld in welds:
        weld.assembly = assembly  # the capacity service and the size words read the job from here
    weld_ids = [w.pk for w in welds]
    marks = {w.pk: w.mark for w in welds}
    statuses = weld_statuses(weld_ids)  # the release rules live there (services.assemblies)
    chains = proof.check_assembly(assembly, welds, statuses)  # WPS, welders (original and repairs), hold point
    fit_ups = {}
    for inspection in (Inspection.objects.current().filter(weld_id__in=weld_ids, stage=InspectionStage.FIT_UP)
                       .select_related("inspector", "credential", "gauge_calibration__gauge")
                       .order_by("weld_id", "-inspected_at", "-pk")):
        fit_ups.setdefault(inspection.weld_id, inspection)
    photos = list(Photo.objects.filter(inspection__weld_id__in=weld_ids)
                  .select_related("inspection").order_by("-uploaded_at", "-pk")[:PHOTOS_MAX + 1])

    rows, capacity, wps_used, welders_used = [], [], {}, {}
    for weld in welds:
        status = statuses[weld.pk]
        link = chains[weld.pk]
        welders = []
        for one in link.welders.checks:
            welder = one.welder
            welders_used[welder.pk] = {"pk": welder.pk, "stamp": welder.stamp, "name": welder.name}
            if weld.welded_on is None:
                # Undated welds are not judged on "today": that answer would change by itself from one day to
                # the next.
                welders.append({"stamp": welder.stamp, "name": welder.name, "allowed": None,
                                "reasons": ["No weld date recorded: qualification not judged."]})
                continue
            welders.append({"stamp": welder.stamp, "name": welder.name, "allowed": bool(one.allowed),
                            "reasons": list(one.reasons)})
        wps = weld.wps
        for used in [wps] + [item.repair.wps for item in link.repairs]:
            if used is not None:
                wps_used[used.pk] = {"pk": used.pk, "number": used.number, "revision": used.revision,
                                     "state": used.get_state_display(), "title": used.title}
        final = status.final
        ncrs = [{"number": n.number, "state": n.get_state_display(), "open": n.is_open,
                 "disposition": n.get_disposition_display() if n.disposition else ""} for n in status.ncrs]
        repairs = []
        for item in link.repairs:
            repair = item.repair
            for one in item.welders.checks:
                welders_used[one.welder.pk] = {"pk": one.welder.pk, "stamp": one.welder.stamp,
                                               "name": one.welder.name}
            repairs.append({"ncr": repair.ncr.number, "date": _day(repair.welded_on),
                            "wps": f"{repair.wps.number} rev {repair.wps.revision}", "wps_ok": item.wps.ok,
                            "lot": repair.filler_lot.lot_number if repair.filler_lot_id else "",
                            "welders": [{"stamp": c.welder.stamp, "allowed": bool(c.allowed)}
                                        for c in item.welders.checks]})
        result = "Not inspected"
        if final is not None:
            result = "Accepted" if final.accepted else ("Use as is (NCR)" if status.accepted_as_is else "Rejected")
        leg_drawn = weld.size_on_drawing or weld.throat is None
        row = {
            "pk": weld.pk, "mark": weld.mark, "joint": weld.get_joint_type_display(),
            "sides": weld.get_sides_display(), "position": weld.position,
            "size": wording.size_text(weld, system, iso),
            "length": wording.run_length(weld.length, system), "count": weld.count,
            "pitch": _len(weld.pitch, system),
            "symbol": {"sides": weld.sides, "size": _exact(weld.size) if leg_drawn else None,
                       "size2": _exact(weld.size2) if leg_drawn else None, "throat": _exact(weld.throat),
                       "length": _exact(weld.length), "pitch": _exact(weld.pitch), "all_around": weld.all_around,
                       "field_weld": weld.field_weld, "joint": weld.joint_type,
                       "tail": f"{wps.number}" if wps else ""},
            "wps": f"{wps.number} rev {wps.revision}" if wps else "", "wps_state": wps.state if wps else "",
            "wps_ok": bool(weld.welded_on is not None and link.wps.ok),
            "welded_on": _day(weld.welded_on), "welders": welders,
            "qualified": bool(welders) and all(w["allowed"] for w in welders),
            "fit_up": _inspection(fit_ups.get(weld.pk), system), "final": _inspection(final, system),
            "result": result, "released_ok": status.released_ok, "ncrs": ncrs, "repairs": repairs,
            "chain_ok": link.ok,
            "filler": weld.filler_lot.printed(system) if weld.filler_lot else "", "filler_problem": link.filler,
        }
        if weld.part1_id or weld.part2_id:  # only then: a traveler issued before parts keeps its fingerprint
            row["parts"] = " + ".join(p.mark for p in _joined(weld, chains))
        row.update(_exposure(weld, link))
        rows.append(row)
        cap = _capacity(weld, final, system)
        if cap is not None:
            capacity.append(cap)

    released = assembly.state == "released"
    blockers = [str(b) for b in proof.blockers_of(chains)]
    open_items, found_after_release = [], []
    if released:
        found_after_release = blockers  # release refused while any was listed: records changed since
    else:
        open_items = list(blockers)
        if not welds:
            open_items.append("The weld map is empty.")
        open_items.append(f"The assembly is not released ({assembly.get_state_display().lower()}).")

    fitted = [r for r in rows if r["fit_up"]]
    fit_ok = [r for r in fitted if r["fit_up"]["accepted"]]
    finals_ok = [r for r in rows if r["released_ok"]]
    chain_ok = [r for r in rows if r["chain_ok"]]
    hold_points = [
        {"name": "Fit-up", "status": (f"{len(fit_ok)} of {len(rows)} welds accepted; a hold point on this job"
                                      if job.fit_up_hold_point else
                                      f"{len(fitted)} of {len(rows)} welds signed; not a hold point on this job"),
         "by": _last_signers(r["fit_up"] for r in fitted),
         "done": (bool(rows) and len(fit_ok) == len(rows)) if job.fit_up_hold_point else True},
        {"name": "Final visual", "status": f"{len(finals_ok)} of {len(rows)} welds accepted",
         "by": _last_signers(r["final"] for r in rows if r["final"]),
         "done": bool(rows) and len(finals_ok) == len(rows)},
        {"name": "Proof chain", "status": f"{len(chain_ok)} of {len(rows)} welds: WPS, welders, inspection hold",
         "by": "", "done": bool(rows) and len(chain_ok) == len(rows)},
        {"name": "Release", "status": assembly.get_state_display(),
         "by": (f"{_person(assembly.released_by)}, {_day(assembly.released_at)}" if assembly.released_by else ""),
         "done": released},
    ]
    cautions = []
    if not released:
        count = len(open_items)
        cautions.append(f"NOT RELEASED: {count} open item{'s' if count != 1 else ''} listed on this traveler "
                        "must be closed before release; it records work in progress and is not a release "
                        "document.")
    if found_after_release:
        cautions.append("Released, but the records now show: " + " ".join(found_after_release))
    if any(r["final"] and not r["final"]["accepted"] for r in rows):
        cautions.append("A weld's current final inspection rejected it: see the NCR column.")
    if capacity:
        cautions.append("Strength figures are AISC 360-16 J2 available strengths (LRFD) for the engineer of "
                        "record to review; they do not approve a weld.")
    snapshot = {
        "job": {"pk": job.pk, "number": job.number, "name": job.name, "customer": job.customer.name,
                "unit_system": job.get_unit_system_display(), "system": system,
                "fit_up_hold_point": job.fit_up_hold_point},
        "assembly": {"pk": assembly.pk, "piece_mark": assembly.piece_mark, "drawing": assembly.drawing,
                     "drawing_revision": assembly.drawing_revision, "quantity": assembly.quantity,
                     "description": assembly.description, "state": assembly.get_state_display(),
                     "released": released},
        "criteria": _criteria(job),
        "convention": convention, "paper": job_paper(job),
        "url": assembly_url(assembly.pk),
        "welds": rows, "hold_points": hold_points, "capacity": capacity,
        "photos": _photo_rows(photos[:PHOTOS_MAX], marks), "photos_more": len(photos) > PHOTOS_MAX,
        "open_items": open_items, "cautions": cautions,
        "wps_used": sorted(wps_used.values(), key=lambda w: (w["number"], w["revision"])),
        "welders_used": sorted(welders_used.values(), key=lambda w: w["stamp"]),
    }
    parts = _parts(chains, job, system)
    if parts:  # only then: a traveler issued before parts were recorded keeps its fingerprint
        snapshot["parts"] = parts
    return snapshot


def _joined(weld, chains):
    """The parts on file a weld names (read from the chain's parts: no query)."""
    by_pk = {p.pk: p for p in getattr(chains, "part_list", [])}
    return [by_pk[pk] for pk in (weld.part1_id, weld.part2_id) if pk in by_pk]


def _parts(chains, job, system) -> list[dict]:
    """The assembly's parts with their heats, as the traveler prints them (the chain read them: no query)."""
    from inspections.services.material import part_problems

    return [{"mark": p.mark, "role": p.get_role_display(), "description": p.description,
             "grade": p.specified_grade, "thickness": _len(p.thickness, system),
             "heat": p.heat.printed() if p.heat else "", "problems": [words for words, _url in part_problems(p, job)]}
            for p in getattr(chains, "part_list", [])]


def _last_signers(inspections) -> str:
    people = sorted({(i["date"], i["inspector"]) for i in inspections if i}, reverse=True)
    if not people:
        return ""
    names = list(dict.fromkeys(name for _, name in people))
    return f"{', '.join(names[:3])}{' and others' if len(names) > 3 else ''}; last {people[0][0]}"


def fingerprint(snapshot: dict) -> str:
    """SHA-256 of the snapshot's canonical JSON: equal records give an equal fingerprint."""
    return hashlib.sha256(json.dumps(snapshot, sort_keys=True, separators=(",", ":")).encode()).hexdigest()


# --- render ----------------------------------------------------------------------------------------------------

QR_SCALE = 4  # pixels per module: a 37-module code is a 156 px PNG, printed 26 mm wide (about 150 dpi)


def qr_data_uri(payload: str) -> str:
    """A QR code (segno) as a PNG data: URI; the payload is exactly the text given.

    A small black-and-white PNG rather than an SVG: WeasyPrint draws an SVG node by node on every render (the
    QR's one path has a segment per dark run), a PNG is embedded as is. The template prints it with
    image-rendering: pixelated so viewers and printers do not blur the module edges."""
    import segno

    return segno.make(payload, error="m").png_data_uri(scale=QR_SCALE, border=2)


def _thumbnail_uri(name: str) -> str | None:
    """A stored thumbnail as a JPEG data: URI, shrunk first if it is larger than PHOTO_MAX_PX."""
    from PIL import Image

    try:
        with default_storage.open(name, "rb") as handle:
            data = handle.read()
        with Image.open(io.BytesIO(data)) as image:
            if max(image.size) > PHOTO_MAX_PX or image.format != "JPEG":
                image = image.convert("RGB")
                image.thumbnail((PHOTO_MAX_PX, PHOTO_MAX_PX))
                out = io.BytesIO()
                image.save(out, "JPEG", quality=78)
                data = out.getvalue()
    except (OSError, ValueError):
        return None  # a missing file is shown as "image not available", never a failed traveler
    return "data:image/jpeg;base64," + base64.b64encode(data).decode("ascii")


def symbol_svg(row: dict, system: str, standard=None) -> str:
    """The weld's symbol as an SVG string, drawn to the job's drawing standard ("" when the weld's data cannot be
    drawn)."""
    # Printed without the tail's WPS reference (the WPS column beside it prints it) and without a <title>:
    # each drawn text costs WeasyPrint about as much as a table cell, on every row. The lean drawing puts every
    # line in one path (WeasyPrint draws an SVG node by node at each occurrence): ~13 nodes a symbol down to ~5.
    try:
        return weld_symbols.weld_symbol_svg(system, lean=True, standard=standard, **{**row["symbol"], "tail": ""})
    except ValueError:
        return ""


def symbol_uri(row: dict, system: str, standard=None) -> str:
    """The symbol as an SVG data: URI. WeasyPrint caches images by URI, so the identical symbols of a weld map
    (most welds of an assembly repeat a few sizes) are parsed once per render instead of once per row."""
    svg = symbol_svg(row, system, standard)
    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode()).decode("ascii") if svg else ""


def render_context(snapshot: dict, *, document_number: str, revision: int, issued_at, issued_by: str) -> dict:
    system = snapshot["job"]["system"]
    welds = [{**row, "svg": symbol_uri(row, system, snapshot.get("convention"))} for row in snapshot["welds"]]
    photos = [{**photo, "uri": _thumbnail_uri(photo["thumbnail"])} for photo in snapshot["photos"]]
    return {"s": snapshot, "welds": welds, "photos": photos, "qr": qr_data_uri(snapshot["url"]),
            "document_number": document_number, "revision": revision, "generated_at": issued_at,
            "issued_by": issued_by, "data_sha256": fingerprint(snapshot), "generator": generator_version()}


def render(snapshot: dict, *, document_number: str, revision: int, issued_at=None, issued_by="") -> RenderedPDF:
    """The traveler PDF of a snapshot (no database access)."""
    issued_at = issued_at or timezone.now()
    context = render_context(snapshot, document_number=document_number, revision=revision, issued_at=issued_at,
                             issued_by=issued_by)
    return render_pdf(TEMPLATE, context, f"{document_number}.pdf", paper=snapshot.get("paper"))


def page_count(content: bytes) -> int:
    from pypdf import PdfReader

    return len(PdfReader(io.BytesIO(content)).pages)


# --- issue -----------------------------------------------------------------------------------------------------

def document_number(snapshot: dict, revision: int) -> str:
    safe = "".join(c if c.isalnum() or c in "-_." else "-" for c in
                   f"{snapshot['job']['number']}-{snapshot['assembly']['piece_mark']}")
    return f"TRV-{safe}-R{revision}"


def issue(assembly, user, *, snapshot: dict | None = None) -> tuple[Traveler, bool]:
    """Issue the assembly's traveler: (traveler, True) for a new revision, (latest, False) when nothing changed.

    Rendering happens outside the lock (it takes most of a second); the revision number printed on it is
    checked again under the lock, and in the rare race where someone issued meanwhile we render again.
    """
    require(user, "traveler.issue")
    snapshot = snapshot if snapshot is not None else gather(assembly.pk)
    digest = fingerprint(snapshot)
    for _attempt in range(3):
        latest = Traveler.objects.filter(assembly_id=assembly.pk).order_by("-revision").first()
        if latest is not None and latest.snapshot_sha256 == digest:
            return latest, False
        revision = latest.revision + 1 if latest else 0
        number = document_number(snapshot, revision)
        issued_at = timezone.now()
        rendered = render(snapshot, document_number=number, revision=revision, issued_at=issued_at,
                          issued_by=_person(user))
        # The chain first (core.seals, lock order), then the assembly; the PDF and its sidecar go with the row,
        # or not at all (core.storage).
        with files_or_nothing(), seals.sealing():
            # Lock the assembly: two QA leads issuing at once must not both write revision N.
            Assembly.objects.select_for_update().only("pk").get(pk=assembly.pk)
            now_latest = Traveler.objects.filter(assembly_id=assembly.pk).order_by("-revision").first()
            if (now_latest.pk if now_latest else None) != (latest.pk if latest else None):
                continue
            traveler = Traveler(
                assembly_id=assembly.pk, revision=revision, document_number=number, sha256=rendered.sha256,
                snapshot_sha256=digest, pages=page_count(rendered.content), size_bytes=len(rendered.content),
                generator_version=generator_version(), generated_at=issued_at, generated_by=user,
                snapshot=snapshot)
            traveler.file.save(rendered.filename, ContentFile(rendered.content), save=False)
            _write_sidecar(traveler.file.name, rendered.sha256, rendered.filename)
            traveler.save(user=user, reason=f"Issued {number}")
            seals.seal(traveler, "traveler.issued")
            return traveler, True
    raise RuntimeError("Another traveler revision kept being issued at the same time; try again.")


def _write_sidecar(name: str, sha256: str, filename: str) -> None:
    """`<file>.sha256` beside the PDF, readable by `sha256sum -c`."""
    default_storage.save(f"{name}.sha256", ContentFile(f"{sha256}  {filename}\n".encode()))


def read_stored(traveler: Traveler) -> bytes:
    with traveler.file.open("rb") as handle:
        return handle.read()


__all__ = ["assembly_url", "document_number", "fingerprint", "gather", "issue", "qr_data_uri", "read_stored",
           "render"]
