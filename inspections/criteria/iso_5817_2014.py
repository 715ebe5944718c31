"""ISO 5817:2014 quality levels B, C and D for fillet welds, material thicker than 3 mm (visible imperfections).

Imperfections are named by their ISO 6520-1 reference number. ISO prints SI values only, so a US job is judged
in millimetres (its inch inputs are converted exactly). Each value names its source and status: "from memory"
values were recalled, not read in a document. The 2023 edition exists; its values were not checked, so the sets
stay pinned to 2014 until someone with the document confirms them (add iso_5817_2023.py beside this one).

The table below is the data: one row per imperfection, one column per quality level.
"""

from decimal import Decimal

from core.units import parse_length as _len

from .base import FROM_MEMORY, PUBLISHED, CriteriaSet, Permission, Proportional, Threshold

STANDARD = "ISO 5817:2014"
_FILLET = "fillet welds, t > 3 mm"

# (plus, factor, of, max) for h <= plus + factor * of, max; "not permitted" / "unlimited" as words.
UNDERCUT = {  # 5011/5012 undercut, smooth transition required: published (2007, 2014)
    "D": ("0 mm", "0.2", "t", "1 mm"), "C": ("0 mm", "0.1", "t", "0.5 mm"), "B": ("0 mm", "0.05", "t", "0.5 mm")}
CONVEXITY = {  # 503 excessive convexity (fillet weld), b = face width: published
    "D": ("1 mm", "0.25", "b", "5 mm"), "C": ("1 mm", "0.15", "b", "4 mm"), "B": ("1 mm", "0.1", "b", "3 mm")}
THROAT_SMALL = {  # 5213 throat thickness too small, short imperfections only: from memory for 2014
    "D": ("0.3 mm", "0.1", "a", "2 mm"), "C": ("0.3 mm", "0.1", "a", "1 mm"), "B": "not permitted"}
THROAT_LARGE = {  # 5214 throat thickness too large: C and B published in a predecessor edition; D from memory
    "D": "unlimited", "C": ("1 mm", "0.2", "a", "4 mm"), "B": ("1 mm", "0.15", "a", "3 mm")}
SURFACE_PORE = {  # 2017 surface pore, d <= share of the nominal throat a: published
    "D": ("0 mm", "0.3", "a", "3 mm"), "C": ("0 mm", "0.2", "a", "2 mm"), "B": "not permitted"}
CRATER_PIPE = {  # 2025 end crater pipe: published
    "D": ("0 mm", "0.2", "t", "2 mm"), "C": ("0 mm", "0.1", "t", "1 mm"), "B": "not permitted"}

_STATUS = {
    "undercut": PUBLISHED, "convexity": PUBLISHED, "throat_small": "from memory for 2014",
    "throat_large": {"D": FROM_MEMORY, "C": "published in a predecessor edition",
                     "B": "published in a predecessor edition"},
    "surface_pore": PUBLISHED, "crater_pipe": PUBLISHED,
}
_NAMES = {"undercut": "5011/5012 undercut (smooth transition)", "convexity": "503 excessive convexity",
          "throat_small": "5213 throat thickness too small (short imperfections)",
          "throat_large": "5214 throat thickness too large", "surface_pore": "2017 surface pore",
          "crater_pipe": "2025 end crater pipe"}


def _measured(name: str, level: str, row):
    source = f"{STANDARD} quality level {level}, {_NAMES[name]}, {_FILLET}"
    status = _STATUS[name] if isinstance(_STATUS[name], str) else _STATUS[name][level]
    if row == "not permitted":
        return Permission(source=source, status=status, rule="not_permitted", measured=True)
    if row == "unlimited":
        return Permission(source=source, status=status, rule="permitted", measured=True)
    plus, factor, of, cap = row
    return Proportional(source=source, status=status, plus=_len(plus), factor=Decimal(factor), of=of,
                        max=_len(cap))


def _flags(level: str) -> dict:
    src = f"{STANDARD} quality level {level}"
    return {
        "crack": Permission(source=f"{src}, 100 crack", status=PUBLISHED, rule="not_permitted"),
        # 401 lack of fusion and 506 overlap are not in our reference table: B and C not permitted, and level D
        # may admit short imperfections within a size limit that is not stored here, so the weld is held
        # ("refer") until someone judges it against the standard. All from memory.
        "fusion": Permission(source=f"{src}, 401 lack of fusion", status=FROM_MEMORY,
                             rule="refer" if level == "D" else "not_permitted",
                             condition="level D limits for 401 are not stored in this set: judge against the "
                                       "standard" if level == "D" else ""),
        "overlap": Permission(source=f"{src}, 506 overlap", status=FROM_MEMORY,
                              rule="refer" if level == "D" else "not_permitted",
                              condition="level D limits for 506 are not stored in this set: judge against the "
                                        "standard" if level == "D" else ""),
        "arc_strike": Permission(source=f"{src}, 601 stray arc", status=FROM_MEMORY,
                                 rule="permitted_if" if level == "D" else "not_permitted",
                                 condition="the parent metal is not affected" if level == "D" else ""),
    }


def _set(level: str) -> CriteriaSet:
    limits = {
        **_flags(level),
        **{name: _measured(name, level, table[level]) for name, table in (
            ("undercut", UNDERCUT), ("convexity", CONVEXITY), ("throat_small", THROAT_SMALL),
            ("throat_large", THROAT_LARGE), ("surface_pore", SURFACE_PORE), ("crater_pipe", CRATER_PIPE))},
        # The fillet weld limits above are those for t > 3 mm; the 0.5 to 3 mm column is not stored.
        "applies_above_thickness": Threshold(source=f"{STANDARD}, limits for t > 3 mm", status=PUBLISHED,
                                             si=_len("3 mm")),
    }
    return CriteriaSet(
        key=f"iso-5817-2014-{level}", title=f"ISO 5817:2014 quality level {level}, fillet welds t > 3 mm",
        standard=STANDARD, version=1, systems=("SI",),
        checks=("crack", "fusion", "undercut_depth", "convexity", "throat", "surface_pore", "crater_pipe",
                "overlap", "arc_strike"),
        limits=limits,
        notes=("ISO 5817 prints SI values only: a US job is judged and reported in millimetres.",
               "5213 throat too small applies to short imperfections; the length of a throat shortfall is not "
               "judged here."))


LEVEL_B, LEVEL_C, LEVEL_D = (_set(level) for level in "BCD")
SETS = (LEVEL_B, LEVEL_C, LEVEL_D)
