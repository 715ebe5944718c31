"""The traceability registers' steps: inspector credentials (and, below, gauges).

A credential is recorded once, as the card prints it (record_credential), and withdrawn with a reason
(withdraw_credential, through core.transitions); it is never edited. Signing asks signing_credential(): a final
visual needs the inspector's credential current on the signing day (inspections.credentials judges it), and every
signed inspection names the credential it was signed under, printed beside the inspector's name on the traveler.
"""

from django.db import transaction
from django.utils import timezone

from core.errors import Refused
from core.roles import require
from core.transitions import required_reason, transition
from inspections import credentials as engine
from inspections.models import CredentialState, InspectionStage, InspectorCredential

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
                                                 issued_on__lte=on, expires_on__gte=on)
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
