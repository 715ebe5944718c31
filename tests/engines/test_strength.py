"""Fillet weld strength engine (AISC 360-16 J2, J4): published figures, the clause edges, properties, bad input.

Published figures used here, each named again beside its assertion:
- AISC Steel Construction Manual 15th ed., Part 8: E70 fillet, phi Rn = 1.392 D and Rn/Omega = 0.928 D kip/in,
  D = size in sixteenths of an inch.
- AISC Design Examples v14.0, Example J.1 "Fillet weld in longitudinal shear": 3/16 in E70 fillet, nominal
  5.57 kips/in; Pu = 200 kips needs 47.9 in of weld (LRFD); minimum size 1/8 in on a 1/4 in part (Table J2.4);
  maximum 3/16 in along the edge of the 1/4 in plate (J2.2b).
- CivilBay sample calculation "Brace_Knee_01" (AISC 14th ed.): double 5/16 in E70 fillet at 45 degrees,
  Rn = 24.076 kip/in; 3/8 in gusset, Fu 65 ksi, shear rupture 0.6 Fu t = 14.625 kip/in, phi Rn = 10.969 kip/in.
No published end-loaded (J2.2b long weld) worked example could be read; those tests check the clause's own
arithmetic at its limits.
"""

from decimal import Decimal

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.units import KIP_TO_KN, Area, length_system, parse_area, parse_length, significant
from inspections.strength import (
    AsInspectedCapacity,
    FilletStrength,
    as_inspected_capacity,
    base_metal_shear,
    connection_capacity,
    demand_capacity,
    directional_factor,
    filler_strength,
    fillet_strength,
    plate_tension,
    weld_group_strength,
)


def q(value, places="0.01"):
    return Decimal(value).quantize(Decimal(places))


def finding(result, criterion):
    matches = [f for f in result.findings if f.criterion == criterion]
    assert len(matches) == 1, result.findings
    return matches[0]


# --- published figures ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("sixteenths", range(2, 17))
def test_e70_per_sixteenth_gives_manual_1_392_lrfd_and_0_928_asd(sixteenths):
    # AISC Steel Construction Manual 15th ed., Part 8: phi Rn = 1.392 D kip/in, Rn/Omega = 0.928 D kip/in (E70)
    r = fillet_strength(f"{sixteenths}/16 in", "16 in", "70 ksi")  # 16 in: long enough for 4 w, short of 100 w
    per_inch = r.lrfd_kip / 16, r.asd_kip / 16
    assert significant(per_inch[0] / sixteenths, 4) == Decimal("1.392")
    assert significant(per_inch[1] / sixteenths, 3) == Decimal("0.928")
    assert significant(per_inch[1] / sixteenths, 4) == Decimal("0.9279")  # 0.707 x 0.60 x 70 / 2 / 16 = 0.92794


def test_aisc_design_example_j1_nominal_per_inch_of_3_16_weld():
    # AISC Design Examples v14.0, Example J.1: Rn = 0.60 (70 ksi) (3/16 in x 0.707) = 5.57 kips/in
    r = fillet_strength("3/16 in", "1 in", "70 ksi")
    assert q(r.nominal_kip) == Decimal("5.57")


def test_aisc_design_example_j1_weld_length_for_200_kips_lrfd():
    # AISC Design Examples v14.0, Example J.1: l = Pu / (phi rn) = 200 kips / (0.75 x 5.57 kips/in) = 47.9 in
    per_inch = fillet_strength("3/16 in", "1 in").lrfd_kip
    assert q(Decimal(200) / per_inch, "0.1") == Decimal("47.9")


def test_aisc_design_example_j1_minimum_size_on_a_quarter_inch_part():
    # AISC Design Examples v14.0, Example J.1 / AISC 360-16 Table J2.4: 1/4 in material -> 1/8 in minimum
    assert finding(fillet_strength("1/8 in", "4 in", thinner_part="1/4 in"), "minimum_size").ok
    assert not finding(fillet_strength("7/64 in", "4 in", thinner_part="1/4 in"), "minimum_size").ok


def test_aisc_design_example_j1_maximum_size_along_a_quarter_inch_edge():
    # AISC Design Examples v14.0, Example J.1 / AISC 360-16 J2.2b: 1/4 in edge -> 1/4 - 1/16 = 3/16 in maximum
    assert finding(fillet_strength("3/16 in", "4 in", along_edge_thickness="1/4 in"), "maximum_size_edge").ok
    over = finding(fillet_strength("7/32 in", "4 in", along_edge_thickness="1/4 in"), "maximum_size_edge")
    assert not over.ok and "built out" in over.message


def test_a_long_e70_weld_matches_the_manual_per_inch_figure_along_and_across():
    # AISC Steel Construction Manual 15th ed., Part 8: phi Rn = 1.392 D kip/in (E70, loaded along the weld); AISC
    # 360-16 J2.4(a): across the weld x 1.5. A 3/4 in weld (D = 12) 8 in long: 1.392 x 12 x 8 = 133.6 kips along,
    # 200.4 kips across (the Manual's coefficient is rounded to four figures: compared to 0.1 kip).
    along = fillet_strength("3/4 in", "8 in", angle=0).lrfd_kip
    across = fillet_strength("3/4 in", "8 in", angle=90).lrfd_kip
    assert abs(along - Decimal("1.392") * 12 * 8) < Decimal("0.1")
    assert abs(across - Decimal("1.5") * Decimal("1.392") * 12 * 8) < Decimal("0.1")


def test_a_group_of_longitudinal_and_transverse_welds_takes_the_larger_of_the_two_sums():
    # AISC 360-16 J2.4(b): Rn = max(Rnwl + Rnwt, 0.85 Rnwl + 1.5 Rnwt), Rnw = 0.60 FEXX x 0.707 w x l each, no
    # directional increase. The clause's own arithmetic on sizes of our choosing (no published example at hand):
    # 1/4 in E70, two 6 in longitudinal welds, one 4 in transverse weld.
    g = weld_group_strength(longitudinal=[("1/4 in", "6 in"), ("1/4 in", "6 in")], transverse=[("1/4 in", "4 in")])
    per_inch = Decimal("0.6") * 70 * Decimal("0.707") * Decimal("0.25")  # 7.4235 kip/in (0.707 as the Manual rounds)
    assert abs(g.rnwl_kip - per_inch * 12) < Decimal("0.01") and abs(g.rnwt_kip - per_inch * 4) < Decimal("0.01")
    assert g.governs == "0.85 Rnwl + 1.5 Rnwt"  # 0.85 x 89.08 + 1.5 x 29.69 = 120.3 > 118.8
    assert g.nominal_kip == Decimal("0.85") * g.rnwl_kip + Decimal("1.5") * g.rnwt_kip
    only_long = weld_group_strength(longitudinal=[("1/4 in", "6 in")], transverse=[("1/4 in", "1 in")])
    assert only_long.governs == "Rnwl + Rnwt"  # 44.5 + 7.4 = 51.9 > 0.85 x 44.5 + 1.5 x 7.4 = 49.0


def test_civilbay_double_5_16_fillet_at_45_degrees():
    # CivilBay sample calculation Brace_Knee_01 (AISC 14th ed.): 0.6 x 70 x 0.707 x 5/16 x 2 x C2 = 24.076 kip/in
    one = fillet_strength("5/16 in", "12 in", angle=45)
    assert q(2 * one.nominal_kip / 12, "0.001") == Decimal("24.076")
    assert q(one.directional_factor) == Decimal("1.30")  # the sample's C2 = 1.30


def test_civilbay_gusset_shear_rupture_per_inch():
    # CivilBay sample calculation Brace_Knee_01: 0.6 Fu t = 0.6 x 65 x 0.375 = 14.625 kip/in, phi Rn = 10.969
    # (AISC 360-16 J4.2(b), phi 0.75)
    b = base_metal_shear("3/8 in", "1 in", fy="50 ksi", fu="65 ksi")
    rupture = [s for s in b.limit_states if s.name == "shear rupture"][0]
    assert rupture.nominal_kip == Decimal("14.625")
    assert q(rupture.lrfd_kip, "0.001") == Decimal("10.969")
    assert b.governs_lrfd == "shear rupture"


# --- the calculation itself (AISC 360-16 J2.4, hand arithmetic) ---------------------------------------------

def test_result_shape_and_trail():
    r = fillet_strength("1/4 in", "4 in")
    assert isinstance(r, FilletStrength)
    assert r.throat.inch == Decimal("0.17675")  # 0.707 x 1/4, AISC 360-16 J2.2a
    assert r.effective_length == parse_length("4 in")
    assert r.nominal_kip == Decimal("29.694")  # 0.60 x 70 x 0.17675 x 4, AISC 360-16 J2.4
    assert r.lrfd_kip == Decimal("0.75") * r.nominal_kip and r.asd_kip == r.nominal_kip / 2
    assert r.nominal_kN == r.nominal_kip * KIP_TO_KN
    assert all(len(step) == 3 and all(isinstance(part, str) for part in step) for step in r.steps)
    assert r.steps[0] == ("Effective throat (AISC 360-16 J2.2a)", "E = 0.707 w = 0.707 x 1/4 in", "0.1768 in")
    assert any("J2.4" in step.label for step in r.steps)


def test_sixty_degrees_follows_the_directional_formula():
    # AISC 360-16 J2.4(a): sin 60 = 0.8660254, ^1.5 = 0.8059274, factor = 1.4029637
    assert q(directional_factor(60), "0.0000001") == Decimal("1.4029637")


def test_ninety_degrees_is_exactly_one_and_a_half():  # AISC 360-16 J2.4(a)
    assert directional_factor(90) == Decimal("1.5")
    assert directional_factor(0) == 1
    assert fillet_strength("5/16 in", "6 in", angle=90).nominal_kip == \
        Decimal("1.5") * fillet_strength("5/16 in", "6 in").nominal_kip


def test_unequal_legs_use_the_shortest_throat():
    # AISC 360-16 J2.2a: 1/4 x 3/8 in: throat = a b / sqrt(a^2 + b^2) = 0.09375 / 0.450694 = 0.208013 in
    r = fillet_strength("1/4 in", "6 in", leg2="3/8 in")
    assert q(r.throat.inch, "0.000001") == Decimal("0.208013")


def test_si_weld_in_mm_and_mpa():
    # invented scenario: 6 mm E49 (480 MPa) fillet, 100 mm: Rn = 0.60 x 480 x 0.707 x 6 x 100 N = 122.1696 kN
    r = fillet_strength("6 mm", "100 mm", "480 MPa")
    assert q(r.nominal_kN, "0.0001") == Decimal("122.1696")
    assert r.system == "SI" and "mm" in r.steps[0].expression and "kN" in r.steps[-1].value


# --- J2.2b length rules and Table J2.4 at their edges ----------------------------------------------------------

def test_length_exactly_four_sizes_keeps_the_full_size():  # AISC 360-16 J2.2b, l >= 4 w
    r = fillet_strength("1/4 in", "1 in")
    assert finding(r, "minimum_length").ok and r.effective_size == parse_length("1/4 in")


def test_length_just_under_four_sizes_takes_l_over_4_and_says_so():  # AISC 360-16 J2.2b, else w = l/4
    r = fillet_strength("1/4 in", "31/32 in")
    f = finding(r, "minimum_length")
    assert not f.ok and "l/4" in f.message
    assert r.effective_size == parse_length("31/128 in")
    assert r.nominal_kip == fillet_strength("31/128 in", "31/32 in").nominal_kip


@pytest.mark.parametrize("ratio, beta", [(100, Decimal(1)), (101, Decimal("0.998")), (200, Decimal("0.8")),
                                         (300, Decimal("0.6"))])
def test_end_loaded_beta(ratio, beta):  # AISC 360-16 J2.2b: beta = 1.2 - 0.002 l/w, l/w from 100 to 300
    w = parse_length("1/4 in")
    r = fillet_strength(w, w * ratio, end_loaded=True)
    assert r.beta == beta and r.effective_length == w * ratio * beta
    assert finding(r, "end_loaded_length").ok is (beta == 1)


def test_end_loaded_over_300_sizes_counts_180_sizes():  # AISC 360-16 J2.2b: l > 300 w -> Le = 180 w
    w = parse_length("1/4 in")
    assert fillet_strength(w, w * 301, end_loaded=True).effective_length == w * 180
    assert fillet_strength(w, w * 600, end_loaded=True).effective_length == w * 180


def test_end_loaded_unequal_legs_judged_by_the_smaller_leg():  # AISC 360-16 J2.2b, our choice: smaller leg
    r = fillet_strength("1/4 in", "40 in", leg2="3/8 in", end_loaded=True)  # l/w = 160 -> beta = 0.88
    assert r.beta == Decimal("0.88")


def test_not_end_loaded_keeps_full_length():  # AISC 360-16 J2.2b applies to end-loaded welds only
    assert fillet_strength("1/4 in", "100 in").effective_length == parse_length("100 in")


@pytest.mark.parametrize("thickness, minimum, below", [
    ("1/4 in", "1/8 in", "7/64 in"), ("17/64 in", "3/16 in", "11/64 in"), ("1/2 in", "3/16 in", "11/64 in"),
    ("33/64 in", "1/4 in", "15/64 in"), ("3/4 in", "1/4 in", "15/64 in"), ("49/64 in", "5/16 in", "19/64 in"),
    ("3 in", "5/16 in", "19/64 in"),
])
def test_minimum_size_us(thickness, minimum, below):  # AISC 360-16 Table J2.4 (US), exactly at and just under
    assert finding(fillet_strength(minimum, "6 in", thinner_part=thickness), "minimum_size").ok
    assert not finding(fillet_strength(below, "6 in", thinner_part=thickness), "minimum_size").ok


@pytest.mark.parametrize("thickness, minimum, below", [
    ("6 mm", "3 mm", "2.5 mm"), ("6.5 mm", "5 mm", "4.5 mm"), ("13 mm", "5 mm", "4.5 mm"),
    ("14 mm", "6 mm", "5.5 mm"), ("19 mm", "6 mm", "5.5 mm"), ("20 mm", "8 mm", "7.5 mm"),
])
def test_minimum_size_si(thickness, minimum, below):
    # AISC 360-16 Table J2.4 (SI): leg sizes 3/5/6/8 mm published; thickness breakpoints 6/13/19 mm from memory
    assert finding(fillet_strength(minimum, "150 mm", thinner_part=thickness), "minimum_size").ok
    assert not finding(fillet_strength(below, "150 mm", thinner_part=thickness), "minimum_size").ok


def test_minimum_size_judged_in_the_system_the_thickness_was_written_in():
    # AISC 360-16 Table J2.4: a 6.2 mm part is over 6 mm (5 mm minimum); written as 0.2441 in it is under 1/4 in
    assert not finding(fillet_strength("4 mm", "150 mm", thinner_part="6.2 mm"), "minimum_size").ok
    assert finding(fillet_strength("4 mm", "150 mm", thinner_part="0.2441 in"), "minimum_size").ok


@pytest.mark.parametrize("edge, largest, over", [
    ("15/64 in", "15/64 in", "1/4 in"),      # t < 1/4 in: w <= t
    ("1/4 in", "3/16 in", "13/64 in"),       # t >= 1/4 in: w <= t - 1/16 in
    ("1/2 in", "7/16 in", "29/64 in"),
    ("5 mm", "5 mm", "5.5 mm"),              # SI: t < 6 mm (from memory): w <= t
    ("6 mm", "4 mm", "4.5 mm"),              # SI: w <= t - 2 mm
])
def test_maximum_size_along_an_edge(edge, largest, over):  # AISC 360-16 J2.2b, exactly at and just over
    assert finding(fillet_strength(largest, "6 in", along_edge_thickness=edge), "maximum_size_edge").ok
    assert not finding(fillet_strength(over, "6 in", along_edge_thickness=edge), "maximum_size_edge").ok


@pytest.mark.parametrize("leg, shortest, shorter", [
    ("1/4 in", "1-1/2 in", "1-15/32 in"),    # 1-1/2 in governs over 4 w = 1 in
    ("1/2 in", "2 in", "1-31/32 in"),        # 4 w = 2 in governs
    ("6 mm", "38 mm", "37.5 mm"),            # SI: 38 mm
])
def test_intermittent_segment_length(leg, shortest, shorter):  # AISC 360-16 J2.2b, intermittent segments
    assert finding(fillet_strength(leg, shortest, intermittent=True), "intermittent_length").ok
    assert not finding(fillet_strength(leg, shorter, intermittent=True), "intermittent_length").ok


# --- base metal and the connection ------------------------------------------------------------------------

def test_base_metal_shear_by_material_name():
    # AISC 360-16 J4.2 with ASTM A36 (Fy 36, Fu 58 ksi): 1/2 x 10 in: yield 0.60 x 36 x 5 = 108 kip (phi 1.00,
    # Omega 1.50); rupture 0.60 x 58 x 5 = 174 kip (phi 0.75 -> 130.5, Omega 2.00 -> 87)
    b = base_metal_shear("1/2 in", "10 in", material="ASTM A36")
    assert [s.nominal_kip for s in b.limit_states] == [Decimal(108), Decimal(174)]
    assert b.lrfd_kip == Decimal(108) and b.governs_lrfd == "shear yielding"
    assert b.asd_kip == Decimal(72) and b.governs_asd == "shear yielding"


def test_base_metal_si_uses_the_mpa_figures_as_printed():
    # ASTM A992 345 / 450 MPa; AISC 360-16 J4.2(a): 0.60 x 345 MPa x 10 mm x 100 mm = 207 kN
    b = base_metal_shear("10 mm", "100 mm", material="A992")
    assert q(b.limit_states[0].nominal_kN, "0.000001") == Decimal("207.000000")


def test_plate_tension_yield_and_rupture():
    # AISC 360-16 J4.1: 6 x 1/2 in A572 Gr 50: yield 50 x 3 = 150 kip, phi 0.90 -> 135; Ae = 2.5 in2:
    # rupture 65 x 2.5 = 162.5 kip, phi 0.75 -> 121.875 (governs LRFD); ASD 150/1.67 = 89.82 vs 81.25
    p = plate_tension("6 in", "1/2 in", material="ASTM A572 Gr 50", net_area="2.5 in2")
    assert p.governs_lrfd == "tension rupture" and p.lrfd_kip == Decimal("121.875")
    assert p.governs_asd == "tension rupture" and p.asd_kip == Decimal("81.25")
    assert plate_tension("6 in", "1/2 in", "50 ksi", "65 ksi").governs_lrfd == "tension yielding"


def test_connection_names_the_welds_or_the_plate():
    # AISC 360-16 J2.4 / J4.2: the smaller available strength governs
    weld = fillet_strength("1/4 in", "10 in")  # phi Rn = 55.68 kip
    thick = base_metal_shear("1 in", "10 in", material="A36")  # 216 kip
    thin = base_metal_shear("1/8 in", "10 in", material="A36")  # yield 27 kip, rupture 32.6 kip
    assert connection_capacity(weld, thick).governs == "welds"
    c = connection_capacity(weld, [thick, thin])
    assert c.governs == "plate" and c.lrfd_kip == Decimal(27) and "shear yielding" in c.governing_lrfd


# --- as inspected -----------------------------------------------------------------------------------------

def test_as_inspected_sums_two_segments():
    # invented scenario, AISC 360-16 J2.4: 5/16 in x 12 in E70, 1/4 in over 2 in:
    # Rn = 42 x (0.707 x 1/4 x 2 + 0.707 x 5/16 x 10) = 107.64075 kip; conservative 42 x 0.707 x 1/4 x 12 = 89.082
    a = as_inspected_capacity("5/16 in", "12 in", "1/4 in", "2 in", required="50 kip")
    assert isinstance(a, AsInspectedCapacity)
    assert a.as_inspected.nominal_kip == Decimal("107.64075")
    assert a.conservative.nominal_kip == Decimal("89.082")
    assert a.ratio == Decimal(50) / (Decimal("0.75") * Decimal("107.64075"))
    assert finding(a, "demand_capacity").ok
    assert all(len(step) == 3 for step in a.steps)


def test_as_inspected_demand_over_capacity_is_a_finding():  # AISC 360-16 B3: Ra <= Rn / Omega
    a = as_inspected_capacity("5/16 in", "12 in", "3/16 in", "12 in", required="50 kip", method="ASD")
    assert a.ratio > 1 and not finding(a, "demand_capacity").ok


def test_as_inspected_accepts_kN_and_does_not_credit_oversize():
    a = as_inspected_capacity("1/4 in", "6 in", "5/16 in", "1 in", required="100 kN")
    assert a.as_inspected.nominal_kip == a.specified.nominal_kip
    assert a.ratio == Decimal(100) / KIP_TO_KN / a.specified.lrfd_kip


@settings(max_examples=60)
@given(spec=st.integers(3, 12), short=st.integers(1, 12), length=st.integers(4, 96), under=st.integers(0, 96))
def test_as_inspected_lies_between_conservative_and_specified(spec, short, length, under):
    short, under = min(short, spec), min(under, length)
    a = as_inspected_capacity(f"{spec}/16 in", f"{length}/4 in", f"{short}/16 in", f"{under}/4 in")
    assert a.conservative.nominal_kip <= a.as_inspected.nominal_kip <= a.specified.nominal_kip
    if under == 0:
        assert a.as_inspected.nominal_kip == a.specified.nominal_kip
    if under == length and length >= short:  # whole length undersize: the two figures agree
        assert a.as_inspected.nominal_kip == a.conservative.nominal_kip


# --- properties --------------------------------------------------------------------------------------------

legs_16ths = st.integers(1, 24)
lengths_8ths = st.integers(1, 800)


@settings(max_examples=150)
@given(leg=legs_16ths, length=lengths_8ths, end_loaded=st.booleans())
def test_capacity_grows_with_leg(leg, length, end_loaded):
    # Domain: any leg and length. Strictly while l >= 4 w (AISC 360-16 J2.2b); once l < 4 w the l/4 cap holds it.
    small = fillet_strength(f"{leg}/16 in", f"{length}/8 in", end_loaded=end_loaded)
    big = fillet_strength(f"{leg + 1}/16 in", f"{length}/8 in", end_loaded=end_loaded)
    assert big.nominal_kip >= small.nominal_kip
    if Decimal(length) / 8 >= 4 * Decimal(leg + 1) / 16:
        assert big.nominal_kip > small.nominal_kip


@settings(max_examples=150)
@given(leg=legs_16ths, length=lengths_8ths, end_loaded=st.booleans())
def test_capacity_grows_with_length(leg, length, end_loaded):
    # Domain: strictly up to 300 w; end-loaded welds over 300 w stay at 180 w (AISC 360-16 J2.2b)
    short = fillet_strength(f"{leg}/16 in", f"{length}/8 in", end_loaded=end_loaded)
    long = fillet_strength(f"{leg}/16 in", f"{length + 1}/8 in", end_loaded=end_loaded)
    assert long.nominal_kip >= short.nominal_kip
    if not end_loaded or Decimal(length + 1) / 8 <= 300 * Decimal(leg) / 16:
        assert long.nominal_kip > short.nominal_kip


@settings(max_examples=100)
@given(leg=legs_16ths, length=st.integers(8, 400), fexx=st.sampled_from([60, 70, 80, 90, 100, 110, 120]))
def test_ninety_degrees_is_exactly_1_5_times_zero(leg, length, fexx):  # AISC 360-16 J2.4(a)
    along = fillet_strength(f"{leg}/16 in", f"{length}/8 in", f"{fexx} ksi", angle=0)
    across = fillet_strength(f"{leg}/16 in", f"{length}/8 in", f"{fexx} ksi", angle=90)
    assert across.nominal_kip == Decimal("1.5") * along.nominal_kip


@settings(max_examples=100)
@given(a=st.integers(0, 90), b=st.integers(0, 90))
def test_directional_factor_rises_with_angle(a, b):  # AISC 360-16 J2.4(a), 1.0 to 1.5
    low, high = sorted((a, b))
    assert 1 <= directional_factor(low) <= directional_factor(high) <= Decimal("1.5")


@settings(max_examples=100)
@given(leg=legs_16ths, length=lengths_8ths, angle=st.integers(0, 90), end_loaded=st.booleans())
def test_unequal_legs_with_a_equal_b_is_the_equal_leg_weld(leg, length, angle, end_loaded):
    args = (f"{leg}/16 in", f"{length}/8 in", "70 ksi", angle)
    assert fillet_strength(*args, leg2=f"{leg}/16 in", end_loaded=end_loaded).nominal_kip == \
        fillet_strength(*args, end_loaded=end_loaded).nominal_kip


@settings(max_examples=100)
@given(leg=legs_16ths, length=lengths_8ths, fexx=st.sampled_from([60, 70, 80, 100, 120]),
       angle=st.integers(0, 90), end_loaded=st.booleans())
def test_si_and_us_inputs_agree(leg, length, fexx, angle, end_loaded):
    us = fillet_strength(f"{leg}/16 in", f"{length}/8 in", f"{fexx} ksi", angle, end_loaded=end_loaded)
    mpa = (Decimal(fexx) * Decimal("6.894757293168361")).quantize(Decimal("0.0000001"))
    si = fillet_strength(f"{Decimal(leg) * Decimal('1.5875')} mm", f"{Decimal(length) * Decimal('3.175')} mm",
                         f"{mpa} MPa", angle, end_loaded=end_loaded)
    assert si.system == "SI" and us.system == "US"
    assert abs(si.nominal_kN / us.nominal_kN - 1) < Decimal("1e-8")
    assert abs(si.lrfd_kip / us.lrfd_kip - 1) < Decimal("1e-8")


@settings(max_examples=60)
@given(longs=st.lists(st.integers(4, 48), max_size=3), trans=st.lists(st.integers(4, 48), max_size=3))
def test_weld_group_is_the_larger_of_the_two_cases(longs, trans):  # AISC 360-16 J2.4(b)
    if not longs and not trans:
        return
    g = weld_group_strength([("1/4 in", f"{n}/4 in") for n in longs], [("1/4 in", f"{n}/4 in") for n in trans])
    assert g.nominal_kip == max(g.rnwl_kip + g.rnwt_kip, Decimal("0.85") * g.rnwl_kip + Decimal("1.5") * g.rnwt_kip)
    if not trans:  # longitudinal only: plain sum
        assert g.governs == "Rnwl + Rnwt"


# --- bad input ---------------------------------------------------------------------------------------------

@pytest.mark.parametrize("kwargs, message", [
    (dict(leg="-1/4 in", length="4 in"), "negative"),
    (dict(leg="0 in", length="4 in"), "greater than zero"),
    (dict(leg=None, length="4 in"), "Leg"),
    (dict(leg=0.25, length="4 in"), "text"),
    (dict(leg="1/4", length="4 in"), "no unit"),
    (dict(leg="quarter", length="4 in"), "Leg"),
    (dict(leg="1/4 in", length="0 in"), "Weld length"),
    (dict(leg="1/4 in", length="4 in", angle=200), "0 to 90"),
    (dict(leg="1/4 in", length="4 in", angle=-5), "0 to 90"),
    (dict(leg="1/4 in", length="4 in", angle=90.01), "0 to 90"),
    (dict(leg="1/4 in", length="4 in", angle="steep"), "not a number"),
    (dict(leg="1/4 in", length="4 in", angle=None), "not a number"),
    (dict(leg="1/4 in", length="4 in", angle=True), "not a number"),
    (dict(leg="1/4 in", length="4 in", angle=float("nan")), "not a number"),
    (dict(leg="1/4 in", length="4 in", fexx="70 MPa"), "did you mean 70 ksi \\(483 MPa\\)"),
    (dict(leg="1/4 in", length="4 in", fexx="480 ksi"), "check the unit"),
    (dict(leg="1/4 in", length="4 in", fexx="200 ksi"), "60-120 ksi"),
    (dict(leg="1/4 in", length="4 in", fexx="55 ksi"), "60-120 ksi"),
    (dict(leg="1/4 in", length="4 in", fexx=70), "filler metal strength"),
    (dict(leg="1/4 in", length="4 in", fexx="70"), "no unit"),
    (dict(leg="1/4 in", length="4 in", end_loaded="yes"), "True or False"),
    (dict(leg="1/4 in", length="4 in", intermittent=1), "True or False"),
    (dict(leg="1/4 in", length="4 in", leg2="0 mm"), "Second leg"),
    (dict(leg="1/4 in", length="4 in", thinner_part="nothing"), "Thinner part"),
    (dict(leg="1/4 in", length="4 in", along_edge_thickness=-1), "Thickness along the edge"),
])
def test_bad_fillet_input_raises_value_error_saying_what_is_right(kwargs, message):
    with pytest.raises(ValueError, match=message):
        fillet_strength(**kwargs)


def test_fexx_at_the_range_ends_is_accepted():  # E60 to E120, 410 to 830 MPa
    for fexx in ("60 ksi", "120 ksi", "410 MPa", "830 MPa"):
        fillet_strength("1/4 in", "4 in", fexx)


@settings(max_examples=200)
@given(leg=st.one_of(st.text(max_size=12), st.none(), st.integers(), st.floats()), angle=st.one_of(
    st.text(max_size=6), st.integers(-400, 400), st.floats(allow_nan=True)))
def test_any_input_either_works_or_raises_value_error(leg, angle):
    try:
        fillet_strength(leg, "4 in", angle=angle)
    except ValueError:
        pass


@pytest.mark.parametrize("call, message", [
    (lambda: weld_group_strength(), "at least one"),
    (lambda: weld_group_strength(longitudinal="1/4 in"), "list of weld segments"),
    (lambda: weld_group_strength([{"leg": "1/4 in", "length": "4 in", "size": 3}]), "unknown key"),
    (lambda: weld_group_strength([{"leg": "1/4 in"}]), "needs 'leg' and 'length'"),
    (lambda: weld_group_strength([42]), "weld segment is a dict"),
    (lambda: base_metal_shear("1/2 in", "4 in", material="A514"), "Unknown material"),
    (lambda: base_metal_shear("1/2 in", "4 in", material=36), "Material must be a name"),
    (lambda: base_metal_shear("1/2 in", "4 in"), "Give fy and fu"),
    (lambda: base_metal_shear("1/2 in", "4 in", "36 ksi", "58 ksi", material="A36"), "not both"),
    (lambda: base_metal_shear("1/2 in", "4 in", "58 ksi", "36 ksi"), "less than Fu"),
    (lambda: base_metal_shear("1/2 in", "4 in", "36 MPa", "58 ksi"), "did you mean 36 ksi"),
    (lambda: base_metal_shear("1/2 in", "4 in", "250 ksi", "400 MPa"), "did you mean 250 MPa"),
    (lambda: plate_tension("4 in", "1/2 in", material="A36", net_area="3 in2"), "larger than the gross"),
    (lambda: plate_tension("4 in", "1/2 in", material="A36", net_area="3 ft"), "not a area unit|area"),
    (lambda: connection_capacity("weld", []), "welds must be"),
    (lambda: connection_capacity(fillet_strength("1/4 in", "4 in"), []), "at least one"),
    (lambda: connection_capacity(fillet_strength("1/4 in", "4 in"), "plate"), "base_metal"),
    (lambda: as_inspected_capacity("1/4 in", "6 in", "3/16 in", "7 in"), "longer than the weld"),
    (lambda: as_inspected_capacity("1/4 in", "6 in", "3/16 in", "1 in", method="WSD"), "LRFD"),
    (lambda: as_inspected_capacity("1/4 in", "6 in", "3/16 in", "1 in", required="lots"), "Required strength"),
    (lambda: as_inspected_capacity("1/4 in", "6 in", "0 in", "1 in"), "Smallest measured leg"),
])
def test_bad_input_elsewhere_raises_value_error(call, message):
    with pytest.raises(ValueError, match=message):
        call()


# --- the two helpers this engine added to core.units ----------------------------------------------------

@pytest.mark.parametrize("text, system", [("1/4 in", "US"), ('5/16"', "US"), ("2 ft", "US"), ("6 mm", "SI"),
                                          ("0.5 m", "SI"), ("2.5 cm", "SI")])
def test_length_system(text, system):
    assert length_system(text) == system


def test_length_system_of_a_length_value_is_unknown_and_bad_text_is_refused():
    assert length_system(parse_length("6 mm")) is None
    with pytest.raises(ValueError):
        length_system("six")


def test_parse_area():
    assert parse_area("1 in2") == Area(Decimal("645.16"))  # 25.4 mm squared, exact
    assert parse_area("2900 mm²").mm2 == Decimal(2900)
    for bad in ("0 in2", "3 in", "-2 in2", None, "lots"):
        with pytest.raises(ValueError):
            parse_area(bad)


# --- as inspected with unequal legs; demand over capacity for any result --------------------------------------

def test_as_inspected_unequal_legs_with_no_undersize_is_the_specified_weld():
    # AISC 360-16 J2.2a: throat of unequal legs a b / sqrt(a^2 + b^2), the shortest distance from root to face
    a = as_inspected_capacity("1/4 in", "10 in", "1/4 in", "0 in", specified_leg2="3/8 in")
    f = fillet_strength("1/4 in", "10 in", leg2="3/8 in")
    assert a.as_inspected.nominal_kip == f.nominal_kip == a.specified.nominal_kip


def test_as_inspected_unequal_legs_credit_the_measured_leg_on_both_legs():
    # our choice (conservative), checked against AISC 360-16 J2.2a arithmetic: only the smallest leg is measured,
    # so over the undersize length each leg counts min(measured, its specified size)
    whole = as_inspected_capacity("3/8 in", "10 in", "3/16 in", "10 in", specified_leg2="1/4 in")
    assert whole.as_inspected.nominal_kip == fillet_strength("3/16 in", "10 in").nominal_kip
    assert whole.conservative.nominal_kip == whole.as_inspected.nominal_kip
    between = as_inspected_capacity("1/4 in", "10 in", "5/16 in", "10 in", specified_leg2="3/8 in")
    assert between.as_inspected.nominal_kip == fillet_strength("1/4 in", "10 in", leg2="5/16 in").nominal_kip
    assert between.conservative.nominal_kip == between.as_inspected.nominal_kip


def test_as_inspected_unequal_legs_lie_between_conservative_and_specified():  # AISC 360-16 J2.2a, J2.4
    a = as_inspected_capacity("1/4 in", "12 in", "3/16 in", "3 in", specified_leg2="5/16 in", required="20 kip")
    assert a.conservative.nominal_kip < a.as_inspected.nominal_kip < a.specified.nominal_kip
    assert finding(a, "demand_capacity").ok
    assert any("a b / sqrt" in step.expression for step in a.steps if step.label.startswith("Throat, full-size"))


def test_as_inspected_equal_second_leg_changes_nothing():
    plain = as_inspected_capacity("5/16 in", "12 in", "1/4 in", "2 in")
    same = as_inspected_capacity("5/16 in", "12 in", "1/4 in", "2 in", specified_leg2="5/16 in")
    assert same.as_inspected.nominal_kip == plain.as_inspected.nominal_kip == Decimal("107.64075")


def test_demand_capacity_against_manual_figure():
    # AISC Manual 15th ed. Part 8: 1/4 in E70, phi Rn = 1.392 x 4 = 5.57 kip/in (unrounded 5.567625 kip/in)
    weld = fillet_strength("1/4 in", "1 in")
    at = demand_capacity(weld, "5.5676 kip")
    assert significant(at.ratio, 4) == Decimal("1.000") and at.ok  # AISC 360-16 B3: Ru <= phi Rn
    over = demand_capacity(weld, "5.57 kip")
    assert not over.ok and not over.findings[0].ok
    asd = demand_capacity(weld, "3.7117 kip", method="ASD")  # 0.928 x 4 = 3.71 kip/in, Rn / Omega (3.71175)
    assert significant(asd.ratio, 4) == Decimal("1.000") and asd.ok


def test_demand_capacity_refuses_bad_input():
    weld = fillet_strength("1/4 in", "1 in")
    for required, method, message in (("0 kip", "LRFD", "greater than zero"), ("12", "LRFD", "no unit"),
                                      ("12 kip", "WSD", "LRFD")):
        with pytest.raises(ValueError, match=message):
            demand_capacity(weld, required, method)
    with pytest.raises(ValueError, match="strength result"):
        demand_capacity({"lrfd": 1}, "1 kip")


def test_filler_strength_refuses_ksi_given_as_mpa():  # E60 to E120 (AWS A5.1, A5.5)
    assert filler_strength("70 ksi").ksi == Decimal(70)
    with pytest.raises(ValueError, match="did you mean 70 ksi"):
        filler_strength("70 MPa")


# D. K. Miller, "Fillet Welds That Are Too Long", Welding Innovation Vol. XVIII No. 1 (2001), Lincoln Electric
# design file: end-loaded 1/4 in [6 mm] welds up to 25 in [600 mm] and 3/8 in [10 mm] welds up to 37.5 in long
# are fully effective (l <= 100 w); past that the AISC 360 J2.2b reduction applies.
@pytest.mark.parametrize("leg, length", [("1/4 in", "25 in"), ("3/8 in", "37.5 in"), ("6 mm", "600 mm")])
def test_end_loaded_welds_up_to_100_legs_long_are_fully_effective(leg, length):
    result = fillet_strength(leg, length, end_loaded=True)
    assert result.beta == 1
    assert result.effective_length == parse_length(length)


@pytest.mark.parametrize("leg, length", [("1/4 in", "26 in"), ("3/8 in", "38 in")])
def test_end_loaded_welds_just_past_100_legs_lose_effective_length(leg, length):  # Miller (2001); AISC 360-16 J2.2b
    result = fillet_strength(leg, length, end_loaded=True)
    assert result.beta < 1
    assert result.effective_length < parse_length(length)


# AISC 360-16 J2.2a: effective throat = shortest distance from the root to the face of the diagrammatic
# weld: 0.707 w for equal legs; a b / sqrt(a^2 + b^2) for unequal legs (a 6 x 8 mm fillet: 48 / 10 = 4.8 mm).
def test_effective_throat_of_equal_and_unequal_legs():
    from inspections.strength import effective_throat

    assert effective_throat("1/4 in").inch == Decimal("0.17675")
    assert effective_throat("6 mm", "8 mm") == parse_length("4.8 mm")
    assert effective_throat("6 mm", "6 mm") == effective_throat("6 mm")


@pytest.mark.parametrize("leg, leg2", [("0 in", None), ("1/4 in", "0 in"), ("nonsense", None)])
def test_effective_throat_refuses_a_leg_that_is_not_one(leg, leg2):
    from inspections.strength import effective_throat

    with pytest.raises(ValueError):
        effective_throat(leg, leg2)


def test_the_weld_group_rule_is_cited_by_its_2016_letter():
    # AISC 360-16 J2.4(b): concentrically loaded groups of longitudinal and transverse fillets (J2.4(c) in 360-10)
    group = weld_group_strength([("1/4 in", "6 in")], [("1/4 in", "4 in")])
    cited = [label for label, _, _ in group.steps if "J2.4(" in label]
    assert cited and all("J2.4(b)" in label for label in cited)


def test_an_angle_may_be_typed_with_a_decimal_comma():
    assert fillet_strength("1/4 in", "4 in", angle="22,5").nominal_kip == \
        fillet_strength("1/4 in", "4 in", angle="22.5").nominal_kip
    with pytest.raises(ValueError, match="thousands separator"):
        fillet_strength("1/4 in", "4 in", angle="1,000")
