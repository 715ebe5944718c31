"""Decode a filler-metal classification into what a procedure review needs to know about it.

A classification is a code that the AWS filler-metal specifications build out of parts: E7018-1 H4R reads
"electrode (E), 70 ksi (70), all positions (1), low-hydrogen potassium iron powder covering (8), improved
toughness (-1), 4 mL diffusible hydrogen (H4), moisture resistant (R)". decode() reads each part against a
table here, and a part it cannot read is named in the error, with what would be right.

Read: AWS A5.1 (carbon steel covered electrodes), the E(70..120)XX-suffix form of AWS A5.5 (low-alloy covered
electrodes), AWS A5.18 (carbon steel solid and metal-cored wire for GMAW and GTAW), AWS A5.20 (carbon steel
flux-cored electrodes, the E7XT-X form), AWS A5.17 (carbon steel SAW flux-wire classifications).
Not read: A5.36 open classifications (E71T1-C1A0-CS1), A5.23 low-alloy SAW, A5.28 low-alloy wire, metric forms.

Which classifications exist is data, not a rule of digits: procedures.electrode_list holds a table per
specification (A5.1 rows with their usability; the A5.5 names; A5.18 wire and metal-cored types with the gas
designators they are written with; A5.20 types with their position digits). A well-formed code that the
specification does not list (E7010 in A5.1, E6024, E70C-6 without its gas designator) is refused with the
specification named and the near classifications that do exist.

Each table row carries its status ("published" or "from memory"), and every decoded Electrode lists in `notes`
which of its values are from memory.
"""

from __future__ import annotations

import re
import unicodedata
from dataclasses import dataclass, field
from functools import lru_cache

from procedures import electrode_list

ALL_POSITIONS = frozenset({"F", "H", "V", "OH"})
FLAT_AND_HORIZONTAL = frozenset({"F", "H"})
PUBLISHED = "published"
FROM_MEMORY = "from memory"

SPEC_A5_1 = "AWS A5.1"  # carbon steel electrodes for SMAW
SPEC_A5_5 = "AWS A5.5"  # low-alloy steel electrodes for SMAW
SPEC_A5_17 = "AWS A5.17"  # carbon steel electrodes and fluxes for SAW
SPEC_A5_18 = "AWS A5.18"  # carbon steel electrodes and rods for gas shielded arc welding
SPEC_A5_20 = "AWS A5.20"  # carbon steel electrodes for FCAW


@dataclass(frozen=True)
class Electrode:
    """A decoded classification. The first seven fields are the engine contract; the rest are extras."""

    classification: str
    processes: frozenset
    tensile_ksi: int  # minimum tensile strength of the weld metal
    positions: frozenset
    currents: frozenset
    low_hydrogen: bool  # low-hydrogen covering, or a process AWS D1.1:2020 Table 5.8 puts in Category B
    spec: str
    usability: str = ""  # SMAW covering, FCAW usability type, wire type
    usability_code: str = ""  # the digits or type behind it: "18" (E7018), "1" (E71T-1C), "6" (ER70S-6)
    group: str | None = None  # SMAW electrode group F1..F4 for welder qualification (from memory)
    positions_note: str = ""
    horizontal_fillet_only: bool = False  # E7024, E7028, E6020, E6027: horizontal position for fillets only
    shielding: str | None = None  # "C" CO2 or "M" argon mix (FCAW, metal cored); None if not designated
    self_shielded: bool = False
    single_pass_only: bool = False
    designators: tuple = ()  # suffixes after the base classification: "-1", "M", "C3", "H4", "R", "J"
    diffusible_hydrogen_ml: int | None = None  # H4 -> 4 mL per 100 g of deposited metal
    moisture_resistant: bool = False
    tensile_ksi_max: int | None = None  # A5.17 gives a range: 70-95 ksi
    heat_treatment: str | None = None  # A5.17: "as-welded" or "post-weld heat treated"
    impact_test_f: int | None = None  # A5.17: CVN test temperature in F; None = no impact requirement (Z)
    wire: str | None = None  # A5.17: the electrode wire, e.g. EM12K
    currents_by_process: tuple = ()  # (("GMAW", frozenset({"DCEP"})), ("GTAW", frozenset({"DCEN"})))
    notes: tuple = field(default=())  # which values are from memory, and other cautions

    def currents_for(self, process: str) -> frozenset:
        """The currents allowed when this filler is used with that process (GMAW wire is DCEP, GTAW rod DCEN)."""
        for name, currents in self.currents_by_process:
            if name == process:
                return currents
        if process not in self.processes:
            raise ValueError(f"{self.classification} is not used with {process!r}; it is for "
                             f"{', '.join(sorted(self.processes))}.")
        return self.currents


# --- AWS A5.1 / A5.5 covered electrodes (SMAW) ----------------------------------------------------

@dataclass(frozen=True)
class Covering:
    description: str
    currents: frozenset
    low_hydrogen: bool
    group: str  # SMAW electrode group for welder qualification, AWS D1.1:2020 clause 6 (from memory)
    status: str  # of the covering and currents, per the shared domain reference


_AC_DCEP = frozenset({"AC", "DCEP"})
_ALL_CURRENTS = frozenset({"AC", "DCEP", "DCEN"})
# AWS A5.1, last two digits: position digit + covering digit. Currents and coverings per the shared domain
# reference; groups F1..F4 per AWS D1.1:2020 clause 6 (from memory for every row).
COVERINGS = {
    "10": Covering("high cellulose sodium", frozenset({"DCEP"}), False, "F3", PUBLISHED),
    "11": Covering("high cellulose potassium", _AC_DCEP, False, "F3", PUBLISHED),
    "12": Covering("high titania sodium", frozenset({"AC", "DCEN"}), False, "F2", PUBLISHED),
    "13": Covering("high titania potassium", _ALL_CURRENTS, False, "F2", PUBLISHED),
    "14": Covering("iron powder, titania", _ALL_CURRENTS, False, "F2", "currents from memory"),
    "15": Covering("low hydrogen sodium", frozenset({"DCEP"}), True, "F4", PUBLISHED),
    "16": Covering("low hydrogen potassium", _AC_DCEP, True, "F4", PUBLISHED),
    "18": Covering("low hydrogen potassium, iron powder", _AC_DCEP, True, "F4", PUBLISHED),
    "20": Covering("high iron oxide", _ALL_CURRENTS, False, "F1", FROM_MEMORY),  # AC or DCEN for H fillets
    "24": Covering("iron powder, titania", _ALL_CURRENTS, False, "F1", "currents from memory"),
    "27": Covering("high iron oxide, iron powder", _ALL_CURRENTS, False, "F1", FROM_MEMORY),  # AC or DCEN, H fillets
    "28": Covering("low hydrogen potassium, iron powder", _AC_DCEP, True, "F1", PUBLISHED),
    "48": Covering("low hydrogen potassium, iron powder", _AC_DCEP, True, "F4", FROM_MEMORY),
    "45": Covering("low hydrogen sodium (vertical down)", frozenset({"DCEP"}), True, "F4", FROM_MEMORY),  # A5.5 only
}

# AWS A5.1, third digit (published): 1 all positions, 2 flat and horizontal fillet, 4 flat, horizontal,
# overhead and vertical down.
POSITION_DIGITS = {
    "1": (ALL_POSITIONS, "all positions", False),
    "2": (FLAT_AND_HORIZONTAL, "flat, and horizontal fillets only", True),
    "4": (ALL_POSITIONS, "flat, horizontal, overhead and vertical down (progression down only)", False),
}

# SMAW electrode groups: a welder qualified with a group is qualified for the groups listed
# (AWS D1.1:2020 clause 6, from memory).
GROUPS_QUALIFIED = {
    "F4": frozenset({"F4", "F3", "F2", "F1"}),
    "F3": frozenset({"F3", "F2", "F1"}),
    "F2": frozenset({"F2", "F1"}),
    "F1": frozenset({"F1"}),
}

A5_1_TENSILES = (60, 70)  # E60XX, E70XX (published)
A5_5_TENSILES = (70, 80, 90, 100, 110, 120)  # AWS A5.5 strength levels (from memory)
# Which classifications exist is data: procedures.electrode_list (A5_1 rows with their usability; A5_5 names).
A5_1_IMPROVED_TOUGHNESS = tuple(c[-2:] for c, row in electrode_list.A5_1.items() if row.improved_toughness)
A5_5_SUFFIXES = tuple(dict.fromkeys(electrode_list.A5_5.values()))
HYDROGEN_DESIGNATORS = (4, 8, 16)  # mL per 100 g (from memory)

_SMAW_SHAPE = re.compile(r"^E(?P<num>[0-9A-Z]{4,5}?)(?P<mil>M1?)?(?:-(?P<suffix>[0-9A-Z]+?))?(?P<h>H[0-9]+)?"
                         r"(?P<r>R)?$")


def _digits_error(text, found, known, what):
    return ValueError(f"{text}: {what}, found '{found}' (known: {', '.join(known)}).")


def _a5_1_refusal(text: str, num: str) -> ValueError:
    """E7010, E6024, E7019: the shape of A5.1 but not a classification A5.1 lists; name the near ones."""
    usability = num[-2:]
    same_covering = [c for c in electrode_list.A5_1 if c[-2:] == usability and c != f"E{num}"]
    near = list(dict.fromkeys(same_covering + electrode_list.near(
        [c for c in electrode_list.A5_1 if c[1:3] == num[:2]], f"E{num}", 4)))
    a5_5 = [c for c in electrode_list.A5_5 if c.startswith(f"E{num}-")]
    message = (f"{text}: E{num} is not a classification AWS A5.1 lists (A5.1: {', '.join(electrode_list.A5_1)}). "
               f"Near ones that exist: {', '.join(near)} (AWS A5.1)")
    if a5_5:
        message += f"; {', '.join(a5_5[:6])} (AWS A5.5, with an alloy suffix; from memory)"
    return ValueError(message + ".")


def _a5_5_refusal(text: str, key: str, num: str, suffix: str) -> ValueError:
    same_suffix = [c for c in electrode_list.A5_5 if electrode_list.A5_5[c] == suffix]
    same_digits = [c for c in electrode_list.A5_5 if c.startswith(f"E{num}-") and c not in same_suffix]
    near = electrode_list.near(same_suffix, key, 6) + same_digits[:4]
    return ValueError(f"{text}: {key} is not a classification AWS A5.5 lists (from memory). Near ones that exist: "
                      f"{', '.join(near)}.")


def _decode_covered(text: str, compact: str) -> Electrode:
    match = _SMAW_SHAPE.match(compact)
    if not match:
        raise ValueError(f"{text}: not the shape of a covered electrode; write it as E7018, E7018-1 H4R or "
                         "E8018-C3.")
    num, suffix, mil = match["num"], match["suffix"], match["mil"] or ""
    if mil and suffix:
        raise ValueError(f"{text}: write the military M designator alone (E7018M, E11018M), not with a suffix "
                         f"'-{suffix}'.")
    tensile_text, usability = num[:-2], num[-2:]
    if not tensile_text.isdigit() or int(tensile_text) not in A5_1_TENSILES + A5_5_TENSILES[1:]:
        raise ValueError(f"{text}: the tensile digits must be 60, 70 (AWS A5.1) or 70, 80, 90, 100, 110, 120 "
                         f"with an alloy suffix (AWS A5.5), found '{tensile_text}'.")
    tensile = int(tensile_text)
    a5_1_key = f"E{num}{mil}"
    spec = SPEC_A5_1 if (suffix in (None, "1") and (not mil or a5_1_key in electrode_list.A5_1)) else SPEC_A5_5
    notes = []
    designators = []
    if spec == SPEC_A5_1:
        if tensile not in A5_1_TENSILES:
            raise ValueError(f"{text}: a covered electrode of {tensile} ksi is AWS A5.5 and needs its alloy suffix, "
                             f"e.g. E{tensile}18-C3 (known suffixes: {', '.join(A5_5_SUFFIXES)}).")
        row = electrode_list.A5_1.get(a5_1_key)
        if row is None:
            raise _a5_1_refusal(text, num)
        if suffix == "1":
            if not row.improved_toughness:
                raise ValueError(f"{text}: the -1 (improved toughness) suffix exists for "
                                 f"{', '.join('E70' + u for u in A5_1_IMPROVED_TOUGHNESS)} only "
                                 f"({electrode_list.PUBLISHED_A5_1}).")
            designators.append("-1")
            notes.append("-1: improved toughness")
        if mil:
            designators.append("M")
            notes.append(f"E7018M: DCEP only, {row.note}")
        positions, positions_note, fillet_only = POSITION_DIGITS[row.position_digit]
        currents, low_hydrogen, group, description = row.currents, row.low_hydrogen, row.group, row.covering
        if row.status != electrode_list.PUBLISHED_A5_1:
            notes.append(f"{a5_1_key}: {row.status}")
        if row.note and not mil:
            notes.append(f"{a5_1_key}: {row.note}")
        single_pass = row.single_pass
    else:
        if suffix == "1":
            raise ValueError(f"{text}: the -1 suffix belongs to AWS A5.1 "
                             f"{', '.join('E70' + u + '-1' for u in A5_1_IMPROVED_TOUGHNESS)} only.")
        alloy = suffix or mil
        if alloy not in A5_5_SUFFIXES:
            raise ValueError(f"{text}: '{alloy}' is not an AWS A5.5 alloy suffix (known, from memory: "
                             f"{', '.join(A5_5_SUFFIXES)}).")
        if tensile == 60:
            raise ValueError(f"{text}: AWS A5.5 starts at 70 ksi; a 60 ksi electrode is AWS A5.1 with no alloy "
                             "suffix (e.g. E6010).")
        key = f"E{num}-{suffix}" if suffix else f"E{num}{mil}"
        if key not in electrode_list.A5_5:
            raise _a5_5_refusal(text, key, num, alloy)
        if usability not in COVERINGS:
            raise ValueError(f"{text}: the last two digits '{usability}' are not an AWS A5.1/A5.5 covering "
                             f"designation (known: {', '.join(COVERINGS)}).")
        covering = COVERINGS[usability]
        positions, positions_note, fillet_only = POSITION_DIGITS[usability[0]]
        currents, low_hydrogen, group, description = (covering.currents, covering.low_hydrogen, covering.group,
                                                      covering.description)
        designators.append(f"-{alloy}" if suffix else mil)
        notes.append(f"AWS A5.5 classification list and strength levels: {electrode_list.A5_5_STATUS}")
        if covering.status != PUBLISHED:
            notes.append(f"covering and currents of EXX{usability}: {covering.status}")
        single_pass = False
    hydrogen = None
    if match["h"]:
        hydrogen = int(match["h"][1:])
        if hydrogen not in HYDROGEN_DESIGNATORS:
            raise ValueError(f"{text}: '{match['h']}' is not a diffusible hydrogen designator (known: H4, H8, H16).")
        designators.append(match["h"])
    if match["r"]:
        designators.append("R")
    if (hydrogen or match["r"]) and not low_hydrogen:
        raise ValueError(f"{text}: H and R designators apply to low-hydrogen electrodes only (EXX15, 16, 18, 28, 48), "
                         f"not to a {description} covering.")
    a5_1_military = bool(mil) and spec == SPEC_A5_1
    notes.append(f"electrode group {group} for welder qualification: from memory")
    base = f"E{num}{mil}" + (f"-{suffix}" if suffix else "")
    optional = (match["h"] or "") + (match["r"] or "")
    return Electrode(
        classification=base + (f" {optional}" if optional else ""),
        processes=frozenset({"SMAW"}),
        tensile_ksi=tensile,
        positions=positions,
        currents=currents,
        low_hydrogen=low_hydrogen,
        spec=spec,
        usability=description,
        usability_code=usability,
        group=group,
        positions_note=positions_note,
        horizontal_fillet_only=fillet_only,
        single_pass_only=single_pass,
        designators=tuple(designators),
        diffusible_hydrogen_ml=hydrogen or (4 if a5_1_military else None),
        moisture_resistant=bool(match["r"]),
        notes=tuple(notes),
    )


# --- AWS A5.18 solid and metal-cored wire (GMAW, GTAW) --------------------------------------------

A5_18_SOLID_TYPES = tuple(electrode_list.A5_18_SOLID)  # ER70S-X; status per row in procedures.electrode_list
A5_18_COMPOSITE_TYPES = tuple(electrode_list.A5_18_COMPOSITE)  # E70C-X
_A5_18_SOLID = re.compile(r"^ER(?P<t>[0-9A-Z]{2,3})S-?(?P<type>[0-9A-Z]+)$")
_A5_18_COMPOSITE = re.compile(r"^E(?P<t>[0-9A-Z]{2,3})C-?(?P<type>[0-9]|GS|G)(?P<gas>[A-Z])?(?P<h>H[0-9]+)?$")
_GMAW_POSITIONS_NOTE = ("positions depend on the transfer: spray and globular are flat and horizontal only, "
                        "short-circuiting and pulsed all positions (common practice, no source)")


def _decode_a5_18(text: str, compact: str) -> Electrode:
    solid = _A5_18_SOLID.match(compact)
    composite = None if solid else _A5_18_COMPOSITE.match(compact)
    match = solid or composite
    if not match:
        raise ValueError(f"{text}: not the shape of an AWS A5.18 classification; write it as ER70S-6 (solid wire) "
                         "or E70C-6M (metal cored).")
    if match["t"] != "70":
        raise ValueError(f"{text}: AWS A5.18 wire is 70 ksi, written ER70S-X or E70C-X, found '{match['t']}' "
                         "(low-alloy wire such as ER80S-D2 is AWS A5.28, not read here).")
    if solid:
        if match["type"] not in A5_18_SOLID_TYPES:
            raise ValueError(f"{text}: '{match['type']}' is not an AWS A5.18 solid wire type "
                             f"(known: {', '.join(A5_18_SOLID_TYPES)}).")
        notes = [] if match["type"] in ("2", "3", "6") else [f"ER70S-{match['type']}: from memory"]
        by_process = (("GMAW", frozenset({"DCEP"})), ("GTAW", frozenset({"DCEN"})))
        notes.append("currents: GMAW DCEP, GTAW DCEN (common practice, no source)")
        return Electrode(
            classification=f"ER70S-{match['type']}", processes=frozenset({"GMAW", "GTAW"}), tensile_ksi=70,
            positions=ALL_POSITIONS, currents=frozenset({"DCEP", "DCEN"}), low_hydrogen=True, spec=SPEC_A5_18,
            usability="solid wire", usability_code=match["type"], positions_note=_GMAW_POSITIONS_NOTE,
            designators=(f"-{match['type']}",), currents_by_process=by_process, notes=tuple(notes))
    if match["type"] not in A5_18_COMPOSITE_TYPES:
        raise ValueError(f"{text}: '{match['type']}' is not an AWS A5.18 metal-cored type "
                         f"(known: {', '.join(A5_18_COMPOSITE_TYPES)}).")
    gas = match["gas"]
    if gas not in (None, "C", "M"):
        raise ValueError(f"{text}: '{gas}' is not a shielding gas designator (C for CO2, M for argon mix).")
    row = electrode_list.A5_18_COMPOSITE[match["type"]]
    if gas not in row.gases:
        written = ", ".join(f"E70C-{match['type']}{g or ''}" for g in row.gases)
        raise ValueError(f"{text}: AWS A5.18 writes this metal-cored classification with its shielding gas "
                         f"designator: {written} exist (C for CO2, M for argon mix; {row.status}).")
    hydrogen = None
    if match["h"]:
        hydrogen = int(match["h"][1:])
        if hydrogen not in HYDROGEN_DESIGNATORS:
            raise ValueError(f"{text}: '{match['h']}' is not a diffusible hydrogen designator (known: H4, H8, H16).")
    notes = ["metal-cored current DCEP (from memory)"]
    if row.status != electrode_list.A5_18_COMPOSITE["6"].status or gas != "M":
        notes.append(f"E70C-{match['type']}{gas or ''}: {row.status}")
    if hydrogen:
        notes.append(electrode_list.A5_18_HYDROGEN_STATUS)
    classification = f"E70C-{match['type']}{gas or ''}" + (f" {match['h']}" if hydrogen else "")
    return Electrode(
        classification=classification, processes=frozenset({"GMAW"}), tensile_ksi=70,
        positions=ALL_POSITIONS, currents=frozenset({"DCEP"}), low_hydrogen=True, spec=SPEC_A5_18,
        usability="metal cored" + (", single pass only" if row.single_pass else ""), usability_code=match["type"],
        positions_note=_GMAW_POSITIONS_NOTE, shielding=gas, single_pass_only=row.single_pass,
        designators=(f"-{match['type']}",) + ((gas,) if gas else ()) + ((match["h"],) if hydrogen else ()),
        diffusible_hydrogen_ml=hydrogen, notes=tuple(notes))


# --- AWS A5.20 flux-cored electrodes (FCAW) -------------------------------------------------------

@dataclass(frozen=True)
class FluxCoredType:
    shielding: str  # "gas", "self" or "either"
    currents: frozenset
    single_pass: bool


_DCEP = frozenset({"DCEP"})
_DCEN = frozenset({"DCEN"})
# AWS A5.20 usability types (all rows from memory): external shielding gas, polarity, single-pass only.
FLUX_CORED_TYPES = {
    "1": FluxCoredType("gas", _DCEP, False), "2": FluxCoredType("gas", _DCEP, True),
    "3": FluxCoredType("self", _DCEP, True), "4": FluxCoredType("self", _DCEP, False),
    "5": FluxCoredType("gas", _DCEP, False), "6": FluxCoredType("self", _DCEP, False),
    "7": FluxCoredType("self", _DCEN, False), "8": FluxCoredType("self", _DCEN, False),
    "9": FluxCoredType("gas", _DCEP, False), "10": FluxCoredType("self", _DCEN, True),
    "11": FluxCoredType("self", _DCEN, False), "12": FluxCoredType("gas", _DCEP, False),
    "13": FluxCoredType("self", _DCEN, True), "14": FluxCoredType("self", _DCEN, True),
    "G": FluxCoredType("either", frozenset({"DCEP", "DCEN"}), False),
    "GS": FluxCoredType("either", frozenset({"DCEP", "DCEN"}), True),
}
_A5_20 = re.compile(r"^E(?P<t>[0-9A-Z])(?P<p>[0-9A-Z])T-?(?P<type>[0-9]{1,2}|GS|G)(?P<gas>[A-Z])?"
                    r"(?P<j>-?J)?(?P<h>H[0-9]+)?$")


def _decode_a5_20(text: str, compact: str) -> Electrode:
    match = _A5_20.match(compact)
    if not match:
        raise ValueError(f"{text}: not the shape of an AWS A5.20 classification; write it as E71T-1C, E70T-4 or "
                         "E71T-8 (the A5.36 form E71T1-C1A0-CS1 is not read here).")
    if match["t"] not in ("6", "7"):
        raise ValueError(f"{text}: the tensile digit of AWS A5.20 must be 6 (60 ksi) or 7 (70 ksi), "
                         f"found '{match['t']}'.")
    if match["p"] not in ("0", "1"):
        raise ValueError(f"{text}: the position digit of AWS A5.20 must be 0 (flat and horizontal) or 1 "
                         f"(all positions), found '{match['p']}'.")
    kind = match["type"]
    if kind not in FLUX_CORED_TYPES:
        raise ValueError(f"{text}: 'T-{kind}' is not an AWS A5.20 usability type (known: "
                         f"{', '.join('T-' + k for k in FLUX_CORED_TYPES)}).")
    usability = FLUX_CORED_TYPES[kind]
    if match["p"] not in electrode_list.A5_20_POSITION_DIGITS[kind]:
        listed = ", ".join(f"E{match['t']}{p}T-{kind}" for p in electrode_list.A5_20_POSITION_DIGITS[kind])
        raise ValueError(f"{text}: AWS A5.20 lists T-{kind} as {listed} only, not with position digit "
                         f"'{match['p']}' ({electrode_list.A5_20_STATUS}).")
    gas = match["gas"]
    if gas not in (None, "C", "M"):
        raise ValueError(f"{text}: '{gas}' is not a shielding gas designator (C for CO2, M for argon mix).")
    if gas and usability.shielding == "self":
        raise ValueError(f"{text}: T-{kind} is self-shielded; it takes no shielding gas designator ({gas}).")
    hydrogen = None
    if match["h"]:
        hydrogen = int(match["h"][1:])
        if hydrogen not in HYDROGEN_DESIGNATORS:
            raise ValueError(f"{text}: '{match['h']}' is not a diffusible hydrogen designator (known: H4, H8, H16).")
    all_position = match["p"] == "1"
    notes = ["usability type (shielding, polarity, single pass) from memory"]
    if not (all_position and kind == "1"):
        notes.append("position digit 0 = flat and horizontal, 1 = all positions: from memory "
                     "(E71T-1 all-position is published)")
    if usability.shielding == "gas" and not gas:
        notes.append("shielding gas not designated: AWS A5.20:2005 writes C (CO2) or M (argon mix)")
    designators = tuple(d for d in (f"-{kind}", gas, "J" if match["j"] else None, match["h"]) if d)
    optional = ("-J" if match["j"] else "") + (match["h"] or "")
    return Electrode(
        classification=f"E{match['t']}{match['p']}T-{kind}{gas or ''}{optional}",
        processes=frozenset({"FCAW"}),
        tensile_ksi=int(match["t"]) * 10,
        positions=ALL_POSITIONS if all_position else FLAT_AND_HORIZONTAL,
        currents=usability.currents,
        low_hydrogen=True,  # AWS D1.1:2020 Table 5.8: FCAW is Category B with low-hydrogen SMAW
        spec=SPEC_A5_20,
        usability={"gas": "gas shielded", "self": "self-shielded", "either": "shielding not specified"}[
            usability.shielding] + (", single pass only" if usability.single_pass else ""),
        usability_code=kind,
        positions_note="all positions" if all_position else "flat and horizontal",
        shielding=gas,
        self_shielded=usability.shielding == "self",
        single_pass_only=usability.single_pass,
        designators=designators,
        diffusible_hydrogen_ml=hydrogen,
        notes=tuple(notes),
    )


# --- AWS A5.17 SAW flux-wire classification -------------------------------------------------------

SAW_TENSILE = {"6": (60, 80), "7": (70, 95)}  # ksi range; F7: 70-95 published, F6: 60-80 from memory
SAW_CONDITION = {"A": "as-welded", "P": "post-weld heat treated"}  # published scheme
SAW_IMPACT_F = {"Z": None, "0": 0, "2": -20, "4": -40, "5": -50, "6": -60, "8": -80}  # 2 = -20 F published
SAW_WIRES = ("EL8", "EL8K", "EL12", "EM11K", "EM12", "EM12K", "EM13K", "EM14K", "EM15K",
             "EH10K", "EH11K", "EH12K", "EH14", "EC1", "ECG")  # EM12K published; the rest from memory
_A5_17 = re.compile(r"^F(?P<t>[0-9A-Z])(?P<c>[A-Z])(?P<i>[0-9A-Z])-?(?P<rest>E[0-9A-Z]*)$")
_SAW_WIRE = re.compile(rf"^(?P<wire>{'|'.join(sorted(SAW_WIRES, key=len, reverse=True))})(?P<h>H[0-9]+)?$")


def _decode_a5_17(text: str, compact: str) -> Electrode:
    match = _A5_17.match(compact)
    if not match:
        raise ValueError(f"{text}: not the shape of an AWS A5.17 flux-wire classification; write it as "
                         "F7A2-EM12K.")
    if match["t"] not in SAW_TENSILE:
        raise ValueError(f"{text}: the tensile digit of AWS A5.17 must be 6 (60-80 ksi) or 7 (70-95 ksi), found "
                         f"'{match['t']}' (low-alloy SAW such as F8A2-EA2-A2 is AWS A5.23, not read here).")
    if match["c"] not in SAW_CONDITION:
        raise ValueError(f"{text}: the heat-treatment letter must be A (as-welded) or P (post-weld heat treated), "
                         f"found '{match['c']}'.")
    if match["i"] not in SAW_IMPACT_F:
        raise ValueError(f"{text}: '{match['i']}' is not an AWS A5.17 impact digit (known: "
                         f"{', '.join(SAW_IMPACT_F)}; Z = no impact requirement).")
    wire_match = _SAW_WIRE.match(match["rest"])
    if not wire_match:
        raise ValueError(f"{text}: '{match['rest']}' is not an AWS A5.17 electrode wire (known, from memory: "
                         f"{', '.join(SAW_WIRES)}), optionally followed by H4, H8 or H16.")
    wire, hydrogen = wire_match["wire"], wire_match["h"]
    if hydrogen and int(hydrogen[1:]) not in HYDROGEN_DESIGNATORS:
        raise ValueError(f"{text}: '{hydrogen}' is not a diffusible hydrogen designator (known: H4, H8, H16).")
    low, high = SAW_TENSILE[match["t"]]
    impact = SAW_IMPACT_F[match["i"]]
    notes = ["SAW currents AC, DCEP, DCEN (common practice, no source)"]
    if match["t"] == "6":
        notes.append("F6 tensile range 60-80 ksi: from memory")
    if match["i"] not in ("2",):
        notes.append(f"impact digit {match['i']}: from memory")
    if wire != "EM12K":
        notes.append(f"wire {wire}: from memory")
    return Electrode(
        classification=f"F{match['t']}{match['c']}{match['i']}-{wire}{hydrogen or ''}",
        processes=frozenset({"SAW"}),
        tensile_ksi=low,
        positions=FLAT_AND_HORIZONTAL,
        currents=_ALL_CURRENTS,
        low_hydrogen=True,  # AWS D1.1:2020 Table 5.8: SAW is Category B with low-hydrogen SMAW
        spec=SPEC_A5_17,
        usability="flux-wire combination",
        usability_code=wire,
        positions_note="flat, and horizontal fillets (AWS D1.1:2020 Table 5.1 lists SAW in F and H only)",
        horizontal_fillet_only=True,
        designators=(hydrogen,) if hydrogen else (),
        diffusible_hydrogen_ml=int(hydrogen[1:]) if hydrogen else None,
        tensile_ksi_max=high,
        heat_treatment=SAW_CONDITION[match["c"]],
        impact_test_f=impact,
        wire=wire,
        notes=tuple(notes),
    )


# --- entry points ---------------------------------------------------------------------------------

MAX_CLASSIFICATION_CHARS = 30


def _normalise(text) -> str:
    if not isinstance(text, str):
        raise ValueError(f"A filler metal classification must be text such as E7018 or ER70S-6, not "
                         f"{type(text).__name__}.")
    text = unicodedata.normalize("NFKC", text).replace("\u2013", "-").replace("\u2212", "-").replace("\u2010", "-")
    text = " ".join(text.split()).upper()
    if not text:
        raise ValueError("Enter a filler metal classification, for example E7018, ER70S-6, E71T-1C or F7A2-EM12K.")
    if len(text) > MAX_CLASSIFICATION_CHARS:
        raise ValueError(f"'{text[:MAX_CLASSIFICATION_CHARS]}...' is too long to be a filler metal classification.")
    return text


def decode(text) -> Electrode:
    """Read an AWS A5.1, A5.5, A5.17, A5.18 or A5.20 classification; ValueError names the part that is wrong."""
    return _decode(_normalise(text))


@lru_cache(maxsize=512)
def _decode(text: str) -> Electrode:
    compact = text.replace(" ", "")
    if compact.startswith("F"):
        return _decode_a5_17(text, compact)
    if compact.startswith("ER") or re.match(r"^E[0-9A-Z]{2,3}C", compact):
        return _decode_a5_18(text, compact)
    if re.match(r"^E[0-9A-Z]{2}T", compact):
        return _decode_a5_20(text, compact)
    if compact.startswith("E"):
        return _decode_covered(text, compact)
    if compact[:1].isdigit():
        raise ValueError(f"{text}: a classification starts with E (electrode), ER (electrode or rod) or F (SAW "
                         f"flux); did you mean E{compact}?")
    raise ValueError(f"'{text}' is not a filler metal classification: write it as E7018 (AWS A5.1), E8018-C3 "
                     "(A5.5), ER70S-6 or E70C-6M (A5.18), E71T-1C (A5.20) or F7A2-EM12K (A5.17).")


def group_of(classification) -> str:
    """The SMAW electrode group (F1..F4) for welder qualification, AWS D1.1:2020 clause 6 (from memory)."""
    electrode = classification if isinstance(classification, Electrode) else decode(classification)
    if electrode.group is None:
        raise ValueError(f"{electrode.classification}: electrode groups F1..F4 apply to SMAW covered electrodes "
                         f"only; this is {electrode.spec} for {', '.join(sorted(electrode.processes))}.")
    return electrode.group


def groups_qualified(group: str) -> frozenset:
    """Groups a welder tested with `group` may use: F4 qualifies F4..F1 (AWS D1.1:2020 clause 6, from memory)."""
    if not isinstance(group, str) or group.strip().upper() not in GROUPS_QUALIFIED:
        raise ValueError(f"{group!r} is not an SMAW electrode group: use F1, F2, F3 or F4.")
    return GROUPS_QUALIFIED[group.strip().upper()]
