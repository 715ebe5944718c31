"""The traceability registers' steps: inspector credentials and gauges.

A credential is recorded once, as the card prints it (record_credential), and withdrawn with a reason
(withdraw_credential, through core.transitions); it is never edited. Signing asks signing_credential(): a final
visual needs the inspector's credential current on the signing day (inspections.credentials judges it), and every
signed inspection names the credential it was signed under, printed beside the inspector's name on the traveler.
"""

from django.db import transaction
from django.db.models import OuterRef, Q, Subquery
from django.urls import reverse
from django.utils import timezone

from core.errors import Refused
from core.roles import require
from core.transitions import required_reason, transition
from inspections import calibration
from inspections import credentials as engine
from inspections.models import (
    AssemblyState,
    CalibrationResult,
    CredentialState,
    FillerLot,
    Gauge,
    GaugeCalibration,
    GaugeState,
    Inspection,
    InspectionStage,
    InspectorCredential,
    Weld,
    WeldRepair,
)

REGISTERS = "register.manage"


# --- inspector credentials ---------------------------------------------------------------------------------------

@transaction.atomic
def record_credential(credential: InspectorCredential, user) -> InspectorCredential:
    """Store a credential as typed from the card (the form has checked the fields), with its history row."""
    require(user, REGISTERS)
    if credential.inspector.role != "inspector":
        raise Refused(f"{credential.inspector} is not an inspector: only inspectors sign inspections.",
                      code="inspector")
    credential.recorded_by = user
    credential.save(user=user)
    return credential


def withdraw_credential(credential: InspectorCredential, user, reason: str) -> InspectorCredential:
    """Take a credential off (a typing mistake, a card revoked); inspections already signed keep naming it."""
    reason = required_reason(reason, "withdrawing the credential")
    return transition(credential, to=CredentialState.WITHDRAWN, allowed_from={CredentialState.ON_FILE}, user=user,
                      permission=REGISTERS, reason=reason, withdrawn_reason=reason[:200],
                      withdrawn_at=timezone.now())


def current_credential(inspector, on) -> InspectorCredential | None:
    """The inspector's credential current on the day (the one that runs longest), or None. One query."""
    on_file = InspectorCredential.objects.filter(inspector=inspector, state=CredentialState.ON_FILE,
                                                 issued_on__lte=on, expires_on__gte=on).order_by()  # max() picks
    current = [c for c in on_file if c.currency(on).current]
    return max(current, key=lambda c: (c.currency(on).lapses_on, c.pk)) if current else None


def credential_refusal(inspector, on) -> str | None:
    """Why this inspector cannot sign a final visual on the day (None: a credential is current). One query."""
    if current_credential(inspector, on) is not None:
        return None
    latest = (InspectorCredential.objects.filter(inspector=inspector, state=CredentialState.ON_FILE)
              .order_by("-expires_on", "-pk").first())
    if latest is None:
        why = "no inspector certification is on file"
    else:
        why = f"{latest}: {latest.currency(on).reason}"
    return (f"{inspector} cannot sign a final visual on {on.isoformat()}: {why}. A final visual is signed by a "
            "certified inspector (AWS D1.1/D1.1M:2020 clause 8.1.4; ISO 3834-2:2021 clause 7.4; both from memory). "
            "Ask the QA lead to record a current credential.")


def signing_credential(inspector, stage: str, on) -> InspectorCredential | None:
    """The credential a new inspection is signed under: required at the final visual (Refused without one),
    recorded when there is one at the other stages."""
    credential = current_credential(inspector, on)
    if credential is None and stage == InspectionStage.FINAL:
        raise Refused(credential_refusal(inspector, on), code="credential")
    return credential


def credential_rows(today) -> list[dict]:
    """Every credential with its standing today: current or not, why, when it lapses, and a notice when it lapses
    within engine.LAPSE_NOTICE_DAYS. Two queries (credentials with their inspectors, nothing per row)."""
    rows = []
    for credential in InspectorCredential.objects.select_related("inspector").order_by(
            "inspector__last_name", "inspector__username", "-expires_on", "-pk"):
        answer = credential.currency(today)
        rows.append({"credential": credential, "currency": answer,
                     "soon": engine.lapses_soon(credential.facts(), today),
                     "days_left": (answer.lapses_on - today).days if answer.current else None})
    return rows


def printed_credential(inspection) -> str:
    """What a traveler prints beside the inspector's name: the credential it was signed under, else the stamp."""
    credential = getattr(inspection, "credential", None)
    if credential is not None:
        return credential.printed()
    return getattr(inspection.inspector, "stamp", "") or ""


# --- gauges ------------------------------------------------------------------------------------------------------

@transaction.atomic
def record(entry, user):
    """Put a register's new row on record (a gauge, a filler lot): the QA lead's, with its history row."""
    require(user, REGISTERS)
    entry.recorded_by = user
    entry.save(user=user)
    return entry


def record_gauge(gauge: Gauge, user) -> Gauge:
    return record(gauge, user)


def retire_gauge(gauge: Gauge, user, reason: str) -> Gauge:
    """Take a gauge out of use (lost, broken, a typing mistake); inspections made with it keep naming it."""
    reason = required_reason(reason, "retiring the gauge")
    return transition(gauge, to=GaugeState.RETIRED, allowed_from={GaugeState.IN_SERVICE}, user=user,
                      permission=REGISTERS, reason=reason, retired_reason=reason[:200], retired_at=timezone.now())


@transaction.atomic
def record_calibration(record: GaugeCalibration, user) -> GaugeCalibration:
    """Store a calibration of a gauge in service (the form has checked the dates), with its history row."""
    require(user, REGISTERS)
    gauge = Gauge.objects.select_for_update().get(pk=record.gauge_id)
    if gauge.state != GaugeState.IN_SERVICE:
        raise Refused(f"Gauge {gauge} is retired: it takes no more calibrations.", code="retired")
    record.recorded_by = user
    record.save(user=user)
    return record


def gauge_rows(today) -> list[dict]:
    """Every gauge with its standing today and a notice when its calibration falls due within the notice days.
    Two queries (gauges, their calibrations)."""
    rows = []
    for gauge in Gauge.objects.prefetch_related("calibrations").order_by("number"):
        answer = gauge.standing(today, list(gauge.calibrations.all()))
        days_left = (answer.due_on - today).days if answer.ok else None
        rows.append({"gauge": gauge, "standing": answer, "days_left": days_left,
                     "soon": days_left is not None and days_left < engine.LAPSE_NOTICE_DAYS})
    return rows


def usable_gauges(on) -> list[Gauge]:
    """The gauges in service and in calibration on the day, for the inspection form. Two queries."""
    found = []
    for gauge in Gauge.objects.filter(state=GaugeState.IN_SERVICE).prefetch_related("calibrations").order_by(
            "kind", "number"):
        if gauge.standing(on, list(gauge.calibrations.all())).ok:
            found.append(gauge)
    return found


GAUGE_REQUIRED = ("This job requires the gauge used at the final visual (a job setting): choose it from the "
                  "register.")


def gauge_refusal(gauge: Gauge, on) -> str | None:
    """Why this gauge cannot be used on the day (None: it can). One query."""
    answer = gauge.standing(on)
    if answer.ok:
        return None
    return (f"Gauge {gauge} cannot be used on {on.isoformat()}: {answer.reason}. Choose a gauge in calibration "
            f"({calibration.SOURCE}).")


def signing_calibration(gauge: Gauge | None, on, required: bool = False) -> GaugeCalibration | None:
    """The calibration a new inspection's gauge is used under; Refused when the gauge is out of calibration, or
    missing where the job requires one at this stage (Job.gauge_required)."""
    if gauge is None:
        if required:
            raise Refused(GAUGE_REQUIRED, code="gauge")
        return None
    rows = list(gauge.calibrations.all())
    answer = gauge.standing(on, rows)
    if not answer.ok:
        raise Refused(gauge_refusal(gauge, on), code="gauge")
    return next(c for c in rows if c.pk == answer.calibration)


def suspect_inspections(failed: GaugeCalibration):
    """(the last calibration that found the gauge good before `failed`, the inspections made under it): the
    measurements a gauge found out of tolerance puts in doubt. Two queries whatever their number."""
    rows = list(GaugeCalibration.objects.filter(gauge_id=failed.gauge_id))
    good_key = calibration.suspect([c.facts() for c in rows], failed.pk) \
        if failed.result == CalibrationResult.OUT_OF_TOLERANCE else None
    good = next((c for c in rows if c.pk == good_key), None)
    if good is None:
        return None, Inspection.objects.none()
    inspections = (Inspection.objects.filter(gauge_calibration=good)
                   .select_related("weld__assembly__job__customer", "inspector")
                   .order_by("inspected_at", "pk"))
    return good, inspections


# --- filler lots -------------------------------------------------------------------------------------------------

def record_filler_lot(lot: FillerLot, user) -> FillerLot:
    return record(lot, user)


@transaction.atomic
def record_weld_filler(weld: Weld, lot: FillerLot, user) -> Weld:
    """Name the lot a weld was made with (a production fact, like its WPS and welders: it freezes at the weld's final
    visual, RecordLocked after). A lot of another classification than the WPS's is recorded as it was, and the proof
    chain blocks the weld (inspections.services.chain.filler_mismatch)."""
    require(user, "weld.record")
    if lot is not None and weld.welded_on and lot.received_on > weld.welded_on:
        # a lot is not welded with before the shop has it (common practice, no source); as for a repair
        raise Refused({"lot": [f"Lot {lot.lot_number} was received on {lot.received_on.isoformat()}, after the weld "
                               f"date {weld.welded_on.isoformat()}."]}, code="received_after")
    weld.filler_lot = lot
    weld.save(user=user)
    return weld


# --- recall: what a lot, a gauge or an inspector touched -----------------------------------------------------------

RECALL_COLUMNS = {"customer": "Customer", "job": "Job", "assembly": "Assembly", "assembly_state": "Assembly state",
                  "weld": "Weld", "welded_on": "Welded on", "repaired_on": "Repaired on",
                  "inspection": "Inspection", "stage": "Stage",
                  "verdict": "Verdict", "inspector": "Inspector"}


def recall_columns(kind: str) -> dict:
    """The recall's columns: a heat's rows name the part too (inspections.services.material.recall_heat)."""
    return {**RECALL_COLUMNS, "part": "Part"} if kind == "heat" else RECALL_COLUMNS


def recall(kind: str, subject, start=None, end=None) -> list[dict]:
    """Every weld the filler lot, the gauge or the inspector touched between the dates (inclusive; welded on for a
    lot, signed on for a gauge or an inspector), with its assembly's state and job. One query whatever the number,
    read as plain values (benchmarks/recall.py: 10,000 of 100,000 welds)."""
    if kind == "heat":  # the parts cut from it and the welds joining them (two queries)
        from inspections.services.material import recall_heat

        return recall_heat(subject, start, end)
    if kind == "lot":  # the welds made with it, and the welds whose repair was (by the repair's date, said)
        repairs = _between(WeldRepair.objects.filter(filler_lot=subject), "welded_on", start, end)
        rows = Weld.objects.filter(Q(pk__in=_between(Weld.objects.filter(filler_lot=subject), "welded_on", start,
                                                     end).values("pk")) | Q(pk__in=repairs.values("weld")))
        prefix = ""
        rows = rows.annotate(repaired_on=Subquery(repairs.filter(weld=OuterRef("pk")).order_by("-welded_on")
                                                  .values("welded_on")[:1])).order_by("welded_on", "pk")
    elif kind in ("gauge", "inspector"):
        rows = _between(Inspection.objects.filter(**({"gauge_calibration__gauge": subject} if kind == "gauge"
                                                     else {"inspector": subject})), "inspected_at__date", start, end)
        prefix = "weld__"
        rows = rows.order_by("inspected_at", "pk")
    else:
        raise ValueError(f"Recall by lot, gauge or inspector, not {kind!r}.")
    names = {"customer": "assembly__job__customer__name", "job": "assembly__job__number",
             "assembly": "assembly__piece_mark", "state": "assembly__state", "weld": "mark", "welded_on": "welded_on",
             "weld_id": "id"}
    fields = {key: prefix + path for key, path in names.items()}
    if not prefix:
        fields["repaired_on"] = "repaired_on"
    if prefix:
        fields.update(inspection_id="id", inspected_at="inspected_at", stage="stage", accepted="accepted",
                      first="inspector__first_name", last="inspector__last_name", username="inspector__username")
    states = dict(AssemblyState.choices)
    stages = dict(InspectionStage.choices)
    weld_url = reverse("inspections:weld_detail", args=[0])[:-2]  # ".../welds/" + pk + "/"
    inspection_url = reverse("inspections:inspection_detail", args=[0])[:-2]
    found = []
    for row in rows.values_list(*fields.values()):
        value = dict(zip(fields, row, strict=True))
        signed = value.get("inspection_id")
        found.append({
            "customer": value["customer"], "job": value["job"], "assembly": value["assembly"],
            "assembly_state": states.get(value["state"], value["state"]), "weld": value["weld"],
            "welded_on": value["welded_on"].isoformat() if value["welded_on"] else "",
            "repaired_on": value["repaired_on"].isoformat() if value.get("repaired_on") else "",
            "inspection": timezone.localtime(value["inspected_at"]).strftime("%Y-%m-%d %H:%M") if signed else "",
            "stage": stages.get(value.get("stage"), "") if signed else "",
            "verdict": ("accepted" if value["accepted"] else "rejected") if signed else "",
            "inspector": (f"{value['first']} {value['last']}".strip() or value["username"]) if signed else "",
            "url": f"{inspection_url}{signed}/" if signed else f"{weld_url}{value['weld_id']}/"})
    return found


def _between(rows, day, start, end):
    """Rows whose `day` lies from start to end, both inclusive (either may be None: open)."""
    if start:
        rows = rows.filter(**{f"{day}__gte": start})
    if end:
        rows = rows.filter(**{f"{day}__lte": end})
    return rows
