"""Assembly state: sent for inspection, rejected and back, released (or scrapped by an NCR disposition).

in_fabrication -> awaiting_inspection (submit_for_inspection, or a final inspection recorded)
awaiting_inspection -> rejected (a rejected inspection or an open NCR; refresh_assembly_state)
rejected -> awaiting_inspection (nothing blocks any more; refresh_assembly_state)
awaiting_inspection -> released (release, by the QA lead, refused while anything blocks)
released -> rejected (a correction rejects a weld after release; refresh_assembly_state)
any -> scrapped (an NCR dispositioned as scrap; inspections.services.ncr)

Every change writes an AssemblyEvent (who, when, from, to, why).
"""

from dataclasses import dataclass, field

from django.db import connections, router, transaction
from django.db.models import Exists, OuterRef, Q, Subquery
from django.utils import timezone

from inspections.models import NCR, Assembly, AssemblyEvent, AssemblyState, Inspection, InspectionStage
from inspections.models.ncr import Disposition, NCRState
from inspections.services import StepRefused
from legwork.roles import require

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
    """Status of many welds in two queries, whatever their number."""
    weld_ids = list(weld_ids)
    statuses = {pk: WeldStatus(pk) for pk in weld_ids}
    if not weld_ids:
        return statuses
    # Only the latest current inspection of each weld and its latest current final one come back (at most two
    # rows a weld): a weld inspected a hundred times must not cost a hundred model instances on every save.
    newest = Inspection.objects.current().filter(weld_id=OuterRef("weld_id")).order_by("-inspected_at", "-pk")
    current = (Inspection.objects.current().filter(weld_id__in=weld_ids)
               .filter(Q(pk=Subquery(newest.values("pk")[:1]))
                       | Q(pk=Subquery(newest.filter(stage=InspectionStage.FINAL).values("pk")[:1])))
               .select_related("inspector").order_by("weld_id", "-inspected_at", "-pk"))
    for inspection in current:
        status = statuses[inspection.weld_id]
        if status.latest is None:
            status.latest = inspection
        if status.final is None and inspection.stage == InspectionStage.FINAL:
            status.final = inspection
    for ncr in NCR.objects.filter(weld_id__in=weld_ids).order_by("-raised_at", "-pk"):
        statuses[ncr.weld_id].ncrs.append(ncr)
    return statuses


def release_blockers(assembly, statuses=None, welds=None) -> list[str]:
    """Every reason the assembly cannot be released now, in words; empty means it may be released."""
    if assembly.state in CLOSED_STATES:
        return [f"The assembly is already {assembly.get_state_display().lower()}."]
    welds = list(welds if welds is not None else assembly.welds.order_by("mark"))
    if not welds:
        return ["The weld map is empty: add the welds before release."]
    statuses = statuses if statuses is not None else weld_statuses(w.pk for w in welds)
    reasons = []
    for weld in welds:
        status = statuses[weld.pk]
        for ncr in status.open_ncrs:
            step = "awaiting disposition" if ncr.state == NCRState.OPEN else "repair awaiting re-inspection"
            reasons.append(f"Weld {weld.mark}: {ncr} is open ({step}).")
        if status.open_ncrs:
            continue
        if status.final is None:
            reasons.append(f"Weld {weld.mark} has no final visual inspection.")
        elif not status.released_ok:
            reasons.append(f"Weld {weld.mark}: its current final inspection rejected it.")
    return reasons


def _move(assembly, to_state, user, reason="", **fields):
    """Save the new state (and only the fields it changes) and write the history row. Caller holds the lock."""
    old = assembly.state
    assembly.state = to_state
    for name, value in fields.items():
        setattr(assembly, name, value)
    assembly.save(update_fields=["state", *fields])
    AssemblyEvent.objects.create(assembly=assembly, from_state=old, to_state=to_state, reason=reason, user=user)
    return assembly


def _locked(assembly) -> Assembly:
    # Lock the row so two people acting at once cannot both move the assembly from a stale state.
    return Assembly.objects.select_for_update().select_related("job").get(pk=assembly.pk)


def submit_for_inspection(assembly, user, reason=""):
    """The shop says the assembly is welded and ready for final visual inspection."""
    require(user, "assembly.submit")
    with transaction.atomic():
        locked = _locked(assembly)
        if locked.state != AssemblyState.IN_FABRICATION:
            raise StepRefused(f"Only an assembly in fabrication can be sent for inspection; this one is "
                              f"{locked.get_state_display().lower()}.", code="state")
        if not locked.welds.exists():
            raise StepRefused("The weld map is empty: add the welds before sending it for inspection.", code="empty")
        _move(locked, AssemblyState.AWAITING_INSPECTION, user, reason or "Sent for inspection")
    return locked


def release(assembly, user, reason=""):
    """The QA lead releases the assembly: refused with an open NCR or a weld without an accepted final inspection."""
    require(user, "assembly.release")
    with transaction.atomic():
        locked = _locked(assembly)
        reasons = release_blockers(locked)
        if reasons:
            raise StepRefused(reasons, code="blocked")
        _move(locked, AssemblyState.RELEASED, user, reason or "Released", released_by=user, released_at=timezone.now())
    return locked


def scrap(assembly, user, reason):
    """Scrap the assembly (an NCR disposition): terminal, nothing more is inspected or released."""
    with transaction.atomic():
        locked = _locked(assembly)
        if locked.state == AssemblyState.SCRAPPED:
            return locked
        _move(locked, AssemblyState.SCRAPPED, user, reason)
    return locked


def _state_facts_query(assembly_pk):
    """Assembly `assembly_pk` -> (a weld rejected or an NCR open, any current final inspection).

    The same rules as WeldStatus.rejected and WeldStatus.final, asked as EXISTS questions, so that a save does
    not build a WeldStatus (two inspections and every NCR) for each weld of the assembly.
    """
    open_ncr = NCR.objects.filter(weld__assembly_id=OuterRef("pk")).exclude(state=NCRState.CLOSED)
    newest = (Inspection.objects.current().filter(weld_id=OuterRef("weld_id"))
              .order_by("-inspected_at", "-pk").values("pk")[:1])
    use_as_is = NCR.objects.filter(inspection_id=OuterRef("pk"), state=NCRState.CLOSED,
                                   disposition=Disposition.USE_AS_IS)
    # A weld rejects when its latest current inspection rejected it, unless that is its current final
    # inspection and an NCR on it was closed as use-as-is (WeldStatus.rejected).
    latest_rejects = (Inspection.objects.filter(weld__assembly_id=OuterRef("pk"), accepted=False,
                                                pk=Subquery(newest))
                      .exclude(Q(stage=InspectionStage.FINAL) & Exists(use_as_is)))
    any_final = Inspection.objects.current().filter(weld__assembly_id=OuterRef("pk"), stage=InspectionStage.FINAL)
    return (Assembly.objects.filter(pk=assembly_pk)
            .values_list(Exists(open_ncr) | Exists(latest_rejects), Exists(any_final)))


class CompiledQuery:
    """A query the ORM builds once per database alias; each call runs that SQL with fresh parameters.

    For the few queries every signing runs, whose building costs far more than running them (the state query
    below: ~13 ms to build against ~0.1 ms to run, on SQLite). `build(*args)` returns a values_list queryset in
    which each argument appears exactly once among the SQL parameters (it is built with markers in their place).
    """

    _MARKS = (-7_406_193_117, -7_406_193_119, -7_406_193_121)

    def __init__(self, model, build, nargs=1):
        self.model, self.build, self.marks = model, build, self._MARKS[:nargs]
        self._compiled: dict[str, tuple[str, tuple]] = {}

    def rows(self, *args) -> list[tuple]:
        connection = connections[router.db_for_write(self.model)]
        compiled = self._compiled.get(connection.alias)
        if compiled is None:
            sql, params = self.build(*self.marks).query.get_compiler(connection=connection).as_sql()
            for mark in self.marks:  # pragma: no cover - a Django change would show here
                if sum(1 for p in params if p == mark) != 1:
                    raise RuntimeError(f"{self.build.__name__}: each argument must appear once in the parameters.")
            compiled = self._compiled[connection.alias] = (sql, tuple(params))
        sql, params = compiled
        values = dict(zip(self.marks, args, strict=True))
        with connection.cursor() as cursor:
            cursor.execute(sql, [values.get(p, p) if isinstance(p, int) else p for p in params])
            return cursor.fetchall()


_state_facts_sql = CompiledQuery(Assembly, _state_facts_query)
_locked_state_sql = CompiledQuery(
    Assembly, lambda pk: Assembly.objects.select_for_update().filter(pk=pk).values_list("state"))


def _state_facts(assembly_pk) -> tuple[bool, bool]:
    """_state_facts_query's answer for one assembly, in one query."""
    rows = _state_facts_sql.rows(assembly_pk)
    if not rows:
        raise Assembly.DoesNotExist(f"No assembly with pk {assembly_pk}.")
    return bool(rows[0][0]), bool(rows[0][1])


def refresh_assembly_state(assembly, user=None, reason=""):
    """Recompute the state after an inspection or an NCR step; returns the (possibly unchanged) state.

    Called by the inspection flow after every saved inspection and by the NCR steps. `user` is who caused it;
    when not given, the inspector of the assembly's latest inspection. Two queries when nothing changes: the
    locked state and _state_facts.
    """
    with transaction.atomic():
        # Lock the row (as _locked does) but read only the state: the caller's instance is saved with
        # update_fields, so its other fields are never written back.
        rows = _locked_state_sql.rows(assembly.pk)
        if not rows:
            raise Assembly.DoesNotExist(f"No assembly with pk {assembly.pk}.")
        state = rows[0][0]
        assembly.state = state
        if state == AssemblyState.SCRAPPED:
            return state
        rejected, any_final = _state_facts(assembly.pk)
        target = state
        if rejected:
            target = AssemblyState.REJECTED
        elif state == AssemblyState.REJECTED:
            target = AssemblyState.AWAITING_INSPECTION
        elif state == AssemblyState.IN_FABRICATION and any_final:
            target = AssemblyState.AWAITING_INSPECTION
        if target != state:
            if user is None:
                latest = (Inspection.objects.filter(weld__assembly_id=assembly.pk).select_related("inspector")
                          .order_by("-inspected_at", "-pk").first())
                if latest is None:
                    raise ValueError("refresh_assembly_state needs the user who caused the change.")
                user = latest.inspector
            if not reason:
                reason = {
                    AssemblyState.REJECTED: "An inspection rejected a weld, or an NCR is open",
                    AssemblyState.AWAITING_INSPECTION: "Nothing rejected any more" if state ==
                    AssemblyState.REJECTED else "Final inspection started",
                }[target]
            extra = {"released_by": None, "released_at": None} if state == AssemblyState.RELEASED else {}
            _move(assembly, target, user, reason, **extra)
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
