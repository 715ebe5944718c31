"""Each weld's proof chain, link by link: the one place release, the assembly page and the traveler ask.

For every weld of an assembly (and each recorded repair of it), on the day it was welded:
1. WPS: named; approved on that day and neither withdrawn nor superseded before it (WPS.in_force_on); covering the
   weld (procedures.applicability: the job's code and units, process, joint, position and progression, thickness
   of both parts, fillet size).
2. Welders: recorded; each qualified and in continuity on that day for the weld made to that WPS
   (procedures.eligibility, which asks procedures.qualification).
3. Inspection: an accepted current final visual (or an NCR closed as use-as-is), no NCR open
   (services.assemblies.weld_statuses); an NCR for repair closes only on a re-inspection after the repair.
4. Hold point: where the job requires it, an accepted current fit-up inspection.
5. Filler: the lot recorded for the weld has the WPS's classification (a lot not recorded blocks only where the job
   requires lots, Job.filler_lot_required; an NCR closed as use-as-is accepts a mismatch, as for every deviation).
6. Material (the assembly's parts, not a weld's): each part's heat meets its specified grade; where the job requires
   mill certificates, every part names a heat whose certificate is of the right type and attached
   (services.material.part_problems, inspections.material). Read into Chains.parts: one query.
7. Consumables: for a low-hydrogen SMAW lot (of the weld or of a repair), no issue of it to the welder covering the
   date went past its exposure limit, came from an oven below its minimum, or from a batch rebaked badly or twice
   (services.consumables.weld_exposures; no issue recorded is not a blocker); for a SAW flux-wire lot, its flux
   was usable all the weld's day by the oven log's flux rows (AWS D1.1 clause 7.3.3.2; no record, no blocker).

check_assembly() answers all of it in a fixed number of queries whatever the number of welds, repairs and welders
(tests/test_chain_queries.py pins it). Each problem is a Blocker: the words, and the page where it is put right.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date

from django.urls import reverse
from django.utils import timezone

from inspections.models import FillerLot, Inspection, InspectionStage, Job, Weld, WeldRepair
from inspections.models.ncr import NCRState
from inspections.services import consumables, material
from inspections.services.assemblies import WeldStatus, weld_statuses
from procedures import applicability, eligibility
from procedures.electrodes import decode
from procedures.models.wps import WPS


class Blocker(str):
    """One reason release waits, in words (it is a str), with the page where it is put right (`url`, or '')."""

    url: str

    def __new__(cls, text: str, url: str = ""):
        blocker = super().__new__(cls, text)
        blocker.url = url
        return blocker


@dataclass
class WpsCheck:
    """The WPS link of one weld (or repair) on its day: errors mean it does not hold; notes are for reading."""

    wps: WPS | None
    errors: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return self.wps is not None and not self.errors


@dataclass
class RepairChain:
    repair: WeldRepair
    wps: WpsCheck
    welders: eligibility.WeldCheck


@dataclass
class WeldChain:
    weld: Weld
    day: date | None  # the weld date; None when not recorded
    wps: WpsCheck
    welders: eligibility.WeldCheck  # judged on the weld date (today for an undated weld, shown but not relied on)
    status: WeldStatus
    repairs: list[RepairChain] = field(default_factory=list)
    fit_up: Inspection | None = None
    fit_up_required: bool = False
    filler: str = ""  # why the filler lot does not match the WPS ("" when it does, or none is recorded)
    exposure: list = field(default_factory=list)  # [(problem, url)]: consumable control (services.consumables)
    blockers: list[Blocker] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.blockers


# --- the WPS link -----------------------------------------------------------------------------------------------

def prime_successors(wps_list) -> None:
    """Load the next revision of every WPS (WPS.superseded_by) in one query, unless already cached."""
    wanted = [w for w in wps_list if w is not None and not WPS.superseded_by.is_cached(w)]
    if not wanted:
        return
    found = {s.supersedes_id: s for s in WPS.objects.filter(supersedes_id__in={w.pk for w in wanted})
             .only("pk", "number", "revision", "state", "approved_at", "supersedes_id")}
    for wps in wanted:  # each weld row has its own WPS instance, even for the same WPS
        WPS.superseded_by.related.set_cached_value(wps, found.get(wps.pk))


def wps_check(weld, wps, job, day, label=None) -> WpsCheck:
    """Is `wps` in force on `day` and does it cover the weld on this job? (No query when the WPS's next revision is
    loaded: _prime_successors.)"""
    return WpsChecker(job, day).check(weld, wps, label)


class WpsChecker:
    """wps_check() of many welds on one job and day (a weld map's rows): what depends on the WPS alone -- in force
    on the day, its values as applicability reads them -- is worked out once per WPS, and the answer for a weld
    once per WPS and weld values (label included: weld maps repeat W1, W2... on every assembly)."""

    def __init__(self, job, day):
        self.job, self.day = job, day
        self._per_wps = {}  # wps.pk -> (why not in force or None, applicability.reviewer or why it cannot be read)
        self._answers = {}  # (wps.pk, the weld's applicability values) -> (errors, notes)

    def check(self, weld, wps, label=None) -> WpsCheck:
        if wps is None:
            return WpsCheck(None, ["no WPS is named"])
        values = weld.applicability_input(label)
        if wps.pk is None:
            return self._check(values, wps)
        key = (wps.pk, tuple((k, tuple(v) if isinstance(v, list) else v) for k, v in values.items()))
        if key not in self._answers:
            check = self._check(values, wps)
            self._answers[key] = (tuple(check.errors), tuple(check.notes))
        errors, notes = self._answers[key]
        return WpsCheck(wps, list(errors), list(notes))

    def _check(self, values, wps) -> WpsCheck:
        check = WpsCheck(wps)
        if wps.pk is None or wps.pk not in self._per_wps:
            try:
                review = applicability.reviewer(wps.applicability_input(), self.job.applicability_input())
            except ValueError as exc:
                review = str(exc)
            known = (wps.in_force_on(self.day), review)
            if wps.pk is not None:
                self._per_wps[wps.pk] = known
        else:
            known = self._per_wps[wps.pk]
        reason, review = known
        if reason:
            check.errors.append(reason)
        try:
            if isinstance(review, str):
                raise ValueError(review)
            findings = review(values)
        except ValueError as exc:
            check.errors.append(f"{wps} cannot be compared with the weld: {exc}")
            return check
        for finding in findings:
            (check.errors if finding.severity == "error" else check.notes).append(
                f"{finding.message} ({finding.source})")
        return check


def wps_checks(welds, job, on=None) -> dict[int, WpsCheck]:
    """The WPS link of each weld (the tablet's cards): on the weld date, else `on`, else today. One query at most."""
    welds = list(welds)
    prime_successors([w.wps for w in welds])
    today = on or timezone.localdate()
    return {w.pk: wps_check(w, w.wps, job, w.welded_on or today) for w in welds}


# --- the whole chain --------------------------------------------------------------------------------------------

def _job(assembly) -> Job:
    if type(assembly).job.is_cached(assembly):
        job = assembly.job
        if not job.client_criteria_id or Job.client_criteria.is_cached(job):
            return job
    job = Job.objects.select_related("client_criteria").get(pk=assembly.job_id)
    assembly.job = job
    return job


def assembly_welds(assembly):
    """The weld map as the chain reads it: WPS joined, welders prefetched, by mark (two queries)."""
    return list(Weld.objects.filter(assembly_id=assembly.pk).select_related("wps").prefetch_related("welders")
                .order_by("mark"))


def repaired_weld(weld, wps, welded_on):
    """The weld as a repair made it: the same joint, to the repair's WPS, on the repair's day (never saved)."""
    return Weld(pk=weld.pk, assembly_id=weld.assembly_id, mark=weld.mark, joint_type=weld.joint_type,
                size=weld.size, size2=weld.size2, length=weld.length, thickness1=weld.thickness1,
                thickness2=weld.thickness2, position=weld.position, process=weld.process, wps=wps,
                welded_on=welded_on)


class Chains(dict):
    """{weld.pk: WeldChain} of one assembly, with `part_list`, its parts on file (heats loaded), and `parts`, their
    blockers (the material link), which blockers_of() lists after the welds'."""

    part_list: list
    parts: list


def check_assembly(assembly, welds=None, statuses=None) -> dict[int, WeldChain]:
    """Every weld's chain, {weld.pk: WeldChain} in weld mark order. Pass the page's welds (select_related('wps'),
    prefetch_related('welders')) and statuses to share them; the query count stays fixed either way."""
    welds = assembly_welds(assembly) if welds is None else list(welds)
    return _check([(_job(assembly), welds)], statuses, [assembly.pk])[0]


def check_assemblies(assemblies) -> dict[int, dict[int, WeldChain]]:
    """check_assembly for many assemblies at once, {assembly.pk: chains}, in the same fixed number of queries
    whatever the number of assemblies (the morning page asks it of every assembly waiting for release). Pass them
    with select_related('job__client_criteria')."""
    assemblies = list(assemblies)
    if not assemblies:
        return {}
    by_assembly = {a.pk: [] for a in assemblies}
    for weld in (Weld.objects.filter(assembly_id__in=list(by_assembly)).select_related("wps")
                 .prefetch_related("welders").order_by("assembly_id", "mark")):
        by_assembly[weld.assembly_id].append(weld)
    found = _check([(_job(a), by_assembly[a.pk]) for a in assemblies], None, [a.pk for a in assemblies])
    return {a.pk: chains for a, chains in zip(assemblies, found, strict=True)}


def inspection_blockers(assemblies) -> dict[int, list[Blocker]]:
    """The inspection link alone (accepted current final visual, no NCR open) of every weld of many assemblies,
    {assembly.pk: blockers}, from the database in three queries whatever their number: what the morning page asks
    before running the whole chain (the engines) only for the assemblies this link does not already stop. An empty
    weld map is a blocker too."""
    assemblies = list(assemblies)
    if not assemblies:
        return {}
    welds = list(Weld.objects.filter(assembly_id__in=[a.pk for a in assemblies]).only("pk", "mark", "assembly_id")
                 .order_by("assembly_id", "mark"))
    statuses = weld_statuses([w.pk for w in welds])
    repaired = {}
    for weld_id, ncr_id in WeldRepair.objects.filter(weld_id__in=[w.pk for w in welds]).values_list("weld_id",
                                                                                                     "ncr_id"):
        repaired.setdefault(weld_id, set()).add(ncr_id)
    found = {a.pk: [] for a in assemblies}
    for weld in welds:
        found[weld.assembly_id] += _status_blockers(f"Weld {weld.mark}", weld, statuses[weld.pk],
                                                    repaired.get(weld.pk, set()))
    for assembly in assemblies:
        if not any(w.assembly_id == assembly.pk for w in welds):
            found[assembly.pk] = [Blocker("The weld map is empty: add the welds before release.")]
    return found


def _check(items, statuses=None, assembly_ids=()) -> list[dict[int, WeldChain]]:
    """The chains of each (job, welds) pair, in order: every query made once for all of them. assembly_ids: the
    assembly of each pair, for the material link."""
    ids = [w.pk for _job_, welds in items for w in welds]
    statuses = statuses if statuses is not None else weld_statuses(ids)
    repairs = {}
    if ids:
        for repair in (WeldRepair.objects.filter(weld_id__in=ids).select_related("wps", "ncr", "filler_lot")
                       .prefetch_related("welders").order_by("welded_on", "pk")):
            repairs.setdefault(repair.weld_id, []).append(repair)
    everything = [w for _job_, welds in items for w in welds]
    prime_successors([w.wps for w in everything] + [r.wps for rs in repairs.values() for r in rs])
    today = timezone.localdate()
    works = [eligibility.Work(("weld", w.pk), w, tuple(w.welders.all()), w.welded_on or today) for w in everything]
    by_weld = {w.pk: w for w in everything}
    for weld_id, done in repairs.items():
        works += [eligibility.Work(("repair", r.pk), repaired_weld(by_weld[weld_id], r.wps, r.welded_on),
                                   tuple(r.welders.all()), r.welded_on) for r in done]
    checks = eligibility.check_work(works) if works else {}
    held = [w.pk for job, welds in items if job.fit_up_hold_point for w in welds]
    fit_ups = _fit_ups(held) if held else {}
    lots = _filler_lots(everything)
    # Consumable control of welds and repairs: one query when one names a low-hydrogen SMAW lot.
    exposures = consumables.weld_exposures(everything + [r for done in repairs.values() for r in done])

    parts = material.parts_of(assembly_ids)  # the material link: one query
    found = []
    for index, (job, welds) in enumerate(items):
        chains = Chains()
        chains.part_list = parts[assembly_ids[index]] if assembly_ids else []
        chains.parts = [Blocker(*problem) for part in chains.part_list
                        for problem in material.part_problems(part, job)]
        for weld in welds:
            day = weld.welded_on
            chain = WeldChain(weld, day, wps_check(weld, weld.wps, job, day or today), checks[("weld", weld.pk)],
                              statuses[weld.pk], fit_up=fit_ups.get(weld.pk), fit_up_required=job.fit_up_hold_point,
                              filler=filler_mismatch(lots.get(weld.filler_lot_id), weld.wps)
                              or filler_missing(weld, job),
                              exposure=exposures.get(("Weld", weld.pk), []))
            for repair in repairs.get(weld.pk, []):
                label = f"Weld {weld.mark} as repaired ({repair.ncr.number})"
                chain.exposure += [(f"repair for {repair.ncr.number}: {problem}", url)
                                   for problem, url in exposures.get(("WeldRepair", repair.pk), [])]
                chain.repairs.append(RepairChain(repair, wps_check(weld, repair.wps, job, repair.welded_on, label),
                                                 checks[("repair", repair.pk)]))
            chain.blockers = _blockers(chain)
            chains[weld.pk] = chain
        found.append(chains)
    return found


def _filler_lots(welds) -> dict[int, FillerLot]:
    """The filler lots the welds name (one query when any does, none otherwise), set on each weld too."""
    wanted = {w.filler_lot_id for w in welds if w.filler_lot_id}
    lots = {lot.pk: lot for lot in FillerLot.objects.filter(pk__in=wanted)} if wanted else {}
    for weld in welds:
        if weld.filler_lot_id:
            Weld.filler_lot.field.set_cached_value(weld, lots[weld.filler_lot_id])
    return lots


def filler_mismatch(lot: FillerLot | None, wps: WPS | None) -> str:
    """Why the lot does not match the WPS's filler classification ("" when it does, or either is missing). Both
    are read by procedures.electrodes.decode, so E71T-1C and e71t-1c are one classification and E71T-1C and
    E71T-1M are two (the shielding gas is part of the classification, AWS A5.20/A5.20M; from memory)."""
    if lot is None or wps is None or not wps.electrode:
        return ""
    try:
        used, specified = decode(lot.classification).classification, decode(wps.electrode).classification
    except ValueError as exc:
        return f"filler lot {lot.lot_number} cannot be compared with {wps}: {exc}"
    if used != specified:
        return (f"filler lot {lot.lot_number} is {used}; {wps} specifies {specified} (a different classification "
                "is a different filler metal: the WPS names it, AWS D1.1/D1.1M:2020 clause 5 and Table 6.5, "
                "ISO 15609-1:2019; from memory)")
    return ""


def filler_missing(weld, job) -> str:
    """Why the weld's missing filler lot blocks (the job asks every weld's lot: a contract's traceability clause,
    common practice, no source); "" when a lot is named or the job does not ask."""
    if weld.filler_lot_id or not job.filler_lot_required:
        return ""
    return "no filler lot is recorded (this job requires the filler lot of every weld)"


def _fit_ups(ids) -> dict[int, Inspection]:
    """The latest current fit-up inspection of each weld (one query)."""
    latest = {}
    for inspection in (Inspection.objects.current().filter(weld_id__in=ids, stage=InspectionStage.FIT_UP)
                       .select_related("inspector").order_by("weld_id", "-inspected_at", "-pk")):
        latest.setdefault(inspection.weld_id, inspection)
    return latest


# --- the blockers, in words with their pages ---------------------------------------------------------------------

def _url(name, pk):
    return reverse(name, args=[pk])


def _wps_blockers(subject, check: WpsCheck, edit_url) -> list[Blocker]:
    if check.wps is None:
        return [Blocker(f"{subject}: no WPS is named.", edit_url)]
    # The engine's messages name the weld ("Weld W1 part 2 is ..."), WPS.in_force_on's the WPS: say each once.
    return [Blocker(error if error.startswith("Weld ") else f"{subject}: {error}", check.wps.get_absolute_url())
            for error in check.errors]


def _welder_blockers(subject, check: eligibility.WeldCheck, day, edit_url) -> list[Blocker]:
    if not check.checks:
        return [Blocker(f"{subject}: no welder is recorded.", edit_url)]
    found = []
    for one in check.checks:
        if not one.allowed:
            found.append(Blocker(f"{subject}: welder {one.welder.stamp} is not qualified and in continuity on "
                                 f"{day.isoformat()}: {' '.join(one.reasons)}", one.welder.get_absolute_url()))
    return found


def _blockers(chain: WeldChain) -> list[Blocker]:
    weld = chain.weld
    subject = f"Weld {weld.mark}"
    edit = _url("inspections:weld_edit", weld.pk)
    found = []
    if chain.day is None:
        found.append(Blocker(f"{subject}: no weld date is recorded, so the WPS and the welders cannot be checked "
                             "for the day it was welded.", edit))
        if chain.wps.wps is None:
            found.append(Blocker(f"{subject}: no WPS is named.", edit))
        if not chain.welders.checks:
            found.append(Blocker(f"{subject}: no welder is recorded.", edit))
    elif chain.wps.wps is None:
        # Without a WPS the welders cannot be judged (the process and electrode are the WPS's): one blocker.
        found.append(Blocker(f"{subject}: no WPS is named.", edit))
        if not chain.welders.checks:
            found.append(Blocker(f"{subject}: no welder is recorded.", edit))
    else:
        found += _wps_blockers(subject, chain.wps, edit)
        found += _welder_blockers(subject, chain.welders, chain.day, edit)
    for item in chain.repairs:
        repair = item.repair
        about = f"{subject}, repair for {repair.ncr.number} ({repair.welded_on.isoformat()})"
        found += _wps_blockers(about, item.wps, repair.ncr.get_absolute_url())
        found += _welder_blockers(about, item.welders, repair.welded_on, repair.ncr.get_absolute_url())
    found += _inspection_blockers(subject, chain)
    if chain.filler and not chain.status.accepted_as_is:
        found.append(Blocker(f"{subject}: {chain.filler}.", _url("inspections:weld_filler", weld.pk)))
    if not chain.status.accepted_as_is:  # consumable control: an NCR closed as use-as-is accepts it too
        found += [Blocker(f"{subject}: {problem}.", url) for problem, url in chain.exposure]
    if chain.fit_up_required:
        fit_up = chain.fit_up
        if fit_up is None:
            found.append(Blocker(f"{subject}: the fit-up hold point is not signed (this job requires an accepted "
                                 "fit-up inspection before welding).", _url("inspections:inspect_weld", weld.pk)))
        elif not fit_up.accepted:
            found.append(Blocker(f"{subject}: its current fit-up inspection rejected the fit-up.",
                                 fit_up.get_absolute_url()))
    return found


def _inspection_blockers(subject, chain: WeldChain) -> list[Blocker]:
    return _status_blockers(subject, chain.weld, chain.status, {item.repair.ncr_id for item in chain.repairs})


def _status_blockers(subject, weld, status: WeldStatus, repaired) -> list[Blocker]:
    """The inspection link of one weld: its open NCRs (with the step each waits for), else its final visual."""
    found = []
    for ncr in status.open_ncrs:
        if ncr.state == NCRState.OPEN:
            step = "awaiting disposition"
        elif ncr.pk not in repaired:
            step = "repair not recorded as welded yet"
        else:
            step = "repair awaiting re-inspection"
        found.append(Blocker(f"{subject}: {ncr} is open ({step}).", ncr.get_absolute_url()))
    if status.open_ncrs:
        return found
    inspect = _url("inspections:inspect_weld", weld.pk)
    if status.final is None:
        found.append(Blocker(f"{subject} has no final visual inspection.", inspect))
    elif not status.released_ok:
        found.append(Blocker(f"{subject}: its current final inspection rejected it.", status.final.get_absolute_url()))
    return found


def blockers_of(chains) -> list[Blocker]:
    """Every blocker of these chains, weld by weld in mark order, then the assembly's parts' (the material link)."""
    return [b for chain in chains.values() for b in chain.blockers] + list(getattr(chains, "parts", []))
