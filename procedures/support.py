"""Does a WPS qualified by test stay inside what its PQRs qualify? Value by value, with the clause that says so.

AWS D1.1/D1.1M:2020 clause 6 Part B: Table 6.1 (positions a PQR test position qualifies), Table 6.2 (base metal
thickness a test plate qualifies), Table 6.5 (PQR essential variables: a change beyond them needs a new PQR), and
the table of base metals a PQR qualifies. ISO 15614-1:2017 ranges of qualification as far as known here, every one
FROM MEMORY until someone with the standard confirms it.

How it works: review() parses the WPS and every PQR first (through procedures.prequalified.parse_procedure and
core.units, so a value is read the same way everywhere); anything missing or unreadable raises ValueError
before any rule runs. Each rule in AWS_RULES / ISO_RULES then yields Rows: one per WPS value, naming the PQRs that
support it and, when none (or not all of it) is supported, a Finding. A WPS value is supported when at least one
PQR supports it; a range (thickness, amperage, ...) is supported when the PQRs' ranges together cover it.

Which PQRs a rule looks at: those welded with the WPS's process; when none was, all of them (the process
finding already says the WPS cannot stand, and the other rows still show what else is missing).

Findings are procedures.prequalified.Finding: rule, severity ("error": no listed PQR supports this WPS value;
"warning": a person must confirm), message (WPS value, PQR values, what would be needed, in the WPS's units),
source, field (the WPS key). envelope() returns the same rows for a page table.

How to add a rule: write `def rule_x(wps: Wps, pqrs: tuple[Pqr, ...]) -> Iterable[Row]` with its source
constant right above it, build each row with _judge(), and append the function to the code's rule list.
"""

from __future__ import annotations

import math
import re
import unicodedata
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, replace
from decimal import Decimal

from core.units import (
    HeatInput,
    Length,
    Speed,
    Temperature,
    format_heat_input,
    format_length,
    format_speed,
    format_temperature,
    parse_amperage,
    parse_speed,
    parse_voltage,
)
from procedures.heat_input import heat_input, heat_input_range
from procedures.prequalified import KNOWN_KEYS, Finding, Procedure, base_metal_group, base_metal_key, parse_procedure

AWS = "AWS D1.1:2020"
ISO = "ISO 15614-1:2017"
CODES = (AWS, ISO)
_CODE_ALIASES = {
    "AWSD1.1:2020": AWS, "AWSD1.1/D1.1M:2020": AWS, "D1.1:2020": AWS, "D1.1/D1.1M:2020": AWS,
    "ISO15614-1:2017": ISO, "ENISO15614-1:2017": ISO, "BSENISO15614-1:2017": ISO, "ISO15614-1:2017+A1:2019": ISO,
    "ENISO15614-1:2017+A1:2019": ISO,
}
GAS_PROCESSES = ("GMAW", "FCAW", "GTAW")  # processes whose shielding gas a PQR records
POSITIONS = ("F", "H", "V", "OH")
POSITION_NAMES = {"F": "flat (F)", "H": "horizontal (H)", "V": "vertical (V)", "OH": "overhead (OH)"}
_IN = Length.from_inches
_MM = Length


# --- the parsed WPS and PQRs ------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Wps:
    """The WPS parsed: `p` holds what procedures.prequalified reads; the rest is what a PQR check adds."""

    p: Procedure
    gas: tuple | None  # normalised composition, None = no shielding gas
    gas_text: str | None
    speed_system: str  # "US" when the travel speed was written in in/min

    def system(self, key: str) -> str:
        return self.p.system(key)


@dataclass(frozen=True)
class Pqr:
    """One PQR parsed. `p` is a Procedure whose single values stand for the test: thickness_max is the test plate,
    preheat_min the preheat, amperage_min / voltage_min / travel_speed_min the values recorded."""

    label: str
    p: Procedure
    position: str  # "1G", "2F", "3G+4G" (AWS) or "PA".."PJ" (ISO)
    gas: tuple | None
    gas_text: str | None

    @property
    def test_thickness(self) -> Length:
        return self.p.thickness_max

    @property
    def preheat(self) -> Temperature:
        return self.p.preheat_min


WPS_REQUIRED = ("process", "electrode", "current", "positions", "joint", "base_metals", "thickness_min",
                "thickness_max", "amperage", "voltage", "travel_speed", "preheat_min")
PQR_REQUIRED = ("process", "electrode", "current", "position", "joint", "test_thickness", "amperage", "voltage",
                "travel_speed", "preheat", "base_metals")
_PAIR_KEYS = ("amperage", "voltage", "travel_speed")
_RANGE_KEYS = ("amperage_min", "amperage_max", "voltage_min", "voltage_max", "travel_speed_min", "travel_speed_max",
               "wire_feed_speed_min", "wire_feed_speed_max")
WPS_KEYS = tuple(k for k in KNOWN_KEYS if k not in _RANGE_KEYS) + _PAIR_KEYS + ("shielding_gas",)
PQR_KEYS = PQR_REQUIRED + ("transfer", "shielding_gas", "number")
# The shop's words for each key, used in error messages and in the envelope.
WPS_WORDS = {"thickness_min": "minimum base metal thickness", "thickness_max": "maximum base metal thickness",
             "preheat_min": "minimum preheat", "base_metals": "base metals", "electrode_diameter": "electrode diameter",
             "single_pass_size_max": "largest single-pass fillet", "travel_speed": "travel speed",
             "shielding_gas": "shielding gas", "interpass_max": "maximum interpass temperature"}
PQR_WORDS = {"thickness_max": "test plate thickness", "preheat_min": "preheat", "amperage_min": "amperage",
             "voltage_min": "voltage", "travel_speed_min": "travel speed", "base_metals": "base metals"}


def _words(key: str, words: Mapping) -> str:
    return words.get(key, key.replace("_", " "))


def _check_keys(given: Mapping, required, allowed, what: str, words: Mapping):
    unknown = sorted(str(k) for k in given if k not in allowed)
    if unknown:
        raise ValueError(f"{what}: unknown item(s) {', '.join(unknown)}; known: {', '.join(allowed)}.")
    process = given.get("process")
    gas_needed = isinstance(process, str) and process.strip().upper().split("-")[0] in GAS_PROCESSES
    missing = [_words(k, words) for k in required if given.get(k) is None]
    if gas_needed and "shielding_gas" not in given:
        missing.append("shielding gas (None if the process ran without gas)")
    if missing:
        raise ValueError(f"{what}: missing {', '.join(missing)}; a PQR check needs every one of them.")


def _finite(value):
    """Amps and volts may come as floats from a form; refuse NaN and infinity, read the rest as written."""
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ValueError(f"{value!r} is not a reading: give a number such as 200.")
        return Decimal(str(value))
    return value


def _pair(value, parse, what: str, example: str):
    if isinstance(value, (str, bytes, Mapping)) or not isinstance(value, Sequence) or len(value) != 2:
        raise ValueError(f"{what} must be a (low, high) pair such as {example}, not {value!r}.")
    try:
        low, high = (parse(_finite(v)) for v in value)
    except ValueError as exc:
        raise ValueError(f"{what}: {exc}") from None
    if low > high:
        raise ValueError(f"{what}: the low value {value[0]} is above the high value {value[1]}.")
    return low, high


def _parse(mapped: dict, what: str, words: Mapping) -> Procedure:
    try:
        return parse_procedure(mapped)
    except ValueError as exc:
        text = str(exc)
        key, sep, rest = text.partition(": ")
        if sep and key in mapped:
            text = f"{_words(key, words)}: {rest}"
        raise ValueError(f"{what} {text}") from None


def _speed_system(text) -> str | None:
    if isinstance(text, str):
        return "US" if re.search(r"(?<![a-z])(in|ipm)(?![a-z])", text.lower()) else "SI"
    return None


# Shielding gas: "90Ar/10CO2", "90% Ar + 10% CO2", "CO2", "100% CO2", or an ISO 14175 symbol such as "M21".
_GAS_NUMBER_FIRST = re.compile(r"^([0-9]+(?:\.[0-9]+)?)([A-Z][A-Z0-9]*)$")
_GAS_NAME_FIRST = re.compile(r"^(CO2|O2|N2|H2|HE|AR|[A-Z][A-Z]?)([0-9]+(?:\.[0-9]+)?)?$")
_GAS_NAMES = {"ARGON": "AR", "HELIUM": "HE", "CARBONDIOXIDE": "CO2", "OXYGEN": "O2"}


def parse_gas(text) -> tuple | None:
    """A shielding gas as a sorted tuple of (gas, percent); None for no gas. '90Ar/10CO2' == '10% CO2 + 90% Ar';
    'M21 (Ar + 18% CO2)' is read as its designation M21 (the bracketed words describe it)."""
    if text is None:
        return None
    if not isinstance(text, str):
        raise ValueError(f"shielding gas must be text such as 90Ar/10CO2 (or None for no gas), not "
                         f"{type(text).__name__}.")
    normal = unicodedata.normalize("NFKC", text).strip()
    # "M21 (Ar + 18% CO2)": a designation followed by its description in brackets is read by the designation.
    bracketed = re.fullmatch(r"(.+?)\s*\(.*\)", normal)
    if bracketed:
        normal = bracketed[1]
    compact = normal.upper().replace("%", "").replace(" ", "")
    if compact in ("", "NONE", "NOGAS"):
        return None
    if len(compact) > 40:
        raise ValueError("shielding gas is too long: write it as 90Ar/10CO2.")
    parts = [part for part in re.split(r"[/+,]", compact) if part]
    if not parts:
        raise ValueError(f"'{text}' is not a shielding gas: write it as 90Ar/10CO2, 100CO2 or an ISO 14175 "
                         "symbol such as M21.")
    found = []
    for part in parts:
        part = _GAS_NAMES.get(part, part)
        number_first, name_first = _GAS_NUMBER_FIRST.match(part), _GAS_NAME_FIRST.match(part)
        if number_first:
            found.append((_GAS_NAMES.get(number_first[2], number_first[2]), Decimal(number_first[1])))
        elif name_first and len(parts) > 1:
            found.append((name_first[1], Decimal(name_first[2]) if name_first[2] else None))
        elif re.fullmatch(r"[A-Z][A-Z0-9.]*", part) and len(parts) == 1:
            found.append((part, None))  # one gas ("CO2") or a symbol ("M21", "C1")
        else:
            raise ValueError(f"'{text}' is not a shielding gas: write it as 90Ar/10CO2, 100CO2 or an ISO 14175 "
                             "symbol such as M21.")
    if len(found) == 1 and found[0][1] in (None, Decimal(100)):
        return ((found[0][0], None),)
    return tuple(sorted((gas, pct.normalize() if pct is not None else None) for gas, pct in found))


def _gas(given: Mapping, what: str):
    try:
        return parse_gas(given.get("shielding_gas"))
    except ValueError as exc:
        raise ValueError(f"{what} {exc}") from None


def parse_wps(wps) -> Wps:
    """Read a WPS dict (the procedure-review dict plus thickness_min, amperage, voltage, travel_speed,
    shielding_gas); ValueError says in shop words what is missing or unreadable."""
    if not isinstance(wps, Mapping):
        raise ValueError(f"The WPS must be a dict of its values (process, electrode, ...), not {type(wps).__name__}.")
    _check_keys(wps, WPS_REQUIRED, WPS_KEYS, "WPS", WPS_WORDS)
    mapped = {k: v for k, v in wps.items() if k not in _PAIR_KEYS + ("shielding_gas",)}
    mapped["amperage_min"], mapped["amperage_max"] = _pair(wps["amperage"], parse_amperage, "WPS amperage",
                                                           "(180, 220)")
    mapped["voltage_min"], mapped["voltage_max"] = _pair(wps["voltage"], parse_voltage, "WPS voltage", "(24, 28)")
    mapped["travel_speed_min"], mapped["travel_speed_max"] = _pair(wps["travel_speed"], parse_speed,
                                                                   "WPS travel speed", "('8 in/min', '12 in/min')")
    procedure = _parse(mapped, "WPS", WPS_WORDS)
    if procedure.thickness_min.mm <= 0 or procedure.thickness_min > procedure.thickness_max:
        raise ValueError("WPS base metal thickness: give a minimum above zero and not above the maximum, e.g. "
                         "1/8 in to 3/4 in.")
    if procedure.process == "GMAW" and procedure.transfer is None:
        raise ValueError("WPS transfer: a GMAW WPS must state its metal transfer (short circuit, globular, spray or "
                         "pulsed); a PQR qualifies only its own transfer mode.")
    speeds = [_speed_system(v) for v in wps["travel_speed"]]
    return Wps(procedure, _gas(wps, "WPS"), wps.get("shielding_gas"), speeds[0] or speeds[1] or "US")


def _position(value, code: str, what: str) -> str:
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"{what} position must be a test position such as 1G, 2F or 3G+4G, not {value!r}.")
    parts = [part.strip().upper().replace(" ", "") for part in value.split("+")]
    known = ISO_POSITIONS if code == ISO else AWS_TEST_POSITIONS
    for part in parts:
        if part not in known and not (code == ISO and part in AWS_AS_ISO):
            raise ValueError(f"{what} position '{value}' is not a plate test position for {code}: use "
                             f"{', '.join(known)}{' (or 1G..4F)' if code == ISO else ' or a combination such as 3G+4G'}"
                             "; pipe test positions are not covered here.")
    return "+".join(parts)


def parse_pqr(pqr, index: int, code: str = AWS) -> Pqr:
    """Read one PQR dict; its label is 'PQR <number>' when it carries a number, else its place in the list."""
    if not isinstance(pqr, Mapping):
        raise ValueError(f"PQR {index}: each PQR must be a dict of its values (process, position, ...), not "
                         f"{type(pqr).__name__}.")
    number = pqr.get("number")
    if number is not None and (isinstance(number, bool) or not isinstance(number, (str, int))):
        raise ValueError(f"PQR {index}: its number must be text or a whole number, not {number!r}.")
    label = str(number).strip() if number is not None and str(number).strip() else str(index)
    label = label if label.upper().startswith("PQR") else f"PQR {label}"
    what = label
    _check_keys(pqr, PQR_REQUIRED, PQR_KEYS, what, PQR_WORDS)
    mapped = {"process": pqr["process"], "transfer": pqr.get("transfer"), "electrode": pqr["electrode"],
              "current": pqr["current"], "joint": pqr["joint"], "base_metals": pqr["base_metals"],
              "thickness_max": pqr["test_thickness"], "preheat_min": pqr["preheat"]}
    for key, parse in (("amperage", parse_amperage), ("voltage", parse_voltage), ("travel_speed", parse_speed)):
        try:
            mapped[f"{key}_min"] = parse(_finite(pqr[key]))
        except ValueError as exc:
            raise ValueError(f"{what} {key.replace('_', ' ')}: {exc}") from None
    procedure = _parse(mapped, what, PQR_WORDS)
    if procedure.thickness_max.mm <= 0:
        raise ValueError(f"{what} test plate thickness must be more than zero, e.g. 3/8 in or 10 mm.")
    if procedure.process == "GMAW" and procedure.transfer is None:
        raise ValueError(f"{what} transfer: a GMAW PQR must record its metal transfer (short circuit, globular, "
                         "spray or pulsed).")
    position = _position(pqr["position"], code, what)
    if code == AWS:
        for part in position.split("+"):
            tested = "fillet" if part.endswith("F") else "groove"
            if tested != procedure.joint:
                raise ValueError(f"{what}: {part} is a {tested} test position, but the joint says "
                                 f"{procedure.joint}; make them agree.")
    return Pqr(label, procedure, position, _gas(pqr, what), pqr.get("shielding_gas"))


def _parse_pqrs(pqrs, code: str) -> tuple[Pqr, ...]:
    if isinstance(pqrs, (str, bytes, Mapping)) or not isinstance(pqrs, Iterable):
        raise ValueError("Give the supporting PQRs as a list of dicts, one per PQR (an empty list if none).")
    return tuple(parse_pqr(item, index, code) for index, item in enumerate(pqrs, start=1))


def _code(code) -> str:
    key = code.upper().replace(" ", "") if isinstance(code, str) else None
    if key not in _CODE_ALIASES:
        raise ValueError(f"Code {code!r} is not known to the PQR support check; known: {', '.join(CODES)}.")
    return _CODE_ALIASES[key]


# --- rows and the helpers every rule uses -----------------------------------------------------------------------

@dataclass(frozen=True)
class Row:
    """One WPS value against the PQRs: the labels of those that support it, and a Finding when not (all of) it."""

    field: str
    label: str
    wps: str
    supported_by: tuple[str, ...]
    finding: Finding | None = None
    note: str = ""


def _labels(pqrs) -> tuple[str, ...]:
    return tuple(p.label for p in pqrs)


def _judge(field, label, wps_text, supporters, rule, source, message, severity="error", covered=None, note=""):
    """A row; a finding unless `covered` (default: any supporter) says the WPS value is supported."""
    covered = bool(supporters) if covered is None else covered
    finding = None if covered else Finding(rule, severity, message, source, field)
    return Row(field, label, wps_text, _labels(supporters), finding, note)


def _each(pqrs, show) -> str:
    """'PQR 1 E7018, PQR 2 E7016', or 'no PQR listed'."""
    return ", ".join(f"{p.label} {show(p)}" for p in pqrs) or "no PQR listed"


def _plain(value: Decimal) -> str:
    return format(value.normalize(), "f")


def _length(value: Length | None, system: str) -> str:
    return "unlimited" if value is None else format_length(value, system)


def _gaps_text(gaps, show) -> str:
    return ", ".join(f"{show(start)} to {show(end)}" for start, end in gaps)


def _coverage(low, high, intervals):
    """The parts of [low, high] that no (lo, hi, pqr) interval covers, as [(start, end), ...] (hi None = no upper
    limit; intervals are closed, so a WPS value exactly at a limit is covered), and the PQRs whose interval
    overlaps [low, high]."""
    overlapping = [pqr for lo, hi, pqr in intervals if lo <= high and (hi is None or hi >= low)]
    if low == high:
        return ([] if overlapping else [(low, high)]), overlapping
    gaps, reach = [], low
    for lo, hi, _ in sorted(intervals, key=lambda item: item[0]):
        if lo > high:
            break
        if lo > reach:
            gaps.append((reach, lo))
        reach = high if hi is None else max(reach, hi)
        if reach >= high:
            return gaps, overlapping
    return gaps + [(reach, high)], overlapping


def _candidates(wps: Wps, pqrs: tuple[Pqr, ...]) -> tuple[Pqr, ...]:
    same = tuple(p for p in pqrs if p.p.process == wps.p.process)
    return same or pqrs


def _run(rule, wps: Wps, candidates: tuple[Pqr, ...]) -> list[Row]:
    if rule in PROCESS_BOUND and not any(p.p.process == wps.p.process for p in candidates):
        return [replace(row, supported_by=(), finding=None, note=NO_PQR_OF_PROCESS) for row in rule(wps, ())]
    return list(rule(wps, candidates))


# --- rule: process ----------------------------------------------------------------------------------------------

SOURCE_PROCESS = ("AWS D1.1/D1.1M:2020 Table 6.5, PQR essential variables: a PQR qualifies only the process it was "
                  "welded with (from memory)")


def _process(wps: Wps, pqrs, source) -> Iterable[Row]:
    same = [p for p in pqrs if p.p.process == wps.p.process]
    yield _judge("process", "Welding process", wps.p.process, same, "process", source,
                 f"WPS process {wps.p.process}; PQR process: {_each(pqrs, lambda p: p.p.process)}. A PQR qualifies "
                 f"only its own process: list a {wps.p.process} PQR or weld one.")


def rule_process(wps: Wps, pqrs) -> Iterable[Row]:
    return _process(wps, pqrs, SOURCE_PROCESS)


# --- rule: GMAW transfer mode -----------------------------------------------------------------------------------

SOURCE_TRANSFER = ("AWS D1.1/D1.1M:2020 Table 6.5, GMAW: a change in the mode of transfer (from memory; short "
                   "circuiting against the others is certain, spray, globular and pulsed among themselves confirm)")


def _transfer(wps: Wps, pqrs, source) -> Iterable[Row]:
    if wps.p.process != "GMAW":
        return
    same = [p for p in pqrs if p.p.transfer == wps.p.transfer]
    short = wps.p.transfer == "short_circuit"
    kin = [p for p in pqrs if p.p.transfer and (p.p.transfer == "short_circuit") == short]
    shown = _each(pqrs, lambda p: (p.p.transfer or "not recorded").replace("_", "-"))
    wanted = wps.p.transfer.replace("_", "-")
    if kin:
        message = (f"WPS transfer {wanted}; PQR transfer: {shown}. Whether a change among spray, globular and pulsed "
                   f"transfer needs a new PQR was not confirmed: have the welding engineer confirm, or list a PQR "
                   f"welded with {wanted} transfer.")
    else:
        message = (f"WPS transfer {wanted}; PQR transfer: {shown}. Short-circuiting and the other transfer modes "
                   f"are qualified apart: list or weld a PQR with {wanted} transfer.")
    yield _judge("transfer", "Metal transfer (GMAW)", wanted, same, "transfer", source, message,
                 severity="warning" if kin else "error")


def rule_transfer(wps: Wps, pqrs) -> Iterable[Row]:
    return _transfer(wps, pqrs, SOURCE_TRANSFER)


# --- rule: filler metal -----------------------------------------------------------------------------------------

SOURCE_FILLER = ("AWS D1.1/D1.1M:2020 Table 6.5, filler metal: an increase in filler metal strength; SMAW from a "
                 "low-hydrogen to a non-low-hydrogen electrode; SAW, GMAW, FCAW, GTAW any other classification "
                 "(from memory)")


def _filler_text(e) -> str:
    hydrogen = ", low hydrogen" if e.low_hydrogen and "SMAW" in e.processes else ""  # a covering's property
    return f"{e.classification} ({e.tensile_ksi} ksi{hydrogen})"


def _aws_filler_supports(wps: Wps, pqr: Pqr) -> bool:
    w, q = wps.p.electrode, pqr.p.electrode
    if wps.p.process == "SMAW":
        return w.tensile_ksi <= q.tensile_ksi and (w.low_hydrogen or not q.low_hydrogen)
    return w.classification == q.classification


def rule_filler(wps: Wps, pqrs) -> Iterable[Row]:
    w = wps.p.electrode
    supporters = [p for p in pqrs if _aws_filler_supports(wps, p)]
    need = ("a PQR with a filler of the same or higher strength, low hydrogen if the WPS electrode is"
            if wps.p.process == "SMAW" else f"a PQR with {w.classification} itself")
    yield _judge("electrode", "Filler metal", _filler_text(w), supporters, "filler", SOURCE_FILLER,
                 f"WPS filler {_filler_text(w)}; PQR filler: {_each(pqrs, lambda p: _filler_text(p.p.electrode))}. "
                 f"A stronger filler, a non-low-hydrogen SMAW electrode after a low-hydrogen PQR, or (SAW, GMAW, "
                 f"FCAW, GTAW) any other classification needs a new PQR: list {need}.")


# --- rule: current type and polarity ----------------------------------------------------------------------------

SOURCE_CURRENT = "AWS D1.1/D1.1M:2020 Table 6.5, a change in type of current (AC or DC) or polarity (from memory)"


def _current(wps: Wps, pqrs, source) -> Iterable[Row]:
    same = [p for p in pqrs if p.p.current == wps.p.current]
    yield _judge("current", "Current and polarity", wps.p.current, same, "current", source,
                 f"WPS current {wps.p.current}; PQR current: {_each(pqrs, lambda p: p.p.current)}. A change of "
                 f"current type or polarity needs a new PQR: list or weld one on {wps.p.current}.")


def rule_current(wps: Wps, pqrs) -> Iterable[Row]:
    return _current(wps, pqrs, SOURCE_CURRENT)


# --- rule: joint type -------------------------------------------------------------------------------------------

SOURCE_JOINT = ("AWS D1.1/D1.1M:2020 Table 6.1: a CJP groove test qualifies groove and fillet welds, a fillet test "
                "fillet welds only (1G row published, the rule from memory)")


def _joint(wps: Wps, pqrs, source) -> Iterable[Row]:
    supporters = [p for p in pqrs if p.p.joint == "groove" or wps.p.joint == "fillet"]
    yield _judge("joint", "Joint type", wps.p.joint, supporters, "joint", source,
                 f"WPS joint {wps.p.joint}; PQR test: {_each(pqrs, lambda p: p.p.joint)}. A fillet test does not "
                 "qualify groove welds: list or weld a groove test PQR.")


def rule_joint(wps: Wps, pqrs) -> Iterable[Row]:
    return _joint(wps, pqrs, SOURCE_JOINT)


# --- rule: positions, AWS D1.1:2020 Table 6.1 -------------------------------------------------------------------

SOURCE_TABLE_6_1 = ("AWS D1.1/D1.1M:2020 Table 6.1, WPS qualification, positions qualified by plate tests (1G row "
                    "published: F only; the other rows from memory)")
# Test position -> (groove positions qualified, fillet positions qualified). Not the welder table (6.10): a PQR
# test qualifies far fewer positions than a welder test does.
TABLE_6_1 = {
    "1G": ({"F"}, {"F"}),  # published
    "2G": ({"F", "H"}, {"F", "H"}),  # from memory (first cell F published)
    "3G": ({"V"}, {"V"}),  # from memory
    "4G": ({"OH"}, {"OH"}),  # from memory
    "1F": (set(), {"F"}),  # from memory
    "2F": (set(), {"F", "H"}),  # from memory
    "3F": (set(), {"V"}),  # from memory
    "4F": (set(), {"OH"}),  # from memory
}
AWS_TEST_POSITIONS = tuple(TABLE_6_1)
TEST_FOR_POSITION = {"groove": {"F": "1G", "H": "2G", "V": "3G", "OH": "4G"},
                     "fillet": {"F": "1F", "H": "2F", "V": "3F", "OH": "4F"}}


def aws_positions_qualified(test_position: str, joint: str) -> frozenset:
    """Production positions a PQR test position qualifies for groove or fillet welds (Table 6.1)."""
    column = 0 if joint == "groove" else 1
    return frozenset(p for part in test_position.split("+") for p in TABLE_6_1[part][column])


def _positions(wps: Wps, pqrs, qualified, source, needed) -> Iterable[Row]:
    wanted = wps.p.positions
    covers = {p: qualified(p.position, wps.p.joint) for p in pqrs}
    missing = [pos for pos in wanted if not any(pos in got for got in covers.values())]
    supporters = [p for p in pqrs if covers[p] & set(wanted)]
    shown = _each(pqrs, lambda p: f"({p.position}) qualifies "
                                  f"{', '.join(x for x in POSITIONS if x in covers[p]) or 'none'}")
    yield _judge("positions", "Welding positions", f"{', '.join(wanted)} ({wps.p.joint})", supporters, "positions",
                 source, f"WPS positions {', '.join(wanted)} for {wps.p.joint} welds; {shown}. Not qualified: "
                 f"{', '.join(POSITION_NAMES[x] for x in missing)}: {needed(missing, wps.p.joint)}.",
                 covered=not missing)


def _aws_needed(missing, joint) -> str:
    return "weld a PQR in " + ", ".join(f"{TEST_FOR_POSITION[joint][x]} for {x}" for x in missing)


def rule_positions(wps: Wps, pqrs) -> Iterable[Row]:
    return _positions(wps, pqrs, aws_positions_qualified, SOURCE_TABLE_6_1, _aws_needed)


# --- rule: base metal thickness, AWS D1.1:2020 Table 6.2 --------------------------------------------------------

SOURCE_TABLE_6_2 = ("AWS D1.1/D1.1M:2020 Table 6.2, base metal thickness qualified by a plate test: groove test T "
                    "from 1/8 in [3 mm] up to 1 in [25 mm] qualifies 1/8 in to 2T, 1 in and over qualifies 1/8 in "
                    "and over; fillet test 1/8 in and over (all from memory)")
AWS_THICKNESS = {"US": (_IN("0.125"), _IN(1)), "SI": (_MM(3), _MM(25))}  # (least qualified, unlimited from)


def aws_thickness_qualified(pqr: Pqr, wps: Wps) -> tuple[Length, Length | None] | None:
    """(minimum, maximum or None for unlimited) a PQR qualifies, or None: a fillet test for a groove WPS, or a
    test plate thinner than the table's least. The least (1/8 in or 3 mm) is the table's figure in the WPS's
    units; whether the plate reached the unlimited row (1 in or 25 mm) is read in the units of the test plate."""
    least = AWS_THICKNESS[wps.system("thickness_min")][0]
    if pqr.p.joint == "fillet":
        return None if wps.p.joint == "groove" else (least, None)
    t = pqr.test_thickness
    test_least, unlimited = AWS_THICKNESS[pqr.p.system("thickness_max")]
    if t < test_least:
        return None
    return (least, None) if t >= unlimited else (least, t * 2)


def _thickness(wps: Wps, pqrs, qualified, source, needed) -> Iterable[Row]:
    system = wps.system("thickness_max")
    low, high = wps.p.thickness_min, wps.p.thickness_max
    ranges = {p: qualified(p, wps) for p in pqrs}
    intervals = [(r[0], r[1], p) for p, r in ranges.items() if r is not None]
    gaps, overlapping = _coverage(low, high, intervals)

    def shown(p):
        r = ranges[p]
        test = f"({_length(p.test_thickness, system)} {p.p.joint} test) qualifies"
        return f"{test} {_length(r[0], system)} to {_length(r[1], system)}" if r else f"{test} nothing here"

    message = "" if not gaps else (
        f"WPS base metal {_length(low, system)} to {_length(high, system)}; {_each(pqrs, shown)}. Not covered: "
        f"{_gaps_text(gaps, lambda x: _length(x, system))}: {needed(gaps, high, system)}.")
    yield _judge("thickness_max", "Base metal thickness", f"{_length(low, system)} to {_length(high, system)}",
                 overlapping, "thickness", source, message, covered=not gaps)


def _aws_needed_thickness(gaps, high, system) -> str:
    least, unlimited = AWS_THICKNESS[system]
    advice = []
    if gaps[0][0] < least:
        advice.append(f"Table 6.2 qualifies nothing under {_length(least, system)}")
    if gaps[-1][1] > least:
        plate = min(high * Decimal("0.5"), unlimited)
        advice.append(f"weld a groove PQR on a plate of {_length(plate, system)} or thicker")
    return "; ".join(advice)


def rule_thickness(wps: Wps, pqrs) -> Iterable[Row]:
    return _thickness(wps, pqrs, aws_thickness_qualified, SOURCE_TABLE_6_2, _aws_needed_thickness)


# --- rules: amperage, voltage, travel speed, AWS D1.1:2020 Table 6.5 --------------------------------------------

SOURCE_AMPERAGE = ("AWS D1.1/D1.1M:2020 Table 6.5, amperage: more than 10 % increase or decrease for SAW, GMAW, "
                   "FCAW (published for the 2015 edition, Table 4.5 line 12, as quoted in a public AWS forum thread); "
                   "GTAW 25 %, SMAW within the electrode maker's recommendation (from memory)")
AMPERAGE_PERCENT = {"SAW": 10, "GMAW": 10, "FCAW": 10, "GTAW": 25}
SOURCE_VOLTAGE = ("AWS D1.1/D1.1M:2020 Table 6.5, voltage: more than 7 % increase or decrease for SAW, GMAW, FCAW "
                  "(published for the 2015 edition, Table 4.5 line 16, as quoted in a public AWS forum thread); SMAW "
                  "within the electrode maker's recommendation (from memory)")
VOLTAGE_PERCENT = {"SAW": 7, "GMAW": 7, "FCAW": 7}
SOURCE_TRAVEL_SPEED = ("AWS D1.1/D1.1M:2020 Table 6.5, travel speed: more than 25 % increase or decrease for GMAW, "
                       "FCAW, GTAW, 15 % for SAW; no limit listed for SMAW (all from memory)")
TRAVEL_SPEED_PERCENT = {"GMAW": 25, "FCAW": 25, "GTAW": 25, "SAW": 15}


@dataclass(frozen=True)
class Electrical:
    """How one electrical value of the WPS and the PQR is read, shown and limited."""

    field: str
    label: str
    percent: Mapping
    source: str
    wps_range: object  # (Wps) -> (low, high)
    pqr_value: object  # (Pqr) -> value
    scale: object  # (value, factor) -> value
    show: object  # (value, Wps) -> text


def _percent_rule(rule: Electrical, wps: Wps, pqrs) -> Iterable[Row]:
    low, high = rule.wps_range(wps)
    text = f"{rule.show(low, wps)} to {rule.show(high, wps)}"
    percent = rule.percent.get(wps.p.process)
    if percent is None:
        yield Row(rule.field, rule.label, text, _labels(pqrs), None,
                  f"no percentage limit for {wps.p.process} in this engine's table ({rule.source})")
        return
    factor = Decimal(percent) / 100
    intervals = [(rule.scale(rule.pqr_value(p), 1 - factor), rule.scale(rule.pqr_value(p), 1 + factor), p)
                 for p in pqrs]
    gaps, overlapping = _coverage(low, high, intervals)
    allowed = _each(pqrs, lambda p: f"at {rule.show(rule.pqr_value(p), wps)} allows "
                                    f"{rule.show(rule.scale(rule.pqr_value(p), 1 - factor), wps)} to "
                                    f"{rule.show(rule.scale(rule.pqr_value(p), 1 + factor), wps)}")
    message = (f"WPS {rule.label.lower()} {text}; {allowed} (± {percent} % for {wps.p.process}). Not covered: "
               f"{_gaps_text(gaps, lambda x: rule.show(x, wps))}: narrow the WPS range or list a PQR welded nearer "
               "to it.")
    yield _judge(rule.field, rule.label, text, overlapping, rule.field, rule.source, message, covered=not gaps)


def _scale_speed(speed: Speed, factor) -> Speed:
    return Speed(speed.mm_per_min * factor)


AMPERAGE = Electrical("amperage", "Amperage", AMPERAGE_PERCENT, SOURCE_AMPERAGE,
                      lambda w: (w.p.amperage_min, w.p.amperage_max), lambda p: p.p.amperage_min,
                      lambda v, f: v * f, lambda v, w: f"{_plain(v)} A")
VOLTAGE = Electrical("voltage", "Voltage", VOLTAGE_PERCENT, SOURCE_VOLTAGE,
                     lambda w: (w.p.voltage_min, w.p.voltage_max), lambda p: p.p.voltage_min,
                     lambda v, f: v * f, lambda v, w: f"{_plain(v)} V")
TRAVEL_SPEED = Electrical("travel_speed", "Travel speed", TRAVEL_SPEED_PERCENT, SOURCE_TRAVEL_SPEED,
                          lambda w: (w.p.travel_speed_min, w.p.travel_speed_max), lambda p: p.p.travel_speed_min,
                          _scale_speed, lambda v, w: format_speed(v, w.speed_system))


def rule_amperage(wps: Wps, pqrs) -> Iterable[Row]:
    return _percent_rule(AMPERAGE, wps, pqrs)


def rule_voltage(wps: Wps, pqrs) -> Iterable[Row]:
    return _percent_rule(VOLTAGE, wps, pqrs)


def rule_travel_speed(wps: Wps, pqrs) -> Iterable[Row]:
    return _percent_rule(TRAVEL_SPEED, wps, pqrs)


# --- rule: shielding gas ----------------------------------------------------------------------------------------

SOURCE_GAS = ("AWS D1.1/D1.1M:2020 Table 6.5, GMAW, FCAW, GTAW: a change from one shielding gas to another, in the "
              "nominal composition of a mixture, or to no gas (from memory)")


def _gas_rule(wps: Wps, pqrs, source) -> Iterable[Row]:
    if wps.p.process not in GAS_PROCESSES:
        return
    wanted = wps.gas_text if wps.gas is not None else "none"
    same = [p for p in pqrs if p.gas == wps.gas]
    yield _judge("shielding_gas", "Shielding gas", wanted, same, "shielding_gas", source,
                 f"WPS shielding gas {wanted}; PQR gas: {_each(pqrs, lambda p: p.gas_text or 'none')}. Another gas, "
                 f"another mixture or no gas needs a new PQR: list or weld one with {wanted}.")


def rule_shielding_gas(wps: Wps, pqrs) -> Iterable[Row]:
    return _gas_rule(wps, pqrs, SOURCE_GAS)


# --- rule: preheat ----------------------------------------------------------------------------------------------

SOURCE_PREHEAT = ("AWS D1.1/D1.1M:2020 Table 6.5, a decrease in preheat of more than 25 F [15 C] below the PQR "
                  "(from memory)")
AWS_PREHEAT_DECREASE = {"US": Decimal(25), "SI": Decimal(15)}  # F, C as the table prints them (from memory)


def _degrees(t: Temperature, system: str) -> Decimal:
    return t.f if system == "US" else t.c


def _from_degrees(value: Decimal, system: str) -> Temperature:
    return Temperature.from_f(value) if system == "US" else Temperature(value)


def _preheat(wps: Wps, pqrs, decrease: Mapping, source) -> Iterable[Row]:
    system = wps.system("preheat_min")
    drop = decrease[system]
    wanted = _degrees(wps.p.preheat_min, system)
    supporters = [p for p in pqrs if wanted >= _degrees(p.preheat, system) - drop]
    unit = "°F" if system == "US" else "°C"
    lowest = min((_degrees(p.preheat, system) for p in pqrs), default=None)
    raise_to = "" if lowest is None else (
        f"raise the WPS minimum to {format_temperature(_from_degrees(lowest - drop, system), system)} or ")
    yield _judge("preheat_min", "Minimum preheat", format_temperature(wps.p.preheat_min, system), supporters,
                 "preheat", source,
                 f"WPS minimum preheat {format_temperature(wps.p.preheat_min, system)}; PQR preheat: "
                 f"{_each(pqrs, lambda p: format_temperature(p.preheat, system))}. A decrease of more than "
                 f"{_plain(drop)} {unit} below a PQR needs a new PQR: {raise_to}weld a PQR at the WPS preheat.")


def rule_preheat(wps: Wps, pqrs) -> Iterable[Row]:
    return _preheat(wps, pqrs, AWS_PREHEAT_DECREASE, SOURCE_PREHEAT)


# --- rule: base metals ------------------------------------------------------------------------------------------

SOURCE_BASE_METAL = ("AWS D1.1/D1.1M:2020 clause 6 Part B, base metals a PQR qualifies: the steel tested, and of the "
                     "prequalified groups, a PQR on a higher group qualifies the lower (groups from "
                     "procedures.prequalified; the rule from memory); any other steel only by a PQR on that steel")
GROUP_RANK = {"I": 1, "II": 2}  # Group II qualifies Group I (from memory)


def _aws_metal_supports(name: str, wps: Wps, pqr: Pqr) -> bool:
    if any(base_metal_key(name) == base_metal_key(m) for m in pqr.p.base_metals):
        return True
    wanted = base_metal_group(name, wps.p.thickness_max, wps.system("thickness_max"))
    tested = [base_metal_group(m, pqr.test_thickness, pqr.p.system("thickness_max")) for m in pqr.p.base_metals]
    return wanted is not None and any(g is not None and GROUP_RANK[g] >= GROUP_RANK[wanted] for g in tested)


def _metal_row(name, wps: Wps, pqrs, supports, source, severity, advice) -> Row:
    supporters = [p for p in pqrs if supports(name, wps, p)]
    return _judge("base_metals", f"Base metal {name}", name, supporters, "base_metal", source,
                  f"WPS base metal {name}; PQR base metal: {_each(pqrs, lambda p: ', '.join(p.p.base_metals))}. "
                  f"{advice}", severity=severity)


def rule_base_metals(wps: Wps, pqrs) -> Iterable[Row]:
    for name in wps.p.base_metals:
        group = base_metal_group(name, wps.p.thickness_max, wps.system("thickness_max"))
        advice = (f"{name} is Group {group}: list a PQR on Group {group} steel or higher, or weld one on {name}."
                  if group else f"{name} is in no group this engine holds: only a PQR welded on {name} qualifies it.")
        yield _metal_row(name, wps, pqrs, _aws_metal_supports, SOURCE_BASE_METAL, "error", advice)


AWS_RULES = (rule_process, rule_transfer, rule_filler, rule_current, rule_joint, rule_positions, rule_thickness,
             rule_amperage, rule_voltage, rule_travel_speed, rule_shielding_gas, rule_preheat, rule_base_metals)


# --- ISO 15614-1:2017: ranges of qualification (clause 8), ALL FROM MEMORY -------------------------------------

_ISO = "ISO 15614-1:2017 clause 8, range of qualification"
SOURCE_ISO_PROCESS = f"{_ISO}: each welding process is qualified on its own (from memory)"
SOURCE_ISO_TRANSFER = f"{_ISO}: GMAW short-circuit transfer qualifies only short-circuit transfer (from memory)"
SOURCE_ISO_CURRENT = f"{_ISO}: type of current and polarity as tested (from memory)"
SOURCE_ISO_JOINT = f"{_ISO}: butt welds qualify fillet welds, not the reverse (from memory)"
SOURCE_ISO_GAS = f"{_ISO}: shielding gas as tested, by its ISO 14175 designation (from memory)"


def iso_rule_process(wps, pqrs):
    return _process(wps, pqrs, SOURCE_ISO_PROCESS)


def iso_rule_transfer(wps, pqrs):
    return _transfer(wps, pqrs, SOURCE_ISO_TRANSFER)


def iso_rule_current(wps, pqrs):
    return _current(wps, pqrs, SOURCE_ISO_CURRENT)


def iso_rule_joint(wps, pqrs):
    return _joint(wps, pqrs, SOURCE_ISO_JOINT)


def iso_rule_shielding_gas(wps, pqrs):
    return _gas_rule(wps, pqrs, SOURCE_ISO_GAS)


SOURCE_ISO_FILLER = (f"{_ISO}: filler metal designation; when a change of designation stays qualified depends on "
                     "impact requirements and the filler's type (from memory: confirm)")


def iso_rule_filler(wps: Wps, pqrs) -> Iterable[Row]:
    w = wps.p.electrode
    same = [p for p in pqrs if p.p.electrode.classification == w.classification]
    yield _judge("electrode", "Filler metal", _filler_text(w), same, "filler", SOURCE_ISO_FILLER,
                 f"WPS filler {_filler_text(w)}; PQR filler: {_each(pqrs, lambda p: _filler_text(p.p.electrode))}. "
                 "Confirm against ISO 15614-1 that the change of filler stays within the qualification, or list a "
                 f"PQR with {w.classification}.", severity="warning")


SOURCE_ISO_POSITIONS = (f"{_ISO}: a test in any position qualifies all positions except PG (vertical down), which "
                        "qualifies PG only; with impact or hardness requirements the positions of highest and lowest "
                        "heat input apply (from memory)")
ISO_POSITIONS = ("PA", "PB", "PC", "PD", "PE", "PF", "PG", "PH", "PJ")
AWS_AS_ISO = {"1G": "PA", "2G": "PC", "3G": "PF", "4G": "PE", "1F": "PA", "2F": "PB", "3F": "PF", "4F": "PD"}


def iso_positions_qualified(test_position: str, joint: str) -> frozenset:
    """WPS positions (F, H, V read as vertical up, OH) a test position qualifies; 3G / 3F read as PF (up)."""
    parts = {AWS_AS_ISO.get(part, part) for part in test_position.split("+")}
    return frozenset(POSITIONS) if parts - {"PG"} else frozenset()


def _iso_needed(missing, joint) -> str:
    return "a PG (vertical down) test qualifies only vertical-down welding: weld a PQR in any other position"


def iso_rule_positions(wps: Wps, pqrs) -> Iterable[Row]:
    return _positions(wps, pqrs, iso_positions_qualified, SOURCE_ISO_POSITIONS, _iso_needed)


SOURCE_ISO_THICKNESS = (f"{_ISO}, parent metal thickness (from memory, multi-run): butt test t <= 3 mm: 0.7t to 2t; "
                        "3 < t <= 12 mm: 3 mm to 2t; 12 < t <= 100 mm: 0.5t to 2t; over 100 mm: 50 mm to 2t; fillet "
                        "test t <= 3 mm: 0.7t to 2t; 3 < t <= 30 mm: 0.5t (3 mm least) to 1.2t; over 30 mm: 5 mm and "
                        "over")


def iso_thickness_qualified(pqr: Pqr, wps: Wps) -> tuple[Length, Length | None] | None:
    t = pqr.test_thickness
    if pqr.p.joint == "groove":
        if t <= _MM(3):
            return t * Decimal("0.7"), t * 2
        if t <= _MM(12):
            return _MM(3), t * 2
        if t <= _MM(100):
            return t * Decimal("0.5"), t * 2
        return _MM(50), t * 2
    if wps.p.joint == "groove":
        return None
    if t <= _MM(3):
        return t * Decimal("0.7"), t * 2
    if t <= _MM(30):
        return max(t * Decimal("0.5"), _MM(3)), t * Decimal("1.2")
    return _MM(5), None


def _iso_needed_thickness(gaps, high, system) -> str:
    return "list or weld a PQR whose thickness range covers it"


def iso_rule_thickness(wps: Wps, pqrs) -> Iterable[Row]:
    return _thickness(wps, pqrs, iso_thickness_qualified, SOURCE_ISO_THICKNESS, _iso_needed_thickness)


SOURCE_ISO_HEAT_INPUT = (f"{_ISO}: heat input within 25 % of the test (upper limit where impact requirements apply, "
                         "lower limit where hardness requirements apply; from memory); HI = 60 V A / (1000 S), "
                         "procedures.heat_input")
ISO_HEAT_INPUT_FACTOR = Decimal("0.25")


def _scale_heat(value: HeatInput, factor) -> HeatInput:
    return HeatInput.from_kj_per_mm(value.kj_per_mm * factor)


def iso_rule_heat_input(wps: Wps, pqrs) -> Iterable[Row]:
    p = wps.p
    span = heat_input_range(p.voltage_min, p.voltage_max, p.amperage_min, p.amperage_max, p.travel_speed_min,
                            p.travel_speed_max)
    system = wps.speed_system
    values = {q: heat_input(q.p.voltage_min, q.p.amperage_min, q.p.travel_speed_min) for q in pqrs}
    share = ISO_HEAT_INPUT_FACTOR
    intervals = [(_scale_heat(hi, 1 - share), _scale_heat(hi, 1 + share), q) for q, hi in values.items()]
    gaps, overlapping = _coverage(span.minimum, span.maximum, intervals)
    text = f"{format_heat_input(span.minimum, system)} to {format_heat_input(span.maximum, system)}"
    message = (f"WPS heat input {text} (from its volts, amps and travel speeds); PQR heat input: "
               f"{_each(pqrs, lambda q: format_heat_input(values[q], system))}, each qualifying 25 % either side. "
               f"Not covered: {_gaps_text(gaps, lambda x: format_heat_input(x, system))}: narrow the WPS volts, amps "
               "or travel speeds, or list a PQR nearer to them.")
    yield _judge("heat_input", "Heat input", text, overlapping, "heat_input", SOURCE_ISO_HEAT_INPUT, message,
                 covered=not gaps)


SOURCE_ISO_PREHEAT = (f"{_ISO}: preheat more than 50 °C below the test needs a new test (from memory; a public "
                      "forum thread reads the 2017+A1:2019 text so)")
ISO_PREHEAT_DECREASE = {"SI": Decimal(50), "US": Decimal(90)}  # ISO prints °C; 90 °F is 50 °C converted


def iso_rule_preheat(wps: Wps, pqrs) -> Iterable[Row]:
    return _preheat(wps, pqrs, ISO_PREHEAT_DECREASE, SOURCE_ISO_PREHEAT)


SOURCE_ISO_BASE_METAL = (f"{_ISO}: parent material by ISO/TR 15608 group (from memory); this engine holds no "
                         "ISO/TR 15608 groups, so only the same steel is recognised")


def _same_metal(name: str, wps: Wps, pqr: Pqr) -> bool:
    return any(base_metal_key(name) == base_metal_key(m) for m in pqr.p.base_metals)


def iso_rule_base_metals(wps: Wps, pqrs) -> Iterable[Row]:
    for name in wps.p.base_metals:
        yield _metal_row(name, wps, pqrs, _same_metal, SOURCE_ISO_BASE_METAL, "warning",
                         f"Group {name} and the PQR steels per ISO/TR 15608 and confirm the range, or list a PQR on "
                         f"{name}.")


ISO_RULES = (iso_rule_process, iso_rule_transfer, iso_rule_filler, iso_rule_current, iso_rule_joint,
             iso_rule_positions, iso_rule_thickness, iso_rule_heat_input, iso_rule_shielding_gas, iso_rule_preheat,
             iso_rule_base_metals)
RULES = {AWS: AWS_RULES, ISO: ISO_RULES}
# Rules that mean something only against a PQR of the WPS's own process: with none listed, the process row says
# so and these rows show "none" without a finding of their own (an SMAW PQR's amps say nothing of a GMAW WPS).
PROCESS_BOUND = (rule_transfer, rule_filler, rule_current, rule_amperage, rule_voltage, rule_travel_speed,
                 rule_shielding_gas, iso_rule_transfer, iso_rule_filler, iso_rule_current, iso_rule_heat_input,
                 iso_rule_shielding_gas)
NO_PQR_OF_PROCESS = "no PQR of the WPS's process is listed (see the process row)"


# --- entry points -----------------------------------------------------------------------------------------------

SOURCE_NO_PQR = "AWS D1.1/D1.1M:2020 clause 6 Part B: a WPS qualified by test is supported by its PQR(s)"
SOURCE_NO_PQR_ISO = "ISO 15614-1:2017: a WPS is qualified by a welding procedure test (WPQR)"


@dataclass(frozen=True)
class EnvelopeRow:
    """One line of the page table: the variable in the shop's words, the WPS range, which PQRs support it."""

    field: str | None
    label: str
    wps: str
    supported_by: str  # "PQR 1, PQR 3" or "none"
    severity: str | None
    message: str
    source: str
    note: str = ""


def _rows(wps, pqrs, code):
    code = _code(code)
    procedure = parse_wps(wps)
    parsed = _parse_pqrs(pqrs, code)
    candidates = _candidates(procedure, parsed)
    rows = [row for rule in RULES[code] for row in _run(rule, procedure, candidates)]
    if not parsed:
        no_pqr = Finding("no_pqr", "error", "No PQR is listed: a WPS qualified by test needs at least one supporting "
                         "PQR whose values cover it.", SOURCE_NO_PQR if code == AWS else SOURCE_NO_PQR_ISO, None)
        rows.insert(0, Row(None, "Supporting PQRs", "", (), no_pqr))
    return rows, not parsed


def review(wps, pqrs, code: str = AWS) -> list[Finding]:
    """Findings where the listed PQRs do not support a WPS value; [] = supported as far as these inputs show."""
    rows, none_listed = _rows(wps, pqrs, code)
    findings = [row.finding for row in rows if row.finding is not None]
    return findings[:1] if none_listed else findings


def envelope(wps, pqrs, code: str = AWS) -> list[EnvelopeRow]:
    """Rows for a page table: each WPS variable, its range as text, the PQRs supporting it, the finding if any."""
    rows, _ = _rows(wps, pqrs, code)
    return [EnvelopeRow(row.field, row.label, row.wps, ", ".join(row.supported_by) or "none",
                        row.finding.severity if row.finding else None, row.finding.message if row.finding else "",
                        row.finding.source if row.finding else "", row.note) for row in rows]
