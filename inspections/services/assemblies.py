"""Assembly state: sent for inspection, rejected and back, released (or scrapped by an NCR disposition).

in_fabrication -> awaiting_inspection (submit_for_inspection, or a final inspection recorded)
awaiting_inspection -> rejected (a rejected inspection or an open NCR; refresh_assembly_state)
rejected -> awaiting_inspection (nothing blocks any more; refresh_assembly_state)
awaiting_inspection -> released (release, by the QA lead, refused while anything blocks)
any -> scrapped (an NCR dispositioned as scrap; inspections.services.ncr)

Every change goes through core.transitions.transition (lock, check, save, history).
"""

import threading
from dataclasses import dataclass, field

from django.db import transaction
from django.db.models import Exists, OuterRef, Q
from django.utils import timezone

from core import seals
from core.errors import Refused
from core.transitions import transition
from inspections.models import NCR, Assembly, AssemblyState, Inspection, InspectionStage, Weld
from inspections.models.ncr import Disposition, NCRState

CLOSED_STATES = {AssemblyState.RELEASED, AssemblyState.SCRAPPED}


@dataclass
class WeldStatus:
    """Where one weld stands for release: its current inspections, its NCRs, and a short verdict word."""

    weld_id: int
    latest: Inspection | None = None  # the latest current inspection of any stage
    final: Inspection | None = None  # the latest current final visual inspection
    ncrs: list = field(default_factory=list)

    @property
    def open_ncrs(self):
        return [n for n in self.ncrs if n.is_open]

    @property
    def accepted_as_is(self) -> bool:
        """The current final inspection rejected it, and an NCR on that inspection was closed as use-as-is."""
        return bool(self.final and not self.final.accepted and any(
            n.inspection_id == self.final.pk and n.state == NCRState.CLOSED and n.disposition == Disposition.USE_AS_IS
            for n in self.ncrs))

    @property
    def released_ok(self) -> bool:
        """Counts as inspected for release: an accepted current final inspection (or use-as-is), no open NCR."""
        return bool(self.final and (self.final.accepted or self.accepted_as_is)) and not self.open_ncrs

    @property
    def rejected(self) -> bool:
        """Its latest current inspection rejected it (and no use-as-is covers it), or an NCR is open."""
        if self.open_ncrs:
            return True
        if self.latest is None or self.latest.accepted:
            return False
        return not (self.latest is self.final and self.accepted_as_is)

    @property
    def word(self) -> str:
        if self.open_ncrs:
            return "ncr"
        if self.final is not None and self.final.accepted:
            return "accepted"
        if self.accepted_as_is:
            return "use_as_is"
        if self.latest is not None and not self.latest.accepted:
            return "rejected"
        if self.latest is not None:
            return "in_process"
        return "not_inspected"


def weld_statuses(weld_ids) -> dict[int, WeldStatus]:
    """Status of many welds in two queries, whatever their number or their inspection history's length."""
    weld_ids = list(weld_ids)
    statuses = {pk: WeldStatus(pk) for pk in weld_ids}
    if not weld_ids:
        return statuses
    # The weld rows point at their latest current inspection and latest current final one (kept at signing).
    for weld in (Weld.objects.filter(pk__in=weld_ids).only("pk", "latest_inspection", "latest_final")
                 .select_related(*(f"{which}__{what}" for which in ("latest_inspection", "latest_final")
                                   for what in ("inspector", "credential", "gauge_calibration__gauge")))):
        status = statuses[weld.pk]
        status.latest, status.final = weld.latest_inspection, weld.latest_final
        if status.latest is not None and status.final is not None and status.latest.pk == status.final.pk:
            status.final = status.latest  # one object, so `latest is final` holds
    for ncr in NCR.objects.filter(weld_id__in=weld_ids).order_by("-raised_at", "-pk"):
        statuses[ncr.weld_id].ncrs.append(ncr)
    return statuses


def release_blockers(assembly, statuses=None, welds=None, chains=None) -> list[str]:
    """Every reason the assembly cannot be released now, weld by weld, each with the page where it is put right
    (inspections.services.chain: WPS, welders, inspection and NCRs, hold point; original welds and repairs). Empty
    means it may be released. There is no override: an NCR is the one way to accept a deviation. Pass the page's
    welds, statuses or chains (chain.check_assembly) to share what it already read."""
    from inspections.services import chain

    if assembly.state in CLOSED_STATES:
        return [f"The assembly is already {assembly.get_state_display().lower()}."]
    welds = list(welds) if welds is not None else None
    if welds is None:
        welds = chain.assembly_welds(assembly)
    if not welds:
        return ["The weld map is empty: add the welds before release."]
    if chains is None:
        chains = chain.check_assembly(assembly, welds=welds, statuses=statuses)
    return chain.blockers_of(chains)


def submit_for_inspection(assembly, user, reason=""):
    """The shop says the assembly is welded and ready for final visual inspection."""

    def has_welds(locked):
        if not locked.welds.exists():
            raise Refused("The weld map is empty: add the welds before sending it for inspection.", code="empty")

    return transition(assembly, user=user, permission="assembly.submit", allowed_from={AssemblyState.IN_FABRICATION},
                      to=AssemblyState.AWAITING_INSPECTION, check=has_welds, reason=reason or "Sent for inspection")


def release(assembly, user, reason=""):
    """The QA lead releases the assembly: refused while release_blockers() names anything."""

    def nothing_blocks(locked):
        reasons = release_blockers(locked)
        if reasons:
            raise Refused(reasons, code="blocked")

    # Any state may ask; release_blockers says why a closed or rejected one cannot be released.
    with seals.sealing():  # the chain first, then the assembly (core.seals, lock order)
        released = transition(assembly, user=user, permission="assembly.release", allowed_from=set(AssemblyState),
                              to=AssemblyState.RELEASED, check=nothing_blocks, reason=reason or "Released",
                              released_by=user, released_at=timezone.now())
        seals.seal(released, "assembly.released")
    return released


def scrap(assembly, user, reason):
    """Scrap the assembly (an NCR disposition): terminal, nothing more is inspected or released."""
    if assembly.state == AssemblyState.SCRAPPED:
        return assembly
    return transition(assembly, user=user, to=AssemblyState.SCRAPPED, reason=reason,
                      allowed_from=set(AssemblyState.values) - {AssemblyState.SCRAPPED})


_built = threading.local()


def _state_facts_query():
    """The query of _state_facts without its assembly, built and resolved once per thread (the ORM's work of
    building three EXISTS subqueries cost more than running them); each call filters a copy. Per thread, not per
    process: a copy shares its subqueries, whose compiling counts their joins up and down as it goes."""
    built = getattr(_built, "state_facts", None)
    if built is None:
        built = _built.state_facts = _build_state_facts_query()
    return built


def _build_state_facts_query():
    open_ncr = NCR.objects.filter(weld__assembly_id=OuterRef("pk")).exclude(state=NCRState.CLOSED)
    use_as_is = NCR.objects.filter(inspection_id=OuterRef("latest_inspection_id"), state=NCRState.CLOSED,
                                   disposition=Disposition.USE_AS_IS)
    # A weld rejects when its latest current inspection rejected it, unless that is a final inspection an NCR
    # closed as use-as-is (WeldStatus.rejected).
    latest_rejects = (Weld.objects.filter(assembly_id=OuterRef("pk"), latest_inspection__accepted=False)
                      .exclude(Q(latest_inspection__stage=InspectionStage.FINAL) & Exists(use_as_is)))
    any_final = Weld.objects.filter(assembly_id=OuterRef("pk"), latest_final__isnull=False)
    return Assembly.objects.values_list("state", Exists(open_ncr) | Exists(latest_rejects), Exists(any_final))


def _state_and_facts(assembly_pk) -> tuple[str, bool, bool]:
    """(the assembly's state, a weld rejected or an NCR open, any current final inspection), in one query.

    The same rules as WeldStatus.rejected and WeldStatus.final, asked of the weld rows' pointers to their
    latest inspections, so a save does not build a WeldStatus for each weld of the assembly.
    """
    state, rejected, finals = _state_facts_query().filter(pk=assembly_pk).get()
    return state, bool(rejected), bool(finals)


def _state_facts(assembly_pk) -> tuple[bool, bool]:
    """(a weld rejected or an NCR open, any current final inspection) for one assembly, in one query."""
    return _state_and_facts(assembly_pk)[1:]


def refresh_assembly_state(assembly, user, reason=""):
    """Recompute the state after an inspection or an NCR step; returns the (possibly unchanged) state.

    Called by the inspection flow after every saved inspection and by the NCR steps; `user` is who caused it.
    """
    # No savepoint of its own inside a signing's transaction: whatever fails here fails the whole step.
    with transaction.atomic(savepoint=False):
        # Lock the row first where the database locks rows (a change goes through transition(), which locks it
        # again); the state and the facts are then read in a statement of their own, which on PostgreSQL sees
        # whatever the lock waited for. SQLite's IMMEDIATE transaction already holds its one write lock.
        if transaction.get_connection().features.has_select_for_update:
            list(Assembly.objects.select_for_update().filter(pk=assembly.pk).values_list("pk", flat=True))
        state, rejected, any_final = _state_and_facts(assembly.pk)
        assembly.state = state
        if state in CLOSED_STATES:
            return state  # released and scrapped assemblies take no more inspections (sign_inspection)
        target = state
        if rejected:
            target = AssemblyState.REJECTED
        elif state == AssemblyState.REJECTED:
            target = AssemblyState.AWAITING_INSPECTION
        elif state == AssemblyState.IN_FABRICATION and any_final:
            target = AssemblyState.AWAITING_INSPECTION
        if target != state:
            reason = reason or {
                AssemblyState.REJECTED: "An inspection rejected a weld, or an NCR is open",
                AssemblyState.AWAITING_INSPECTION: "Nothing rejected any more" if state == AssemblyState.REJECTED
                else "Final inspection started",
            }[target]
            transition(assembly, user=user, allowed_from={state}, to=target, reason=reason)
        return assembly.state


# --- welder eligibility: procedures.eligibility decides; these only shape its answers for the weld map ------

@dataclass(frozen=True)
class WelderCheck:
    """What the weld map shows beside a welder: allowed or not, and why."""

    welder: object
    allowed: bool
    reasons: tuple[str, ...]


def check_welder(welder, weld, on=None) -> WelderCheck:
    """May this welder make this weld on this day (default: the day it was welded, else today)?"""
    from procedures import eligibility

    result = eligibility.check_welder(welder, weld, on=on)
    return WelderCheck(welder, bool(result.allowed), tuple(result.reasons))


def welder_checks(welds) -> dict[int, list[WelderCheck]]:
    """weld pk -> a WelderCheck per welder of the weld, in a fixed number of queries (procedures.eligibility)."""
    from procedures import eligibility

    return {pk: [WelderCheck(c.welder, bool(c.allowed), tuple(c.reasons)) for c in check.checks]
            for pk, check in eligibility.check_welds(welds).items()}


def record_production(weld):
    """The continuity the weld gives its welders (procedures.eligibility keeps it in step with the weld)."""
    from procedures import eligibility

    return eligibility.record_production(weld)
