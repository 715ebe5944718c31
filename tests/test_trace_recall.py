"""Recall: which welds a filler lot, a gauge or an inspector touched between dates, in one query whatever their
number, on a page and as CSV (a cell that starts like a formula is escaped: OWASP CSV injection)."""

from datetime import timedelta

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from inspections.services import trace

pytestmark = pytest.mark.django_db


def lot_welds(make, users, lot, n, **kwargs):
    welds = []
    for _ in range(n):
        weld = make.make_sound_weld(**kwargs)
        trace.record_weld_filler(weld, lot, users["inspector"])
        welds.append(weld)
    return welds


def test_a_lot_recalls_the_welds_made_with_it_between_the_dates(make, users):
    lot = make.make_filler_lot()
    today = timezone.localdate()
    welds = lot_welds(make, users, lot, 2)
    old = lot_welds(make, users, lot, 1, welded_on=today - timedelta(days=30))[0]
    lot_welds(make, users, make.make_filler_lot(), 1)  # another lot
    assert [r["weld"] for r in trace.recall("lot", lot, today - timedelta(days=1), today)] == [w.mark for w in welds]
    assert old.mark in [r["weld"] for r in trace.recall("lot", lot)]
    assert [r["weld"] for r in trace.recall("lot", lot, today - timedelta(days=30), today - timedelta(days=30))] \
        == [old.mark]  # both ends inclusive


def test_a_gauge_and_an_inspector_recall_their_inspections(make, users):
    gauge = make.make_gauge()
    inspection = make.make_inspection(gauge=gauge, user=users["inspector"])
    make.make_inspection()  # another inspector, no gauge
    assert [r["weld"] for r in trace.recall("gauge", gauge)] == [inspection.weld.mark]
    rows = trace.recall("inspector", users["inspector"], timezone.localdate(), timezone.localdate())
    assert [r["weld"] for r in rows] == [inspection.weld.mark] and rows[0]["verdict"] == "accepted"


def test_the_page_reads_in_a_fixed_number_of_queries_and_exports_csv(make, users, client_as):
    lot = make.make_filler_lot(lot_number="=HYPERLINK(1)")
    lot_welds(make, users, lot, 1)
    client = client_as("qa_lead")
    url = reverse("inspections:recall") + f"?kind=lot&lot={lot.pk}"
    client.get(url)
    with CaptureQueriesContext(connection) as one:
        assert "1 weld" in client.get(url).content.decode()
    lot_welds(make, users, lot, 6)
    with CaptureQueriesContext(connection) as seven:
        assert "7 welds" in client.get(url).content.decode()
    assert len(one) == len(seven)
    response = client.get(reverse("inspections:recall_csv") + f"?kind=lot&lot={lot.pk}")
    lines = response.content.decode().splitlines()
    assert response["Content-Type"].startswith("text/csv") and lines[0].startswith("Customer,Job,Assembly")
    assert len(lines) == 8


def test_the_form_says_what_is_missing(make, client_as):
    client = client_as("inspector")
    response = client.get(reverse("inspections:recall") + "?kind=gauge&date_from=2026-05-02&date_to=2026-05-01")
    errors = response.context["form"].errors
    assert response.status_code == 400 and "Choose which one" in str(errors["gauge"]) and "date_to" in errors



def test_a_lot_recall_says_which_weld_was_repaired_with_it_and_when(make, users, client_as):
    """A weld made with another lot but repaired with this one is recalled by the repair's date, and its row says
    so: its own date alone would read as if it were welded with the lot, outside the dates asked."""
    from inspections.models import NCR
    from inspections.services.ncr import disposition_repair
    from inspections.services.repairs import record_repair

    today = timezone.localdate()
    lot = make.make_filler_lot("E71T-1C")
    made = lot_welds(make, users, lot, 1)[0]
    weld = make.make_sound_weld(welded_on=today - timedelta(days=30))
    ncr = make.make_inspection(weld, accepted=False).ncrs.get()
    disposition_repair(ncr, users["qa_lead"], weld.wps, weld.welders.get(), "Grind out and re-weld")
    record_repair(NCR.objects.get(pk=ncr.pk), users["inspector"], wps=weld.wps, welders=[weld.welders.get()],
                  welded_on=today, filler_lot=lot)
    rows = {r["weld"]: r for r in trace.recall("lot", lot, today, today)}
    assert rows[weld.mark]["welded_on"] == (today - timedelta(days=30)).isoformat()
    assert rows[weld.mark]["repaired_on"] == today.isoformat()
    assert rows[made.mark]["repaired_on"] == ""
    assert "repaired_on" in trace.RECALL_COLUMNS
    page = client_as("qa_lead").get(reverse("inspections:recall") + f"?kind=lot&lot={lot.pk}").content.decode()
    assert "Repaired on" in page and "or repaired with it" in page
    assert page.count(f"<td>{today.isoformat()}</td>") == 2  # the made weld's date, the repaired weld's repair date
    csv_lines = client_as("qa_lead").get(reverse("inspections:recall_csv") + f"?kind=lot&lot={lot.pk}").content
    assert b"Repaired on" in csv_lines.splitlines()[0]


def test_the_form_lists_the_newest_lots_and_reads_back_an_older_one_by_its_link(make, users, client_as, monkeypatch):
    from inspections.forms import trace as forms

    monkeypatch.setattr(forms, "RECALL_OFFERED", 3)
    old = make.make_filler_lot(received_on=timezone.localdate() - timedelta(days=900))
    newest = [make.make_filler_lot(received_on=timezone.localdate() - timedelta(days=n)) for n in range(3)]
    lot_welds(make, users, old, 2)
    client = client_as("qa_lead")
    listed = {pk for pk, _t in client.get(reverse("inspections:recall")).context["form"].fields["lot"].widget.choices}
    assert {lot.pk for lot in newest} <= listed and old.pk not in listed
    page = client.get(old.get_absolute_url()).content.decode()  # the lot's page links its recall
    link = reverse("inspections:recall") + f"?kind=lot&amp;lot={old.pk}"
    assert link in page
    response = client.get(link.replace("&amp;", "&"))
    assert "2 welds" in response.content.decode()
    assert old.pk in {pk for pk, _t in response.context["form"].fields["lot"].widget.choices}
