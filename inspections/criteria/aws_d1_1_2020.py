"""AWS D1.1/D1.1M:2020 visual acceptance of fillet welds, nontubular connections: static and cyclic loading.

Table 8.1 (2015 edition: Table 6.1) and the fillet weld profiles of Tables 7.8/7.9. The code prints US and SI
values separately (1/16 in and 2 mm are not conversions of each other), so both are stored as printed and a
verdict uses the values of the job's system. Each value names its source and status: "from memory" values
were recalled, not read in a document; confirm them against the code the contract names.

Adding an edition: copy this module to aws_d1_1_<year>.py, change values, sources and keys
("aws-d1.1-<year>-static"), and list its SETS in inspections/criteria/__init__.py.
"""

from decimal import Decimal

from core.units import parse_length as _len

from .base import FROM_MEMORY, PUBLISHED, Band, Banded, Count, CriteriaSet, Fixed, Permission, Ratio, Threshold

STANDARD = "AWS D1.1/D1.1M:2020"
TABLE_8_1 = "AWS D1.1/D1.1M:2020 Table 8.1 (2015: Table 6.1)"
STATIC = f"{TABLE_8_1}, statically loaded nontubular"
CYCLIC = f"{TABLE_8_1}, cyclically loaded nontubular"
PROFILES = "AWS D1.1/D1.1M:2020 Tables 7.8/7.9, fillet weld profiles"
ARC_STRIKES = "AWS D1.1/D1.1M:2020 clause 7.29, arc strikes"


def _fixed(us, si, source, status=PUBLISHED):
    return Fixed(source=source, status=status, us=_len(us), si=_len(si))


def _threshold(us, si, source, status=PUBLISHED):
    return Threshold(source=source, status=status, us=_len(us), si=_len(si))


def _common(loading: str) -> dict:
    """Limits that read the same for both loadings (Table 8.1 prints them in both columns)."""
    src = f"{TABLE_8_1}, {loading} nontubular"
    return {
        "crack": Permission(source=f"{src}, crack", status=PUBLISHED, rule="not_permitted"),
        "fusion": Permission(source=f"{src}, fusion", status=PUBLISHED, rule="not_permitted",
                             condition="complete fusion between weld and base metal and between passes"),
        "crater": Permission(source=f"{src}, crater cross section", status=PUBLISHED, rule="not_permitted",
                             condition="craters filled to the full cross section (ends of intermittent welds "
                                       "outside their effective length excepted)"),
        "overlap": Permission(source=f"{src}, overlap", status=PUBLISHED, rule="not_permitted"),
        # Arc strikes are not a line of Table 8.1: the fabrication clause has them ground to a smooth contour and
        # checked for soundness, so the weld is held until that is done (clause number from memory).
        "arc_strike": Permission(source=ARC_STRIKES, status=FROM_MEMORY, rule="not_permitted",
                                 condition="grind to a smooth contour and check for soundness"),
        # Undersize of a continuous fillet: nominal L <= 3/16 in [5 mm]: 1/16 in [2 mm]; L = 1/4 in [6 mm]:
        # 3/32 in [2.5 mm]; L >= 5/16 in [8 mm]: 1/8 in [3 mm]. A size between the printed ones takes the
        # allowance of the band below it (our reading: the smaller allowance), e.g. 7/32 in: 1/16 in.
        "undersize": Banded(
            source=f"{src}, undersize (fillet welds)", status=PUBLISHED, by="nominal fillet size",
            us=(Band(_len("1/4 in"), _len("1/16 in"), inclusive=False),
                Band(_len("5/16 in"), _len("3/32 in"), inclusive=False),
                Band(None, _len("1/8 in"))),
            si=(Band(_len("6 mm"), _len("2 mm"), inclusive=False),
                Band(_len("8 mm"), _len("2.5 mm"), inclusive=False),
                Band(None, _len("3 mm")))),
        "undersize_portion": Ratio(source=f"{src}, undersize portion of the weld length", status=PUBLISHED,
                                   value=Decimal("0.10")),  # at most 10 % of the weld length
        # Convexity C by face width W (the face or an individual surface bead, not the leg: from memory).
        "convexity": Banded(
            source=PROFILES, status="published; W as the width of the face or of an individual surface bead "
                                    "from memory", by="face width",
            us=(Band(_len("5/16 in"), _len("1/16 in"), inclusive=True),
                Band(_len("1 in"), _len("1/8 in"), inclusive=False),
                Band(None, _len("3/16 in"), status=FROM_MEMORY)),
            si=(Band(_len("8 mm"), _len("2 mm"), inclusive=True),
                Band(_len("25 mm"), _len("3 mm"), inclusive=False),
                Band(None, _len("5 mm"), status=FROM_MEMORY))),
    }


_STATIC_LIMITS = {
    **_common("statically loaded"),
    # Undercut: material < 1 in [25 mm]: 1/32 in [1 mm], except 1/16 in [2 mm] for an accumulated 2 in [50 mm]
    # in any 12 in [300 mm]; material >= 1 in [25 mm]: 1/16 in [2 mm] for any length.
    "undercut_thick_material": _threshold("1 in", "25 mm", f"{STATIC}, undercut: material thickness where the "
                                                            "rule changes"),
    "undercut_thin": _fixed("1/32 in", "1 mm", f"{STATIC}, undercut, material under 1 in [25 mm]"),
    "undercut_thin_short": _fixed("1/16 in", "2 mm", f"{STATIC}, undercut, material under 1 in [25 mm], "
                                                     "accumulated short length"),
    "undercut_thin_short_length": _fixed("2 in", "50 mm", f"{STATIC}, undercut, accumulated length in any "
                                                          "12 in [300 mm]"),
    "undercut_window": _threshold("12 in", "300 mm", f"{STATIC}, undercut, length the accumulation counts over"),
    "undercut_thick": _fixed("1/16 in", "2 mm", f"{STATIC}, undercut, material 1 in [25 mm] or more"),
    # Piping porosity in fillet welds: sum of diameters of pores 1/32 in [1 mm] or larger.
    "porosity_counted_from": _threshold("1/32 in", "1 mm", f"{STATIC}, piping porosity: pores counted"),
    "porosity_window_short": _threshold("1 in", "25 mm", f"{STATIC}, piping porosity, short window"),
    "porosity_window_long": _threshold("12 in", "300 mm", f"{STATIC}, piping porosity, long window"),
    "porosity_sum_1in": _fixed("3/8 in", "10 mm", f"{STATIC}, piping porosity, sum in any 1 in [25 mm]"),
    "porosity_sum_12in": _fixed("3/4 in", "20 mm", f"{STATIC}, piping porosity, sum in any 12 in [300 mm]"),
}

_CYCLIC_FROM_MEMORY_MM = "published in inches; mm values from memory"
_CYCLIC_LIMITS = {
    **_common("cyclically loaded"),
    # Undercut: primary member, weld transverse to tensile stress: 0.01 in [0.25 mm]; otherwise 1/32 in [1 mm].
    "undercut_primary_transverse": _fixed("0.01 in", "0.25 mm", f"{CYCLIC}, undercut, primary member with the "
                                                                "weld transverse to tensile stress",
                                          _CYCLIC_FROM_MEMORY_MM),
    "undercut_other": _fixed("1/32 in", "1 mm", f"{CYCLIC}, undercut, all other cases", _CYCLIC_FROM_MEMORY_MM),
    # Piping porosity: at most one pore in each 4 in [100 mm], diameter at most 3/32 in [2.5 mm].
    "pore_max": _fixed("3/32 in", "2.5 mm", f"{CYCLIC}, piping porosity, largest pore diameter"),
    "pores_per_4in": Count(source=f"{CYCLIC}, piping porosity, pores in each 4 in [100 mm]", status=FROM_MEMORY,
                           value=1),
    "porosity_count_window": _threshold("4 in", "100 mm", f"{CYCLIC}, piping porosity, length a pore is counted in",
                                        FROM_MEMORY),
    # Stiffener-to-web fillets use the static sums (the exception from memory).
    "porosity_counted_from": _threshold("1/32 in", "1 mm", f"{STATIC}, piping porosity: pores counted"),
    "porosity_window_short": _threshold("1 in", "25 mm", f"{STATIC}, piping porosity, short window"),
    "porosity_window_long": _threshold("12 in", "300 mm", f"{STATIC}, piping porosity, long window"),
    "porosity_sum_1in": _fixed("3/8 in", "10 mm", f"{CYCLIC}, stiffener-to-web fillets: static sum in any 1 in",
                               FROM_MEMORY),
    "porosity_sum_12in": _fixed("3/4 in", "20 mm", f"{CYCLIC}, stiffener-to-web fillets: static sum in any 12 in",
                                FROM_MEMORY),
}

_NOTES = (
    "Web-to-flange welds: no underrun is allowed at the ends for twice the flange width (Table 8.1); the engine "
    "does not know where along the weld the undersize lies, so the inspector checks the ends.",
    "Fillet sizes between the printed ones take the undersize allowance of the band below (the smaller one).",
)

STATIC_SET = CriteriaSet(
    key="aws-d1.1-2020-static", title="AWS D1.1/D1.1M:2020 visual acceptance, statically loaded nontubular",
    standard=STANDARD, version=1, systems=("US", "SI"),
    checks=("crack", "fusion", "crater", "undersize", "undercut_by_thickness", "porosity_sums", "convexity",
            "overlap", "arc_strike"),
    limits=_STATIC_LIMITS, notes=_NOTES)

CYCLIC_SET = CriteriaSet(
    key="aws-d1.1-2020-cyclic", title="AWS D1.1/D1.1M:2020 visual acceptance, cyclically loaded nontubular",
    standard=STANDARD, version=1, systems=("US", "SI"),
    checks=("crack", "fusion", "crater", "undersize", "undercut_by_member", "porosity_pores", "convexity",
            "overlap", "arc_strike"),
    limits=_CYCLIC_LIMITS, notes=_NOTES)

SETS = (STATIC_SET, CYCLIC_SET)
