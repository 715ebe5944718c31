"""inspections.credentials at its edges. Sources as in the engine: the expiry printed on the card (AWS QC1:2016,
ISO 9712:2021; from memory), the eye examination every 3 years for AWS CWI (AWS QC1:2016, from memory) and yearly
for ISO 9712 (ISO 9712:2021 clause 7.4, from memory), a 30-day notice (common practice, no source)."""

from datetime import date, timedelta

import pytest

from inspections import credentials as engine

DAY = timedelta(days=1)


def cwi(**kw):
    fields = dict(scheme=engine.CWI, issued_on=date(2025, 3, 1), expires_on=date(2028, 3, 1),
                  eye_exam_on=date(2025, 3, 1))
    fields.update(kw)
    return engine.Facts(**fields)


def test_expiry_date_printed_on_the_card_is_its_last_valid_day():
    facts = cwi()
    assert engine.currency(facts, facts.expires_on).current is False  # eye exam is due on 2028-03-01 too
    facts = cwi(eye_exam_on=date(2027, 1, 1))
    assert engine.currency(facts, date(2028, 3, 1)).current
    past = engine.currency(facts, date(2028, 3, 2))
    assert not past.current and past.reason == "expired on 2028-03-01"


def test_not_current_before_the_day_it_is_valid_from():
    facts = cwi()
    assert engine.currency(facts, date(2025, 3, 1)).current
    assert "not issued until" in engine.currency(facts, date(2025, 2, 28)).reason


def test_aws_qc1_cwi_eye_examination_every_3_years_from_memory():
    facts = cwi(eye_exam_on=date(2025, 6, 10))
    assert engine.currency(facts, date(2028, 6, 9)).current is False  # the card itself expired on 2028-03-01
    facts = cwi(expires_on=date(2030, 1, 1), eye_exam_on=date(2025, 6, 10))
    assert engine.currency(facts, date(2028, 6, 9)).current  # the day before the anniversary
    late = engine.currency(facts, date(2028, 6, 10))  # the anniversary: overdue
    assert not late.current and "overdue since 2028-06-10" in late.reason
    assert "AWS QC1:2016" in late.source and "from memory" in late.source


def test_iso_9712_eye_examination_yearly_from_memory():
    facts = engine.Facts(engine.ISO_9712, date(2024, 1, 1), date(2029, 1, 1), date(2026, 4, 15))
    assert engine.currency(facts, date(2027, 4, 14)).current
    late = engine.currency(facts, date(2027, 4, 15))
    assert not late.current and "ISO 9712:2021 clause 7.4" in late.source and "from memory" in late.source


def test_national_scheme_defaults_to_yearly_and_says_it_has_no_source():
    facts = engine.Facts(engine.NATIONAL, date(2024, 1, 1), date(2029, 1, 1), date(2026, 4, 15))
    assert not engine.currency(facts, date(2027, 4, 15)).current
    assert "common practice, no source" in engine.currency(facts, date(2026, 5, 1)).source


def test_eye_examination_after_the_day_does_not_make_it_current_that_day():
    facts = cwi(eye_exam_on=date(2026, 1, 10))
    assert not engine.currency(facts, date(2026, 1, 9)).current


def test_leap_day_examination_falls_due_on_28_february():
    assert engine.eye_exam_due(engine.ISO_9712, date(2028, 2, 29)) == date(2029, 2, 28)


def test_withdrawn_is_never_current():
    assert engine.currency(cwi(withdrawn=True), date(2026, 1, 1)).reason == "withdrawn"


def test_unknown_scheme_is_refused():
    with pytest.raises(ValueError, match="Unknown certification scheme"):
        engine.eye_exam_due("cswip", date(2026, 1, 1))


def test_lapse_notice_at_30_days_and_not_at_31_common_practice_no_source():
    facts = cwi(expires_on=date(2026, 6, 30), eye_exam_on=date(2026, 1, 1))  # first day not current: 2026-07-01
    assert engine.lapses_soon(facts, date(2026, 7, 1) - 30 * DAY)
    assert not engine.lapses_soon(facts, date(2026, 7, 1) - 31 * DAY)
    assert not engine.lapses_soon(facts, date(2026, 7, 1))  # lapsed: not "soon", not current
