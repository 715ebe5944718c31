"""Material traceability's steps: mill certificates (heats) and the parts of an assembly cut from them.

A certificate is recorded once, as printed (record_certificate), and withdrawn with a reason (withdraw_certificate,
through core.transitions); a part likewise (record_part, withdraw_part). A weld names the parts it joins
(record_weld_parts), and may take its base-metal thicknesses from them. part_blockers() is what the proof chain
(inspections.services.chain) asks of an assembly's parts: each part's heat against its specified grade and, where
the job requires mill certificates, the heat recorded, its certificate of the right type and its scan attached
(inspections.material judges the grades and the type). recall_heat() answers "what did heat H go into".
"""

from django.db import transaction
from django.db.models import Q
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from core.roles import require
from core.transitions import required_reason, transition
from inspections import material as engine
from inspections.models import Assembly, AssemblyState, MaterialState, MillCertificate, Part, Weld
from inspections.models.jobs import CLOSED_STATES
from inspections.services.trace import REGISTERS, record

PARTS = "job.manage"  # parts are the assembly's drawing data, kept by whoever keeps weld maps


# --- certificates ------------------------------------------------------------------------------------------------

def record_certificate(certificate: MillCertificate, user) -> MillCertificate:
    return record(certificate, user)


def withdraw_certificate(certificate: MillCertificate, user, reason: str) -> MillCertificate:
    """Take a certificate off (a typing mistake, a certificate replaced by the mill); parts keep naming it, and the
    chain blocks their assemblies until the parts are recorded again with a heat on file."""
    reason = required_reason(reason, "withdrawing the certificate")
    return transition(certificate, to=MaterialState.WITHDRAWN, allowed_from={MaterialState.ON_FILE}, user=user,
                      permission=REGISTERS, reason=reason, withdrawn_reason=reason[:200],
                      withdrawn_at=timezone.now())


# --- parts -------------------------------------------------------------------------------------------------------

@transaction.atomic
def record_part(part: Part, user) -> Part:
    """Put a part on an open assembly (the form has read its grade and thickness)."""
    require(user, PARTS)
    state = Assembly.objects.filter(pk=part.assembly_id).values_list("state", flat=True).get()
    if state in CLOSED_STATES:
        raise Refused(f"The assembly is {AssemblyState(state).label.lower()}: its parts are frozen.", code="closed")
    if part.heat_id and part.heat.state != MaterialState.ON_FILE:
        raise Refused(f"{part.heat} is withdrawn: choose a heat on file.", code="heat")
    part.recorded_by = user
    part.save(user=user)
    return part


def withdraw_part(part: Part, user, reason: str) -> Part:
    """Take a part off its assembly (a mistyped heat or grade): record it again. Not once the assembly is closed."""
    reason = required_reason(reason, "withdrawing the part")

    def still_open(locked):
        if locked.assembly.state in CLOSED_STATES:
            raise Refused(f"The assembly is {locked.assembly.get_state_display().lower()}: its parts are frozen.",
                          code="closed")

    return transition(part, to=MaterialState.WITHDRAWN, allowed_from={MaterialState.ON_FILE}, user=user,
                      permission=PARTS, reason=reason, check=still_open, withdrawn_reason=reason[:200],
                      withdrawn_at=timezone.now())


@transaction.atomic
def record_weld_parts(weld: Weld, part1: Part | None, part2: Part | None, user, take_thickness=True) -> Weld:
    """Name the parts a weld joins; with take_thickness, its thickness of part 1 and 2 become the parts'; a blank
    `base_metals` becomes the parts' specified grades (a typed one is kept). Drawing data: frozen at the weld's first
    inspection (RecordLocked after; a revision changes it)."""
    require(user, PARTS)
    for part in (part1, part2):
        if part is not None and part.assembly_id != weld.assembly_id:
            raise Refused(f"{part} is not a part of {weld.assembly.piece_mark}.", code="part")
    weld.part1, weld.part2 = part1, part2
    if take_thickness:
        weld.thickness1 = part1.thickness if part1 is not None else weld.thickness1
        weld.thickness2 = part2.thickness if part2 is not None else weld.thickness2
    if not weld.base_metals.strip():  # the steels joined, when not typed yet (the 48 h rule reads them)
        weld.base_metals = ", ".join(dict.fromkeys(p.specified_grade for p in (part1, part2) if p is not None))
    weld.save(user=user)
    return weld


def thickness_differences(weld: Weld) -> list[str]:
    """Where the weld's typed thickness differs from the part it names (shown on the weld's parts page)."""
    found = []
    for n, part in ((1, weld.part1), (2, weld.part2)):
        typed = getattr(weld, f"thickness{n}")
        if part is not None and typed is not None and typed.mm != part.thickness.mm:
            found.append(f"thickness of part {n} is recorded as {typed.mm.normalize()} mm; part {part.mark} is "
                         f"{part.thickness.mm.normalize()} mm")
    return found


# --- the chain's link: parts against their grades and the job's certificate rule ---------------------------------

def parts_of(assembly_ids) -> dict[int, list[Part]]:
    """The parts on file of these assemblies with their heats, {assembly_id: parts}: one query."""
    found = {pk: [] for pk in assembly_ids}
    if not found:
        return found
    for part in (Part.objects.filter(assembly_id__in=list(found), state=MaterialState.ON_FILE)
                 .select_related("heat").order_by("assembly_id", "mark", "pk")):
        found[part.assembly_id].append(part)
    return found


def part_problems(part: Part, job) -> list[tuple[str, str]]:
    """Why this part does not hold: (words, the page where it is put right). No query (the heat is loaded)."""
    subject = f"Part {part.mark}"
    parts_page = reverse("inspections:assembly_parts", args=[part.assembly_id])
    required = job.requires_mill_certificates
    heat = part.heat
    if heat is None:
        if required:
            return [(f"{subject} has no heat recorded: job {job.number} requires mill certificates for every part.",
                     parts_page)]
        return []
    found = []
    if heat.state != MaterialState.ON_FILE:
        found.append((f"{subject}: {heat} was withdrawn ({heat.withdrawn_reason}); withdraw the part and record it "
                      "with a heat on file.", parts_page))
    try:
        specified = engine.parse_grades(part.specified_grade)
        certified = engine.parse_grades(heat.grade)
    except ValueError as exc:
        return [*found, (f"{subject}: its grade cannot be compared with {heat}'s: {exc}", parts_page)]
    answers = [engine.meets(certified, wanted) for wanted in specified]
    for wanted, answer in zip(specified, answers, strict=True):
        if not answer.ok:
            found.append((f"{subject} is specified {wanted}; {heat} is {answer.reason} ({answer.source}).",
                          parts_page))
    if required:
        refusal = engine.certificate_refusal(heat.certificate_type, job.code_family)
        if refusal:
            found.append((f"{subject}: {heat}'s certificate is {refusal}.", heat.get_absolute_url()))
        if not heat.document:
            found.append((f"{subject}: {heat}'s mill certificate is not attached (job {job.number} requires it "
                          "on file).", heat.get_absolute_url()))
    return found


# --- recall: what a heat went into -------------------------------------------------------------------------------

def recall_heat(heat: MillCertificate, start=None, end=None) -> list[dict]:
    """The parts cut from the heat (recorded between the dates) and the welds joining them (welded between the dates),
    with their assemblies' states and jobs: two queries whatever their number, read as plain values."""
    states = dict(AssemblyState.choices)
    rows = []
    parts = Part.objects.filter(heat=heat)
    if start:
        parts = parts.filter(recorded_at__date__gte=start)
    if end:
        parts = parts.filter(recorded_at__date__lte=end)
    assembly_url = reverse("inspections:assembly_parts", args=[0])[:-len("0/parts/")]
    for customer, job, mark, state, part, withdrawn, assembly_id in parts.order_by(
            "assembly__job__number", "assembly__piece_mark", "mark").values_list(
            "assembly__job__customer__name", "assembly__job__number", "assembly__piece_mark", "assembly__state",
            "mark", "state", "assembly_id"):
        rows.append({"customer": customer, "job": job, "assembly": mark, "assembly_state": states.get(state, state),
                     "part": part + (" (withdrawn)" if withdrawn != MaterialState.ON_FILE else ""), "weld": "",
                     "welded_on": "", "repaired_on": "", "inspection": "", "stage": "", "verdict": "", "inspector": "",
                     "url": f"{assembly_url}{assembly_id}/parts/"})
    welds = Weld.objects.filter(Q(part1__heat=heat) | Q(part2__heat=heat))
    if start:
        welds = welds.filter(welded_on__gte=start)
    if end:
        welds = welds.filter(welded_on__lte=end)
    weld_url = reverse("inspections:weld_detail", args=[0])[:-2]
    for customer, job, mark, state, weld, welded_on, pk, p1, p2 in welds.order_by("welded_on", "pk").values_list(
            "assembly__job__customer__name", "assembly__job__number", "assembly__piece_mark", "assembly__state",
            "mark", "welded_on", "pk", "part1__mark", "part2__mark"):
        rows.append({"customer": customer, "job": job, "assembly": mark, "assembly_state": states.get(state, state),
                     "part": " + ".join(p for p in (p1, p2) if p), "weld": weld,
                     "welded_on": welded_on.isoformat() if welded_on else "", "repaired_on": "", "inspection": "",
                     "stage": "",
                     "verdict": "", "inspector": "", "url": f"{weld_url}{pk}/"})
    return rows


def heats_of_job(job) -> list[dict]:
    """The heats used on a job's parts on file, each with the parts cut from it (the packet's summary): one query."""
    found = {}
    for part in (Part.objects.filter(assembly__job=job, state=MaterialState.ON_FILE, heat__isnull=False)
                 .select_related("heat", "assembly").order_by("heat__heat_number", "assembly__piece_mark", "mark")):
        entry = found.setdefault(part.heat_id, {"heat": part.heat, "parts": []})
        entry["parts"].append(f"{part.assembly.piece_mark}/{part.mark}")
    return list(found.values())
