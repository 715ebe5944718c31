"""core.units: what a person types becomes an exact length; what is printed reads back the same.

1 in = 25.4 mm exactly (international yard and pound agreement, 1959; NIST SP 811 B.8).
"""

from decimal import Decimal
from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st

from core import units
from core.units import (
    Length,
    UnitError,
    format_force,
    format_length,
    format_temperature,
    parse_angle,
    parse_flow,
    parse_force,
    parse_heat_input,
    parse_length,
    parse_speed,
    parse_stress,
    parse_temperature,
    significant,
)


@pytest.mark.parametrize(
    "text, mm",
    [
        ("3/16 in", "4.7625"),
        ("1-1/2 in", "38.1"),
        ('1-1/2"', "38.1"),
        ("1 1/2 in", "38.1"),
        ("0.1875 in", "4.7625"),
        (".25in", "6.35"),
        ('5/16"', "7.9375"),
        ("5 mm", "5"),
        ("6mm", "6"),
        ("1.5 cm", "15"),
        ("1½ in", "38.1"),
        ("½\u2033", "12.7"),
        ("3\u204416 in", "4.7625"),
        ("\uff11\uff12 mm", "12"),
        ("2'-6\"", "762"),
        ("2 ft", "609.6"),
        ("1/64 in", "0.396875"),
        ("1/128 in", "0.1984375"),
        ("0 in", "0"),
    ],
)
def test_it_reads_what_a_fitter_writes(text, mm):
    assert parse_length(text).mm == Decimal(mm)


def test_the_contract_example_is_exact():  # shared/engine-contract.md
    assert parse_length("1-1/2 in").mm == Decimal("38.1")
    assert parse_length("1-1/2 in").inch == Decimal("1.5")


@pytest.mark.parametrize(
    "text, fragment",
    [
        ("3/16", "no unit"),
        ("3//16 in", "not a length"),
        ("-1 in", "negative"),
        ("1e400 mm", "exponents"),
        ("1E3 mm", "exponents"),
        ("", "Enter a length"),
        ("   ", "Enter a length"),
        ("\u2603", "not a length"),
        ("3/0 in", "0 below the line"),
        ("1.5.2 in", "not a length"),
        ("5 furlongs", "not a length unit"),
        ("200 m", "longer than 100 m"),
        ("9" * 60 + " mm", "too long"),
        ("nan mm", "not a length"),
        ("inf in", "not a length"),
    ],
)
def test_it_refuses_nonsense_with_a_message_that_helps(text, fragment):
    with pytest.raises(UnitError) as excinfo:
        parse_length(text)
    assert fragment in str(excinfo.value)
    assert isinstance(excinfo.value, ValueError)


@pytest.mark.parametrize("value", [None, 3, 0.25, Decimal("1"), b"1 in", ["1 in"]])
def test_it_refuses_what_is_not_text(value):
    with pytest.raises(ValueError):
        parse_length(value)


def test_a_bare_number_takes_the_unit_the_caller_names():
    assert parse_length("3/16", default_unit="in").mm == Decimal("4.7625")
    assert parse_length("6", default_unit="mm").mm == Decimal("6")


@pytest.mark.parametrize(
    "text, us, si",
    [
        ("3/16 in", '3/16"', "4.76 mm"),
        ("1/4 in", '1/4"', "6.35 mm"),
        ("1-1/2 in", '1-1/2"', "38.1 mm"),
        ("12 in", '12"', "304.8 mm"),
        ("1/64 in", '1/64"', "0.4 mm"),
        ("0.1 in", '\u22483/32"', "2.54 mm"),  # not a binary fraction: nearest 1/32, marked as rounded
        ("5 mm", '\u22483/16"', "5 mm"),
        ("0.25 mm", '\u22480.01"', "0.25 mm"),  # finer than 1/32 and no fraction: decimals, not 0"
        ("0.01 in", '0.01"', "0.25 mm"),
        ("0 in", '0"', "0 mm"),
        ("30 in", '30"', "762 mm"),
    ],
)
def test_it_prints_fractions_on_us_jobs_and_millimetres_on_si_jobs(text, us, si):
    length = parse_length(text)
    assert format_length(length, "US") == us
    assert format_length(length, system="SI") == si


def test_it_refuses_an_unknown_unit_system():
    with pytest.raises(ValueError):
        format_length(parse_length("1 in"), system="metric")


def test_lengths_order_and_add_in_millimetres():
    assert parse_length("1/4 in") > parse_length("6 mm")
    assert parse_length("1/8 in") + parse_length("1/8 in") == parse_length("1/4 in")
    assert str(parse_length("20 mm")) == "20 mm"


# --- round trips (hypothesis) -----------------------------------------------------------------

sixty_fourths = st.integers(min_value=0, max_value=64 * 120)


@given(sixty_fourths)
def test_every_sixty_fourth_of_an_inch_is_stored_exactly_and_prints_back(n):
    inches = Fraction(n, 64)
    whole, rest = divmod(inches, 1)
    text = f"{whole}-{rest.numerator}/{rest.denominator} in" if rest and whole else (
        f"{rest.numerator}/{rest.denominator} in" if rest else f"{whole} in")
    length = parse_length(text)
    assert Fraction(length.mm) == inches * Fraction(254, 10)
    assert parse_length(format_length(length, "US")) == length


@given(st.decimals(min_value=0, max_value=10000, places=2, allow_nan=False, allow_infinity=False))
def test_millimetres_to_two_places_print_and_read_back_unchanged(mm):
    length = parse_length(f"{mm} mm")
    assert parse_length(format_length(length, "SI")) == length


@given(st.decimals(min_value=0, max_value=100, places=4, allow_nan=False, allow_infinity=False))
def test_us_printing_is_never_more_than_a_sixty_fourth_off(inches):
    length = parse_length(f"{inches} in")
    printed = parse_length(format_length(length, "US"))
    assert abs(printed.inch - length.inch) <= Decimal(1) / 64


@given(st.text(max_size=20))
def test_any_text_either_parses_or_raises_value_error(text):
    try:
        result = parse_length(text)
    except ValueError:
        return
    assert isinstance(result, Length) and result.mm >= 0


# --- the other quantities ---------------------------------------------------------------------

def test_temperatures_keep_their_scale():
    assert parse_temperature("50 F").c == Decimal("10")
    assert parse_temperature("10 C").c == Decimal("10")
    assert parse_temperature("150°F").f == Decimal("150")
    assert format_temperature(parse_temperature("65 C"), "SI") == "65 °C"
    assert format_temperature(parse_temperature("50 F"), "US") == "50 °F"


@pytest.mark.parametrize("text", ["50", "", "hot", "50 K", "5000 F", "-100 C"])
def test_a_temperature_without_a_sensible_unit_or_value_is_refused(text):
    with pytest.raises(ValueError):
        parse_temperature(text)


def test_stress_force_speed_and_flow_convert_by_published_factors():  # NIST SP 811 (2008) Appendix B.8
    stress, system = parse_stress("70 ksi")
    assert system == "US" and abs(stress.mpa - Decimal("482.633")) < Decimal("0.001")
    assert abs(parse_force("10 kip").kn - Decimal("44.482")) < Decimal("0.001")
    assert format_force(parse_force("44.4822 kN"), "US") == "10 kip"
    assert parse_speed("10 in/min").mm_per_min == Decimal("254")
    assert parse_speed("5 mm/s").mm_per_min == Decimal("300")
    assert abs(parse_flow("35 cfh").l_per_min - Decimal("16.518")) < Decimal("0.001")


@pytest.mark.parametrize("call", [lambda: parse_stress("70"), lambda: parse_stress("5000 ksi"),
                                  lambda: parse_speed("0 in/min"), lambda: parse_force("1 parsec")])
def test_other_quantities_refuse_nonsense(call):
    with pytest.raises(ValueError):
        call()


def test_significant_rounds_for_printing():
    assert significant(Decimal("1.39237")) == Decimal("1.39")
    assert significant(Decimal("12345")) == Decimal("1.23E+4")


# --- what a person types, wherever a number is typed ----------------------------------------------------------


@pytest.mark.parametrize("text, mm", [
    ("0,4 mm", "0.4"), ("6,35mm", "6.35"), ("1,5 in", "38.1"), ("0,125 in", "3.175"), ("12,5 mm", "12.5"),
    ("1000,5 mm", "1000.5"), ("≈1/4\"", "6.35"), ("\u2248 6 mm", "6"),
])
def test_a_decimal_comma_and_a_printed_approximation_are_read(text, mm):
    assert parse_length(text).mm == Decimal(mm)


@pytest.mark.parametrize("text, fragment", [
    ("1,000 in", "thousands separator"), ("12,500 mm", "thousands separator"), ("1,000.5 in", "comma and a point"),
    ("1,2,3 mm", "more than one comma"), ("1.5,2 mm", "comma and a point"),
])
def test_an_ambiguous_comma_is_refused_with_the_two_readings(text, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_length(text)


def test_every_quantity_takes_a_decimal_comma():
    assert parse_temperature("37,5 C").c == Decimal("37.5")
    assert parse_stress("482,5 MPa")[0].mpa == Decimal("482.5")
    assert parse_force("12,5 kN").kn == Decimal("12.5")
    assert parse_speed("7,5 m/min").mm_per_min == Decimal("7500")
    assert parse_flow("16,5 L/min").l_per_min == Decimal("16.5")
    assert parse_heat_input("1,2 kJ/mm").kj_per_mm == Decimal("1.2")
    assert parse_angle("22,5°") == Decimal("22.5")
    assert units.parse_amperage("180,5 A") == Decimal("180.5")
    assert units.parse_area("4,5 in2").in2 == Decimal("4.5")
    with pytest.raises(UnitError, match="thousands"):
        units.parse_amperage("1,200 A")


def test_the_ordinal_indicator_and_the_ring_read_as_a_degree_sign():
    assert parse_temperature("150\u00baF").f == Decimal(150)  # º, which NFKC would turn into the letter o
    assert parse_temperature("65 \u00baC").c == Decimal(65)
    assert parse_temperature("65\u02daC").c == Decimal(65)  # ˚ ring above
    assert units.temperature_system("150\u00baF") == "US"
    assert parse_angle("100\u00ba") == Decimal(100)


def test_minus_zero_prints_as_zero():
    # -17.9 C = -0.22 F, which rounds to 0 F: printed without a sign
    assert format_temperature(parse_temperature("-17.9 C"), "US") == "0 °F"
    assert format_temperature(parse_temperature("-0.4 C"), "SI") == "0 °C"
    assert format_temperature(parse_temperature("-0.6 C"), "SI") == "-1 °C"


def test_a_rounded_inch_value_is_marked_and_an_exact_one_is_not():
    assert format_length(parse_length("6 mm"), "US") == "\u22481/4\""
    assert format_length(parse_length("6.35 mm"), "US") == '1/4"'  # exactly 1/4 in
    assert format_length(parse_length("0.254 mm"), "US") == '0.01"'  # exactly 0.01 in
    assert format_length(parse_length("38 mm"), "US") == "\u22481-1/2\""


@pytest.mark.parametrize("text, fragment", [
    ("1234567890123456789012 mm", "more than 15 digits"), ("1234567890123456 mm", "more than 15 digits"),
    ("1234567890123456,7 mm", "more than 15 digits"), ("12345678901234567890123.5 in", "more than 15 digits"),
    ("1e999 mm", "exponents"), ("NaN mm", "not a length"), ("Infinity in", "not a length"),
    ("123456789012345 mm", "longer than 100 m"), ("101 m", "typo"),
])
def test_huge_numbers_nan_infinity_and_exponents_are_refused_in_words(text, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_length(text)


def test_a_long_exact_decimal_as_the_forms_write_it_reads_back():
    # 5 mm on a US job is written in the form as its exact decimal inches (28 digits) and must read back
    length = parse_length("5 mm")
    assert parse_length(f"{format(length.inch, 'f')} in") == length


@pytest.mark.parametrize("call", [
    lambda: parse_temperature("1234567890123456789012 F"), lambda: parse_temperature("1e999 C"),
    lambda: parse_temperature("NaN F"), lambda: units.parse_amperage(Decimal("NaN")),
    lambda: units.parse_amperage(Decimal("Infinity")), lambda: units.parse_voltage(Decimal("1E+999")),
    lambda: units.parse_amperage(10 ** 30), lambda: parse_angle(Decimal("-Infinity")),
    lambda: parse_stress("9" * 25 + " ksi"), lambda: parse_heat_input("1e999 kJ/in"),
])
def test_other_quantities_refuse_huge_and_non_numbers_in_words(call):
    with pytest.raises(UnitError):
        call()


_PARSERS = [parse_length, parse_temperature, parse_stress, parse_force, parse_speed, parse_flow, parse_angle,
            units.parse_area, units.parse_amperage, units.parse_voltage, parse_heat_input, units.length_system,
            units.temperature_system]
_numberish = st.one_of(
    st.text(max_size=30),
    st.from_regex(r"\A[-+≈ ]?[0-9]{0,30}([.,][0-9]{0,30})?([eE][-+]?[0-9]{1,4})? ?"
                  r"(in|mm|m|ft|F|C|°F|ºC|ksi|MPa|kN|kip|in/min|mm/s|cfh|L/min|in2|mm2|A|V|kJ/in|kJ/mm|°|deg)?\Z"),
    st.sampled_from(["NaN mm", "Infinity", "-Infinity F", "sNaN", "1e999 mm", "1E-999 in", "9" * 39 + " mm",
                     "0,000 mm", "1,000", "∞ in", "1/0 in", "0/0 mm", "1-1/0 in"]),
)
_values = st.one_of(_numberish, st.integers(min_value=-(10 ** 40), max_value=10 ** 40),
                    st.decimals(allow_nan=True, allow_infinity=True), st.floats(), st.none(), st.booleans())


@given(st.sampled_from(_PARSERS), _values)
def test_every_parser_answers_any_input_with_a_value_or_a_value_error(parse, value):
    # random text, numbers of up to 60 digits, exponents, NaN, Infinity, floats, None: a result or a ValueError
    try:
        parse(value)
    except ValueError as exc:  # UnitError is a ValueError; anything else (InvalidOperation, OverflowError) fails
        assert str(exc) and "InvalidOperation" not in str(exc)


@pytest.mark.parametrize("text", ["5²", "5² in", "²", "1²/4", "3/8²", "6₃ mm"])
def test_a_raised_or_lowered_digit_is_refused_not_read_as_a_plain_one(text):
    """NFKC makes 5² the digits 52: read so, a slip of the keyboard would store 52 in."""
    with pytest.raises(UnitError, match="raised or lowered digit"):
        parse_length(text, "in")


@pytest.mark.parametrize("text, mm", [("¹⁄₁₆ in", "1.5875"), ("1 ¹⁄₂ in", "38.1"), ("1¹⁄₂ in", "38.1")])
def test_a_fraction_in_small_digits_reads_as_the_fraction(text, mm):
    assert parse_length(text).mm == Decimal(mm)


def test_a_units_exponent_is_still_read():
    assert units.parse_stress("345 N/mm²")[0].mpa == Decimal(345)
    assert units.parse_area("2 in²").mm2 == Decimal("1290.32")
