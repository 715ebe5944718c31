"""Does a heat's mill certificate meet a part's specified grade, and is it the kind of certificate the job needs? A
plain engine (no Django): grades as text in, an answer with its reason and its source out.

Grades are read from what certificates and drawings print: "ASTM A992/A992M", "A572 Gr 50", "A572-50", "A36",
"EN 10025-2 S355J2+N", "S355JR". A dual-certified heat prints several, separated by a comma, a semicolon or a slash
("A992/A572-50"; the metric twin "/A992M" is not a second grade). Every figure and clause below was recalled without
the document at hand: each is marked "from memory".

The rule (`meets`):
- the same specification and grade meets it (ASTM A992 for A992; A572 Gr 50 for A572 Gr 50);
- a heat certified to several grades meets each of them: a heat that meets the chemistry and the tensile
  requirements of two specifications may be certified to both (ASTM A6/A6M, dual certification; from memory);
- EN 10025-2 (EN 10025-2:2019 Table 9 impact energy, from memory): within one yield strength (S355), a quality with
  its impact test at a lower temperature or a higher energy meets a lower one: K2 (40 J at -20 C) > J2 (27 J at
  -20 C) > J0 (27 J at 0 C) > JR (27 J at +20 C). So S355J2 meets S355JR; S355JR does not meet S355J2. The delivery
  condition (+N, +AR) is not judged;
- nothing else: a stronger grade for a weaker one (A572 Gr 50 for A36, S355 for S275), an ASTM heat for an EN grade
  or the reverse, is a substitution the engineer of record approves (an NCR closed as use-as-is), never a silent
  equivalence (common practice, no source).

The certificate (`certificate_refusal`), EN 10204:2004 types (from memory): 2.2 a test report of non-specific
inspection (not of this heat); 3.1 specific inspection, validated by the producer's inspection representative;
3.2 as 3.1, countersigned by the purchaser's or an authorised inspector. An ASTM mill test report of the heat's own
tests (ASTM A6/A6M, test reports; from memory) is specific inspection, as 3.1.
- ISO jobs (EN 1090-2 execution): 3.1 or 3.2. EN 1090-2:2018 Table 1 asks 3.1 for S355 and above and 2.2 for the
  lowest grades (from memory); the shop asks 3.1 of every grade, stricter and one rule (common practice, no source).
- AWS jobs: a mill test report, 3.1 or 3.2: AISC 360-16 clause A3.1a accepts certified mill test reports as evidence
  of conformance (from memory); 2.2 is not of this heat.

Results support, never replace, the engineer of record and the contract's documents.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from decimal import Decimal

ASTM, EN = "ASTM", "EN"
EN_QUALITIES = ("JR", "J0", "J2", "K2")  # lowest toughness first (EN 10025-2:2019 Table 9; from memory)
SOURCE_DUAL = "ASTM A6/A6M, dual certification (from memory)"
SOURCE_EN = "EN 10025-2:2019 Table 9, impact energy by quality (from memory)"
SOURCE_SUBSTITUTION = "a substitution is the engineer of record's to approve (common practice, no source)"

MTR, EN_22, EN_31, EN_32 = "mtr", "2.2", "3.1", "3.2"
CERTIFICATE_TYPES = {
    MTR: "Mill test report (ASTM)",
    EN_22: "EN 10204 2.2 test report",
    EN_31: "EN 10204 3.1 inspection certificate",
    EN_32: "EN 10204 3.2 inspection certificate",
}
SPECIFIC = {MTR, EN_31, EN_32}  # of this heat's own tests
SOURCE_ISO_CERT = ("EN 1090-2:2018 Table 1, 3.1 for S355 and above (from memory); EN 10204:2004 clause 4 "
                   "(from memory); 3.1 for every grade is the shop's rule (common practice, no source)")
SOURCE_AWS_CERT = "AISC 360-16 clause A3.1a, certified mill test reports (from memory); EN 10204:2004 (from memory)"

ELEMENTS = ("c", "mn", "p", "s", "si", "cu", "ni", "cr", "mo", "v")
ELEMENT_LIMIT = Decimal("10")  # % by mass: no structural steel carries 10 % of any of these (common practice)
CE_LIMIT = Decimal("2")


@dataclass(frozen=True)
class Grade:
    """One grade as a specification names it. ASTM: spec 'A572', grade '50' ('' when the spec has one grade).
    EN: spec 'S355' (the yield strength class), grade 'J2' (the quality)."""

    family: str
    spec: str
    grade: str = ""

    def __str__(self):
        if self.family == EN:
            return f"{self.spec}{self.grade}"
        return f"ASTM {self.spec} Gr {self.grade}" if self.grade else f"ASTM {self.spec}"


@dataclass(frozen=True)
class Answer:
    ok: bool
    reason: str
    source: str = ""


_METRIC_TWIN = re.compile(r"/\s*A\s?\d+M\b")
_EN = re.compile(r"^(?:EN\s*10025(?:-\d)?(?::\d{4})?\s*)?(S\d{3})\s*(JR|J0|J2|K2)(?:\s*\+\s*(?:N|AR|M|NL))?$")
_ASTM = re.compile(r"^(?:ASTM\s*)?(A\d{2,4})M?(?:\s*(?:-|GR\.?|GRADE)\s*([0-9A-Z]{1,3}))?(?:\s*TYPE\s*\d)?$")


def parse_grades(text: str) -> tuple[Grade, ...]:
    """Every grade a certificate or a drawing prints; ValueError in the shop's words when one cannot be read."""
    cleaned = _METRIC_TWIN.sub("", str(text or "").upper().replace("\u2013", "-"))
    cleaned = re.sub(r"(S\d{3}\s*J)O\b", r"\g<1>0", cleaned)  # J0 typed with the letter O
    found = []
    for token in re.split(r"[,;/]", cleaned):
        token = " ".join(token.split())
        if not token:
            continue
        match = _EN.match(token)
        if match:
            found.append(Grade(EN, match.group(1), match.group(2)))
            continue
        match = _ASTM.match(token)
        if match:
            found.append(Grade(ASTM, match.group(1), match.group(2) or ""))
            continue
        raise ValueError(f"'{token[:40]}' is not a grade Legwork reads: write it as the certificate prints it, "
                         "e.g. ASTM A992, A572 Gr 50, A36, S355J2.")
    if not found:
        raise ValueError("Give the grade, e.g. ASTM A992, A572 Gr 50, A36, S355J2.")
    if len(found) > 6:
        raise ValueError("More than six grades: a certificate names one grade, or a few when dual-certified.")
    return tuple(dict.fromkeys(found))


def grades_text(grades) -> str:
    return " / ".join(str(g) for g in grades)


def meets(certified: tuple[Grade, ...], specified: Grade) -> Answer:
    """Does a heat certified to these grades meet the specified grade? (The rule in the module's docstring.)"""
    for grade in certified:
        if grade == specified:
            source = SOURCE_DUAL if len(certified) > 1 else ""
            return Answer(True, f"certified {grades_text(certified)}, which includes {specified}", source)
    if specified.family == EN:
        for grade in certified:
            if (grade.family == EN and grade.spec == specified.spec
                    and EN_QUALITIES.index(grade.grade) > EN_QUALITIES.index(specified.grade)):
                return Answer(True, f"{grade} meets {specified}: the same yield strength, impact-tested colder or "
                                    "to a higher energy", SOURCE_EN)
    return Answer(False, f"certified {grades_text(certified)}, which does not meet {specified}: a substitution is "
                         "the engineer of record's to approve",
                  f"{SOURCE_EN}; {SOURCE_SUBSTITUTION}" if specified.family == EN else SOURCE_SUBSTITUTION)


def certificate_refusal(kind: str, code_family: str) -> str:
    """Why this type of certificate is not enough on a job of the family ('AWS' or 'ISO'); '' when it is."""
    if kind not in CERTIFICATE_TYPES:
        return f"'{kind}' is not a certificate type Legwork knows."
    if code_family == "ISO":
        if kind in (EN_31, EN_32):
            return ""
        return (f"a {CERTIFICATE_TYPES[kind]} is not enough on an ISO job: EN 10204 3.1 or 3.2 is required "
                f"({SOURCE_ISO_CERT})")
    if kind in SPECIFIC:
        return ""
    return (f"a {CERTIFICATE_TYPES[kind]} reports tests that are not of this heat: a mill test report, EN 10204 "
            f"3.1 or 3.2 is required ({SOURCE_AWS_CERT})")


def carbon_equivalent(chemistry: dict) -> Decimal | None:
    """IIW carbon equivalent C + Mn/6 + (Cr + Mo + V)/5 + (Ni + Cu)/15 (IIW formula, quoted in AWS D1.1/D1.1M:2020
    Annex B and EN 1011-2; from memory), from the elements printed (a missing one counts as 0); None without C and
    Mn. Shown beside the printed CE; never a verdict."""
    def value(name):
        return Decimal(chemistry.get(name) or 0)

    if chemistry.get("c") is None or chemistry.get("mn") is None:
        return None
    ce = (value("c") + value("mn") / 6 + (value("cr") + value("mo") + value("v")) / 5
          + (value("ni") + value("cu")) / 15)
    return ce.quantize(Decimal("0.01"))
