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

Optional keys beyond the engine contract: shielding_gas (text such as "75Ar/25CO2", or "none" for self-shielded;
checked against the electrode's A5.20 usability type and C/M designator, as is a process written FCAW-G or
FCAW-S), loading ("static" or "cyclic": cyclic fillet welds at least 3/16 in [5 mm]). Base metals are judged
against procedures.base_metals (Table 5.3 groups, Table 5.8 categories): one not in that table is not
prequalified.

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
from procedures import base_metals
from procedures.base_metals import Limit, limit
from procedures.electrodes import FLUX_CORED_TYPES, SPEC_A5_20, Electrode, decode

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
# FCAW-G: gas shielded; FCAW-S: self-shielded (the process names AWS uses; the shielding must agree with the
# electrode's A5.20 usability type).
PROCESS_SHIELDING = {"FCAW-G": "gas", "FCAW-S": "self"}
LOADINGS = ("static", "cyclic")
NO_GAS = ("none", "no gas", "self-shielded", "self shielded", "self", "-")
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
    shielding_gas: str | None = None  # as written ("75Ar/25CO2"); "" when the WPS says none (self-shielded)
    loading: str | None = None  # "static" or "cyclic"
    shielding: str | None = None  # "gas" or "self" when the process is written FCAW-G or FCAW-S
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


def _shielding_gas(value):
    """The shielding gas as written; "none" (or "self-shielded") becomes "" (the WPS says no gas)."""
    if not isinstance(value, str):
        raise ValueError(f"give the shielding gas as text, e.g. 75Ar/25CO2 or CO2, or 'none', not {value!r}.")
    text = " ".join(value.split())
    if not text or text.lower() in NO_GAS:
        return ""
    if len(text) > 60:
        raise ValueError("the shielding gas is too long: write it as e.g. 75Ar/25CO2, 100% CO2 or M21.")
    return text


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
    "shielding_gas": lambda v: _shielding_gas(v),
    "loading": lambda v: _choice(v, LOADINGS, "loading (static or cyclic)"),
    **{key: parse_length for key in _LENGTH_KEYS},
    **{key: parse_temperature for key in _TEMPERATURE_KEYS},
}
KNOWN_KEYS = tuple(_PARSERS)
assert set(KNOWN_KEYS) == {f.name for f in fields(Procedure)} - {"systems", "shielding"}


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
    shielding = PROCESS_SHIELDING.get(process)
    if process in PROCESS_ALIASES:
        process, implied = PROCESS_ALIASES[process]
        if implied and values.get("transfer", implied) != implied:
            raise ValueError(f"process: {values['process']} is short-circuiting GMAW, but transfer says "
                             f"{values['transfer']!r}; give one or make them agree.")
        if implied:
            values["transfer"] = implied
        values["process"] = process
    return Procedure(**values, shielding=shielding, systems=tuple((k, s) for k, s in systems if s))


# --- helpers for rules ----------------------------------------------------------------------------

def _limit(us: str, si: str) -> Limit:
    return Limit(parse_length(us), parse_length(si))


def _show(length: Length, system: str) -> str:
    """A length as its system writes it (core.units marks rounded inches with '≈')."""
    return format_length(length, system)


def _temperature(value: Temperature, system: str) -> str:
    """A temperature rounded to whole degrees (core.units never prints '-0 °F')."""
    return format_temperature(value, system)


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


# --- rule: shielding of the process and of the electrode agree -----------------------------------

SOURCE_SHIELDING = ("AWS A5.20 usability types: external shielding gas or self-shielded, and the C (CO2) / M (argon "
                    "mix) gas designator (types from memory); AWS D1.1/D1.1M:2020 clause 5: prequalified WPSs use the "
                    "shielding the filler metal is classified with (from memory)")


def _gas_kind(gas: str) -> str | None:
    """'M' for an argon mix, 'C' for carbon dioxide alone, None when the text does not tell."""
    text = gas.upper().replace(" ", "")
    if re.search(r"(?<![A-Z])AR", text) or re.fullmatch(r"M[0-9]{1,2}\b.*", text):  # ISO 14175 M mixes (memory)
        return "M"
    if "CO2" in text or "CARBONDIOXIDE" in text or re.fullmatch(r"C1\b.*", text):  # ISO 14175 C1 = CO2 (memory)
        return "C"
    return None


def rule_shielding(wps: Procedure) -> Iterable[Finding]:
    """FCAW-G with a self-shielded electrode (E71T-8), FCAW-S or no gas with a gas-shielded one (E71T-1C), and
    a gas the electrode is not classified with (E71T-1C under an argon mix)."""
    e = wps.electrode
    gas_given = wps.shielding_gas
    if wps.process == "FCAW" and wps.shielding and gas_given is not None and \
            (wps.shielding == "gas") != bool(gas_given):
        yield Finding("shielding", "error",
                      f"The process is FCAW-{wps.shielding[0].upper()} but the shielding gas says "
                      f"{gas_given or 'none'}: make them agree.", SOURCE_SHIELDING, "shielding_gas")
    if not _usable(wps):
        return
    if e.spec == SPEC_A5_20:
        electrode_shielding = FLUX_CORED_TYPES[e.usability_code].shielding
        wanted = wps.shielding or (None if gas_given is None else ("gas" if gas_given else "self"))
        if wanted and electrode_shielding != "either" and wanted != electrode_shielding:
            said = (f"the process is FCAW-{wanted[0].upper()}" if wps.shielding else
                    f"the shielding gas is {gas_given}" if gas_given else "the WPS gives no shielding gas")
            kind = "self-shielded" if electrode_shielding == "self" else "used with an external shielding gas"
            yield Finding("shielding", "error",
                          f"{e.classification} is {kind} (AWS A5.20 T-{e.usability_code}), but {said}: choose an "
                          f"electrode classified for {'gas shielding' if wanted == 'gas' else 'self-shielding'}, or "
                          "change the process.", SOURCE_SHIELDING, "electrode")
            return
    elif wps.process == "GMAW" and gas_given == "":
        yield Finding("shielding", "error", f"{e.classification} with GMAW needs a shielding gas; the WPS says none.",
                      SOURCE_SHIELDING, "shielding_gas")
        return
    kind = _gas_kind(gas_given) if gas_given else None
    if e.shielding in ("C", "M") and kind and kind != e.shielding:
        names = {"C": "carbon dioxide (C)", "M": "an argon mix (M)"}
        yield Finding("shielding_gas_designator", "not_prequalified",
                      f"{e.classification} is classified with {names[e.shielding]}, but the shielding gas "
                      f"{gas_given} is {names[kind]}: use the electrode classified for that gas or qualify by test.",
                      SOURCE_SHIELDING, "shielding_gas")


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


# --- base metals: AWS D1.1:2020 Table 5.3 (procedures.base_metals holds the table as data) ------------------

SOURCE_BASE_METALS = f"{base_metals.SOURCE_TABLE_5_3} (rows and status in procedures.base_metals)"
SOURCE_MATCHING = base_metals.SOURCE_MATCHING
BaseMetal = base_metals.BaseMetal
BASE_METALS = base_metals.BASE_METALS
base_metal_key = base_metals.base_metal_key
GROUP_I_A36_MAX_THICKNESS = base_metals.GROUP_I_MAX_36
MATCHING_TENSILE_KSI = {group: m.tensile_ksi for group, m in base_metals.MATCHING_FILLER.items()}
SMAW_GROUP_II_COVERINGS = base_metals.MATCHING_FILLER["II"].smaw_low_hydrogen
_GROUP_ORDER = base_metals.GROUPS


def base_metal_group(name: str, thickness_max: Length | None = None, system: str = "US") -> str | None:
    """'I'..'IV', or None for a base metal that is not prequalified (not in the table as entered, or approved only
    with qualification by test). A36 without a thickness counts as Group I (the usual case, up to 3/4 in)."""
    metal = base_metals.lookup(name)
    return None if metal is None else metal.group_for(thickness_max, system)


def _known_metals(wps: Procedure) -> list[BaseMetal]:
    return [m for m in (base_metals.lookup(n) for n in wps.base_metals or ()) if m is not None and m.group]


def rule_base_metals_known(wps: Procedure) -> Iterable[Finding]:
    """A base metal not in Table 5.3 cannot be prequalified; one the code approves only with qualification by test
    (A514, A517, ...) is not prequalified either."""
    for name in wps.base_metals or ():
        metal = base_metals.lookup(name)
        if metal is not None and metal.group is None:
            yield Finding("base_metal_qualification_by_test", "not_prequalified",
                          f"{metal.name} ({metal.note}) is approved for this code only with a WPS qualified by test "
                          f"(PQR): it is not a prequalified base metal ({metal.status}).",
                          base_metals.SOURCE_TEST_ONLY, "base_metals")
        elif metal is None:
            grades = base_metals.grades_of(name)
            if grades:
                yield Finding("base_metal_grade", "not_prequalified",
                              f"{name}: give the grade; the grades in the prequalified table differ in group and "
                              f"preheat ({', '.join(grades)}).", SOURCE_BASE_METALS, "base_metals")
            else:
                yield Finding("base_metal_unknown", "not_prequalified",
                              f"{name} is not in the table of prequalified base metals as entered here, so it cannot "
                              "be prequalified: qualify the WPS by test (PQR), or, if the code's own Table 5.3 lists "
                              "it, have the table here extended.", SOURCE_BASE_METALS, "base_metals")


# --- rule: minimum preheat and interpass temperature, AWS D1.1:2020 Table 5.8 ---------------------

SOURCE_TABLE_5_8 = (f"{base_metals.SOURCE_TABLE_5_8}, thickest part at the point of welding (categories A and B "
                    "published for D1.1:2015 Table 3.3; C and D US figures published in an older edition, SI and "
                    "the H8 condition of D from memory)")
PREHEAT_BANDS = base_metals.PREHEAT_BANDS
_BAND_NAMES = base_metals.BAND_NAMES
PREHEAT_MIN = {category: row.minimum for category, row in base_metals.PREHEAT_MIN.items()}
BELOW_FREEZING_NOTE = "base metal below 32 F [0 C]: preheat to at least 70 F [20 C] (from memory)"


def _process_hydrogen(wps: Procedure) -> str | None:
    """'low' for SMAW low-hydrogen, SAW, GMAW, FCAW; 'other' for other SMAW; None when it cannot be told."""
    if wps.process == "SMAW":
        if wps.electrode is None or "SMAW" not in wps.electrode.processes:
            return None
        return "low" if wps.electrode.low_hydrogen else "other"
    return "low" if wps.process in ("SAW", "GMAW", "FCAW") else None


def _category_of(metal: BaseMetal | None, hydrogen: str, wps: Procedure, system: str) -> str | None:
    if metal is None:  # no base metal named: judge by the process alone
        return "B" if hydrogen == "low" else "A"
    if hydrogen == "other":  # only Group I steels take non-low-hydrogen SMAW (Category A)
        return "A" if metal.group_for(wps.thickness_max, system) == "I" else None
    e = wps.electrode
    if metal.category_d and e is not None and e.diffusible_hydrogen_ml is not None and \
            e.diffusible_hydrogen_ml <= base_metals.CATEGORY_D_MAX_HYDROGEN_ML:
        return "D"
    return metal.category


def preheat_categories(wps: Procedure) -> list[tuple[str, str | None]]:
    """(Table 5.8 category, base metal name or None) for each base metal the WPS names that has one."""
    hydrogen = _process_hydrogen(wps)
    if hydrogen is None:
        return []
    metals = _known_metals(wps)
    if not metals:
        return [(_category_of(None, hydrogen, wps, "US"), None)]
    system = wps.system("thickness_max")
    found = [(_category_of(m, hydrogen, wps, system), m.name) for m in metals]
    return [(category, name) for category, name in found if category is not None]


def preheat_category(wps: Procedure) -> str | None:
    """The governing Table 5.8 category of a WPS (the one needing the most preheat), or None when the WPS does
    not say enough (SMAW without its electrode)."""
    found = preheat_categories(wps)
    if not found:
        return None
    return max((c for c, _ in found), key=base_metals.CATEGORY_ORDER.index)


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
    """Preheat (and the interpass maximum) below the Table 5.8 minimum for the category and thickest part; with
    several base metals the one needing the most preheat governs."""
    found = preheat_categories(wps)
    if not found or wps.thickness_max is None:
        return
    thickness_system = wps.system("thickness_max")
    minimums = [(minimum_preheat(category, wps.thickness_max, thickness_system), category, name)
                for category, name in found]
    (f, c, band), category, metal = max(minimums, key=lambda item: item[0][0])
    of_metal = f" ({metal})" if metal else ""
    for key, value in (("preheat_min", wps.preheat_min), ("interpass_max", wps.interpass_max)):
        if value is None:
            continue
        system = wps.system(key)
        required = _temperature_of(f, c, system)
        if value < required:
            what = "Minimum preheat" if key == "preheat_min" else "Maximum interpass temperature"
            yield Finding("preheat", "not_prequalified",
                          f"{what} {_temperature(value, system)} is below the "
                          f"{_temperature(required, system)} minimum preheat and interpass temperature of "
                          f"Category {category}{of_metal} for the thickest part {band} "
                          f"({_show(wps.thickness_max, thickness_system)}); "
                          f"{BELOW_FREEZING_NOTE}.", SOURCE_TABLE_5_8, key)


# --- rule: matching filler metal ------------------------------------------------------------------

def rule_matching_filler(wps: Procedure) -> Iterable[Finding]:
    """Filler metal that does not match the base metal group. Joining two groups, the filler may match the
    lower-strength group, but the higher group's low-hydrogen requirement still applies (from memory)."""
    if not _usable(wps) or not wps.base_metals or wps.process not in PROCESSES_PREQUALIFIED:
        return
    system = wps.system("thickness_max")
    groups = [g for g in (m.group_for(wps.thickness_max, system) for m in _known_metals(wps)) if g]
    if not groups:
        return
    e = wps.electrode
    lowest = min(groups, key=_GROUP_ORDER.index)
    highest = max(groups, key=_GROUP_ORDER.index)
    matching = base_metals.MATCHING_FILLER
    required = matching[lowest].tensile_ksi
    metals = ", ".join(wps.base_metals)
    if wps.thickness_max is not None:
        metals += f", thickest part {_show(wps.thickness_max, system)}"
    if e.tensile_ksi < required:
        yield Finding("matching_filler", "error",
                      f"{e.classification} ({e.tensile_ksi} ksi) undermatches Group {lowest} base metal ({metals}): "
                      f"matching filler is {required} ksi or stronger: {matching[lowest].text}.", SOURCE_MATCHING,
                      "electrode")
        return
    coverings = matching[highest].smaw_low_hydrogen
    if wps.process == "SMAW" and coverings is not None and not (e.low_hydrogen and e.usability_code in coverings):
        yield Finding("matching_filler", "not_prequalified",
                      f"{e.classification} is not a matching filler for Group {highest} base metal ({metals}): "
                      f"SMAW needs {matching[highest].text.split(' (SMAW)')[0]}.", SOURCE_MATCHING, "electrode")
    if wps.process == "FCAW" and e.single_pass_only:
        yield Finding("matching_filler", "not_prequalified",
                      f"{e.classification} is a single-pass flux-cored electrode (T-{e.usability_code}); the "
                      "matching filler list for prequalified WPSs excludes T-2, T-3, T-10, T-13, T-14 and T-GS.",
                      SOURCE_MATCHING, "electrode")
    if wps.process == "GMAW" and e.single_pass_only:
        yield Finding("matching_filler", "not_prequalified",
                      f"{e.classification} is a single-pass metal-cored electrode; the matching filler list for "
                      "prequalified WPSs excludes E70C-GS.", SOURCE_MATCHING, "electrode")
    if e.tensile_ksi > matching[highest].overmatch_above_ksi:
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


SOURCE_MIN_FILLET_NON_LH = ("AWS D1.1/D1.1M:2020 Table 7.7, note on non-low-hydrogen processes: without preheat "
                            "calculated to the code's hydrogen-control method, T is the thicker part joined and "
                            "single-pass welds shall be used (from memory, high confidence)")


def _non_low_hydrogen_smaw(wps: Procedure) -> bool:
    """SMAW with an electrode other than low hydrogen: the one non-low-hydrogen process of clause 5 (Table 5.8
    puts SAW, GMAW and FCAW with low-hydrogen SMAW)."""
    return wps.process == "SMAW" and _usable(wps) and not wps.electrode.low_hydrogen


def rule_minimum_fillet_size(wps: Procedure) -> Iterable[Finding]:
    """The smallest fillet the WPS allows is under the minimum for the part that governs: the thinner part
    joined, or the thicker part for non-low-hydrogen SMAW (Table 7.7 note), which must then be single pass."""
    if wps.fillet_size_min is None or wps.joint == "groove":
        return
    size_system = wps.system("fillet_size_min")
    if _non_low_hydrogen_smaw(wps) and wps.thickness_max is not None:
        part, key, which, source = wps.thickness_max, "thickness_max", "thicker part", SOURCE_MIN_FILLET_NON_LH
    elif wps.thickness_min is not None:
        part, key, which, source = wps.thickness_min, "thickness_min", "thinner part", SOURCE_MIN_FILLET
    else:
        return
    required = minimum_fillet_size(part, wps.system(key), size_system)
    why = (f" ({wps.electrode.classification} is not low hydrogen: the thicker part joined governs unless preheat "
           "is calculated to the code's hydrogen-control method)" if which == "thicker part" else "")
    if wps.fillet_size_min < required:
        yield Finding("minimum_fillet_size", "not_prequalified",
                      f"Fillet size {_show(wps.fillet_size_min, size_system)} is under the "
                      f"{_show(required, size_system)} minimum for a {which} of "
                      f"{_show(part, wps.system(key))}{why}.", source, "fillet_size_min")
    if which == "thicker part" and wps.single_pass_size_max is not None:
        pass_system = wps.system("single_pass_size_max")
        needed = minimum_fillet_size(part, wps.system(key), pass_system)
        if wps.single_pass_size_max < needed:
            yield Finding("minimum_fillet_single_pass", "not_prequalified",
                          f"{wps.electrode.classification} is not low hydrogen, so the minimum fillet "
                          f"{_show(needed, pass_system)} for the thicker part "
                          f"({_show(part, wps.system(key))}) must be made in a single pass; the WPS's largest "
                          f"single pass is {_show(wps.single_pass_size_max, pass_system)}.", source,
                          "single_pass_size_max")


# --- rule: cyclically loaded fillet welds -----------------------------------------------------------

SOURCE_CYCLIC_FILLET = ("AWS D1.1/D1.1M:2020 clause 4 Part C (cyclically loaded nontubular connections): minimum "
                        "fillet weld size 3/16 in [5 mm] (from memory; clause number not confirmed)")
CYCLIC_FILLET_MIN = limit("3/16 in", "5 mm")


def rule_cyclic_fillet_size(wps: Procedure) -> Iterable[Finding]:
    """A WPS for cyclically loaded work allowing a fillet under 3/16 in [5 mm]."""
    if wps.loading != "cyclic" or wps.fillet_size_min is None or wps.joint == "groove":
        return
    system = wps.system("fillet_size_min")
    least = CYCLIC_FILLET_MIN.in_system(system)
    if wps.fillet_size_min < least:
        yield Finding("cyclic_fillet_size", "error",
                      f"Fillet size {_show(wps.fillet_size_min, system)} is under the {_show(least, system)} "
                      "minimum for fillet welds in cyclically loaded structures.", SOURCE_CYCLIC_FILLET,
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
        return _temperature(value, wps.system(key))
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
    rule_cyclic_fillet_size,
    rule_shielding,
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
