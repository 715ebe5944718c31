"""What an inspector observes on a fillet weld, in one table: the engine's name, the kind, the words a person reads.

Plain Python, no Django. The acceptance engine reads observations by `name`; forms, models, pages, PDFs and the
engine's own messages print `label(name, system)`, so one observation carries one set of words everywhere.
`read_by` names the acceptance checks (inspections.acceptance.CHECKS) that judge it; which observations a criteria
set asks for follows from the checks the set runs (asked_by), so that list is never typed a second time.

Kinds: "length" (a length with its unit), "count" (a whole number), "flag" (seen or not), "angle" (degrees, such as
100°). An absent length, count or angle means nothing was measured (none seen), an absent flag is False.

The same table gives the Inspection model its columns, the tablet form its boxes and switches (grouped by GROUPS,
in table order), and the inspection page, the traveler and the NCR their "recorded" lines; AT_FIT_UP names what is
measured at the fit-up hold point, before welding. CRITERIA gives the words a finding is headed by.
"""

from __future__ import annotations

from dataclasses import dataclass

SYSTEMS = ("US", "SI")
KINDS = ("length", "count", "flag", "angle")


@dataclass(frozen=True)
class Observation:
    """One thing an inspector looks for or measures on a fillet weld."""

    name: str  # the engine's key in the observed dict
    kind: str  # "length" | "count" | "flag" | "angle"
    us_label: str  # the words on a US job (windows in inches)
    si_label: str  # the words on an SI job (windows in millimetres)
    help: str  # one line: what to measure and how
    read_by: tuple[str, ...]  # the acceptance checks that judge it
    group: str = "seen"  # where a form or a report puts it (GROUPS)

    def __post_init__(self):
        if self.kind not in KINDS:
            raise ValueError(f"An observation's kind is one of {', '.join(KINDS)}, not {self.kind!r}.")
        if self.group not in dict(GROUPS):
            raise ValueError(f"An observation's group is one of {', '.join(dict(GROUPS))}, not {self.group!r}.")

    def label(self, system: str = "US") -> str:
        return self.si_label if _system(system) == "SI" else self.us_label


# Where forms and reports put the observations, in this order, with the heading a person reads.
GROUPS: tuple[tuple[str, str], ...] = (
    ("size", "Legs and throat"),
    ("undercut", "Undercut"),
    ("seen", "Seen on the weld"),
    ("porosity", "Porosity"),
    ("profile", "Profile and craters"),
)


def _same(name, kind, label, help, read_by, group="seen"):
    return Observation(name, kind, label, label, help, read_by, group)


OBSERVATIONS: tuple[Observation, ...] = (
    _same("min_size", "length", "Smallest leg measured",
          "The smallest leg (z) the fillet gauge reads anywhere along the weld; on ISO jobs without a measured "
          "throat, its effective throat is judged.",
          ("undersize", "throat"), group="size"),
    _same("min_size2", "length", "Smallest leg measured, second leg",
          "On a fillet with unequal legs (or to record both legs): the smallest reading on the second leg.",
          ("undersize", "throat"), group="size"),
    _same("undersize_length", "length", "Length under the specified size",
          "Total length of weld whose leg is under the specified size.",
          ("undersize",), group="size"),
    _same("undercut_depth", "length", "Deepest undercut",
          "Depth of the deepest undercut at either toe, below the base metal surface.",
          ("undercut_by_thickness", "undercut_by_member", "undercut_depth"), group="undercut"),
    Observation("undercut_length", "length", "Undercut length over the general limit, worst 12 in",
                "Undercut length over the general limit, worst 300 mm",
                "Accumulated length of undercut deeper than the general limit, in the worst stretch of weld.",
                ("undercut_by_thickness", "undercut_by_member", "undercut_depth"), group="undercut"),
    Observation("porosity_sum_1in", "length", "Sum of pore diameters, worst 1 in",
                "Sum of pore diameters, worst 25 mm",
                "Add up the diameters of the visible piping pores in the worst short stretch of weld.",
                ("porosity_sums", "porosity_pores", "surface_pore"), group="porosity"),
    Observation("porosity_sum_12in", "length", "Sum of pore diameters, worst 12 in",
                "Sum of pore diameters, worst 300 mm",
                "Add up the diameters of the visible piping pores in the worst long stretch of weld.",
                ("porosity_sums", "porosity_pores", "surface_pore"), group="porosity"),
    _same("pore_max", "length", "Largest pore",
          "Diameter of the largest visible pore.",
          ("porosity_sums", "porosity_pores", "surface_pore"), group="porosity"),
    Observation("pores_per_4in", "count", "Pores in the worst 4 in", "Pores in the worst 100 mm",
                "Number of visible piping pores in the worst stretch of weld.",
                ("porosity_pores", "surface_pore"), group="porosity"),
    _same("convexity", "length", "Convexity",
          "Height of the weld face above the straight line joining the toes.",
          ("convexity",), group="profile"),
    _same("face_width", "length", "Face width",
          "Width of the weld face from toe to toe (the convexity and overlap limits depend on it).",
          ("convexity", "overlap_by_width"), group="profile"),
    _same("throat", "length", "Smallest throat measured (a)",
          "The smallest throat a the throat gauge reads; ISO 5817 judges the throat.",
          ("throat",), group="size"),
    _same("throat_short_length", "length", "Length with the throat under nominal, worst 100 mm",
          "Length of weld where the throat is under the nominal a, in the worst 100 mm (ISO 5817 5213 permits "
          "only a short shortfall).",
          ("throat",), group="size"),
    _same("leg_difference", "length", "Difference between the two legs",
          "Largest difference between the two legs at one place along the weld (asymmetry, ISO 5817 512).",
          ("asymmetry",), group="size"),
    _same("toe_angle", "angle", "Sharpest weld toe angle",
          "Angle between the base metal surface and the weld face at the sharpest toe, in degrees (180° is a "
          "flat transition; ISO 5817 505).",
          ("weld_toe",), group="profile"),
    _same("root_gap", "length", "Root opening (gap between the parts)",
          "Gap between the parts joined at the root of the fillet: gauged at fit-up, before welding (AWS D1.1 "
          "clause 7.21.1), and where it can still be seen on the finished weld (ISO 5817 617).",
          ("root_gap",), group="profile"),
    _same("crater_depth", "length", "Crater depth",
          "Depth of an unfilled crater or end crater pipe below the weld face.",
          ("crater", "crater_pipe"), group="profile"),
    _same("overlap_width", "length", "Overlap beyond the toe",
          "How far unfused weld metal reaches over the base metal beyond the toe.",
          ("overlap_by_width",), group="profile"),
    _same("crack", "flag", "Crack", "Any crack in the weld or the heat-affected zone.", ("crack",)),
    _same("crater_crack", "flag", "Crater crack", "A crack in the crater at the end of a run.",
          ("crack", "crater_crack")),
    _same("incomplete_fusion", "flag", "Incomplete fusion",
          "Weld metal not fused to the base metal or to the pass below, where it can be seen.", ("fusion",)),
    _same("unfilled_crater", "flag", "Unfilled crater", "A crater not filled to the full cross section.",
          ("crater", "crater_pipe")),
    _same("overlap", "flag", "Overlap", "Weld metal rolled over the base metal surface beyond the toe, not fused.",
          ("overlap", "overlap_by_width")),
    _same("poor_restart", "flag", "Poor restart", "A local irregularity where the run was restarted.",
          ("poor_restart",)),
    _same("spatter", "flag", "Spatter", "Spatter stuck to the weld or the base metal.", ("spatter",)),
    _same("arc_strike", "flag", "Arc strike", "A stray arc touched the base metal outside the weld.",
          ("arc_strike",)),
)

BY_NAME: dict[str, Observation] = {o.name: o for o in OBSERVATIONS}
LENGTHS: tuple[str, ...] = tuple(o.name for o in OBSERVATIONS if o.kind == "length")
COUNTS: tuple[str, ...] = tuple(o.name for o in OBSERVATIONS if o.kind == "count")
FLAGS: tuple[str, ...] = tuple(o.name for o in OBSERVATIONS if o.kind == "flag")
ANGLES: tuple[str, ...] = tuple(o.name for o in OBSERVATIONS if o.kind == "angle")
# Measured at the fit-up hold point, before there is a weld: the root opening of the joint (inspections.fit_up).
AT_FIT_UP: tuple[str, ...] = ("root_gap",)


# The weld data an evaluation reads (the weld map's line), in the same words.
WELD_LABELS: dict[str, str] = {
    "size": "specified leg (fillet size z)",
    "size2": "second specified leg (unequal legs)",
    "throat": "specified throat a",
    "length": "weld length",
    "thickness": "base metal thickness at the toe",
    "primary_member": "primary member",
    "transverse_to_tension": "weld transverse to tensile stress",
    "stiffener_to_web": "stiffener-to-web weld",
    "system": "unit system of the job",
}


# The criteria a verdict's findings name (Finding.criterion), in the words a finding is headed by on pages and PDFs.
CRITERIA: dict[str, str] = {
    "undersize": "Undersize", "throat": "Throat", "undercut": "Undercut", "porosity": "Porosity",
    "convexity": "Convexity", "asymmetry": "Asymmetry of the legs", "weld_toe": "Weld toe", "crack": "Cracks",
    "crater_crack": "Crater crack", "fusion": "Fusion", "crater": "Craters", "overlap": "Overlap",
    "poor_restart": "Poor restart", "spatter": "Spatter", "arc_strike": "Arc strikes", "root_gap": "Root gap",
    "root_opening": "Root opening", "fit_up": "Fit-up", "preheat": "Preheat (measured)",
    "interpass": "Interpass temperature (measured)",
}


def criterion_label(name: str) -> str:
    """The heading of a finding: 'Arc strikes' for arc_strike. A name not in the table is made readable rather
    than shown as a program name."""
    if name in CRITERIA:
        return CRITERIA[name]
    text = str(name).replace("_", " ").strip()
    return text[:1].upper() + text[1:]


def _system(system: str) -> str:
    if system not in SYSTEMS:
        raise ValueError(f"Unit system must be 'US' or 'SI', not {system!r}.")
    return system


def get(name: str) -> Observation:
    """The observation with this engine name; an unknown name lists the labels of the known ones."""
    try:
        return BY_NAME[name]
    except (KeyError, TypeError):
        raise ValueError(f"{name!r} is not an observation; the observations are: "
                         f"{', '.join(o.us_label for o in OBSERVATIONS)}.") from None


def label(name: str, system: str = "US") -> str:
    """The words for an observation on a job of that system: 'Smallest leg measured'."""
    return get(name).label(system)


def unit(name: str, system: str = "US") -> str:
    """The unit an observation is typed and printed in on a job of that system: 'in', 'mm', '°' or '' (a count)."""
    kind = get(name).kind
    if kind == "length":
        return "mm" if _system(system) == "SI" else "in"
    return "\u00b0" if kind == "angle" else ""


def in_group(group: str, names=None) -> list[Observation]:
    """The observations of one group (GROUPS), in table order; names: only these (e.g. what a set asks)."""
    if group not in dict(GROUPS):
        raise ValueError(f"{group!r} is not a group of observations; the groups are: {', '.join(dict(GROUPS))}.")
    return [o for o in OBSERVATIONS if o.group == group and (names is None or o.name in names)]


def weld_label(name: str) -> str:
    """The words for a line of the weld data: 'weld length'."""
    try:
        return WELD_LABELS[name]
    except (KeyError, TypeError):
        raise ValueError(f"{name!r} is not a line of the weld data; the lines are: "
                         f"{', '.join(WELD_LABELS.values())}.") from None


def asked_by(criteria) -> list[Observation]:
    """The observations a criteria set judges (a key, a CriteriaSet or its stored dict), in table order."""
    from .criteria import resolve  # here, so this table imports without the criteria package

    checks = set(resolve(criteria).checks)
    return [o for o in OBSERVATIONS if checks.intersection(o.read_by)]


__all__ = ["ANGLES", "AT_FIT_UP", "BY_NAME", "COUNTS", "CRITERIA", "FLAGS", "GROUPS", "KINDS", "LENGTHS",
           "OBSERVATIONS", "Observation", "WELD_LABELS", "asked_by", "criterion_label", "get", "in_group", "label",
           "unit", "weld_label"]
