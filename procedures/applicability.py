"""Does a WPS cover this weld? Rule by rule, each with the clause that says so (or "common practice").

Plain Python, no Django. The weld map's line and the WPS come in as dicts of plain values; the answer is a list of
procedures.prequalified.Finding: severity "error" means the WPS does not apply to the weld (the weld form refuses
it, the CSV import makes it a row error, the tablet shows the weld as blocked, release waits); "warning" means a
value could not be compared because the WPS does not state it. An empty list: the WPS applies as far as these
values show.

What is compared (the WPS's own statements against the weld's):
- the job's code family (AWS D1.1 or ISO) and unit system;
- the process (when the weld map records one; GMAW-S apart from the other GMAW transfers);
- the joint type (fillet, groove) among those the WPS lists;
- the position, AWS letters or ISO 6947 codes as the weld map records them, among the WPS's positions; the
  vertical progression where both say it (PF = up, PG = down);
- the thickness of both parts joined within the WPS's base metal range (limits included);
- a fillet weld's leg(s) within the WPS's fillet size range (limits included).

Whether the WPS was approved on the day the weld was made is a question of records and dates, not of values: the
Django side answers it (procedures.models.wps.WPS.in_force_on) before it asks this engine.

Entry point: review(wps, weld, job=None) -> list[Finding]. A value that cannot be read raises ValueError.
reviewer(wps, job) gives the same review for many welds, the WPS and job read once.

wps: {"label": "WPS BSW-101 rev 1", "code": "AWS D1.1:2020" | "ISO 15609-1:2019", "unit_system": "US" | "SI",
      "process": "FCAW", "transfer": None | "short_circuit" | ..., "positions": ["F", "H"],
      "progression": None | "up" | "down", "joint_types": ["fillet"], "thickness_min": "1/4 in",
      "thickness_max": "1-1/2 in", "fillet_size_min": None | "3/16 in", "fillet_size_max": None | "5/8 in"}
weld: {"label": "Weld W1", "joint": "fillet" | "groove", "position": "F" | "PB" | ..., "thicknesses":
       ["3/8 in", "5/8 in"], "size": None | "1/4 in", "size2": None | "5/16 in", "process": None | "GMAW-S"}
job: {"label": "job J-2417", "code_family": "AWS" | "ISO", "unit_system": "US" | "SI"} or None (not checked).
Lengths are text with a unit or core.units.Length values.
"""

from __future__ import annotations

from collections.abc import Mapping

from core.units import Length, format_length, parse_length
from procedures.prequalified import Finding

FAMILIES = ("AWS", "ISO")
SYSTEMS = ("US", "SI")
POSITIONS = ("F", "H", "V", "OH")
JOINTS = ("fillet", "groove")
PROCESSES = ("SMAW", "GMAW", "FCAW", "SAW", "GTAW")
TRANSFERS = ("short_circuit", "globular", "spray", "pulsed")
PROGRESSIONS = ("up", "down")

# ISO 6947 positions as the AWS letters a WPS lists (shared domain notes, published: 1F = PA, 2F = PB, 3F = PF or
# PG, 4F = PD; 1G = PA, 2G = PC, 3G = PF or PG, 4G = PE), and the vertical direction the code itself carries.
ISO_AS_AWS = {"PA": "F", "PB": "H", "PC": "H", "PD": "OH", "PE": "OH", "PF": "V", "PG": "V"}
ISO_PROGRESSION = {"PF": "up", "PG": "down"}
POSITION_WORDS = {"F": "flat (F)", "H": "horizontal (H)", "V": "vertical (V)", "OH": "overhead (OH)"}

# --- sources, one per rule -------------------------------------------------------------------------------------

SOURCE_CODE = ("common practice, no source: the contract names the code; a WPS written to another code is not a "
               "procedure of this job")
SOURCE_UNITS = ("AWS D1.1/D1.1M:2020 clause 1, units of measurement: US customary and SI values are not exact "
                "equivalents, so each system is used on its own (clause wording from memory); a WPS in the other "
                "system is a different document")
SOURCE_PROCESS = ("AWS D1.1/D1.1M:2020 clause 5 and Table 6.5: a WPS is written for one process, and GMAW "
                  "short-circuiting transfer (GMAW-S) is qualified apart from the other transfers (from memory)")
SOURCE_JOINT = ("AWS D1.1/D1.1M:2020 clause 5 (prequalified joint details) and clause 6 Table 6.1 (weld types a "
                "PQR qualifies): a WPS covers the weld types it specifies (clause references from memory)")
SOURCE_POSITION = ("AWS D1.1/D1.1M:2020 clause 5 and clause 6 Table 6.1: a WPS covers the welding positions it "
                   "specifies (from memory); ISO 6947 codes read as AWS letters as published (PA = 1F/1G, PB = 2F, "
                   "PC = 2G, PD = 4F, PE = 4G, PF and PG = 3F/3G)")
SOURCE_PROGRESSION = ("AWS D1.1/D1.1M:2020 Table 6.5: a change of vertical progression needs its own procedure "
                      "(from memory); ISO 6947: PF is vertical up, PG vertical down (published)")
SOURCE_THICKNESS = ("AWS D1.1/D1.1M:2020 clause 5 (prequalified) and Table 6.2 (qualified by test): a WPS covers "
                    "the base metal thickness range it states, limits included; both parts joined must lie in it "
                    "(clause references from memory)")
SOURCE_FILLET_SIZE = ("common practice, no source: a fillet weld is made within the range of fillet sizes its WPS "
                      "states, limits included")


# --- reading the input -----------------------------------------------------------------------------------------

def _mapping(value, what: str) -> Mapping:
    if not isinstance(value, Mapping):
        raise ValueError(f"The {what} must be a dict of its values, not {type(value).__name__}.")
    return value


def _choice(value, allowed, what: str, *, optional=False):
    if value is None and optional:
        return None
    if isinstance(value, str) and value.strip():
        key = value.strip()
        for item in allowed:
            if key.upper() == item.upper():
                return item
    raise ValueError(f"{what} must be one of {', '.join(allowed)}{' (or None)' if optional else ''}, not {value!r}.")


def _length(value, what: str, *, optional=False) -> Length | None:
    if value is None and optional:
        return None
    if value is None:
        raise ValueError(f"{what} is missing: give it with its unit, e.g. 3/8 in or 10 mm.")
    try:
        length = parse_length(value)
    except ValueError as exc:
        raise ValueError(f"{what}: {exc}") from None
    if length.mm <= 0:
        raise ValueError(f"{what} must be more than zero, not {value!r}.")
    return length


def _family(code) -> str:
    if isinstance(code, str) and code.strip():
        head = code.strip().upper().split()[0]
        for family in FAMILIES:
            if head.startswith(family):
                return family
    raise ValueError(f"The WPS code must name AWS D1.1 or an ISO standard (e.g. 'AWS D1.1:2020', "
                     f"'ISO 15609-1:2019'), not {code!r}.")


def _process(value, transfer, what: str):
    """(process, transfer) with 'GMAW-S' read as GMAW, short-circuiting."""
    if value is None:
        return None, None
    if not isinstance(value, str):
        raise ValueError(f"{what} process must be text such as FCAW or GMAW-S, not {value!r}.")
    key = value.strip().upper().replace(" ", "")
    if key == "GMAW-S":
        return "GMAW", "short_circuit"
    process = _choice(key, PROCESSES, f"{what} process")
    transfer = _choice(transfer, TRANSFERS, f"{what} transfer", optional=True)
    return process, transfer if process == "GMAW" else None


def _list(value, allowed, what: str) -> tuple:
    if isinstance(value, str) or not isinstance(value, (list, tuple, set, frozenset)) or not value:
        raise ValueError(f"{what} must be a non-empty list of {', '.join(allowed)}, not {value!r}.")
    return tuple(_choice(v, allowed, what) for v in value)


def _process_name(process, transfer) -> str:
    return "GMAW-S" if process == "GMAW" and transfer == "short_circuit" else process


class _Wps:
    def __init__(self, wps: Mapping):
        wps = _mapping(wps, "WPS")
        self.label = str(wps.get("label") or "The WPS")
        self.family = _family(wps.get("code"))
        self.system = _choice(wps.get("unit_system"), SYSTEMS, f"{self.label} unit system")
        self.process, self.transfer = _process(wps.get("process"), wps.get("transfer"), self.label)
        if self.process is None:
            raise ValueError(f"{self.label} names no process.")
        self.positions = _list(wps.get("positions"), POSITIONS, f"{self.label} positions")
        self.progression = _choice(wps.get("progression"), PROGRESSIONS, f"{self.label} vertical progression",
                                   optional=True)
        self.joints = _list(wps.get("joint_types"), JOINTS, f"{self.label} joint types")
        self.thickness_min = _length(wps.get("thickness_min"), f"{self.label} minimum base metal thickness")
        self.thickness_max = _length(wps.get("thickness_max"), f"{self.label} maximum base metal thickness")
        if self.thickness_min > self.thickness_max:
            raise ValueError(f"{self.label}: the minimum base metal thickness is above the maximum.")
        self.fillet_min = _length(wps.get("fillet_size_min"), f"{self.label} minimum fillet size", optional=True)
        self.fillet_max = _length(wps.get("fillet_size_max"), f"{self.label} maximum fillet size", optional=True)


class _Weld:
    def __init__(self, weld: Mapping):
        weld = _mapping(weld, "weld")
        self.label = str(weld.get("label") or "The weld")
        self.joint = _choice(weld.get("joint"), JOINTS, f"{self.label} joint")
        position = weld.get("position")
        if not isinstance(position, str) or not position.strip():
            raise ValueError(f"{self.label} position must be F, H, V, OH or an ISO 6947 code PA-PG, not {position!r}.")
        self.position_text = position.strip().upper()
        if self.position_text in ISO_AS_AWS:
            self.position = ISO_AS_AWS[self.position_text]
            self.progression = ISO_PROGRESSION.get(self.position_text)
        else:
            self.position = _choice(self.position_text, POSITIONS, f"{self.label} position (F, H, V, OH, PA-PG)")
            self.progression = None
        thicknesses = weld.get("thicknesses")
        if isinstance(thicknesses, (str, Length)) or not isinstance(thicknesses, (list, tuple)) or not thicknesses:
            raise ValueError(f"{self.label} thicknesses must list the parts joined, e.g. ['3/8 in', '1/2 in'].")
        self.thicknesses = tuple(_length(t, f"{self.label} part {n} thickness")
                                 for n, t in enumerate(thicknesses, start=1))
        self.sizes = tuple(s for s in (_length(weld.get("size"), f"{self.label} size", optional=True),
                                       _length(weld.get("size2"), f"{self.label} second leg", optional=True)) if s)
        self.process, self.transfer = _process(weld.get("process"), None, self.label)


class _Job:
    def __init__(self, job: Mapping):
        job = _mapping(job, "job")
        self.label = str(job.get("label") or "this job")
        self.family = _choice(job.get("code_family"), FAMILIES, f"{self.label} code family")
        self.system = _choice(job.get("unit_system"), SYSTEMS, f"{self.label} unit system")


def _show(length: Length, system: str) -> str:
    return format_length(length, system)


# --- the rules -------------------------------------------------------------------------------------------------

def rule_code(wps: _Wps, weld: _Weld, job: _Job | None):
    if job is not None and wps.family != job.family:
        yield Finding("code", "error", f"{wps.label} is written to {wps.family}; {job.label} is judged to "
                      f"{job.family}: choose a {job.family} procedure.", SOURCE_CODE, "wps")


def rule_units(wps: _Wps, weld: _Weld, job: _Job | None):
    if job is not None and wps.system != job.system:
        words = {"US": "US customary units", "SI": "SI units"}
        yield Finding("unit_system", "error", f"{wps.label} is written in {words[wps.system]}; {job.label} works "
                      f"in {words[job.system]}: choose a procedure in {words[job.system]}.", SOURCE_UNITS, "wps")


def rule_process(wps: _Wps, weld: _Weld, job):
    if weld.process is None:
        return
    wanted = _process_name(weld.process, weld.transfer)
    given = _process_name(wps.process, wps.transfer)
    if weld.process != wps.process:
        yield Finding("process", "error", f"{weld.label} is welded {wanted}; {wps.label} is a {given} procedure.",
                      SOURCE_PROCESS, "wps")
    elif weld.process == "GMAW" and weld.transfer == "short_circuit" and wps.transfer != "short_circuit":
        yield Finding("process", "error", f"{weld.label} is welded GMAW-S (short-circuiting); {wps.label} is "
                      f"{given}{'' if wps.transfer else ' with no transfer stated'}.", SOURCE_PROCESS, "wps")


def rule_joint(wps: _Wps, weld: _Weld, job):
    if weld.joint not in wps.joints:
        yield Finding("joint", "error", f"{weld.label} is a {weld.joint} weld; {wps.label} covers "
                      f"{' and '.join(wps.joints)} welds only.", SOURCE_JOINT, "wps")


def rule_position(wps: _Wps, weld: _Weld, job):
    if weld.position not in wps.positions:
        shown = weld.position_text if weld.position_text == weld.position else \
            f"{weld.position_text} ({POSITION_WORDS[weld.position]})"
        yield Finding("position", "error", f"{weld.label} is in position {shown}; {wps.label} covers "
                      f"{', '.join(wps.positions)}.", SOURCE_POSITION, "wps")


def rule_progression(wps: _Wps, weld: _Weld, job):
    if weld.position != "V" or weld.position not in wps.positions:
        return
    if wps.progression is None:
        yield Finding("progression", "warning", f"{wps.label} does not state its vertical progression: whether it "
                      f"covers {weld.label} ({weld.position_text}) cannot be checked.", SOURCE_PROGRESSION, "wps")
    elif weld.progression is not None and weld.progression != wps.progression:
        yield Finding("progression", "error", f"{weld.label} is welded vertical {weld.progression} "
                      f"({weld.position_text}); {wps.label} is for vertical {wps.progression} only.",
                      SOURCE_PROGRESSION, "wps")


def rule_thickness(wps: _Wps, weld: _Weld, job):
    system = wps.system
    outside = [(n, t) for n, t in enumerate(weld.thicknesses, start=1)
               if t < wps.thickness_min or t > wps.thickness_max]
    for n, t in outside:
        yield Finding("thickness", "error", f"{weld.label} part {n} is {_show(t, system)}; {wps.label} covers base "
                      f"metal {_show(wps.thickness_min, system)} to {_show(wps.thickness_max, system)}.",
                      SOURCE_THICKNESS, "wps")


def rule_fillet_size(wps: _Wps, weld: _Weld, job):
    if weld.joint != "fillet" or not weld.sizes:
        return
    system = wps.system
    low, high = wps.fillet_min, wps.fillet_max
    if low is None and high is None:
        yield Finding("fillet_size", "warning", f"{wps.label} states no fillet size range: the size of "
                      f"{weld.label} cannot be checked against it.", SOURCE_FILLET_SIZE, "wps")
        return
    for size in dict.fromkeys(weld.sizes):
        if (low is not None and size < low) or (high is not None and size > high):
            span = (f"{_show(low, system)} to {_show(high, system)}" if low is not None and high is not None
                    else f"{_show(low, system)} and over" if low is not None else f"up to {_show(high, system)}")
            yield Finding("fillet_size", "error", f"{weld.label} is a {_show(size, system)} fillet; {wps.label} "
                          f"covers fillet sizes {span}.", SOURCE_FILLET_SIZE, "wps")


RULES = (rule_code, rule_units, rule_process, rule_joint, rule_position, rule_progression, rule_thickness,
         rule_fillet_size)


def review(wps, weld, job=None) -> list[Finding]:
    """Findings where the WPS does not cover the weld (errors) or cannot be compared (warnings); [] = it applies."""
    return reviewer(wps, job)(weld)


def reviewer(wps, job=None):
    """review() of many welds against one WPS on one job (a weld map's rows): the WPS and the job are read once.
    reviewer(wps, job)(weld) == review(wps, weld, job), errors included: the WPS is read here (a WPS that cannot be
    read raises now), the job after the first weld, as review() reads them."""
    parsed_wps = _Wps(wps)
    parsed_job = []

    def review_weld(weld) -> list[Finding]:
        parsed_weld = _Weld(weld)
        if job is not None and not parsed_job:
            parsed_job.append(_Job(job))
        job_read = parsed_job[0] if parsed_job else None
        findings = [f for rule in RULES for f in rule(parsed_wps, parsed_weld, job_read)]
        return sorted(findings, key=lambda f: f.severity != "error")

    return review_weld


def errors(findings) -> list[Finding]:
    return [f for f in findings if f.severity == "error"]


__all__ = ["RULES", "errors", "review", "reviewer"]
