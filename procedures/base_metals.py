"""Base metals of prequalified WPSs, AWS D1.1/D1.1M:2020 clause 5, entered as data.

Plain Python, no Django. Three tables, each row with its source and status:

- BASE_METAL_ROWS: the approved base metals for prequalified WPSs by group (AWS D1.1/D1.1M:2020 Table 5.3) with
  the preheat category each takes with low-hydrogen processes (Table 5.8), and the steels the code approves only
  with WPS qualification by test (A514, A517, ...: never prequalified). A base metal not in this table cannot be
  prequalified here. The table is partial: the common structural steels only; a steel the code lists but this
  table does not is refused as "not in the table as entered", never passed.
- MATCHING_FILLER: the matching filler metal for each group (the table beside Table 5.3; table number from
  memory).
- PREHEAT_MIN with PREHEAT_BANDS: minimum preheat and interpass temperature by category and thickest part (Table
  5.8), US and SI figures as printed.

Status words: "published (where)" = seen in public material quoting the standard (the edition named, which may be
D1.1:2015, where these tables were Tables 3.1 and 3.3: the 2020 edition carrying the same row is then from
memory); "from memory" = recalled, not seen.

Group I steels are the steels of Table 5.8 Category A: only they may be welded with SMAW electrodes other than low
hydrogen. Every other group needs a low-hydrogen process, so its category is the low-hydrogen one (B, C, or D).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from core.units import Length, parse_length

SOURCE_TABLE_5_3 = "AWS D1.1/D1.1M:2020 Table 5.3, approved base metals for prequalified WPSs by group"
SOURCE_TABLE_5_8 = "AWS D1.1/D1.1M:2020 Table 5.8, prequalified minimum preheat and interpass temperature"
SOURCE_MATCHING = ("AWS D1.1/D1.1M:2020 clause 5, matching filler metals by base metal group (the table beside "
                   "Table 5.3; table number and rows from memory)")
SOURCE_TEST_ONLY = ("AWS D1.1/D1.1M:2020 clause 6, code-approved base metals that require WPS qualification by "
                    "test (table number from memory)")

# Status of the rows, as seen (or not) in public material.
PUB_2015_CAT = ("published for D1.1/D1.1M:2015 Table 3.3 (public copies); 2020 Table 5.8 and the group from "
                "memory")
PUB_OLD_CAT = ("category published in an older edition's preheat table (a filler maker's D1.1 summary); 2020 "
               "Table 5.8 and the group from memory")
MEMORY = "from memory"
PUB_DOMAIN = "published (shared domain reference)"


@dataclass(frozen=True)
class Limit:
    """A limit as the standard prints it in both systems (the SI figure is not a conversion of the US one)."""

    us: Length
    si: Length

    def in_system(self, system: str) -> Length:
        return self.si if system == "SI" else self.us


def limit(us: str, si: str) -> Limit:
    return Limit(parse_length(us), parse_length(si))


# A36 and A709 Gr 36 are Group I up to 3/4 in [20 mm] and Group II over it (published: shared domain reference;
# the 20 mm figure published with A709 Gr 36 in a filler maker's D1.1 summary).
GROUP_I_MAX_36 = limit("3/4 in", "20 mm")

GROUPS = ("I", "II", "III", "IV")


@dataclass(frozen=True)
class BaseMetal:
    """One row: a specification and grade, its Table 5.3 group and its Table 5.8 low-hydrogen category."""

    name: str  # as printed on findings: "ASTM A572 Gr 60"
    group: str | None  # "I".."IV"; None: approved only with WPS qualification by test
    category: str | None  # Table 5.8 with low-hydrogen processes: "B" or "C"; None when not prequalified
    status: str
    group_ii_over: Limit | None = None  # A36, A709 Gr 36: Group II over this thickness
    category_d: bool = False  # A913: Category D with low-hydrogen filler metal of H8 or less (from memory)
    note: str = ""

    def group_for(self, thickness: Length | None, system: str = "US") -> str | None:
        """The group at the thickest part; without a thickness A36 counts as Group I (the usual case)."""
        if self.group_ii_over is not None and thickness is not None and thickness > self.group_ii_over.in_system(
                system):
            return "II"
        return self.group


def _rows(spec: str, grades, group, category, status, **extra):
    """Rows for each grade of a specification; grades () = the specification has no grade in the table."""
    for grade in grades or (None,):
        name = f"ASTM {spec}" + (f" Gr {grade}" if grade else "")
        yield BaseMetal(name, group, category, status, **extra)


BASE_METAL_ROWS: tuple[BaseMetal, ...] = (
    # --- Group I (Table 5.8 Category A with non-low-hydrogen SMAW, B otherwise) -----------------------------
    *_rows("A36", (), "I", "B", PUB_DOMAIN + "; categories " + PUB_2015_CAT, group_ii_over=GROUP_I_MAX_36),
    *_rows("A53", ("B",), "I", "B", PUB_2015_CAT),
    *_rows("A106", ("B",), "I", "B", PUB_2015_CAT),
    *_rows("A139", ("B",), "I", "B", PUB_2015_CAT),
    *_rows("A500", ("A", "B", "C"), "I", "B", PUB_2015_CAT,
           note="A500 Gr C listed with the Category A steels in the 2015 table (so Group I)"),
    *_rows("A501", ("A",), "I", "B", PUB_2015_CAT),
    *_rows("A516", ("55", "60"), "I", "B", PUB_2015_CAT),
    *_rows("A524", ("I", "II"), "I", "B", PUB_2015_CAT),
    *_rows("A573", ("65",), "I", "B", PUB_2015_CAT),
    *_rows("A709", ("36",), "I", "B", PUB_2015_CAT, group_ii_over=GROUP_I_MAX_36),
    # --- Group II (Category B) ----------------------------------------------------------------------------
    *_rows("A501", ("B",), "II", "B", PUB_2015_CAT),
    *_rows("A516", ("65", "70"), "II", "B", PUB_2015_CAT),
    *_rows("A529", ("50", "55"), "II", "B", PUB_2015_CAT),
    *_rows("A572", ("42", "50", "55"), "II", "B", PUB_2015_CAT),
    *_rows("A588", (), "II", "B", PUB_2015_CAT, note="4 in [100 mm] and under (older preheat table; from memory "
                                                     "for 2020)"),
    *_rows("A595", ("A", "B", "C"), "II", "B", PUB_OLD_CAT),
    *_rows("A606", (), "II", "B", PUB_OLD_CAT),
    *_rows("A618", ("Ib", "II", "III"), "II", "B", PUB_OLD_CAT),
    *_rows("A633", ("A", "B", "C", "D"), "II", "B", PUB_OLD_CAT),
    *_rows("A709", ("50", "50W"), "II", "B", PUB_OLD_CAT),
    *_rows("A709", ("50S", "HPS 50W"), "II", "B", MEMORY),
    *_rows("A808", (), "II", "B", PUB_OLD_CAT),
    *_rows("A913", ("50",), "II", "B", PUB_OLD_CAT, category_d=True),
    *_rows("A992", (), "II", "B", PUB_OLD_CAT),
    *_rows("A1085", (), "II", "B", MEMORY, note="hollow structural sections; row from memory"),
    # --- Group III (Category C) ---------------------------------------------------------------------------
    *_rows("A572", ("60", "65"), "III", "C", PUB_OLD_CAT),
    *_rows("A913", ("60", "65"), "III", "C", PUB_OLD_CAT, category_d=True),
    *_rows("A633", ("E",), "III", "C", PUB_OLD_CAT),
    # --- Group IV (Category C): from memory, low confidence -------------------------------------------------
    *_rows("A709", ("HPS 70W",), "IV", "C", "category C published in an older edition's preheat table (as "
                                            "A709 Gr 70W); Group IV from memory, low confidence"),
    *_rows("A852", (), "IV", "C", "category C published in an older edition's preheat table; Group IV from "
                                  "memory, low confidence"),
    # --- approved only with WPS qualification by test: never prequalified (from memory) ----------------------
    *_rows("A514", (), None, None, MEMORY, note="quenched and tempered, over 90 ksi yield"),
    *_rows("A517", (), None, None, MEMORY, note="quenched and tempered, over 90 ksi yield"),
    *_rows("A709", ("100", "100W", "HPS 100W"), None, None, MEMORY, note="quenched and tempered, 100 ksi yield"),
)

# ASTM specifications whose rows need a grade to be read (A572 Gr 50 and Gr 65 differ in group and category).
_SPECS_WITH_GRADES = {"A53", "A106", "A139", "A500", "A501", "A516", "A524", "A529", "A572", "A573", "A595", "A618",
                      "A633", "A709", "A913"}


def _key(name: str) -> str:
    return re.sub(r"[\s.\-]", "", name.upper().removeprefix("ASTM ").replace(" GR ", "GR"))


BASE_METALS: dict[str, BaseMetal] = {_key(row.name): row for row in BASE_METAL_ROWS}
assert len(BASE_METALS) == len(BASE_METAL_ROWS), "a base metal row is entered twice"
_SPECS = sorted({re.match(r"A[0-9]+", key)[0] for key in BASE_METALS}, key=len, reverse=True)


def base_metal_key(name: str) -> str:
    """'ASTM A572 Grade 50', 'A572-50', 'a572 gr. 50', 'ASTM A572/A572M Gr 50' -> 'A572GR50'; 'ASTM A36/A36M' ->
    'A36'; 'A500 Grade C' -> 'A500GRC'. A name that is no ASTM specification comes back compacted."""
    if not isinstance(name, str):
        raise ValueError(f"A base metal must be text such as 'ASTM A572 Gr 50', not {type(name).__name__}.")
    text = name.upper().replace("GRADE", "GR").replace("CLASS", "CL")
    text = re.sub(r"^\s*ASTM\s*", "", text)
    text = re.sub(r"/\s*A?[0-9]+M\b", "", text)  # the metric designation A572/A572M
    compact = re.sub(r"[\s.\-]", "", text)
    for spec in _SPECS:  # longest first: A1085 before A108, A500 before A50
        if compact.startswith(spec):
            rest = compact[len(spec):].removeprefix("GR")
            return spec + (f"GR{rest}" if rest else "")
    return compact


def lookup(name: str) -> BaseMetal | None:
    """The row for a base metal, or None when the table as entered here does not list it."""
    return BASE_METALS.get(base_metal_key(name))


def grades_of(name: str) -> tuple[str, ...]:
    """The grades entered for the specification a name gives without its grade ('ASTM A572' -> 50, 55, ...);
    () when the specification needs no grade or is not in the table."""
    key = base_metal_key(name)
    if key not in _SPECS_WITH_GRADES:
        return ()
    return tuple(row.name.split(" Gr ", 1)[1] for k, row in BASE_METALS.items()
                 if re.match(r"A[0-9]+", k)[0] == key and " Gr " in row.name)


# --- matching filler metal by group (from memory) -------------------------------------------------------------

@dataclass(frozen=True)
class Matching:
    tensile_ksi: int  # the filler's minimum tensile strength that matches the group
    smaw_low_hydrogen: tuple[str, ...] | None  # SMAW coverings allowed; None = any A5.1 / A5.5 covering
    overmatch_above_ksi: int  # stronger than this is overmatching (a warning for the engineer)
    text: str


MATCHING_FILLER = {
    "I": Matching(60, None, 70, "E60XX or E70XX (SMAW); ER70S-X; E7XT-X; F6XX or F7XX-EXXX"),
    "II": Matching(70, ("15", "16", "18", "28"), 70,
                   "low-hydrogen E7015, E7016, E7018, E7028 or A5.5 E70XX-X (SMAW); ER70S-X; E7XT-X; F7XX-EXXX"),
    "III": Matching(80, ("15", "16", "18"), 80,
                    "low-hydrogen A5.5 E8015-X, E8016-X, E8018-X (SMAW); A5.28 ER80S-X; A5.29 E8XTX-X; A5.23 F8XX"),
    "IV": Matching(90, ("15", "16", "18"), 90,
                   "low-hydrogen A5.5 E9015-X, E9016-X, E9018-X, E9018M (SMAW); A5.28 ER90S-X; A5.29 E9XTX-X; "
                   "A5.23 F9XX"),
}


# --- Table 5.8: minimum preheat and interpass temperature --------------------------------------------------------

# Upper bound of each thickness band of the thickest part (inclusive); None = no upper bound. US "1/8 to 3/4 incl.,
# over 3/4 thru 1-1/2 incl., over 1-1/2 thru 2-1/2 incl., over 2-1/2"; SI "3 to 20, over 20 thru 38, over 38 thru
# 65, over 65" (both published for D1.1/D1.1M:2015 Table 3.3; 2020 Table 5.8 the same, from memory).
PREHEAT_BANDS = (limit("3/4 in", "20 mm"), limit("1-1/2 in", "38 mm"), limit("2-1/2 in", "65 mm"), None)
BAND_NAMES = {"US": ("up to 3/4 in", "over 3/4 in to 1-1/2 in", "over 1-1/2 in to 2-1/2 in", "over 2-1/2 in"),
              "SI": ("up to 20 mm", "over 20 mm to 38 mm", "over 38 mm to 65 mm", "over 65 mm")}


@dataclass(frozen=True)
class Category:
    minimum: tuple[tuple[int, int], ...]  # (F, C) per band, as printed
    processes: str
    status: str


PREHEAT_MIN = {
    "A": Category(((32, 0), (150, 65), (225, 110), (300, 150)), "SMAW with other than low-hydrogen electrodes",
                  "published (D1.1/D1.1M:2015 Table 3.3, US and SI)"),
    "B": Category(((32, 0), (50, 10), (150, 65), (225, 110)),
                  "SMAW with low-hydrogen electrodes, SAW, GMAW, FCAW", "published (D1.1/D1.1M:2015 Table 3.3, US "
                                                                        "and SI)"),
    "C": Category(((50, 10), (150, 65), (225, 110), (300, 150)),
                  "SMAW with low-hydrogen electrodes, SAW, GMAW, FCAW",
                  "US published (an older edition's preheat table); SI from memory"),
    "D": Category(((32, 0), (32, 0), (32, 0), (32, 0)),
                  "A913 with SMAW, SAW, GMAW, FCAW filler of H8 or less diffusible hydrogen",
                  "32 F for all thicknesses published (an older edition's preheat table); the H8 condition and the "
                  "SI figure from memory"),
}
# Order of severity: every band of a later category needs at least the preheat of an earlier one.
CATEGORY_ORDER = ("D", "B", "A", "C")
CATEGORY_D_MAX_HYDROGEN_ML = 8  # H8 (from memory)
