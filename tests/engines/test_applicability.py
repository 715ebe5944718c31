"""Does a WPS cover a weld: each rule at its limit and just past it, naming its source (procedures.applicability).

The WPS and welds are an invented scenario of our own: an FCAW fillet procedure for 1/4 in to 1-1/2 in plate,
fillets 3/16 in to 5/8 in, all positions, vertical up.
"""

import pytest

from procedures.applicability import (
    SOURCE_CODE,
    SOURCE_FILLET_SIZE,
    SOURCE_JOINT,
    SOURCE_POSITION,
    SOURCE_PROCESS,
    SOURCE_PROGRESSION,
    SOURCE_THICKNESS,
    SOURCE_UNITS,
    errors,
    review,
    reviewer,
)

WPS = dict(label="WPS BSW-101 rev 1", code="AWS D1.1:2020", unit_system="US", process="FCAW", transfer=None,
           positions=["F", "H", "V", "OH"], progression="up", joint_types=["fillet"], thickness_min="1/4 in",
           thickness_max="1-1/2 in", fillet_size_min="3/16 in", fillet_size_max="5/8 in")
WELD = dict(label="Weld W1", joint="fillet", position="H", thicknesses=["3/8 in", "5/8 in"], size="1/4 in")
JOB = dict(label="job J-2417", code_family="AWS", unit_system="US")


def changed(base, **changes):
    return {**base, **changes}


def rules(findings, severity="error"):
    return [f.rule for f in findings if f.severity == severity]


def test_the_wps_applies_to_a_weld_inside_every_range():
    assert review(WPS, WELD, JOB) == []


# --- thickness: AWS D1.1:2020 clause 5 / Table 6.2, the WPS's own range, limits included ------------------------

@pytest.mark.parametrize("part", ["1/4 in", "1-1/2 in"])
def test_a_part_at_either_thickness_limit_is_covered(part):  # SOURCE_THICKNESS, at the limit
    assert review(WPS, changed(WELD, thicknesses=[part, part]), JOB) == []


@pytest.mark.parametrize("part", ["7/32 in", "1-17/32 in"])
def test_a_part_just_past_a_thickness_limit_is_not(part):  # 1/32 in below 1/4 in, 1/32 in above 1-1/2 in
    findings = review(WPS, changed(WELD, thicknesses=["1/2 in", part]), JOB)
    assert rules(findings) == ["thickness"]
    assert "part 2" in findings[0].message and "1/4\" to 1-1/2\"" in findings[0].message
    assert findings[0].source == SOURCE_THICKNESS and "Table 6.2" in findings[0].source


def test_both_parts_outside_give_one_finding_each():
    findings = review(WPS, changed(WELD, thicknesses=["1/8 in", "2 in"]), JOB)
    assert [f.message.split(";")[0] for f in findings] == ["Weld W1 part 1 is 1/8\"", "Weld W1 part 2 is 2\""]


# --- fillet size: common practice, no source -----------------------------------------------------------------

@pytest.mark.parametrize("size", ["3/16 in", "5/8 in"])
def test_a_fillet_at_either_size_limit_is_covered(size):
    assert review(WPS, changed(WELD, size=size), JOB) == []


@pytest.mark.parametrize("size", ["5/32 in", "21/32 in"])
def test_a_fillet_just_past_a_size_limit_is_not(size):
    findings = review(WPS, changed(WELD, size=size), JOB)
    assert rules(findings) == ["fillet_size"]
    assert findings[0].source == SOURCE_FILLET_SIZE and "common practice, no source" in findings[0].source


def test_the_second_leg_of_an_unequal_fillet_is_checked_too():
    findings = review(WPS, changed(WELD, size="1/2 in", size2="3/4 in"), JOB)
    assert rules(findings) == ["fillet_size"] and '3/4"' in findings[0].message


def test_a_wps_without_a_fillet_range_is_a_warning_not_a_refusal():
    findings = review(changed(WPS, fillet_size_min=None, fillet_size_max=None), WELD, JOB)
    assert errors(findings) == [] and rules(findings, "warning") == ["fillet_size"]


def test_a_groove_weld_is_not_judged_by_the_fillet_range():
    wps = changed(WPS, joint_types=["fillet", "groove"])
    assert review(wps, changed(WELD, joint="groove", size="1 in"), JOB) == []


# --- joint type: clause 5 / Table 6.1 -------------------------------------------------------------------------

def test_a_groove_weld_on_a_fillet_wps_does_not_apply():
    findings = review(WPS, changed(WELD, joint="groove"), JOB)
    assert rules(findings) == ["joint"] and findings[0].source == SOURCE_JOINT


# --- position: clause 5 / Table 6.1, ISO 6947 codes read as AWS letters ---------------------------------------

def test_a_position_the_wps_lists_applies_and_one_it_does_not_list_does_not():
    flat_only = changed(WPS, positions=["F", "H"])
    assert review(flat_only, changed(WELD, position="H"), JOB) == []
    findings = review(flat_only, changed(WELD, position="OH"), JOB)
    assert rules(findings) == ["position"] and findings[0].source == SOURCE_POSITION


@pytest.mark.parametrize("iso, fits", [("PA", True), ("PB", True), ("PC", True), ("PD", False), ("PE", False)])
def test_iso_6947_codes_are_read_as_the_aws_letters(iso, fits):  # PA = 1F, PB = 2F, PC = 2G, PD = 4F, PE = 4G
    findings = review(changed(WPS, positions=["F", "H"]), changed(WELD, position=iso), JOB)
    assert (findings == []) is fits
    if not fits:
        assert iso in findings[0].message and "overhead (OH)" in findings[0].message


# --- vertical progression: Table 6.5 (from memory); ISO 6947 PF up, PG down ----------------------------------

def test_vertical_up_on_a_vertical_up_wps_applies():
    assert review(WPS, changed(WELD, position="PF"), JOB) == []
    assert review(WPS, changed(WELD, position="V"), JOB) == []  # the weld is made to the WPS's progression


def test_vertical_down_on_a_vertical_up_wps_does_not():
    findings = review(WPS, changed(WELD, position="PG"), JOB)
    assert rules(findings) == ["progression"] and findings[0].source == SOURCE_PROGRESSION
    assert "from memory" in findings[0].source


def test_a_wps_silent_on_progression_is_a_warning_for_vertical_welds_only():
    silent = changed(WPS, progression=None)
    assert rules(review(silent, changed(WELD, position="PG"), JOB), "warning") == ["progression"]
    assert review(silent, changed(WELD, position="F"), JOB) == []


# --- process: clause 5 / Table 6.5 ----------------------------------------------------------------------------

def test_a_weld_map_process_must_be_the_wps_process():
    assert review(WPS, changed(WELD, process="FCAW"), JOB) == []
    findings = review(WPS, changed(WELD, process="SMAW"), JOB)
    assert rules(findings) == ["process"] and findings[0].source == SOURCE_PROCESS


def test_gmaw_s_is_a_process_apart():
    spray = changed(WPS, process="GMAW", transfer="spray")
    findings = review(spray, changed(WELD, process="GMAW-S"), JOB)
    assert rules(findings) == ["process"] and "GMAW-S" in findings[0].message
    short = changed(WPS, process="GMAW", transfer="short_circuit")
    assert review(short, changed(WELD, process="GMAW-S"), JOB) == []


def test_no_process_on_the_weld_map_means_the_wps_process():
    assert review(WPS, WELD, JOB) == []


# --- the job: its code family and unit system -----------------------------------------------------------------

def test_a_wps_to_another_code_does_not_apply():
    findings = review(changed(WPS, code="ISO 15609-1:2019", unit_system="SI"), WELD, JOB)
    assert rules(findings) == ["code", "unit_system"]
    assert findings[0].source == SOURCE_CODE and "common practice" in findings[0].source
    assert findings[1].source == SOURCE_UNITS


def test_an_si_wps_does_not_apply_on_a_us_job():
    findings = review(changed(WPS, unit_system="SI"), WELD, JOB)
    assert rules(findings) == ["unit_system"] and "US customary" in findings[0].message


def test_without_a_job_the_code_and_units_are_not_compared():
    assert review(changed(WPS, unit_system="SI"), WELD) == []


# --- bad input ------------------------------------------------------------------------------------------------

@pytest.mark.parametrize("wps, weld", [
    (changed(WPS, thickness_max="lots"), WELD),
    (changed(WPS, positions="F"), WELD),
    (changed(WPS, code="EN 1090"), WELD),
    (changed(WPS, thickness_min="2 in"), WELD),
    (WPS, changed(WELD, position="PZ")),
    (WPS, changed(WELD, thicknesses=[])),
    (WPS, changed(WELD, thicknesses=["3/8"])),
    ("WPS", WELD),
])
def test_unreadable_input_is_a_value_error(wps, weld):
    with pytest.raises(ValueError):
        review(wps, weld, JOB)


# --- reviewer(): one WPS and job read once, many welds (the weld-map import) -------------------------------------

def _outcome(ask, *args):
    try:
        return ask(*args)
    except ValueError as exc:
        return f"ValueError: {exc}"


def test_the_reviewer_answers_each_weld_as_review_does_errors_included():
    welds = [WELD, changed(WELD, label="Weld W2", thicknesses=["1/2 in", "7/32 in"]),
             changed(WELD, label="Weld W3", joint="groove", position="PG"), changed(WELD, label="Weld W4", size=None),
             changed(WELD, label="Weld W5", position="sideways"), changed(WELD, label="Weld W6", size="1/8 in")]
    for job in (JOB, None, changed(JOB, unit_system="SI"), changed(JOB, code_family="EN")):
        check = reviewer(WPS, job)
        answers = [_outcome(check, weld) for weld in welds]
        assert answers == [_outcome(review, WPS, weld, job) for weld in welds]
        if job is JOB:  # the mix is real: covered, refused, unreadable
            assert answers[0] == [] and errors(answers[1]) and answers[4].startswith("ValueError")
    assert "ValueError" in _outcome(review, changed(WPS, positions=[]), WELD, JOB)
    with pytest.raises(ValueError, match="positions"):
        reviewer(changed(WPS, positions=[]), JOB)
