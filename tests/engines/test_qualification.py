"""Welder qualification engine: ranges, continuity, revalidation, electrode groups and the weld check.

Published values: AWS D1.1/D1.1M:2020 Table 6.10 (positions) and Table 6.11 (plate thickness), continuity rule,
ISO 9606-1:2012 9.2 / 9.3. From memory (marked at each test): the AWS continuity clause number, the AWS fillet
test thickness range, the SMAW electrode groups, the AWS SI column, every ISO 9606-1 position and thickness range.
Welders, stamps and dates are an invented scenario of our own.
"""

from datetime import date, datetime, timedelta
from decimal import Decimal

import pytest
from hypothesis import given
from hypothesis import strategies as st

from core.units import Length, parse_length
from procedures import qualification as q
from procedures.qualification import (
    AWS,
    ISO,
    QualificationFacts,
    WeldDemand,
    check_welder,
    continuity_until,
    electrode_groups_qualified,
    iso_revalidation_due,
    may_weld,
    positions_qualified,
    smaw_electrode_group,
    status_on,
    thickness_qualified,
)

ALL = frozenset({"F", "H", "V", "OH"})
NONE = frozenset()


def inches(text):
    return parse_length(f"{text} in")


# --- positions: AWS D1.1/D1.1M:2020 Table 6.10 (published) ----------------------------------------------------

@pytest.mark.parametrize(
    "test, groove, fillet",
    [
        ("1G", {"F"}, {"F", "H"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("2G", {"F", "H"}, {"F", "H"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("3G", {"F", "H", "V"}, {"F", "H", "V"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("4G", {"F", "OH"}, {"F", "H", "OH"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("3G+4G", ALL, ALL),  # AWS D1.1/D1.1M:2020 Table 6.10: all
        ("1F", set(), {"F"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("2F", set(), {"F", "H"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("3F", set(), {"F", "H", "V"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("4F", set(), {"F", "H", "OH"}),  # AWS D1.1/D1.1M:2020 Table 6.10
        ("3F+4F", set(), ALL),  # AWS D1.1/D1.1M:2020 Table 6.10: all fillet
    ],
)
def test_aws_plate_test_positions_per_d1_1_2020_table_6_10(test, groove, fillet):
    result = positions_qualified(test)
    assert result == {"groove": frozenset(groove), "fillet": frozenset(fillet)}
    assert all(isinstance(v, frozenset) for v in result.values())


@pytest.mark.parametrize("written", ["3g + 4g", " 3G+4G ", "3g+ 4G", "4G+3G"])
def test_combination_3g_4g_accepts_lowercase_spaces_and_either_order(written):  # AWS D1.1/D1.1M:2020 Table 6.10
    assert positions_qualified(written) == {"groove": ALL, "fillet": ALL}


def test_combination_of_a_groove_and_a_fillet_test_is_the_union():  # AWS D1.1/D1.1M:2020 Table 6.10, 1G and 4F
    assert positions_qualified("1G+4F") == {"groove": frozenset({"F"}), "fillet": frozenset({"F", "H", "OH"})}


def test_code_written_with_the_metric_companion_is_the_same_code():  # AWS D1.1/D1.1M:2020 Table 6.10
    assert positions_qualified("2G", code="AWS D1.1/D1.1M:2020") == positions_qualified("2G")


_PLATE_TESTS = ["1G", "2G", "3G", "4G", "1F", "2F", "3F", "4F"]


@given(st.sampled_from(_PLATE_TESTS), st.sampled_from(_PLATE_TESTS))
def test_a_combination_qualifies_at_least_what_each_part_does(a, b):  # AWS D1.1/D1.1M:2020 Table 6.10
    both = positions_qualified(f"{a}+{b}")
    for joint in ("groove", "fillet"):
        assert both[joint] >= positions_qualified(a)[joint]
        assert both[joint] >= positions_qualified(b)[joint]
        assert both[joint] == positions_qualified(a)[joint] | positions_qualified(b)[joint]


def test_a_groove_position_stated_as_a_fillet_test_is_refused():  # AWS D1.1/D1.1M:2020 Table 6.10
    with pytest.raises(ValueError, match="3G is a groove test position"):
        positions_qualified("3G", joint="fillet")


@pytest.mark.parametrize("pipe", ["5G", "6G", "6GR", "5F", "1GR", "2FR"])
def test_pipe_test_positions_are_refused_by_the_plate_engine(pipe):  # AWS D1.1/D1.1M:2020 clause 6, plate only
    with pytest.raises(ValueError, match="pipe .* test position; this engine covers plate tests only"):
        positions_qualified(pipe)


def test_a_5g_fillet_test_is_refused_because_5g_is_a_groove_position():  # AWS D1.1/D1.1M:2020 clause 6
    with pytest.raises(ValueError, match="5G is a groove position"):
        positions_qualified("5G", joint="fillet")
    with pytest.raises(ValueError, match="5G is a groove position"):
        QualificationFacts("SMAW", "fillet", "5G", "1/2 in", date(2025, 1, 6), True, electrode="E7018")


@pytest.mark.parametrize("bad", ["7G", "PA", "3G+", "+", "G", "2X", "", "   ", None, 3, ["3G"]])
def test_unknown_or_malformed_aws_test_positions_say_what_is_known(bad):
    with pytest.raises(ValueError, match=r"1G|test position"):
        positions_qualified(bad)


@pytest.mark.parametrize("code", ["AWS D1.1:2015", "ASME IX", "", None, 2020])
def test_unknown_code_is_refused_naming_the_known_codes(code):
    with pytest.raises(ValueError, match="known codes are AWS D1.1:2020, ISO 9606-1:2012"):
        positions_qualified("2G", code=code)


# --- positions: ISO 9606-1:2012, FROM MEMORY ONLY -------------------------------------------------------------

@pytest.mark.parametrize(
    "test, groove, fillet",
    [  # ISO 9606-1:2012 butt-weld position table: from memory; fillet side is our reading (5.4), from memory
        ("PA", {"PA"}, {"PA"}),
        ("PC", {"PA", "PC"}, {"PA", "PB"}),
        ("PE", {"PA", "PC", "PE"}, {"PA", "PB", "PD"}),
        ("PF", {"PA", "PF"}, {"PA", "PB", "PF"}),
        ("PG", {"PG"}, {"PG"}),
        ("PH", {"PA", "PE", "PF", "PH"}, {"PA", "PB", "PD", "PF", "PH"}),
        ("PJ", {"PA", "PE", "PG", "PJ"}, {"PA", "PB", "PD", "PG", "PJ"}),
    ],
)
def test_iso_butt_tests_from_memory(test, groove, fillet):  # ISO 9606-1:2012 Table 9, from memory
    assert positions_qualified(test, code=ISO) == {"groove": frozenset(groove), "fillet": frozenset(fillet)}
    assert positions_qualified(test, code=ISO, joint="butt") == positions_qualified(test, code=ISO)


@pytest.mark.parametrize(
    "test, fillet",
    [  # ISO 9606-1:2012 fillet-weld position table: from memory
        ("PA", {"PA"}),
        ("PB", {"PA", "PB"}),
        ("PD", {"PA", "PB", "PD"}),
        ("PF", {"PA", "PB", "PF"}),
        ("PG", {"PG"}),
        ("PH", {"PA", "PB", "PD", "PF", "PH"}),
        ("PJ", {"PA", "PB", "PD", "PG", "PJ"}),
    ],
)
def test_iso_fillet_tests_from_memory(test, fillet):  # ISO 9606-1:2012 fillet table, from memory
    assert positions_qualified(test, code=ISO, joint="fillet") == {"groove": NONE, "fillet": frozenset(fillet)}


def test_iso_pb_and_pd_are_fillet_tests_without_being_told():  # ISO 6947 PB, PD are fillet positions (published)
    assert positions_qualified("PB", code=ISO)["groove"] == NONE
    assert positions_qualified("pd", code=ISO)["groove"] == NONE


def test_iso_butt_test_in_a_fillet_position_is_refused():  # ISO 6947 (published)
    with pytest.raises(ValueError, match="PB is a fillet-weld position"):
        positions_qualified("PB", code=ISO, joint="groove")


@pytest.mark.parametrize("test", ["PC", "PE"])
def test_iso_fillet_test_in_a_butt_position_is_refused(test):  # ISO 6947, fillet positions from memory
    with pytest.raises(ValueError, match="butt-weld position"):
        positions_qualified(test, code=ISO, joint="fillet")


def test_iso_combination_is_the_union_and_speaks_iso_codes():  # ISO 9606-1:2012, from memory
    both = positions_qualified("pf + pc", code=ISO)
    assert both["groove"] == frozenset({"PA", "PC", "PF"})
    assert both["groove"] | both["fillet"] <= set(q.ISO_POSITIONS)


@pytest.mark.parametrize("bad", ["1G", "PK", "H-L045", "F"])
def test_iso_unknown_positions_are_refused_listing_the_iso_6947_codes(bad):
    with pytest.raises(ValueError, match="PA, PB, PC, PD, PE, PF, PG, PH, PJ"):
        positions_qualified(bad, code=ISO)


# --- thickness: AWS D1.1/D1.1M:2020 Table 6.11 (published) ----------------------------------------------------

def test_3_8_in_groove_test_qualifies_1_8_to_3_4_in():  # AWS D1.1/D1.1M:2020 Table 6.11
    assert thickness_qualified("3/8 in") == (inches("1/8"), inches("3/4"))


def test_just_over_3_8_in_qualifies_up_to_twice_the_test():  # AWS D1.1/D1.1M:2020 Table 6.11: 3/8 < T < 1, 2T
    assert thickness_qualified("0.376 in") == (inches("1/8"), inches("0.752"))


def test_1_2_in_groove_test_qualifies_1_8_to_1_in():  # AWS D1.1/D1.1M:2020 Table 6.11: 2T
    assert thickness_qualified('1/2"') == (inches("1/8"), inches("1"))


def test_just_under_1_in_is_still_limited_to_2t():  # AWS D1.1/D1.1M:2020 Table 6.11: 3/8 < T < 1
    assert thickness_qualified("0.999 in") == (inches("1/8"), inches("1.998"))


@pytest.mark.parametrize("test", ["1 in", "1-1/2 in", "2 in"])
def test_1_in_or_more_qualifies_1_8_in_and_unlimited(test):  # AWS D1.1/D1.1M:2020 Table 6.11
    assert thickness_qualified(test) == (inches("1/8"), None)


@pytest.mark.parametrize("test", ["0.374 in", "1/4 in", "1/8 in"])
def test_groove_test_thinner_than_3_8_in_is_refused(test):  # AWS D1.1/D1.1M:2020 Table 6.11 starts at 3/8 in
    with pytest.raises(ValueError, match="thinner than the thinnest plate test"):
        thickness_qualified(test)


def test_si_job_uses_the_metric_figures():  # AWS D1.1M:2020 Table 6.11 SI column: from memory
    assert thickness_qualified("10 mm") == (Length(Decimal(3)), Length(Decimal(20)))
    assert thickness_qualified("24 mm") == (Length(Decimal(3)), Length(Decimal(48)))
    assert thickness_qualified("25 mm") == (Length(Decimal(3)), None)
    assert thickness_qualified(Length(Decimal(25)), system="SI") == (Length(Decimal(3)), None)
    assert thickness_qualified(Length(Decimal(25))) == (inches("1/8"), Length(Decimal(50)))  # US: 25 mm < 1 in
    with pytest.raises(ValueError, match="10 mm"):
        thickness_qualified("9 mm")


def test_aws_fillet_test_qualifies_1_8_in_and_over_unlimited():  # AWS D1.1/D1.1M:2020 Table 6.11, from memory
    assert thickness_qualified("1/2 in", test="fillet") == (inches("1/8"), None)
    assert thickness_qualified("3/8 in", test="fillet") == (inches("1/8"), None)
    assert thickness_qualified("12 mm", test="fillet") == (Length(Decimal(3)), None)  # SI column, from memory


@pytest.mark.parametrize("bad", ["0 in", "0 mm", Length(Decimal(0)), "-3/8 in", "", None, 0.375, "3/8", "thick"])
def test_zero_negative_or_unitless_thickness_is_refused(bad):
    with pytest.raises(ValueError):
        thickness_qualified(bad)


@pytest.mark.parametrize("bad", ["plug", "", None, 1])
def test_unknown_test_kind_is_refused(bad):
    with pytest.raises(ValueError, match="'groove' .* or 'fillet'"):
        thickness_qualified("3/8 in", test=bad)


def test_unknown_unit_system_is_refused():
    with pytest.raises(ValueError, match="'US' or 'SI'"):
        thickness_qualified("3/8 in", system="metric")


# --- thickness: ISO 9606-1:2012, FROM MEMORY ------------------------------------------------------------------

@pytest.mark.parametrize(
    "test, low, high",
    [  # ISO 9606-1:2012 Table 5, butt welds in plate: from memory
        ("2 mm", "2 mm", "4 mm"),  # t < 3: t to 2t
        ("2.9 mm", "2.9 mm", "5.8 mm"),  # just under 3
        ("3 mm", "3 mm", "6 mm"),  # 3 <= t <= 12: 3 mm to 2t
        ("12 mm", "3 mm", "24 mm"),  # exactly 12
        ("12.1 mm", "5 mm", None),  # t > 12: 5 mm and over
        ("20 mm", "5 mm", None),
    ],
)
def test_iso_butt_thickness_from_memory(test, low, high):  # ISO 9606-1:2012 Table 5, from memory
    assert thickness_qualified(test, code=ISO) == (parse_length(low), None if high is None else parse_length(high))


@pytest.mark.parametrize(
    "test, low, high",
    [("2 mm", "2 mm", "3 mm"), ("2.9 mm", "2.9 mm", "3 mm"), ("3 mm", "3 mm", None), ("10 mm", "3 mm", None)],
)
def test_iso_fillet_thickness_from_memory(test, low, high):  # ISO 9606-1:2012 fillet thickness table, from memory
    assert thickness_qualified(test, test="fillet", code=ISO) == (
        parse_length(low), None if high is None else parse_length(high))


@given(st.integers(min_value=375, max_value=4000), st.sampled_from([AWS, ISO]), st.sampled_from(["groove", "fillet"]))
def test_a_test_always_qualifies_its_own_thickness(thousandths, code, test):  # D1.1:2020 T6.11; ISO from memory
    t = inches(Decimal(thousandths) / 1000)
    low, high = thickness_qualified(t, test=test, code=code)
    assert low <= t and (high is None or t <= high)


# --- continuity: AWS D1.1/D1.1M:2020 clause 6.2.3.1 (number from memory), ISO 9606-1:2012 9.2 ----------------

@pytest.mark.parametrize(
    "last_use, until",
    [
        (date(2026, 1, 15), date(2026, 7, 15)),  # plain six calendar months
        (date(2025, 9, 30), date(2026, 3, 30)),  # the day exists: no clamping
        (date(2025, 7, 31), date(2026, 1, 31)),  # across the year end
        (date(2026, 8, 31), date(2027, 2, 28)),  # clamped to February's end
        (date(2027, 8, 31), date(2028, 2, 29)),  # leap year
        (date(2023, 12, 31), date(2024, 6, 30)),  # clamped to June's end
        (date(2024, 2, 29), date(2024, 8, 29)),  # from a leap day
        (date(2026, 3, 31), date(2026, 9, 30)),
    ],
)
def test_continuity_is_six_calendar_months_clamped_to_month_end(last_use, until):
    # AWS D1.1/D1.1M:2020 clause 6.2.3.1 (clause number from memory): use at least once in any 6 months
    assert continuity_until(last_use) == until
    assert continuity_until(last_use, code=ISO) == until  # ISO 9606-1:2012 9.2: confirmation every 6 months


@given(st.dates(max_value=date(9999, 6, 30)))
def test_continuity_ends_after_the_last_use_and_within_184_days(d):  # AWS D1.1/D1.1M:2020 clause 6 (6 months)
    until = continuity_until(d)
    assert d < until <= d + timedelta(days=184)
    assert until.day == d.day or until.day < d.day and (until + timedelta(days=1)).day == 1


@pytest.mark.parametrize("bad", [datetime(2026, 1, 1, 8, 0), "2026-01-01", None, 20260101])
def test_continuity_needs_a_calendar_date(bad):
    with pytest.raises(ValueError, match="calendar date"):
        continuity_until(bad)


def test_continuity_past_the_end_of_the_calendar_is_refused():
    with pytest.raises(ValueError, match="outside the calendar"):
        continuity_until(date(9999, 12, 31))


def test_continuity_with_unknown_code_is_refused():
    with pytest.raises(ValueError, match="known codes"):
        continuity_until(date(2026, 1, 1), code="EN 287-1")


# --- ISO 9606-1:2012 9.3 revalidation (published) -------------------------------------------------------------

@pytest.mark.parametrize(
    "test_date, route, due",
    [
        (date(2024, 3, 10), "a", date(2027, 3, 10)),  # ISO 9606-1:2012 9.3 a): retest every 3 years
        (date(2024, 2, 29), "a", date(2027, 2, 28)),  # leap day clamped
        (date(2024, 3, 10), "b", date(2026, 3, 10)),  # ISO 9606-1:2012 9.3 b): every 2 years
        (date(2024, 2, 29), "9.3 b)", date(2026, 2, 28)),
        (date(2024, 3, 10), "c", None),  # ISO 9606-1:2012 9.3 c): no fixed date under ISO 3834-2
        (date(2024, 3, 10), "A", date(2027, 3, 10)),
    ],
)
def test_iso_revalidation_due(test_date, route, due):  # ISO 9606-1:2012 9.3
    assert iso_revalidation_due(test_date, route) == due


@pytest.mark.parametrize("bad", ["d", "", None, 3])
def test_iso_revalidation_unknown_route_is_refused(bad):
    with pytest.raises(ValueError, match="'a' .*'b' .*'c'"):
        iso_revalidation_due(date(2024, 3, 10), bad)


# --- SMAW electrode groups, AWS D1.1/D1.1M:2020 clause 6: from memory ---------------------------------------

@pytest.mark.parametrize(
    "given_, qualified",
    [
        ("F4", {"F4", "F3", "F2", "F1"}),
        ("F3", {"F3", "F2", "F1"}),
        ("F2", {"F2", "F1"}),
        ("F1", {"F1"}),
        ("f4", {"F4", "F3", "F2", "F1"}),
        ("E7018", {"F4", "F3", "F2", "F1"}),
        ("E6010", {"F3", "F2", "F1"}),
        ("E6013", {"F2", "F1"}),
        ("E7024", {"F1"}),
    ],
)
def test_smaw_electrode_groups_qualified_from_memory(given_, qualified):  # AWS D1.1:2020 groups, from memory
    assert electrode_groups_qualified(given_) == frozenset(qualified)


@pytest.mark.parametrize(
    "classification, group",
    [("E7015", "F4"), ("E7016", "F4"), ("E7018", "F4"), ("E7048", "F4"), ("E8018-C3", "F4"), ("E7018-1 H4R", "F4"),
     ("e7018", "F4"), ("E11018-M", "F4"), ("E6010", "F3"), ("E6011", "F3"), ("E6012", "F2"), ("E6013", "F2"),
     ("E7014", "F2"), ("E6020", "F1"), ("E7024", "F1"), ("E6027", "F1"), ("E7028", "F1")],
)
def test_smaw_group_from_the_last_two_digits_from_memory(classification, group):  # AWS D1.1:2020, from memory
    assert smaw_electrode_group(classification) == group


@pytest.mark.parametrize("bad", ["ER70S-6", "E71T-1", "E7019", "E5018", "F5", "", None, 7018])
def test_not_an_smaw_electrode_of_a_known_group_is_refused(bad):
    with pytest.raises(ValueError, match="SMAW electrode"):
        electrode_groups_qualified(bad)


# --- the weld check --------------------------------------------------------------------------------------------

def facts(**changes):
    """Stamp W-14, an invented welder: SMAW 3G groove test on 3/8 in plate with E7018, used last 2025-09-30."""
    base = dict(process="SMAW", joint="groove", test_position="3G", test_thickness="3/8 in",
                test_date=date(2025, 3, 3), passed=True, electrode="E7018", last_use_of_process=date(2025, 9, 30),
                welder="W-14")
    return QualificationFacts(**{**base, **changes})


def weld(**changes):
    base = dict(process="SMAW", joint="groove", position="V", thickness="1/2 in", electrode="E7018")
    return WeldDemand(**{**base, **changes})


ON = date(2026, 1, 12)


def test_covered_weld_is_allowed_and_names_the_qualification():  # AWS D1.1/D1.1M:2020 Tables 6.10, 6.11
    result = check_welder([facts()], weld(), ON)
    assert result.allowed
    assert result.qualification == facts()
    assert result.valid_until == date(2026, 3, 30)
    assert len(result.reasons) == 1 and "stamp W-14's SMAW 3G test of 2025-03-03" in result.reasons[0]
    assert "valid until 2026-03-30" in result.reasons[0]


def test_may_weld_is_the_same_check():
    assert may_weld is check_welder


def test_fillet_test_does_not_cover_a_vertical_fillet_from_2f():  # AWS D1.1/D1.1M:2020 Table 6.10: 2F = F, H
    result = check_welder([facts(joint="fillet", test_position="2F", test_thickness="1/2 in")],
                          weld(joint="fillet", position="V"), ON)
    assert not result.allowed and result.qualification is None
    assert result.reasons == ("Stamp W-14's SMAW 2F test of 2025-03-03 qualifies fillet welds in F, H; "
                              "this weld is V (AWS D1.1/D1.1M:2020 Table 6.10).",)


def test_fillet_test_covers_no_groove_weld():  # AWS D1.1/D1.1M:2020 Table 6.10: fillet tests qualify no grooves
    result = check_welder([facts(joint="fillet", test_position="3F+4F")], weld(position="F"), ON)
    assert not result.allowed
    assert "qualifies no groove welds" in result.reasons[0]


@pytest.mark.parametrize(
    "test, joint, position, allowed",
    [
        ("3G", "fillet", "V", True),  # AWS D1.1/D1.1M:2020 Table 6.10: 3G qualifies fillet F, H, V
        ("1G", "fillet", "H", True),  # 1G qualifies fillet F, H
        ("1G", "fillet", "V", False),
        ("1G", "groove", "H", False),  # 1G qualifies groove F only
        ("4G", "fillet", "H", True),  # 4G qualifies fillet F, H, OH
        ("4G", "groove", "H", False),  # 4G qualifies groove F, OH
        ("4G", "groove", "OH", True),
        ("3G+4G", "groove", "OH", True),  # 3G+4G: all
    ],
)
def test_groove_tests_cover_fillets_per_table_6_10(test, joint, position, allowed):  # D1.1/D1.1M:2020 Table 6.10
    assert check_welder([facts(test_position=test)], weld(joint=joint, position=position), ON).allowed is allowed


@pytest.mark.parametrize(
    "thickness, allowed",
    [("3/4 in", True), ("0.76 in", False), ("1 in", False), ("1/8 in", True), ("0.12 in", False)],
)
def test_thickness_edges_of_a_3_8_in_test(thickness, allowed):  # AWS D1.1/D1.1M:2020 Table 6.11: 1/8 to 3/4 in
    result = check_welder([facts()], weld(thickness=thickness), ON)
    assert result.allowed is allowed
    if not allowed:
        assert '3/8" [9.53 mm] plate qualifies groove welds on 1/8" [3.18 mm] to 3/4" [19.05 mm]' in result.reasons[0]


# AWS D1.1/D1.1M:2020 Table 6.11, fillet rows (from memory, high confidence): a plate groove test qualifies fillet
# welds on base metal 1/8 in [3 mm] and over, unlimited, whatever the test plate's thickness.
@pytest.mark.parametrize(
    "thickness, allowed",
    [("1/8 in", True), ("0.12 in", False), ("3/4 in", True), ("0.76 in", True), ("1-1/2 in", True), ("6 in", True)],
)
def test_groove_test_covers_fillets_on_1_8_in_and_over(thickness, allowed):  # D1.1:2020 T6.11 fillet row, memory
    record = facts(process="FCAW", test_position="3G+4G", electrode=None)
    result = check_welder([record], weld(process="FCAW", joint="fillet", position="OH", thickness=thickness,
                                         electrode=None), ON)
    assert result.allowed is allowed, result.reasons
    if allowed:
        assert "fillet welds in F, H, V, OH on 1/8\" [3.18 mm] and over" in result.reasons[0]
        assert "fillet row from memory" in result.reasons[0]
    else:
        assert "qualifies fillet welds on 1/8\" [3.18 mm] and over" in result.reasons[0]
        assert "Table 6.11, fillet row, from memory" in result.reasons[0]


def test_groove_test_still_limits_groove_welds_to_its_row():  # D1.1:2020 Table 6.11: 3/8 in test, 1/8 to 3/4 in
    record = facts(process="FCAW", test_position="3G+4G", electrode=None)
    result = check_welder([record], weld(process="FCAW", position="OH", thickness="1-1/2 in", electrode=None), ON)
    assert not result.allowed
    assert "qualifies groove welds on 1/8\" [3.18 mm] to 3/4\" [19.05 mm]" in result.reasons[0]


@pytest.mark.parametrize("test", ["3/8 in", "1/2 in", "1 in", "10 mm"])
def test_thickness_qualified_for_fillet_welds_from_a_groove_test(test):  # D1.1:2020 T6.11 fillet row, from memory
    low, high = thickness_qualified(test, test="groove", weld="fillet")
    assert high is None
    assert low == (Length(Decimal(3)) if test.endswith("mm") else inches("1/8"))


def test_thickness_qualified_weld_defaults_to_the_test_joint():  # D1.1:2020 Table 6.11 groove row (published)
    assert thickness_qualified("3/8 in") == thickness_qualified("3/8 in", weld="groove")
    with pytest.raises(ValueError, match="'groove'"):
        thickness_qualified("3/8 in", weld="plug")


def test_iso_butt_test_range_is_not_widened_for_fillets():  # ISO 9606-1:2012: fillet range of a butt test not entered
    assert thickness_qualified("10 mm", code=ISO, weld="fillet") == thickness_qualified("10 mm", code=ISO)


def test_continuity_holds_on_the_last_valid_day_and_lapses_the_next():
    # AWS D1.1/D1.1M:2020 clause 6.2.3.1 (clause number from memory): at least once in any 6 months
    assert check_welder([facts()], weld(), date(2026, 3, 30)).allowed
    result = check_welder([facts()], weld(), date(2026, 3, 31))
    assert not result.allowed
    assert result.reasons == ("Stamp W-14's SMAW 3G test of 2025-03-03: continuity lapsed on 2026-03-31: last SMAW "
                              "use 2025-09-30 (the process must be used at least once in any 6 months; AWS "
                              "D1.1/D1.1M:2020 clause 6.2.3.1, clause number from memory).",)


def test_without_recorded_use_continuity_counts_from_the_test():  # AWS D1.1/D1.1M:2020 clause 6, 6 months
    record = facts(last_use_of_process=None)
    assert check_welder([record], weld(), date(2025, 9, 3)).allowed
    assert not check_welder([record], weld(), date(2025, 9, 4)).allowed


def test_a_test_dated_after_the_weld_cannot_cover_it():
    record = facts(test_date=date(2026, 5, 1), last_use_of_process=None)
    result = check_welder([record], weld(), date(2026, 4, 30))
    assert not result.allowed
    assert "is dated after the weld date 2026-04-30" in result.reasons[0]
    assert check_welder([record], weld(), date(2026, 5, 1)).allowed  # the test day itself


def test_failed_and_revoked_tests_cover_nothing():
    assert "was not passed" in check_welder([facts(passed=False)], weld(), ON).reasons[0]
    assert "has been revoked" in check_welder([facts(revoked=True)], weld(), ON).reasons[0]


def test_another_process_is_not_covered():  # AWS D1.1/D1.1M:2020 clause 6: each process qualified separately
    result = check_welder([facts()], weld(process="FCAW", electrode="E71T-1C"), ON)
    assert result.reasons == ("Stamp W-14's SMAW 3G test of 2025-03-03 is for SMAW; this weld is FCAW.",)


def test_lower_electrode_group_test_does_not_cover_a_higher_group():  # AWS D1.1:2020 SMAW groups, from memory
    result = check_welder([facts(electrode="E6013")], weld(electrode="E7018"), ON)
    assert not result.allowed
    assert "E6013 (group F2), which qualifies F2, F1; this weld calls for E7018 (group F4)" in result.reasons[0]
    assert check_welder([facts(electrode="E7018")], weld(electrode="E6010"), ON).allowed  # F4 covers F3


def test_smaw_weld_without_an_electrode_cannot_be_checked():  # AWS D1.1:2020 SMAW groups, from memory
    result = check_welder([facts()], weld(electrode=None), ON)
    assert not result.allowed and "names no electrode" in result.reasons[0]
    assert "records no electrode" in check_welder([facts(electrode=None)], weld(), ON).reasons[0]


def test_fcaw_has_no_electrode_group_check():  # AWS D1.1:2020: the F-groups are for SMAW
    record = facts(process="FCAW", electrode=None)
    assert check_welder([record], weld(process="FCAW", electrode=None), ON).allowed


def test_every_refusal_of_every_record_is_listed():
    records = [facts(joint="fillet", test_position="2F"), facts(process="GMAW", electrode="ER70S-6")]
    result = check_welder(records, weld(thickness="1 in"), date(2026, 4, 1))
    assert not result.allowed
    # 2F: continuity, no grooves (a fillet test's thickness is unlimited); GMAW: continuity, process, thickness
    assert len(result.reasons) == 5
    text = " | ".join(result.reasons)
    for part in ("continuity lapsed on 2026-03-31", "qualifies no groove welds", "is for GMAW; this weld is SMAW",
                 "qualifies groove welds on 1/8\" [3.18 mm] to 3/4\" [19.05 mm]; this weld is on 1\" [25.4 mm]"):
        assert part in text


def test_of_two_covering_records_the_one_valid_longest_is_named():
    older = facts(last_use_of_process=date(2025, 9, 30))
    newer = facts(test_position="3G+4G", test_thickness="1 in", last_use_of_process=date(2025, 12, 1))
    result = check_welder([older, newer], weld(), ON)
    assert result.allowed and result.qualification == newer and result.valid_until == date(2026, 6, 1)


def test_one_bad_record_does_not_hide_a_good_one():
    assert check_welder([facts(passed=False), facts()], weld(), ON).qualification == facts()


def test_no_records_is_a_refusal():
    result = check_welder([], weld(), ON)
    assert not result.allowed and "No welder qualification on record" in result.reasons[0]


def test_a_record_to_another_code_does_not_cover_the_weld():
    iso = facts(code=ISO, test_position="PF", test_thickness="10 mm", electrode=None)
    result = check_welder([iso], weld(), ON)
    assert result.reasons == ("Stamp W-14's SMAW PF test of 2025-03-03 is under ISO 9606-1:2012; this weld is to "
                              "AWS D1.1:2020.",)


def test_iso_weld_check_and_route_a_revalidation():  # ISO 9606-1:2012 9.2, 9.3 a); positions from memory
    record = facts(code=ISO, process="111", test_position="PF", test_thickness="10 mm", electrode=None,
                   test_date=date(2023, 1, 10), last_use_of_process=date(2025, 12, 1))
    iso_weld = weld(code=ISO, position="PA", thickness="12 mm", electrode=None)
    assert check_welder([record], iso_weld, date(2026, 1, 10)).allowed  # 3 years after the test, last valid day
    result = check_welder([record], iso_weld, date(2026, 1, 11))
    assert result.reasons == ("Stamp W-14's SMAW PF test of 2023-01-10: qualification expired on 2026-01-11 "
                              "(revalidation due under ISO 9606-1:2012 9.3 a)).",)
    assert not check_welder([record], weld(code=ISO, position="PG", thickness="12 mm"), date(2025, 6, 1)).allowed
    route_c = facts(code=ISO, test_position="PF", test_thickness="10 mm", test_date=date(2023, 1, 10),
                    last_use_of_process=date(2025, 12, 1), iso_revalidation="c")
    assert check_welder([route_c], iso_weld, date(2026, 6, 1)).allowed  # 9.3 c): only continuity limits it


@pytest.mark.parametrize(
    "qualifications, weld_, on",
    [
        (None, "weld", ON),
        ("3G", "weld", ON),
        ("facts", "weld", ON),
        ([{"test_position": "3G"}], "weld", ON),
        ("list", {"process": "SMAW"}, ON),
        ("list", "weld", datetime(2026, 1, 12, 7, 30)),
        ("list", "weld", "2026-01-12"),
        ("list", "weld", None),
    ],
)
def test_wrong_types_for_the_check_are_refused(qualifications, weld_, on):
    if qualifications == "facts":
        qualifications = facts()
    elif qualifications == "list":
        qualifications = [facts()]
    weld_ = weld() if weld_ == "weld" else weld_
    with pytest.raises(ValueError):
        check_welder(qualifications, weld_, on)


@pytest.mark.parametrize(
    "changes, message",
    [
        (dict(test_position="5G", joint="fillet"), "5G is a groove position"),
        (dict(test_position="3G", joint="fillet"), "3G is a groove test position"),
        (dict(test_position="7G"), "Unknown test position '7G'"),
        (dict(test_thickness="1/4 in"), "thinner than the thinnest plate test"),  # AWS D1.1:2020 Table 6.11
        (dict(test_thickness="0 in"), "more than zero"),
        (dict(test_thickness=None), "length must be text"),
        (dict(passed="yes"), "True or False"),
        (dict(revoked=None), "True or False"),
        (dict(test_date="2025-03-03"), "calendar date"),
        (dict(last_use_of_process=datetime(2025, 9, 30)), "calendar date"),
        (dict(process="MIG"), "Process must be one of"),
        (dict(joint="plug"), "'groove'"),
        (dict(code="AWS D1.5:2020"), "known codes"),
        (dict(welder=14), "stamp as text"),
        (dict(electrode="E7019"), "SMAW electrode"),
        (dict(electrode=""), "Electrode classification"),
        (dict(iso_revalidation="z"), "revalidation route"),
        (dict(unit_system="metric"), "'US' or 'SI'"),
    ],
)
def test_bad_qualification_facts_are_refused(changes, message):
    with pytest.raises(ValueError, match=message):
        facts(**changes)


@pytest.mark.parametrize(
    "changes, message",
    [
        (dict(position="sideways"), "must be one of F, H, V, OH"),
        (dict(position=None), "must be one of"),
        (dict(code=ISO, position="PB", electrode=None), "a butt weld cannot be in PB"),  # ISO 6947
        (dict(code=ISO, position="V"), "PF \\(vertical up\\) or PG"),
        (dict(code=ISO, position="P9"), "PA, PB"),
        (dict(thickness="0 mm"), "more than zero"),
        (dict(thickness=None), "length must be text"),
        (dict(process=None), "Process must be one of"),
    ],
)
def test_bad_weld_demands_are_refused(changes, message):
    with pytest.raises(ValueError, match=message):
        weld(**changes)


def test_facts_are_normalised():
    record = facts(process=" smaw ", joint="Groove", test_position="3g + 4g", electrode=" e7018 ", welder=" W-14 ",
                   test_thickness="1 in")
    assert (record.process, record.joint, record.test_position, record.electrode, record.welder) == (
        "SMAW", "groove", "3G+4G", "E7018", "W-14")
    assert record.test_thickness == inches("1") and record.unit_system == "US"
    assert facts(test_thickness="10 mm").unit_system == "SI"


def test_an_si_record_keeps_the_d1_1m_figures_in_the_check():  # AWS D1.1M:2020 Table 6.11 SI column, from memory
    record = facts(test_thickness="25 mm")  # 25 mm is the SI "1 in or more" test: unlimited
    assert check_welder([record], weld(thickness="60 mm"), ON).allowed


# --- status on a day -------------------------------------------------------------------------------------------

@pytest.mark.parametrize(
    "on, state",
    [
        (date(2026, 2, 28), "qualified"),  # lapses 2026-03-31, 31 days away
        (date(2026, 3, 1), "lapsing"),  # exactly 30 days before the lapse
        (date(2026, 3, 30), "lapsing"),  # the last valid day
        (date(2026, 3, 31), "lapsed"),  # the lapse day
    ],
)
def test_status_around_the_continuity_lapse(on, state):  # AWS D1.1:2020 clause 6.2.3.1 (number from memory)
    status = status_on(facts(), on)
    assert status.state == state
    assert (status.valid_until, status.lapses_on) == (date(2026, 3, 30), date(2026, 3, 31))


def test_status_warning_window_counts_days_to_the_lapse():
    assert status_on(facts(), date(2026, 3, 30), warn_days=0).state == "qualified"  # no warning at all
    assert status_on(facts(), date(2026, 3, 29), warn_days=1).state == "qualified"
    assert status_on(facts(), date(2026, 3, 30), warn_days=1).state == "lapsing"  # lapses tomorrow


def test_status_of_a_failed_or_future_test_is_lapsed_without_dates():
    for record, on in ((facts(passed=False), ON), (facts(test_date=date(2026, 2, 1)), ON)):
        status = status_on(record, on)
        assert (status.state, status.valid_until, status.lapses_on) == ("lapsed", None, None)
        assert status.reason


@pytest.mark.parametrize("warn_days", [-1, True, "30", 1.5, None])
def test_status_refuses_a_bad_warning_window(warn_days):
    with pytest.raises(ValueError, match="warn_days"):
        status_on(facts(), ON, warn_days=warn_days)


def test_status_refuses_wrong_types():
    with pytest.raises(ValueError):
        status_on({"test_position": "3G"}, ON)
    with pytest.raises(ValueError):
        status_on(facts(), "2026-01-12")


# --- any text in, ValueError or an answer out ------------------------------------------------------------------

@given(st.one_of(st.text(max_size=12), st.integers(), st.none(), st.floats(allow_nan=True)))
def test_any_input_gives_an_answer_or_a_value_error(junk):
    for call in (lambda: positions_qualified(junk), lambda: positions_qualified(junk, code=ISO),
                 lambda: thickness_qualified(junk), lambda: thickness_qualified("3/8 in", test=junk),
                 lambda: electrode_groups_qualified(junk), lambda: iso_revalidation_due(date(2024, 1, 1), junk),
                 lambda: continuity_until(junk), lambda: positions_qualified("2G", code=junk)):
        try:
            call()
        except ValueError:
            pass


# --- positions written in the other system's words (shared domain.md: ISO 6947 / AWS correspondence, published) --

def test_an_iso_position_on_an_aws_weld_reads_as_the_aws_letter():
    from procedures.qualification import WeldDemand

    assert WeldDemand("FCAW", "fillet", "PB", "1/2 in").position == "H"
    assert WeldDemand("FCAW", "fillet", "PG", "1/2 in").position == "V"
    assert WeldDemand("FCAW", "fillet", "PD", "1/2 in").position == "OH"


def test_an_aws_letter_on_an_iso_weld_reads_as_the_iso_code_for_its_joint():
    from procedures.qualification import WeldDemand

    iso = "ISO 9606-1:2012"
    assert WeldDemand("GMAW", "fillet", "H", "10 mm", code=iso).position == "PB"
    assert WeldDemand("GMAW", "groove", "H", "10 mm", code=iso).position == "PC"
    assert WeldDemand("GMAW", "groove", "OH", "10 mm", code=iso).position == "PE"


def test_vertical_without_its_direction_is_refused_on_an_iso_weld():
    from procedures.qualification import WeldDemand

    with pytest.raises(ValueError, match="PF .vertical up. or PG"):
        WeldDemand("GMAW", "fillet", "V", "10 mm", code="ISO 9606-1:2012")


# --- essential variables: AWS D1.1/D1.1M:2020 Table 6.12 (from memory); ISO 9606-1:2012 (from memory) ---------

def gmaw(**changes):
    return facts(**{"process": "GMAW", "electrode": None, **changes})


@pytest.mark.parametrize("test_transfer, weld_transfer, allowed", [
    ("short_circuit", "short_circuit", True),
    ("short_circuit", "spray", False),  # GMAW-S does not qualify the other transfers
    ("spray", "short_circuit", False),  # nor the reverse
    ("spray", "pulsed", True),  # other transfers among themselves: one process
    ("globular", "spray", True),
])
def test_gmaw_s_qualifies_apart(test_transfer, weld_transfer, allowed):  # D1.1:2020 Table 6.12 (from memory)
    result = check_welder([gmaw(transfer=test_transfer)],
                          weld(process="GMAW", electrode=None, transfer=weld_transfer), ON)
    assert result.allowed is allowed
    if not allowed:
        assert "GMAW-S and the other GMAW transfers qualify apart" in result.reasons[0]
        assert "Table 6.12, from memory" in result.reasons[0]


def test_gmaw_s_written_as_the_process():  # D1.1:2020 Table 6.12: GMAW-S a process of its own (from memory)
    record = facts(process="GMAW-S", electrode=None)
    assert record.process == "GMAW" and record.transfer == "short_circuit" and "GMAW-S 3G test" in record.label
    assert not check_welder([record], weld(process="GMAW", electrode=None, transfer="spray"), ON).allowed
    assert check_welder([record], weld(process="GMAW-S", electrode=None), ON).allowed
    with pytest.raises(ValueError, match="GMAW-S is short-circuiting"):
        facts(process="GMAW-S", transfer="spray", electrode=None)
    with pytest.raises(ValueError, match="GMAW only"):
        facts(transfer="spray")


@pytest.mark.parametrize("test, weld_way, position, allowed", [
    ("up", "up", "V", True), ("up", "down", "V", False), ("down", "up", "V", False), ("down", "down", "V", True),
    ("up", "down", "F", True),  # progression is a vertical matter only
])
def test_vertical_progression(test, weld_way, position, allowed):  # D1.1:2020 Table 6.12 (from memory)
    result = check_welder([facts(progression=test)], weld(progression=weld_way, position=position), ON)
    assert result.allowed is allowed
    if not allowed:
        assert f"welded vertical {test}; this weld is vertical {weld_way}" in result.reasons[0]


@pytest.mark.parametrize("test, weld_backing, allowed", [
    ("without", "without", True), ("without", "with", True),  # without backing qualifies both
    ("with", "with", True), ("with", "without", False),  # omitting backing needs a new test
    ("both sides", "with", True), ("both sides", "without", False),  # both sides counts as with backing (memory)
])
def test_backing(test, weld_backing, allowed):  # D1.1:2020 Table 6.12 (from memory)
    result = check_welder([facts(backing=test)], weld(backing=weld_backing), ON)
    assert result.allowed is allowed
    if not allowed:
        assert "does not qualify welding without backing" in result.reasons[0]


def test_backing_does_not_matter_for_fillet_welds():  # D1.1:2020 Table 6.12: backing is a groove-weld variable
    assert check_welder([facts(backing="with")], weld(joint="fillet", backing="without"), ON).allowed


@pytest.mark.parametrize("test, weld_backing, allowed", [
    ("ss nb", "ss mb", True), ("ss nb", "bs", True), ("ss mb", "bs", True), ("bs", "ss mb", True),
    ("ss mb", "ss nb", False), ("bs", "ss nb", False),
])
def test_iso_welding_details(test, weld_backing, allowed):  # ISO 9606-1:2012 welding details (from memory)
    record = facts(code=ISO, test_position="PF", test_thickness="10 mm", electrode=None, backing=test)
    result = check_welder([record], weld(code=ISO, position="PF", thickness="12 mm", electrode=None,
                                         backing=weld_backing), date(2025, 6, 1))
    assert result.allowed is allowed
    if not allowed:
        assert "which does not qualify welding ss nb" in result.reasons[0] and "from memory" in result.reasons[0]


def test_absent_essential_variables_are_treated_as_matching_and_said_so():  # module docstring: no warning level
    result = check_welder([facts()], weld(backing="without", progression="down"), ON)
    assert result.allowed
    assert "Not checked, not recorded on the test or the weld: vertical progression, backing" in result.reasons[0]
    result = check_welder([gmaw(transfer="spray")], weld(process="GMAW", electrode=None), ON)
    assert result.allowed and "GMAW transfer (GMAW-S or not)" in result.reasons[0]


@pytest.mark.parametrize("field, bad", [("progression", "sideways"), ("backing", "ceramic tape"),
                                        ("progression", 3), ("backing", True)])
def test_bad_essential_variable_is_refused_in_words(field, bad):
    with pytest.raises(ValueError, match="or None when not recorded"):
        facts(**{field: bad})


# --- printing: a metric value rounded to inches is marked '≈' ------------------------------------------------

def test_a_rounded_inch_value_is_marked_approximate():
    result = check_welder([facts()], weld(thickness="0.76 in"), ON)  # 0.76 in prints as the nearest 1/32, 3/4"
    assert 'this weld is on ≈3/4" [19.3 mm]' in result.reasons[0]
    result = check_welder([facts(test_thickness="10 mm")], weld(thickness="1 in"), ON)  # D1.1M: 10 mm test
    assert '10 mm plate' not in result.reasons[0] and '≈13/32" [10 mm] plate' in result.reasons[0]
    exact = check_welder([facts()], weld(thickness="1 in"), ON)
    assert '3/8" [9.53 mm] plate' in exact.reasons[0] and "≈" not in exact.reasons[0]


def test_thin_groove_test_refusal_marks_a_rounded_value():  # D1.1:2020 Table 6.11 starts at 3/8 in
    with pytest.raises(ValueError, match='A ≈11/32" groove test'):
        thickness_qualified(Length(Decimal(9)), system="US")


# --- the fewest uses that prove continuity (printed summaries) -------------------------------------------------

def test_continuity_evidence_keeps_the_latest_use_within_six_months_of_the_one_before():
    # AWS D1.1/D1.1M:2020 clause 6.2.3.1 (from memory): use at least once in any 6 months. 2026-08-31 reaches
    # 2027-02-28 (month end clamped): a use on that day is within reach, the next day is not.
    uses = [date(2026, 8, 31), date(2026, 10, 1), date(2027, 1, 15), date(2027, 2, 28), date(2027, 3, 1)]
    assert q.continuity_evidence(uses) == [date(2026, 8, 31), date(2027, 2, 28), date(2027, 3, 1)]
    past = [date(2026, 8, 31), date(2027, 3, 1), date(2027, 3, 2)]  # a gap of six months and a day: a new run
    assert q.continuity_evidence(past) == [date(2026, 8, 31), date(2027, 3, 1), date(2027, 3, 2)]
    assert q.continuity_evidence([]) == []
    assert q.continuity_evidence([date(2026, 5, 1)] * 3) == [date(2026, 5, 1)]


@given(st.lists(st.dates(min_value=date(2015, 1, 1), max_value=date(2030, 12, 31)), max_size=60))
def test_continuity_evidence_shows_the_same_runs_as_every_use(days):
    picked = q.continuity_evidence(days)
    assert set(picked) <= set(days)
    assert q.continuity_runs(picked) == q.continuity_runs(days)  # the chain is proven by the picked uses alone
