"""Is an inspector's certification current on a day? A plain engine (no Django): the facts of one credential in,
an answer with its reason and its source out.

A credential is current on a day when the day is within its dates (issued on or before, expires on or after: the
card's expiry date is its last valid day) and its eye examination is not overdue. The expiry is typed as the card
prints it; it is never derived, because renewal and recertification cycles are the scheme's business (AWS CWI:
renewal every 3 years, recertification every 9, AWS QC1:2016, from memory).

The eye examination: AWS QC1:2016 asks a CWI for a near-vision examination every 3 years (from memory; the
clause number is not confirmed here); ISO 9712:2021 clause 7.4 asks for near vision (Jaeger 1 or N4.6 at not
less than 30 cm) checked annually (from memory). A national scheme's own period is not encoded: annually, the
ISO 9712 period, as a cautious default (common practice, no source). The examination is due on its anniversary
(the same day of the month, the period later): the credential is not current from that day on.

LAPSE_NOTICE_DAYS: how far ahead a lapse shows on the credentials page (common practice, no source; the same
30 days the shop uses for welder continuity notices).
"""

from dataclasses import dataclass
from datetime import date, timedelta

CWI, SCWI, ISO_9712, NATIONAL = "aws_cwi", "aws_scwi", "iso_9712", "national"
SCHEMES = {
    CWI: "AWS CWI (AWS QC1)",
    SCWI: "AWS SCWI (AWS QC1)",
    ISO_9712: "ISO 9712 visual testing (VT)",
    NATIONAL: "National scheme",
}
EYE_EXAM_YEARS = {CWI: 3, SCWI: 3, ISO_9712: 1, NATIONAL: 1}
EYE_EXAM_SOURCE = {
    CWI: "AWS QC1:2016, vision examination every 3 years (from memory)",
    SCWI: "AWS QC1:2016, vision examination every 3 years (from memory)",
    ISO_9712: "ISO 9712:2021 clause 7.4, near vision checked annually (from memory)",
    NATIONAL: "annual, as ISO 9712 (common practice, no source: check the national scheme)",
}
EXPIRY_SOURCE = "the expiry date printed on the certificate (AWS QC1:2016 / ISO 9712:2021; from memory)"
LAPSE_NOTICE_DAYS = 30  # common practice, no source


@dataclass(frozen=True)
class Facts:
    scheme: str
    issued_on: date
    expires_on: date
    eye_exam_on: date
    withdrawn: bool = False


@dataclass(frozen=True)
class Currency:
    current: bool
    reason: str  # why not current ("" when it is)
    source: str
    lapses_on: date | None  # the first day it is no longer current (expiry + 1 day, or the eye examination due)


def anniversary(day: date, years: int) -> date:
    """The same day `years` later (29 February falls on 28 February in a common year)."""
    try:
        return day.replace(year=day.year + years)
    except ValueError:
        return day.replace(year=day.year + years, day=28)


def eye_exam_due(scheme: str, eye_exam_on: date) -> date:
    """The first day the eye examination is overdue."""
    if scheme not in EYE_EXAM_YEARS:
        raise ValueError(f"Unknown certification scheme {scheme!r}; known: {', '.join(SCHEMES)}.")
    return anniversary(eye_exam_on, EYE_EXAM_YEARS[scheme])


def currency(facts: Facts, on: date) -> Currency:
    """Whether the credential is current on the day, and if not, why (the first reason that holds)."""
    due = eye_exam_due(facts.scheme, facts.eye_exam_on)
    lapses_on = min(facts.expires_on + timedelta(days=1), due)
    if facts.withdrawn:
        return Currency(False, "withdrawn", "", lapses_on)
    if on < facts.issued_on:
        return Currency(False, f"not issued until {facts.issued_on.isoformat()}", EXPIRY_SOURCE, lapses_on)
    if on > facts.expires_on:
        return Currency(False, f"expired on {facts.expires_on.isoformat()}", EXPIRY_SOURCE, lapses_on)
    if facts.eye_exam_on > on:
        return Currency(False, f"eye examination dated {facts.eye_exam_on.isoformat()}, after the day",
                        EYE_EXAM_SOURCE[facts.scheme], lapses_on)
    if on >= due:
        return Currency(False, f"eye examination of {facts.eye_exam_on.isoformat()} overdue since "
                               f"{due.isoformat()}", EYE_EXAM_SOURCE[facts.scheme], lapses_on)
    return Currency(True, "", f"{EXPIRY_SOURCE}; {EYE_EXAM_SOURCE[facts.scheme]}", lapses_on)


def lapses_soon(facts: Facts, today: date, days: int = LAPSE_NOTICE_DAYS) -> bool:
    """Current today and no longer current within `days` days (the notice ahead)."""
    answer = currency(facts, today)
    return answer.current and answer.lapses_on is not None and (answer.lapses_on - today).days <= days
