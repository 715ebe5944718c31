"""core.units: what a person types becomes an exact length; what is printed reads back the same.

1 in = 25.4 mm exactly (international yard and pound agreement, 1959; NIST SP 811 B.8).
"""

from decimal import Decimal
from fractions import Fraction

import pytest
from hypothesis import given
from hypothesis import strategies as st

from core.units import (
    Length,
    UnitError,
    format_force,
    format_length,
    format_temperature,
    parse_flow,
    parse_force,
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
        ("0.1 in", '3/32"', "2.54 mm"),  # not a binary fraction: nearest 1/32
        ("5 mm", '3/16"', "5 mm"),
        ("0.25 mm", '0.01"', "0.25 mm"),  # finer than 1/32 and no fraction: decimals, not 0"
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
