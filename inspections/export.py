"""A job's whole record as JSON tables plus its stored files, in one zip: the layout of docs/export-format.md.

Everything the job's records hold or name: the job and its client criteria set, assemblies, welds, inspections,
photos, NCRs, repairs, travelers and packets, parts and the mill certificates of their heats; the WPSs and PQRs and
the welders (with their tests and continuity) the welds and repairs name; the filler lots, inspector credentials and
gauges (with their calibrations) they name; the history rows and seals of all of these; and the people named (no
passwords). Values are written as the record chain seals them (core.seals.encode): exact Decimal text in the stored
base unit, times in UTC to the microsecond, relations as ids, files as {"name", "sha256"}. Rows are streamed table by
table, so a large job does not sit in memory; each file is copied once and its SHA-256 checked against the one
recorded.
"""

from __future__ import annotations

import hashlib
import json
import zipfile

from django.contrib.contenttypes.models import ContentType
from django.core.files.storage import default_storage
from django.db import models
from django.utils import timezone

from core import seals
from core.models import Event, Seal, User
from core.version import legwork_version
from inspections.models import (
    NCR,
    Assembly,
    ClientCriteriaSet,
    FillerLot,
    Gauge,
    GaugeCalibration,
    Inspection,
    InspectorCredential,
    Job,
    JobPacket,
    MillCertificate,
    Part,
    Photo,
    Traveler,
    Weld,
    WeldRepair,
)
from procedures.models import PQR, WPS, ContinuityEntry, Qualification, Welder

FORMAT = "legwork-job-export 1"
USER_FIELDS = ("id", "username", "first_name", "last_name", "role", "stamp", "is_active")


def folder_name(job: Job) -> str:
    safe = "".join(c if c.isalnum() or c in "-_." else "-" for c in job.number)
    return f"legwork-job-{safe}"


def record_sets(job: Job) -> list[tuple[str, models.QuerySet]]:
    """(table name, rows) for everything the job's record holds or names, in the order written."""
    welds = Weld.objects.filter(assembly__job=job)
    ncrs = NCR.objects.filter(weld__assembly__job=job)
    welder_ids = (set(Weld.welders.through.objects.filter(weld__assembly__job=job).values_list("welder_id", flat=True))
                  | set(ncrs.exclude(repair_welder=None).values_list("repair_welder_id", flat=True)))
    wps_ids = (set(welds.exclude(wps=None).values_list("wps_id", flat=True))
               | set(ncrs.exclude(repair_wps=None).values_list("repair_wps_id", flat=True))
               | set(Qualification.objects.filter(welder_id__in=welder_ids).exclude(wps=None)
                     .values_list("wps_id", flat=True)))
    pqr_ids = set(WPS.pqrs.through.objects.filter(wps_id__in=wps_ids).values_list("pqr_id", flat=True))
    inspections = Inspection.objects.filter(weld__assembly__job=job)
    repairs = WeldRepair.objects.filter(weld__assembly__job=job)
    welder_ids |= set(WeldRepair.welders.through.objects.filter(weldrepair__in=repairs)
                      .values_list("welder_id", flat=True))
    wps_ids |= set(repairs.values_list("wps_id", flat=True))
    lot_ids = (set(welds.exclude(filler_lot=None).values_list("filler_lot_id", flat=True))
               | set(repairs.exclude(filler_lot=None).values_list("filler_lot_id", flat=True)))
    calibration_ids = set(inspections.exclude(gauge_calibration=None).values_list("gauge_calibration_id", flat=True))
    gauge_ids = set(GaugeCalibration.objects.filter(pk__in=calibration_ids).values_list("gauge_id", flat=True))
    return [
        ("inspections.job", Job.objects.filter(pk=job.pk)),
        ("inspections.clientcriteriaset", ClientCriteriaSet.objects.filter(pk=job.client_criteria_id)),
        ("inspections.assembly", Assembly.objects.filter(job=job)),
        ("inspections.weld", welds),
        ("inspections.inspection", inspections),
        ("inspections.photo", Photo.objects.filter(inspection__weld__assembly__job=job)),
        ("inspections.ncr", ncrs),
        ("inspections.weldrepair", repairs),
        ("inspections.fillerlot", FillerLot.objects.filter(pk__in=lot_ids)),
        ("inspections.inspectorcredential", InspectorCredential.objects.filter(
            pk__in=inspections.exclude(credential=None).values("credential"))),
        ("inspections.gauge", Gauge.objects.filter(pk__in=gauge_ids)),
        ("inspections.gaugecalibration", GaugeCalibration.objects.filter(gauge_id__in=gauge_ids)),
        ("inspections.traveler", Traveler.objects.filter(assembly__job=job)),
        ("inspections.jobpacket", JobPacket.objects.filter(job=job)),
        *_material_sets(job),
        ("procedures.wps", WPS.objects.filter(pk__in=wps_ids)),
        ("procedures.pqr", PQR.objects.filter(pk__in=pqr_ids)),
        ("procedures.welder", Welder.objects.filter(pk__in=welder_ids)),
        ("procedures.qualification", Qualification.objects.filter(welder_id__in=welder_ids)),
        ("procedures.continuityentry", ContinuityEntry.objects.filter(welder_id__in=welder_ids)),
    ]


def _material_sets(job: Job):
    """The job's parts (withdrawn ones too) and the mill certificates they name, with their scans."""
    parts = Part.objects.filter(assembly__job=job)
    return [("inspections.part", parts),
            ("inspections.millcertificate", MillCertificate.objects.filter(pk__in=parts.values("heat_id")))]


class _Member:
    """A zip member written as a stream, hashed and counted on the way."""

    def __init__(self, archive: zipfile.ZipFile, path: str, compress=True):
        self.path = path
        info = zipfile.ZipInfo(path, date_time=timezone.localtime().timetuple()[:6])
        info.compress_type = zipfile.ZIP_DEFLATED if compress else zipfile.ZIP_STORED  # photos and PDFs: as they are
        self.handle = archive.open(info, "w", force_zip64=True)
        self.digest = hashlib.sha256()
        self.size = 0

    def write(self, data: bytes):
        self.digest.update(data)
        self.size += len(data)
        self.handle.write(data)

    def close(self) -> dict:
        self.handle.close()
        return {"path": self.path, "size": self.size, "sha256": self.digest.hexdigest()}


def write_zip(job: Job, handle, exported_by=None) -> dict:
    """Write the job's export to a binary file object; returns its description (export.json)."""
    root = folder_name(job)
    files = seals.FileHashes()
    user_ids: set[int] = set()
    tables, file_rows, missing = [], [], []
    with zipfile.ZipFile(handle, "w", compression=zipfile.ZIP_DEFLATED, compresslevel=6) as archive:
        subjects = []
        for name, rows in record_sets(job):
            model = rows.model
            tables.append(_write_table(archive, f"{root}/records/{name}.json", name, rows, files, user_ids))
            subjects.append((model, rows.values("pk")))
        events = Event.objects.none()
        sealed = Seal.objects.none()
        for model, ids in subjects:
            content_type = ContentType.objects.get_for_model(model)
            events = events | Event.objects.filter(subject_type=content_type, subject_id__in=ids)
            sealed = sealed | Seal.objects.filter(record_type=seals.label_of(model), record_id__in=ids)
        tables.append(_write_table(archive, f"{root}/records/core.event.json", "core.event",
                                   events.select_related("subject_type"), files, user_ids))
        tables.append(_write_table(archive, f"{root}/records/core.seal.json", "core.seal", sealed, files, user_ids))
        tables.append(_write_table(archive, f"{root}/records/core.user.json", "core.user",
                                   User.objects.filter(pk__in=user_ids), files, user_ids))
        for name in sorted(files):
            if files[name] is None:
                missing.append(name)
                continue
            file_rows.append(_copy_file(archive, root, name, files[name]))
        description = {
            "format": FORMAT, "exported_at": timezone.now().isoformat(timespec="microseconds"),
            "exported_by": getattr(exported_by, "username", None), "legwork_version": legwork_version(),
            "job": {"id": job.pk, "number": job.number, "name": job.name},
            "units": {"length": "mm", "temperature": "degC", "force": "kN", "speed": "mm/min", "flow": "L/min",
                      "heat_input": "kJ/mm"},
            "tables": tables, "files": file_rows, "missing_files": missing,
        }
        archive.writestr(f"{root}/export.json", json.dumps(description, indent=1, sort_keys=True))
        archive.writestr(f"{root}/README.txt", README.format(format=FORMAT, job=job.number))
    return description


def _write_table(archive, path, name, rows, files, user_ids) -> dict:
    model = rows.model
    member = _Member(archive, path)
    member.write(b"[")
    count = 0
    fields = _fields(model)
    m2m = [f.name for f in model._meta.many_to_many] if model is not User else []
    for obj in rows.order_by("pk").prefetch_related(*m2m).iterator(chunk_size=500):
        row = {}
        for model_field in fields:
            if isinstance(model_field, models.ForeignKey) and model_field.related_model is ContentType:
                row[model_field.name] = getattr(obj, model_field.name).model_class()._meta.label_lower
                continue
            row[model_field.name] = seals.encode(obj, model_field, files)
            if getattr(model_field, "related_model", None) is User and row[model_field.name] is not None:
                user_ids.add(row[model_field.name])
        member.write((b",\n" if count else b"\n") + json.dumps(row, sort_keys=True, ensure_ascii=False).encode())
        count += 1
    member.write(b"\n]\n")
    return {"name": name, "rows": count, **member.close()}


def _fields(model):
    if model is User:
        return [model._meta.get_field(name) for name in USER_FIELDS]
    return seals.sealable_fields(model)


def _copy_file(archive, root, name, recorded) -> dict:
    member = _Member(archive, f"{root}/files/{name}", compress=False)
    with default_storage.open(name, "rb") as source:
        for chunk in iter(lambda: source.read(1 << 20), b""):
            member.write(chunk)
    row = member.close()
    row["name"] = name
    if row["sha256"] != recorded:
        raise RuntimeError(f"{name} changed while it was being exported; export again.")
    return row


README = """Legwork job export ({format}) of job {job}.

export.json        what is here: the format, when and by whom it was exported, every table with its row count and
                   SHA-256, every file with its size and SHA-256, and the units of the stored numbers
records/*.json     one JSON array per table ("inspections.inspection", ...); each row is an object of field name to
                   value: exact decimal text in the base unit, times in UTC (ISO 8601, microseconds), a relation as
                   the related row's id, a file as {{"name", "sha256"}} with the file under files/<name>
files/             the stored files: photos, travelers, packets, welder test reports

The full description of every table and value is in Legwork's docs/export-format.md.
"""
