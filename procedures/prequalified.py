"""Review a WPS against the prequalified limits of AWS D1.1/D1.1M:2020 clause 5, finding by finding.

How findings are formed: review() first parses the whole WPS dict into a Procedure (every length, temperature,
current and speed through core.units; a malformed value raises ValueError naming its key, before any rule
runs). Then each rule in RULES looks at the Procedure and yields zero or more Findings. A rule checks only what
the WPS states: a missing key is not a finding. Every Finding carries

- rule: a short key ("single_pass_fillet_size"), stable for tests and for the UI;
- severity: "error" (inconsistent or unsafe: a current the electrode does not allow, an undermatching filler,
  a range whose minimum is above its maximum), "not_prequalified" (legal, but needs qualification by test),
  or "warning" (the engine cannot judge, or the value needs a person's confirmation);
- message: what was given against which limit, in the unit system the value was written in;
- source: standard, edition and clause or table, with "from memory" where the value has not been checked
  against the document;
- field: the WPS key the finding concerns, so a form can show it beside that field (None: the whole WPS).

An empty list means prequalified as far as the given inputs show.

How to add a rule: write `def rule_something(wps: Procedure) -> Iterable[Finding]` with its source constant
right above it, yield Finding(...) for each problem, and append the function to RULES. Values that the rule
compares against go in a table beside the source, US and SI figures as the standard prints them.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, fields
from decimal import Decimal

from core.units import (
    Length,
    Speed,
    Temperature,
    UnitError,
    format_length,
    format_speed,
    format_temperature,
    length_system,
    parse_amperage,
    parse_length,
    parse_speed,
    parse_temperature,
    parse_voltage,
    temperature_system,
)
from procedures.electrodes import Electrode, decode

CODE = "AWS D1.1:2020"
KNOWN_CODES = {"AWS D1.1:2020": CODE, "AWS D1.1/D1.1M:2020": CODE}
SEVERITIES = ("error", "not_prequalified", "warning")
# findings_by_field() key for findings that concern the whole WPS (the usual key for a whole form's errors)
GENERAL = "__all__"


@dataclass(frozen=True)
class Finding:
    """One thing a reviewer would write in the margin of the WPS, with the clause that says so."""

    rule: str
    severity: str
    message: str
    source: str
    field: str | None = None

    def __post_init__(self):
        if self.severity not in SEVERITIES:
            raise ValueError(f"Finding severity must be one of {', '.join(SEVERITIES)}, not {self.severity!r}.")


# --- the parsed WPS -------------------------------------------------------------------------------

PROCESSES_PREQUALIFIED = ("SMAW", "SAW", "GMAW", "FCAW")
PROCESSES_NOT_PREQUALIFIED = ("GTAW", "ESW", "EGW", "PAW")
PROCESS_ALIASES = {"GMAW-S": ("GMAW", "short_circuit"), "FCAW-G": ("FCAW", None), "FCAW-S": ("FCAW", None)}
TRANSFERS = ("short_circuit", "globular", "spray", "pulsed")
TRANSFER_ALIASES = {"short_circuiting": "short_circuit", "short_arc": "short_circuit", "pulsed_spray": "pulsed",
                    "short": "short_circuit"}
CURRENTS = ("AC", "DCEP", "DCEN")
CURRENT_ALIASES = {"DC+": "DCEP", "DCRP": "DCEP", "DC-": "DCEN", "DCSP": "DCEN"}
POSITIONS = ("F", "H", "V", "OH")
JOINTS = ("fillet", "groove")
SAW_ARRANGEMENTS = ("single", "parallel", "multiple")
SYSTEMS = ("US", "SI")


@dataclass(frozen=True)
class Procedure:
    """A WPS with every value parsed; None where the WPS does not say. `systems` records, per key, whether
    the value was written in US or SI units, so it is judged against the figure the standard prints for it."""

    process: str
    transfer: str | None = None
    electrode: Electrode | None = None
    electrode_diameter: Length | None = None
    current: str | None = None
    positions: tuple | None = None
    joint: str | None = None
    single_pass_size_max: Length | None = None
    base_metals: tuple | None = None
    thickness_min: Length | None = None
    thickness_max: Length | None = None
    fillet_size_min: Length | None = None
    fillet_size_max: Length | None = None
    preheat_min: Temperature | None = None
    interpass_max: Temperature | None = None
    amperage_min: Decimal | None = None
    amperage_max: Decimal | None = None
    voltage_min: Decimal | None = None
    voltage_max: Decimal | None = None
    travel_speed_min: Speed | None = None
    travel_speed_max: Speed | None = None
    wire_feed_speed_min: Speed | None = None
    wire_feed_speed_max: Speed | None = None
    electrode_arrangement: str | None = None
    unit_system: str | None = None
    systems: tuple = ()  # ((key, "US" | "SI"), ...)

    def system(self, key: str) -> str:
        """The unit system to judge a key's value in: unit_system if the WPS names one, else as written, else US."""
        if self.unit_system:
            return self.unit_system
        return dict(self.systems).get(key) or "US"


def _choice(value, known, what, aliases=None, upper=False):
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"{what} must be one of {', '.join(known)}, not {value!r}.")
    key = value.strip().upper() if upper else re.sub(r"[\s-]+", "_", value.strip().lower())
    key = (aliases or {}).get(key, key)
    if key not in known:
        raise ValueError(f"{value!r} is not a {what}: use {', '.join(known)}.")
    return key


def _process(value):
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"give the welding process as text, e.g. SMAW, GMAW, FCAW or SAW, not {value!r}.")
    return value.strip().upper()


def _positions(value):
    if isinstance(value, str):
        value = [part for part in re.split(r"[\s,+/;]+", value) if part]
    if not isinstance(value, Iterable) or isinstance(value, Mapping):
        raise ValueError(f"give the positions as a list of F, H, V, OH, not {type(value).__name__}.")
    found = set()
    for item in value:
        if not isinstance(item, str) or item.strip().upper() not in POSITIONS:
            raise ValueError(f"{item!r} is not a welding position: use F, H, V or OH (test positions such as 2F "
                             "or 3G belong to welder qualification).")
        found.add(item.strip().upper())
    if not found:
        raise ValueError("give at least one position (F, H, V or OH).")
    return tuple(p for p in POSITIONS if p in found)


def _base_metals(value):
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, Iterable) or isinstance(value, Mapping):
        raise ValueError(f"give the base metals as a list such as ['ASTM A36'], not {type(value).__name__}.")
    metals = tuple(value)
    if not metals or any(not isinstance(m, str) or not m.strip() for m in metals):
        raise ValueError("give each base metal as text, e.g. 'ASTM A36' or 'ASTM A572 Gr 50'.")
    return tuple(m.strip() for m in metals)


def _electrode(value):
    if isinstance(value, Electrode):
        return value
    return decode(value)


_LENGTH_KEYS = ("electrode_diameter", "single_pass_size_max", "thickness_min", "thickness_max",
                "fillet_size_min", "fillet_size_max")
_TEMPERATURE_KEYS = ("preheat_min", "interpass_max")
_PARSERS = {
    "process": _process,
    "transfer": lambda v: _choice(v, TRANSFERS, "metal transfer mode", TRANSFER_ALIASES),
    "electrode": _electrode,
    "current": lambda v: _choice(v, CURRENTS, "welding current", CURRENT_ALIASES, upper=True),
    "positions": _positions,
    "joint": lambda v: _choice(v, JOINTS, "joint type"),
    "base_metals": _base_metals,
    "amperage_min": parse_amperage, "amperage_max": parse_amperage,
    "voltage_min": parse_voltage, "voltage_max": parse_voltage,
    "travel_speed_min": parse_speed, "travel_speed_max": parse_speed,
    "wire_feed_speed_min": parse_speed, "wire_feed_speed_max": parse_speed,
    "electrode_arrangement": lambda v: _choice(v, SAW_ARRANGEMENTS, "SAW electrode arrangement"),
    "unit_system": lambda v: _choice(v, SYSTEMS, "unit system", upper=True),
    **{key: parse_length for key in _LENGTH_KEYS},
    **{key: parse_temperature for key in _TEMPERATURE_KEYS},
}
KNOWN_KEYS = tuple(_PARSERS)
assert set(KNOWN_KEYS) == {f.name for f in fields(Procedure)} - {"systems"}


def parse_procedure(wps) -> Procedure:
    """Parse a WPS dict once; ValueError names the key that is wrong. A key whose value is None is not given."""
    if isinstance(wps, Procedure):
        return wps
    if not isinstance(wps, Mapping):
        raise ValueError(f"The WPS must be a dict of its values (process, electrode, ...), not {type(wps).__name__}.")
    unknown = sorted(str(k) for k in wps if k not in _PARSERS)
    if unknown:
        raise ValueError(f"Unknown WPS key(s) {', '.join(unknown)}; known keys: {', '.join(KNOWN_KEYS)}.")
    if wps.get("process") is None:
        raise ValueError("process is required: give the welding process, e.g. SMAW, GMAW, FCAW or SAW.")
    values, systems = {}, []
    for key, parser in _PARSERS.items():
        raw = wps.get(key)
        if raw is None:
            continue
        try:
            values[key] = parser(raw)
            if key in _LENGTH_KEYS:
                systems.append((key, length_system(raw)))
            elif key in _TEMPERATURE_KEYS:
                systems.append((key, temperature_system(raw)))
        except ValueError as exc:
            raise (UnitError if isinstance(exc, UnitError) else ValueError)(f"{key}: {exc}") from None
    process = values["process"]
    if process in PROCESS_ALIASES:
        process, implied = PROCESS_ALIASES[process]
        if implied and values.get("transfer", implied) != implied:
            raise ValueError(f"process: {values['process']} is short-circuiting GMAW, but transfer says "
                             f"{values['transfer']!r}; give one or make them agree.")
        if implied:
            values["transfer"] = implied
        values["process"] = process
    return Procedure(**values, systems=tuple((k, s) for k, s in systems if s))


# --- helpers for rules ----------------------------------------------------------------------------

@dataclass(frozen=True)
class Limit:
    """A limit as the standard prints it in both systems (the SI figure is not a conversion of the US one)."""

    us: Length
    si: Length

    def in_system(self, system: str) -> Length:
        return self.si if system == "SI" else self.us


def _limit(us: str, si: str) -> Limit:
    return Limit(parse_length(us), parse_length(si))


def _show(length: Length, system: str) -> str:
    return format_length(length, system)


def _pos_name(position: str) -> str:
    return {"F": "flat (F)", "H": "horizontal (H)", "V": "vertical (V)", "OH": "overhead (OH)"}[position]


def _usable(wps: Procedure) -> bool:
    """An electrode that belongs to the WPS's process: the electrode rules have something to judge."""
    return wps.electrode is not None and wps.process in wps.electrode.processes


# --- rule: prequalified processes -----------------------------------------------------------------

SOURCE_PROCESSES = "AWS D1.1/D1.1M:2020 clause 5, prequalified processes (SMAW, SAW, GMAW except GMAW-S, FCAW)"


def rule_process(wps: Procedure) -> Iterable[Finding]:
    """GTAW, ESW, EGW and short-circuiting GMAW need a PQR; an unknown process cannot be reviewed."""
    if wps.process in PROCESSES_NOT_PREQUALIFIED:
        yield Finding("process_not_prequalified", "not_prequalified",
                      f"{wps.process} is not a prequalified process: qualify the WPS by test (PQR).",
                      SOURCE_PROCESSES, "process")
    elif wps.process not in PROCESSES_PREQUALIFIED:
        yield Finding("process_unknown", "error",
                      f"'{wps.process}' is not a welding process this engine knows (known: "
                      f"{', '.join(PROCESSES_PREQUALIFIED + PROCESSES_NOT_PREQUALIFIED)}).",
                      SOURCE_PROCESSES, "process")
    if wps.process == "GMAW":
        if wps.transfer == "short_circuit":
            yield Finding("gmaw_short_circuit", "not_prequalified",
                          "GMAW with short-circuiting transfer (GMAW-S) is not prequalified: qualify the WPS by test.",
                          SOURCE_PROCESSES, "transfer")
        elif wps.transfer is None:
            yield Finding("gmaw_transfer_missing", "warning",
                          "GMAW transfer mode not given: short-circuiting transfer (GMAW-S) is not prequalified, "
                          "so state spray, globular or pulsed.", SOURCE_PROCESSES, "transfer")
    elif wps.transfer is not None:
        yield Finding("transfer_not_gmaw", "warning",
                      f"A metal transfer mode ({wps.transfer}) applies to GMAW only; it is ignored for {wps.process}.",
                      SOURCE_PROCESSES, "transfer")


# --- rules: the electrode's own classification ----------------------------------------------------

def _spec_source(electrode: Electrode) -> str:
    return f"{electrode.spec} classification {electrode.classification}"


def rule_electrode_process(wps: Procedure) -> Iterable[Finding]:
    """An E7018 is a stick electrode: a GMAW WPS cannot run it."""
    e = wps.electrode
    if e is None or wps.process not in PROCESSES_PREQUALIFIED + PROCESSES_NOT_PREQUALIFIED:
        return
    if wps.process not in e.processes:
        yield Finding("electrode_process", "error",
                      f"{e.classification} ({e.spec}) is a filler metal for {', '.join(sorted(e.processes))}, "
                      f"not for {wps.process}.", _spec_source(e), "electrode")


def rule_electrode_positions(wps: Procedure) -> Iterable[Finding]:
    """Positions outside the electrode's usability (third digit of A5.1, second of A5.20; SAW F and H)."""
    e = wps.electrode
    if not _usable(wps) or wps.positions is None:
        return
    outside = [p for p in wps.positions if p not in e.positions]
    if outside:
        yield Finding("electrode_position", "error",
                      f"{e.classification} is not for {', '.join(_pos_name(p) for p in outside)}: its usability is "
                      f"{e.positions_note or ', '.join(sorted(e.positions))}.", _spec_source(e), "positions")
    if e.horizontal_fillet_only and wps.joint == "groove" and "H" in wps.positions:
        yield Finding("electrode_position", "error",
                      f"{e.classification} is for horizontal fillets only, not horizontal groove welds "
                      f"({e.positions_note}).", _spec_source(e), "positions")


def _current_source(electrode: Electrode) -> str:
    marks = [note for note in electrode.notes if "current" in note]
    return _spec_source(electrode) + (f" ({'; '.join(marks)})" if marks else "")


def rule_electrode_current(wps: Procedure) -> Iterable[Finding]:
    """A current the electrode does not run on (E6010 on AC, E71T-8 on DCEP)."""
    e = wps.electrode
    if not _usable(wps) or wps.current is None:
        return
    allowed = e.currents_for(wps.process)
    if wps.current not in allowed:
        yield Finding("electrode_current", "error",
                      f"{e.classification} with {wps.process} runs on {', '.join(sorted(allowed))}, not "
                      f"{wps.current}.", _current_source(e), "current")


# --- rule: maximum single-pass fillet size, AWS D1.1:2020 Table 5.1 -------------------------------

SOURCE_TABLE_5_1 = "AWS D1.1/D1.1M:2020 Table 5.1 (US figures published; SI figures from memory)"
# Largest fillet made in one pass, by process and position; None = no limit in that position.
SINGLE_PASS_FILLET_MAX = {
    "SMAW": {"F": _limit("3/8 in", "10 mm"), "H": _limit("5/16 in", "8 mm"), "V": _limit("1/2 in", "12 mm"),
             "OH": _limit("5/16 in", "8 mm")},
    "GMAW": {"F": _limit("1/2 in", "12 mm"), "H": _limit("3/8 in", "10 mm"), "V": _limit("1/2 in", "12 mm"),
             "OH": _limit("5/16 in", "8 mm")},
    "FCAW": {"F": _limit("1/2 in", "12 mm"), "H": _limit("3/8 in", "10 mm"), "V": _limit("1/2 in", "12 mm"),
             "OH": _limit("5/16 in", "8 mm")},
    "SAW": {"F": None, "H": _limit("5/16 in", "8 mm")},  # single or parallel electrodes
}
SAW_MULTIPLE_H_FILLET_MAX = _limit("1/2 in", "12 mm")  # SAW, multiple electrodes, horizontal


def rule_single_pass_fillet_size(wps: Procedure) -> Iterable[Finding]:
    """A single-pass fillet larger than Table 5.1 allows for the process and position."""
    if wps.single_pass_size_max is None or wps.positions is None or wps.joint == "groove":
        return
    table = SINGLE_PASS_FILLET_MAX.get(wps.process)
    if table is None:
        return
    system = wps.system("single_pass_size_max")
    for position in wps.positions:
        limit = table.get(position)
        if wps.process == "SAW" and position == "H" and wps.electrode_arrangement == "multiple":
            limit = SAW_MULTIPLE_H_FILLET_MAX
        if limit is None:
            continue  # no limit (SAW flat); SAW in V or OH is refused by the electrode's positions
        if wps.single_pass_size_max > limit.in_system(system):
            yield Finding("single_pass_fillet_size", "not_prequalified",
                          f"Single-pass fillet {_show(wps.single_pass_size_max, system)} is over the "
                          f"{_show(limit.in_system(system), system)} maximum for {wps.process} in "
                          f"{_pos_name(position)}: make it in more passes or qualify by test.",
                          SOURCE_TABLE_5_1, "single_pass_size_max")


# --- rule: maximum electrode diameter, AWS D1.1:2020 Table 5.1 ------------------------------------

SOURCE_DIAMETER = ("AWS D1.1/D1.1M:2020 Table 5.1 (US figures published except SMAW groove V and OH and SAW, "
                   "from memory; SI figures from memory)")
_GMAW_FCAW_DIAMETER = {"F": _limit("1/8 in", "3.2 mm"), "H": _limit("1/8 in", "3.2 mm"),
                       "V": _limit("3/32 in", "2.4 mm"), "OH": _limit("5/64 in", "2.0 mm")}
ELECTRODE_DIAMETER_MAX = {
    ("SMAW", "fillet"): {"F": _limit("5/16 in", "8.0 mm"), "H": _limit("1/4 in", "6.4 mm"),
                         "V": _limit("3/16 in", "4.8 mm"), "OH": _limit("3/16 in", "4.8 mm")},
    ("SMAW", "groove"): {"F": _limit("1/4 in", "6.4 mm"), "H": _limit("3/16 in", "4.8 mm"),
                         "V": _limit("3/16 in", "4.8 mm"), "OH": _limit("3/16 in", "4.8 mm")},  # V, OH from memory
    ("GMAW", "fillet"): _GMAW_FCAW_DIAMETER, ("GMAW", "groove"): _GMAW_FCAW_DIAMETER,
    ("FCAW", "fillet"): _GMAW_FCAW_DIAMETER, ("FCAW", "groove"): _GMAW_FCAW_DIAMETER,
    ("SAW", "fillet"): {"F": _limit("1/4 in", "6.4 mm"), "H": _limit("1/4 in", "6.4 mm")},  # from memory
    ("SAW", "groove"): {"F": _limit("1/4 in", "6.4 mm"), "H": _limit("1/4 in", "6.4 mm")},  # from memory
}
SMAW_ROOT_PASS_DIAMETER_MAX = _limit("3/16 in", "4.8 mm")  # published US; SI from memory


def rule_electrode_diameter(wps: Procedure) -> Iterable[Finding]:
    """An electrode thicker than Table 5.1 allows for the process, joint and position."""
    if wps.electrode_diameter is None or wps.positions is None:
        return
    joint = wps.joint
    if joint is None:
        if wps.process == "SMAW":
            return  # SMAW limits differ between fillet and groove: not checked without the joint type
        joint = "fillet"
    table = ELECTRODE_DIAMETER_MAX.get((wps.process, joint))
    if table is None:
        return
    system = wps.system("electrode_diameter")
    for position in wps.positions:
        limit = table.get(position)
        if limit is not None and wps.electrode_diameter > limit.in_system(system):
            yield Finding("electrode_diameter", "not_prequalified",
                          f"Electrode diameter {_show(wps.electrode_diameter, system)} is over the "
                          f"{_show(limit.in_system(system), system)} maximum for {wps.process} {joint} welds in "
                          f"{_pos_name(position)}.", SOURCE_DIAMETER, "electrode_diameter")
    if wps.process == "SMAW" and joint == "groove":
        root = SMAW_ROOT_PASS_DIAMETER_MAX.in_system(system)
        if wps.electrode_diameter > root:
            yield Finding("electrode_diameter_root", "warning",
                          f"Electrode diameter {_show(wps.electrode_diameter, system)} is over the "
                          f"{_show(root, system)} maximum for an SMAW root pass: use a smaller electrode for the "
                          "root.", SOURCE_DIAMETER, "electrode_diameter")


# --- rule: minimum preheat and interpass temperature, AWS D1.1:2020 Table 5.8 ---------------------

SOURCE_TABLE_5_8 = ("AWS D1.1/D1.1M:2020 Table 5.8, thickest part at the point of welding (US figures published; "
                    "SI thickness bands from memory)")
# Upper bound of each thickness band (inclusive); None = no upper bound.
PREHEAT_BANDS = (_limit("3/4 in", "20 mm"), _limit("1-1/2 in", "38 mm"), _limit("2-1/2 in", "65 mm"), None)
_BAND_NAMES = {"US": ("up to 3/4 in", "over 3/4 in to 1-1/2 in", "over 1-1/2 in to 2-1/2 in", "over 2-1/2 in"),
               "SI": ("up to 20 mm", "over 20 mm to 38 mm", "over 38 mm to 65 mm", "over 65 mm")}
# Category A: SMAW with other than low-hydrogen electrodes. Category B: SMAW low hydrogen, SAW, GMAW, FCAW.
PREHEAT_MIN = {
    "A": ((32, 0), (150, 65), (225, 110), (300, 150)),  # (F, C) per band
    "B": ((32, 0), (50, 10), (150, 65), (225, 110)),
}
BELOW_FREEZING_NOTE = "base metal below 32 F [0 C]: preheat to at least 70 F [20 C] (from memory)"


def preheat_category(wps: Procedure) -> str | None:
    """Table 5.8 category of a WPS, or None when the WPS does not say enough (SMAW without its electrode)."""
    if wps.process == "SMAW":
        if wps.electrode is None or "SMAW" not in wps.electrode.processes:
            return None
        return "B" if wps.electrode.low_hydrogen else "A"
    return "B" if wps.process in ("SAW", "GMAW", "FCAW") else None


def minimum_preheat(category: str, thickest: Length, thickness_system: str = "US") -> tuple[int, int, str]:
    """(F, C, band name) of the Table 5.8 minimum for a category and the thickest part."""
    for index, bound in enumerate(PREHEAT_BANDS):
        if bound is None or thickest <= bound.in_system(thickness_system):
            f, c = PREHEAT_MIN[category][index]
            return f, c, _BAND_NAMES[thickness_system][index]
    raise AssertionError("unreachable: the last band has no upper bound")  # pragma: no cover


def _temperature_of(f: int, c: int, system: str) -> Temperature:
    return Temperature.from_f(f) if system == "US" else Temperature(Decimal(c))


def rule_preheat(wps: Procedure) -> Iterable[Finding]:
    """Preheat (and the interpass maximum) below the Table 5.8 minimum for the category and thickest part."""
    category = preheat_category(wps)
    if category is None or wps.thickness_max is None:
        return
    f, c, band = minimum_preheat(category, wps.thickness_max, wps.system("thickness_max"))
    for key, value in (("preheat_min", wps.preheat_min), ("interpass_max", wps.interpass_max)):
        if value is None:
            continue
        system = wps.system(key)
        required = _temperature_of(f, c, system)
        if value < required:
            what = "Minimum preheat" if key == "preheat_min" else "Maximum interpass temperature"
            yield Finding("preheat", "not_prequalified",
                          f"{what} {format_temperature(value, system)} is below the "
                          f"{format_temperature(required, system)} minimum preheat and interpass temperature of "
                          f"Category {category} for the thickest part {band} "
                          f"({format_length(wps.thickness_max, wps.system('thickness_max'))}); "
                          f"{BELOW_FREEZING_NOTE}.", SOURCE_TABLE_5_8, key)


# --- rules: base metal and matching filler metal --------------------------------------------------

SOURCE_BASE_METALS = ("AWS D1.1/D1.1M:2020 clause 5, table of approved base metals for prequalified WPSs "
                      "(A36 published; A572 Gr 50 and A992 from memory)")
SOURCE_MATCHING = ("AWS D1.1/D1.1M:2020 clause 5, table of matching filler metals by base metal group "
                   "(from memory)")
GROUP_I_A36_MAX_THICKNESS = _limit("3/4 in", "20 mm")  # A36 over this is Group II (US published; SI from memory)
MATCHING_TENSILE_KSI = {"I": 60, "II": 70}  # Group I: E60XX or E70XX; Group II: E70XX (from memory)
SMAW_GROUP_II_COVERINGS = ("15", "16", "18", "28")  # low-hydrogen E7015, E7016, E7018, E7028 (from memory)
_GROUP_ORDER = ("I", "II")


@dataclass(frozen=True)
class BaseMetal:
    name: str
    group: str  # "I" or "II"; "A36" means Group I up to 3/4 in, Group II over
    status: str


BASE_METALS = {
    "A36": BaseMetal("ASTM A36", "A36", "published"),
    "A572GR50": BaseMetal("ASTM A572 Gr 50", "II", "from memory"),
    "A992": BaseMetal("ASTM A992", "II", "from memory"),
}
_BASE_METAL_ALIASES = {"A57250": "A572GR50"}


def base_metal_key(name: str) -> str:
    """'ASTM A572 Grade 50', 'A572-50', 'a572 gr. 50' -> 'A572GR50'; 'ASTM A36/A36M' -> 'A36'."""
    key = name.upper().replace("GRADE", "GR")
    key = re.sub(r"^ASTM|/A?[0-9]+M\b|[\s.\-]", "", key)
    return _BASE_METAL_ALIASES.get(key, key)


def base_metal_group(name: str, thickness_max: Length | None = None, system: str = "US") -> str | None:
    """'I' or 'II', or None for a base metal not in this engine's table. A36 without a thickness counts as
    Group I (the usual case, up to 3/4 in)."""
    metal = BASE_METALS.get(base_metal_key(name))
    if metal is None:
        return None
    if metal.group == "A36":
        limit = GROUP_I_A36_MAX_THICKNESS.in_system(system)
        return "II" if thickness_max is not None and thickness_max > limit else "I"
    return metal.group


def rule_base_metals_known(wps: Procedure) -> Iterable[Finding]:
    """A base metal this engine has no group for cannot be judged: say so rather than pass it silently."""
    for name in wps.base_metals or ():
        if base_metal_group(name) is None:
            yield Finding("base_metal_unknown", "warning",
                          f"{name} is not a prequalified base metal in this engine's table (known: "
                          f"{', '.join(m.name for m in BASE_METALS.values())}): check it against the code's list "
                          "or qualify by test.", SOURCE_BASE_METALS, "base_metals")


def rule_matching_filler(wps: Procedure) -> Iterable[Finding]:
    """Filler metal that does not match the base metal group. Joining two groups, the filler may match the
    lower-strength group, but the higher group's low-hydrogen requirement still applies (from memory)."""
    if not _usable(wps) or not wps.base_metals or wps.process not in PROCESSES_PREQUALIFIED:
        return
    system = wps.system("thickness_max")
    groups = [g for g in (base_metal_group(n, wps.thickness_max, system) for n in wps.base_metals) if g]
    if not groups:
        return
    e = wps.electrode
    lowest = min(groups, key=_GROUP_ORDER.index)
    highest = max(groups, key=_GROUP_ORDER.index)
    required = MATCHING_TENSILE_KSI[lowest]
    metals = ", ".join(wps.base_metals)
    if wps.thickness_max is not None:
        metals += f", thickest part {format_length(wps.thickness_max, system)}"
    if e.tensile_ksi < required:
        yield Finding("matching_filler", "error",
                      f"{e.classification} ({e.tensile_ksi} ksi) undermatches Group {lowest} base metal ({metals}): "
                      f"matching filler is {required} ksi or stronger.", SOURCE_MATCHING, "electrode")
        return
    if wps.process == "SMAW" and highest == "II" and not (e.low_hydrogen and e.usability_code in
                                                          SMAW_GROUP_II_COVERINGS):
        yield Finding("matching_filler", "not_prequalified",
                      f"{e.classification} is not a matching filler for Group II base metal ({metals}): SMAW needs a "
                      "low-hydrogen E7015, E7016, E7018 or E7028 (or the A5.5 -X forms).", SOURCE_MATCHING,
                      "electrode")
    if wps.process == "FCAW" and e.single_pass_only:
        yield Finding("matching_filler", "not_prequalified",
                      f"{e.classification} is a single-pass flux-cored electrode (T-{e.usability_code}); the "
                      "matching filler list for prequalified WPSs excludes T-2, T-3, T-10, T-13, T-14 and T-GS.",
                      SOURCE_MATCHING, "electrode")
    if e.tensile_ksi > MATCHING_TENSILE_KSI["II"]:
        yield Finding("overmatching_filler", "warning",
                      f"{e.classification} ({e.tensile_ksi} ksi) is stronger than the matching filler for Group "
                      f"{highest} ({metals}); confirm the choice with the engineer of record.", SOURCE_MATCHING,
                      "electrode")


# --- rule: minimum fillet size, AISC 360-16 Table J2.4 --------------------------------------------

SOURCE_MIN_FILLET = ("AISC 360-16 Table J2.4, thinner part joined (published; SI thickness bands from memory); "
                     "AWS D1.1/D1.1M:2020 clause 5 minimum fillet size likewise (from memory)")
# (upper bound of the thinner part, inclusive; minimum fillet size); None = no upper bound.
MINIMUM_FILLET = (
    (_limit("1/4 in", "6 mm"), _limit("1/8 in", "3 mm")),
    (_limit("1/2 in", "13 mm"), _limit("3/16 in", "5 mm")),
    (_limit("3/4 in", "19 mm"), _limit("1/4 in", "6 mm")),
    (None, _limit("5/16 in", "8 mm")),
)


def minimum_fillet_size(thinner: Length, thickness_system: str = "US", size_system: str = "US") -> Length:
    """Table J2.4 minimum for the thinner part; it need not exceed that part's thickness (from memory)."""
    for bound, size in MINIMUM_FILLET:
        if bound is None or thinner <= bound.in_system(thickness_system):
            return min(size.in_system(size_system), thinner)
    raise AssertionError("unreachable: the last band has no upper bound")  # pragma: no cover


def rule_minimum_fillet_size(wps: Procedure) -> Iterable[Finding]:
    """The smallest fillet the WPS allows is under the minimum for the thinner part joined."""
    if wps.fillet_size_min is None or wps.thickness_min is None or wps.joint == "groove":
        return
    size_system = wps.system("fillet_size_min")
    required = minimum_fillet_size(wps.thickness_min, wps.system("thickness_min"), size_system)
    if wps.fillet_size_min < required:
        yield Finding("minimum_fillet_size", "not_prequalified",
                      f"Fillet size {_show(wps.fillet_size_min, size_system)} is under the "
                      f"{_show(required, size_system)} minimum for a thinner part of "
                      f"{_show(wps.thickness_min, wps.system('thickness_min'))}.", SOURCE_MIN_FILLET,
                      "fillet_size_min")


# --- rule: ranges that run backwards --------------------------------------------------------------

SOURCE_RANGES = "consistency of the WPS itself (a range needs minimum <= maximum)"
RANGES = (("amperage_min", "amperage_max", "A"), ("voltage_min", "voltage_max", "V"),
          ("travel_speed_min", "travel_speed_max", "speed"), ("wire_feed_speed_min", "wire_feed_speed_max", "speed"),
          ("thickness_min", "thickness_max", "length"), ("fillet_size_min", "fillet_size_max", "length"),
          ("preheat_min", "interpass_max", "temperature"))


def _show_value(wps: Procedure, key: str, value, kind: str) -> str:
    if kind == "length":
        return _show(value, wps.system(key))
    if kind == "temperature":
        return format_temperature(value, wps.system(key))
    if kind == "speed":
        return f"{format_speed(value, 'US')} ({format_speed(value, 'SI')})"
    return f"{value} {kind}"


def rule_ranges(wps: Procedure) -> Iterable[Finding]:
    """A minimum above its maximum: the WPS contradicts itself."""
    for low_key, high_key, kind in RANGES:
        low, high = getattr(wps, low_key), getattr(wps, high_key)
        if low is not None and high is not None and low > high:
            yield Finding("range", "error",
                          f"{low_key} {_show_value(wps, low_key, low, kind)} is above {high_key} "
                          f"{_show_value(wps, high_key, high, kind)}.", SOURCE_RANGES, low_key)


RULES = (
    rule_process,
    rule_electrode_process,
    rule_electrode_positions,
    rule_electrode_current,
    rule_single_pass_fillet_size,
    rule_electrode_diameter,
    rule_preheat,
    rule_base_metals_known,
    rule_matching_filler,
    rule_minimum_fillet_size,
    rule_ranges,
)


# --- entry points ---------------------------------------------------------------------------------

def review(wps, code: str = CODE, rules=RULES) -> list[Finding]:
    """Findings of a WPS against the prequalified limits of the code; [] = prequalified as far as shown."""
    if not isinstance(code, str) or code.strip() not in KNOWN_CODES:
        raise ValueError(f"Code {code!r} is not known to the prequalified review; known: {', '.join(KNOWN_CODES)}.")
    procedure = parse_procedure(wps)
    return [finding for rule in rules for finding in rule(procedure)]


def findings_by_field(findings: Iterable[Finding]) -> dict[str, list[Finding]]:
    """Findings grouped by the WPS key they concern, for a form; GENERAL ('__all__') holds the rest."""
    grouped: dict[str, list[Finding]] = {}
    for finding in findings:
        grouped.setdefault(finding.field or GENERAL, []).append(finding)
    return grouped


def is_prequalified(findings: Iterable[Finding]) -> bool:
    """True when no finding is an error or a not-prequalified limit (warnings ask for a person's look)."""
    return not any(f.severity in ("error", "not_prequalified") for f in findings)
