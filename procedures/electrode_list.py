"""The filler-metal classifications that exist, one table per AWS A5.x specification, as data.

Plain Python, no Django. procedures.electrodes decodes a classification's parts; these tables say which
classifications the specifications actually list, so a well-formed code that no specification lists (E7010 in
A5.1, E6024, E70C-6 without its gas designator) is refused with the near ones that do exist, and one that does
exist (E6019, E6022, E12018M1, E9018-B91, E70C-6M H4, E70C-GS) is read. Each row carries its status: "published
(where)" when seen in public material quoting the specification, otherwise "from memory".
"""

from __future__ import annotations

from dataclasses import dataclass

PUBLISHED_A5_1 = ("published (A5.1 classification tables in two filler makers' public guides: ESAB's A5.1 summary, "
                  "Elga's 2013 catalogue guide to A5.1)")
FROM_MEMORY = "from memory"

_AC_DCEP = frozenset({"AC", "DCEP"})
_ALL = frozenset({"AC", "DCEP", "DCEN"})
_DCEP = frozenset({"DCEP"})
_AC_DCEN = frozenset({"AC", "DCEN"})


# --- AWS A5.1: carbon steel covered electrodes (SMAW) -------------------------------------------------------------

@dataclass(frozen=True)
class A51Row:
    """One AWS A5.1 classification with its usability."""

    position_digit: str  # "1" all positions; "2" flat and horizontal fillets; "4" F, H, OH, vertical down
    currents: frozenset
    low_hydrogen: bool
    covering: str
    group: str  # SMAW electrode group F1..F4 for welder qualification, AWS D1.1:2020 clause 6 (from memory)
    status: str
    single_pass: bool = False
    improved_toughness: bool = False  # a -1 designator exists (E7016-1, E7018-1, E7024-1)
    note: str = ""


A5_1: dict[str, A51Row] = {
    "E6010": A51Row("1", _DCEP, False, "high cellulose sodium", "F3", PUBLISHED_A5_1),
    "E6011": A51Row("1", _AC_DCEP, False, "high cellulose potassium", "F3", PUBLISHED_A5_1),
    "E6012": A51Row("1", _AC_DCEN, False, "high titania sodium", "F2", PUBLISHED_A5_1),
    "E6013": A51Row("1", _ALL, False, "high titania potassium", "F2", PUBLISHED_A5_1),
    "E6018": A51Row("1", _AC_DCEP, True, "low hydrogen potassium, iron powder", "F4",
                    "from memory, low confidence (A5.1/A5.1M:2004 as remembered; the public guides consulted "
                    "do not list it)"),
    "E6019": A51Row("1", _ALL, False, "iron oxide titania potassium", "F2",
                    PUBLISHED_A5_1 + "; group F2 from memory"),
    "E6020": A51Row("2", _ALL, False, "high iron oxide", "F1", PUBLISHED_A5_1,
                    note="horizontal fillets AC or DCEN; flat AC, DCEP or DCEN"),
    "E6022": A51Row("2", _AC_DCEN, False, "high iron oxide", "F1",
                    PUBLISHED_A5_1 + " (one guide lists AC or DCEN, the other also DCEP: AC or DCEN entered); group "
                                     "F1 from memory, low confidence", single_pass=True),
    "E6027": A51Row("2", _ALL, False, "high iron oxide, iron powder", "F1", PUBLISHED_A5_1,
                    note="horizontal fillets AC or DCEN; flat AC, DCEP or DCEN"),
    "E7014": A51Row("1", _ALL, False, "iron powder, titania", "F2", PUBLISHED_A5_1),
    "E7015": A51Row("1", _DCEP, True, "low hydrogen sodium", "F4", PUBLISHED_A5_1),
    "E7016": A51Row("1", _AC_DCEP, True, "low hydrogen potassium", "F4", PUBLISHED_A5_1, improved_toughness=True),
    "E7018": A51Row("1", _AC_DCEP, True, "low hydrogen potassium, iron powder", "F4", PUBLISHED_A5_1,
                    improved_toughness=True),
    "E7018M": A51Row("1", _DCEP, True, "low hydrogen, iron powder (military)", "F4", PUBLISHED_A5_1,
                     note="4 mL diffusible hydrogen or less (from memory)"),
    "E7024": A51Row("2", _ALL, False, "iron powder, titania", "F1", PUBLISHED_A5_1, improved_toughness=True),
    "E7027": A51Row("2", _ALL, False, "high iron oxide, iron powder", "F1", PUBLISHED_A5_1,
                    note="horizontal fillets AC or DCEN; flat AC, DCEP or DCEN"),
    "E7028": A51Row("2", _AC_DCEP, True, "low hydrogen potassium, iron powder", "F1", PUBLISHED_A5_1),
    "E7048": A51Row("4", _AC_DCEP, True, "low hydrogen potassium, iron powder", "F4", PUBLISHED_A5_1),
}


# --- AWS A5.5: low-alloy steel covered electrodes (SMAW), all from memory -----------------------------------------

def _family(suffix: str, *numbers: str) -> dict[str, str]:
    return {f"E{number}-{suffix}": suffix for number in numbers}


# Classification -> alloy suffix. A5.5 uses the A5.1 position and covering digits for usability (the covering
# table in procedures.electrodes, with EXX45 added: low hydrogen sodium, vertical down).
A5_5: dict[str, str] = {
    **_family("A1", "7010", "7011", "7015", "7016", "7018", "7020", "7027"),
    **_family("B1", "8016", "8018"),
    **_family("B2", "8015", "8016", "8018"),
    **_family("B2L", "7015", "7016", "7018", "8015", "8018"),
    **_family("B3", "9015", "9016", "9018"),
    **_family("B3L", "8015", "8018", "9015", "9018"),
    **_family("B4L", "8015"),
    **_family("B5", "8016"),
    **_family("B6", "8015", "8016", "8018"),
    **_family("B6L", "8015", "8016", "8018"),
    **_family("B8", "8015", "8016", "8018"),
    **_family("B8L", "8015", "8016", "8018"),
    **_family("B9", "9015", "9016", "9018"),  # the name before A5.5/A5.5M:2014
    **_family("B91", "9015", "9016", "9018"),  # A5.5/A5.5M:2014 name
    **_family("B92", "9015", "9016", "9018"),
    **_family("C1", "8016", "8018"),
    **_family("C1L", "7015", "7016", "7018"),
    **_family("C2", "8016", "8018"),
    **_family("C2L", "7015", "7016", "7018"),
    **_family("C3", "8016", "8018"),
    **_family("C3L", "7018", "8016", "8018"),
    **_family("C4", "8016", "8018"),
    **_family("C5L", "7015", "7016", "7018"),
    **_family("NM1", "8016", "8018"),
    **_family("D1", "8018", "9015", "9018"),
    **_family("D2", "9015", "9016", "9018", "10015", "10016", "10018"),
    **_family("D3", "8016", "8018", "9018"),
    **_family("P1", "7010", "8010", "9010"),
    **_family("P2", "8018", "9018", "8045", "9045", "10045"),
    **_family("W1", "7018"),
    **_family("W2", "8018"),
    **_family("G", *(f"{t}{c}" for t in ("70", "80", "90", "100", "110", "120")
                     for c in ("10", "11", "13", "15", "16", "18", "20", "27", "45"))),
    # military: written without a hyphen since A5.5-96 (E9018M); the hyphenated E9018-M is the older spelling
    **{f"E{n}M": "M" for n in ("9018", "10018", "11018", "12018")},
    **{f"E{n}-M": "M" for n in ("9018", "10018", "11018", "12018")},
    "E12018M1": "M1",
    **_family("M1", "12018"),
}
A5_5_STATUS = FROM_MEMORY


# --- AWS A5.18: carbon steel wire and rods for gas shielded arc welding (GMAW, GTAW) ------------------------------

# Solid wire ER70S-X: type -> status.
A5_18_SOLID = {"2": "published (shared domain reference)", "3": "published (shared domain reference)",
               "4": FROM_MEMORY, "6": "published (shared domain reference)", "7": FROM_MEMORY, "G": FROM_MEMORY}


@dataclass(frozen=True)
class CompositeRow:
    gases: tuple[str | None, ...]  # shielding gas designators the classification is written with; None = none
    single_pass: bool
    status: str


# Metal-cored E70C-X: -3 and -6 carry C (CO2) or M (argon mix); -G and -GS may carry either or none.
A5_18_COMPOSITE = {
    "3": CompositeRow(("C", "M"), False, FROM_MEMORY),
    "6": CompositeRow(("C", "M"), False, "E70C-6M published (shared domain reference); E70C-6C from memory"),
    "G": CompositeRow((None, "C", "M"), False, FROM_MEMORY),
    "GS": CompositeRow((None, "C", "M"), True, FROM_MEMORY),
}
A5_18_HYDROGEN_STATUS = "optional H4, H8, H16 designators after the classification (from memory)"


# --- AWS A5.20: carbon steel flux-cored electrodes (FCAW) ----------------------------------------------------------

# Usability type -> position digits the specification lists it with (0: flat and horizontal; 1: all positions).
# From memory; E71T-1 published (shared domain reference).
A5_20_POSITION_DIGITS = {
    "1": ("0", "1"), "2": ("0", "1"), "3": ("0",), "4": ("0",), "5": ("0", "1"), "6": ("0",), "7": ("0", "1"),
    "8": ("0", "1"), "9": ("0", "1"), "10": ("0",), "11": ("0", "1"), "12": ("0", "1"), "13": ("1",),
    "14": ("1",), "G": ("0", "1"), "GS": ("0", "1"),
}
A5_20_STATUS = "from memory (E71T-1 published, shared domain reference)"


def near(candidates, text: str, limit: int = 6) -> list[str]:
    """Classifications that share the most characters in place with text, best first (for messages)."""
    def score(other: str) -> tuple[int, int]:
        same = sum(a == b for a, b in zip(other, text, strict=False))
        return (-same, abs(len(other) - len(text)))
    return sorted(candidates, key=score)[:limit]
