"""ISO 5817:2014 quality levels B, C and D for fillet welds, material thicker than 3 mm (visible imperfections).

Imperfections are named by their ISO 6520-1 reference number. ISO prints SI values only, so a US job is judged
in millimetres (its inch inputs are converted exactly). Each value names its source and status: "from memory"
values were recalled, not read in a document. The 2023 edition exists; its values were not checked, so the sets
stay pinned to 2014 until someone with the document confirms them (add iso_5817_2023.py beside this one).

Public material seen while entering these values (numbers only, no text of the standard is stored):
- an extract of EN 25817 (1992), a predecessor of ISO 5817, on a public document-sharing page (scribd.com,
  "EN 25817 - извадка"): bad fit-up (now 617) 1 mm + 0.3 a max 4 mm / 0.5 mm + 0.2 a max 3 mm / 0.5 mm + 0.1 a
  max 2 mm, excessive asymmetry (now 512) 2 mm + 0.2 a / 2 mm + 0.15 a / 1.5 mm + 0.15 a, throat too small
  0.3 mm + 0.1 a max 2 mm / max 1 mm / not permitted, long imperfections not permitted (D / C / B). The same
  figures are recalled for 2014: those rows say "published in a predecessor (EN 25817); 2014 from memory".

The table below is the data: one row per imperfection, one column per quality level.
"""

from decimal import Decimal

from core.units import parse_length as _len

from .base import FROM_MEMORY, PUBLISHED, Angle, CriteriaSet, Fixed, Permission, Proportional, Ratio, Threshold

STANDARD = "ISO 5817:2014"
_FILLET = "fillet welds, t > 3 mm"
_PREDECESSOR = "published in a predecessor (EN 25817); 2014 from memory"

# (plus, factor, of, max) for h <= plus + factor * of, max (None: no cap); "not permitted" / "unlimited" as words.
UNDERCUT = {  # 5011/5012 undercut, smooth transition required: published (2007, 2014)
    "D": ("0 mm", "0.2", "t", "1 mm"), "C": ("0 mm", "0.1", "t", "0.5 mm"), "B": ("0 mm", "0.05", "t", "0.5 mm")}
CONVEXITY = {  # 503 excessive convexity (fillet weld), b = face width: published
    "D": ("1 mm", "0.25", "b", "5 mm"), "C": ("1 mm", "0.15", "b", "4 mm"), "B": ("1 mm", "0.1", "b", "3 mm")}
THROAT_SMALL = {  # 5213 insufficient throat, short imperfections only: from memory for 2014 (EN 25817 agrees)
    "D": ("0.3 mm", "0.1", "a", "2 mm"), "C": ("0.3 mm", "0.1", "a", "1 mm"), "B": "not permitted"}
THROAT_LARGE = {  # 5214 throat thickness too large: C and B published in a predecessor edition; D from memory
    "D": "unlimited", "C": ("1 mm", "0.2", "a", "4 mm"), "B": ("1 mm", "0.15", "a", "3 mm")}
SURFACE_PORE = {  # 2017 surface pore, d <= share of the nominal throat a: published
    "D": ("0 mm", "0.3", "a", "3 mm"), "C": ("0 mm", "0.2", "a", "2 mm"), "B": "not permitted"}
CRATER_PIPE = {  # 2025 end crater pipe: published
    "D": ("0 mm", "0.2", "t", "2 mm"), "C": ("0 mm", "0.1", "t", "1 mm"), "B": "not permitted"}
ASYMMETRY = {  # 512 excessive asymmetry of a fillet weld (legs not prescribed unequal), h = z1 - z2, no cap
    "D": ("2 mm", "0.2", "a", None), "C": ("2 mm", "0.15", "a", None), "B": ("1.5 mm", "0.15", "a", None)}
ROOT_GAP = {  # 617 incorrect root gap for fillet welds, t > 3 mm
    "D": ("1 mm", "0.3", "a", "4 mm"), "C": ("0.5 mm", "0.2", "a", "3 mm"), "B": ("0.5 mm", "0.1", "a", "2 mm")}
OVERLAP = {  # 506 overlap: h, how far it reaches beyond the toe, against the face width b (from memory)
    "D": ("0 mm", "0.2", "b", None), "C": "not permitted", "B": "not permitted"}
WELD_TOE = {"D": "90", "C": "100", "B": "110"}  # 505 incorrect weld toe, fillet welds: alpha >= (from memory)

_STATUS = {
    "undercut": PUBLISHED, "convexity": PUBLISHED, "throat_small": "from memory for 2014",
    "throat_large": {"D": FROM_MEMORY, "C": "published in a predecessor edition",
                     "B": "published in a predecessor edition"},
    "surface_pore": PUBLISHED, "crater_pipe": PUBLISHED, "asymmetry": _PREDECESSOR, "root_gap": _PREDECESSOR,
    "overlap": FROM_MEMORY,
}
_NAMES = {"undercut": "5011/5012 undercut (smooth transition)", "convexity": "503 excessive convexity",
          "throat_small": "5213 insufficient throat (short imperfections only)",
          "throat_large": "5214 throat thickness too large", "surface_pore": "2017 surface pore",
          "crater_pipe": "2025 end crater pipe", "asymmetry": "512 excessive asymmetry",
          "root_gap": "617 incorrect root gap", "overlap": "506 overlap"}
_TABLES = (("undercut", UNDERCUT), ("convexity", CONVEXITY), ("throat_small", THROAT_SMALL),
           ("throat_large", THROAT_LARGE), ("surface_pore", SURFACE_PORE), ("crater_pipe", CRATER_PIPE),
           ("asymmetry", ASYMMETRY), ("root_gap", ROOT_GAP), ("overlap", OVERLAP))

# ISO 5817:2014, terms and definitions, "short imperfection": one or more imperfections of total length at most
# 25 mm in any 100 mm of weld, or at most 25 % of the weld length for a weld shorter than 100 mm (published).
SHORT = f"{STANDARD}, terms and definitions: short imperfection"


def _measured(name: str, level: str, row):
    source = f"{STANDARD} quality level {level}, {_NAMES[name]}, {_FILLET}"
    status = _STATUS[name] if isinstance(_STATUS[name], str) else _STATUS[name][level]
    if row == "not permitted":
        return Permission(source=source, status=status, rule="not_permitted", measured=True)
    if row == "unlimited":
        return Permission(source=source, status=status, rule="permitted", measured=True)
    plus, factor, of, cap = row
    return Proportional(source=source, status=status, plus=_len(plus), factor=Decimal(factor), of=of,
                        max=None if cap is None else _len(cap))


def _flags(level: str) -> dict:
    src = f"{STANDARD} quality level {level}"
    d = level == "D"
    return {
        "crack": Permission(source=f"{src}, 100 crack", status=PUBLISHED, rule="not_permitted"),
        # 104 crater crack: permitted at D, not at C and B (from memory).
        "crater_crack": Permission(source=f"{src}, 104 crater crack", status=FROM_MEMORY,
                                   rule="permitted" if d else "not_permitted"),
        # 401 lack of fusion seen at the surface: not permitted at any level (from memory; the level D allowance
        # for short lack of fusion is for internal imperfections, found by testing, not by eye).
        "fusion": Permission(source=f"{src}, 401 lack of fusion (surface)", status=FROM_MEMORY,
                             rule="not_permitted"),
        # 517 poor restart: D permitted, the limit being that of the imperfection the restart left; C, B not
        # permitted (from memory).
        "poor_restart": Permission(source=f"{src}, 517 poor restart", status=FROM_MEMORY,
                                   rule="permitted_if" if d else "not_permitted",
                                   condition="the imperfection the restart left is within its own limit"
                                   if d else ""),
        # 601 stray arc: D permitted if the parent metal is not affected; C, B not permitted (from memory).
        "arc_strike": Permission(source=f"{src}, 601 stray arc", status=FROM_MEMORY,
                                 rule="permitted_if" if d else "not_permitted",
                                 condition="the parent metal is not affected" if d else ""),
        # 602 spatter: acceptance depends on the application (material, corrosion protection) at every level, so
        # the weld is held until someone judges it for this job (from memory).
        "spatter": Permission(source=f"{src}, 602 spatter", status=FROM_MEMORY, rule="refer",
                              condition="ISO 5817 leaves spatter to the application (material, corrosion "
                                        "protection): judge it for this job"),
    }


def _set(level: str) -> CriteriaSet:
    limits = {
        **_flags(level),
        **{name: _measured(name, level, table[level]) for name, table in _TABLES},
        "weld_toe": Angle(source=f"{STANDARD} quality level {level}, 505 incorrect weld toe, fillet welds",
                          status=FROM_MEMORY, minimum=Decimal(WELD_TOE[level])),
        "short_imperfection": Fixed(source=f"{SHORT}, total length in any 100 mm of weld", status=PUBLISHED,
                                    si=_len("25 mm")),
        "short_imperfection_share": Ratio(source=f"{SHORT}, share of a weld shorter than 100 mm",
                                          status=PUBLISHED, value=Decimal("0.25")),
        "short_imperfection_window": Threshold(source=f"{SHORT}, length of weld it counts over", status=PUBLISHED,
                                               si=_len("100 mm")),
        # The fillet weld limits above are those for t > 3 mm; the 0.5 to 3 mm column is not stored.
        "applies_above_thickness": Threshold(source=f"{STANDARD}, limits for t > 3 mm", status=PUBLISHED,
                                             si=_len("3 mm")),
    }
    return CriteriaSet(
        key=f"iso-5817-2014-{level}", title=f"ISO 5817:2014 quality level {level}, fillet welds t > 3 mm",
        standard=STANDARD, version=2, systems=("SI",),
        checks=("crack", "crater_crack", "fusion", "undercut_depth", "convexity", "throat", "asymmetry",
                "weld_toe", "surface_pore", "crater_pipe", "overlap_by_width", "poor_restart", "root_gap",
                "spatter", "arc_strike"),
        limits=limits,
        notes=("ISO 5817 prints SI values only: a US job is judged and reported in millimetres.",
               "5213 insufficient throat is permitted (C, D) only as a short imperfection: at most 25 mm in any "
               "100 mm of weld, or 25 % of a weld shorter than 100 mm; a longer shortfall is rejected.",
               "5213 does not apply where a process with proof of greater depth of penetration is used (from "
               "memory): the engineer may accept the weld on that proof.",
               "617: a root gap over the limit may in certain cases be made up by a corresponding increase of the "
               "throat (from memory): the engineer decides.",
               "512 applies where unequal legs were not prescribed.",
               "Version 2 (this one) added 104, 505, 512, 517, 602, 617, the length of a 5213 shortfall and the "
               "level D values of 401 and 506 that version 1 held for judgement."))


LEVEL_B, LEVEL_C, LEVEL_D = (_set(level) for level in "BCD")
SETS = (LEVEL_B, LEVEL_C, LEVEL_D)
