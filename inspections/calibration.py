"""Is a measuring instrument in calibration on a day? A plain engine (no Django): the gauge's calibrations in, an
answer with its reason out.

A gauge is in calibration on a day when its latest calibration made on or before that day found it in tolerance
and the day is not after that calibration's due date (the due date is the last day it may be used: common practice,
no source). The interval itself is the shop's (ISO 3834-2:2021 clause 12 asks for calibration or validation of
measuring, inspection and testing equipment at appropriate intervals; AWS D1.1/D1.1M:2020 clause 8.1.6 asks the
inspector to have the instruments needed; both from memory): it is typed as the certificate's due date, never
derived. A temperature-indicating crayon has no calibration: its "due date" is the lot's expiry.

A gauge later found out of tolerance puts in doubt every measurement made with it since its last calibration that
found it good: suspect() names that calibration.
"""

from dataclasses import dataclass
from datetime import date

IN_TOLERANCE, OUT_OF_TOLERANCE = "in_tolerance", "out_of_tolerance"
SOURCE = ("ISO 3834-2:2021 clause 12, calibration of measuring equipment at intervals (from memory); the due date "
          "is the last day of use (common practice, no source)")


@dataclass(frozen=True)
class Calibration:
    key: object  # the record's id, handed back
    calibrated_on: date
    due_on: date
    result: str


@dataclass(frozen=True)
class Standing:
    ok: bool
    reason: str  # why not ("" when it is)
    calibration: object  # key of the calibration it is used under (None when not ok)
    due_on: date | None


def _ordered(calibrations):
    return sorted(calibrations, key=lambda c: (c.calibrated_on, c.key))  # keys are record ids: later, larger


def standing(calibrations, on: date, retired: bool = False) -> Standing:
    """Whether the gauge may be used on the day, and under which calibration."""
    if retired:
        return Standing(False, "retired from use", None, None)
    made = [c for c in _ordered(calibrations) if c.calibrated_on <= on]
    if not made:
        return Standing(False, "no calibration on record", None, None)
    last = made[-1]
    if last.result == OUT_OF_TOLERANCE:
        return Standing(False, f"found out of tolerance on {last.calibrated_on.isoformat()}", None, last.due_on)
    if last.result != IN_TOLERANCE:
        raise ValueError(f"Unknown calibration result {last.result!r}.")
    if on > last.due_on:
        return Standing(False, f"calibration was due on {last.due_on.isoformat()}", None, last.due_on)
    return Standing(True, "", last.key, last.due_on)


def suspect(calibrations, failed_key):
    """The key of the last calibration that found the gauge good before the failing one (None: none did): every
    inspection made under it is in doubt."""
    ordered = _ordered(calibrations)
    failed = next(c for c in ordered if c.key == failed_key)
    good = [c for c in ordered[:ordered.index(failed)] if c.result == IN_TOLERANCE]
    return good[-1].key if good else None
