"""Prequalified WPS review: each test names the clause or table it checks (AWS D1.1/D1.1M:2020 clause 5 via the
shared domain reference; "from memory" where that reference marks the value so).

The WPSs are an invented scenario of our own: a shop fillet-welding A36 and A572 Gr 50 clip angles.
"""

import dataclasses

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.units import parse_length
from procedures.prequalified import (
    GENERAL,
    KNOWN_KEYS,
    RULES,
    Finding,
    base_metal_group,
    findings_by_field,
    is_prequalified,
    minimum_fillet_size,
    parse_procedure,
    review,
)

# An SMAW fillet WPS that is prequalified on every count (invented).
SMAW_FILLET = dict(process="SMAW", electrode="E7018", electrode_diameter="1/8 in", current="DCEP", positions=["F"],
                   joint="fillet", single_pass_size_max="1/4 in", base_metals=["ASTM A36"], thickness_max="1/2 in",
                   preheat_min="50 F")
# A spray-transfer GMAW fillet WPS, prequalified (invented).
GMAW_FILLET = dict(process="GMAW", transfer="spray", electrode="ER70S-6", electrode_diameter="0.045 in",
                   current="DCEP", positions=["F", "H"], joint="fillet", single_pass_size_max="5/16 in",
                   base_metals=["ASTM A572 Gr 50"], thickness_max="3/4 in", preheat_min="32 F")


def wps(base=SMAW_FILLET, **changes):
    result = dict(base)
    result.update(changes)
    return {k: v for k, v in result.items() if v is not ...}


def rules_of(findings):
    return [(f.rule, f.severity) for f in findings]


def only(findings, rule):
    found = [f for f in findings if f.rule == rule]
    assert len(found) == 1, findings
    return found[0]


def test_prequalified_smaw_fillet_has_no_findings():  # AWS D1.1:2020 clause 5, every limit met
    assert review(SMAW_FILLET) == []


def test_prequalified_gmaw_spray_fillet_has_no_findings():  # AWS D1.1:2020 clause 5, every limit met
    assert review(GMAW_FILLET) == []


def test_every_finding_has_the_contract_shape():
    findings = review(wps(process="GTAW", electrode="E7018", current="AC", base_metals=["ASTM A514"]))
    assert findings
    for f in findings:
        assert isinstance(f, Finding)
        assert f.rule and f.message and f.source
        assert f.severity in ("error", "not_prequalified", "warning")
        with pytest.raises(dataclasses.FrozenInstanceError):
            f.rule = "x"  # type: ignore[misc]


# --- processes: AWS D1.1:2020 clause 5 ---------------------------------------------------------

@pytest.mark.parametrize("process", ["GTAW", "ESW", "EGW"])
def test_process_outside_clause_5_is_not_prequalified(process):  # AWS D1.1:2020 clause 5 prequalified processes
    finding = only(review(wps(process=process, electrode=..., current=...)), "process_not_prequalified")
    assert finding.severity == "not_prequalified" and finding.field == "process"


def test_gmaw_short_circuit_is_not_prequalified():  # AWS D1.1:2020 clause 5: GMAW-S excluded (published)
    finding = only(review(wps(GMAW_FILLET, transfer="short_circuit")), "gmaw_short_circuit")
    assert finding.severity == "not_prequalified" and finding.field == "transfer"


def test_gmaw_s_written_as_the_process_means_short_circuit():  # AWS D1.1:2020 clause 5: GMAW-S excluded
    assert ("gmaw_short_circuit", "not_prequalified") in rules_of(review(wps(GMAW_FILLET, process="GMAW-S",
                                                                             transfer=...)))


def test_gmaw_s_with_a_contradicting_transfer_is_refused():
    with pytest.raises(ValueError, match="short-circuiting"):
        review(wps(GMAW_FILLET, process="GMAW-S", transfer="spray"))


@pytest.mark.parametrize("transfer", ["spray", "globular", "pulsed", "Pulsed spray"])
def test_gmaw_other_transfers_are_prequalified(transfer):  # AWS D1.1:2020 clause 5: only GMAW-S excluded
    assert review(wps(GMAW_FILLET, transfer=transfer)) == []


def test_gmaw_without_transfer_is_a_warning():  # AWS D1.1:2020 clause 5: GMAW-S excluded, so the mode matters
    assert rules_of(review(wps(GMAW_FILLET, transfer=...))) == [("gmaw_transfer_missing", "warning")]


def test_unknown_process_is_an_error():  # AWS D1.1:2020 clause 5 names the prequalified processes
    finding = only(review(wps(process="LASER", electrode=..., current=...)), "process_unknown")
    assert finding.severity == "error" and "LASER" in finding.message


def test_transfer_on_smaw_is_a_warning():
    assert rules_of(review(wps(transfer="spray"))) == [("transfer_not_gmaw", "warning")]


# --- the electrode's own classification --------------------------------------------------------

def test_e7018_with_gmaw_is_an_error():  # AWS A5.1: E7018 is a covered electrode for SMAW
    finding = only(review(wps(GMAW_FILLET, electrode="E7018")), "electrode_process")
    assert finding.severity == "error" and finding.field == "electrode" and "AWS A5.1" in finding.source


def test_er70s_6_with_gtaw_is_usable():  # AWS A5.18: ER70S-6 is an electrode or rod for GMAW and GTAW
    findings = review(wps(GMAW_FILLET, process="GTAW", transfer=..., current="DCEN"))
    assert rules_of(findings) == [("process_not_prequalified", "not_prequalified")]


def test_e7028_vertical_is_an_error():  # AWS A5.1: E7028 flat and horizontal fillet (published)
    finding = only(review(wps(electrode="E7028", positions=["F", "V"])), "electrode_position")
    assert finding.severity == "error" and finding.field == "positions" and "vertical" in finding.message


def test_e7028_horizontal_fillet_is_allowed():  # AWS A5.1: E7028 flat and horizontal fillet (published)
    assert review(wps(electrode="E7028", positions=["F", "H"])) == []


def test_e7024_horizontal_groove_is_an_error():  # AWS A5.1: position digit 2 = horizontal fillet only (published)
    finding = only(review(wps(electrode="E7024", positions=["H"], joint="groove", single_pass_size_max=...)),
                   "electrode_position")
    assert "groove" in finding.message


def test_saw_vertical_is_an_error():  # AWS D1.1:2020 Table 5.1 lists SAW in F and H only
    findings = review(wps(process="SAW", electrode="F7A2-EM12K", current="AC", positions=["V"]))
    assert ("electrode_position", "error") in rules_of(findings)


@pytest.mark.parametrize("electrode, current", [
    ("E6010", "AC"),  # AWS A5.1 E6010: DCEP (published)
    ("E7018", "DCEN"),  # AWS A5.1 E7018: AC or DCEP (published)
    ("E6012", "DCEP"),  # AWS A5.1 E6012: AC or DCEN (published)
])
def test_current_the_electrode_does_not_allow_is_an_error(electrode, current):
    base = wps(electrode=electrode, current=current, base_metals=...)  # no base metal: only the current is judged
    finding = only(review(base), "electrode_current")
    assert finding.severity == "error" and finding.field == "current" and current in finding.message


def test_e71t_8_on_dcep_is_an_error():  # AWS A5.20 T-8: DCEN (from memory)
    findings = review(wps(GMAW_FILLET, process="FCAW", transfer=..., electrode="E71T-8", current="DCEP"))
    finding = only(findings, "electrode_current")
    assert "DCEN" in finding.message


def test_gmaw_wire_on_dcen_is_an_error():  # common practice, no source: GMAW solid wire runs DCEP
    assert ("electrode_current", "error") in rules_of(review(wps(GMAW_FILLET, current="DCEN")))


@pytest.mark.parametrize("electrode, current", [("E6010", "DCEP"), ("E6011", "AC"), ("E6013", "DCEN"),
                                                ("E7018", "AC")])
def test_current_the_electrode_allows_passes(electrode, current):  # AWS A5.1 currents (published)
    assert "electrode_current" not in [f.rule for f in review(wps(electrode=electrode, current=current))]


# --- single-pass fillet size: AWS D1.1:2020 Table 5.1 ------------------------------------------------

@pytest.mark.parametrize("process, electrode, position, at_limit, just_over", [
    ("SMAW", "E7018", "F", "3/8 in", "13/32 in"),  # Table 5.1 SMAW F 3/8 in (published)
    ("SMAW", "E7018", "H", "5/16 in", "11/32 in"),  # Table 5.1 SMAW H 5/16 in (published)
    ("SMAW", "E7018", "V", "1/2 in", "17/32 in"),  # Table 5.1 SMAW V 1/2 in (published)
    ("SMAW", "E7018", "OH", "5/16 in", "11/32 in"),  # Table 5.1 SMAW OH 5/16 in (published)
    ("GMAW", "ER70S-6", "F", "1/2 in", "17/32 in"),  # Table 5.1 GMAW F 1/2 in (published)
    ("FCAW", "E71T-1C", "H", "3/8 in", "13/32 in"),  # Table 5.1 FCAW H 3/8 in (published)
    ("FCAW", "E71T-1C", "V", "1/2 in", "17/32 in"),  # Table 5.1 FCAW V 1/2 in (published)
    ("GMAW", "ER70S-6", "OH", "5/16 in", "11/32 in"),  # Table 5.1 GMAW OH 5/16 in (published)
    ("SAW", "F7A2-EM12K", "H", "5/16 in", "11/32 in"),  # Table 5.1 SAW H 5/16 in, single electrode (published)
])
def test_single_pass_fillet_at_the_table_5_1_limit_and_just_over(process, electrode, position, at_limit, just_over):
    base = dict(process=process, electrode=electrode, positions=[position], joint="fillet",
                transfer="spray" if process == "GMAW" else None)
    assert "single_pass_fillet_size" not in [f.rule for f in review(dict(base, single_pass_size_max=at_limit))]
    finding = only(review(dict(base, single_pass_size_max=just_over)), "single_pass_fillet_size")
    assert finding.severity == "not_prequalified" and finding.field == "single_pass_size_max"
    assert "Table 5.1" in finding.source


def test_saw_flat_single_pass_has_no_limit():  # AWS D1.1:2020 Table 5.1: SAW F unlimited (published)
    assert review(dict(process="SAW", electrode="F7A2-EM12K", positions=["F"], single_pass_size_max="1 in")) == []


def test_saw_multiple_electrodes_horizontal_allows_half_inch():  # AWS D1.1:2020 Table 5.1 SAW multiple (published)
    base = dict(process="SAW", electrode="F7A2-EM12K", positions=["H"], electrode_arrangement="multiple")
    assert review(dict(base, single_pass_size_max="1/2 in")) == []
    assert review(dict(base, single_pass_size_max="17/32 in"))


def test_single_pass_size_in_mm_is_judged_against_the_si_figure():  # Table 5.1 SMAW H 8 mm (SI from memory)
    # 8 mm is more than 5/16 in (7.94 mm): judged in SI it is at the limit, not over it
    assert review(wps(positions=["H"], single_pass_size_max="8 mm")) == []
    assert only(review(wps(positions=["H"], single_pass_size_max="8.5 mm")), "single_pass_fillet_size")


def test_single_pass_limit_names_each_position_over_it():  # AWS D1.1:2020 Table 5.1 SMAW F 3/8, OH 5/16
    findings = review(wps(positions=["F", "OH"], single_pass_size_max="3/8 in"))
    assert len(findings) == 1 and "overhead" in findings[0].message


# --- electrode diameter: AWS D1.1:2020 Table 5.1 ---------------------------------------------------

@pytest.mark.parametrize("process, electrode, joint, position, at_limit, just_over", [
    ("SMAW", "E7018", "fillet", "F", "5/16 in", "11/32 in"),  # Table 5.1 SMAW fillet F 5/16 in (published)
    ("SMAW", "E7018", "fillet", "H", "1/4 in", "9/32 in"),  # Table 5.1 SMAW fillet H 1/4 in (published)
    ("SMAW", "E7018", "fillet", "V", "3/16 in", "7/32 in"),  # Table 5.1 SMAW fillet V 3/16 in (published)
    ("SMAW", "E7018", "groove", "F", "1/4 in", "9/32 in"),  # Table 5.1 SMAW groove F 1/4 in (published)
    ("GMAW", "ER70S-6", "fillet", "H", "1/8 in", "9/64 in"),  # Table 5.1 GMAW F and H 1/8 in (published)
    ("FCAW", "E71T-1C", "groove", "V", "3/32 in", "7/64 in"),  # Table 5.1 FCAW V 3/32 in (published)
    ("FCAW", "E71T-1C", "fillet", "OH", "5/64 in", "3/32 in"),  # Table 5.1 FCAW OH 5/64 in (published)
])
def test_electrode_diameter_at_the_table_5_1_limit_and_just_over(process, electrode, joint, position, at_limit,
                                                                 just_over):
    base = dict(process=process, electrode=electrode, positions=[position], joint=joint,
                transfer="spray" if process == "GMAW" else None)
    assert "electrode_diameter" not in [f.rule for f in review(dict(base, electrode_diameter=at_limit))]
    finding = only(review(dict(base, electrode_diameter=just_over)), "electrode_diameter")
    assert finding.severity == "not_prequalified" and finding.field == "electrode_diameter"


def test_metric_wire_diameter_is_judged_against_the_si_figure():  # Table 5.1 GMAW F 3.2 mm (SI from memory)
    # 3.2 mm is more than 1/8 in (3.175 mm): the SI figure is the limit for a diameter written in mm
    assert review(wps(GMAW_FILLET, electrode_diameter="3.2 mm")) == []


def test_smaw_diameter_without_joint_type_is_not_checked():  # Table 5.1 SMAW limits depend on the joint type
    assert review(wps(joint=..., electrode_diameter="1/4 in", positions=["V"], single_pass_size_max=...)) == []


def test_smaw_groove_root_pass_warning():  # Table 5.1 SMAW root pass 3/16 in (published)
    findings = review(wps(joint="groove", electrode_diameter="1/4 in", single_pass_size_max=...))
    assert rules_of(findings) == [("electrode_diameter_root", "warning")]


# --- preheat: AWS D1.1:2020 Table 5.8 ------------------------------------------------------------

@pytest.mark.parametrize("electrode, thickness, at_minimum, just_below", [
    ("E7018", "3/4 in", "32 F", "31 F"),  # Category B, to 3/4 in incl.: 32 F (published)
    ("E7018", "25/32 in", "50 F", "49 F"),  # Category B, just over 3/4 in: 50 F (published)
    ("E7018", "1-1/2 in", "50 F", "49 F"),  # Category B, to 1-1/2 in incl.: 50 F (published)
    ("E7018", "1-17/32 in", "150 F", "149 F"),  # Category B, over 1-1/2 in: 150 F (published)
    ("E7018", "3 in", "225 F", "224 F"),  # Category B, over 2-1/2 in: 225 F (published)
    ("E6010", "3/4 in", "32 F", "31 F"),  # Category A, to 3/4 in: 32 F (published)
    ("E6010", "1 in", "150 F", "149 F"),  # Category A, over 3/4 to 1-1/2 in: 150 F (published)
    ("E6013", "2-1/2 in", "225 F", "224 F"),  # Category A, over 1-1/2 to 2-1/2 in: 225 F (published)
    ("E6011", "4 in", "300 F", "299 F"),  # Category A, over 2-1/2 in: 300 F (published)
])
def test_preheat_at_the_table_5_8_minimum_and_just_below(electrode, thickness, at_minimum, just_below):
    base = dict(process="SMAW", electrode=electrode, thickness_max=thickness)
    assert review(dict(base, preheat_min=at_minimum)) == []
    finding = only(review(dict(base, preheat_min=just_below)), "preheat")
    assert finding.severity == "not_prequalified" and finding.field == "preheat_min" and "Table 5.8" in finding.source


@pytest.mark.parametrize("process, electrode", [("SAW", "F7A2-EM12K"), ("GMAW", "ER70S-6"), ("FCAW", "E71T-1C")])
def test_saw_gmaw_fcaw_are_category_b(process, electrode):  # AWS D1.1:2020 Table 5.8 Category B (published)
    base = dict(process=process, electrode=electrode, thickness_max="1 in",
                transfer="spray" if process == "GMAW" else None)
    assert review(dict(base, preheat_min="50 F")) == []
    assert only(review(dict(base, preheat_min="40 F")), "preheat")


def test_gmaw_without_electrode_is_still_category_b():  # AWS D1.1:2020 Table 5.8: GMAW is Category B
    assert only(review(dict(process="GMAW", transfer="spray", thickness_max="1 in", preheat_min="40 F")), "preheat")


def test_smaw_without_electrode_preheat_is_not_checked():  # Table 5.8 category needs the electrode for SMAW
    assert review(dict(process="SMAW", thickness_max="3 in", preheat_min="32 F")) == []


def test_preheat_in_celsius_is_judged_against_the_si_figure():  # Table 5.8 Category A 65 C (published)
    # 65 C is 149 F: judged in C it meets the 65 C figure, though it is below 150 F
    assert review(dict(process="SMAW", electrode="E6010", thickness_max="1 in", preheat_min="65 C")) == []
    assert only(review(dict(process="SMAW", electrode="E6010", thickness_max="1 in", preheat_min="64 C")), "preheat")


@pytest.mark.parametrize("thickness, ok, low", [("20 mm", "0 C", "-1 C"), ("21 mm", "10 C", "9 C"),
                                                ("38 mm", "10 C", "9 C"), ("39 mm", "65 C", "64 C")])
def test_preheat_si_thickness_bands(thickness, ok, low):  # Table 5.8 Category B, SI bands 20/38/65 mm (from memory)
    base = dict(process="SMAW", electrode="E7018", thickness_max=thickness)
    assert review(dict(base, preheat_min=ok)) == []
    assert only(review(dict(base, preheat_min=low)), "preheat")


def test_interpass_maximum_below_the_minimum_is_flagged():  # Table 5.8: minimum preheat AND interpass temperature
    finding = only(review(dict(process="SMAW", electrode="E6010", thickness_max="1 in", preheat_min="150 F",
                               interpass_max="140 F")), "preheat")
    assert finding.field == "interpass_max"


@pytest.mark.parametrize("preheat, shown", [("-0.3 F", "0 °F"), ("-0.4 C", "0 °C")])
def test_a_temperature_just_below_zero_prints_as_0_not_minus_0(preheat, shown):  # Table 5.8 Category B
    thickness = "1 in" if preheat.endswith("F") else "25 mm"
    finding = only(review(dict(process="SMAW", electrode="E7018", thickness_max=thickness, preheat_min=preheat)),
                   "preheat")
    assert f"Minimum preheat {shown} is below" in finding.message and "-0" not in finding.message


def test_a_metric_size_rounded_to_inches_is_marked_approximate():  # AISC 360-16 Table J2.4: 1/2 in part, 3/16 in
    finding = only(review(dict(process="SMAW", electrode="E7018", joint="fillet", unit_system="US",
                               thickness_min="1/2 in", fillet_size_min="4.5 mm")), "minimum_fillet_size")
    assert 'Fillet size ≈3/16" is under the 3/16" minimum' in finding.message


# --- base metals and matching filler -----------------------------------------------------------

@pytest.mark.parametrize("name, thickness, group", [
    ("ASTM A36", "3/4 in", "I"),  # AWS D1.1:2020: A36 up to 3/4 in Group I (published)
    ("ASTM A36", "25/32 in", "II"),  # AWS D1.1:2020: A36 over 3/4 in Group II (published)
    ("ASTM A572 Gr 50", "1/2 in", "II"),  # Group II (from memory)
    ("ASTM A992", "1/2 in", "II"),  # Group II (from memory)
])
def test_base_metal_group(name, thickness, group):
    assert base_metal_group(name, parse_length(thickness)) == group


@pytest.mark.parametrize("spelling", ["ASTM A572 Gr 50", "A572-50", "astm a572 grade 50", "A572 Gr. 50",
                                      "ASTM A572/A572M Gr 50"])
def test_base_metal_spellings(spelling):
    assert base_metal_group(spelling) == "II"


# AWS D1.1/D1.1M:2020 Table 5.3 groups as entered in procedures.base_metals. Group I = the Category A list of
# D1.1:2015 Table 3.3 (published); other groups from memory unless marked.
@pytest.mark.parametrize("name, group", [
    ("ASTM A53 Gr B", "I"), ("ASTM A500 Gr B", "I"), ("ASTM A500 Gr C", "I"), ("ASTM A501 Gr A", "I"),
    ("ASTM A709 Gr 36", "I"),
    ("ASTM A501 Gr B", "II"), ("ASTM A529 Gr 50", "II"), ("ASTM A572 Gr 42", "II"), ("ASTM A572 Gr 55", "II"),
    ("ASTM A588", "II"), ("ASTM A709 Gr 50W", "II"), ("ASTM A913 Gr 50", "II"), ("ASTM A1085", "II"),
    ("ASTM A572 Gr 60", "III"), ("ASTM A572 Gr 65", "III"), ("ASTM A913 Gr 60", "III"), ("ASTM A913 Gr 65", "III"),
    ("ASTM A709 Gr HPS 70W", "IV"),  # from memory, low confidence
])
def test_table_5_3_groups(name, group):  # AWS D1.1:2020 Table 5.3 (from memory; Group I membership published 2015)
    assert base_metal_group(name, parse_length("1/2 in")) == group


def test_a709_gr_36_is_group_ii_over_3_4_in():  # D1.1 Table 5.3: A709 Gr 36 <= 3/4 in [20 mm] Group I (published)
    assert base_metal_group("ASTM A709 Gr 36", parse_length("3/4 in")) == "I"
    assert base_metal_group("ASTM A709 Gr 36", parse_length("25/32 in")) == "II"
    assert base_metal_group("ASTM A709 Gr 36", parse_length("20 mm"), "SI") == "I"
    assert base_metal_group("ASTM A709 Gr 36", parse_length("21 mm"), "SI") == "II"


def test_base_metal_not_in_the_table_cannot_be_prequalified():  # AWS D1.1:2020 clause 5: only Table 5.3 metals
    finding = only(review(wps(base_metals=["EN 10025-2 S355J2"])), "base_metal_unknown")
    assert finding.severity == "not_prequalified" and finding.field == "base_metals"
    assert "EN 10025-2 S355J2 is not in the table of prequalified base metals" in finding.message
    assert not is_prequalified(review(wps(base_metals=["ASTM A36", "ASTM A283 Gr C"])))


@pytest.mark.parametrize("name", ["ASTM A514", "ASTM A517", "ASTM A709 Gr 100W", "ASTM A709 Gr HPS 100W"])
def test_steels_approved_only_with_qualification_by_test(name):  # D1.1:2020 clause 6 test-only list (from memory)
    finding = only(review(wps(base_metals=[name], electrode="E7018")), "base_metal_qualification_by_test")
    assert finding.severity == "not_prequalified" and name in finding.message
    assert "from memory" in finding.source or "from memory" in finding.message


def test_a_specification_without_its_grade_is_asked_for_it():  # D1.1:2020 Table 5.3: A572 grades differ in group
    finding = only(review(wps(base_metals=["ASTM A572"])), "base_metal_grade")
    assert finding.severity == "not_prequalified" and "42, 50, 55, 60, 65" in finding.message


# AWS D1.1/D1.1M:2020 Table 5.8 Category C (A572 Gr 60/65, A913 Gr 60/65): 50 F to 3/4 in, 150 F over 3/4 to
# 1-1/2, 225 F over 1-1/2 to 2-1/2, 300 F over 2-1/2 (US published in an older edition's table; 2020 from memory).
@pytest.mark.parametrize("thickness, at_minimum, just_below", [
    ("3/4 in", "50 F", "49 F"), ("25/32 in", "150 F", "149 F"), ("1 in", "150 F", "149 F"),
    ("1-1/2 in", "150 F", "149 F"), ("1-17/32 in", "225 F", "224 F"), ("2-1/2 in", "225 F", "224 F"),
    ("2-17/32 in", "300 F", "299 F"),
])
def test_category_c_preheat_at_the_minimum_and_just_below(thickness, at_minimum, just_below):
    base = dict(process="SMAW", electrode="E8018-C3", base_metals=["ASTM A572 Gr 65"], thickness_max=thickness)
    assert review(dict(base, preheat_min=at_minimum)) == []
    finding = only(review(dict(base, preheat_min=just_below)), "preheat")
    assert "Category C (ASTM A572 Gr 65)" in finding.message and finding.severity == "not_prequalified"


def test_a572_gr_65_at_1_in_with_50_f_is_not_prequalified():  # D1.1:2020 Table 5.8 Category C (see above)
    findings = review(dict(process="FCAW", electrode="E71T-1C", base_metals=["ASTM A572 Gr 65"],
                           thickness_max="1 in", preheat_min="50 F"))
    assert ("preheat", "not_prequalified") in rules_of(findings)
    assert ("matching_filler", "error") in rules_of(findings)  # Group III needs 80 ksi filler (from memory)


def test_category_c_si_figures():  # D1.1:2020 Table 5.8 Category C, SI 10 C to 20 mm, 65 C to 38 mm (from memory)
    base = dict(process="SMAW", electrode="E8018-C3", base_metals=["ASTM A913 Gr 60"])
    assert review(dict(base, thickness_max="20 mm", preheat_min="10 C")) == []
    assert only(review(dict(base, thickness_max="20 mm", preheat_min="9 C")), "preheat")
    assert only(review(dict(base, thickness_max="21 mm", preheat_min="64 C")), "preheat")


def test_a913_with_h8_filler_is_category_d():  # D1.1:2020 Table 5.8 Category D: 32 F all thicknesses (US
    # published in an older edition's table; the H8 condition from memory)
    base = dict(process="SMAW", electrode="E8018-C3 H8", base_metals=["ASTM A913 Gr 65"], thickness_max="3 in")
    assert review(dict(base, preheat_min="32 F")) == []
    assert only(review(dict(base, preheat_min="31 F")), "preheat")
    # without a hydrogen designator of 8 or less it is Category C: over 2-1/2 in needs 300 F
    finding = only(review(dict(base, electrode="E8018-C3", preheat_min="299 F")), "preheat")
    assert "Category C" in finding.message
    finding = only(review(dict(base, electrode="E8018-C3 H16", preheat_min="299 F")), "preheat")
    assert "Category C" in finding.message


def test_the_base_metal_needing_most_preheat_governs():  # D1.1:2020 Table 5.8: thickest part, each metal's category
    base = dict(process="SMAW", electrode="E7018", base_metals=["ASTM A36", "ASTM A572 Gr 65"], thickness_max="3/4 in")
    assert review(dict(base, preheat_min="50 F")) == []  # E7018 matches the lower group (A36) (from memory)
    finding = only(review(dict(base, preheat_min="49 F")), "preheat")
    assert "Category C (ASTM A572 Gr 65)" in finding.message


def test_non_low_hydrogen_smaw_on_group_ii_has_no_category_but_is_not_matching():  # D1.1:2020 Table 5.8: Cat A is
    # for Group I steels only; Group II needs low-hydrogen filler (from memory)
    findings = review(dict(process="SMAW", electrode="E7014", base_metals=["ASTM A992"], thickness_max="1 in",
                           preheat_min="32 F"))
    assert rules_of(findings) == [("matching_filler", "not_prequalified")]


def test_group_iii_smaw_needs_a5_5_low_hydrogen_80_ksi():  # D1.1:2020 matching filler, Group III (from memory)
    assert only(review(wps(electrode="E7018", base_metals=["ASTM A572 Gr 60"])), "matching_filler").severity == \
        "error"
    assert review(wps(electrode="E8018-C3", base_metals=["ASTM A572 Gr 60"])) == []
    finding = only(review(wps(electrode="E8013-G", current="AC", base_metals=["ASTM A572 Gr 60"])),
                   "matching_filler")
    assert finding.severity == "not_prequalified"


def test_undermatching_filler_is_an_error():  # AWS D1.1:2020 clause 5 matching filler, Group II: E70XX (from memory)
    finding = only(review(wps(electrode="E6010", base_metals=["ASTM A572 Gr 50"])), "matching_filler")
    assert finding.severity == "error" and finding.field == "electrode" and "undermatches" in finding.message


def test_a36_group_i_takes_e60xx():  # AWS D1.1:2020 clause 5 matching filler, Group I: E60XX or E70XX (from memory)
    assert review(wps(electrode="E6013", current="AC", thickness_max="3/4 in", preheat_min="32 F")) == []


def test_a36_over_three_quarters_needs_70_ksi():  # AWS D1.1:2020: A36 over 3/4 in is Group II (published)
    findings = review(wps(electrode="E6013", current="AC", thickness_max="25/32 in", preheat_min="150 F"))
    assert ("matching_filler", "error") in rules_of(findings)


def test_group_ii_smaw_needs_low_hydrogen():  # AWS D1.1:2020 clause 5, Group II: E7015/16/18/28 (from memory)
    finding = only(review(wps(electrode="E7014", base_metals=["ASTM A992"], preheat_min="32 F")), "matching_filler")
    assert finding.severity == "not_prequalified"


@pytest.mark.parametrize("electrode", ["E7015", "E7016", "E7018", "E7018-1 H4R", "E7016-1"])
def test_group_ii_low_hydrogen_smaw_matches(electrode):  # AWS D1.1:2020 clause 5 Group II list (from memory)
    assert review(wps(electrode=electrode, base_metals=["ASTM A992"])) == []


def test_e7048_is_not_in_the_group_ii_list():  # AWS D1.1:2020 clause 5 Group II: E7015/16/18/28 only (from memory)
    assert only(review(wps(electrode="E7048", base_metals=["ASTM A992"])), "matching_filler")


def test_joining_two_groups_needs_low_hydrogen_at_the_lower_strength():  # D1.1:2020 clause 5 (from memory)
    findings = review(wps(electrode="E6013", current="AC", base_metals=["ASTM A36", "ASTM A572 Gr 50"]))
    assert rules_of(findings) == [("matching_filler", "not_prequalified")]  # strength may match A36 (60 ksi)


def test_overmatching_filler_is_a_warning():  # AWS D1.1:2020 clause 5 matching filler (from memory)
    assert rules_of(review(wps(electrode="E8018-C3"))) == [("overmatching_filler", "warning")]


def test_single_pass_flux_cored_is_not_matching():  # D1.1:2020 clause 5 excludes single-pass FCAW (from memory)
    findings = review(dict(process="FCAW", electrode="E71T-GS", base_metals=["ASTM A36"]))
    assert rules_of(findings) == [("matching_filler", "not_prequalified")]


def test_single_pass_metal_cored_is_not_matching():  # D1.1:2020 clause 5 excludes E70C-GS (from memory)
    findings = review(dict(process="GMAW", transfer="spray", electrode="E70C-GS", base_metals=["ASTM A36"]))
    assert rules_of(findings) == [("matching_filler", "not_prequalified")]
    assert review(dict(process="GMAW", transfer="spray", electrode="E70C-6M", base_metals=["ASTM A36"])) == []


# --- shielding: AWS A5.20 usability types (from memory) ---------------------------------------------

FCAW_FILLET = dict(process="FCAW", electrode="E71T-1C", current="DCEP", positions=["F"], joint="fillet",
                   base_metals=["ASTM A36"], thickness_max="1/2 in", preheat_min="50 F")


@pytest.mark.parametrize("process, electrode, current, gas, ok", [
    ("FCAW-G", "E71T-1C", "DCEP", None, True),
    ("FCAW-G", "E71T-8", "DCEN", None, False),  # T-8 is self-shielded (A5.20, from memory)
    ("FCAW-S", "E71T-8", "DCEN", None, True),
    ("FCAW-S", "E71T-1C", "DCEP", None, False),  # T-1 uses an external gas (A5.20, from memory)
    ("FCAW", "E71T-8", "DCEN", "75Ar/25CO2", False),  # gas given to a self-shielded electrode
    ("FCAW", "E71T-1C", "DCEP", "none", False),  # no gas for a gas-shielded electrode
    ("FCAW", "E71T-1C", "DCEP", "100% CO2", True),
    ("FCAW", "E71T-8", "DCEN", "none", True),
    ("FCAW", "E71T-G", "DCEP", "none", True),  # T-G: shielding not specified by the classification
    ("FCAW", "E71T-8", "DCEN", None, True),  # nothing said about shielding: nothing to disagree with
])
def test_process_and_electrode_shielding_agree(process, electrode, current, gas, ok):  # AWS A5.20 (from memory)
    findings = review(dict(FCAW_FILLET, process=process, electrode=electrode, current=current, shielding_gas=gas))
    if ok:
        assert "shielding" not in [f.rule for f in findings], findings
    else:
        finding = only(findings, "shielding")
        assert finding.severity == "error" and "A5.20" in finding.source and electrode in finding.message


def test_fcaw_g_with_no_gas_contradicts_itself():
    finding = only(review(dict(FCAW_FILLET, process="FCAW-G", shielding_gas="none")), "shielding")
    assert finding.field == "shielding_gas"


@pytest.mark.parametrize("electrode, gas, ok", [
    ("E71T-1C", "100% CO2", True), ("E71T-1C", "75Ar/25CO2", False), ("E71T-1M", "75Ar/25CO2", True),
    ("E71T-1M", "CO2", False), ("E71T-1M", "M21 (Ar + 18% CO2)", True), ("E71T-1C", "carbon dioxide", True),
])
def test_gas_designator_matches_the_gas(electrode, gas, ok):  # AWS A5.20 C = CO2, M = argon mix (published)
    findings = review(dict(FCAW_FILLET, electrode=electrode, shielding_gas=gas))
    assert (findings == []) is ok, findings
    if not ok:
        assert only(findings, "shielding_gas_designator").severity == "not_prequalified"


def test_gmaw_needs_a_gas():  # GMAW is gas shielded by definition
    assert only(review(dict(GMAW_FILLET, shielding_gas="none")), "shielding").severity == "error"
    assert review(dict(GMAW_FILLET, shielding_gas="90Ar/10CO2")) == []


# --- cyclically loaded fillet welds: D1.1:2020 clause 4 Part C, minimum 3/16 in [5 mm] (from memory) ---------

@pytest.mark.parametrize("size, ok", [("3/16 in", True), ("5/32 in", False), ("5 mm", True), ("4.5 mm", False)])
def test_cyclic_fillet_minimum_3_16_in(size, ok):  # D1.1:2020 clause 4 Part C (from memory)
    base = wps(joint="fillet", thickness_min="1/4 in", fillet_size_min=size, loading="cyclic")
    findings = review(base)
    if ok:
        assert findings == []
    else:
        finding = only(findings, "cyclic_fillet_size")
        assert finding.severity == "error" and "from memory" in finding.source
    assert "cyclic_fillet_size" not in [f.rule for f in review(dict(base, loading="static"))]


def test_loading_must_be_static_or_cyclic():
    with pytest.raises(ValueError, match="loading"):
        review(wps(loading="fatigue"))


# --- minimum fillet size: AISC 360-16 Table J2.4 ---------------------------------------------------

@pytest.mark.parametrize("thinner, at_minimum, just_under", [
    ("1/4 in", "1/8 in", "3/32 in"),  # AISC 360-16 Table J2.4: t <= 1/4 in: 1/8 in (published)
    ("1/2 in", "3/16 in", "5/32 in"),  # 1/4 < t <= 1/2: 3/16 in (published)
    ("17/32 in", "1/4 in", "7/32 in"),  # 1/2 < t <= 3/4: 1/4 in (published)
    ("3/4 in", "1/4 in", "7/32 in"),  # 1/2 < t <= 3/4: 1/4 in (published)
    ("25/32 in", "5/16 in", "9/32 in"),  # t > 3/4: 5/16 in (published)
    ("13 mm", "5 mm", "4.5 mm"),  # SI: over 6 to 13 mm: 5 mm (sizes published, band edges from memory)
    ("14 mm", "6 mm", "5 mm"),  # SI: over 13 to 19 mm: 6 mm
])
def test_minimum_fillet_at_the_j2_4_minimum_and_just_under(thinner, at_minimum, just_under):
    base = dict(process="SMAW", electrode="E7018", joint="fillet", thickness_min=thinner)
    assert review(dict(base, fillet_size_min=at_minimum)) == []
    finding = only(review(dict(base, fillet_size_min=just_under)), "minimum_fillet_size")
    assert finding.severity == "not_prequalified" and finding.field == "fillet_size_min" and "J2.4" in finding.source


# AWS D1.1/D1.1M:2020 Table 7.7 note (from memory, high confidence): for non-low-hydrogen processes without
# calculated preheat, T is the thicker part joined, and single-pass welds are used.
@pytest.mark.parametrize("electrode, current, thicker, at_minimum, just_under", [
    ("E7024", "AC", "3/4 in", "1/4 in", "7/32 in"),  # thicker 3/4 in: 1/4 in (the thinner 1/2 in would allow 3/16)
    ("E6010", "DCEP", "3/4 in", "1/4 in", "3/16 in"),
    ("E7024", "AC", "25/32 in", "5/16 in", "9/32 in"),  # thicker just over 3/4 in: 5/16 in
    ("E6013", "AC", "1/2 in", "3/16 in", "5/32 in"),  # both parts 1/2 in: 3/16 in
])
def test_non_low_hydrogen_smaw_minimum_fillet_uses_the_thicker_part(electrode, current, thicker, at_minimum,
                                                                    just_under):  # D1.1:2020 Table 7.7 note
    base = dict(process="SMAW", electrode=electrode, current=current, joint="fillet", thickness_min="1/2 in",
                thickness_max=thicker)
    assert review(dict(base, fillet_size_min=at_minimum)) == []
    finding = only(review(dict(base, fillet_size_min=just_under)), "minimum_fillet_size")
    assert finding.severity == "not_prequalified" and "Table 7.7" in finding.source and "from memory" in finding.source
    assert "thicker part" in finding.message and "not low hydrogen" in finding.message


def test_low_hydrogen_smaw_minimum_fillet_still_uses_the_thinner_part():  # AISC 360-16 Table J2.4 (published)
    base = dict(process="SMAW", electrode="E7018", joint="fillet", thickness_min="1/2 in", thickness_max="3/4 in")
    assert review(dict(base, fillet_size_min="3/16 in")) == []


def test_non_low_hydrogen_minimum_fillet_must_be_a_single_pass():  # D1.1:2020 Table 7.7 note (from memory)
    base = dict(process="SMAW", electrode="E7024", current="AC", joint="fillet", positions=["F"],
                thickness_min="1/2 in", thickness_max="3/4 in", fillet_size_min="1/4 in")
    assert review(dict(base, single_pass_size_max="1/4 in")) == []
    finding = only(review(dict(base, single_pass_size_max="7/32 in")), "minimum_fillet_single_pass")
    assert finding.severity == "not_prequalified" and finding.field == "single_pass_size_max"


def test_minimum_fillet_need_not_exceed_the_thinner_part():  # AISC / AWS minimum size note (from memory)
    assert minimum_fillet_size(parse_length("3/32 in")) == parse_length("3/32 in")


def test_minimum_fillet_needs_the_thickness():  # nothing to judge without the thinner part
    assert review(dict(process="SMAW", electrode="E7018", fillet_size_min="1/16 in")) == []


# --- ranges ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("low_key, low, high_key, high", [
    ("amperage_min", "250 A", "amperage_max", "200 A"),
    ("voltage_min", 30, "voltage_max", "28 V"),
    ("travel_speed_min", "14 in/min", "travel_speed_max", "12 in/min"),
    ("wire_feed_speed_min", "400 in/min", "wire_feed_speed_max", "350 in/min"),
    ("thickness_min", "1 in", "thickness_max", "1/2 in"),
    ("fillet_size_min", "5/16 in", "fillet_size_max", "1/4 in"),
    ("preheat_min", "200 F", "interpass_max", "150 F"),
])
def test_range_with_minimum_above_maximum_is_an_error(low_key, low, high_key, high):  # consistency of the WPS
    finding = only(review({"process": "SMAW", low_key: low, high_key: high}), "range")
    assert finding.severity == "error" and finding.field == low_key
    assert low_key in finding.message and high_key in finding.message


def test_range_with_equal_ends_is_fine():
    assert review(dict(process="SMAW", amperage_min="200 A", amperage_max=200, voltage_min="25", voltage_max="25 V",
                       travel_speed_min="10 in/min", travel_speed_max="254 mm/min")) == []


# --- bad input ------------------------------------------------------------------------------------

@pytest.mark.parametrize("code", ["AWS D1.5:2020", "AWS D1.1:2015", "", None, 2020])
def test_unknown_code_is_refused_naming_the_known_ones(code):
    with pytest.raises(ValueError, match="AWS D1.1:2020"):
        review(SMAW_FILLET, code=code)


def test_code_spelled_with_the_metric_designation_is_accepted():
    assert review(SMAW_FILLET, code="AWS D1.1/D1.1M:2020") == []


@pytest.mark.parametrize("key, value, named", [
    ("electrode", "E7O18", "electrode"),
    ("electrode_diameter", "1/8", "electrode_diameter"),
    ("single_pass_size_max", "quarter", "single_pass_size_max"),
    ("thickness_max", -1, "thickness_max"),
    ("preheat_min", "50", "preheat_min"),
    ("current", "DC", "current"),
    ("current", 5, "current"),
    ("positions", ["2F"], "positions"),
    ("positions", [], "positions"),
    ("positions", 3, "positions"),
    ("joint", "butt", "joint"),
    ("transfer", "dip", "transfer"),
    ("base_metals", [None], "base_metals"),
    ("base_metals", [], "base_metals"),
    ("amperage_min", "two hundred", "amperage_min"),
    ("voltage_max", "250 V", "voltage_max"),
    ("travel_speed_min", "10", "travel_speed_min"),
    ("unit_system", "metric", "unit_system"),
    ("process", 7, "process"),
    ("process", "", "process"),
])
def test_malformed_value_names_its_key(key, value, named):
    with pytest.raises(ValueError, match=named):
        review(wps(**{key: value}))


def test_unknown_key_is_refused_listing_the_known_ones():
    with pytest.raises(ValueError, match="Unknown WPS key.*polarity.*known keys"):
        review(wps(polarity="DCEP"))


@pytest.mark.parametrize("bad", [None, "SMAW", ["SMAW"], 5])
def test_wps_must_be_a_dict(bad):
    with pytest.raises(ValueError, match="dict"):
        review(bad)


def test_process_is_required():
    with pytest.raises(ValueError, match="process is required"):
        review({"electrode": "E7018"})


def test_none_means_not_given():  # a blank form field
    assert review(wps(preheat_min=None, thickness_max=None, electrode=None)) == []


def test_positions_may_be_written_as_text():
    assert parse_procedure(wps(positions="F, H")).positions == ("F", "H")


# --- for forms and for extension --------------------------------------------------------------------

def test_findings_by_field_puts_each_finding_beside_its_key():
    findings = review(wps(electrode="E6010", current="AC", base_metals=["ASTM A514"], amperage_min="200 A",
                          amperage_max="150 A"))
    grouped = findings_by_field(findings)
    assert set(grouped) == {"current", "base_metals", "amperage_min"}
    assert all(f.field == key for key, items in grouped.items() for f in items)


def test_findings_without_a_field_go_under_general():
    assert findings_by_field([Finding("x", "warning", "m", "s")]) == {GENERAL: [Finding("x", "warning", "m", "s")]}


def test_is_prequalified():
    assert is_prequalified(review(SMAW_FILLET))
    assert is_prequalified([Finding("x", "warning", "m", "s")])
    assert not is_prequalified(review(wps(process="GTAW", electrode=..., current=...)))


def test_finding_refuses_an_unknown_severity():
    with pytest.raises(ValueError, match="severity"):
        Finding("x", "fatal", "m", "s")


def test_a_new_rule_is_one_function_appended_to_rules():  # how DEVELOPERS.md says to add a rule
    def rule_no_overhead(procedure):
        if procedure.positions and "OH" in procedure.positions:
            yield Finding("no_overhead", "warning", "shop rule: no overhead welding", "invented shop rule")

    findings = review(wps(positions=["OH"]), rules=RULES + (rule_no_overhead,))
    assert rules_of(findings) == [("no_overhead", "warning")]


# --- properties -----------------------------------------------------------------------------------

LENGTHS = st.sampled_from(["1/16 in", "1/8 in", "3/16 in", "1/4 in", "5/16 in", "3/8 in", "1/2 in", "3/4 in", "1 in",
                           "3 mm", "6 mm", "8 mm", "25 mm"])
wps_dicts = st.fixed_dictionaries(
    {"process": st.sampled_from(["SMAW", "GMAW", "FCAW", "SAW", "GTAW", "ESW", "OTHER"])},
    optional={
        "transfer": st.sampled_from(["short_circuit", "globular", "spray", "pulsed"]),
        "electrode": st.sampled_from(["E6010", "E6013", "E7018", "E7028", "E8018-C3", "ER70S-6", "E70C-6M",
                                      "E71T-1C", "E70T-4", "E71T-GS", "F7A2-EM12K"]),
        "electrode_diameter": LENGTHS, "current": st.sampled_from(["AC", "DCEP", "DCEN"]),
        "positions": st.lists(st.sampled_from(["F", "H", "V", "OH"]), min_size=1, unique=True),
        "joint": st.sampled_from(["fillet", "groove"]), "single_pass_size_max": LENGTHS,
        "base_metals": st.lists(st.sampled_from(["ASTM A36", "ASTM A572 Gr 50", "ASTM A992", "ASTM A514"]),
                                min_size=1),
        "thickness_min": LENGTHS, "thickness_max": LENGTHS, "fillet_size_min": LENGTHS, "fillet_size_max": LENGTHS,
        "preheat_min": st.sampled_from(["32 F", "50 F", "150 F", "0 C", "65 C"]),
        "interpass_max": st.sampled_from(["100 F", "500 F", "250 C"]),
        "electrode_arrangement": st.sampled_from(["single", "parallel", "multiple"]),
    },
)


@settings(max_examples=300)
@given(wps_dicts)
def test_any_well_formed_wps_gives_well_formed_findings(procedure):
    findings = review(procedure)
    for f in findings:
        assert f.severity in ("error", "not_prequalified", "warning")
        assert f.source and f.message
        assert f.field is None or f.field in KNOWN_KEYS


@given(st.dictionaries(st.sampled_from(KNOWN_KEYS), st.one_of(st.none(), st.text(max_size=12), st.integers(),
                                                              st.lists(st.text(max_size=3), max_size=3)),
                       max_size=6))
def test_any_garbage_wps_gives_findings_or_value_error(procedure):
    try:
        findings = review(procedure)
    except ValueError:
        return
    assert isinstance(findings, list)
