"""Trade notation for engine text, and long US lengths in feet and inches (no database).

The symbols are the trade's own (AISC 360-16 writes φRn, Rn/Ω; areas in in²); feet and inches from 2 ft is common
practice, no source (core.units.FEET_FROM_INCHES)."""

import pytest

from core.notation import trade
from core.units import format_length_long, parse_length


@pytest.mark.parametrize("ascii, shown", [
    ("phi Rn (LRFD)", "φRn (LRFD)"),
    ("Rn / Omega (ASD)", "Rn / Ω (ASD)"),
    ("phi = 0.75, Omega = 2.00", "φ = 0.75, Ω = 2.00"),
    ("Awe = 1.86 in2", "Awe = 1.86 in²"),
    ("Ae = 2900 mm2", "Ae = 2900 mm²"),
    ("h <= 0.3 mm + 0.1 a", "h ≤ 0.3 mm + 0.1 a"),
    ("t >= 1 in", "t ≥ 1 in"),
    ("E = 0.707 x 1/4 in", "E = 0.707 × 1/4 in"),
    ('1/4" x 3/8"', '1/4" × 3/8"'),
    ("a b / sqrt(a^2 + b^2)", "a b / √(a² + b²)"),
    ("l/w = 30 <= 100, beta = 1", "l/w = 30 ≤ 100, β = 1"),
    ("angle 45 deg", "angle 45°"),
])
def test_engine_ascii_prints_in_the_trades_notation(ascii, shown):
    assert trade(ascii) == shown


@pytest.mark.parametrize("text", ["graphic phi-free text", "x-ray", "max x", "Omegas", "in22 rows", ""])
def test_words_that_only_contain_the_letters_are_left_alone(text):
    assert trade(text) == text


def test_nothing_prints_as_nothing():
    assert trade(None) == ""


@pytest.mark.parametrize("typed, shown", [
    ("360 in", "30'-0\""), ("24 in", "2'-0\""), ("30.5 in", "2'-6 1/2\""), ("48 in", "4'-0\""),
    ("23 in", '23"'),  # just under 2 ft: inches, as weld lengths on symbols are
])
def test_long_us_lengths_print_in_feet_and_inches_and_read_back(typed, shown):
    length = parse_length(typed)
    assert format_length_long(length, "US") == shown
    assert parse_length(shown) == length


def test_si_lengths_and_rounded_ones_say_what_they_are():
    assert format_length_long(parse_length("2000 mm"), "SI") == "2000 mm"
    assert format_length_long(parse_length("1000 mm"), "US").startswith("≈3'-3")
