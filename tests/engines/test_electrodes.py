"""Filler-metal decoding: each expectation names the AWS specification (values via the shared domain reference,
with its status: "published" or "from memory")."""

import dataclasses
import string

import pytest
from hypothesis import given
from hypothesis import strategies as st

from procedures import electrode_list
from procedures.electrodes import ALL_POSITIONS, Electrode, decode, group_of, groups_qualified

ALL = {"F", "H", "V", "OH"}
FH = {"F", "H"}


# --- AWS A5.1 ------------------------------------------------------------------------------------

# AWS A5.1 rows as published in two filler makers' public A5.1 guides (ESAB's A5.1 summary, Elga's 2013 catalogue
# guide to A5.1), unless marked.
A5_1 = [
    # classification, tensile, positions, currents, low hydrogen
    ("E6010", 60, ALL, {"DCEP"}, False),  # cellulose sodium, DCEP (published)
    ("E6011", 60, ALL, {"AC", "DCEP"}, False),  # cellulose potassium (published)
    ("E6012", 60, ALL, {"AC", "DCEN"}, False),  # titania sodium (published)
    ("E6013", 60, ALL, {"AC", "DCEP", "DCEN"}, False),  # titania potassium (published)
    ("E6019", 60, ALL, {"AC", "DCEP", "DCEN"}, False),  # iron oxide titania, all positions (published)
    ("E6020", 60, FH, {"AC", "DCEP", "DCEN"}, False),  # high iron oxide, position digit 2 (published)
    ("E6022", 60, FH, {"AC", "DCEN"}, False),  # position digit 2, AC or DCEN (published; guides differ on DCEP)
    ("E6027", 60, FH, {"AC", "DCEP", "DCEN"}, False),  # iron oxide, iron powder (published)
    ("E7014", 70, ALL, {"AC", "DCEP", "DCEN"}, False),  # iron powder titania (published)
    ("E7015", 70, ALL, {"DCEP"}, True),  # low hydrogen sodium (published)
    ("E7016", 70, ALL, {"AC", "DCEP"}, True),  # low hydrogen potassium (published)
    ("E7018", 70, ALL, {"AC", "DCEP"}, True),  # low hydrogen potassium iron powder (published)
    ("E7024", 70, FH, {"AC", "DCEP", "DCEN"}, False),  # position digit 2, AC and DC either polarity (published)
    ("E7027", 70, FH, {"AC", "DCEP", "DCEN"}, False),  # (published)
    ("E7028", 70, FH, {"AC", "DCEP"}, True),  # flat and horizontal fillet (published)
    ("E7048", 70, ALL, {"AC", "DCEP"}, True),  # position digit 4 (published)
]


@pytest.mark.parametrize("text, tensile, positions, currents, low_hydrogen", A5_1)
def test_a5_1_classification_decodes_to_its_published_properties(text, tensile, positions, currents, low_hydrogen):
    # AWS A5.1: E60XX / E70XX = 60 / 70 ksi; third digit 1 all positions, 2 flat and horizontal fillet,
    # 4 flat, horizontal, overhead, vertical down; currents per covering (status per row above)
    e = decode(text)
    assert e.classification == text
    assert e.spec == "AWS A5.1"
    assert e.processes == frozenset({"SMAW"})
    assert e.tensile_ksi == tensile and isinstance(e.tensile_ksi, int)
    assert e.positions == frozenset(positions)
    assert e.currents == frozenset(currents)
    assert e.low_hydrogen is low_hydrogen


def test_e7018_1_h4r_reads_every_optional_designator():  # AWS A5.1: -1, H4, R (designators from memory)
    e = decode("E7018-1 H4R")
    assert e.classification == "E7018-1 H4R"
    assert e.designators == ("-1", "H4", "R")
    assert e.diffusible_hydrogen_ml == 4
    assert e.moisture_resistant is True
    assert e.tensile_ksi == 70 and e.low_hydrogen


@pytest.mark.parametrize("typed", ["e7018-1 h4r", "E7018-1H4R", "  E7018-1   H4R ", "E7018\u20131 H4R"])
def test_classification_is_normalised_to_one_spelling(typed):  # AWS A5.1 designation, normalised
    assert decode(typed).classification == "E7018-1 H4R"


def test_e7028_is_flat_and_horizontal_fillet_only():  # AWS A5.1: E7028 flat and horizontal fillet (published)
    e = decode("E7028")
    assert e.positions == frozenset(FH)
    assert e.horizontal_fillet_only is True
    assert "horizontal fillet" in e.positions_note


def test_position_digit_4_notes_vertical_down():  # AWS A5.1: 4 = flat, horizontal, overhead, vertical down
    assert "vertical down" in decode("E7048").positions_note


def test_e7018m_is_a5_1_dcep_only():  # AWS A5.1 E7018M: DCEP only (from memory)
    e = decode("E7018M")
    assert e.spec == "AWS A5.1" and e.currents == frozenset({"DCEP"})
    assert any("from memory" in note for note in e.notes)


@pytest.mark.parametrize("text, group", [
    ("E6010", "F3"), ("E6011", "F3"),  # AWS D1.1:2020 clause 6 electrode groups (from memory)
    ("E6012", "F2"), ("E6013", "F2"), ("E7014", "F2"),  # from memory
    ("E7015", "F4"), ("E7016", "F4"), ("E7018", "F4"), ("E7048", "F4"), ("E8018-C3", "F4"),  # from memory
    ("E6020", "F1"), ("E7024", "F1"), ("E6027", "F1"), ("E7028", "F1"),  # from memory
])
def test_smaw_electrode_group(text, group):  # AWS D1.1:2020 clause 6 SMAW electrode groups (from memory)
    assert group_of(text) == group
    assert decode(text).group == group


def test_group_of_accepts_a_decoded_electrode():  # AWS D1.1:2020 clause 6 (from memory)
    assert group_of(decode("E7018-1 H4R")) == "F4"


def test_group_of_refuses_a_wire():  # groups F1..F4 are for SMAW electrodes (AWS D1.1:2020 clause 6, from memory)
    with pytest.raises(ValueError, match="SMAW"):
        group_of("ER70S-6")


@pytest.mark.parametrize("group, qualified", [
    ("F4", {"F1", "F2", "F3", "F4"}), ("F3", {"F1", "F2", "F3"}), ("F2", {"F1", "F2"}), ("F1", {"F1"}),
])
def test_groups_qualified(group, qualified):  # AWS D1.1:2020 clause 6: F4 qualifies F4..F1 (from memory)
    assert groups_qualified(group) == frozenset(qualified)


@pytest.mark.parametrize("bad", ["F5", "", None, 4])
def test_groups_qualified_refuses_unknown_group(bad):
    with pytest.raises(ValueError, match="F1, F2, F3 or F4"):
        groups_qualified(bad)


# --- AWS A5.5 ------------------------------------------------------------------------------------

@pytest.mark.parametrize("text, tensile", [
    ("E8018-C3", 80), ("E9018-M", 90), ("E11018-M", 110), ("E11018M", 110), ("E7018-A1", 70),
    ("E10018-D2", 100), ("E12018-M", 120), ("E8018-B2L", 80), ("E8010-P1", 80),
])
def test_a5_5_strength_from_the_tensile_digits(text, tensile):  # AWS A5.5 EXXXXX-suffix (strength levels from memory)
    e = decode(text)
    assert e.spec == "AWS A5.5"
    assert e.tensile_ksi == tensile
    assert e.classification == text
    assert e.processes == frozenset({"SMAW"})


def test_a5_5_covering_reads_like_a5_1():  # AWS A5.5 uses the A5.1 position and covering digits
    e = decode("E8018-C3 H4R")
    assert e.low_hydrogen and e.positions == frozenset(ALL) and e.currents == frozenset({"AC", "DCEP"})
    assert e.designators == ("-C3", "H4", "R")


def test_a5_5_e8010_p1_is_cellulosic_not_low_hydrogen():  # AWS A5.5 E8010-P1: covering digit 10
    e = decode("E8010-P1")
    assert not e.low_hydrogen and e.currents == frozenset({"DCEP"})


# --- AWS A5.18 -----------------------------------------------------------------------------------

@pytest.mark.parametrize("text", ["ER70S-2", "ER70S-3", "ER70S-6"])
def test_a5_18_solid_wire_is_70_ksi_for_gmaw_and_gtaw(text):  # AWS A5.18 ER70S-2, -3, -6 (published)
    e = decode(text)
    assert e.spec == "AWS A5.18"
    assert e.tensile_ksi == 70
    assert e.processes == frozenset({"GMAW", "GTAW"})
    assert e.classification == text


def test_a5_18_currents_depend_on_the_process():  # common practice, no source: GMAW DCEP, GTAW DCEN
    e = decode("ER70S-6")
    assert e.currents_for("GMAW") == frozenset({"DCEP"})
    assert e.currents_for("GTAW") == frozenset({"DCEN"})
    with pytest.raises(ValueError, match="not used with"):
        e.currents_for("SMAW")


def test_a5_18_metal_cored():  # AWS A5.18 E70C-6M metal cored, 70 ksi (published)
    e = decode("E70C-6M")
    assert e.processes == frozenset({"GMAW"}) and e.tensile_ksi == 70 and e.shielding == "M"


def test_a5_18_hyphen_may_be_left_out():  # AWS A5.18 designation, normalised
    assert decode("er70s6").classification == "ER70S-6"


# --- AWS A5.20 -----------------------------------------------------------------------------------

def test_e71t_1c_is_all_position_gas_shielded():  # AWS A5.20 E71T-1: all positions (published); C = CO2
    e = decode("E71T-1C")
    assert e.spec == "AWS A5.20" and e.processes == frozenset({"FCAW"})
    assert e.positions == frozenset(ALL)
    assert e.tensile_ksi == 70
    assert e.shielding == "C" and not e.self_shielded


def test_e70t_1c_is_flat_and_horizontal():  # AWS A5.20: second digit 0 = flat and horizontal (from memory)
    e = decode("E70T-1C")
    assert e.positions == frozenset(FH)
    assert any("from memory" in note for note in e.notes)


def test_e71t_1m_is_argon_mix():  # AWS A5.20: suffix M = argon mix (published)
    assert decode("E71T-1M").shielding == "M"


@pytest.mark.parametrize("text, current", [("E71T-8", "DCEN"), ("E71T-11", "DCEN"), ("E70T-4", "DCEP")])
def test_self_shielded_types(text, current):  # AWS A5.20 usability types (from memory)
    e = decode(text)
    assert e.self_shielded and e.shielding is None
    assert e.currents == frozenset({current})


def test_single_pass_flux_cored_type_is_marked():  # AWS A5.20 T-GS single pass (from memory)
    assert decode("E71T-GS").single_pass_only is True
    assert decode("E71T-1C").single_pass_only is False


def test_a5_20_optional_designators():  # AWS A5.20: J and H designators (from memory)
    e = decode("e71t-1m-jh8")
    assert e.classification == "E71T-1M-JH8"
    assert e.diffusible_hydrogen_ml == 8


# --- AWS A5.17 -----------------------------------------------------------------------------------

def test_f7a2_em12k_reads_each_part():  # AWS A5.17 F7A2-EM12K: 70-95 ksi, as welded, -20 F, EM12K (published)
    e = decode("F7A2-EM12K")
    assert e.spec == "AWS A5.17" and e.processes == frozenset({"SAW"})
    assert e.tensile_ksi == 70 and e.tensile_ksi_max == 95
    assert e.heat_treatment == "as-welded"
    assert e.impact_test_f == -20
    assert e.wire == "EM12K"


def test_f6p0_eh14():  # AWS A5.17: F6 = 60-80 ksi, P = post-weld heat treated, 0 = 0 F (from memory)
    e = decode("F6P0-EH14")
    assert (e.tensile_ksi, e.tensile_ksi_max, e.heat_treatment, e.impact_test_f, e.wire) == (
        60, 80, "post-weld heat treated", 0, "EH14")


def test_f7az_has_no_impact_requirement():  # AWS A5.17: Z = no impact requirement (from memory)
    assert decode("F7AZ-EL12").impact_test_f is None


def test_saw_is_flat_and_horizontal():  # AWS D1.1:2020 Table 5.1 lists SAW in F and H only
    assert decode("F7A2-EM12K").positions == frozenset(FH)


def test_saw_hydrogen_designator_after_the_wire():  # AWS A5.17 optional H designator (from memory)
    e = decode("F7A8-EM12KH8")
    assert e.wire == "EM12K" and e.diffusible_hydrogen_ml == 8 and e.impact_test_f == -80


# --- malformed input: the message names the wrong part ------------------------------------------------

def test_tensile_digits_wrong():  # AWS A5.1: E60XX / E70XX
    with pytest.raises(ValueError, match=r"E7O18: the tensile digits must be 60, 70.*found '7O'"):
        decode("E7O18")


# A5.1 does not list these; the near ones named are those the published A5.1 guides list (see A5_1 above) and,
# where A5.5 has the same digits with an alloy suffix, the A5.5 forms (from memory).
@pytest.mark.parametrize("text, near", [
    ("E7010", ["exist: E6010", "E7010-A1", "E7010-P1", "AWS A5.5"]),
    ("E7020", ["E6020", "E7020-A1", "AWS A5.5"]),
    ("E6024", ["E7024"]),
    ("E6028", ["E7028"]),
    ("E6015", ["E7015"]),
    ("E7012", ["E6012"]),
    ("E7019", ["E6019"]),
])
def test_a5_1_refuses_what_it_does_not_list_and_names_near_ones(text, near):  # AWS A5.1 list (published)
    with pytest.raises(ValueError) as info:
        decode(text)
    message = str(info.value)
    assert f"{text} is not a classification AWS A5.1 lists" in message
    for part in near:
        assert part in message


@pytest.mark.parametrize("text, spec, tensile", [
    ("E6019", "AWS A5.1", 60), ("E6022", "AWS A5.1", 60),  # A5.1 (published)
    ("E12018M1", "AWS A5.5", 120), ("E9018-B91", "AWS A5.5", 90), ("E7010-A1", "AWS A5.5", 70),  # from memory
    ("E7020-A1", "AWS A5.5", 70), ("E8045-P2", "AWS A5.5", 80),  # A5.5, from memory
])
def test_classifications_that_exist_are_read(text, spec, tensile):
    e = decode(text)
    assert e.spec == spec and e.tensile_ksi == tensile and e.classification == text


def test_e6022_is_single_pass():  # AWS A5.1 E6022: single-pass electrode (from memory)
    assert decode("E6022").single_pass_only and not decode("E6013").single_pass_only


@pytest.mark.parametrize("text, part", [
    ("E8018-A1", "E7018-A1"),  # AWS A5.5: -A1 at 70 ksi only (from memory)
    ("E7018-B3", "E9018-B3"),  # AWS A5.5: -B3 at 90 ksi (from memory)
])
def test_a5_5_refuses_what_it_does_not_list(text, part):
    with pytest.raises(ValueError, match="is not a classification AWS A5.5 lists") as info:
        decode(text)
    assert part in str(info.value)


def test_a5_18_metal_cored_hydrogen_designator_and_gs():  # AWS A5.18 E70C-6M H4, E70C-GS (from memory)
    e = decode("E70C-6M H4")
    assert e.classification == "E70C-6M H4" and e.diffusible_hydrogen_ml == 4 and e.shielding == "M"
    gs = decode("E70C-GS")
    assert gs.single_pass_only and gs.shielding is None


def test_a5_18_metal_cored_needs_its_gas_designator():  # AWS A5.18: E70C-6C / E70C-6M (6M published)
    with pytest.raises(ValueError, match="E70C-6C, E70C-6M exist"):
        decode("E70C-6")


@pytest.mark.parametrize("text, listed", [("E71T-4", "E70T-4 only"), ("E70T-14", "E71T-14 only"),
                                          ("E71T-10", "E70T-10 only")])
def test_a5_20_refuses_a_position_digit_it_does_not_list(text, listed):  # AWS A5.20 (from memory)
    with pytest.raises(ValueError, match=listed):
        decode(text)


@pytest.mark.parametrize("text, part", [
    ("E8018", "needs its alloy suffix"),  # AWS A5.5: 80 ksi and up carry an alloy suffix
    ("E6018-1", "-1 (improved toughness)"),  # AWS A5.1: -1 for E7016, E7018, E7024 (from memory)
    ("E6010 H4", "low-hydrogen electrodes only"),  # AWS A5.1: H designators for low-hydrogen (from memory)
    ("E7018-Q9", "'Q9' is not an AWS A5.5 alloy suffix"),  # AWS A5.5 suffixes (from memory)
    ("E6018-C3", "AWS A5.5 starts at 70 ksi"),
    ("E7018 H5", "'H5' is not a diffusible hydrogen designator"),
    ("ER80S-D2", "AWS A5.28"),
    ("ER70S-9", "'9' is not an AWS A5.18 solid wire type"),
    ("E71T-8C", "self-shielded"),  # AWS A5.20: self-shielded types take no gas designator (from memory)
    ("E72T-1C", "position digit of AWS A5.20 must be 0"),
    ("E91T-1C", "tensile digit of AWS A5.20 must be 6"),
    ("E71T-15", "'T-15' is not an AWS A5.20 usability type"),
    ("E71T-1X", "'X' is not a shielding gas designator"),
    ("F8A2-EM12K", "AWS A5.23"),
    ("F7B2-EM12K", "A (as-welded) or P"),
    ("F7A3-EM12K", "'3' is not an AWS A5.17 impact digit"),
    ("F7A2-EX12", "'EX12' is not an AWS A5.17 electrode wire"),
    ("7018", "did you mean E7018"),
    ("E7018M-1", "military M designator alone"),
])
def test_malformed_part_is_named(text, part):
    with pytest.raises(ValueError) as info:
        decode(text)
    assert part in str(info.value)


@pytest.mark.parametrize("bad", [None, 7018, 70.18, b"E7018", ["E7018"], "", "   ", "not an electrode", "E" * 40,
                                 "E", "ER", "F", "E70", "E71T", "-"])
def test_bad_input_raises_value_error(bad):
    with pytest.raises(ValueError):
        decode(bad)


def test_result_is_frozen():
    e = decode("E7018")
    with pytest.raises(dataclasses.FrozenInstanceError):
        e.tensile_ksi = 80  # type: ignore[misc]


# --- properties ----------------------------------------------------------------------------------

@given(st.text(max_size=20))
def test_any_text_decodes_or_raises_value_error(text):
    try:
        result = decode(text)
    except ValueError:
        return
    assert isinstance(result, Electrode)


@given(st.text(alphabet=string.ascii_uppercase + string.digits + "- ", max_size=14))
def test_classification_like_text_decodes_or_raises_value_error(text):
    try:
        result = decode(text)
    except ValueError:
        return
    assert result.positions <= ALL_POSITIONS and result.processes


smaw_classifications = st.builds(
    lambda base, h, r: base + (f" H{h}" if h else "") + ("R" if r and h else ""),
    st.sampled_from(sorted(c for c in electrode_list.A5_1 if not c.endswith("M"))), st.sampled_from([None, 4, 8, 16]),
    st.booleans(),
)


@given(smaw_classifications)
def test_decoding_the_normalised_classification_gives_the_same_result(text):  # normalisation is stable
    try:
        first = decode(text)
    except ValueError as exc:  # H designators on a non-low-hydrogen covering are refused
        assert "low-hydrogen" in str(exc)
        return
    assert decode(first.classification) == first
    assert decode(first.classification.lower()) == first
    assert first.tensile_ksi == int(text[1:3])  # AWS A5.1: the first two digits are the tensile strength in ksi
