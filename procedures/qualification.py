"""Welder qualification ranges, continuity and the one check every weld map, inspection and traveler calls.

Plain Python, no Django. The ranges a welder's test qualifies (positions, plate thickness, SMAW electrode
groups) and the date a qualification lapses are derived here from the facts of the test, never typed by
hand, so a rule sits in exactly one place:

- AWS D1.1/D1.1M:2020 clause 6 (2015: clause 4): Table 6.10 positions, Table 6.11 plate thickness,
  continuity (use of the process at least once in any 6 months).
- ISO 9606-1:2012 (EN ISO 9606-1:2013): positions, thickness, 9.2 confirmation, 9.3 revalidation.
  The ISO position and thickness ranges are FROM MEMORY: confirm them against the standard before relying on
  them for an ISO job.

Plate tests only: pipe test positions (5G, 6G, 6GR, 5F, ...) are refused rather than guessed.

Essential variables beyond position, thickness and SMAW electrode group (AWS D1.1/D1.1M:2020 Table 6.12, from
memory): a change of process, with GMAW short-circuiting transfer (GMAW-S) a process apart from the other GMAW
transfers; a change of vertical progression (up / down); the omission of backing (a test with backing does not
qualify welding without it; a test without backing qualifies both). ISO 9606-1:2012: PF (up) and PG (down) are
separate positions already; welding details ss nb (single side, no backing), ss mb (with backing) and bs (both
sides), from memory: ss nb qualifies all three, ss mb and bs qualify ss mb and bs.
QualificationFacts and WeldDemand carry these as optional progression, backing and transfer. An absent value means
"not recorded": check_welder has no warning level, so an absent value is treated as matching (the weld is not
refused for it), and the acceptance reason names what could not be checked.
"""

from __future__ import annotations

import calendar
import re
from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date, datetime, timedelta
from decimal import Decimal

from core.units import Length, UnitError, format_length, parse_length
from procedures import electrodes

AWS = "AWS D1.1:2020"
ISO = "ISO 9606-1:2012"
CODES = (AWS, ISO)
JOINTS = ("groove", "fillet")

_AWS_SOURCE = "AWS D1.1/D1.1M:2020"
_ISO_SOURCE = "ISO 9606-1:2012"

# Ways people write the two codes; anything else is refused (another edition may differ).
_CODE_ALIASES = {
    "AWSD1.1:2020": AWS, "AWSD1.1/D1.1M:2020": AWS, "D1.1:2020": AWS, "D1.1/D1.1M:2020": AWS,
    "AWSD1.1M:2020": AWS, "AWSD1.1-2020": AWS,
    "ISO9606-1:2012": ISO, "ENISO9606-1:2013": ISO, "ISO9606-1:2013": ISO, "BSENISO9606-1:2013": ISO,
}


def _code(code) -> str:
    if not isinstance(code, str) or _CODE_ALIASES.get(code.upper().replace(" ", "")) is None:
        raise ValueError(f"Unknown qualification code {code!r}: known codes are {', '.join(CODES)}.")
    return _CODE_ALIASES[code.upper().replace(" ", "")]


def _joint(joint, what="joint") -> str:
    """'groove' or 'fillet'; ISO's 'butt' is the groove weld of AWS."""
    if isinstance(joint, str):
        key = joint.strip().lower()
        key = {"butt": "groove", "bw": "groove", "fw": "fillet", "cjp": "groove"}.get(key, key)
        if key in JOINTS:
            return key
    raise ValueError(f"{what} must be 'groove' (ISO: butt) or 'fillet', not {joint!r}.")


def _plain_date(value, what) -> date:
    if isinstance(value, datetime) or not isinstance(value, date):
        raise ValueError(f"{what} must be a calendar date (datetime.date), not {type(value).__name__} {value!r}.")
    return value


# --- positions --------------------------------------------------------------------------------------------------

AWS_POSITIONS = ("F", "H", "V", "OH")

# AWS D1.1/D1.1M:2020 Table 6.10, plate tests (published): test -> (joint tested, groove qualified, fillet qualified).
# Combinations such as 3G+4G are the union of their parts; the table's 3G+4G and 3F+4F rows ("all") agree.
_AWS_PLATE_TESTS = {
    "1G": ("groove", {"F"}, {"F", "H"}),
    "2G": ("groove", {"F", "H"}, {"F", "H"}),
    "3G": ("groove", {"F", "H", "V"}, {"F", "H", "V"}),
    "4G": ("groove", {"F", "OH"}, {"F", "H", "OH"}),
    "1F": ("fillet", set(), {"F"}),
    "2F": ("fillet", set(), {"F", "H"}),
    "3F": ("fillet", set(), {"F", "H", "V"}),
    "4F": ("fillet", set(), {"F", "H", "OH"}),
}
_AWS_PIPE_TEST = re.compile(r"^(?:[1-6][GF]R|[56][GF]|6GR)$")  # pipe and tubular tests: 1GR, 2FR, 5G, 6G, 6GR, 5F

ISO_POSITIONS = ("PA", "PB", "PC", "PD", "PE", "PF", "PG", "PH", "PJ")  # ISO 6947 (published)
ISO_FILLET_ONLY = {"PB", "PD"}  # horizontal-vertical and horizontal-overhead fillet positions (ISO 6947)

# ISO 9606-1:2012 ranges of welding positions qualified: FROM MEMORY ONLY (domain.md), not checked against the
# standard. Butt-weld tests (the table of butt welds, Table 9 as domain.md names it):
_ISO_BUTT_TESTS = {  # from memory
    "PA": {"PA"},
    "PC": {"PA", "PC"},
    "PE": {"PA", "PC", "PE"},
    "PF": {"PA", "PF"},
    "PG": {"PG"},
    "PH": {"PA", "PE", "PF", "PH"},
    "PJ": {"PA", "PE", "PG", "PJ"},
}
# Fillet-weld tests (the fillet table that follows Table 9): from memory.
_ISO_FILLET_TESTS = {  # from memory
    "PA": {"PA"},
    "PB": {"PA", "PB"},
    "PD": {"PA", "PB", "PD"},
    "PF": {"PA", "PB", "PF"},
    "PG": {"PG"},
    "PH": {"PA", "PB", "PD", "PF", "PH"},
    "PJ": {"PA", "PB", "PD", "PG", "PJ"},
}
# ISO 9606-1:2012 5.4: butt welds qualify fillet welds (from memory). Which fillet positions a butt test covers is
# our reading, from memory: the fillet row of the same position, a PC (horizontal) butt test reading as PB and
# a PE (overhead) butt test as PD, as AWS Table 6.10 does for 2G and 4G.
_ISO_BUTT_AS_FILLET = {"PA": "PA", "PC": "PB", "PE": "PD", "PF": "PF", "PG": "PG", "PH": "PH", "PJ": "PJ"}


def _order(positions, known) -> tuple[str, ...]:
    return tuple(p for p in known if p in positions)


def _split_test(test_position) -> list[str]:
    if not isinstance(test_position, str) or not test_position.strip():
        raise ValueError(f"A test position must be text such as '2G', '3G+4G' or 'PF', not {test_position!r}.")
    parts = [part.strip().upper().replace(" ", "") for part in test_position.split("+")]
    if any(not part for part in parts):
        raise ValueError(f"'{test_position}': write a combination as two test positions joined by '+', e.g. 3G+4G.")
    return parts


def _aws_part(part: str, joint: str | None):
    if part in _AWS_PLATE_TESTS:
        tested, groove, fillet = _AWS_PLATE_TESTS[part]
        if joint is not None and joint != tested:
            raise ValueError(f"{part} is a {tested} test position, so it cannot be a {joint} test "
                             f"({_AWS_SOURCE} Table 6.10).")
        return groove, fillet
    if _AWS_PIPE_TEST.match(part):
        kind = "groove" if "G" in part else "fillet"
        message = (f"{part} is a pipe {kind} test position; this engine covers plate tests only ({_AWS_SOURCE} "
                   "Table 6.10): 1G, 2G, 3G, 4G, 1F, 2F, 3F, 4F or a combination such as 3G+4G.")
        if joint == "fillet" and kind == "groove":
            message += f" A 'fillet' test in {part} does not exist: {part} is a groove position."
        raise ValueError(message)
    raise ValueError(f"Unknown test position '{part}': {_AWS_SOURCE} plate test positions are 1G, 2G, 3G, 4G, "
                     "1F, 2F, 3F, 4F, or a combination such as 3G+4G or 3F+4F.")


def _iso_part(part: str, joint: str | None):
    if part not in ISO_POSITIONS:
        raise ValueError(f"Unknown test position '{part}' for {ISO}: use an ISO 6947 position "
                         f"{', '.join(ISO_POSITIONS)} (pipe positions H-L045 and J-L045 are not covered).")
    if joint is None:
        joint = "fillet" if part in ISO_FILLET_ONLY else "groove"
    if joint == "groove":
        if part in ISO_FILLET_ONLY:
            raise ValueError(f"{part} is a fillet-weld position (ISO 6947): a butt test cannot be welded in it; "
                             "butt test positions are PA, PC, PE, PF, PG, PH, PJ.")
        return _ISO_BUTT_TESTS[part], _ISO_FILLET_TESTS[_ISO_BUTT_AS_FILLET[part]]
    if part not in _ISO_FILLET_TESTS:
        raise ValueError(f"{part} is a butt-weld position (ISO 6947): fillet test positions are "
                         f"{', '.join(_ISO_FILLET_TESTS)}.")
    return set(), _ISO_FILLET_TESTS[part]


def normalise_test_position(test_position, code=AWS) -> str:
    """'3g + 4g' -> '3G+4G': the form records and messages use."""
    _code(code)
    return "+".join(_split_test(test_position))


def positions_qualified(test_position, code=AWS, *, joint=None) -> dict[str, frozenset[str]]:
    """Positions a plate test qualifies, for groove and for fillet welds.

    AWS answers in F, H, V, OH (AWS D1.1/D1.1M:2020 Table 6.10). ISO answers in ISO 6947 codes; an ISO position
    such as PA or PF does not say whether the test was a butt or a fillet weld, so pass joint="fillet" for a fillet
    test (PB and PD are always fillet tests; otherwise a butt test is assumed). ISO ranges are from memory.
    """
    code = _code(code)
    joint = None if joint is None else _joint(joint)
    part_of = _aws_part if code == AWS else _iso_part
    groove, fillet = set(), set()
    for part in _split_test(test_position):
        g, f = part_of(part, joint)
        groove |= g
        fillet |= f
    return {"groove": frozenset(groove), "fillet": frozenset(fillet)}


# --- thickness --------------------------------------------------------------------------------------------------

_IN = Length.from_inches


def _thickness(value, what) -> Length:
    length = parse_length(value)
    if length.mm <= 0:
        raise UnitError(f"{what} must be more than zero, e.g. 3/8 in or 10 mm; got {value!r}.")
    return length


def _written_in_mm(value) -> bool:
    return isinstance(value, str) and re.search(r"(?:mm|cm|m|millimet(?:re|er)s?)\s*$", value.strip(), re.I) is not None


def thickness_qualified(test_thickness, test="groove", code=AWS, *, system=None,
                        weld=None) -> tuple[Length, Length | None]:
    """(minimum, maximum) plate thickness a test qualifies; maximum None means unlimited.

    weld: the joint type of the production weld ("groove" or "fillet"); None means the same type as the test.
    AWS D1.1/D1.1M:2020 Table 6.11 has a fillet row for every plate test: a groove test qualifies fillet welds on
    base metal 1/8 in [3 mm] and over, unlimited (from memory, high confidence), however thin the test plate.
    AWS: a groove test thinner than 3/8 in [10 mm] is refused, because Table 6.11 has no plate row below it (thinner
    work is sheet steel, AWS D1.3). On an SI job (system="SI", or the test thickness written in mm) the D1.1M SI
    figures are used: 3 mm, 10 mm, 20 mm, 25 mm (SI equivalents from memory).
    ISO 9606-1: the range of the test's own joint type (a butt test's fillet range is not entered: from memory only,
    and not confirmed), so weld is ignored there.
    """
    code = _code(code)
    test = _joint(test, "test")
    weld = test if weld is None else _joint(weld, "weld")
    t = _thickness(test_thickness, "Test plate thickness")
    if system is None:
        system = "SI" if _written_in_mm(test_thickness) else "US"
    if system not in ("US", "SI"):
        raise ValueError(f"Unit system must be 'US' or 'SI', not {system!r}.")
    if code == ISO:
        return _iso_thickness(t, test)
    si = system == "SI"
    eighth = Length(Decimal(3)) if si else _IN("0.125")
    # AWS D1.1/D1.1M:2020 Table 6.11, plate groove tests (published; SI column from memory).
    three_eighths, one_inch = (Length(Decimal(10)), Length(Decimal(25))) if si else (_IN("0.375"), _IN(1))
    if test == "groove" and t < three_eighths:
        shown = _inches(t) if system == "US" else format_length(t, "SI")
        raise ValueError(f"A {shown} groove test is thinner than the thinnest plate test of "
                         f"{_AWS_SOURCE} Table 6.11 ({format_length(three_eighths, system)}); "
                         "use a 3/8 in [10 mm] or 1 in [25 mm] test plate.")
    if test == "fillet" or weld == "fillet":
        # AWS D1.1/D1.1M:2020 Table 6.11, fillet rows: a fillet test, and a groove test for fillet welds, qualify
        # base metal 1/8 in [3 mm] and over, unlimited (from memory, high confidence; SI figure from memory).
        return eighth, None
    if t == three_eighths:
        return eighth, (Length(Decimal(20)) if si else _IN("0.75"))
    if t < one_inch:
        return eighth, t * 2
    return eighth, None


def _iso_thickness(t: Length, test: str) -> tuple[Length, Length | None]:
    three, five, twelve = Length(Decimal(3)), Length(Decimal(5)), Length(Decimal(12))
    if test == "groove":
        # ISO 9606-1:2012 Table 5, butt welds in plate (from memory): t < 3 mm: t to 2t; 3 <= t <= 12: 3 mm to 2t;
        # t > 12 mm: 5 mm and over.
        if t < three:
            return t, t * 2
        if t <= twelve:
            return three, t * 2
        return five, None
    # ISO 9606-1:2012, fillet welds in plate (from memory, the fillet thickness table after Table 5):
    # t < 3 mm: t to 3 mm; t >= 3 mm: 3 mm and over.
    if t < three:
        return t, three
    return three, None


# --- continuity and revalidation --------------------------------------------------------------------------------

def add_months(start: date, months: int) -> date:
    """Calendar months later, clamped to the month's end: 2026-08-31 + 6 -> 2027-02-28."""
    index = start.year * 12 + start.month - 1 + months
    year, month = divmod(index, 12)
    if not 1 <= year <= 9999:
        raise ValueError(f"{start.isoformat()} plus {months} months is outside the calendar Python can hold.")
    day = min(start.day, calendar.monthrange(year, month + 1)[1])
    return date(year, month + 1, day)


CONTINUITY_MONTHS = 6  # AWS D1.1/D1.1M:2020 clause 6.2.3.1 (clause number from memory); ISO 9606-1:2012 9.2


def continuity_until(last_use, code=AWS) -> date:
    """The last day a qualification stays valid without further use of the process.

    Six calendar months after the last use, clamped to the month's end (2026-08-31 -> 2027-02-28,
    2027-08-31 -> 2028-02-29). The qualification is valid through that day and lapses the day after.
    AWS D1.1/D1.1M:2020 clause 6.2.3.1 (clause number from memory): in effect while the welder uses the process
    at least once in any 6 months. ISO 9606-1:2012 9.2: confirmed every 6 months, same arithmetic.
    """
    _code(code)
    return add_months(_plain_date(last_use, "Last use of the process"), CONTINUITY_MONTHS)


def continuity_runs(days) -> list[tuple[date, date]]:
    """The unbroken runs in a welder's uses of one process: [(first use, last use)], oldest first.

    Within a run each use falls on or before continuity_until of the use before it (same rule and source as
    continuity_until: six calendar months, both codes); a longer gap starts a new run. A qualification's chain of
    continuity therefore lives in at most one run: the one that holds its test date, or the first one after it."""
    runs: list[list[date]] = []
    for day in sorted(set(days)):
        if runs and day <= continuity_until(runs[-1][1]):
            runs[-1][1] = day
        else:
            runs.append([day, day])
    return [(first, last) for first, last in runs]


def continuity_evidence(days) -> list[date]:
    """The fewest uses of one process that still show every run unbroken: the first use of each run, then each
    time the latest use on or before continuity_until of the one picked before, up to the run's last use (same rule
    and source as continuity_runs). A printed summary lists these rather than ten years of entries: each shown use
    keeps the chain alive to the next, so the chain is proven by them alone. Interval covering; greedy is fewest."""
    found = sorted(set(days))
    picked: list[date] = []
    i = 0
    while i < len(found):
        picked.append(found[i])
        limit = continuity_until(found[i])
        j = i
        while j + 1 < len(found) and found[j + 1] <= limit:
            j += 1
        i = j if j > i else i + 1  # the latest use within reach; past a gap, the next use starts a new run
    return picked


# ISO 9606-1:2012 9.3 revalidation routes (published): months until revalidation is due; None = no fixed date.
ISO_REVALIDATION_MONTHS = {
    "a": 36,  # a) a new test every 3 years
    "b": 24,  # b) every 2 years, two production welds of the last 6 months tested
    "c": None,  # c) valid while with the same manufacturer under ISO 3834-2 with documented acceptable quality
}


def _route(route) -> str:
    if isinstance(route, str):
        key = route.strip().lower().removeprefix("9.3").strip(" )(.")
        if key in ISO_REVALIDATION_MONTHS:
            return key
    raise ValueError(f"ISO 9606-1:2012 9.3 revalidation route must be 'a' (retest every 3 years), 'b' (every "
                     f"2 years with production welds tested) or 'c' (ISO 3834-2 manufacturer), not {route!r}.")


def iso_revalidation_due(test_date, route) -> date | None:
    """The last day an ISO 9606-1 qualification is valid before it must be revalidated (9.3); None: no fixed date.

    test_date is the date of the test or of the last revalidation. Same convention as continuity_until: valid
    through the returned day (route a: 2024-02-29 -> 2027-02-28).
    """
    months = ISO_REVALIDATION_MONTHS[_route(route)]
    start = _plain_date(test_date, "Test date")
    return None if months is None else add_months(start, months)


# --- SMAW electrode groups --------------------------------------------------------------------------------------

# AWS D1.1/D1.1M:2020 clause 6, SMAW electrode groups F1..F4 (from memory): the table lives once, in
# procedures.electrodes (GROUPS_QUALIFIED, group_of); this module only asks it.


def smaw_electrode_group(classification) -> str:
    """'E7018' -> 'F4', from procedures.electrodes."""
    try:
        return electrodes.group_of(classification)
    except ValueError:
        raise ValueError(f"{classification!r} is not an SMAW electrode of a known group: give an AWS A5.1 or A5.5 "
                         "classification such as E6010, E7018 or E8018-C3, or a group F1 to F4.") from None


def electrode_groups_qualified(classification_or_group) -> frozenset[str]:
    """SMAW groups a test electrode qualifies: F4 -> F4..F1, F3 -> F3..F1, F2 -> F2, F1; F1 -> F1 (from memory)."""
    text = classification_or_group.strip().upper() if isinstance(classification_or_group, str) else None
    group = text if text in electrodes.GROUPS_QUALIFIED else smaw_electrode_group(classification_or_group)
    return electrodes.groups_qualified(group)


# --- the facts of a test, the weld asked for, and the check -----------------------------------------------------

PROCESSES = ("SMAW", "GMAW", "FCAW", "SAW", "GTAW")
# ISO 4063 reference numbers (from memory) read as the AWS process names the rest of Legwork uses.
_ISO_4063 = {"111": "SMAW", "121": "SAW", "131": "GMAW", "135": "GMAW", "138": "GMAW", "114": "FCAW",
             "136": "FCAW", "141": "GTAW"}


def _process(process) -> str:
    if isinstance(process, str):
        key = process.strip().upper()
        key = _ISO_4063.get(key, key)
        if key in PROCESSES:
            return key
    raise ValueError(f"Process must be one of {', '.join(PROCESSES)} or GMAW-S (or an ISO 4063 number such as 111 or "
                     f"135), not {process!r}.")


# --- essential variables beyond position and thickness (AWS D1.1:2020 Table 6.12, ISO 9606-1:2012; from memory) ---

PROGRESSIONS = ("up", "down")
_PROGRESSION_WORDS = {"up": "up", "uphill": "up", "vertical up": "up", "vu": "up", "pf": "up",
                      "down": "down", "downhill": "down", "vertical down": "down", "vd": "down", "pg": "down"}
BACKINGS = ("without", "with", "both_sides")
_BACKING_WORDS = {"without": "without", "without backing": "without", "no backing": "without", "open root": "without",
                  "ss nb": "without", "nb": "without",
                  "with": "with", "with backing": "with", "ss mb": "with", "mb": "with",
                  "both sides": "both_sides", "both_sides": "both_sides", "bs": "both_sides"}
# What a test's backing qualifies. AWS D1.1/D1.1M:2020 Table 6.12 (from memory): without backing qualifies with and
# without; with backing qualifies with backing only; welding from both sides counts as with backing (from memory).
# ISO 9606-1:2012 welding details (from memory): ss nb qualifies ss nb, ss mb, bs; ss mb and bs qualify ss mb, bs.
BACKING_QUALIFIES = {
    "without": frozenset({"without", "with", "both_sides"}),
    "with": frozenset({"with", "both_sides"}),
    "both_sides": frozenset({"with", "both_sides"}),
}
_BACKING_NAMES = {AWS: {"without": "without backing", "with": "with backing", "both_sides": "from both sides"},
                  ISO: {"without": "ss nb", "with": "ss mb", "both_sides": "bs"}}
TRANSFERS = ("short_circuit", "globular", "spray", "pulsed")
_TRANSFER_WORDS = {"short_circuit": "short_circuit", "short circuit": "short_circuit", "short": "short_circuit",
                   "short circuiting": "short_circuit", "short arc": "short_circuit", "gmaw-s": "short_circuit",
                   "dip": "short_circuit", "globular": "globular", "spray": "spray", "pulsed": "pulsed",
                   "pulsed spray": "pulsed"}


def _word(value, words: dict, what: str, example: str) -> str | None:
    if value is None:
        return None
    if isinstance(value, str):
        key = " ".join(value.replace("_", " ").replace("-", " ").split()).lower()
        key = {"gmaw s": "gmaw-s"}.get(key, key)
        found = words.get(key) or words.get(key.replace(" ", "_"))
        if found:
            return found
    raise ValueError(f"{what} must be {example}, or None when not recorded; not {value!r}.")


def _progression(value) -> str | None:
    return _word(value, _PROGRESSION_WORDS, "Vertical progression", "'up' or 'down'")


def _backing(value) -> str | None:
    return _word(value, _BACKING_WORDS, "Backing", "'with', 'without' or 'both sides' (ISO: ss mb, ss nb, bs)")


def _transfer(value) -> str | None:
    return _word(value, _TRANSFER_WORDS, "GMAW transfer", "'short_circuit', 'globular', 'spray' or 'pulsed'")


def _process_and_transfer(instance, put):
    """'GMAW-S' is GMAW with short-circuiting transfer; a transfer is for GMAW only."""
    raw = instance.process.strip().upper().replace(" ", "") if isinstance(instance.process, str) else None
    transfer = _transfer(instance.transfer)
    if raw == "GMAW-S":
        if transfer not in (None, "short_circuit"):
            raise ValueError(f"Process GMAW-S is short-circuiting transfer, but transfer says {transfer!r}: give one "
                             "or make them agree.")
        put("process", "GMAW")
        put("transfer", "short_circuit")
        return
    put("process", _process(instance.process))
    if transfer is not None and instance.process != "GMAW":
        raise ValueError(f"A metal transfer mode ({transfer}) applies to GMAW only, not {instance.process}.")
    put("transfer", transfer)


def _process_name(process: str, transfer: str | None) -> str:
    if process == "GMAW" and transfer == "short_circuit":
        return "GMAW-S"
    if process == "GMAW" and transfer is not None:
        return f"GMAW ({transfer.replace('_', '-')} transfer)"
    return process


def _bool(value, what) -> bool:
    if not isinstance(value, bool):
        raise ValueError(f"{what} must be True or False, not {value!r}.")
    return value


def _electrode(value) -> str | None:
    if value is None:
        return None
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"Electrode classification must be text such as E7018, or None; not {value!r}.")
    return value.strip().upper()


def _setter(instance):
    """Normalise a field of a frozen dataclass in __post_init__."""
    def put(name, value):
        object.__setattr__(instance, name, value)
    return put


@dataclass(frozen=True)
class QualificationFacts:
    """The facts of one welder qualification test record (WPQ), as the database holds them.

    last_use_of_process: the latest recorded use of the process (continuity), taken as the end of an unbroken
    chain of uses since the test; None means only the test itself. A record whose continuity once lapsed must be
    revoked (revoked=True) and replaced by a new test. For ISO, test_date is the test or the last revalidation and
    iso_revalidation the 9.3 route ('a' when not given).
    """

    process: str
    joint: str
    test_position: str
    test_thickness: Length
    test_date: date
    passed: bool
    electrode: str | None = None
    last_use_of_process: date | None = None
    code: str = AWS
    welder: str = ""
    revoked: bool = False
    iso_revalidation: str | None = None
    unit_system: str | None = None  # 'US' or 'SI' (AWS D1.1M figures); None: read from how the thickness is written
    progression: str | None = None  # vertical progression of the test: 'up' or 'down'; None: not recorded
    backing: str | None = None  # 'with', 'without' or 'both_sides' (ISO ss mb, ss nb, bs); None: not recorded
    transfer: str | None = None  # GMAW: 'short_circuit' (GMAW-S), 'globular', 'spray', 'pulsed'; None: not recorded

    def __post_init__(self):
        put = _setter(self)
        put("code", _code(self.code))
        _process_and_transfer(self, put)
        put("progression", _progression(self.progression))
        put("backing", _backing(self.backing))
        put("joint", _joint(self.joint))
        put("test_position", normalise_test_position(self.test_position, self.code))
        if self.unit_system is None:
            put("unit_system", "SI" if _written_in_mm(self.test_thickness) else "US")
        elif self.unit_system not in ("US", "SI"):
            raise ValueError(f"unit_system must be 'US' or 'SI', not {self.unit_system!r}.")
        put("test_thickness", _thickness(self.test_thickness, "Test plate thickness"))
        put("test_date", _plain_date(self.test_date, "Test date"))
        _bool(self.passed, "passed (the test result)")
        _bool(self.revoked, "revoked")
        put("electrode", _electrode(self.electrode))
        if self.last_use_of_process is not None:
            _plain_date(self.last_use_of_process, "Last use of the process")
        if not isinstance(self.welder, str):
            raise ValueError(f"welder must be the welder's stamp as text, e.g. 'W-14', not {self.welder!r}.")
        put("welder", self.welder.strip())
        if self.iso_revalidation is not None:
            put("iso_revalidation", _route(self.iso_revalidation))
        # A record that exists can always be evaluated: ranges are computed now, so bad facts fail here
        # (a 5G "fillet test", a 3G test recorded as fillet, a groove test on 1/4 in plate).
        positions_qualified(self.test_position, self.code, joint=self.joint)
        thickness_qualified(self.test_thickness, self.joint, self.code, system=self.unit_system)
        if self.process == "SMAW" and self.electrode is not None and self.code == AWS:
            smaw_electrode_group(self.electrode)

    @property
    def label(self) -> str:
        who = f"Stamp {self.welder}'s" if self.welder else "This"
        process = "GMAW-S" if self.process == "GMAW" and self.transfer == "short_circuit" else self.process
        return f"{who} {process} {self.test_position} test of {self.test_date.isoformat()}"


_ALL_POSITIONS = set(AWS_POSITIONS) | set(ISO_POSITIONS)


# A weld map may record its position in the other system's words. The correspondence (shared domain.md,
# published): 1F = PA, 2F = PB, 3F = PF or PG, 4F = PD; 1G = PA, 2G = PC, 3G = PF or PG, 4G = PE.
ISO_TO_AWS = {"PA": "F", "PB": "H", "PC": "H", "PD": "OH", "PE": "OH", "PF": "V", "PG": "V"}
AWS_TO_ISO = {"fillet": {"F": "PA", "H": "PB", "OH": "PD"}, "groove": {"F": "PA", "H": "PC", "OH": "PE"}}


def _translate_position(position, code, joint):
    """An ISO 6947 position on an AWS job reads as F/H/V/OH; F/H/OH on an ISO job read as ISO 6947 codes.

    V on an ISO job is refused: ISO tells vertical-up (PF) from vertical-down (PG), AWS letters do not.
    """
    if code == AWS and position in ISO_TO_AWS:
        return ISO_TO_AWS[position]
    if code == ISO and position in AWS_POSITIONS:
        if position == "V":
            raise ValueError("An ISO 9606-1 job needs the vertical direction: record the weld as PF (vertical up) "
                             "or PG (vertical down), not V.")
        return AWS_TO_ISO.get(joint, AWS_TO_ISO["fillet"])[position]
    return position


@dataclass(frozen=True)
class WeldDemand:
    """What a weld asks of the welder: process, joint, position, base metal thickness, electrode, code."""

    process: str
    joint: str
    position: str
    thickness: Length
    electrode: str | None = None
    code: str = AWS
    progression: str | None = None  # vertical welds: 'up' or 'down'; None: not stated
    backing: str | None = None  # groove welds: 'with', 'without', 'both_sides'; None: not stated
    transfer: str | None = None  # GMAW: 'short_circuit' (GMAW-S), 'globular', 'spray', 'pulsed'; None: not stated

    def __post_init__(self):
        put = _setter(self)
        put("code", _code(self.code))
        _process_and_transfer(self, put)
        put("progression", _progression(self.progression))
        put("backing", _backing(self.backing))
        put("joint", _joint(self.joint))
        put("thickness", _thickness(self.thickness, "Base metal thickness at the weld"))
        put("electrode", _electrode(self.electrode))
        known = AWS_POSITIONS if self.code == AWS else ISO_POSITIONS
        position = self.position.strip().upper() if isinstance(self.position, str) else None
        position = _translate_position(position, self.code, self.joint)
        if position not in known:
            hint = " (ISO codes are for an ISO 9606-1 job)" if position in _ALL_POSITIONS else ""
            raise ValueError(f"Weld position for {self.code} must be one of {', '.join(known)}{hint}, "
                             f"not {self.position!r}.")
        if self.code == ISO and self.joint == "groove" and position in ISO_FILLET_ONLY:
            raise ValueError(f"{position} is a fillet-weld position (ISO 6947); a butt weld cannot be in {position}.")
        put("position", position)


@dataclass(frozen=True)
class Eligibility:
    """May this welder make this weld on this day, and why (every refusal explained)."""

    allowed: bool
    reasons: tuple[str, ...]
    qualification: QualificationFacts | None
    valid_until: date | None = None


@dataclass(frozen=True)
class QualificationStatus:
    """'qualified', 'lapsing' (lapses within warn_days) or 'lapsed' (not in effect) on a day."""

    state: str
    valid_until: date | None  # last valid day; None when the record never covered the day (failed, revoked)
    lapses_on: date | None  # first day no longer valid
    reason: str


def _inches(length: Length) -> str:
    """Inches as a fitter writes them (core.units marks a rounded metric thickness with '≈')."""
    return format_length(length, "US")


def _show(length: Length, code: str) -> str:
    if code == ISO:
        return format_length(length, "SI")
    return f"{_inches(length)} [{format_length(length, 'SI')}]"


def _range_text(low: Length, high: Length | None, code: str) -> str:
    return f"{_show(low, code)} and over" if high is None else f"{_show(low, code)} to {_show(high, code)}"


@dataclass(frozen=True)
class _Validity:
    until: date  # last valid day
    last_use: date  # the use continuity counts from
    by_revalidation: bool  # True when ISO 9606-1 9.3 revalidation, not continuity, ends it

    def explain(self, q: QualificationFacts) -> str:
        if self.by_revalidation:
            return f"revalidation due under {_ISO_SOURCE} 9.3 {q.iso_revalidation or 'a'})"
        return f"continuity: last {q.process} use {self.last_use.isoformat()}"


def _validity(q: QualificationFacts) -> _Validity:
    """Last valid day of a passed record: continuity, and for ISO the 9.3 revalidation date, whichever is first."""
    used = q.test_date if q.last_use_of_process is None else max(q.test_date, q.last_use_of_process)
    until = continuity_until(used, q.code)
    if q.code == ISO:
        due = iso_revalidation_due(q.test_date, q.iso_revalidation or "a")
        if due is not None and due < until:
            return _Validity(due, used, True)
    return _Validity(until, used, False)


def _not_in_force(q: QualificationFacts, on: date) -> list[str]:
    """Reasons the record covers nothing on that day, whatever the weld."""
    reasons = []
    if not q.passed:
        reasons.append(f"{q.label} was not passed: a failed test qualifies nothing.")
    if q.revoked:
        reasons.append(f"{q.label} has been revoked.")
    if q.test_date > on:
        reasons.append(f"{q.label} is dated after the weld date {on.isoformat()}: a test cannot cover a weld made "
                       "before it.")
    if reasons:
        return reasons
    validity = _validity(q)
    if validity.until < on:
        lapsed = (validity.until + timedelta(days=1)).isoformat()
        if validity.by_revalidation:
            reasons.append(f"{q.label}: qualification expired on {lapsed} ({validity.explain(q)}).")
        else:
            source = (f"{_AWS_SOURCE} clause 6.2.3.1, clause number from memory" if q.code == AWS
                      else f"{_ISO_SOURCE} 9.2")
            reasons.append(f"{q.label}: continuity lapsed on {lapsed}: last {q.process} use "
                           f"{validity.last_use.isoformat()} (the process must be used at least once in any "
                           f"6 months; {source}).")
    return reasons


def _thickness_range(q: QualificationFacts, weld_joint: str | None = None) -> tuple[Length, Length | None]:
    """The range for the weld's joint type: a groove test covers fillets on 1/8 in and over (Table 6.11)."""
    return thickness_qualified(q.test_thickness, q.joint, q.code, system=q.unit_system, weld=weld_joint)


def _table_6_11(q: QualificationFacts, weld_joint: str) -> str:
    if q.code != AWS:
        return ""
    return " Table 6.11, fillet row, from memory" if weld_joint == "fillet" else " Table 6.11"


def _refusals(q: QualificationFacts, weld: WeldDemand, on: date) -> list[str]:
    if q.code != weld.code:
        return [f"{q.label} is under {q.code}; this weld is to {weld.code}."]
    reasons = _not_in_force(q, on)
    source = _AWS_SOURCE if q.code == AWS else f"{_ISO_SOURCE}, from memory"
    if q.process != weld.process:
        reasons.append(f"{q.label} is for {q.process}; this weld is {weld.process}.")
    known = AWS_POSITIONS if q.code == AWS else ISO_POSITIONS
    qualified = positions_qualified(q.test_position, q.code, joint=q.joint)[weld.joint]
    if not qualified:
        reasons.append(f"{q.label} is a {q.joint} test and qualifies no {weld.joint} welds; this weld is a "
                       f"{weld.joint} weld ({source}{' Table 6.10' if q.code == AWS else ''}).")
    elif weld.position not in qualified:
        reasons.append(f"{q.label} qualifies {weld.joint} welds in {', '.join(_order(qualified, known))}; "
                       f"this weld is {weld.position} ({source}{' Table 6.10' if q.code == AWS else ''}).")
    low, high = _thickness_range(q, weld.joint)
    if weld.thickness < low or (high is not None and weld.thickness > high):
        reasons.append(f"{q.label} on {_show(q.test_thickness, q.code)} plate qualifies {weld.joint} welds on "
                       f"{_range_text(low, high, q.code)}; this weld is on {_show(weld.thickness, q.code)} "
                       f"({source}{_table_6_11(q, weld.joint)}).")
    if q.code == AWS and q.process == weld.process == "SMAW":
        reasons.extend(_electrode_refusals(q, weld))
    reasons.extend(_essential_refusals(q, weld))
    return reasons


_TABLE_6_12 = f"{_AWS_SOURCE} Table 6.12, from memory"


def _essential_refusals(q: QualificationFacts, weld: WeldDemand) -> list[str]:
    """GMAW-S against other GMAW, vertical progression, omitted backing; only where both sides record the value."""
    reasons = []
    if q.code == AWS and q.process == weld.process == "GMAW" and q.transfer and weld.transfer and \
            (q.transfer == "short_circuit") != (weld.transfer == "short_circuit"):
        reasons.append(f"{q.label} was welded {_process_name(q.process, q.transfer)}; this weld is "
                       f"{_process_name(weld.process, weld.transfer)}: GMAW-S and the other GMAW transfers qualify "
                       f"apart ({_TABLE_6_12}).")
    if q.code == AWS and weld.position == "V" and q.progression and weld.progression and \
            q.progression != weld.progression:
        reasons.append(f"{q.label} was welded vertical {q.progression}; this weld is vertical {weld.progression}: a "
                       f"change of vertical progression needs a new test ({_TABLE_6_12}).")
    if weld.joint == "groove" and q.joint == "groove" and q.backing and weld.backing and \
            weld.backing not in BACKING_QUALIFIES[q.backing]:
        names = _BACKING_NAMES[q.code]
        source = _TABLE_6_12 if q.code == AWS else f"{_ISO_SOURCE} welding details, from memory"
        reasons.append(f"{q.label} was welded {names[q.backing]}, which does not qualify welding "
                       f"{names[weld.backing]} ({source}).")
    return reasons


def _not_checked(q: QualificationFacts, weld: WeldDemand) -> list[str]:
    """The essential variables a check could not compare because one side does not record them."""
    missing = []
    if q.code == AWS and q.process == weld.process == "GMAW" and not (q.transfer and weld.transfer):
        missing.append("GMAW transfer (GMAW-S or not)")
    if q.code == AWS and weld.position == "V" and not (q.progression and weld.progression):
        missing.append("vertical progression")
    if weld.joint == "groove" and q.joint == "groove" and not (q.backing and weld.backing):
        missing.append("backing")
    return missing


def _electrode_refusals(q: QualificationFacts, weld: WeldDemand) -> list[str]:
    source = f"{_AWS_SOURCE} clause 6 SMAW electrode groups, from memory"
    if q.electrode is None:
        return [f"{q.label} records no electrode: the SMAW electrode group cannot be checked ({source})."]
    if weld.electrode is None:
        return [f"The weld names no electrode: the SMAW electrode group cannot be checked against {q.label} "
                f"({source})."]
    tested = smaw_electrode_group(q.electrode)
    wanted = smaw_electrode_group(weld.electrode)
    covered = electrode_groups_qualified(tested)
    if wanted in covered:
        return []
    return [f"{q.label} was welded with {q.electrode} (group {tested}), which qualifies "
            f"{', '.join(sorted(covered, reverse=True))}; this weld calls for {weld.electrode} (group {wanted}) "
            f"({source})."]


def _acceptance(q: QualificationFacts, weld: WeldDemand, validity: _Validity) -> str:
    low, high = _thickness_range(q, weld.joint)
    known = AWS_POSITIONS if q.code == AWS else ISO_POSITIONS
    qualified = positions_qualified(q.test_position, q.code, joint=q.joint)[weld.joint]
    fillet_row = " (fillet row from memory)" if weld.joint == "fillet" else ""
    source = (f"{_AWS_SOURCE} Tables 6.10 and 6.11{fillet_row}" if q.code == AWS
              else f"{_ISO_SOURCE}, position and thickness ranges from memory")
    text = (f"Covered by {q.label[0].lower() + q.label[1:]} on {_show(q.test_thickness, q.code)} plate: "
            f"{weld.joint} welds in {', '.join(_order(qualified, known))} on {_range_text(low, high, q.code)}")
    if q.code == AWS and q.process == "SMAW":
        text += f", electrode groups {', '.join(sorted(electrode_groups_qualified(q.electrode), reverse=True))}"
    text = f"{text}; valid until {validity.until.isoformat()} ({validity.explain(q)}) ({source})."
    missing = _not_checked(q, weld)
    if missing:
        text += (f" Not checked, not recorded on the test or the weld: {', '.join(missing)} "
                 f"({_TABLE_6_12 if q.code == AWS else _ISO_SOURCE + ', from memory'}).")
    return text


def check_welder(qualifications, weld, on) -> Eligibility:
    """May a welder holding these qualifications make this weld on this day?

    Every record is checked against every requirement and every refusal is listed. When several records cover the
    weld, the one that stays valid longest is named (the first given, on a tie).
    """
    if isinstance(qualifications, QualificationFacts | str | bytes) or not isinstance(qualifications, Iterable):
        raise ValueError("qualifications must be a list of QualificationFacts (the welder's test records).")
    records = tuple(qualifications)
    for record in records:
        if not isinstance(record, QualificationFacts):
            raise ValueError(f"Each qualification must be a QualificationFacts, not {type(record).__name__}.")
    if not isinstance(weld, WeldDemand):
        raise ValueError(f"weld must be a WeldDemand (process, joint, position, thickness, ...), not "
                         f"{type(weld).__name__}.")
    on = _plain_date(on, "Weld date")
    if not records:
        return Eligibility(False, (f"No welder qualification on record for {weld.process} {weld.joint} welds.",),
                           None)
    best, refusals = None, []
    for q in records:
        reasons = _refusals(q, weld, on)
        if reasons:
            refusals.extend(reasons)
            continue
        validity = _validity(q)
        if best is None or validity.until > best[1].until:
            best = (q, validity)
    if best is None:
        return Eligibility(False, tuple(refusals), None)
    q, validity = best
    return Eligibility(True, (_acceptance(q, weld, validity),), q, validity.until)


may_weld = check_welder  # the name the brief used


def status_on(qualification, on, warn_days=30) -> QualificationStatus:
    """'qualified', 'lapsing' (the last valid day is less than warn_days away) or 'lapsed', with the lapse date.

    lapsing: the record lapses within warn_days, i.e. lapses_on - on <= warn_days. A failed, revoked or
    not-yet-taken test is 'lapsed' (not in effect) with the reason.
    """
    if not isinstance(qualification, QualificationFacts):
        raise ValueError(f"status_on needs a QualificationFacts, not {type(qualification).__name__}.")
    on = _plain_date(on, "Date")
    if isinstance(warn_days, bool) or not isinstance(warn_days, int) or warn_days < 0:
        raise ValueError(f"warn_days must be a whole number of days, 0 or more, not {warn_days!r}.")
    q = qualification
    problems = _not_in_force(q, on)
    if problems and (not q.passed or q.revoked or q.test_date > on):
        return QualificationStatus("lapsed", None, None, " ".join(problems))
    validity = _validity(q)
    lapses_on = validity.until + timedelta(days=1)
    if problems:
        return QualificationStatus("lapsed", validity.until, lapses_on, " ".join(problems))
    if (lapses_on - on).days <= warn_days:
        return QualificationStatus("lapsing", validity.until, lapses_on,
                                   f"{q.label} lapses on {lapses_on.isoformat()} ({validity.explain(q)}).")
    return QualificationStatus("qualified", validity.until, lapses_on,
                               f"{q.label} is valid until {validity.until.isoformat()} ({validity.explain(q)}).")
