"""The Django adapter of the welder check: rows in, the engine's answer out, in a fixed number of queries.

The rules themselves (AWS D1.1/D1.1M:2020 Tables 6.10 and 6.11, the 6-month continuity rule, SMAW electrode
groups from memory) are tested in tests/engines/test_qualification.py; here we check that the adapter hands the
engine the right facts and that every refusal reaches the caller with its reason. Invented scenario.
"""

from datetime import date, timedelta

import pytest

from procedures import eligibility
from procedures.eligibility import State, check_welder, check_welds, describe, record_production, welder_status
from procedures.models import ContinuityEntry
from procedures.qualification import WeldDemand
from procedures.services import welders as welder_steps
from tests.factory import L

TEST_DAY = date(2026, 3, 10)  # the factory's test date


@pytest.fixture
def fcaw_wps(make):
    return make.make_wps(process="FCAW", electrode="E71T-1C")


def weld_by(make, welders, wps, **kwargs):
    kwargs.setdefault("welded_on", date(2026, 5, 4))
    weld = make.make_weld(wps=wps, **kwargs)
    weld.welders.set(welders)
    return weld


# --- continuity follows production welds ----------------------------------------------------------------------

def test_a_production_weld_gives_its_welders_continuity_without_anyone_typing_it(make, fcaw_wps):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW")
    # Test of 2026-03-10 alone: valid through 2026-09-10 (six months), lapsed by October.
    assert welder_status(welder, on=date(2026, 10, 1)).state == State.LAPSED
    weld = weld_by(make, [welder], fcaw_wps, welded_on=date(2026, 8, 3))

    entries = record_production(weld)

    assert [(e.welder, e.process, e.date, e.source) for e in entries] == [
        (welder, "FCAW", date(2026, 8, 3), ContinuityEntry.Source.PRODUCTION)]
    status = welder_status(welder, on=date(2026, 10, 1))
    assert status.state == State.QUALIFIED
    assert status.lapses_on == date(2027, 2, 4)  # valid through 2027-02-03, six months after the weld


def test_recording_the_same_weld_twice_adds_nothing(make, fcaw_wps):
    welder = make.make_welder()
    weld = weld_by(make, [welder], fcaw_wps)
    record_production(weld)
    record_production(weld)
    assert ContinuityEntry.objects.filter(weld=weld).count() == 1


def test_entries_follow_a_changed_date_welders_and_wps(make, fcaw_wps):
    first, second = make.make_welder(), make.make_welder()
    weld = weld_by(make, [first, second], fcaw_wps)
    record_production(weld)
    weld.welded_on = date(2026, 6, 1)
    weld.save(update_fields=["welded_on"])
    weld.welders.set([second])
    record_production(weld)
    assert list(ContinuityEntry.objects.filter(weld=weld).values_list("welder", "process", "date")) == [
        (second.pk, "FCAW", date(2026, 6, 1))]
    weld.wps = make.make_wps(process="SMAW", electrode="E7018", current="DCEP", shielding_gas="")
    weld.save(update_fields=["wps"])
    record_production(weld)
    assert list(ContinuityEntry.objects.filter(weld=weld).values_list("process", flat=True)) == ["SMAW"]


def test_a_weld_without_a_date_or_wps_gives_no_continuity(make, fcaw_wps):
    welder = make.make_welder()
    undated = weld_by(make, [welder], fcaw_wps, welded_on=None)
    no_wps = weld_by(make, [welder], None)
    assert record_production(undated) == []
    assert record_production(no_wps) == []
    assert not ContinuityEntry.objects.exists()


def test_manual_entries_keep_a_qualification_alive_too(make, users):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW")
    welder_steps.log_continuity(welder, "FCAW", date(2026, 9, 1), "Shop repair work order 5512", users["qa_lead"])
    assert welder_status(welder, on=date(2026, 10, 1)).state == State.QUALIFIED


def test_a_use_after_continuity_lapsed_does_not_revive_the_test(make, users):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW")
    welder_steps.log_continuity(welder, "FCAW", date(2026, 10, 1), "Welded after the lapse", users["qa_lead"])
    status = welder_status(welder, on=date(2026, 10, 2))
    assert status.state == State.LAPSED
    assert "continuity lapsed on 2026-09-11" in status.reason


def test_use_of_another_process_does_not_count(make, users):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW")
    welder_steps.log_continuity(welder, "SMAW", date(2026, 9, 1), "Stick repairs", users["qa_lead"])
    assert welder_status(welder, on=date(2026, 10, 1)).state == State.LAPSED


# --- states ---------------------------------------------------------------------------------------------------

def test_a_welder_is_lapsing_within_thirty_days_of_the_lapse(make):
    welder = make.make_welder()
    make.make_qualification(welder)  # valid through 2026-09-10
    assert welder_status(welder, on=date(2026, 8, 11)).state == State.QUALIFIED
    status = welder_status(welder, on=date(2026, 8, 13))
    assert (status.state, status.lapses_on) == (State.LAPSING, date(2026, 9, 11))


def test_the_earliest_lapse_of_the_processes_still_in_force_is_the_one_shown(make):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW", test_date=date(2026, 6, 1))
    make.make_qualification(welder, process="SMAW", electrode="E7018", test_date=date(2026, 3, 10))
    status = welder_status(welder, on=date(2026, 8, 20))
    assert (status.state, status.lapses_on) == (State.LAPSING, date(2026, 9, 11))
    assert set(status.processes) == {"FCAW", "SMAW"}


def test_inactive_and_untested_welders_have_their_own_state(make, users):
    untested = make.make_welder()
    gone = make.make_welder()
    make.make_qualification(gone)
    welder_steps.deactivate(gone, users["welding_engineer"], "Left the shop")
    assert welder_status(untested).state == State.UNTESTED
    assert welder_status(gone).state == State.INACTIVE
    failed = make.make_welder()
    make.make_qualification(failed, result="fail")
    assert welder_status(failed).state == State.UNTESTED


# --- the check explains every refusal -------------------------------------------------------------------------

def demand(**kwargs):
    fields = dict(process="FCAW", joint="fillet", position="V", thickness="1/2 in", electrode="E71T-1C")
    fields.update(kwargs)
    return WeldDemand(**fields)


ON = date(2026, 5, 4)


def test_a_covered_weld_is_allowed_with_the_record_and_date_named(make):
    welder = make.make_welder()
    make.make_qualification(welder)
    answer = check_welder(welder, demand(), ON)
    assert answer.allowed
    assert answer.valid_until == date(2026, 9, 10)
    assert "valid until 2026-09-10" in answer.reasons[0]


def test_it_refuses_a_position_the_test_does_not_cover(make):
    welder = make.make_welder()
    make.make_qualification(welder, joint="fillet", test_position="2F")
    answer = check_welder(welder, demand(position="V"), ON)
    assert not answer.allowed
    assert "qualifies fillet welds in F, H; this weld is V" in " ".join(answer.reasons)
    assert "Table 6.10" in " ".join(answer.reasons)


def test_it_refuses_a_thickness_outside_the_range(make):
    welder = make.make_welder()
    make.make_qualification(welder, test_thickness=L("3/8 in"))  # 1/8 to 3/4 in, AWS D1.1:2020 Table 6.11
    answer = check_welder(welder, demand(joint="groove", thickness="1 in"), ON)
    assert not answer.allowed
    assert "Table 6.11" in " ".join(answer.reasons)


def test_it_refuses_another_process(make):
    welder = make.make_welder()
    make.make_qualification(welder, process="FCAW")
    answer = check_welder(welder, demand(process="SMAW", electrode="E7018"), ON)
    assert not answer.allowed
    assert "is for FCAW; this weld is SMAW" in " ".join(answer.reasons)


def test_it_refuses_an_electrode_group_the_test_does_not_cover(make):
    welder = make.make_welder()
    make.make_qualification(welder, process="SMAW", electrode="E6013")  # group F2 (from memory)
    answer = check_welder(welder, demand(process="SMAW", electrode="E7018"), ON)
    assert not answer.allowed
    assert "group F4" in " ".join(answer.reasons)


def test_it_refuses_when_continuity_lapsed(make):
    welder = make.make_welder()
    make.make_qualification(welder)
    answer = check_welder(welder, demand(), date(2026, 10, 1))
    assert not answer.allowed
    assert "continuity lapsed on 2026-09-11" in " ".join(answer.reasons)


def test_it_refuses_a_test_dated_after_the_weld(make):
    welder = make.make_welder()
    make.make_qualification(welder)
    answer = check_welder(welder, demand(), date(2026, 3, 1))
    assert not answer.allowed
    assert "dated after the weld date 2026-03-01" in " ".join(answer.reasons)


def test_it_refuses_a_failed_test(make):
    welder = make.make_welder()
    make.make_qualification(welder, result="fail")
    answer = check_welder(welder, demand(), ON)
    assert not answer.allowed
    assert "was not passed" in " ".join(answer.reasons)


def test_it_refuses_a_welder_with_no_test(make):
    answer = check_welder(make.make_welder(), demand(), ON)
    assert not answer.allowed
    assert "No welder qualification on record" in answer.reasons[0]


def test_it_refuses_an_inactive_welder_from_the_day_of_deactivation(make, users):
    welder = make.make_welder()
    make.make_qualification(welder, test_date=date(2026, 11, 20))
    welder_steps.deactivate(welder, users["welding_engineer"], "Left the shop")
    today = eligibility.timezone.localdate()
    assert check_welder(welder, demand(), date(2026, 11, 21)).allowed
    answer = check_welder(welder, demand(), today)
    assert not answer.allowed
    assert "Left the shop" in answer.reasons[0]


def test_a_weld_of_the_weld_map_is_checked_from_its_wps_position_and_both_parts(make, fcaw_wps):
    welder = make.make_welder()
    make.make_qualification(welder, test_thickness=L("3/8 in"))  # 1/8 to 3/4 in
    fits = weld_by(make, [welder], fcaw_wps, joint_type="groove", thickness1=L("1/2 in"), thickness2=L("5/8 in"))
    thick = weld_by(make, [welder], fcaw_wps, joint_type="groove", thickness1=L("1/2 in"), thickness2=L("1 in"))
    assert check_welder(welder, fits).allowed
    answer = check_welder(welder, thick)
    assert not answer.allowed
    assert 'this weld is on 1" [25.4 mm]' in " ".join(answer.reasons)


def test_a_weld_without_a_wps_is_refused_with_the_reason(make):
    welder = make.make_welder()
    make.make_qualification(welder)
    answer = check_welder(welder, weld_by(make, [welder], None))
    assert not answer.allowed
    assert "names no WPS" in answer.reasons[0]


def test_a_record_the_engine_cannot_read_is_a_reason_not_a_crash(make):
    welder = make.make_welder()
    make.make_qualification(welder, joint="fillet", test_position="5G")  # only possible outside the form
    answer = check_welder(welder, demand(), ON)
    assert not answer.allowed
    assert "cannot be read" in " ".join(answer.reasons)
    assert welder_status(welder, on=ON).state == State.LAPSED
    assert describe(welder.qualifications.get()).error


# --- many welds at once: fixed number of queries --------------------------------------------------------------

def _weld_map(make, wps, n):
    assembly = make.make_assembly()
    welds = []
    for i in range(n):
        welders = [make.make_welder(), make.make_welder()]
        for w in welders:
            make.make_qualification(w, process="FCAW", test_date=date(2026, 1, 5))
            ContinuityEntry.objects.create(welder=w, process="FCAW", date=date(2026, 4, 1), source="manual",
                                           note="Shop work")
        welds.append(weld_by(make, welders, wps, assembly=assembly, mark=f"M{i}"))
    return assembly


@pytest.mark.parametrize("n", [1, 8])
def test_checking_a_whole_weld_map_takes_four_queries(make, fcaw_wps, django_assert_num_queries, n):
    assembly = _weld_map(make, fcaw_wps, n)
    welds = list(assembly.welds.all())
    with django_assert_num_queries(4):  # welders, WPS, test records, continuity
        checks = check_welds(welds)
    assert len(checks) == n
    assert all(c.allowed for c in checks.values())
    assert all(len(c.checks) == 2 for c in checks.values())


@pytest.mark.parametrize("n", [1, 8])
def test_welder_states_for_a_list_take_two_queries(make, fcaw_wps, django_assert_num_queries, n):
    _weld_map(make, fcaw_wps, n)
    from procedures.models import Welder

    welders = list(Welder.objects.all())
    with django_assert_num_queries(2):
        statuses = eligibility.welder_statuses(welders, on=date(2026, 6, 1))
    assert {s.state for s in statuses.values()} == {State.QUALIFIED}


def test_eligible_welders_lists_who_may_make_a_weld_first(make, fcaw_wps):
    able = make.make_welder(stamp="A-01")
    make.make_qualification(able)
    unable = make.make_welder(stamp="A-02")
    make.make_qualification(unable, process="SMAW", electrode="E7018")
    weld = weld_by(make, [], fcaw_wps)
    checks = eligibility.eligible_welders(weld, on=ON)
    assert [(c.welder, c.allowed) for c in checks] == [(able, True), (unable, False)]


# --- ranges in words --------------------------------------------------------------------------------------------

def test_the_ranges_read_as_plain_words(make):
    q = make.make_qualification(joint="groove", test_position="3G", test_thickness=L("1 in"))
    ranges = describe(q)
    assert ranges.sentence == ('Fillet welds in flat, horizontal and vertical positions; groove welds in flat, '
                               'horizontal and vertical positions; plate 1/8" [3.18 mm] and over.')


def test_smaw_ranges_name_the_electrode_groups(make):
    q = make.make_qualification(process="SMAW", electrode="E7018", joint="fillet", test_position="3F+4F",
                                test_thickness=L("1/2 in"))
    ranges = describe(q)
    assert ranges.electrode == "SMAW electrode groups F4, F3, F2, F1 (tested with E7018, group F4)"
    assert ranges.groove == "no groove welds"


def test_a_lapse_date_is_never_typed_it_moves_with_the_last_use(make, users):
    welder = make.make_welder()
    make.make_qualification(welder, test_date=date(2026, 3, 31))
    before = welder_status(welder, on=date(2026, 4, 1)).lapses_on
    welder_steps.log_continuity(welder, "FCAW", date(2026, 8, 31), "Tank repair", users["qa_lead"])
    after = welder_status(welder, on=date(2026, 9, 1)).lapses_on
    assert before == date(2026, 10, 1)  # valid through 2026-09-30
    assert after == date(2027, 2, 28) + timedelta(days=1)  # 2026-08-31 + 6 months, clamped to 2027-02-28
