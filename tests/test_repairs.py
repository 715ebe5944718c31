"""A repair is a weld too: recorded as welded (who, which WPS, when), checked like the original, on the history."""

from datetime import timedelta

import pytest
from django.core.exceptions import PermissionDenied
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked, Refused
from core.history import history_of
from inspections.models import NCR, WeldRepair
from inspections.models.ncr import NCRState
from inspections.services.ncr import disposition_repair, disposition_use_as_is
from inspections.services.repairs import REPAIRED, record_repair
from procedures.models import ContinuityEntry
from procedures.models.wps import WPSState

TODAY = timezone.localdate()


@pytest.fixture
def ncr(make, users):
    """An NCR dispositioned for repair on a sound weld (approved WPS, qualified welder, welded today)."""
    weld = make.make_sound_weld()
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get(), "Grind out and re-weld")
    return NCR.objects.get(pk=ncr.pk)


def test_the_repair_is_recorded_with_its_history_and_continuity(make, users, ncr):
    welder = ncr.repair_welder
    repair = record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[welder], welded_on=TODAY,
                           notes="Ground 4 in and re-welded")
    assert (repair.weld, repair.ncr, repair.wps, list(repair.welders.all()), repair.welded_on) == (
        ncr.weld, ncr, ncr.repair_wps, [welder], TODAY)
    assert history_of(repair).get().reason.startswith(f"Repair welded on {TODAY.isoformat()} by {welder.stamp}")
    event = history_of(ncr).get(action=REPAIRED)
    assert event.user == users["inspector"] and "Ground 4 in" in event.reason
    entry = ContinuityEntry.objects.get(repair=repair)
    assert (entry.welder, entry.process, entry.date, entry.source) == (welder, "FCAW", TODAY, "repair")
    assert NCR.objects.get(pk=ncr.pk).state == NCRState.DISPOSITIONED  # a re-inspection closes it


def test_another_qualified_welder_may_weld_it_and_the_history_says_so(make, users, ncr):
    other = make.make_qualified_welder(stamp="B-77")
    record_repair(ncr, users["welding_engineer"], wps=ncr.repair_wps, welders=[other], welded_on=TODAY)
    assert f"the disposition named welder {ncr.repair_welder.stamp}" in history_of(ncr).get(action=REPAIRED).reason


def test_the_repair_welder_is_checked_like_the_original(make, users, ncr):
    untested = make.make_welder(stamp="B-78")
    with pytest.raises(Refused) as refused:
        record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[untested], welded_on=TODAY)
    assert list(refused.value.message_dict) == ["welders"] and "B-78" in refused.value.message_dict["welders"][0]
    assert not WeldRepair.objects.exists()


def test_the_repair_wps_must_be_approved_on_the_repair_date_and_cover_the_weld(make, users, ncr):
    for wps, words in [(make.make_wps(), "never approved"),
                       (make.make_wps(state=WPSState.APPROVED, positions="OH"), "covers OH")]:
        with pytest.raises(Refused) as refused:
            record_repair(ncr, users["inspector"], wps=wps, welders=[ncr.repair_welder], welded_on=TODAY)
        assert words in " ".join(refused.value.message_dict["wps"])
    yesterday = TODAY - timedelta(days=1)
    # the NCR was raised today: a repair cannot be older
    with pytest.raises(Refused) as refused:
        record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=yesterday)
    assert "cannot be welded before it" in refused.value.message_dict["welded_on"][0]
    assert not WeldRepair.objects.exists()


def test_a_repair_date_in_the_future_or_missing_is_refused(users, ncr):
    for day, words in [(TODAY + timedelta(days=1), "future"), (None, "Give the date")]:
        with pytest.raises(Refused) as refused:
            record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=day)
        assert words in refused.value.message_dict["welded_on"][0]


def test_only_an_ncr_dispositioned_for_repair_takes_a_repair_and_only_once(make, users, ncr):
    record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=TODAY)
    with pytest.raises(Refused, match="already has its repair recorded"):
        record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=TODAY)
    open_one = make.make_ncr()
    with pytest.raises(Refused, match="dispositioned for repair"):
        record_repair(open_one, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder],
                      welded_on=TODAY)
    disposition_use_as_is(open_one, users["qa_lead"], "M. Ferreira, PE", TODAY)
    with pytest.raises(Refused, match="dispositioned for repair"):
        record_repair(open_one, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder],
                      welded_on=TODAY)


def test_a_recorded_repair_is_never_edited(users, ncr):
    repair = record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[ncr.repair_welder],
                           welded_on=TODAY)
    repair.notes = "changed"
    with pytest.raises(RecordLocked):
        repair.save()
    with pytest.raises(RecordLocked):
        repair.delete()


@pytest.mark.parametrize("role", ["viewer", "qa_lead"])
def test_roles_that_do_not_record_welding_may_not_record_a_repair(users, ncr, role):
    if role == "qa_lead":  # the QA lead manages weld maps (job.manage), so may
        record_repair(ncr, users[role], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=TODAY)
        return
    with pytest.raises(PermissionDenied):
        record_repair(ncr, users[role], wps=ncr.repair_wps, welders=[ncr.repair_welder], welded_on=TODAY)


# --- the page ---------------------------------------------------------------------------------------------------

def test_the_ncr_page_records_the_repair_and_shows_it(client_as, ncr):
    client = client_as("inspector")
    page = client.get(ncr.get_absolute_url())
    assert "Record the repair" in page.text
    response = client.post(reverse("inspections:ncr_repair", args=[ncr.pk]), {
        "wps": ncr.repair_wps_id, "welders": [ncr.repair_welder_id], "welded_on": TODAY.isoformat(),
        "notes": "Re-welded the toe"})
    assert response.status_code == 302
    page = client.get(ncr.get_absolute_url())
    assert "Repair as welded" in page.text and "Record the repair" not in page.text and "Re-welded the toe" in page.text
    weld_page = client.get(ncr.weld.get_absolute_url())
    assert ncr.number in weld_page.text and "Repairs" in weld_page.text


def test_the_ncr_page_shows_a_refusal_beside_the_field(client_as, make, ncr):
    untested = make.make_welder(stamp="B-79")
    response = client_as("inspector").post(reverse("inspections:ncr_repair", args=[ncr.pk]), {
        "wps": ncr.repair_wps_id, "welders": [untested.pk], "welded_on": TODAY.isoformat()})
    assert response.status_code == 400 and "B-79" in " ".join(response.context["repair_form"].errors["welders"])
    assert not WeldRepair.objects.exists()


def test_the_repair_names_its_filler_lot_of_the_wps_classification(client_as, make, users, ncr):
    # The repair WPS names the filler (AWS D1.1/D1.1M:2020 clause 5 and Table 6.5; from memory): a lot of another
    # classification is refused beside the field; the factory's WPS specifies E71T-1C.
    client = client_as("inspector")
    post = {"wps": ncr.repair_wps_id, "welders": [ncr.repair_welder_id], "welded_on": TODAY.isoformat()}
    wrong = make.make_filler_lot("E71T-1M")
    response = client.post(reverse("inspections:ncr_repair", args=[ncr.pk]), {**post, "filler_lot": wrong.pk})
    assert response.status_code == 400
    assert "specifies E71T-1C" in " ".join(response.context["repair_form"].errors["filler_lot"])
    for nasty in ("x", "-1", "99999999"):
        assert client.post(reverse("inspections:ncr_repair", args=[ncr.pk]),
                           {**post, "filler_lot": nasty}).status_code == 400
    assert not WeldRepair.objects.exists()
    right = make.make_filler_lot("E71T-1C")
    offered = client.get(ncr.get_absolute_url()).context["repair_form"].fields["filler_lot"].widget.choices
    assert [pk for pk, _text in offered] == ["", right.pk]  # only the lots of the offered WPSs' classification
    response = client.post(reverse("inspections:ncr_repair", args=[ncr.pk]), {**post, "filler_lot": right.pk})
    assert response.status_code == 302
    repair = WeldRepair.objects.get()
    assert repair.filler_lot == right and f"Filler {right}." in history_of(repair).get().reason
    assert right.lot_number in client.get(ncr.get_absolute_url()).text
    from inspections.services import trace  # a recall of the lot finds the repaired weld
    assert [row["weld"] for row in trace.recall("lot", right)] == [ncr.weld.mark]


def test_a_lot_received_after_the_repair_date_is_refused(users, make, ncr):
    # A lot cannot have been welded with before the shop received it (common practice, no source): edge at the date.
    def record(lot):
        return record_repair(NCR.objects.get(pk=ncr.pk), users["inspector"], wps=ncr.repair_wps,
                             welders=[ncr.repair_welder], welded_on=TODAY, filler_lot=lot)

    with pytest.raises(Refused) as refused:
        record(make.make_filler_lot("E71T-1C", received_on=TODAY + timedelta(days=1)))
    assert "received on" in refused.value.message_dict["filler_lot"][0]
    assert not WeldRepair.objects.exists()
    assert record(make.make_filler_lot("E71T-1C", received_on=TODAY)).filler_lot.received_on == TODAY


def test_a_job_that_requires_lots_requires_the_repairs_lot(users, ncr):
    job = ncr.weld.assembly.job
    job.filler_lot_required = True
    job.save()
    with pytest.raises(Refused) as refused:
        record_repair(NCR.objects.get(pk=ncr.pk), users["inspector"], wps=ncr.repair_wps,
                      welders=[ncr.repair_welder], welded_on=TODAY)
    assert "requires the filler lot" in str(refused.value.messages if hasattr(refused.value, "messages")
                                            else refused.value)


def test_a_viewer_sees_no_repair_form(client_as, ncr):
    assert "Record the repair" not in client_as("viewer").get(ncr.get_absolute_url()).text


def test_an_undated_or_nasty_post_saves_nothing(client_as, ncr):
    client = client_as("inspector")
    for data in [{}, {"wps": "x", "welders": ["-1"], "welded_on": "soon"}, {"wps": 999999, "welded_on": "2026-1-1"}]:
        assert client.post(reverse("inspections:ncr_repair", args=[ncr.pk]), data).status_code == 400
    assert not WeldRepair.objects.exists()


def test_the_disposition_names_a_wps_that_covers_the_weld(make, users):
    ncr = make.make_ncr(make.make_inspection(make.make_sound_weld(position="OH"), accepted=False))
    flat = make.make_wps(state=WPSState.APPROVED, positions="F, H")
    with pytest.raises(Refused) as refused:
        disposition_repair(ncr, users["qa_lead"], flat, make.make_qualified_welder())
    assert "position OH" in refused.value.message_dict["repair_wps"][0]


def test_the_repair_forms_offer_only_covering_procedures_and_qualified_welders_in_fixed_queries(
        client_as, make, users, ncr):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    client = client_as("inspector")
    url = reverse("inspections:ncr_detail", args=[ncr.pk])

    def offered():
        with CaptureQueriesContext(connection) as ctx:
            form = client.get(url).context["repair_form"]
        return ({w.pk for w in form.fields["wps"].queryset}, {w.pk for w in form.fields["welders"].queryset},
                len(ctx.captured_queries))

    wps_ids, welder_ids, queries = offered()
    assert ncr.repair_wps_id in wps_ids and ncr.repair_welder_id in welder_ids
    groove_only = make.make_wps(state=WPSState.APPROVED, positions="OH")  # does not cover a weld made flat
    untested = make.make_welder(stamp="B-81")
    for _ in range(5):
        make.make_wps(state=WPSState.APPROVED)
        make.make_qualified_welder()
    more_wps, more_welders, more_queries = offered()
    assert groove_only.pk not in more_wps and untested.pk not in more_welders
    assert len(more_wps) == len(wps_ids) + 5 and len(more_welders) == len(welder_ids) + 5
    assert more_queries == queries


def test_the_welder_page_and_summary_name_the_repair_behind_a_continuity_entry(make, users, ncr, client_as):
    welder = ncr.repair_welder
    record_repair(ncr, users["inspector"], wps=ncr.repair_wps, welders=[welder], welded_on=TODAY)
    said = f"Repair of weld {ncr.weld} for {ncr.number}"
    import re

    page = re.sub(r"<[^>]+>", "", client_as("qa_lead").get(welder.get_absolute_url()).text)
    assert said in page
    # The printed summary lists one use per day and process (the production weld made the same day here): its
    # wording for a repair entry, rendered with that entry alone.
    from django.template.loader import render_to_string

    from procedures import printing as printed
    from procedures.models import ContinuityEntry

    entry = printed.continuity_entries().get(source=ContinuityEntry.Source.REPAIR)
    html = render_to_string("pdf/welder_summary.html", printed.welder_context(
        printed.welder_with_records(welder.pk, continuity=False), continuity=[entry]))
    assert said in html
    # A viewer of another customer keeps the date and process, not the job (core.visibility.continuity_for).
    stranger = make.make_user("viewer")
    make.make_customer(name="Ostrander Bridge Works", viewers=[stranger])
    from core.visibility import continuity_for
    from procedures import printing

    rows = continuity_for(stranger, printing.welder_context(printing.welder_with_records(welder.pk))["continuity"])
    repair_rows = [(url, hidden) for entry, url, hidden in rows if entry.source == "repair"]
    assert repair_rows == [(None, True)]
