"""Every list page through core.lists, as the list contract says: filters by name (job, state, welder, wps, stage,
verdict, criterion, date ranges), sort, 50 rows a page, "CSV of this list" with exactly the filtered rows, bad
values ignored, a viewer reading only its customers' rows, and a query count that does not grow with the rows.
Invented scenario (Brannock Steelworks)."""

import csv
import io
from datetime import timedelta

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from inspections.models import NCR, Assembly, Inspection
from inspections.models.ncr import NCRState
from tests.hostile import HOSTILE
from tests.pages_travelers import _issued, _packet

LISTS = ["procedures:wps_list", "procedures:pqr_list", "procedures:welder_list", "inspections:job_list",
         "inspections:assembly_list", "inspections:ncr_list", "inspections:inspection_list",
         "inspections:traveler_index", "inspections:packet_index"]
OTHER = "Ostrander Mill Services"


def get(client, name, **params):
    response = client.get(reverse(name), params)
    assert response.status_code == 200, (name, params)
    return response


def csv_rows(response):
    assert response.streaming  # a StreamingHttpResponse: rows go out as they are read
    text = b"".join(response.streaming_content).decode()
    return list(csv.reader(io.StringIO(text)))[1:]


def shown(response):
    return list(response.context["page"])


def count_queries(client, name, **params):
    with CaptureQueriesContext(connection) as ctx:
        get(client, name, **params)
    return len(ctx.captured_queries)


def _rejected(make, weld=None, **observed):
    return make.make_inspection(weld or make.make_sound_weld(), accepted=False, **observed)


@pytest.fixture
def shop(make):
    """Two of each record on the factory's customer's job, and one on another customer's job."""
    job = make.make_job()
    assembly = make.make_assembly(job)
    for _ in range(2):
        weld = make.make_sound_weld(assembly)
        make.make_inspection(weld)
    bad = _rejected(make, make.make_sound_weld(assembly))
    make.customer_name = OTHER
    other_job = make.make_job()
    other = _rejected(make, make.make_sound_weld(make.make_assembly(other_job)))
    make.customer_name = "Harlan Transit Authority"
    return {"job": job, "assembly": assembly, "bad": bad, "other_job": other_job, "other": other}


@pytest.mark.parametrize("name", LISTS)
def test_every_list_answers_hostile_and_unknown_parameters_with_the_page(client_as, users, name):
    client = client_as("qa_lead")
    for value in HOSTILE[:25]:
        params = {key: value for key in ("page", "o", "job", "state", "welder", "wps", "process", "stage",
                                         "verdict", "criterion", "continuity", "active", "waiting", "q",
                                         "opened_after", "signed_before", "issued_after", "requested_before")}
        get(client, name, **params)
    assert get(client, name, format="csv").streaming


def test_the_ncr_list_filters_by_state_job_welder_criterion_and_date(client_as, make, shop):
    client = client_as("qa_lead")
    bad = shop["bad"]
    ncr = NCR.objects.get(inspection=bad)
    welder = bad.weld.welders.get()
    assert {n.pk for n in shown(get(client, "inspections:ncr_list", job=shop["job"].pk))} == {ncr.pk}
    assert {n.pk for n in shown(get(client, "inspections:ncr_list", welder=welder.pk))} == {ncr.pk}
    assert shown(get(client, "inspections:ncr_list", state=NCRState.CLOSED)) == []
    criterion = next(f["criterion"] for f in bad.findings if not f["ok"])
    assert ncr in shown(get(client, "inspections:ncr_list", criterion=criterion))
    other = "crack" if criterion != "crack" else "spatter"
    assert ncr not in shown(get(client, "inspections:ncr_list", criterion=other))
    today = timezone.localdate()
    assert ncr in shown(get(client, "inspections:ncr_list", opened_after=today.isoformat()))
    assert shown(get(client, "inspections:ncr_list", opened_before=(today - timedelta(days=1)).isoformat())) == []
    rows = csv_rows(get(client, "inspections:ncr_list", job=shop["job"].pk, format="csv"))
    assert [r[0] for r in rows] == [ncr.number]


def test_the_inspection_list_filters_by_verdict_stage_wps_welder_and_date(client_as, make, shop):
    client = client_as("qa_lead")
    bad = shop["bad"]
    job = shop["job"]
    rejected = shown(get(client, "inspections:inspection_list", job=job.pk, verdict="rejected"))
    assert rejected == [bad]
    assert len(shown(get(client, "inspections:inspection_list", job=job.pk, verdict="accepted"))) == 2
    assert len(shown(get(client, "inspections:inspection_list", job=job.pk, wps=bad.weld.wps_id))) == 3
    assert shown(get(client, "inspections:inspection_list", job=job.pk, stage="fit_up")) == []
    welder = bad.weld.welders.get()
    assert shown(get(client, "inspections:inspection_list", welder=welder.pk)) == [bad]
    tomorrow = timezone.localdate() + timedelta(days=1)
    assert shown(get(client, "inspections:inspection_list", signed_after=tomorrow.isoformat())) == []
    rows = csv_rows(get(client, "inspections:inspection_list", job=job.pk, verdict="rejected", format="csv"))
    assert len(rows) == 1 and rows[0][6] == "no"


def test_the_assembly_list_filters_by_job_state_and_what_waits(client_as, make, shop):
    client = client_as("inspector")
    job = shop["job"]
    assert shown(get(client, "inspections:assembly_list", job=job.pk)) == [shop["assembly"]]
    waiting = make.make_assembly(job)
    make.make_weld(waiting)  # not welded, never inspected: waits for fit-up
    assert shown(get(client, "inspections:assembly_list", job=job.pk, waiting="fit_up")) == [waiting]
    final = make.make_assembly(job)
    make.make_sound_weld(final)  # welded today, no final visual yet
    assert shown(get(client, "inspections:assembly_list", job=job.pk, waiting="final")) == [final]
    assert shown(get(client, "inspections:assembly_list", job=job.pk, state="released")) == []
    newest_first = shown(get(client, "inspections:assembly_list", job=job.pk, o="-created"))
    assert newest_first == sorted(newest_first, key=lambda a: -a.pk)


def test_a_viewer_reads_only_its_customers_rows_on_every_list_and_csv(client_as, make, shop):
    _issued(make)
    _packet(make, done=True)
    client = client_as("viewer")
    other_job = shop["other_job"]
    for name in LISTS:
        text = get(client, name).text
        assert other_job.number not in text, name
        assert other_job.number not in b"".join(get(client, name, format="csv").streaming_content).decode(), name
    # asking for the other customer's job by id is a refused filter value, not a way in
    assert shop["other"] not in shown(get(client, "inspections:inspection_list", job=other_job.pk))
    assert NCR.objects.get(inspection=shop["other"]) not in shown(get(client, "inspections:ncr_list", show="all"))


def test_pages_hold_50_rows_and_keep_the_filters_in_their_links(client_as, make):
    job = make.make_job()
    Assembly.objects.bulk_create([Assembly(job=job, piece_mark=f"C{n:03d}", drawing="E-1") for n in range(120)])
    client = client_as("inspector")
    first = get(client, "inspections:assembly_list", job=job.pk, o="piece_mark")
    assert len(shown(first)) == 50 and shown(first)[0].piece_mark == "C000"
    assert f"job={job.pk}&amp;o=piece_mark&amp;page=2" in first.text
    assert f"job={job.pk}&amp;o=piece_mark&amp;format=csv" in first.text
    last = get(client, "inspections:assembly_list", job=job.pk, o="piece_mark", page="3")
    assert [a.piece_mark for a in shown(last)][-1] == "C119" and len(shown(last)) == 20
    assert len(csv_rows(get(client, "inspections:assembly_list", job=job.pk, format="csv"))) == 120


@pytest.mark.parametrize("name", LISTS)
def test_each_list_keeps_its_query_count_as_rows_grow(client_as, make, name):
    """Counted with a few records and again with more than a page of each (pinned: the count never depends on
    the rows)."""
    client = client_as("qa_lead")

    def grow(n):
        for _ in range(n):
            weld = make.make_sound_weld()
            make.make_inspection(weld, accepted=False)
            _issued(make) if name == "inspections:traveler_index" else None
            _packet(make) if name == "inspections:packet_index" else None

    grow(2)
    small = count_queries(client, name)
    grow(3)
    assert count_queries(client, name) == small
    assert small <= 8


def test_the_inspection_list_reads_one_page_not_every_inspection(client_as, make):
    weld = make.make_sound_weld()
    make.make_inspection(weld)
    client = client_as("qa_lead")
    with CaptureQueriesContext(connection) as ctx:
        get(client, "inspections:inspection_list")
    selects = [q["sql"] for q in ctx.captured_queries if "inspections_inspection" in q["sql"]]
    assert any("LIMIT" in sql for sql in selects) and Inspection.objects.count() == 1


def test_a_date_at_the_ends_of_the_calendar_is_a_field_error_not_a_server_error(client_as):
    response = get(client_as("qa_lead"), "inspections:inspection_list", signed_after="0001-01-01",
                   signed_before="9999-12-31")
    assert "Give a date between 1900 and 2999." in response.text


def test_a_long_list_counts_up_to_the_cap_and_says_so(client_as, make, monkeypatch):
    from core import lists

    monkeypatch.setattr(lists, "COUNT_CAP", 60)
    job = make.make_job()
    Assembly.objects.bulk_create([Assembly(job=job, piece_mark=f"D{n:03d}", drawing="E-1") for n in range(130)])
    client = client_as("inspector")
    with CaptureQueriesContext(connection) as ctx:
        response = get(client, "inspections:assembly_list", job=job.pk)
    assert "over 60 records: narrow the filters, or take the CSV" in response.text
    assert any("LIMIT 61" in q["sql"] for q in ctx.captured_queries)  # the count stops at the cap
    assert len(csv_rows(get(client, "inspections:assembly_list", job=job.pk, format="csv"))) == 130


def test_a_page_is_chosen_by_ids_first_and_holds_the_same_rows_as_a_plain_slice(make):
    """core.lists.CappedPaginator sorts ids alone on SQLite, then reads the page's rows whole (one query)."""
    from core.lists import CappedPaginator

    job = make.make_job()
    Assembly.objects.bulk_create([Assembly(job=job, piece_mark=f"E{n % 7}-{n:03d}", drawing=f"E-{n % 3}")
                                  for n in range(23)])
    rows = Assembly.objects.filter(job=job).select_related("job").order_by("drawing", "-piece_mark")
    paginator = CappedPaginator(rows, 10)
    assert paginator.count == 23
    for number in (1, 2, 3):
        with CaptureQueriesContext(connection) as ctx:
            page = list(paginator.page(number).object_list)
        assert page == list(rows[(number - 1) * 10:number * 10])
        # ids first on SQLite only (PostgreSQL plans the top rows itself: core.lists.CappedPaginator.page)
        assert len(ctx.captured_queries) == 1
        assert ("IN (SELECT" in ctx.captured_queries[0]["sql"]) == (connection.vendor == "sqlite")
        assert all(a.job == job for a in page)  # select_related kept: no query per row
    assert len(page) == 3


def test_counting_a_list_leaves_out_its_per_row_figures(make):
    """The pager counts ids: an assembly's weld count (a subquery per row) is worked out for the page's rows only."""
    from django.db.models import Count, OuterRef, Subquery

    from core.lists import CappedPaginator
    from inspections.models import Weld

    job = make.make_job()
    for mark in ("F1", "F2"):
        make.make_weld(make.make_assembly(job=job, piece_mark=mark))
    welds = Weld.objects.filter(assembly=OuterRef("pk")).order_by().values("assembly").annotate(n=Count("pk"))
    rows = Assembly.objects.filter(job=job).annotate(n_welds=Subquery(welds.values("n"))).order_by("piece_mark")
    with CaptureQueriesContext(connection) as ctx:
        assert CappedPaginator(rows, 50).count == 2
    assert "inspections_weld" not in ctx.captured_queries[0]["sql"]
    assert [a.n_welds for a in CappedPaginator(rows, 50).page(1).object_list] == [1, 1]
