"""Judge and sign inspections: the one path by which an inspection comes into the database.

`judge(weld, observed)` asks the acceptance engine (inspections.acceptance.evaluate) about one weld; it adds no
rule of its own. `sign_inspection(...)` stores the observations with the verdict, the findings and the criteria
set's key and version in one transaction, then moves the repair loop on: an NCR opened for a rejected final
inspection, open NCRs closed by an accepted one, the assembly's state refreshed.
"""


from django.db import transaction
from django.db.models import F

from core import seals
from core.errors import Refused
from core.units import Length, format_length
from inspections.acceptance import Finding, Verdict, evaluate
from inspections.models import Assembly, AssemblyState, Inspection, InspectionStage, Weld
from inspections.models.inspection import COUNT_OBSERVATIONS, FLAG_OBSERVATIONS, LENGTH_OBSERVATIONS
from inspections.services.assemblies import refresh_assembly_state
from inspections.services.ncr import close_ncrs_for, open_ncr
from inspections.strength import effective_throat


def nominal_throat(weld: Weld) -> Length:
    """The nominal throat a of the specified fillet (the strength engine's effective throat, AISC 360-16 J2.2a)."""
    return effective_throat(weld.size, weld.size2)


def weld_for_engine(weld: Weld) -> dict:
    """The engine's weld dict from a weld-map line.

    thickness: undercut is judged at the toe on the thinner part joined (the stricter reading, since either toe
    can undercut; the weld map does not say which part a toe lies on).
    """
    system = weld.assembly.job.unit_system
    return {
        "system": system,
        "size": min(weld.size, weld.size2) if weld.size2 is not None else weld.size,
        "throat": nominal_throat(weld),
        "length": weld.length,
        "thickness": weld.thinner_part,
        "primary_member": weld.primary_member,
        "transverse_to_tension": weld.transverse_to_tension,
    }


def observed_for_engine(observed: dict) -> dict:
    """Observations as the engine reads them: absent or empty measurements left out, flags as booleans."""
    out = {}
    for name in LENGTH_OBSERVATIONS:
        if observed.get(name) is not None:
            out[name] = observed[name]
    for name in COUNT_OBSERVATIONS:
        if observed.get(name) is not None:
            out[name] = int(observed[name])
    for name in FLAG_OBSERVATIONS:
        out[name] = bool(observed.get(name, False))
    return out


# A fit-up inspection is a hold point before welding: there is no weld yet to measure against the visual
# acceptance criteria, so the inspector judges the joint against the drawing and the WPS.
FIT_UP_SOURCE = ("AWS D1.1/D1.1M:2020 clause 7, fabrication: fit-up and dimensional tolerances (clause from "
                 "memory); ISO 5817 applies to the finished weld only. The inspector judges the joint against the "
                 "drawing and the WPS.")


def judge_fit_up(weld: Weld, acceptable: bool) -> Verdict:
    """The fit-up hold point: accepted when the inspector found the joint ready to weld."""
    key, version = weld.assembly.job.criteria_identity()
    message = ("joint, root opening, alignment and cleanliness checked against the drawing and the WPS — "
               + ("ready to weld" if acceptable else "not ready to weld: correct the fit-up and inspect again"))
    finding = Finding(criterion="fit_up", ok=bool(acceptable), message=message, source=FIT_UP_SOURCE,
                      measured=bool(acceptable), criteria_key=key, criteria_version=version)
    return Verdict(accepted=bool(acceptable), findings=(finding,), criteria_key=key, criteria_version=version,
                   criteria_title="Fit-up hold point", system=weld.assembly.job.unit_system)


def judge(weld: Weld, observed: dict, stage: str | None = None) -> Verdict:
    """The verdict of the job's criteria set (client set or built-in) on these observations of this weld.

    At the fit-up stage there is no weld yet: the inspector's fit-up judgement (observed["fit_up_ok"]) decides.
    Raises ValueError (from the engine) when the observations cannot be judged, e.g. a required leg is missing.
    """
    if stage == InspectionStage.FIT_UP:
        return judge_fit_up(weld, bool(observed.get("fit_up_ok")))
    return evaluate(weld.assembly.job.criteria_for_evaluation(), weld_for_engine(weld), observed_for_engine(observed))


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
    if isinstance(value, bool):
        return value
    return str(value)


@transaction.atomic
def sign_inspection(weld: Weld, observed: dict, stage: str, user, supersedes: Inspection | None = None,
                    reason: str = "", remarks: str = "") -> Inspection:
    """Judge, sign and store one inspection; move the NCR and assembly states on. All or nothing.

    A correction names the inspection it supersedes and why; only a current inspection of the same weld can be
    superseded (locked, so two people correcting one inspection at once cannot both succeed).
    """
    if stage not in InspectionStage.values:
        raise Refused(f"Stage must be one of {', '.join(InspectionStage.values)}, not {stage!r}.")
    seals.lock_chain()  # first: this transaction seals, then locks NCRs and the assembly (core.seals, lock order)
    # Lock the weld row (a no-op on SQLite, whose IMMEDIATE transaction already holds the write lock), and read
    # the assembly's state afresh under it; the weld map data itself is what the form was judged against.
    Weld.objects.select_for_update().filter(pk=weld.pk).values_list("pk", flat=True).get()
    state = Assembly.objects.filter(pk=weld.assembly_id).values_list("state", flat=True).get()
    if state in (AssemblyState.RELEASED, AssemblyState.SCRAPPED):
        raise Refused(f"Assembly {weld.assembly.piece_mark} is {AssemblyState(state).label.lower()}: "
                      "its welds take no more inspections.")
    if supersedes is not None:
        supersedes = Inspection.objects.select_for_update().get(pk=supersedes.pk)
        if supersedes.weld_id != weld.pk:
            raise Refused("A correction must be of the same weld as the inspection it supersedes.")
        if Inspection.objects.filter(supersedes=supersedes).exists():
            raise Refused("That inspection has already been corrected; correct the latest one instead.")
        if not reason.strip():
            raise Refused("Say why the inspection is being corrected.")
        if weld.revised_at is not None and supersedes.inspected_at <= weld.revised_at:
            raise Refused(f"Weld {weld.mark} was revised after that inspection: inspect it again instead of "
                          "correcting an inspection of its earlier data.")
    verdict = judge(weld, observed, stage)
    key, version = weld.assembly.job.criteria_identity()
    values = observed_for_engine(observed)
    inspection = Inspection(
        weld=weld, stage=stage, inspector=user, supersedes=supersedes, correction_reason=reason.strip(),
        remarks=remarks, accepted=verdict.accepted, findings=findings_json(verdict, verdict.system),
        criteria_key=key, criteria_version=version, **values,
    )
    inspection.save(user=user)
    seals.seal(inspection, "inspection.signed")
    _point_weld_at(weld, inspection)
    if stage == InspectionStage.FINAL:
        if verdict.accepted:
            close_ncrs_for(inspection)
        else:
            open_ncr(inspection, user, ncr_description(weld, verdict))
    refresh_assembly_state(weld.assembly, user)
    return inspection


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


def ncr_description(weld: Weld, verdict: Verdict) -> str:
    lines = [f"Weld {weld.mark} on {weld.assembly.piece_mark} rejected at final visual inspection "
             f"({verdict.criteria_title}):"]
    lines += [f"- {f.criterion}: {f.message}" for f in verdict.rejections]
    return "\n".join(lines)
