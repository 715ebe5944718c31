"""Consumable control for low-hydrogen SMAW electrodes and SAW flux. A plain engine (no Django): facts in (the
classification, when electrodes left and came back to an oven, the oven's readings, their rebakes), answers with
their reasons and sources out.

The rules are AWS D1.1/D1.1M:2020 clause 7.3 (Electrodes and fluxes), recalled without the document at hand, so
every value here is marked "from memory" (../shared/domain.md confirms only "E70XX 4 h out of the oven; higher
strength classes shorter; rebake once", itself from memory). In the 2015 edition the same rules sit in clause 5.3.

- Atmospheric exposure (clause 7.3.2.2, Table 7.1 column A): after leaving the oven, a low-hydrogen electrode may
  stay in the air E70XX 4 h; E70XXR, E70XXHZR and E7018M 9 h; E80XX 2 h; E90XX 1 h; E100XX and E110XX 0.5 h. The
  optional "R" designator (moisture resistant, AWS A5.1/A5.5) gives 9 h to the E70XX classes only here; an H4/H8/H16
  diffusible-hydrogen designator changes nothing. Classes the table does not list (E60XX low hydrogen, E120XX) have
  no limit here: the engineer sets one (clause 7.3.2.3 allows limits established by tests).
- Holding ovens (clause 7.3.2.1): electrodes out of their hermetically sealed containers are stored in ovens held at
  no less than 250 degF [120 degC].
- Rebaking (clause 7.3.2.4): electrodes exposed past their limit are rebaked, A5.1 classes 1 h minimum at 500 to
  800 degF [260 to 430 degC], A5.5 classes 1 h minimum at 700 to 800 degF [370 to 430 degC]; an electrode is rebaked
  no more than once.
- SAW flux (clause 7.3.3.2): flux is used dry and free of contamination (dirt, mill scale, foreign material); flux
  from a damaged package is discarded (or dried at no less than 500 degF [260 degC] for 1 h before use); flux that
  has been wet is not used.

Temperatures are judged as the standard prints them in the oven's system: a reading in degF against 250 degF, in
degC against 120 degC (the two are not exactly equal; core.units keeps both exactly). A value at the limit passes;
the smallest step past it does not. These answers support, never replace, the certified inspector and the
contract's code.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta
from decimal import Decimal

from core.units import Temperature, format_temperature
from procedures.electrodes import SPEC_A5_1, SPEC_A5_5, decode

EDITION = "AWS D1.1/D1.1M:2020"
SOURCE_EXPOSURE = f"{EDITION} clause 7.3.2.2 and Table 7.1 (from memory)"
SOURCE_OVEN = f"{EDITION} clause 7.3.2.1 (from memory)"
SOURCE_REBAKE = f"{EDITION} clause 7.3.2.4 (from memory)"
SOURCE_FLUX = f"{EDITION} clause 7.3.3.2 (from memory)"
# How long an oven may go without a reading before the morning page names it: one shift (common practice, no source).
READING_INTERVAL = timedelta(hours=12)

# Table 7.1 column A, hours of atmospheric exposure by minimum tensile strength (ksi), from memory.
EXPOSURE_HOURS = {70: Decimal("4"), 80: Decimal("2"), 90: Decimal("1"), 100: Decimal("0.5"), 110: Decimal("0.5")}
MOISTURE_RESISTANT_HOURS = Decimal("9")  # E70XXR, E70XXHZR, E7018M (Table 7.1, from memory)

# Temperatures as printed, (degF, degC); clause 7.3.2.1 and 7.3.2.4, from memory.
OVEN_MINIMUM = {"US": Temperature.from_f(250), "SI": Temperature(Decimal("120"))}
REBAKE_RANGE = {
    SPEC_A5_1: {"US": (Temperature.from_f(500), Temperature.from_f(800)),
                "SI": (Temperature(Decimal("260")), Temperature(Decimal("430")))},
    SPEC_A5_5: {"US": (Temperature.from_f(700), Temperature.from_f(800)),
                "SI": (Temperature(Decimal("370")), Temperature(Decimal("430")))},
}
REBAKE_MINIMUM_HOURS = Decimal("1")
REBAKES_ALLOWED = 1
FLUX_DRYING = {"US": Temperature.from_f(500), "SI": Temperature(Decimal("260"))}
FLUX_DRYING_HOURS = Decimal("1")


def _system(system: str) -> str:
    if system not in ("US", "SI"):
        raise ValueError(f"The unit system is US or SI, not {system!r}.")
    return system


@dataclass(frozen=True)
class Limit:
    """The exposure limit of a classification: `hours` None when the table gives none (`reason` says why)."""

    classification: str
    controlled: bool  # a low-hydrogen SMAW electrode: exposure is controlled at all
    hours: Decimal | None
    reason: str
    source: str = SOURCE_EXPOSURE

    @property
    def delta(self) -> timedelta | None:
        return None if self.hours is None else timedelta(hours=float(self.hours))


def exposure_limit(classification: str) -> Limit:
    """The atmospheric exposure limit of an electrode classification (procedures.electrodes.decode reads it; bad
    text raises its ValueError). Only low-hydrogen SMAW electrodes are controlled; FCAW and SAW count as Category B
    in Table 5.8 but have no exposure limit in Table 7.1."""
    electrode = decode(classification)
    name = electrode.classification
    if "SMAW" not in electrode.processes or not electrode.low_hydrogen:
        return Limit(name, False, None, f"{name} is not a low-hydrogen covered electrode: Table 7.1 does not limit "
                                        "its exposure")
    if electrode.tensile_ksi == 70 and (electrode.moisture_resistant or "M" in electrode.designators):
        why = "moisture resistant (R)" if electrode.moisture_resistant else "E7018M"
        return Limit(name, True, MOISTURE_RESISTANT_HOURS, f"{name}: {_hours(MOISTURE_RESISTANT_HOURS)} out of the "
                                                           f"oven ({why})")
    hours = EXPOSURE_HOURS.get(electrode.tensile_ksi)
    if hours is None:
        return Limit(name, True, None, f"{name}: Table 7.1 gives no exposure limit for E{electrode.tensile_ksi}XX "
                                       "low-hydrogen electrodes; the engineer sets one (clause 7.3.2.3)")
    return Limit(name, True, hours, f"{name}: {_hours(hours)} out of the oven")


def _hours(hours: Decimal) -> str:
    if hours < 1:
        return f"{int(hours * 60)} min"
    return f"{hours.normalize():f} h"


def duration(delta: timedelta) -> str:
    """'4 h 01 min' for a time out of the oven."""
    minutes = int(delta.total_seconds() // 60)
    return f"{minutes // 60} h {minutes % 60:02d} min"


@dataclass(frozen=True)
class Exposure:
    """One issue of electrodes judged: within its limit or not, how long, and whether it is still open."""

    within: bool
    elapsed: timedelta
    limit: Limit
    open: bool
    over_at: datetime | None  # when the limit ran out (None: no limit)
    reason: str  # "" when within


def exposure(classification: str, taken_out: datetime, back: datetime | None, now: datetime) -> Exposure:
    """Judge one time out of the oven: from `taken_out` to `back` (returned to an oven or discarded), or to `now`
    while still out. At the limit is within; a second past it is not (Table 7.1, from memory)."""
    limit = exposure_limit(classification)
    end = back if back is not None else now
    if end < taken_out:
        raise ValueError("The electrodes came back before they were taken out: check both times.")
    elapsed = end - taken_out
    if not limit.controlled or limit.delta is None:
        return Exposure(True, elapsed, limit, back is None, None, "")
    over_at = taken_out + limit.delta
    within = elapsed <= limit.delta
    reason = "" if within else (f"{duration(elapsed)} out of the oven, past the limit of {_hours(limit.hours)} for "
                                f"{limit.classification} ({limit.source}): rebake before use, or discard")
    return Exposure(within, elapsed, limit, back is None, over_at, reason)


@dataclass(frozen=True)
class OvenReading:
    key: object
    at: datetime
    temperature: Temperature


@dataclass(frozen=True)
class OvenStanding:
    ok: bool
    reading: OvenReading | None
    reason: str  # why not ok, or a note when no reading is on record ("" when ok)


def oven_minimum(system: str) -> Temperature:
    return OVEN_MINIMUM[_system(system)]


def reading_ok(temperature: Temperature, system: str) -> bool:
    """A holding oven's reading at or above 250 degF [120 degC] (clause 7.3.2.1, from memory)."""
    return temperature >= oven_minimum(system)


def oven_at(readings, at: datetime, system: str) -> OvenStanding:
    """The oven as its last reading at or before `at` left it: ok when that reading is at or above the minimum. No
    reading on record is not a failure here (the shop may have started its log later), but says so."""
    before = [r for r in readings if r.at <= at]
    if not before:
        return OvenStanding(True, None, "no reading on record before then")
    last = max(before, key=lambda r: (r.at, str(r.key)))
    if reading_ok(last.temperature, system):
        return OvenStanding(True, last, "")
    minimum = oven_minimum(system)
    return OvenStanding(False, last, f"its last reading before then, {format_temperature(last.temperature, system)}"
                                     f", was below the {format_temperature(minimum, system)} a holding oven keeps "
                                     f"({SOURCE_OVEN})")


def reading_due(last_at: datetime | None, now: datetime) -> bool:
    """An oven in service with no reading for a shift (READING_INTERVAL, common practice, no source)."""
    return last_at is None or now - last_at > READING_INTERVAL


@dataclass(frozen=True)
class RebakeAnswer:
    ok: bool
    reasons: tuple


def rebake(classification: str, temperature: Temperature, hours: Decimal, number: int, system: str) -> RebakeAnswer:
    """Judge one rebake of electrodes: its temperature and time against clause 7.3.2.4 (A5.1 1 h at 500 to 800 degF
    [260 to 430 degC], A5.5 1 h at 700 to 800 degF [370 to 430 degC]) and whether these electrodes were rebaked
    before (`number` 1 for the first rebake; more than REBAKES_ALLOWED is refused). From memory."""
    system = _system(system)
    if not isinstance(hours, Decimal) or not hours.is_finite() or hours <= 0:
        raise ValueError("The rebake time is a number of hours greater than zero.")
    if isinstance(number, bool) or not isinstance(number, int) or number < 1:
        raise ValueError("The rebake number counts from 1.")
    electrode = decode(classification)
    reasons = []
    low, high = REBAKE_RANGE.get(electrode.spec, REBAKE_RANGE[SPEC_A5_1])[system]
    if not low <= temperature <= high:
        reasons.append(f"rebaked at {format_temperature(temperature, system)}, outside "
                       f"{format_temperature(low, system)} to {format_temperature(high, system)} for "
                       f"{electrode.spec} electrodes ({SOURCE_REBAKE})")
    if hours < REBAKE_MINIMUM_HOURS:
        reasons.append(f"rebaked for {hours.normalize():f} h, less than the 1 h minimum ({SOURCE_REBAKE})")
    if number > REBAKES_ALLOWED:
        reasons.append(f"rebaked {number} times: an electrode is rebaked no more than once ({SOURCE_REBAKE})")
    return RebakeAnswer(not reasons, tuple(reasons))


INTACT, DAMAGED = "intact", "damaged"


def flux_usable(package: str, *, wet: bool, contaminated: bool, dried: Temperature | None = None,
                dried_hours: Decimal | None = None, system: str = "US") -> tuple[bool, str]:
    """(usable, reason) for SAW flux (clause 7.3.3.2, from memory): never when it has been wet or is contaminated;
    from a damaged package only after drying at no less than 500 degF [260 degC] for 1 h."""
    system = _system(system)
    if package not in (INTACT, DAMAGED):
        raise ValueError(f"The package is {INTACT!r} or {DAMAGED!r}, not {package!r}.")
    if wet:
        return False, f"flux that has been wet is not used ({SOURCE_FLUX})"
    if contaminated:
        return False, f"flux is used dry and free of dirt, mill scale and other foreign material ({SOURCE_FLUX})"
    if package == DAMAGED:
        minimum = FLUX_DRYING[system]
        if dried is None or dried_hours is None or dried < minimum or dried_hours < FLUX_DRYING_HOURS:
            return False, (f"flux from a damaged package is discarded, or dried at no less than "
                           f"{format_temperature(minimum, system)} for 1 h before use ({SOURCE_FLUX})")
    return True, ""


# Events of a flux lot's log, in the order the shop records them (the oven log's flux rows).
OPENED_INTACT, OPENED_DAMAGED, DRIED, FOUND_WET, FOUND_CONTAMINATED = (
    "opened_intact", "opened_damaged", "dried", "wet", "contaminated")
FLUX_EVENTS = (OPENED_INTACT, OPENED_DAMAGED, DRIED, FOUND_WET, FOUND_CONTAMINATED)


@dataclass(frozen=True)
class FluxEvent:
    key: object
    at: datetime
    kind: str
    temperature: Temperature | None = None  # DRIED only
    hours: Decimal | None = None  # DRIED only


def flux_at(events, at: datetime, system: str = "US") -> tuple[bool, str]:
    """(usable, reason) of a flux lot at `at`, from its log: the last package opened at or before then sets intact
    or damaged; after it, the last drying counts, and flux found wet or contaminated stays unusable until another
    package is opened (clause 7.3.3.2 through `flux_usable`, from memory). Nothing opened on record is not a failure
    (the shop may have started its log later) but says so, as an oven without readings."""
    for event in events:
        if event.kind not in FLUX_EVENTS:
            raise ValueError(f"A flux event is one of {', '.join(FLUX_EVENTS)}, not {event.kind!r}.")
    before = sorted((e for e in events if e.at <= at), key=lambda e: (e.at, str(e.key)))
    opened = [i for i, e in enumerate(before) if e.kind in (OPENED_INTACT, OPENED_DAMAGED)]
    if not opened:
        return True, "no package opened on record before then"
    since = before[opened[-1]:]
    package = INTACT if since[0].kind == OPENED_INTACT else DAMAGED
    dryings = [e for e in since if e.kind == DRIED]
    last = dryings[-1] if dryings else None
    return flux_usable(package, wet=any(e.kind == FOUND_WET for e in since),
                       contaminated=any(e.kind == FOUND_CONTAMINATED for e in since),
                       dried=last.temperature if last else None, dried_hours=last.hours if last else None,
                       system=system)
