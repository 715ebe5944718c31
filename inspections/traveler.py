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
from django.db import transaction
from django.urls import reverse
from django.utils import timezone

from core.pdf import RenderedPDF, render_pdf
from core.roles import require
from core.storage import files_or_nothing
from core.units import Length, format_force, format_length
from inspections import weld_symbols
from inspections.models import Assembly, Inspection, InspectionStage, Photo, Weld
from inspections.models.traveler import Traveler
from inspections.services.assemblies import weld_statuses

GENERATOR = "legwork-traveler 2"  # bump when the layout or the gathered data changes meaning
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


def _inspection(inspection: Inspection | None, system: str) -> dict | None:
    if inspection is None:
        return None
    return {"pk": inspection.pk, "accepted": inspection.accepted, "inspector": _person(inspection.inspector),
            "date": _day(inspection.inspected_at), "min_leg": _len(inspection.min_size, system),
            "stage": inspection.get_stage_display()}


def _fexx(wps) -> str | None:
    """Filler strength for the strength engine, from the WPS electrode (procedures.electrodes decides)."""
    if wps is None or not wps.electrode:
        return None
    from procedures.electrodes import decode

    try:
        return f"{decode(wps.electrode).tensile_ksi} ksi"
    except ValueError:
        return None


def _capacity(weld: Weld, final: Inspection | None, system: str) -> dict | None:
    """Required strength against the available strength (inspections.strength decides; LRFD)."""
    if weld.required_strength is None or weld.joint_type != "fillet":
        return None
    from inspections import strength

    required = format_force(weld.required_strength, system)
    fexx = _fexx(weld.wps)
    row = {"mark": weld.mark, "required": required, "fexx": fexx or "", "specified": "", "as_inspected": "",
           "ratio": "", "ok": None, "note": "", "source": f"{strength.SPEC} J2.4, B3 (LRFD)"}
    if fexx is None:
        row["note"] = "Filler strength unknown (no WPS, or its electrode cannot be read): not calculated."
        return row
    try:
        specified = strength.fillet_strength(weld.size, weld.length, fexx, weld.load_angle, leg2=weld.size2)
        row["specified"] = format_force(_kip(specified.lrfd_kip), system)
        result, verdict = specified, strength.demand_capacity(specified, required)
        smallest_specified = min(weld.size, weld.size2 or weld.size)
        if final is not None and final.min_size is not None and final.min_size < smallest_specified:
            inspected = strength.as_inspected_capacity(
                weld.size, weld.length, final.min_size, final.undersize_length or weld.length, fexx, weld.load_angle,
                required=required, specified_leg2=weld.size2)
            result = inspected.as_inspected
            row["as_inspected"] = format_force(_kip(result.lrfd_kip), system)
            verdict = strength.demand_capacity(result, required)
        row["ratio"] = f"{verdict.ratio:.2f}"
        row["ok"] = bool(verdict.ok)
    except ValueError as exc:
        row["note"] = str(exc)
    return row


def _kip(value):
    from core.units import parse_force

    return parse_force(f"{value} kip")


def _photo_rows(photos, weld_marks) -> list[dict]:
    rows = []
    for photo in photos:
        rows.append({"pk": photo.pk, "sha256": photo.sha256, "thumbnail": photo.thumbnail.name,
                     "caption": photo.caption or f"Photo {photo.pk}",
                     "weld": weld_marks.get(photo.inspection.weld_id, ""),
                     "stage": photo.inspection.get_stage_display(), "date": _day(photo.uploaded_at)})
    return rows


def gather(assembly_pk: int) -> dict:
    """Everything one assembly's traveler prints, in words, in a fixed number of queries (see the tests)."""
    from procedures import eligibility

    assembly = (Assembly.objects.select_related("job__client_criteria", "job__customer", "released_by")
                .get(pk=assembly_pk))
    job = assembly.job
    system = job.unit_system
    welds = list(Weld.objects.filter(assembly=assembly).select_related("wps")
                 .prefetch_related("welders").order_by("mark"))
    weld_ids = [w.pk for w in welds]
    marks = {w.pk: w.mark for w in welds}
    statuses = weld_statuses(weld_ids)  # the release rules live there (services.assemblies)
    fit_ups = {}
    for inspection in (Inspection.objects.current().filter(weld_id__in=weld_ids, stage=InspectionStage.FIT_UP)
                       .select_related("inspector").order_by("weld_id", "-inspected_at", "-pk")):
        fit_ups.setdefault(inspection.weld_id, inspection)
    photos = list(Photo.objects.filter(inspection__weld_id__in=weld_ids)
                  .select_related("inspection").order_by("-uploaded_at", "-pk")[:PHOTOS_MAX + 1])
    # Welder checks on the day each weld was welded (procedures.eligibility decides). Undated welds are not
    # judged on "today": that answer would change by itself from one day to the next.
    dated = [w for w in welds if w.welded_on is not None]
    checks = eligibility.check_welds(dated) if dated else {}

    rows, capacity, open_items, wps_used, welders_used = [], [], [], {}, {}
    for weld in welds:
        status = statuses[weld.pk]
        check = checks.get(weld.pk)
        welders = []
        for welder in sorted(weld.welders.all(), key=lambda w: w.stamp):
            welders_used[welder.pk] = {"pk": welder.pk, "stamp": welder.stamp, "name": welder.name}
            if check is None:
                welders.append({"stamp": welder.stamp, "name": welder.name, "allowed": None,
                                "reasons": ["No weld date recorded: qualification not judged."]})
                continue
            one = next((c for c in check.checks if c.welder.pk == welder.pk), None)
            welders.append({"stamp": welder.stamp, "name": welder.name, "allowed": bool(one and one.allowed),
                            "reasons": list(one.reasons) if one else []})
        wps = weld.wps
        if wps is not None:
            wps_used[wps.pk] = {"pk": wps.pk, "number": wps.number, "revision": wps.revision,
                                "state": wps.get_state_display(), "title": wps.title}
        final = status.final
        ncrs = [{"number": n.number, "state": n.get_state_display(), "open": n.is_open,
                 "disposition": n.get_disposition_display() if n.disposition else ""} for n in status.ncrs]
        result = "Not inspected"
        if final is not None:
            result = "Accepted" if final.accepted else ("Use as is (NCR)" if status.accepted_as_is else "Rejected")
        row = {
            "pk": weld.pk, "mark": weld.mark, "joint": weld.get_joint_type_display(),
            "sides": weld.get_sides_display(), "position": weld.position,
            "size": _len(weld.size, system) + (f" x {_len(weld.size2, system)}" if weld.size2 else ""),
            "length": _len(weld.length, system), "count": weld.count,
            "pitch": _len(weld.pitch, system),
            "symbol": {"sides": weld.sides, "size": _exact(weld.size), "size2": _exact(weld.size2),
                       "length": _exact(weld.length), "pitch": _exact(weld.pitch), "all_around": weld.all_around,
                       "field_weld": weld.field_weld, "joint": weld.joint_type,
                       "tail": f"{wps.number}" if wps else ""},
            "wps": f"{wps.number} rev {wps.revision}" if wps else "", "wps_state": wps.state if wps else "",
            "welded_on": _day(weld.welded_on), "welders": welders,
            "qualified": bool(welders) and all(w["allowed"] for w in welders),
            "fit_up": _inspection(fit_ups.get(weld.pk), system), "final": _inspection(final, system),
            "result": result, "released_ok": status.released_ok, "ncrs": ncrs,
        }
        rows.append(row)
        cap = _capacity(weld, final, system)
        if cap is not None:
            capacity.append(cap)
        open_items += _open_items(row, wps)
    if not welds:
        open_items.append("The weld map is empty.")
    if assembly.state not in ("released", "scrapped"):
        open_items.append(f"The assembly is not released ({assembly.get_state_display().lower()}).")

    fitted = [r for r in rows if r["fit_up"]]
    finals_ok = [r for r in rows if r["released_ok"]]
    hold_points = [
        {"name": "Fit-up", "status": f"{len(fitted)} of {len(rows)} welds signed",
         "by": _last_signers(r["fit_up"] for r in fitted), "done": bool(rows) and len(fitted) == len(rows)},
        {"name": "Final visual", "status": f"{len(finals_ok)} of {len(rows)} welds accepted",
         "by": _last_signers(r["final"] for r in rows if r["final"]),
         "done": bool(rows) and len(finals_ok) == len(rows)},
        {"name": "Release", "status": assembly.get_state_display(),
         "by": (f"{_person(assembly.released_by)}, {_day(assembly.released_at)}" if assembly.released_by else ""),
         "done": assembly.state == "released"},
    ]
    cautions = []
    if assembly.state != "released":
        cautions.append("NOT RELEASED: this traveler records work in progress; it is not a release document.")
    if any(r["final"] and not r["final"]["accepted"] for r in rows):
        cautions.append("A weld's current final inspection rejected it: see the NCR column.")
    if capacity:
        cautions.append("Strength figures are AISC 360-16 J2 available strengths (LRFD) for the engineer of "
                        "record to review; they do not approve a weld.")
    return {
        "job": {"pk": job.pk, "number": job.number, "name": job.name, "customer": job.customer.name,
                "unit_system": job.get_unit_system_display(), "system": system},
        "assembly": {"pk": assembly.pk, "piece_mark": assembly.piece_mark, "drawing": assembly.drawing,
                     "drawing_revision": assembly.drawing_revision, "quantity": assembly.quantity,
                     "description": assembly.description, "state": assembly.get_state_display()},
        "criteria": _criteria(job),
        "convention": weld_symbols.AWS if system == "US" else weld_symbols.ISO,
        "url": assembly_url(assembly.pk),
        "welds": rows, "hold_points": hold_points, "capacity": capacity,
        "photos": _photo_rows(photos[:PHOTOS_MAX], marks), "photos_more": len(photos) > PHOTOS_MAX,
        "open_items": open_items, "cautions": cautions,
        "wps_used": sorted(wps_used.values(), key=lambda w: (w["number"], w["revision"])),
        "welders_used": sorted(welders_used.values(), key=lambda w: w["stamp"]),
    }


def _last_signers(inspections) -> str:
    people = sorted({(i["date"], i["inspector"]) for i in inspections if i}, reverse=True)
    if not people:
        return ""
    names = list(dict.fromkeys(name for _, name in people))
    return f"{', '.join(names[:3])}{' and others' if len(names) > 3 else ''}; last {people[0][0]}"


def _open_items(row, wps) -> list[str]:
    mark = row["mark"]
    items = []
    if wps is None:
        items.append(f"Weld {mark}: no WPS named.")
    elif row["wps_state"] != "approved":
        items.append(f"Weld {mark}: WPS {row['wps']} is not approved ({wps.get_state_display().lower()}).")
    if not row["welders"]:
        items.append(f"Weld {mark}: no welder recorded.")
    elif not row["welded_on"]:
        items.append(f"Weld {mark}: no weld date recorded.")
    for welder in row["welders"]:
        if welder["allowed"] is False:
            items.append(f"Weld {mark}: welder {welder['stamp']} not qualified on {row['welded_on']}: "
                         + "; ".join(welder["reasons"][:2]))
    if row["final"] is None:
        items.append(f"Weld {mark}: no final visual inspection.")
    for ncr in row["ncrs"]:
        if ncr["open"]:
            items.append(f"Weld {mark}: NCR {ncr['number']} open ({ncr['state'].lower()}).")
    return items


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


def symbol_svg(row: dict, system: str) -> str:
    """The weld's symbol as an SVG string ("" when the weld's data cannot be drawn)."""
    # Printed without the tail's WPS reference (the WPS column beside it prints it) and without a <title>:
    # each drawn text costs WeasyPrint about as much as a table cell, on every row. The lean drawing puts every
    # line in one path (WeasyPrint draws an SVG node by node at each occurrence): ~13 nodes a symbol down to ~5.
    try:
        return weld_symbols.weld_symbol_svg(system, lean=True, **{**row["symbol"], "tail": ""})
    except ValueError:
        return ""


def symbol_uri(row: dict, system: str) -> str:
    """The symbol as an SVG data: URI. WeasyPrint caches images by URI, so the identical symbols of a weld map
    (most welds of an assembly repeat a few sizes) are parsed once per render instead of once per row."""
    svg = symbol_svg(row, system)
    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode()).decode("ascii") if svg else ""


def render_context(snapshot: dict, *, document_number: str, revision: int, issued_at, issued_by: str) -> dict:
    system = snapshot["job"]["system"]
    welds = [{**row, "svg": symbol_uri(row, system)} for row in snapshot["welds"]]
    photos = [{**photo, "uri": _thumbnail_uri(photo["thumbnail"])} for photo in snapshot["photos"]]
    return {"s": snapshot, "welds": welds, "photos": photos, "qr": qr_data_uri(snapshot["url"]),
            "document_number": document_number, "revision": revision, "generated_at": issued_at,
            "issued_by": issued_by, "data_sha256": fingerprint(snapshot), "generator": generator_version()}


def render(snapshot: dict, *, document_number: str, revision: int, issued_at=None, issued_by="") -> RenderedPDF:
    """The traveler PDF of a snapshot (no database access)."""
    issued_at = issued_at or timezone.now()
    context = render_context(snapshot, document_number=document_number, revision=revision, issued_at=issued_at,
                             issued_by=issued_by)
    return render_pdf(TEMPLATE, context, f"{document_number}.pdf")


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
        with files_or_nothing(), transaction.atomic():  # the PDF and its sidecar go with the row, or not at all
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
            traveler.save()
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
