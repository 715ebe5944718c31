"""The WPS record: its review input, its findings, and its state changes (who may, when, and the history)."""

from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied

from core.errors import RecordLocked, Refused
from core.history import history_of
from core.units import parse_speed, parse_temperature
from procedures.models.wps import WPS, WPSState
from procedures.services import wps as wps_steps
from tests.factory import L


@pytest.fixture
def engineer(users):
    return users["welding_engineer"]


@pytest.fixture
def qa(users):
    return users["qa_lead"]


def _error_wps(make, **kwargs):
    # E7018 runs on AC or DCEP, never DCEN (AWS A5.1 classification E7018): an "error" finding.
    return make.make_wps(process="SMAW", electrode="E7018", electrode_diameter=L("1/8 in"), current="DCEN",
                         shielding_gas="", **kwargs)


# --- review input and findings ------------------------------------------------------------------

def test_review_input_speaks_the_engine_contract(make):
    wps = make.make_wps()
    data = wps.review_input()
    assert data["process"] == "FCAW"
    assert data["electrode_diameter"] == "0.045 in"
    assert data["positions"] == ["F", "H", "V", "OH"]
    assert data["joint"] == "fillet"
    assert data["base_metals"] == ["ASTM A992", "ASTM A572 Gr 50"]
    assert data["preheat_min"] == "50 F"
    assert "transfer" not in data  # FCAW has no transfer mode


def test_review_input_of_an_si_procedure_is_in_millimetres_and_celsius(make):
    wps = make.make_wps(unit_system="SI", thickness_max=L("25 mm"), preheat_min=parse_temperature("10 C"))
    data = wps.review_input()
    assert data["thickness_max"] == "25 mm"
    assert data["preheat_min"] == "10 C"


def test_a_clean_fcaw_procedure_has_no_findings(make):
    assert make.make_wps().findings() == []


def test_a_current_the_electrode_does_not_allow_is_an_error(make):
    # AWS A5.1: E7018 is AC or DCEP.
    findings = _error_wps(make).findings()
    assert [(f.rule, f.severity) for f in findings] == [("electrode_current", "error")]
    assert "A5.1" in findings[0].source


def test_gmaw_short_circuit_is_not_prequalified(make):
    # AWS D1.1:2020 clause 5: GMAW-S is not prequalified.
    wps = make.make_wps(process="GMAW", transfer="short_circuit", electrode="ER70S-6",
                        electrode_diameter=L("0.035 in"), shielding_gas="75% Ar / 25% CO2")
    rules = {(f.rule, f.severity) for f in wps.findings()}
    assert ("process", "not_prequalified") in rules or any(sev == "not_prequalified" for _, sev in rules)
    assert wps.approval_blockers()  # a prequalified basis that is not prequalified cannot be approved


def test_qualified_by_test_without_a_pqr_is_an_error(make):
    wps = make.make_wps(basis="test")
    assert [f.rule for f in wps.findings()] == ["basis_without_pqr"]


def test_heat_input_range_comes_from_the_volts_amps_and_speeds(make):
    wps = make.make_wps(amperage_min=200, amperage_max=200, voltage_min=25, voltage_max=25,
                        travel_speed_min=parse_speed("10 in/min"), travel_speed_max=parse_speed("10 in/min"))
    heat = wps.heat_input_range()
    # HI = 60 V A / (1000 S) = 60 * 25 * 200 / (1000 * 10) = 30 kJ/in (common practice, shared domain notes).
    assert heat.minimum.kj_per_in == heat.maximum.kj_per_in == Decimal("30")


def test_a_wps_above_its_pqr_heat_input_is_an_error_when_toughness_applies(make):
    # AWS D1.1:2020 clause 6 (CVN supplementary essential variable): heat input above the PQR's.
    # The PQR (30 kJ/in) supports every other value (procedures.support); up to 26.75 V x 220 A at 8 in/min is
    # 44.1 kJ/in.
    wps = make.make_tested_wps(toughness_required=True)
    assert [f.rule for f in wps.findings()] == ["heat_input_above_pqr"]
    wps.toughness_required = False
    assert wps.findings() == []


def test_a_pqr_computes_its_heat_input_on_save(make):
    pqr = make.make_pqr(voltage=25, amperage=200, travel_speed=parse_speed("10 in/min"))
    pqr.refresh_from_db()
    assert pqr.heat_input.kj_per_in == Decimal("30")
    pqr.voltage = Decimal("30")
    pqr.save()
    pqr.refresh_from_db()
    assert pqr.heat_input.kj_per_in == Decimal("36")


# --- submit, approve, revise, withdraw ---------------------------------------------------------------

def test_the_engineer_submits_and_the_qa_lead_approves(make, engineer, qa):
    wps = make.make_wps()
    wps_steps.submit(wps, engineer)
    wps_steps.approve(wps, qa)
    wps.refresh_from_db()
    assert wps.state == WPSState.APPROVED
    assert wps.approved_by == qa and wps.approved_at is not None
    history = [(e.from_state, e.to_state, e.user) for e in history_of(wps).filter(action="state")]
    assert history == [("draft", "submitted", engineer), ("submitted", "approved", qa)]


def test_only_the_qa_lead_approves(make, users):
    wps = make.make_wps(state=WPSState.SUBMITTED)
    before = history_of(wps).count()
    for role in ("welding_engineer", "inspector", "viewer"):
        with pytest.raises(PermissionDenied):
            wps_steps.approve(wps, users[role])
    wps.refresh_from_db()
    assert wps.state == WPSState.SUBMITTED and history_of(wps).count() == before


def test_a_draft_with_an_error_finding_cannot_be_submitted(make, engineer):
    wps = _error_wps(make)
    with pytest.raises(Refused, match="DCEN"):
        wps_steps.submit(wps, engineer)
    wps.refresh_from_db()
    assert wps.state == WPSState.DRAFT and not history_of(wps).filter(action="state").exists()


def test_a_wps_with_an_error_finding_cannot_be_approved(make, qa):
    wps = _error_wps(make, state=WPSState.SUBMITTED, via_steps=False)
    with pytest.raises(Refused, match="Cannot approve"):
        wps_steps.approve(wps, qa)
    wps.refresh_from_db()
    assert wps.state == WPSState.SUBMITTED and wps.approved_by is None and not (
        history_of(wps).filter(action="state").exists())


def test_a_draft_cannot_be_approved_without_being_submitted(make, qa):
    wps = make.make_wps()
    with pytest.raises(Refused, match="submitted"):
        wps_steps.approve(wps, qa)


def test_the_qa_lead_returns_a_submission_with_a_reason(make, qa):
    wps = make.make_wps(state=WPSState.SUBMITTED)
    with pytest.raises(Refused, match="reason"):
        wps_steps.return_to_draft(wps, qa, "   ")
    wps_steps.return_to_draft(wps, qa, "Interpass temperature missing")
    wps.refresh_from_db()
    assert wps.state == WPSState.DRAFT
    assert history_of(wps).last().reason == "Interpass temperature missing"


def test_an_approved_wps_cannot_be_saved_or_deleted(make):
    wps = make.make_wps(state=WPSState.APPROVED)
    wps.title = "Changed in place"
    with pytest.raises(RecordLocked):
        wps.save()
    with pytest.raises(RecordLocked):
        wps.save(update_fields=["title"])
    with pytest.raises(RecordLocked):
        wps.delete()
    assert WPS.objects.get(pk=wps.pk).title != "Changed in place"


@pytest.mark.parametrize("state", [WPSState.SUBMITTED, WPSState.SUPERSEDED, WPSState.WITHDRAWN])
def test_no_state_but_draft_can_be_saved(make, state):
    wps = make.make_wps(state=state)
    wps.amperage_max = 400
    with pytest.raises(RecordLocked):
        wps.save()


def test_a_new_revision_copies_the_approved_wps_into_a_draft(make, engineer):
    old = make.make_tested_wps(state=WPSState.APPROVED)
    pqr = old.pqrs.get()
    new = wps_steps.new_revision(old, engineer)
    assert (new.number, new.revision, new.state, new.supersedes) == (old.number, 1, WPSState.DRAFT, old)
    assert list(new.pqrs.all()) == [pqr]
    assert new.electrode == old.electrode and new.thickness_max == old.thickness_max
    assert new.approved_by is None and new.created_by == engineer
    assert history_of(new).get().to_state == WPSState.DRAFT
    old.refresh_from_db()
    assert old.state == WPSState.APPROVED  # still in use until the revision is approved


def test_only_one_revision_is_drafted_at_a_time(make, engineer):
    old = make.make_wps(state=WPSState.APPROVED)
    wps_steps.new_revision(old, engineer)
    with pytest.raises(Refused, match="already the next revision"):
        wps_steps.new_revision(old, engineer)
    assert WPS.objects.filter(number=old.number).count() == 2


def test_only_an_approved_wps_gets_a_new_revision(make, engineer):
    with pytest.raises(Refused):
        wps_steps.new_revision(make.make_wps(), engineer)


def test_approving_a_revision_supersedes_the_one_it_revises(make, engineer, qa):
    old = make.make_wps(state=WPSState.APPROVED)
    new = wps_steps.new_revision(old, engineer)
    wps_steps.submit(new, engineer)
    wps_steps.approve(new, qa)
    old.refresh_from_db()
    assert old.state == WPSState.SUPERSEDED
    event = history_of(old).last()
    assert (event.from_state, event.to_state, event.user) == ("approved", "superseded", qa)
    assert "revision 1" in event.reason
    assert WPS.objects.filter(number=old.number, state=WPSState.APPROVED).get() == new


def test_a_failed_approval_of_a_revision_leaves_the_old_one_approved(make, engineer, qa):
    old = make.make_wps(state=WPSState.APPROVED)
    new = wps_steps.new_revision(old, engineer)
    new.current, new.process, new.electrode, new.electrode_diameter = "DCEN", "SMAW", "E7018", L("1/8 in")
    new.save()
    make.put(new, state=WPSState.SUBMITTED)  # as submitted before the review caught this (a legal move)
    with pytest.raises(Refused):
        wps_steps.approve(new, qa)
    old.refresh_from_db()
    assert old.state == WPSState.APPROVED


def test_withdrawing_needs_a_reason_and_the_qa_lead(make, engineer, qa):
    wps = make.make_wps(state=WPSState.APPROVED)
    with pytest.raises(PermissionDenied):
        wps_steps.withdraw(wps, engineer, "Obsolete")
    with pytest.raises(Refused, match="reason"):
        wps_steps.withdraw(wps, qa, "")
    wps_steps.withdraw(wps, qa, "Wire no longer stocked")
    wps.refresh_from_db()
    assert wps.state == WPSState.WITHDRAWN
    assert history_of(wps).last().reason == "Wire no longer stocked"


def test_history_rows_are_never_changed(make, engineer):
    wps = make.make_wps()
    wps_steps.submit(wps, engineer)
    event = history_of(wps).get(action="state")
    event.reason = "rewritten"
    with pytest.raises(RecordLocked):
        event.save()
    with pytest.raises(RecordLocked):
        event.delete()
