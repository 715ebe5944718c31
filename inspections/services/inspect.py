"""Judge and sign inspections: the one path by which an inspection comes into the database.

`judge(weld, observed, stage)` asks the engines about one weld and adds no rule of its own: the acceptance engine
(inspections.acceptance.evaluate) at the in-process and final stages, the fit-up engine (inspections.fit_up) at the
fit-up hold point. `sign_inspection(...)` judges ONCE, stores the observations with that verdict, the findings and
the criteria set's key and version in one transaction, then moves the repair loop on: an NCR opened for a rejected
final inspection, open NCRs closed by an accepted one, the assembly's state refreshed. The verdict it judged is
returned with the inspection (inspection.verdict), so the page shows exactly what was stored.

`sign_batch(...)` signs one pass over several identical welds of an assembly: one judgement, one verdict, one
inspection per weld sharing a batch id. A draft (what an inspector typed and photographed, not signed) becomes
the inspection's photos when signed.
"""

import functools
import hashlib
import json
import uuid
from dataclasses import replace
from datetime import datetime, time

from django.db import connection, transaction
from django.db.models import F
from django.utils import timezone

from core import seals
from core.errors import Refused
from core.units import Length, Temperature, format_length, format_temperature
from inspections import fit_up, observations, preheat, visual_timing
from inspections.acceptance import Finding, Verdict, evaluate
from inspections.models import (
    Assembly,
    AssemblyState,
    DraftPhoto,
    Inspection,
    InspectionDraft,
    InspectionStage,
    Photo,
    Weld,
)
from inspections.services import trace
from inspections.services.assemblies import refresh_assembly_state
from inspections.services.ncr import close_ncrs_for, open_ncr
from procedures.models.wps import Basis

ZERO = Length(0)


def nominal_throat(weld: Weld) -> Length:
    """The nominal throat a of the specified fillet (Weld.nominal_throat: the drawing's a, else the legs')."""
    return weld.nominal_throat


def weld_for_engine(weld: Weld, leg_increase: Length | None = None) -> dict:
    """The acceptance engine's weld dict from a weld-map line: each specified leg on its own (unequal legs are
    judged leg by leg), increased by the root opening measured at fit-up where the code asks for it.

    thickness: undercut is judged at the toe on the thinner part joined (the stricter reading, since either toe
    can undercut; the weld map does not say which part a toe lies on). A drawing that gives only the throat a
    passes no leg: the engine then speaks of a, and of z only as a / 0.707.
    """
    increase = leg_increase or ZERO
    data = {
        "system": weld.assembly.job.unit_system,
        "throat": weld.nominal_throat,
        "length": weld.length,
        "thickness": weld.thinner_part,
        "primary_member": weld.primary_member,
        "transverse_to_tension": weld.transverse_to_tension,
    }
    if weld.size_on_drawing or weld.throat is None:
        data["size"] = weld.size + increase
        if weld.size2 is not None:
            data["size2"] = weld.size2 + increase
    return data


def observed_for_engine(observed: dict) -> dict:
    """Observations as the engine reads them (the table in inspections.observations): absent or empty measurements
    left out, counts as whole numbers, flags as booleans. Anything else in `observed` (stage, remarks) is not read."""
    out = {}
    for o in observations.OBSERVATIONS:
        value = observed.get(o.name)
        if o.kind == "flag":
            out[o.name] = bool(value)
        elif value is None or value == "":
            continue
        elif o.kind == "count":
            out[o.name] = int(value)
        else:
            out[o.name] = value
    return out


# --- fit-up: the hold point before welding ---------------------------------------------------------------------

# The inspector's own call on what no gauge reads: the joint, alignment and cleanliness against the drawing and WPS.
FIT_UP_SOURCE = ("AWS D1.1/D1.1M:2020 clause 7, fabrication: fit-up and dimensional tolerances (clause from "
                 "memory); ISO 5817 applies to the finished weld only. The inspector judges the joint against the "
                 "drawing and the WPS.")


def _criteria(weld: Weld):
    return weld.assembly.job.criteria_for_evaluation()


def judge_root_opening(weld: Weld, opening: Length) -> fit_up.RootOpening:
    """The root opening of the weld's joint against the job's code (inspections.fit_up)."""
    return fit_up.judge_root_opening(opening, weld.thicker_part, _criteria(weld), throat=weld.nominal_throat,
                                     system=weld.assembly.job.unit_system)


def judge_fit_up(weld: Weld, acceptable: bool, root_opening: Length | None = None) -> Verdict:
    """The fit-up hold point: the root opening measured against the code (fillet joints), and the inspector's call
    on the rest; accepted when both are."""
    key, version = weld.assembly.job.criteria_identity()
    findings = []
    if root_opening is not None and weld.joint_type == "fillet":
        result = judge_root_opening(weld, root_opening)
        findings.append(Finding(criterion="root_opening", ok=result.ok, message=result.message,
                                source=result.source, limit=result.limit, measured=result.opening,
                                criteria_key=key, criteria_version=version))
    message = ("joint, alignment and cleanliness checked against the drawing and the WPS \u2014 "
               + ("ready to weld" if acceptable else "not ready to weld: correct the fit-up and inspect again"))
    findings.append(Finding(criterion="fit_up", ok=bool(acceptable), message=message, source=FIT_UP_SOURCE,
                            measured=bool(acceptable), criteria_key=key, criteria_version=version))
    return Verdict(accepted=all(f.ok for f in findings), findings=tuple(findings), criteria_key=key,
                   criteria_version=version, criteria_title="Fit-up hold point", system=weld.assembly.job.unit_system)


@functools.cache
def _fit_ups():
    """Current fit-up inspections that measured the root opening, newest first, with the fields judging reads:
    built once per process (building the query cost more than running it); filtered per call, on a copy that
    shares no subquery. Current as in InspectionQuerySet.current(), no inspection superseding it, asked as the
    reverse link's absence (one join)."""
    return (Inspection.objects.filter(stage=InspectionStage.FIT_UP, root_gap__isnull=False, superseded_by__isnull=True)
            .order_by("-inspected_at", "-pk").only("pk", "weld_id", "stage", "inspected_at", "root_gap"))


def latest_fit_up(weld: Weld) -> Inspection | None:
    """The weld's latest current fit-up inspection that measured the root opening (one query), with the fields
    judging reads (its id, weld, stage, time and root opening; anything else is read on access)."""
    return _fit_ups().filter(weld=weld).first()


def leg_increase(weld: Weld, fitted: Inspection | None) -> Length | None:
    """How much the specified leg grows for the root opening measured at fit-up (AWS D1.1 clause 7.21.1: by the
    opening, from 1/16 in [2 mm]; ISO 5817: never, a gap over its limit is rejected at fit-up). None: no growth."""
    if fitted is None or fitted.root_gap is None or weld.joint_type != "fillet":
        return None
    grown = fit_up.increased_leg(weld.size, fitted.root_gap, _criteria(weld), system=weld.assembly.job.unit_system)
    increase = grown - weld.size
    return increase if increase > ZERO else None


def _increase_finding(weld: Weld, fitted: Inspection, increase: Length, key: str, version: int) -> Finding:
    system = weld.assembly.job.unit_system
    legs = " x ".join(format_length(leg, system) for leg in (weld.size, weld.size2) if leg is not None)
    grown = " x ".join(format_length(leg + increase, system) for leg in (weld.size, weld.size2) if leg is not None)
    return Finding(
        criterion="root_opening", ok=True, measured=fitted.root_gap, limit=increase, criteria_key=key,
        criteria_version=version, source=fit_up.AWS_SOURCE + f" ({fit_up.AWS_STATUS})",
        message=(f"root opening {format_length(fitted.root_gap, system)} at fit-up "
                 f"({timezone.localtime(fitted.inspected_at):%Y-%m-%d}): the specified leg {legs} is increased by "
                 f"the opening and judged as {grown}"))


_LOOK_UP = object()


def judge(weld: Weld, observed: dict, stage: str | None = None, *, fitted=_LOOK_UP) -> Verdict:
    """The verdict of the job's criteria set (client set or built-in) on these observations of this weld.

    At the fit-up stage there is no weld yet: the root opening and the inspector's call (observed["fit_up_ok"])
    decide. At the other stages the specified leg is judged as increased by the root opening measured at fit-up
    (pass `fitted`, the weld's latest_fit_up or None, when it is known, to spare the look-up).
    Raises ValueError (from the engine) when the observations cannot be judged, e.g. a required leg is missing.
    """
    if stage == InspectionStage.FIT_UP:
        return with_temperatures(judge_fit_up(weld, bool(observed.get("fit_up_ok")), observed.get("root_gap")),
                                 weld, observed)
    if fitted is _LOOK_UP:
        fitted = latest_fit_up(weld)
    increase = leg_increase(weld, fitted)
    verdict = evaluate(_criteria(weld), weld_for_engine(weld, increase), observed_for_engine(observed))
    if increase:
        finding = _increase_finding(weld, fitted, increase, verdict.criteria_key, verdict.criteria_version)
        verdict = replace(verdict, findings=(finding, *verdict.findings))
    return with_temperatures(verdict, weld, observed)


def with_temperatures(verdict: Verdict, weld: Weld, observed: dict) -> Verdict:
    """The verdict with the measured preheat and interpass judged (inspections.preheat) against the weld's WPS and,
    for a prequalified AWS WPS, Table 5.8 for the thicker part; a reading out of range rejects."""
    readings = [(kind, observed.get(f"{kind}_measured")) for kind in ("preheat", "interpass")]
    readings = [(kind, value) for kind, value in readings if value is not None]
    if not readings:
        return verdict
    wps = weld.wps
    if wps is None:
        raise ValueError("The weld has no WPS on the weld map, so the temperature cannot be judged: add the WPS "
                         "first.")
    system = weld.assembly.job.unit_system
    code = None
    if wps.basis == Basis.PREQUALIFIED and wps.code.startswith("AWS"):
        code = preheat.table_5_8_minimum(wps.review_input(), weld.thicker_part, system)
    found = tuple(replace(preheat.judge(value, kind, wps_min=wps.preheat_min, wps_max=wps.interpass_max, code=code,
                                        system=system, wps_name=f"WPS {wps.number} rev {wps.revision}"),
                          criteria_key=verdict.criteria_key, criteria_version=verdict.criteria_version)
                  for kind, value in readings)
    return replace(verdict, findings=(*verdict.findings, *found),
                   accepted=verdict.accepted and all(f.ok for f in found))


def below_preheat(verdict: Verdict) -> bool:
    """A temperature reading rejected the inspection (the weld is being made outside the WPS's temperatures)."""
    return any(not f.ok and f.criterion in ("preheat", "interpass") for f in verdict.findings)


def verdict_digest(verdict: Verdict) -> str:
    """A short fingerprint of a verdict as stored (accepted and every finding): the panel carries the one it shows,
    and signing stores only a verdict with the same fingerprint."""
    data = {"accepted": verdict.accepted, "findings": findings_json(verdict, verdict.system),
            "key": verdict.criteria_key, "version": verdict.criteria_version}
    return hashlib.sha256(json.dumps(data, sort_keys=True).encode()).hexdigest()[:20]


def findings_json(verdict: Verdict, system: str) -> list[dict]:
    """The findings as stored with the inspection: plain text, readable without the engine."""
    rows = []
    for f in verdict.findings:
        rows.append({
            "criterion": f.criterion,
            "ok": f.ok,
            "message": f.message,
            "source": f.source,
            "limit": _text(f.limit, system),
            "measured": _text(f.measured, system),
        })
    return rows


def _text(value, system):
    if value is None:
        return None
    if isinstance(value, Length):
        return format_length(value, system)
    if isinstance(value, Temperature):
        return format_temperature(value, system)
    if isinstance(value, bool):
        return value
    return str(value)


# --- when the final visual may be made -----------------------------------------------------------------------

def completion_of(weld: Weld) -> datetime | None:
    """When the weld was completed and cooled: as recorded, else the end of the day it was welded (the latest it can
    have been, so a delay counted from it is never too short), else None."""
    if weld.completed_at is not None:
        return weld.completed_at
    if weld.welded_on is not None:
        return timezone.make_aware(datetime.combine(weld.welded_on, time(23, 59)))
    return None


def final_visual_timing(weld: Weld):
    """inspections.visual_timing's answer for this weld (its steels and when it was completed)."""
    return visual_timing.final_visual_timing(weld.base_metal_list, completion_of(weld))


def _shown(moment: datetime) -> str:
    return f"{timezone.localtime(moment):%Y-%m-%d %H:%M}"


def final_visual_refusal(weld: Weld, moment: datetime | None = None) -> str | None:
    """Why a final visual of this weld cannot be signed now (None: it can)."""
    return final_visual_timing(weld).refusal(moment or timezone.now(), shown=_shown)


# --- signing ---------------------------------------------------------------------------------------------------

def _check_signable(weld: Weld, stage: str) -> None:
    if stage not in InspectionStage.values:
        raise Refused(f"Stage must be one of {', '.join(InspectionStage.values)}, not {stage!r}.")
    if stage == InspectionStage.FINAL:
        why = final_visual_refusal(weld)
        if why:
            raise Refused(f"Weld {weld.mark}: {why}", code="too_early")


def sign_inspection(weld: Weld, observed: dict, stage: str, user, supersedes: Inspection | None = None,
                    reason: str = "", remarks: str = "", *, draft: InspectionDraft | None = None,
                    shown: str | None = None, gauge=None) -> Inspection:
    """Judge once, sign and store one inspection; move the NCR and assembly states on. All or nothing.

    A correction names the inspection it supersedes and why; only a current inspection of the same weld can be
    superseded (locked, so two people correcting one inspection at once cannot both succeed). `shown`: the verdict
    fingerprint the inspector saw (verdict_digest); a different verdict is refused rather than signed. `draft`: its
    photos are attached and it is deleted. The judged verdict is on the returned inspection as .verdict.
    """
    return sign_batch([weld], observed, stage, user, supersedes=supersedes, reason=reason, remarks=remarks,
                      draft=draft, shown=shown, gauge=gauge)[0]


def batch_key(weld: Weld) -> tuple:
    """What identical welds share: everything the engines read of the weld, and its WPS."""
    return (weld.assembly_id, weld.joint_type, weld.size, weld.size2, weld.throat, weld.size_on_drawing, weld.length,
            weld.thinner_part, weld.thicker_part, weld.primary_member, weld.transverse_to_tension,
            tuple(sorted(weld.base_metal_list)), weld.wps_id)


class VerdictChanged(Refused):
    """The verdict judged now is not the one the inspector was shown: nothing is signed."""

    def __init__(self, verdict: Verdict):
        super().__init__("The verdict changed since the panel last showed it: check it and sign again.",
                         code="verdict_changed")
        self.verdict = verdict


@transaction.atomic
def sign_batch(welds: list[Weld], observed: dict, stage: str, user, *, supersedes: Inspection | None = None,
               reason: str = "", remarks: str = "", draft: InspectionDraft | None = None,
               shown: str | None = None, gauge=None) -> list[Inspection]:
    """Sign one pass over identical welds of one assembly with one verdict: an inspection per weld, in weld order.

    Refused when the welds are not identical in what the engines read (split the odd one out and inspect it on its
    own), when one of them measured a different root opening at fit-up, or when the assembly is closed.
    """
    if not welds:
        raise Refused("Choose at least one weld to sign.")
    first = welds[0]
    for weld in welds:
        _check_signable(weld, stage)
    credential = trace.signing_credential(user, stage, timezone.localdate())
    calibrated = trace.signing_calibration(  # the gauge (registers), if one was used or the job asks for one
        gauge, timezone.localdate(), required=stage == InspectionStage.FINAL and first.assembly.job.gauge_required)
    others = [w for w in welds[1:] if batch_key(w) != batch_key(first)]
    if others:
        raise Refused(f"Weld {others[0].mark} is not identical to {first.mark} (size, length, parts or WPS differ): "
                      "inspect it on its own.", code="not_identical")
    if supersedes is not None and len(welds) > 1:
        raise Refused("A correction is of one weld's inspection: correct the others one by one.")
    seals.lock_chain_first()  # this transaction seals, then locks NCRs and the assembly (core.seals, lock order)
    # Lock the weld rows, and read the assembly's state afresh under it; the weld map data itself is what the form
    # was judged against. SQLite locks no rows (its IMMEDIATE transaction already holds the write lock): no query.
    if connection.features.has_select_for_update:
        ids = [w.pk for w in welds]
        list(Weld.objects.select_for_update().filter(pk__in=ids).order_by("pk").values_list("pk", flat=True))
    state = Assembly.objects.filter(pk=first.assembly_id).values_list("state", flat=True).get()
    if state in (AssemblyState.RELEASED, AssemblyState.SCRAPPED):
        raise Refused(f"Assembly {first.assembly.piece_mark} is {AssemblyState(state).label.lower()}: "
                      "its welds take no more inspections.")
    if supersedes is not None:
        supersedes = Inspection.objects.select_for_update().get(pk=supersedes.pk)
        if supersedes.weld_id != first.pk:
            raise Refused("A correction must be of the same weld as the inspection it supersedes.")
        if Inspection.objects.filter(supersedes=supersedes).exists():
            raise Refused("That inspection has already been corrected; correct the latest one instead.")
        if not reason.strip():
            raise Refused("Say why the inspection is being corrected.")
        if first.revised_at is not None and supersedes.inspected_at <= first.revised_at:
            raise Refused(f"Weld {first.mark} was revised after that inspection: inspect it again instead of "
                          "correcting an inspection of its earlier data.")
    fitted = increase = None
    if stage != InspectionStage.FIT_UP:
        fitted = latest_fit_up(first)
        increase = leg_increase(first, fitted)
        for weld in welds[1:]:
            if leg_increase(weld, latest_fit_up(weld)) != increase:
                raise Refused(f"Weld {weld.mark} had a different root opening at fit-up than {first.mark}, so its "
                              "leg is judged differently: inspect it on its own.", code="not_identical")
    verdict = judge(first, observed, stage, fitted=fitted)
    if shown is not None and shown != verdict_digest(verdict):
        raise VerdictChanged(verdict)
    key, version = first.assembly.job.criteria_identity()
    values = observed_for_engine(observed)
    findings = findings_json(verdict, verdict.system)
    batch = uuid.uuid4() if len(welds) > 1 else None
    photos = list(draft.photos.all()) if draft is not None and draft.pk else []
    signed = []
    for weld in welds:
        inspection = Inspection(
            weld=weld, stage=stage, inspector=user, supersedes=supersedes, correction_reason=reason.strip(),
            remarks=remarks, accepted=verdict.accepted, findings=findings, criteria_key=key,
            criteria_version=version, batch=batch, leg_increase=increase, credential=credential,
            gauge_calibration=calibrated, preheat_measured=observed.get("preheat_measured"),
            interpass_measured=observed.get("interpass_measured"),
            temperature_method=observed.get("temperature_method") or None, **values,
        )
        inspection.save(user=user)
        seals.seal(inspection, "inspection.signed")
        for photo in photos:
            attached = Photo(inspection=inspection, image=photo.image.name, thumbnail=photo.thumbnail.name,
                             caption=photo.caption, width=photo.width, height=photo.height,
                             content_type=photo.content_type, sha256=photo.sha256, uploaded_by=user,
                             uploaded_at=photo.uploaded_at)
            attached.save(user=user)
            seals.seal(attached, "photo.attached")
        _point_weld_at(weld, inspection)
        if stage == InspectionStage.FINAL:
            if verdict.accepted:
                close_ncrs_for(inspection)
            else:
                open_ncr(inspection, user, ncr_description(weld, verdict))
        elif stage == InspectionStage.IN_PROCESS and below_preheat(verdict):  # welded outside the WPS's temperatures
            open_ncr(inspection, user, ncr_description(weld, verdict, "in-process inspection"))
        inspection.verdict = verdict
        signed.append(inspection)
    if draft is not None and draft.pk:
        DraftPhoto.objects.filter(draft=draft).delete()  # rows only: the files now belong to the signed photos
        draft.delete()
    refresh_assembly_state(first.assembly, user)
    return signed


def _point_weld_at(weld: Weld, inspection: Inspection) -> None:
    """Keep the weld's pointers to its latest current inspection and latest current final one.

    A new inspection is signed at the time it is stored, so it is the weld's newest; a correction that replaces a
    final inspection with another stage leaves the previous current final one (if any) as the latest final.
    """
    fields = {"latest_inspection": inspection}
    if inspection.stage == InspectionStage.FINAL:
        fields["latest_final"] = inspection
    elif inspection.supersedes_id is not None and inspection.supersedes_id == (
            Weld.objects.filter(pk=weld.pk).values_list("latest_final_id", flat=True).get()):
        fields["latest_final"] = (Inspection.objects.current().filter(weld=weld, stage=InspectionStage.FINAL)
                                  .order_by("-inspected_at", "-pk").first())
    # The version moves on too: a weld form opened before the inspection is stale (and the weld now frozen).
    Weld.objects.filter(pk=weld.pk).update(**fields, version=F("version") + 1)
    for name, value in fields.items():
        setattr(weld, name, value)


def ncr_description(weld: Weld, verdict: Verdict, at: str = "final visual inspection") -> str:
    """What the NCR says was found, in the findings' headings (never the engine's names)."""
    lines = [f"Weld {weld.mark} on {weld.assembly.piece_mark} rejected at {at} "
             f"({verdict.criteria_title}):"]
    lines += [f"- {observations.criterion_label(f.criterion)}: {f.message}" for f in verdict.rejections]
    return "\n".join(lines)


# --- drafts: what an inspector has typed and photographed, not signed --------------------------------------------

def draft_for(weld: Weld, user) -> InspectionDraft | None:
    """The inspector's own draft of this weld (nobody else's is ever returned)."""
    return InspectionDraft.objects.filter(weld=weld, inspector=user).first()


def _no_nul(value):
    """A typed value without NUL characters: nobody types one, and PostgreSQL's JSON cannot hold it (the form
    refuses it beside the field; the draft keeps the rest of what was typed)."""
    if isinstance(value, str):
        return value.replace("\x00", "")
    if isinstance(value, list | tuple):
        return [_no_nul(v) for v in value]
    return value


def keep_draft(weld: Weld, user, data: dict) -> InspectionDraft:
    """Keep (or update) the inspector's draft of this weld with the form as typed (text values only)."""
    plain = {k: _no_nul(v) for k, v in data.items() if k not in ("csrfmiddlewaretoken", "shown_verdict")}
    draft, created = InspectionDraft.objects.get_or_create(weld=weld, inspector=user, defaults={"data": plain})
    if not created:
        draft.data, draft.updated_at = plain, timezone.now()
        draft.save(update_fields=["data", "updated_at"])
    return draft


def add_draft_photo(weld: Weld, user, clean, caption: str = "") -> DraftPhoto:
    """A photo taken before signing (cleaned by inspections.photos), held in the inspector's draft of the weld."""
    from django.core.files.base import ContentFile

    draft = draft_for(weld, user) or keep_draft(weld, user, {})
    stem = f"{clean.sha256[:16]}"
    return DraftPhoto.objects.create(
        draft=draft, caption=caption, width=clean.width, height=clean.height, content_type=clean.content_type,
        sha256=clean.sha256, image=ContentFile(clean.content, name=f"{stem}.{clean.extension}"),
        thumbnail=ContentFile(clean.thumbnail, name=f"{stem}-thumb.jpg"))


def discard_draft(draft: InspectionDraft) -> None:
    """Throw a draft away with its photos (their files too: no record points at them)."""
    for photo in draft.photos.all():
        photo.image.delete(save=False)
        photo.thumbnail.delete(save=False)
    draft.delete()
