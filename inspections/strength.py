"""Fillet weld strength by AISC 360-16 section J2, base metal by J4, and the capacity of a weld as inspected.

Plain Python, no Django: the inspection pages, the NCR disposition form and the traveler PDF call it. Every
result carries `steps`, a calculation trail of (label, expression, value) that a checker can follow line by
line, and `findings`: size and length rules come back as findings (criterion, ok, message, source) instead of
silently changing a number. The one rule that does change a number, the 4 w minimum length (J2.2b: otherwise
the effective size is taken as l/4), is applied AND reported.

Arithmetic is Decimal throughout; a result is computed in kip and inches and converted to kN with
units.KIP_TO_KN (1 ksi x 1 in2 = 1 kip, so the SI figures agree with an SI hand calculation to many digits).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from decimal import Decimal, InvalidOperation, localcontext
from typing import NamedTuple

from core.units import (
    KIP_TO_KN,
    KSI_TO_MPA,
    MM_PER_INCH,
    Force,
    Length,
    Stress,
    UnitError,
    format_force,
    format_length,
    inch_fraction,
    length_system,
    number_text,
    parse_area,
    parse_force,
    parse_length,
    parse_stress,
    significant,
)

SPEC = "AISC 360-16"
# Stored with every calculation snapshot (NCR, calculation sheet): change it when a rule, a factor or a figure of
# this module changes, so a stored calculation says which arithmetic made it.
ENGINE_VERSION = "2026-12-02"

# --- resistance and safety factors -------------------------------------------------------------------------
PHI_WELD, OMEGA_WELD = Decimal("0.75"), Decimal("2.00")  # AISC 360-16 J2.4, Table J2.5 (fillet, shear)
FNW_FACTOR = Decimal("0.60")  # Fnw = 0.60 FEXX, AISC 360-16 Table J2.5
DIRECTIONAL = Decimal("0.50")  # Fnw = 0.60 FEXX (1.0 + 0.50 sin^1.5 theta), AISC 360-16 J2.4(a)
GROUP_LONGITUDINAL, GROUP_TRANSVERSE = Decimal("0.85"), Decimal("1.5")  # AISC 360-16 J2.4(b) (360-10: J2.4(c))
PHI_SHEAR_YIELD, OMEGA_SHEAR_YIELD = Decimal("1.00"), Decimal("1.50")  # AISC 360-16 J4.2(a)
PHI_SHEAR_RUPTURE, OMEGA_SHEAR_RUPTURE = Decimal("0.75"), Decimal("2.00")  # AISC 360-16 J4.2(b)
PHI_TENSION_YIELD, OMEGA_TENSION_YIELD = Decimal("0.90"), Decimal("1.67")  # AISC 360-16 J4.1(a)
PHI_TENSION_RUPTURE, OMEGA_TENSION_RUPTURE = Decimal("0.75"), Decimal("2.00")  # AISC 360-16 J4.1(b)
SHEAR_FACTOR = Decimal("0.60")  # 0.60 Fy Agv and 0.60 Fu Anv, AISC 360-16 J4.2

# Effective throat of an equal-leg fillet: 0.707 w, the figure of AISC 360-16 J2.2a commentary and of the
# AISC Manual 15th ed., Part 8 (its 1.392 D and 0.928 D kip/in come from it). sqrt(2)/2 = 0.70711 would
# differ in the fifth figure; we keep the Manual's 0.707 so a checker's hand calculation matches.
THROAT_EQUAL_LEGS = Decimal("0.707")

# End-loaded welds, AISC 360-16 J2.2b: full length up to 100 w; beta = 1.2 - 0.002 (l/w) up to 300 w;
# beyond 300 w the effective length is 180 w.
END_LOADED_FULL, END_LOADED_LIMIT = Decimal(100), Decimal(300)
BETA_A, BETA_B = Decimal("1.2"), Decimal("0.002")
END_LOADED_CAP = Decimal(180)
MIN_LENGTH_SIZES = Decimal(4)  # l >= 4 w, otherwise effective size <= l/4, AISC 360-16 J2.2b

# FEXX sanity range: E60 to E120 electrodes (AWS A5.1, A5.5); SI classifications 410 to 830 MPa.
FEXX_KSI = (Decimal(60), Decimal(120))
FEXX_MPA = (Decimal(410), Decimal(830))
# Base metal Fy / Fu sanity range: common practice, no source (catches ksi typed as MPa and the reverse).
STEEL_KSI = (Decimal(20), Decimal(200))
STEEL_MPA = (Decimal(140), Decimal(1380))


def _len(text: str) -> Length:
    return parse_length(text)


# AISC 360-16 Table J2.4, minimum fillet size by the thinner part joined (published, 2010 and 2022 editions).
# Rows: (thickness up to and including, US; same, SI; minimum leg, US; minimum leg, SI). The leg sizes in mm are
# as printed (published); the mm thickness breakpoints 6 / 13 / 19 mm are from memory.
MIN_SIZE_TABLE = (
    (_len("1/4 in"), _len("6 mm"), _len("1/8 in"), _len("3 mm")),
    (_len("1/2 in"), _len("13 mm"), _len("3/16 in"), _len("5 mm")),
    (_len("3/4 in"), _len("19 mm"), _len("1/4 in"), _len("6 mm")),
    (None, None, _len("5/16 in"), _len("8 mm")),
)
MIN_SIZE_SOURCE = f"{SPEC} Table J2.4"

# AISC 360-16 J2.2b, maximum size along an edge: t < 1/4 in: t; t >= 1/4 in: t - 1/16 in (2 mm), unless the
# weld is designated to be built out to full throat (published). The SI threshold 6 mm is from memory.
EDGE_THRESHOLD = {"US": _len("1/4 in"), "SI": _len("6 mm")}
EDGE_ALLOWANCE = {"US": _len("1/16 in"), "SI": _len("2 mm")}
# AISC 360-16 J2.2b: a segment of an intermittent fillet weld >= 4 w and >= 1-1/2 in (38 mm) (published).
INTERMITTENT_MIN = {"US": _len("1-1/2 in"), "SI": _len("38 mm")}
LENGTH_SOURCE = f"{SPEC} J2.2b"

# Base metals by name: Fy / Fu as printed in ksi and MPa (published). A36 Fu is the lower end of 58-80 ksi.
MATERIALS = {
    "A36": ("ASTM A36", (Decimal(36), Decimal(58)), (Decimal(250), Decimal(400))),
    "A572GR50": ("ASTM A572 Gr 50", (Decimal(50), Decimal(65)), (Decimal(345), Decimal(450))),
    "A992": ("ASTM A992", (Decimal(50), Decimal(65)), (Decimal(345), Decimal(450))),
}


# --- results -----------------------------------------------------------------------------------------------

class Step(NamedTuple):
    """One line of the calculation trail: what is computed, the formula with its numbers, the result."""

    label: str
    expression: str
    value: str


@dataclass(frozen=True)
class Finding:
    """A size or length rule checked: ok is False when the rule is not met or reduced the strength."""

    criterion: str
    ok: bool
    message: str
    source: str


@dataclass(frozen=True)
class FilletStrength:
    """Available strength of one fillet weld line, AISC 360-16 J2.4, with its trail and findings."""

    leg: Length
    leg2: Length | None
    length: Length
    effective_size: Length  # smaller leg after the l/4 rule of J2.2b
    throat: Length
    effective_length: Length
    beta: Decimal  # J2.2b end-loaded reduction factor (1 when not end loaded)
    angle: Decimal
    directional_factor: Decimal  # 1.0 + 0.50 sin^1.5 theta
    fexx: Stress
    fnw_ksi: Decimal
    system: str
    nominal_kip: Decimal
    lrfd_kip: Decimal
    asd_kip: Decimal
    nominal_kN: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal
    steps: list = field(default_factory=list)
    findings: list = field(default_factory=list)


@dataclass(frozen=True)
class WeldGroupStrength:
    """Longitudinal plus transverse fillet welds of one connection, AISC 360-16 J2.4(b) (J2.4(c) in 360-10)."""

    longitudinal: list
    transverse: list
    rnwl_kip: Decimal
    rnwt_kip: Decimal
    governs: str  # "Rnwl + Rnwt" or "0.85 Rnwl + 1.5 Rnwt"
    system: str
    nominal_kip: Decimal
    lrfd_kip: Decimal
    asd_kip: Decimal
    nominal_kN: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal
    steps: list = field(default_factory=list)
    findings: list = field(default_factory=list)


@dataclass(frozen=True)
class LimitState:
    """One base metal limit state with its own phi and Omega."""

    name: str
    source: str
    nominal_kip: Decimal
    phi: Decimal
    omega: Decimal
    lrfd_kip: Decimal
    asd_kip: Decimal
    nominal_kN: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal


@dataclass(frozen=True)
class BaseMetalStrength:
    """Shear (J4.2) or tension (J4.1) of a connected plate: the smaller limit state governs, per method."""

    check: str  # "shear" or "tension"
    limit_states: list
    governs_lrfd: str
    governs_asd: str
    system: str
    lrfd_kip: Decimal
    asd_kip: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal
    steps: list = field(default_factory=list)


@dataclass(frozen=True)
class ConnectionCapacity:
    """The smaller of the welds and the plate; governs says which ("welds" or "plate")."""

    governs: str  # by LRFD
    governs_asd: str
    governing_lrfd: str  # the limit state, e.g. "plate: shear rupture"
    governing_asd: str
    lrfd_kip: Decimal
    asd_kip: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal
    system: str
    steps: list = field(default_factory=list)


@dataclass(frozen=True)
class Capacity:
    """A strength without further detail: the as-inspected weld of two segments."""

    nominal_kip: Decimal
    lrfd_kip: Decimal
    asd_kip: Decimal
    nominal_kN: Decimal
    lrfd_kN: Decimal
    asd_kN: Decimal
    steps: list = field(default_factory=list)


@dataclass(frozen=True)
class AsInspectedCapacity:
    """A weld found undersize: its capacity as measured, conservatively, and against the required strength."""

    specified: FilletStrength
    as_inspected: Capacity  # measured minimum leg over the undersize length, specified leg over the rest
    conservative: FilletStrength  # measured minimum leg over the whole length
    method: str
    required: Force | None
    ratio: Decimal | None  # demand / capacity, as inspected
    ratio_conservative: Decimal | None
    steps: list = field(default_factory=list)
    findings: list = field(default_factory=list)


# --- input checking ------------------------------------------------------------------------------------------

def _length(value, what: str, allow_zero: bool = False) -> Length:
    try:
        length = parse_length(value)
    except UnitError as exc:
        raise UnitError(f"{what}: {exc}") from None
    if length.mm < 0 or (length.mm == 0 and not allow_zero):
        raise UnitError(f"{what} must be greater than zero, for example 1/4 in or 6 mm; got {value!r}.")
    return length


def _system_of(value, fallback: str) -> str:
    return length_system(value) or fallback


def _bool(value, what: str) -> bool:
    if not isinstance(value, bool):
        raise ValueError(f"{what} must be True or False, not {value!r}.")
    return value


def _angle(angle) -> Decimal:
    """Degrees between the line of action of the load and the weld axis, 0 to 90 inclusive."""
    hint = "write the angle between the load and the weld axis in degrees, from 0 (along) to 90 (across)"
    if isinstance(angle, bool) or not isinstance(angle, (int, float, Decimal, str)):
        raise ValueError(f"Angle {angle!r} is not a number: {hint}.")
    if isinstance(angle, float) and not math.isfinite(angle):
        raise ValueError(f"Angle {angle!r} is not a number: {hint}.")
    try:
        text = (number_text(angle, "angle") if isinstance(angle, str) else str(angle)).strip().lower()
    except UnitError as exc:
        raise ValueError(f"Angle {angle!r}: {exc} {hint[:1].upper()}{hint[1:]}.") from None
    for suffix in ("degrees", "degree", "deg", "°"):
        text = text.removesuffix(suffix).strip()
    try:
        value = Decimal(text)
    except InvalidOperation:
        raise ValueError(f"Angle {angle!r} is not a number: {hint}.") from None
    if not value.is_finite() or value < 0 or value > 90:
        raise ValueError(f"Angle {angle!r} is outside 0 to 90 degrees: {hint} (a load at 120 degrees acts "
                         "on the weld as one at 60).")
    return value


def _num(value: Decimal, figures: int = 4) -> str:
    """A number as printed in the trail: four significant figures, no trailing zeros, no exponent."""
    return format(significant(Decimal(value), figures).normalize(), "f")


def _stress_in_range(text, what: str, ksi_range, mpa_range, example: str) -> tuple[Stress, str]:
    try:
        stress, system = parse_stress(text)
    except UnitError as exc:
        raise UnitError(f"{what}: {exc}") from None
    if system == "US":
        number = stress.ksi
        if ksi_range[0] <= number <= ksi_range[1]:
            return stress, system
        if mpa_range[0] <= number <= mpa_range[1]:
            raise UnitError(f"{_num(number, 4)} ksi is not a {what}; did you mean {_num(number, 4)} MPa "
                            f"({_num(number / KSI_TO_MPA, 3)} ksi)?")
    else:
        number = stress.mpa
        if mpa_range[0] <= number <= mpa_range[1]:
            return stress, system
        if ksi_range[0] <= number <= ksi_range[1]:
            raise UnitError(f"{_num(number, 4)} MPa is not a {what}; did you mean {_num(number, 4)} ksi "
                            f"({_num(number * KSI_TO_MPA, 3)} MPa)?")
    raise UnitError(f"{text!r} is outside {ksi_range[0]}-{ksi_range[1]} ksi ({mpa_range[0]}-{mpa_range[1]} MPa), "
                    f"the range of a {what}: check the number and the unit, for example {example}.")


def _fexx(fexx) -> tuple[Stress, str]:
    return _stress_in_range(fexx, "filler metal strength", FEXX_KSI, FEXX_MPA, "70 ksi or 480 MPa")


# --- formatting for the trail --------------------------------------------------------------------------------

def _dim(length: Length, system: str) -> str:
    """A size as a person writes it: 1/4" or 6 mm; a computed length with four figures."""
    if system == "SI":
        return f"{_num(length.mm)} mm"
    if inch_fraction(length.inch)[3]:
        return format_length(length, "US").removesuffix('"') + " in"  # 1-1/2 in: no quote mark inside formulas
    return f"{_num(length.inch)} in"


def _calc_len(length: Length, system: str) -> str:
    return f"{_num(length.mm)} mm" if system == "SI" else f"{_num(length.inch)} in"


def _stress_text(ksi: Decimal, system: str) -> str:
    return f"{_num(ksi * KSI_TO_MPA)} MPa" if system == "SI" else f"{_num(ksi)} ksi"


def _force_text(kip: Decimal, system: str, both: bool = False) -> str:
    main = f"{_num(kip * KIP_TO_KN)} kN" if system == "SI" else f"{_num(kip)} kip"
    if not both:
        return main
    other = f"{_num(kip)} kip" if system == "SI" else f"{_num(kip * KIP_TO_KN)} kN"
    return f"{main} ({other})"


def _area_text(in2: Decimal, system: str) -> str:
    return f"{_num(in2 * Decimal('645.16'))} mm2" if system == "SI" else f"{_num(in2)} in2"


def _six(nominal_kip: Decimal, phi: Decimal, omega: Decimal) -> dict:
    lrfd, asd = nominal_kip * phi, nominal_kip / omega
    return dict(nominal_kip=nominal_kip, lrfd_kip=lrfd, asd_kip=asd, nominal_kN=nominal_kip * KIP_TO_KN,
                lrfd_kN=lrfd * KIP_TO_KN, asd_kN=asd * KIP_TO_KN)


def _available_steps(nominal_kip: Decimal, phi: Decimal, omega: Decimal, system: str, clause: str) -> list:
    return [
        Step(f"Design strength, LRFD ({clause})", f"phi Rn = {phi} x {_force_text(nominal_kip, system)}",
             _force_text(nominal_kip * phi, system, both=True)),
        Step(f"Allowable strength, ASD ({clause})", f"Rn / Omega = {_force_text(nominal_kip, system)} / {omega}",
             _force_text(nominal_kip / omega, system, both=True)),
    ]


# --- the directional factor, in Decimal ----------------------------------------------------------------------

_PI = Decimal("3.14159265358979323846264338327950288419716939937510582097494")
_EXACT_SINES = {Decimal(0): Decimal(0), Decimal(30): Decimal("0.5"), Decimal(90): Decimal(1)}


def _sin_degrees(degrees: Decimal) -> Decimal:
    """sin of 0..90 degrees by its Taylor series at 50 digits, exact at 0, 30 and 90 degrees.

    Decimal rather than math.sin so the trail and the stored result do not depend on float rounding, and so
    90 degrees gives exactly 1 (and the factor exactly 1.5)."""
    if degrees in _EXACT_SINES:
        return _EXACT_SINES[degrees]
    with localcontext() as ctx:
        ctx.prec = 50
        x = degrees * _PI / 180
        term, total, n = x, x, 1
        while abs(term) > Decimal("1e-48"):
            term = -term * x * x / ((2 * n) * (2 * n + 1))
            total += term
            n += 1
    return +total  # back to the default 28 digits


def directional_factor(angle) -> Decimal:
    """1.0 + 0.50 sin^1.5 theta of AISC 360-16 J2.4(a): 1 along the weld, exactly 1.5 across it."""
    sine = _sin_degrees(_angle(angle))
    return 1 + DIRECTIONAL * sine * sine.sqrt()


# --- one fillet weld line -------------------------------------------------------------------------------------

def _inches(value: Decimal) -> Length:
    """A computed length for the result and the trail; the arithmetic itself stays in exact Decimal inches."""
    return Length(value * MM_PER_INCH)


def _throat_value(a: Decimal, b: Decimal | None) -> Decimal:
    """AISC 360-16 J2.2a: 0.707 w for equal legs, a b / sqrt(a^2 + b^2) for unequal legs (any one unit)."""
    if b is None or b == a:
        return a * THROAT_EQUAL_LEGS
    return a * b / (a * a + b * b).sqrt()


def effective_throat(leg, leg2=None) -> Length:
    """Effective throat of a fillet from its specified legs (AISC 360-16 J2.2a); ISO 5817's nominal a."""
    a = parse_length(leg)
    b = None if leg2 is None else parse_length(leg2)
    if a.mm <= 0 or (b is not None and b.mm <= 0):
        raise ValueError("A fillet leg must be greater than zero, e.g. 1/4 in or 6 mm.")
    return Length(_throat_value(a.mm, None if b is None else b.mm))


def leg_for_throat(throat) -> Length:
    """The equal leg whose effective throat is `throat` (AISC 360-16 J2.2a read backwards: w = a / 0.707), for a
    drawing that gives only the throat a (ISO 2553). Rounded to the 7 places lengths are stored at, so its throat
    comes back within 1e-7 mm of a."""
    a = parse_length(throat)
    if a.mm <= 0:
        raise ValueError("A fillet throat must be greater than zero, e.g. 4 mm or 3/16 in.")
    return Length(a.mm / THROAT_EQUAL_LEGS)


def _throat(a: Decimal, b: Decimal | None, system: str) -> tuple[Decimal, Step]:
    """Effective throat in inches, AISC 360-16 J2.2a, with its step for the calculation trail."""
    throat = _throat_value(a, b)
    if b is None or b == a:
        return throat, Step("Effective throat (AISC 360-16 J2.2a)",
                            f"E = 0.707 w = 0.707 x {_dim(_inches(a), system)}", _calc_len(_inches(throat), system))
    da, db = _dim(_inches(a), system), _dim(_inches(b), system)
    return throat, Step("Effective throat, unequal legs (AISC 360-16 J2.2a, shortest distance root to face)",
                        f"E = a b / sqrt(a^2 + b^2) = {da} x {db} / sqrt(({da})^2 + ({db})^2)",
                        _calc_len(_inches(throat), system))


def _size_limited_by_length(a: Decimal, b: Decimal | None, length: Decimal, system: str):
    """J2.2b: a weld shorter than 4 w counts with an effective size of l/4 (each leg capped at l/4), inches."""
    larger = max(a, b) if b is not None else a
    need, shown = larger * MIN_LENGTH_SIZES, _dim(_inches(length), system)
    if length >= need:
        finding = Finding("minimum_length", True, f"Length {shown} is at least 4 w = {_dim(_inches(need), system)}.",
                          LENGTH_SOURCE)
        return a, b, None, finding
    cap = length / 4
    a2 = min(a, cap)
    b2 = min(b, cap) if b is not None else None
    message = (f"Length {shown} is less than 4 w = {_dim(_inches(need), system)}: the effective size is taken as "
               f"l/4 = {_dim(_inches(cap), system)} and the strength below uses it.")
    step = Step("Minimum length (AISC 360-16 J2.2b)", f"l = {shown} < 4 w = {_dim(_inches(need), system)}, so "
                "w = l/4", _dim(_inches(cap), system))
    return a2, b2, step, Finding("minimum_length", False, message, LENGTH_SOURCE)


def _end_loaded_length(length: Decimal, w: Decimal, system: str) -> tuple[Decimal, Decimal, str, str]:
    """Effective length (inches) of an end-loaded weld, AISC 360-16 J2.2b: (Le, beta, expression, message)."""
    ratio = length / w
    if ratio <= END_LOADED_FULL:
        return length, Decimal(1), f"l/w = {_num(ratio)} <= 100, beta = 1, Le = l", \
            f"l/w = {_num(ratio)} is at most 100: the full length is effective."
    if ratio <= END_LOADED_LIMIT:
        beta = min(BETA_A - BETA_B * ratio, Decimal(1))
        eff = length * beta
        return eff, beta, (f"l/w = {_num(ratio)} > 100, beta = 1.2 - 0.002 x {_num(ratio)} = {_num(beta)}, "
                           f"Le = beta l = {_num(beta)} x {_dim(_inches(length), system)}"), \
            f"l/w = {_num(ratio)} is over 100: the effective length is beta l = {_calc_len(_inches(eff), system)}."
    eff = w * END_LOADED_CAP
    return eff, eff / length, f"l/w = {_num(ratio)} > 300, Le = 180 w = 180 x {_dim(_inches(w), system)}", \
        f"l/w = {_num(ratio)} is over 300: the effective length is 180 w = {_calc_len(_inches(eff), system)}."


def _min_size_finding(thinner_part, legs_small: Length, system_fallback: str) -> Finding:
    t = _length(thinner_part, "Thinner part joined")
    system = _system_of(thinner_part, system_fallback)
    col_t, col_w = (0, 2) if system == "US" else (1, 3)
    for row in MIN_SIZE_TABLE:
        if row[col_t] is None or t <= row[col_t]:
            minimum = row[col_w]
            break
    ok = legs_small >= minimum
    verdict = "meets" if ok else "is smaller than"
    return Finding("minimum_size", ok, f"Leg {_dim(legs_small, system)} {verdict} the minimum "
                   f"{_dim(minimum, system)} for a thinner part of {_dim(t, system)}.", MIN_SIZE_SOURCE)


def _edge_finding(edge_thickness, leg_large: Length, system_fallback: str) -> Finding:
    t = _length(edge_thickness, "Thickness along the edge")
    system = _system_of(edge_thickness, system_fallback)
    if t < EDGE_THRESHOLD[system]:
        maximum, rule = t, f"t < {_dim(EDGE_THRESHOLD[system], system)}: w <= t"
    else:
        maximum = t - EDGE_ALLOWANCE[system]
        rule = f"t >= {_dim(EDGE_THRESHOLD[system], system)}: w <= t - {_dim(EDGE_ALLOWANCE[system], system)}"
    ok = leg_large <= maximum
    extra = "" if ok else " unless the drawings designate the weld to be built out to full throat"
    return Finding("maximum_size_edge", ok, f"Leg {_dim(leg_large, system)} along an edge of {_dim(t, system)} "
                   f"({rule} = {_dim(maximum, system)}) is {'within' if ok else 'over'} the maximum{extra}.",
                   LENGTH_SOURCE)


def _intermittent_finding(length: Length, w: Length, system: str) -> Finding:
    need = max(w * MIN_LENGTH_SIZES, INTERMITTENT_MIN[system])
    ok = length >= need
    return Finding("intermittent_length", ok,
                   f"Intermittent segment {_dim(length, system)} {'meets' if ok else 'is shorter than'} the "
                   f"minimum of 4 w and {_dim(INTERMITTENT_MIN[system], system)}: {_dim(need, system)}.",
                   LENGTH_SOURCE)


def fillet_strength(leg, length, fexx="70 ksi", angle=0, leg2=None, end_loaded=False, *, thinner_part=None,
                    along_edge_thickness=None, intermittent=False) -> FilletStrength:
    """Available strength of a fillet weld line loaded through its centroid, AISC 360-16 J2.4(a).

    leg and leg2 are the two legs (leg2 None: equal legs); angle is in degrees between the load and the weld
    axis (0..90). end_loaded applies the J2.2b long-weld reduction, judged with the smaller leg. The optional
    thinner_part, along_edge_thickness and intermittent add the Table J2.4 / J2.2b size and length findings; the
    US or SI values are used by the unit each thickness was written in.
    """
    a = _length(leg, "Leg")
    b = _length(leg2, "Second leg") if leg2 is not None else None
    line = _length(length, "Weld length")
    stress, stress_system = _fexx(fexx)
    theta = _angle(angle)
    end_loaded = _bool(end_loaded, "end_loaded")
    intermittent = _bool(intermittent, "intermittent")
    system = _system_of(leg, stress_system)

    steps, findings = [], []
    if thinner_part is not None:
        findings.append(_min_size_finding(thinner_part, min(a, b) if b is not None else a, system))
    if along_edge_thickness is not None:
        findings.append(_edge_finding(along_edge_thickness, max(a, b) if b is not None else a, system))
    if intermittent:
        findings.append(_intermittent_finding(line, max(a, b) if b is not None else a, system))

    a_in, b_in = a.inch, (b.inch if b is not None else None)
    ea, eb, cap_step, length_finding = _size_limited_by_length(a_in, b_in, line.inch, system)
    findings.append(length_finding)
    if cap_step:
        steps.append(cap_step)
    throat, throat_step = _throat(ea, eb, system)
    steps.append(throat_step)
    smaller = min(ea, eb) if eb is not None else ea

    if end_loaded:
        eff, beta, expression, message = _end_loaded_length(line.inch, smaller, system)
        findings.append(Finding("end_loaded_length", beta == 1, message, LENGTH_SOURCE))
    else:
        eff, beta, expression = line.inch, Decimal(1), "not end loaded: Le = l"
    steps.append(Step("Effective length (AISC 360-16 J2.2b)", expression, _calc_len(_inches(eff), system)))

    factor = directional_factor(theta)
    fnw = FNW_FACTOR * stress.ksi * factor
    if theta == 0:
        steps.append(Step("Nominal stress (AISC 360-16 J2.4, Table J2.5)",
                          f"Fnw = 0.60 FEXX = 0.60 x {_stress_text(stress.ksi, system)}", _stress_text(fnw, system)))
    else:
        sine = _sin_degrees(theta)
        steps.append(Step("Directional factor (AISC 360-16 J2.4(a))",
                          f"1.0 + 0.50 sin^1.5 theta = 1.0 + 0.50 x sin^1.5({_num(theta)} deg) = 1.0 + 0.50 x "
                          f"{_num(sine * sine.sqrt())}", _num(factor)))
        steps.append(Step("Nominal stress (AISC 360-16 J2.4(a))",
                          f"Fnw = 0.60 FEXX (1.0 + 0.50 sin^1.5 theta) = 0.60 x {_stress_text(stress.ksi, system)}"
                          f" x {_num(factor)}", _stress_text(fnw, system)))
    area = throat * eff
    steps.append(Step("Effective area (AISC 360-16 J2.4)",
                      f"Awe = E Le = {_calc_len(_inches(throat), system)} x {_calc_len(_inches(eff), system)}",
                      _area_text(area, system)))
    nominal = fnw * area
    steps.append(Step("Nominal strength (AISC 360-16 J2.4)",
                      f"Rn = Fnw Awe = {_stress_text(fnw, system)} x {_area_text(area, system)}",
                      _force_text(nominal, system, both=True)))
    steps.extend(_available_steps(nominal, PHI_WELD, OMEGA_WELD, system, "AISC 360-16 J2.4, Table J2.5"))
    return FilletStrength(leg=a, leg2=b, length=line, effective_size=_inches(smaller), throat=_inches(throat),
                          effective_length=_inches(eff),
                          beta=beta, angle=theta, directional_factor=factor, fexx=stress, fnw_ksi=fnw, system=system,
                          steps=steps, findings=findings, **_six(nominal, PHI_WELD, OMEGA_WELD))


# --- a group of longitudinal and transverse welds -------------------------------------------------------------

_SEGMENT_KEYS = {"leg", "length", "leg2", "end_loaded", "thinner_part", "along_edge_thickness", "intermittent"}


def _segment(segment, fexx, where: str) -> FilletStrength:
    """A segment is {"leg": ..., "length": ..., optional leg2, end_loaded, ...} or a pair (leg, length)."""
    if isinstance(segment, (tuple, list)) and len(segment) == 2:
        segment = {"leg": segment[0], "length": segment[1]}
    if not isinstance(segment, dict):
        raise ValueError(f"{where}: a weld segment is a dict such as {{'leg': '1/4 in', 'length': '6 in'}} or a "
                         f"pair ('1/4 in', '6 in'), not {segment!r}.")
    unknown = set(segment) - _SEGMENT_KEYS
    if unknown:
        raise ValueError(f"{where}: unknown key(s) {sorted(map(str, unknown))}; a segment takes "
                         f"{sorted(_SEGMENT_KEYS)}.")
    if "leg" not in segment or "length" not in segment:
        raise ValueError(f"{where}: a segment needs 'leg' and 'length', for example "
                         "{'leg': '1/4 in', 'length': '6 in'}.")
    # J2.4(b): both Rnwl and Rnwt are taken with Fnw = 0.60 FEXX, without the directional increase of J2.4(a).
    return fillet_strength(fexx=fexx, angle=0, **segment)


def weld_group_strength(longitudinal=(), transverse=(), fexx="70 ksi") -> WeldGroupStrength:
    """Concentrically loaded group of longitudinal and transverse fillet welds of uniform leg, AISC 360-16 J2.4(b)
    (J2.4(c) in the 2010 edition):
    Rn = max(Rnwl + Rnwt, 0.85 Rnwl + 1.5 Rnwt), both taken without the directional increase."""
    for name, value in (("longitudinal", longitudinal), ("transverse", transverse)):
        if isinstance(value, (str, dict)) or not hasattr(value, "__iter__"):
            raise ValueError(f"{name} must be a list of weld segments, for example [('1/4 in', '6 in')].")
    longs = [_segment(s, fexx, f"longitudinal weld {i + 1}") for i, s in enumerate(longitudinal)]
    trans = [_segment(s, fexx, f"transverse weld {i + 1}") for i, s in enumerate(transverse)]
    if not longs and not trans:
        raise ValueError("A weld group needs at least one longitudinal or transverse weld segment.")
    system = (longs or trans)[0].system
    rnwl = sum((s.nominal_kip for s in longs), Decimal(0))
    rnwt = sum((s.nominal_kip for s in trans), Decimal(0))
    plain = rnwl + rnwt
    combined = GROUP_LONGITUDINAL * rnwl + GROUP_TRANSVERSE * rnwt
    governs = "Rnwl + Rnwt" if plain >= combined else "0.85 Rnwl + 1.5 Rnwt"
    nominal = max(plain, combined)
    steps = [
        Step("Longitudinal welds (AISC 360-16 J2.4(b))", "Rnwl = sum of 0.60 FEXX Awe of the longitudinal welds"
             + (" = " + " + ".join(_force_text(s.nominal_kip, system) for s in longs) if longs else ""),
             _force_text(rnwl, system)),
        Step("Transverse welds (AISC 360-16 J2.4(b))", "Rnwt = sum of 0.60 FEXX Awe of the transverse welds, "
             "without the directional increase" + (" = " + " + ".join(_force_text(s.nominal_kip, system)
                                                                        for s in trans) if trans else ""),
             _force_text(rnwt, system)),
        Step("Case (a) (AISC 360-16 J2.4(b))", f"Rn = Rnwl + Rnwt = {_force_text(rnwl, system)} + "
             f"{_force_text(rnwt, system)}", _force_text(plain, system)),
        Step("Case (b) (AISC 360-16 J2.4(b))", f"Rn = 0.85 Rnwl + 1.5 Rnwt = 0.85 x {_force_text(rnwl, system)} + "
             f"1.5 x {_force_text(rnwt, system)}", _force_text(combined, system)),
        Step("Nominal strength, the larger case governs (AISC 360-16 J2.4(b))", f"Rn = {governs}",
             _force_text(nominal, system, both=True)),
    ]
    steps.extend(_available_steps(nominal, PHI_WELD, OMEGA_WELD, system, "AISC 360-16 J2.4, Table J2.5"))
    findings = [f for s in longs + trans for f in s.findings]
    return WeldGroupStrength(longitudinal=longs, transverse=trans, rnwl_kip=rnwl, rnwt_kip=rnwt, governs=governs,
                             system=system, steps=steps, findings=findings, **_six(nominal, PHI_WELD, OMEGA_WELD))


# --- base metal ---------------------------------------------------------------------------------------------

def _material_key(name) -> str:
    if not isinstance(name, str):
        raise ValueError(f"Material must be a name such as 'ASTM A36', 'ASTM A572 Gr 50' or 'ASTM A992', "
                         f"not {name!r}.")
    key = name.upper().replace("ASTM", "").replace("GRADE", "GR").replace(" ", "").replace("-", "")
    if key not in MATERIALS:
        raise ValueError(f"Unknown material {name!r}: known are {', '.join(m[0] for m in MATERIALS.values())}; "
                         "otherwise give fy and fu, e.g. fy='50 ksi', fu='65 ksi'.")
    return key


def _fy_fu(fy, fu, material, system: str) -> tuple[Decimal, Decimal, str, str]:
    """(Fy ksi, Fu ksi, label for the trail, system of the stresses)."""
    if material is not None:
        if fy is not None or fu is not None:
            raise ValueError("Give either material (e.g. 'ASTM A36') or fy and fu, not both.")
        label, ksi, mpa = MATERIALS[_material_key(material)]
        if system == "SI":  # the MPa figures as the material standard prints them
            return mpa[0] / KSI_TO_MPA, mpa[1] / KSI_TO_MPA, label, system
        return ksi[0], ksi[1], label, system
    if fy is None or fu is None:
        raise ValueError("Give fy and fu (e.g. fy='36 ksi', fu='58 ksi') or a material such as 'ASTM A36'.")
    y, ysys = _stress_in_range(fy, "steel yield stress Fy", STEEL_KSI, STEEL_MPA, "36 ksi or 250 MPa")
    u, _ = _stress_in_range(fu, "steel tensile strength Fu", STEEL_KSI, STEEL_MPA, "58 ksi or 400 MPa")
    if y.mpa >= u.mpa:
        raise ValueError(f"Fy {fy!r} must be less than Fu {fu!r}: check that the two are not swapped.")
    return y.ksi, u.ksi, "given", system


def _limit(name: str, source: str, nominal: Decimal, phi: Decimal, omega: Decimal) -> LimitState:
    return LimitState(name=name, source=source, phi=phi, omega=omega, **_six(nominal, phi, omega))


def _base_result(check: str, states: list, system: str, steps: list) -> BaseMetalStrength:
    lrfd = min(states, key=lambda s: s.lrfd_kip)
    asd = min(states, key=lambda s: s.asd_kip)
    steps.append(Step(f"Governing, LRFD ({lrfd.source})", f"smaller of {', '.join(s.name for s in states)}",
                      f"{lrfd.name}: {_force_text(lrfd.lrfd_kip, system, both=True)}"))
    steps.append(Step(f"Governing, ASD ({asd.source})", f"smaller of {', '.join(s.name for s in states)}",
                      f"{asd.name}: {_force_text(asd.asd_kip, system, both=True)}"))
    return BaseMetalStrength(check=check, limit_states=states, governs_lrfd=lrfd.name, governs_asd=asd.name,
                             system=system, lrfd_kip=lrfd.lrfd_kip, asd_kip=asd.asd_kip, lrfd_kN=lrfd.lrfd_kN,
                             asd_kN=asd.asd_kN, steps=steps)


def base_metal_shear(thickness, length, fy=None, fu=None, *, material=None) -> BaseMetalStrength:
    """Shear yielding and shear rupture of the plate along a weld, AISC 360-16 J4.2.

    Welded, no holes: Anv = Agv = t l. fy / fu as '36 ksi' / '250 MPa', or material='ASTM A36' (the ksi or MPa
    figures are used by the unit the thickness was written in)."""
    t = _length(thickness, "Plate thickness")
    line = _length(length, "Shear length")
    system = _system_of(thickness, "US")
    fy_ksi, fu_ksi, label, system = _fy_fu(fy, fu, material, system)
    agv = t.inch * line.inch
    yield_kip = SHEAR_FACTOR * fy_ksi * agv
    rupture_kip = SHEAR_FACTOR * fu_ksi * agv
    source_y, source_r = f"{SPEC} J4.2(a)", f"{SPEC} J4.2(b)"
    steps = [
        Step("Base metal" + ("" if label == "given" else f" ({label})"), "Fy, Fu",
             f"Fy = {_stress_text(fy_ksi, system)}, Fu = {_stress_text(fu_ksi, system)}"),
        Step(f"Shear area ({source_y})", f"Agv = Anv = t l = {_dim(t, system)} x {_dim(line, system)} (welded, no "
             "holes)", _area_text(agv, system)),
        Step(f"Shear yielding ({source_y})", f"Rn = 0.60 Fy Agv = 0.60 x {_stress_text(fy_ksi, system)} x "
             f"{_area_text(agv, system)}", _force_text(yield_kip, system, both=True)),
        Step(f"Shear yielding, LRFD / ASD ({source_y})", f"phi = {PHI_SHEAR_YIELD}, Omega = {OMEGA_SHEAR_YIELD}",
             f"{_force_text(yield_kip * PHI_SHEAR_YIELD, system)} / "
             f"{_force_text(yield_kip / OMEGA_SHEAR_YIELD, system)}"),
        Step(f"Shear rupture ({source_r})", f"Rn = 0.60 Fu Anv = 0.60 x {_stress_text(fu_ksi, system)} x "
             f"{_area_text(agv, system)}", _force_text(rupture_kip, system, both=True)),
        Step(f"Shear rupture, LRFD / ASD ({source_r})", f"phi = {PHI_SHEAR_RUPTURE}, Omega = {OMEGA_SHEAR_RUPTURE}",
             f"{_force_text(rupture_kip * PHI_SHEAR_RUPTURE, system)} / "
             f"{_force_text(rupture_kip / OMEGA_SHEAR_RUPTURE, system)}"),
    ]
    states = [_limit("shear yielding", source_y, yield_kip, PHI_SHEAR_YIELD, OMEGA_SHEAR_YIELD),
              _limit("shear rupture", source_r, rupture_kip, PHI_SHEAR_RUPTURE, OMEGA_SHEAR_RUPTURE)]
    return _base_result("shear", states, system, steps)


def plate_tension(width, thickness, fy=None, fu=None, net_area=None, *, material=None) -> BaseMetalStrength:
    """Tension yielding and tension rupture of a connecting plate, AISC 360-16 J4.1.

    net_area is the effective net area Ae ('4.5 in2', '2900 mm2'); without it Ae = Ag (no holes, U = 1.0): the
    engineer confirms shear lag (AISC 360-16 D3) where the weld does not reach across the plate."""
    w = _length(width, "Plate width")
    t = _length(thickness, "Plate thickness")
    system = _system_of(thickness, "US")
    fy_ksi, fu_ksi, label, system = _fy_fu(fy, fu, material, system)
    ag = w.inch * t.inch
    if net_area is None:
        ae, ae_text = ag, "Ae = Ag (no holes, U = 1.0 assumed)"
    else:
        try:
            ae = parse_area(net_area).in2
        except UnitError as exc:
            raise UnitError(f"Net area: {exc}") from None
        if ae > ag:
            raise ValueError(f"Net area {net_area!r} is larger than the gross area {_area_text(ag, system)}: "
                             "the effective net area can only be equal or smaller.")
        ae_text = f"Ae = {net_area} (given)"
    yield_kip, rupture_kip = fy_ksi * ag, fu_ksi * ae
    source_y, source_r = f"{SPEC} J4.1(a)", f"{SPEC} J4.1(b)"
    steps = [
        Step("Base metal" + ("" if label == "given" else f" ({label})"), "Fy, Fu",
             f"Fy = {_stress_text(fy_ksi, system)}, Fu = {_stress_text(fu_ksi, system)}"),
        Step(f"Gross area ({source_y})", f"Ag = b t = {_dim(w, system)} x {_dim(t, system)}", _area_text(ag, system)),
        Step(f"Effective net area ({source_r})", ae_text, _area_text(ae, system)),
        Step(f"Tension yielding ({source_y})",
             f"Rn = Fy Ag = {_stress_text(fy_ksi, system)} x {_area_text(ag, system)}",
             _force_text(yield_kip, system, both=True)),
        Step(f"Tension rupture ({source_r})",
             f"Rn = Fu Ae = {_stress_text(fu_ksi, system)} x {_area_text(ae, system)}",
             _force_text(rupture_kip, system, both=True)),
        Step(f"Tension, LRFD / ASD ({SPEC} J4.1)",
             f"yielding phi = {PHI_TENSION_YIELD}, Omega = {OMEGA_TENSION_YIELD}; "
             f"rupture phi = {PHI_TENSION_RUPTURE}, Omega = {OMEGA_TENSION_RUPTURE}",
             f"yielding {_force_text(yield_kip * PHI_TENSION_YIELD, system)} / "
             f"{_force_text(yield_kip / OMEGA_TENSION_YIELD, system)}; rupture "
             f"{_force_text(rupture_kip * PHI_TENSION_RUPTURE, system)} / "
             f"{_force_text(rupture_kip / OMEGA_TENSION_RUPTURE, system)}"),
    ]
    states = [_limit("tension yielding", source_y, yield_kip, PHI_TENSION_YIELD, OMEGA_TENSION_YIELD),
              _limit("tension rupture", source_r, rupture_kip, PHI_TENSION_RUPTURE, OMEGA_TENSION_RUPTURE)]
    return _base_result("tension", states, system, steps)


def connection_capacity(welds, base_metal) -> ConnectionCapacity:
    """The available strength of a welded connection: the smaller of the welds and each plate limit state.

    welds is a fillet_strength or weld_group_strength result; base_metal one or a list of base_metal_shear /
    plate_tension results. LRFD and ASD are judged separately (their phi and Omega differ by limit state)."""
    if not isinstance(welds, (FilletStrength, WeldGroupStrength)):
        raise ValueError("welds must be the result of fillet_strength() or weld_group_strength().")
    plates = [base_metal] if isinstance(base_metal, BaseMetalStrength) else base_metal
    if isinstance(plates, (str, dict)) or not hasattr(plates, "__iter__"):
        raise ValueError("base_metal must be a base_metal_shear() / plate_tension() result or a list of them.")
    plates = list(plates)
    if not plates or not all(isinstance(p, BaseMetalStrength) for p in plates):
        raise ValueError("base_metal must hold at least one base_metal_shear() or plate_tension() result.")
    system = welds.system
    candidates = [("welds", "welds: fillet weld shear (AISC 360-16 J2.4)", welds.lrfd_kip, welds.asd_kip)]
    candidates += [("plate", f"plate: {s.name} ({s.source})", s.lrfd_kip, s.asd_kip)
                   for p in plates for s in p.limit_states]
    lrfd = min(candidates, key=lambda c: c[2])
    asd = min(candidates, key=lambda c: c[3])
    steps = [Step("Candidate", c[1], f"LRFD {_force_text(c[2], system)}, ASD {_force_text(c[3], system)}")
             for c in candidates]
    steps.append(Step("Connection, LRFD: the smallest governs", lrfd[1], _force_text(lrfd[2], system, both=True)))
    steps.append(Step("Connection, ASD: the smallest governs", asd[1], _force_text(asd[3], system, both=True)))
    return ConnectionCapacity(governs=lrfd[0], governs_asd=asd[0], governing_lrfd=lrfd[1], governing_asd=asd[1],
                              lrfd_kip=lrfd[2], asd_kip=asd[3], lrfd_kN=lrfd[2] * KIP_TO_KN,
                              asd_kN=asd[3] * KIP_TO_KN, system=system, steps=steps)


# --- a weld as inspected -----------------------------------------------------------------------------------

def as_inspected_capacity(specified_leg, length, measured_min_leg, undersize_length, fexx="70 ksi", angle=0,
                          required=None, *, end_loaded=False, method="LRFD",
                          specified_leg2=None) -> AsInspectedCapacity:
    """Capacity of a fillet found undersize, for an NCR disposition (the engineer of record decides).

    (a) as inspected: the smallest measured leg over the undersize length plus the specified leg over the rest;
    (b) conservative: the smallest measured leg over the whole length; (c) demand / capacity when required
    ('12 kip', '50 kN') is given, against phi Rn (method='LRFD') or Rn / Omega ('ASD'). A measured leg larger than
    specified is not credited. The 4 w rule and the end-loaded reduction (J2.2b) are judged on the whole weld.

    Unequal legs (specified_leg2): only the smallest leg is measured, so over the undersize length each leg is
    credited with min(measured, its specified size): the unmeasured leg is at least the smallest one, and no more
    is assumed (our choice, conservative). The throat is then a b / sqrt(a^2 + b^2), AISC 360-16 J2.2a."""
    spec_leg = _length(specified_leg, "Specified leg")
    spec_leg2 = _length(specified_leg2, "Specified second leg") if specified_leg2 is not None else None
    line = _length(length, "Weld length")
    measured = _length(measured_min_leg, "Smallest measured leg")
    under = _length(undersize_length, "Undersize length", allow_zero=True)
    if under > line:
        raise ValueError(f"Undersize length {undersize_length!r} is longer than the weld ({length!r}): it is the "
                         "total length found under the specified size, so at most the weld length.")
    if method not in ("LRFD", "ASD"):
        raise ValueError(f"method must be 'LRFD' or 'ASD', not {method!r}.")
    force = None
    if required is not None:
        try:
            force = parse_force(required)
        except UnitError as exc:
            raise UnitError(f"Required strength: {exc}") from None
    specified = fillet_strength(spec_leg, line, fexx, angle, leg2=specified_leg2, end_loaded=end_loaded)
    system = _system_of(specified_leg, specified.system)
    unequal = spec_leg2 is not None and spec_leg2 != spec_leg
    if unequal:
        (small, small_text), (large, large_text) = sorted(
            [(spec_leg, specified_leg), (spec_leg2, specified_leg2)], key=lambda pair: pair[0])
    else:
        (small, small_text), (large, large_text) = (spec_leg, specified_leg), (spec_leg, specified_leg)
    credited, credited2 = min(measured, small), min(measured, large)  # legs credited over the undersize length
    # the text as typed, so the conservative trail speaks in the inspector's unit system
    if measured <= small:
        conservative = fillet_strength(measured_min_leg, line, fexx, angle, end_loaded=end_loaded)
    else:
        conservative = fillet_strength(small_text, line, fexx, angle, end_loaded=end_loaded,
                                       leg2=measured_min_leg if measured < large else large_text if unequal else None)

    steps = []
    if measured > small:
        shown = (_dim(credited, system) if credited == credited2
                 else f"{_dim(credited, system)} x {_dim(credited2, system)}")
        specified_shown = _dim(small, system) if not unequal else f"{_dim(small, system)} x {_dim(large, system)}"
        steps.append(Step("Measured leg", f"{_dim(measured, system)} > specified {_dim(small, system)}: "
                          f"credited no more than specified ({specified_shown})", shown))
    # J2.2b 4 w rule on the whole weld: each leg at most l/4.
    cap = line.inch / 4
    spec_a, spec_b = min(small.inch, cap), min(large.inch, cap)
    meas_a, meas_b = min(credited.inch, cap), min(credited2.inch, cap)
    meas_eff = meas_a  # the smallest credited leg: the end-loaded reduction is judged with it
    if spec_b < large.inch:
        steps.append(Step("Minimum length (AISC 360-16 J2.2b)", f"l = {_dim(line, system)} < 4 w, so w = l/4",
                          _dim(_inches(cap), system)))
    e_spec, spec_step = _throat(spec_a, spec_b if spec_b != spec_a else None, system)
    e_meas, meas_step = _throat(meas_a, meas_b if meas_b != meas_a else None, system)
    sound = line.inch - under.inch
    if end_loaded:  # the whole weld's reduction, judged with its smallest leg, shared by both segments
        eff, _, expression, _ = _end_loaded_length(line.inch, meas_eff, system)
        share = eff / line.inch
        steps.append(Step("Effective length, whole weld (AISC 360-16 J2.2b)", expression,
                          _calc_len(_inches(eff), system)))
    else:
        share = Decimal(1)
    fnw = specified.fnw_ksi
    area = (e_meas * under.inch + e_spec * sound) * share
    nominal = fnw * area
    steps += [
        Step("Nominal stress (AISC 360-16 J2.4)", "Fnw as for the specified weld", _stress_text(fnw, system)),
        Step("Throat, undersize portion (AISC 360-16 J2.2a)", meas_step.expression, meas_step.value),
        Step("Throat, full-size portion (AISC 360-16 J2.2a)", spec_step.expression, spec_step.value),
        Step("Effective area, two segments (AISC 360-16 J2.4)",
             f"Awe = ({meas_step.value} x {_dim(under, system)} + {spec_step.value} x "
             f"{_dim(_inches(sound), system)})" + (f" x {_num(share)}" if share != 1 else ""),
             _area_text(area, system)),
        Step("Nominal strength as inspected (AISC 360-16 J2.4)",
             f"Rn = Fnw Awe = {_stress_text(fnw, system)} x {_area_text(area, system)}",
             _force_text(nominal, system, both=True)),
    ]
    steps.extend(_available_steps(nominal, PHI_WELD, OMEGA_WELD, system, "AISC 360-16 J2.4, Table J2.5"))
    as_inspected = Capacity(steps=list(steps), **_six(nominal, PHI_WELD, OMEGA_WELD))
    credited_shown = (_dim(credited, system) if credited == credited2
                      else f"{_dim(credited, system)} x {_dim(credited2, system)}")
    steps.append(Step("Conservative: smallest leg over the whole length (AISC 360-16 J2.4)",
                      f"w = {credited_shown}, l = {_dim(line, system)}",
                      _force_text(conservative.lrfd_kip if method == "LRFD" else conservative.asd_kip, system,
                                  both=True) + f" ({method})"))

    findings = list(specified.findings)
    ratio = ratio_conservative = None
    if force is not None:
        symbol = "phi Rn" if method == "LRFD" else "Rn / Omega"
        available = as_inspected.lrfd_kip if method == "LRFD" else as_inspected.asd_kip
        available_c = conservative.lrfd_kip if method == "LRFD" else conservative.asd_kip
        ratio, ratio_conservative = force.kip / available, force.kip / available_c
        shown = format_force(force, system)
        steps.append(Step(f"Demand / capacity, as inspected ({SPEC} B3, {method})",
                          f"{shown} / {symbol} = {shown} / {_force_text(available, system)}", _num(ratio, 3)))
        steps.append(Step(f"Demand / capacity, conservative ({SPEC} B3, {method})",
                          f"{shown} / {_force_text(available_c, system)}", _num(ratio_conservative, 3)))
        ok = ratio <= 1
        findings.append(Finding("demand_capacity", ok,
                                f"Required {shown} {'is within' if ok else 'exceeds'} the as-inspected {symbol} of "
                                f"{_force_text(available, system)} (ratio {_num(ratio, 3)}; with the smallest leg over "
                                f"the whole length {_num(ratio_conservative, 3)}).", f"{SPEC} B3, J2.4"))
    return AsInspectedCapacity(specified=specified, as_inspected=as_inspected, conservative=conservative,
                               method=method, required=force, ratio=ratio, ratio_conservative=ratio_conservative,
                               steps=steps, findings=findings)


# --- demand over capacity, for any result ---------------------------------------------------------------------

@dataclass(frozen=True)
class DemandCapacity:
    """Required strength over available strength, AISC 360-16 B3 (LRFD: Ru <= phi Rn; ASD: Ra <= Rn / Omega)."""

    method: str
    required: Force
    available_kip: Decimal
    available_kN: Decimal
    ratio: Decimal
    ok: bool
    steps: list = field(default_factory=list)
    findings: list = field(default_factory=list)


def demand_capacity(result, required, method="LRFD") -> DemandCapacity:
    """Compare a required strength ('12 kip', '50 kN') with a result's phi Rn (LRFD) or Rn / Omega (ASD).

    result is any result of this module with lrfd_kip and asd_kip (a weld, a group, a connection, a plate)."""
    if method not in ("LRFD", "ASD"):
        raise ValueError(f"method must be 'LRFD' or 'ASD', not {method!r}.")
    if not hasattr(result, "lrfd_kip") or not hasattr(result, "asd_kip"):
        raise ValueError("result must be a strength result of inspections.strength (with lrfd_kip and asd_kip).")
    try:
        force = parse_force(required)
    except UnitError as exc:
        raise UnitError(f"Required strength: {exc}") from None
    if force.kn <= 0:
        raise UnitError(f"Required strength must be greater than zero, for example 12 kip or 50 kN; got {required!r}.")
    system = getattr(result, "system", None) or "US"
    available = result.lrfd_kip if method == "LRFD" else result.asd_kip
    symbol = "phi Rn" if method == "LRFD" else "Rn / Omega"
    ratio = force.kip / available
    ok = ratio <= 1
    shown = format_force(force, system)
    step = Step(f"Demand / capacity ({SPEC} B3, {method})",
                f"{shown} / {symbol} = {shown} / {_force_text(available, system)}", _num(ratio, 3))
    found = Finding("demand_capacity", ok, f"Required {shown} {'is within' if ok else 'exceeds'} the available "
                    f"{symbol} of {_force_text(available, system)} (ratio {_num(ratio, 3)}).", f"{SPEC} B3")
    return DemandCapacity(method=method, required=force, available_kip=available, available_kN=available * KIP_TO_KN,
                          ratio=ratio, ok=ok, steps=[step], findings=[found])


def filler_strength(fexx) -> Stress:
    """Read and check a filler metal strength ('70 ksi', '480 MPa') as fillet_strength would; ValueError if not."""
    return _fexx(fexx)[0]
