"""inspections.material: a heat's certificate against a part's specified grade, and the certificate's type against
the job's code. Every source is from memory (the module says which): ASTM A6/A6M (dual certification),
EN 10025-2:2019 Table 9 (qualities JR < J0 < J2 < K2), EN 10204:2004 (types), EN 1090-2:2018 Table 1 (3.1 on ISO
work), AISC 360-16 clause A3.1a (mill test reports); a substitution is the engineer of record's (common practice)."""

from decimal import Decimal

import pytest

from inspections import material as m


def grade(text):
    (one,) = m.parse_grades(text)
    return one


@pytest.mark.parametrize("text, expected", [
    ("ASTM A992/A992M", (m.Grade(m.ASTM, "A992"),)),
    ("A572 Gr 50", (m.Grade(m.ASTM, "A572", "50"),)),
    ("a572 grade 50", (m.Grade(m.ASTM, "A572", "50"),)),
    ("A572-50", (m.Grade(m.ASTM, "A572", "50"),)),
    ("A572/A572M Gr 50", (m.Grade(m.ASTM, "A572", "50"),)),
    ("A36", (m.Grade(m.ASTM, "A36"),)),
    ("EN 10025-2 S355J2+N", (m.Grade(m.EN, "S355", "J2"),)),
    ("s355jo", (m.Grade(m.EN, "S355", "J0"),)),  # J0 typed with the letter O
    ("A992/A572-50", (m.Grade(m.ASTM, "A992"), m.Grade(m.ASTM, "A572", "50"))),
    ("S355K2, S355J2", (m.Grade(m.EN, "S355", "K2"), m.Grade(m.EN, "S355", "J2"))),
])
def test_grades_are_read_as_certificates_and_drawings_print_them(text, expected):
    assert m.parse_grades(text) == expected


@pytest.mark.parametrize("text", ["", "   ", "steel", "S355", "S355J9", "A", "=cmd|calc", "A36;" * 8,
                                  "x" * 10000])
def test_an_unreadable_grade_is_refused_in_words(text):
    with pytest.raises(ValueError, match="grade"):
        m.parse_grades(text)


def test_the_same_grade_meets_it():
    assert m.meets(m.parse_grades("ASTM A992"), grade("A992")).ok


def test_a_dual_certified_heat_meets_each_of_its_grades_astm_a6():
    heat = m.parse_grades("A992/A572-50")
    assert m.meets(heat, grade("A992")).ok
    answer = m.meets(heat, grade("A572 Gr 50"))
    assert answer.ok and "A6/A6M" in answer.source


def test_a572_grade_50_alone_does_not_meet_a992_no_silent_substitution():
    answer = m.meets(m.parse_grades("A572 Gr 50"), grade("A992"))
    assert not answer.ok and "engineer of record" in answer.reason


def test_a_stronger_grade_does_not_meet_a_weaker_one_without_approval():
    assert not m.meets(m.parse_grades("A572 Gr 50"), grade("A36")).ok
    assert not m.meets(m.parse_grades("A572 Gr 65"), grade("A572 Gr 50")).ok
    assert not m.meets(m.parse_grades("S355J2"), grade("S275JR")).ok


def test_en_10025_2_table_9_a_tougher_quality_meets_a_lower_one():
    assert m.meets(m.parse_grades("S355J2"), grade("S355JR")).ok
    assert m.meets(m.parse_grades("S355J0"), grade("S355JR")).ok  # just inside: one step up
    assert m.meets(m.parse_grades("S355K2"), grade("S355J2")).ok
    answer = m.meets(m.parse_grades("S355J2"), grade("S355J2"))
    assert answer.ok


def test_en_10025_2_table_9_a_lower_quality_does_not_meet_a_tougher_one():
    answer = m.meets(m.parse_grades("S355J0"), grade("S355J2"))  # just outside: one step down
    assert not answer.ok and "EN 10025-2" in answer.source
    assert not m.meets(m.parse_grades("S355JR"), grade("S355J2")).ok


def test_an_astm_heat_never_meets_an_en_grade_or_the_reverse():
    assert not m.meets(m.parse_grades("A572 Gr 50"), grade("S355JR")).ok
    assert not m.meets(m.parse_grades("S355J2"), grade("A572 Gr 50")).ok


def test_iso_jobs_take_en_10204_3_1_or_3_2_en_1090_2_table_1():
    assert m.certificate_refusal(m.EN_31, "ISO") == ""
    assert m.certificate_refusal(m.EN_32, "ISO") == ""
    assert "EN 1090-2" in m.certificate_refusal(m.EN_22, "ISO")
    assert "3.1 or 3.2" in m.certificate_refusal(m.MTR, "ISO")


def test_aws_jobs_take_a_mill_test_report_or_3_1_not_2_2_aisc_360_a3_1a():
    assert m.certificate_refusal(m.MTR, "AWS") == ""
    assert m.certificate_refusal(m.EN_31, "AWS") == ""
    assert "AISC 360-16" in m.certificate_refusal(m.EN_22, "AWS")
    assert "not a certificate type" in m.certificate_refusal("9.9", "AWS")


def test_iiw_carbon_equivalent_from_the_elements_printed():
    ce = m.carbon_equivalent({"c": Decimal("0.08"), "mn": Decimal("1.20"), "cu": Decimal("0.30"),
                              "ni": Decimal("0.10"), "cr": Decimal("0.10"), "mo": Decimal("0.03"),
                              "v": Decimal("0.002")})
    assert ce == Decimal("0.33")
    assert m.carbon_equivalent({"c": Decimal("0.2")}) is None  # no Mn printed: not computed
