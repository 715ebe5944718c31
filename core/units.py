"""Lengths, temperatures, stresses, forces and speeds: parse what a person types, convert, format.

Plain Python, no Django: the engines, the forms, the PDFs and the management commands all call it,
so a unit is parsed and printed in exactly one place.

Lengths are kept as Decimal millimetres quantized to 7 places: 1 in is 25.4 mm by definition
(international yard and pound agreement, 1959), so every binary fraction of an inch down to 1/128
(0.1984375 mm) is stored exactly. Floats never touch a measured size.

What a person may type, for every quantity (our rules, not a standard's):
- a decimal point or a decimal comma ("0,4 mm", "6,35mm", "1,5 in"): a comma is read as the decimal mark only when
  the text has no point and the comma is the only one; "1,000 in" (a comma followed by three digits after a whole
  number that does not start with 0) could be a thousands separator, so it is refused with a message asking for
  1000 or 1.000; "0,125 in" is read as 0.125 in;
- at most 15 digits before the decimal mark (22-digit numbers and the like are refused with a message); exponents
  (1e3), NaN and Infinity are refused with a message too, never with an arithmetic error;
- a leading "≈" (as format_length prints a rounded value) is read as the value printed.
"""

from __future__ import annotations

import functools
import re
import unicodedata
from dataclasses import dataclass
from decimal import ROUND_HALF_UP, Decimal, InvalidOperation
from fractions import Fraction

MM_PER_INCH = Decimal("25.4")  # exact by definition
MM_PLACES = Decimal("0.0000001")  # 1/128 in is exact at 7 places
# 100 m: a typo guard (common practice, no source): no weld, plate or member dimension of a fabrication shop is
# that long, so a longer length is taken as a slip of the unit or the number.
MAX_LENGTH_MM = Decimal("100000")
MAX_INPUT_CHARS = 40
# Digits before the decimal mark: no gauge or drawing gives more, and more would overflow Decimal's 28-digit context
# once converted and quantized. Digits after the mark are not limited (beyond MAX_INPUT_CHARS): the forms write a
# stored length that is no binary fraction of an inch as its exact decimal inches, up to 28 digits, and read it back.
MAX_DIGITS = 15
APPROX = "\u2248"  # ≈: printed before a value rounded for printing

SYSTEMS = ("US", "SI")

# Unicode vulgar fractions a tablet keyboard or a pasted drawing note may carry.
_VULGAR = {"¼": "1/4", "½": "1/2", "¾": "3/4", "⅛": "1/8", "⅜": "3/8", "⅝": "5/8", "⅞": "7/8",
           "⅙": "1/6", "⅓": "1/3", "⅔": "2/3", "⅕": "1/5", "⅖": "2/5", "⅗": "3/5", "⅘": "4/5"}

_NUMBER = r"(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)"
# whole, optional mixed fraction: "1-1/2", "1 1/2", "3/16", "0.1875", ".25"
_QUANTITY = re.compile(
    rf"""^\s*
    (?:
        (?P<whole>[0-9]+)(?:\s*-\s*|\s+)(?P<num>[0-9]+)\s*/\s*(?P<den>[0-9]+)   # mixed number
      | (?P<fnum>[0-9]+)\s*/\s*(?P<fden>[0-9]+)                                # plain fraction
      | (?P<dec>{_NUMBER})                                                       # decimal
    )
    \s*(?P<unit>[^\s0-9./-].*?)?\s*$""",
    re.VERBOSE,
)
_EXPONENT = re.compile(r"[0-9.]\s*[eE]\s*[-+]?[0-9]")
_FEET_INCHES = re.compile(r"^\s*(?P<ft>[0-9]+)\s*(?:'|ft)\s*-?\s*(?P<rest>.+?)\s*$")

_LENGTH_UNITS = {
    "mm": Decimal(1), "millimetre": Decimal(1), "millimetres": Decimal(1), "millimeter": Decimal(1),
    "millimeters": Decimal(1), "cm": Decimal(10), "m": Decimal(1000),
    "in": MM_PER_INCH, "in.": MM_PER_INCH, "inch": MM_PER_INCH, "inches": MM_PER_INCH, '"': MM_PER_INCH,
    "''": MM_PER_INCH, "ft": MM_PER_INCH * 12, "feet": MM_PER_INCH * 12, "foot": MM_PER_INCH * 12,
    "'": MM_PER_INCH * 12,
}
_INCH_UNITS = {"in", "in.", "inch", "inches", '"', "''"}


class UnitError(ValueError):
    """A quantity a person typed that cannot be read; the message says what would be right."""


def _a(what: str) -> str:
    """'a length', 'an amperage': the article a message needs."""
    return f"{'an' if what[:1] in 'aeiou' else 'a'} {what}"


def _cap(text: str) -> str:
    return text[:1].upper() + text[1:]


_RAISED, _LOWERED = "⁰¹²³⁴⁵⁶⁷⁸⁹", "₀₁₂₃₄₅₆₇₈₉"
_SMALL_DIGITS = _RAISED + _LOWERED
# ¹⁄₁₆ as some keyboards write a fraction: read as 1/16.
_SMALL_FRACTION = re.compile(f"([{_RAISED}]+)[\u2044/]([{_LOWERED}]+)")
# A raised digit after a letter is a unit's exponent (in², N/mm²); anywhere else NFKC would read 5² as 52.
_STRAY_SMALL_DIGIT = re.compile(f"(?<![A-Za-z{_SMALL_DIGITS}])[{_SMALL_DIGITS}]")


def _small_fraction(match) -> str:
    plain = str.maketrans(_SMALL_DIGITS, "0123456789" * 2)
    return f" {match.group(1).translate(plain)}/{match.group(2).translate(plain)}"


def _normalise(text: str) -> str:
    """Unicode a keyboard or a pasted note may carry, as plain text: vulgar fractions, full-width digits,
    non-breaking spaces, fraction and division slashes, primes, minus signs, and the degree look-alikes.
    A raised or lowered digit that is not a unit's exponent or part of a fraction is refused, not read."""
    for mark, plain in _VULGAR.items():  # before NFKC, which would turn 1½ into 11⁄2
        text = text.replace(mark, f" {plain}")
    text = _SMALL_FRACTION.sub(_small_fraction, text)
    if _STRAY_SMALL_DIGIT.search(text):
        raise UnitError(f"'{text.strip()}' has a raised or lowered digit (such as ²): write the number in plain "
                        "digits.")
    # before NFKC, which turns the ordinal indicator º into the letter o and the ring above ˚ into a space
    text = text.replace("\u00ba", "\u00b0").replace("\u02da", "\u00b0")
    text = unicodedata.normalize("NFKC", text)  # full-width digits, non-breaking spaces
    text = text.replace("\u2044", "/").replace("\u2215", "/")  # fraction slash, division slash
    text = text.replace("\u2033", '"').replace("\u2032", "'").replace("\u201d", '"').replace("\u2019", "'")
    text = text.replace("\u2212", "-").replace("\u2013", "-")  # minus sign, en dash
    return text.strip().removeprefix(APPROX).strip()


_THOUSANDS = re.compile(r"(?<![0-9.])[1-9][0-9]{0,2},[0-9]{3}(?![0-9])")
_DIGIT_RUN = re.compile(r"[0-9]+(?:[.,][0-9]*)?")


def _numbers(text: str, what: str) -> str:
    """The text with its decimal comma read as a point, once the number is known to be plain and not too long."""
    for run in _DIGIT_RUN.findall(text):
        if len(re.split(r"[.,]", run)[0]) > MAX_DIGITS:
            raise UnitError(f"'{text}' has a number of more than {MAX_DIGITS} digits before the decimal mark: no "
                            f"measurement is written so; write it as {_EXAMPLES[what]}.")
    if "," not in text:
        return text
    if "." in text:
        raise UnitError(f"'{text}' has both a comma and a point: write the number with one decimal mark and no "
                        f"thousands separator, such as {_EXAMPLES[what]}.")
    if text.count(",") > 1:
        raise UnitError(f"'{text}' has more than one comma: write the number with one decimal mark and no thousands "
                        f"separator, such as {_EXAMPLES[what]}.")
    if _THOUSANDS.search(text):
        number = _THOUSANDS.search(text).group()
        raise UnitError(f"'{text}': {number} could be a thousands separator or a decimal comma; write it without "
                        f"the comma ({number.replace(',', '')}) or with a point ({number.replace(',', '.')}).")
    return text.replace(",", ".")


def _clean(text, what):
    if not isinstance(text, str):
        raise UnitError(f"{_cap(_a(what))} must be text such as {_EXAMPLES[what]}, not {type(text).__name__}.")
    if len(text) > MAX_INPUT_CHARS:
        raise UnitError(f"{_cap(what)} is too long to be {_a(what)}: write it as {_EXAMPLES[what]}.")
    text = _normalise(text)
    if not text:
        raise UnitError(f"Enter {_a(what)}, for example {_EXAMPLES[what]}.")
    if text.startswith(("-", "+")):
        raise UnitError(f"{_cap(_a(what))} cannot be negative or signed: write it as {_EXAMPLES[what]}.")
    if _EXPONENT.search(text):
        raise UnitError(f"'{text}': write the number out in full (exponents such as 1e3 are not read).")
    return _numbers(text, what)


def number_text(text: str, what: str = "number") -> str:
    """A typed number made plain for Decimal: Unicode look-alikes and a leading ≈ removed, a decimal comma read as
    a point (by the rules above). Raises UnitError for an ambiguous comma or a number of too many digits. For the
    numbers typed without a unit elsewhere (an angle, a share such as '0,1' or '10 %')."""
    if not isinstance(text, str):
        raise UnitError(f"{_cap(_a(what))} must be text such as {_EXAMPLES[what]}, not {type(text).__name__}.")
    return _numbers(_normalise(text[: MAX_INPUT_CHARS + 1]), what)


def _refuses_arithmetic(parse):
    """A parse_* function that answers bad text with UnitError, never an arithmetic error (InvalidOperation,
    Overflow, DivisionByZero): the rules above should catch everything first; this is the net under them."""

    @functools.wraps(parse)
    def checked(text, *args, **kwargs):
        try:
            return parse(text, *args, **kwargs)
        except ArithmeticError:
            raise UnitError(f"{str(text)[:MAX_INPUT_CHARS]!r} cannot be read as a number: write it with at most "
                            f"{MAX_DIGITS} digits and its unit, such as 3/16 in or 5 mm.") from None

    return checked


_EXAMPLES = {
    "length": '3/16 in, 1-1/2", 0.1875 in or 5 mm',
    "temperature": "50 F or 10 C",
    "stress": "70 ksi or 480 MPa",
    "force": "12.5 kip or 55 kN",
    "speed": "12 in/min or 300 mm/min",
    "flow": "35 cfh or 16 L/min",
    "number": "0.5 or 0,5",
}


def _quantity(text, what):
    """Split '1-1/2 in' into (Fraction(3, 2), 'in'); the unit may be None."""
    match = _QUANTITY.match(text)
    if not match:
        raise UnitError(f"'{text}' is not {_a(what)}: write it as {_EXAMPLES[what]}.")
    if match["dec"] is not None:
        try:
            value = Fraction(Decimal(match["dec"]))
        except InvalidOperation:  # pragma: no cover - the pattern admits only plain digits
            raise UnitError(f"'{text}' is not a number.") from None
    else:
        num, den = (match["num"], match["den"]) if match["whole"] is not None else (match["fnum"], match["fden"])
        if int(den) == 0:
            raise UnitError(f"'{text}': a fraction cannot have 0 below the line.")
        value = Fraction(int(num), int(den)) + (int(match["whole"]) if match["whole"] is not None else 0)
    unit = match["unit"]
    return value, (unit.strip() if unit else None)


def _to_decimal(fraction: Fraction) -> Decimal:
    return Decimal(fraction.numerator) / Decimal(fraction.denominator)


@dataclass(frozen=True, order=True)
class Length:
    """A length held as exact Decimal millimetres; ordering and arithmetic work in mm."""

    mm: Decimal

    def __post_init__(self):
        if not isinstance(self.mm, Decimal):
            object.__setattr__(self, "mm", Decimal(str(self.mm)))
        object.__setattr__(self, "mm", self.mm.quantize(MM_PLACES))

    @classmethod
    def from_inches(cls, inches) -> Length:
        return cls(Decimal(str(inches)) * MM_PER_INCH)

    @property
    def inch(self) -> Decimal:
        return _normal(self.mm / MM_PER_INCH)

    def in_system(self, system: str) -> Decimal:
        """The number a person of that system reads: inches on a US job, millimetres on an SI job."""
        return self.inch if _system(system) == "US" else _normal(self.mm)

    def __add__(self, other: Length) -> Length:
        return Length(self.mm + other.mm)

    def __sub__(self, other: Length) -> Length:
        return Length(self.mm - other.mm)

    def __mul__(self, factor) -> Length:
        return Length(self.mm * Decimal(str(factor)))

    __rmul__ = __mul__

    def __truediv__(self, other):
        if isinstance(other, Length):
            return self.mm / other.mm
        return Length(self.mm / Decimal(str(other)))

    def __bool__(self):
        return bool(self.mm)

    def __str__(self):
        return f"{_plain(self.mm)} mm"


def length_from_mm(mm) -> Length:
    return Length(Decimal(str(mm)))


@_refuses_arithmetic
def parse_length(text, default_unit: str | None = None) -> Length:
    """Read a length such as '3/16 in', '1-1/2"', '0.1875 in', '5 mm', "2'-6\"".

    A bare number is refused unless the caller names the unit the person works in
    (a form on a US job passes default_unit="in", on an SI job "mm").
    """
    if isinstance(text, Length):
        return text
    text = _clean(text, "length")
    feet = _FEET_INCHES.match(text)
    if feet:
        rest = parse_length(feet["rest"], default_unit="in")
        return _bounded(Length(Decimal(feet["ft"]) * 12 * MM_PER_INCH + rest.mm), text)
    value, unit = _quantity(text, "length")
    if unit is None:
        if default_unit is None:
            raise UnitError(f"'{text}' has no unit: write {text} in or {text} mm.")
        unit = default_unit
    factor = _LENGTH_UNITS.get(unit.lower() if unit not in ("'", '"', "''") else unit)
    if factor is None:
        raise UnitError(f"'{unit}' is not a length unit: use in (or \") or mm.")
    return _bounded(Length(_to_decimal(value) * factor), text)


def _bounded(length: Length, text: str) -> Length:
    if length.mm > MAX_LENGTH_MM:
        raise UnitError(f"'{text}' is longer than 100 m, longer than any weld, plate or member in a fabrication "
                        "shop, so it is taken as a typo: check the number and the unit.")
    return length


def _system(system: str) -> str:
    if system not in SYSTEMS:
        raise UnitError(f"Unit system must be 'US' or 'SI', not {system!r}.")
    return system


def inch_fraction(inches: Decimal, finest: int = 32) -> tuple[int, int, int, bool]:
    """(whole, numerator, denominator, exact) of inches: exact binary fractions to 1/128 as they are,
    anything else to the nearest 1/finest."""
    frac = Fraction(inches)
    exact = any((frac * d).denominator == 1 for d in (1, 2, 4, 8, 16, 32, 64, 128))
    if not exact:
        frac = Fraction(round(frac * finest), finest)
    whole = frac.numerator // frac.denominator
    rest = frac - whole
    return whole, rest.numerator, rest.denominator, exact


def format_length(length: Length, system: str = "US", *, mm_places: int = 2) -> str:
    """Print a length as a person of that system writes it: 3/16", 1-1/2", 12"; 6 mm, 2.5 mm.

    US: exact binary fractions as they are, others to the nearest 1/32 with ≈ before them (6 mm: ≈1/4"), except a
    length under 1/32 in that is no binary fraction (0.01 in), which prints in decimal inches rather than as 0"
    (with ≈ when that rounds it: 0.25 mm is ≈0.01").
    """
    if not isinstance(length, Length):
        length = parse_length(length)
    if _system(system) == "SI":
        value = length.mm.quantize(Decimal(1).scaleb(-mm_places), rounding=ROUND_HALF_UP)
        return f"{_plain(value)} mm"
    whole, num, den, exact = inch_fraction(length.inch)
    if not exact and 0 < length.inch < Decimal(1) / 32:
        # Tolerances finer than 1/32 (the 0.01 in undercut limit) would print as 0": show decimals.
        shown = length.inch.quantize(Decimal("0.001"), rounding=ROUND_HALF_UP)
        return f'{"" if shown == length.inch else APPROX}{_plain(shown)}"'
    mark = "" if exact else APPROX  # a metric (or odd decimal) value rounded to the nearest 1/32 in
    if num == 0:
        return f'{mark}{whole}"'
    if whole == 0:
        return f'{mark}{num}/{den}"'
    return f'{mark}{whole}-{num}/{den}"'


# From this length on, a US length of a run of weld or a member prints in feet and inches, as shop drawings write
# long dimensions (30'-0"); shorter ones stay in inches, as weld sizes and symbols do (common practice, no source).
FEET_FROM_INCHES = Decimal(24)


def format_length_long(length: Length, system: str = "US") -> str:
    """A length along a member (a weld run, a part): 30'-0" or 2'-6 1/2" from 2 ft on a US job; shorter lengths and
    every SI length as format_length. Read back by parse_length ("30'-0\"" and "2'-6 1/2\"" both parse)."""
    if not isinstance(length, Length):
        length = parse_length(length)
    if _system(system) == "SI" or length.inch < FEET_FROM_INCHES:
        return format_length(length, system)
    whole, num, den, exact = inch_fraction(length.inch)
    feet, inches = divmod(whole, 12)
    fraction = f" {num}/{den}" if num else ""
    return f"{'' if exact else APPROX}{feet}'-{inches}{fraction}\""


def _normal(value: Decimal) -> Decimal:
    """Strip trailing zeros without turning 30 into 3E+1, and print -0 (-0.3 °F rounded) as 0."""
    if value == 0:
        return Decimal(0)
    value = value.normalize()
    return value.quantize(Decimal(1)) if value.as_tuple().exponent > 0 else value


def _plain(value: Decimal) -> str:
    """Decimal as plain text without trailing zeros: 2.50 -> '2.5', 1E+1 -> '10'."""
    return format(_normal(value), "f")


def length_in_unit(length: Length, system: str) -> str:
    """The unit symbol a system's lengths carry in text: 'in' or 'mm'."""
    return "in" if _system(system) == "US" else "mm"


# --- temperatures -------------------------------------------------------------------------------

@dataclass(frozen=True, order=True)
class Temperature:
    """A temperature held in degrees Celsius (Decimal); preheat and interpass minimums."""

    c: Decimal

    @property
    def f(self) -> Decimal:
        return (self.c * 9 / 5 + 32).quantize(Decimal("0.01")).normalize()

    @classmethod
    def from_f(cls, f) -> Temperature:
        return cls(((Decimal(str(f)) - 32) * 5 / 9).quantize(Decimal("0.0001")))

    def __str__(self):
        return f"{_plain(self.c)} C"


_TEMP_UNITS = {"f": "F", "°f": "F", "degf": "F", "deg f": "F", "fahrenheit": "F",
               "c": "C", "°c": "C", "degc": "C", "deg c": "C", "celsius": "C"}
_TEMPERATURE = re.compile(r"^\s*(?P<sign>-)?\s*(?P<num>[0-9]+(?:\.[0-9]+)?)\s*(?P<unit>[^\s0-9].*?)?\s*$")


def _temperature_text(text: str) -> str:
    text = _normalise(text)
    if _EXPONENT.search(text):
        raise UnitError(f"'{text}': write the number out in full (exponents such as 1e3 are not read).")
    return _numbers(text, "temperature")


@_refuses_arithmetic
def parse_temperature(text, default_unit: str | None = None) -> Temperature:
    """Read '50 F', '10 C', '150°F'. A temperature without its unit is refused (50 F is not 50 C)."""
    if isinstance(text, Temperature):
        return text
    if not isinstance(text, str):
        raise UnitError(f"A temperature must be text such as {_EXAMPLES['temperature']}.")
    if len(text) > MAX_INPUT_CHARS:
        raise UnitError(f"A temperature is too long to be a temperature: write it as {_EXAMPLES['temperature']}.")
    text = _temperature_text(text)
    if not text:
        raise UnitError(f"Enter a temperature, for example {_EXAMPLES['temperature']}.")
    match = _TEMPERATURE.match(text)
    if not match:
        raise UnitError(f"'{text}' is not a temperature: write it as {_EXAMPLES['temperature']}.")
    unit = match["unit"] or default_unit
    if unit is None:
        raise UnitError(f"'{text}' has no unit: write {text} F or {text} C.")
    scale = _TEMP_UNITS.get(unit.strip().lower())
    if scale is None:
        raise UnitError(f"'{unit}' is not a temperature unit: use F or C.")
    value = Decimal(match["num"]) * (-1 if match["sign"] else 1)
    temp = Temperature.from_f(value) if scale == "F" else Temperature(value)
    if temp.c < Decimal("-60") or temp.c > Decimal("1000"):
        raise UnitError(f"'{text}' is outside -60 C to 1000 C: check the number and the unit.")
    return temp


def format_temperature(temp: Temperature, system: str = "US") -> str:
    if _system(system) == "US":
        return f"{_plain(temp.f.quantize(Decimal(1), rounding=ROUND_HALF_UP))} °F"
    return f"{_plain(temp.c.quantize(Decimal(1), rounding=ROUND_HALF_UP))} °C"


# --- stress, force, speed, flow: value in a base unit with a table of factors ------------------

KSI_TO_MPA = Decimal("6.894757293168361")  # 1 ksi = 6.894757 MPa (NIST SP 811, Appendix B.8)
KIP_TO_KN = Decimal("4.4482216152605")  # 1 kip = 4.448222 kN (NIST SP 811, Appendix B.8; lbf exact)


def _parse_scaled(text, what, units: dict, default_unit=None, allow_zero=True) -> tuple[Decimal, str]:
    text = _clean(text, what)
    value, unit = _quantity(text, what)
    if unit is None:
        if default_unit is None:
            raise UnitError(f"'{text}' has no unit: write it as {_EXAMPLES[what]}.")
        unit = default_unit
    key = unit.lower().replace(" ", "")
    if key not in units:
        raise UnitError(f"'{unit}' is not {_a(what)} unit: write it as {_EXAMPLES[what]}.")
    if not allow_zero and value == 0:
        raise UnitError(f"{_cap(_a(what))} of zero is not possible here: write it as {_EXAMPLES[what]}.")
    base = _to_decimal(value) * units[key][0]
    return base, units[key][1]


@dataclass(frozen=True, order=True)
class Stress:
    """A stress in MPa; .ksi for US figures. Filler metal tensile strength, yield, ultimate."""

    mpa: Decimal

    @property
    def ksi(self) -> Decimal:
        return self.mpa / KSI_TO_MPA


_STRESS_UNITS = {"ksi": (KSI_TO_MPA, "US"), "mpa": (Decimal(1), "SI"), "n/mm2": (Decimal(1), "SI"),
                 "n/mm²": (Decimal(1), "SI"), "psi": (KSI_TO_MPA / 1000, "US")}


@_refuses_arithmetic
def parse_stress(text, default_unit=None) -> tuple[Stress, str]:
    """Read '70 ksi' or '480 MPa'; returns the stress and the system it was written in."""
    if isinstance(text, Stress):
        return text, "SI"
    base, system = _parse_scaled(text, "stress", _STRESS_UNITS, default_unit, allow_zero=False)
    if base > Decimal("2000"):
        raise UnitError(f"'{text}' is above 2000 MPa (290 ksi): no structural weld metal is that strong; "
                        "check the unit (ksi or MPa).")
    return Stress(base), system


@dataclass(frozen=True, order=True)
class Force:
    """A force in kN; .kip for US figures."""

    kn: Decimal

    @property
    def kip(self) -> Decimal:
        return self.kn / KIP_TO_KN


_FORCE_UNITS = {"kn": (Decimal(1), "SI"), "n": (Decimal("0.001"), "SI"), "kip": (KIP_TO_KN, "US"),
                "kips": (KIP_TO_KN, "US"), "k": (KIP_TO_KN, "US"), "lbf": (KIP_TO_KN / 1000, "US"),
                "lb": (KIP_TO_KN / 1000, "US")}


@_refuses_arithmetic
def parse_force(text, default_unit=None) -> Force:
    """Read '12.5 kip', '55 kN'."""
    if isinstance(text, Force):
        return text
    base, _ = _parse_scaled(text, "force", _FORCE_UNITS, default_unit)
    if base > Decimal("1000000"):
        raise UnitError(f"'{text}' is above 1,000,000 kN: check the number and the unit.")
    return Force(base)


def format_force(force: Force, system="US") -> str:
    if _system(system) == "US":
        return f"{_plain(force.kip.quantize(Decimal('0.01'), rounding=ROUND_HALF_UP))} kip"
    return f"{_plain(force.kn.quantize(Decimal('0.01'), rounding=ROUND_HALF_UP))} kN"


@dataclass(frozen=True, order=True)
class Speed:
    """A travel or wire feed speed in mm/min."""

    mm_per_min: Decimal

    @property
    def in_per_min(self) -> Decimal:
        return self.mm_per_min / MM_PER_INCH


_SPEED_UNITS = {"mm/min": (Decimal(1), "SI"), "mm/s": (Decimal(60), "SI"), "cm/min": (Decimal(10), "SI"),
                "m/min": (Decimal(1000), "SI"), "in/min": (MM_PER_INCH, "US"), "ipm": (MM_PER_INCH, "US"),
                "in/s": (MM_PER_INCH * 60, "US")}


@_refuses_arithmetic
def parse_speed(text, default_unit=None) -> Speed:
    """Read '12 in/min', '300 mm/min', '5 mm/s', '7.5 m/min' (wire feed)."""
    if isinstance(text, Speed):
        return text
    base, _ = _parse_scaled(text, "speed", _SPEED_UNITS, default_unit, allow_zero=False)
    return Speed(base)


def format_speed(speed: Speed, system="US") -> str:
    if _system(system) == "US":
        return f"{_plain(speed.in_per_min.quantize(Decimal('0.1'), rounding=ROUND_HALF_UP))} in/min"
    return f"{_plain(speed.mm_per_min.quantize(Decimal(1), rounding=ROUND_HALF_UP))} mm/min"


@dataclass(frozen=True, order=True)
class Flow:
    """A shielding gas flow in litres per minute."""

    l_per_min: Decimal

    @property
    def cfh(self) -> Decimal:
        return self.l_per_min / CFH_TO_LPM


CFH_TO_LPM = Decimal("0.47194745")  # 1 ft3/h = 0.4719474 L/min (NIST SP 811, Appendix B.8)
_FLOW_UNITS = {"l/min": (Decimal(1), "SI"), "lpm": (Decimal(1), "SI"), "cfh": (CFH_TO_LPM, "US"),
               "ft3/h": (CFH_TO_LPM, "US")}


@_refuses_arithmetic
def parse_flow(text, default_unit=None) -> Flow:
    """Read '35 cfh', '16 L/min'."""
    if isinstance(text, Flow):
        return text
    base, _ = _parse_scaled(text, "flow", _FLOW_UNITS, default_unit, allow_zero=False)
    return Flow(base)


def format_flow(flow: Flow, system="US") -> str:
    if _system(system) == "US":
        return f"{_plain(flow.cfh.quantize(Decimal(1), rounding=ROUND_HALF_UP))} cfh"
    return f"{_plain(flow.l_per_min.quantize(Decimal(1), rounding=ROUND_HALF_UP))} L/min"


# --- angles: a weld toe angle, the angle between a load and a weld ------------------------------------------

_EXAMPLES["angle"] = "100° or 100 deg"
_ANGLE_UNITS = {"°": Decimal(1), "deg": Decimal(1), "degree": Decimal(1), "degrees": Decimal(1)}


@_refuses_arithmetic
def parse_angle(value, low=0, high=180) -> Decimal:
    """Read an angle in degrees: '100°', '100 deg', '100', 100. Outside low..high (inclusive) is refused."""
    if isinstance(value, bool) or not isinstance(value, (str, int, Decimal)):
        raise UnitError(f"An angle is written in degrees such as {_EXAMPLES['angle']}, not {type(value).__name__}.")
    text = value if isinstance(value, str) else format(value, "f")
    text = _clean(text, "angle")
    number, unit = _quantity(text, "angle")
    if unit is not None and unit.lower() not in _ANGLE_UNITS:
        raise UnitError(f"'{unit}' is not a unit of angle: write the angle in degrees, such as {_EXAMPLES['angle']}.")
    degrees = _to_decimal(number)
    if not Decimal(low) <= degrees <= Decimal(high):
        raise UnitError(f"'{text}' is outside {low}° to {high}°: write the angle in degrees, such as "
                        f"{_EXAMPLES['angle']}.")
    return _normal(degrees)


def significant(value: Decimal, figures: int = 3) -> Decimal:
    """Round to significant figures for printing a result (arithmetic keeps full precision)."""
    if value == 0:
        return Decimal(0)
    exponent = value.adjusted() - figures + 1
    return value.quantize(Decimal(1).scaleb(exponent), rounding=ROUND_HALF_UP)


@_refuses_arithmetic
def length_system(text) -> str | None:
    """'US' when a length was written in inches or feet, 'SI' in mm, cm or m; None for a Length value.

    Criteria that print US and SI values separately (1/16 in and 2 mm are not conversions of each other)
    judge a size by the system it was written in.
    """
    if isinstance(text, Length):
        return None
    parse_length(text)  # refuses what is not a length, with the usual message
    text = _clean(text, "length")
    if _FEET_INCHES.match(text):
        return "US"
    _, unit = _quantity(text, "length")
    us_units = _INCH_UNITS | {"'", "ft", "feet", "foot"}
    return "US" if unit in us_units or unit.lower() in us_units else "SI"


# --- areas: a net area typed by a person (plate with holes, effective net area) ----------------

_EXAMPLES["area"] = "4.5 in2 or 2900 mm2"
_AREA_UNITS = {"in2": (MM_PER_INCH * MM_PER_INCH, "US"), "in^2": (MM_PER_INCH * MM_PER_INCH, "US"),
               "sqin": (MM_PER_INCH * MM_PER_INCH, "US"), "mm2": (Decimal(1), "SI"), "mm^2": (Decimal(1), "SI"),
               "cm2": (Decimal(100), "SI"), "cm^2": (Decimal(100), "SI")}


@dataclass(frozen=True, order=True)
class Area:
    """An area in mm2 (exact for areas written in in2, since 1 in = 25.4 mm exactly); .in2 for US figures."""

    mm2: Decimal

    @property
    def in2(self) -> Decimal:
        return self.mm2 / (MM_PER_INCH * MM_PER_INCH)


@_refuses_arithmetic
def parse_area(text, default_unit=None) -> Area:
    """Read '4.5 in2', '4.5 in²', '2900 mm2'. Zero is refused: no member carries load on no area."""
    if isinstance(text, Area):
        return text
    base, _ = _parse_scaled(text, "area", _AREA_UNITS, default_unit, allow_zero=False)
    return Area(base)


# --- welding current, arc voltage, heat input: the electrical side of a WPS ------------------------

_EXAMPLES["amperage"] = "200 A"
_EXAMPLES["voltage"] = "25 V"
_EXAMPLES["heat input"] = "30 kJ/in or 1.2 kJ/mm"
_AMPERAGE_UNITS = {"a": (Decimal(1), ""), "amp": (Decimal(1), ""), "amps": (Decimal(1), ""),
                   "ampere": (Decimal(1), ""), "amperes": (Decimal(1), "")}
_VOLTAGE_UNITS = {"v": (Decimal(1), ""), "volt": (Decimal(1), ""), "volts": (Decimal(1), "")}


def _electrical_text(value, what):
    """Amps and volts have one unit each, so a bare number is read; a bool or a float NaN is not a reading."""
    if isinstance(value, bool) or not isinstance(value, (str, int, Decimal)):
        raise UnitError(f"{_cap(_a(what))} must be text or a number such as {_EXAMPLES[what]}, "
                        f"not {type(value).__name__}.")
    return value if isinstance(value, str) else format(value, "f")


@_refuses_arithmetic
def parse_amperage(value) -> Decimal:
    """Read welding current in amperes: '200 A', '200', 200. Above 2000 A is refused (no single arc runs there)."""
    amps, _ = _parse_scaled(_electrical_text(value, "amperage"), "amperage", _AMPERAGE_UNITS, "A", allow_zero=False)
    if amps > 2000:
        raise UnitError(f"'{value}' is above 2000 A: check the number (a welding current such as 200 A).")
    return _normal(amps)


@_refuses_arithmetic
def parse_voltage(value) -> Decimal:
    """Read arc voltage in volts: '25 V', '25', 25. Above 100 V is refused (arc voltages run about 15-45 V)."""
    volts, _ = _parse_scaled(_electrical_text(value, "voltage"), "voltage", _VOLTAGE_UNITS, "V", allow_zero=False)
    if volts > 100:
        raise UnitError(f"'{value}' is above 100 V: check the number (an arc voltage such as 25 V).")
    return _normal(volts)


HEAT_INPUT_PLACES = Decimal("0.000000001")  # 1e-9 kJ: far below any reading, far above Decimal noise


@dataclass(frozen=True, order=True)
class HeatInput:
    """Arc energy per length of weld, kept in kJ/mm and kJ/in, each rounded from the exact value once
    (so 30 kJ/in stays 30, not 29.99999..., and a limit compares equal to itself in either system)."""

    kj_per_mm: Decimal
    kj_per_in: Decimal

    @classmethod
    def from_kj_per_mm(cls, value) -> HeatInput:
        exact = Fraction(Decimal(str(value)))
        return cls(_to_decimal(exact).quantize(HEAT_INPUT_PLACES, rounding=ROUND_HALF_UP),
                   _to_decimal(exact * Fraction(MM_PER_INCH)).quantize(HEAT_INPUT_PLACES, rounding=ROUND_HALF_UP))

    @classmethod
    def from_fraction(cls, kj_per_mm: Fraction) -> HeatInput:
        """From an exact kJ/mm (heat_input computes one with Fractions)."""
        return cls(_to_decimal(kj_per_mm).quantize(HEAT_INPUT_PLACES, rounding=ROUND_HALF_UP),
                   _to_decimal(kj_per_mm * Fraction(MM_PER_INCH)).quantize(HEAT_INPUT_PLACES, rounding=ROUND_HALF_UP))


_HEAT_INPUT_UNITS = {"kj/mm": (Fraction(1), "SI"), "j/mm": (Fraction(1, 1000), "SI"), "kj/cm": (Fraction(1, 10), "SI"),
                     "kj/in": (1 / Fraction(MM_PER_INCH), "US"), "kj/in.": (1 / Fraction(MM_PER_INCH), "US")}


@_refuses_arithmetic
def parse_heat_input(text) -> HeatInput:
    """Read '30 kJ/in', '1.2 kJ/mm', '1200 J/mm', '12 kJ/cm'.

    The unit is required: kJ/in and kJ/mm differ 25.4 times.
    """
    if isinstance(text, HeatInput):
        return text
    text = _clean(text, "heat input")
    value, unit = _quantity(text, "heat input")
    if unit is None:
        raise UnitError(f"'{text}' has no unit: write it as {_EXAMPLES['heat input']}.")
    factor = _HEAT_INPUT_UNITS.get(unit.lower().replace(" ", ""))
    if factor is None:
        raise UnitError(f"'{unit}' is not a heat input unit: write it as {_EXAMPLES['heat input']}.")
    if value == 0:
        raise UnitError(f"A heat input of zero is not possible: write it as {_EXAMPLES['heat input']}.")
    kj_per_mm = value * factor[0]
    if kj_per_mm > 100:
        raise UnitError(f"'{text}' is above 100 kJ/mm (2540 kJ/in): check the number and the unit.")
    return HeatInput.from_fraction(kj_per_mm)


def format_heat_input(heat_input: HeatInput, system: str = "US", figures: int = 3) -> str:
    """'30 kJ/in', '46.2 kJ/in' on a US job, '1.18 kJ/mm' on an SI job (three significant figures unless told)."""
    if _system(system) == "US":
        return f"{_plain(significant(heat_input.kj_per_in, figures))} kJ/in"
    return f"{_plain(significant(heat_input.kj_per_mm, figures))} kJ/mm"


@_refuses_arithmetic
def temperature_system(text) -> str | None:
    """'US' when a temperature was written in F, 'SI' in C; None for a Temperature value.

    Tables that print F and C values separately (150 F [65 C]) judge a temperature by the scale it was written in.
    """
    if isinstance(text, Temperature):
        return None
    parse_temperature(text)  # refuses what is not a temperature, with the usual message
    match = _TEMPERATURE.match(_temperature_text(text))
    return "US" if _TEMP_UNITS[match["unit"].strip().lower()] == "F" else "SI"
