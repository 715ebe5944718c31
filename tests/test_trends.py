"""Quality trends (inspections.services.trends, core.charts): every figure against counts made from the factory's
records, fixed queries, the viewer's figures its customers' only, the CSV the same rows as the page."""

import csv
import io
from datetime import timedelta

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from django.utils import timezone

from core import charts
from inspections.services import trends
from procedures import qualification

OTHER = "Ostrander Bridge Works"


@pytest.fixture
def history(make, users):
    """Two jobs of the viewer's customer and one of another: accepted and rejected final inspections, two
    welders, a superseded inspection (not counted), a fit-up inspection (not counted), one repair."""
    from inspections.services import ncr as ncr_steps
    from inspections.services import repairs

    one, two = make.make_qualified_welder(stamp="T-01"), make.make_qualified_welder(stamp="T-02")
    a, b = make.make_job(number="J-TA"), make.make_job(number="J-TB")
    other = make.make_job(number="J-TX", customer=OTHER)
    made = []  # (job number, welder stamps, accepted, cause)

    def inspect(job, welders, accepted, undercut=False):
        weld = make.make_sound_weld(make.make_assembly(job), welders=welders)
        if undercut:
            make.make_inspection(weld, accepted=False, min_size=weld.size, undercut_depth="1/8 in")
        else:
            make.make_inspection(weld, accepted=accepted)
        made.append((job.number, tuple(w.stamp for w in welders), accepted,
                     None if accepted else "Undercut" if undercut else "Undersize"))
        return weld

    inspect(a, [one], True)
    inspect(a, [one], False)
    inspect(a, [one, two], False, undercut=True)
    inspect(b, [two], True)
    inspect(b, [two], True)
    repaired = inspect(b, [two], False)
    inspect(other, [one], False)
    # A mistaken acceptance corrected to a rejection: only the correction counts.
    corrected = make.make_sound_weld(make.make_assembly(a), welders=[two])
    wrong = make.make_inspection(corrected, accepted=True)
    make.make_inspection(corrected, accepted=False, supersedes=wrong, reason="Leg gauge misread")
    made.append(("J-TA", ("T-02",), False, "Undersize"))
    held = make.make_job(number="J-TF", fit_up_hold_point=True)
    make.make_inspection(make.make_weld(make.make_assembly(held)), stage="fit_up", accepted=False)
    ncr = repaired.ncrs.get()
    ncr = ncr_steps.disposition_repair(ncr, users["qa_lead"], make.approved_wps(), two)
    repairs.record_repair(ncr, users["inspector"], wps=make.approved_wps(), welded_on=timezone.localdate(),
                          welders=[two])
    return {"made": made, "a": a, "b": b, "other": other}


def _filters(**kw):
    return trends.Filters(**{**vars(trends.default_filters()), **kw})


def _rates(trend):
    return {row[1]: (row[2], row[3]) for row in trend.rows}  # one week in the fixture


def test_reject_rate_by_job_welder_and_wps_match_the_records(history, users):
    made = history["made"]
    got = trends.gather(users["qa_lead"], _filters())
    by_job = {}
    for job, _w, accepted, _c in made:
        n, r = by_job.get(job, (0, 0))
        by_job[job] = (n + 1, r + (not accepted))
    assert _rates(got["by_job"]) == by_job
    by_welder = {}
    for _j, welders, accepted, _c in made:
        for stamp in welders:
            n, r = by_welder.get(stamp, (0, 0))
            by_welder[stamp] = (n + 1, r + (not accepted))
    assert _rates(got["by_welder"]) == by_welder
    assert sum(n for n, _r in _rates(got["by_wps"]).values()) == len(made)  # every sound weld: one shared WPS
    row = next(r for r in got["by_job"].rows if r[1] == "J-TA")
    assert row[4] == round(100 * by_job["J-TA"][1] / by_job["J-TA"][0], 1)


def test_the_pareto_counts_each_failed_criterion_largest_first(history, users):
    expected = {}
    for *_rest, cause in history["made"]:
        if cause:
            expected[cause] = expected.get(cause, 0) + 1
    causes = trends.gather(users["qa_lead"], _filters())["causes"]
    assert {row[0]: row[1] for row in causes.rows} == expected
    assert [row[1] for row in causes.rows] == sorted(expected.values(), reverse=True)
    assert causes.rows[-1][2] == 100.0


def test_first_pass_and_repairs_per_job(history, users):
    got = trends.gather(users["qa_lead"], _filters())
    first = {}
    for job, _w, accepted, _c in history["made"]:
        n, ok = first.get(job, (0, 0))
        first[job] = (n + 1, ok + accepted)
    # The corrected weld's first current final inspection is the correction (a rejection).
    assert {row[0]: (row[1], row[2]) for row in got["first_pass"].rows} == first
    repairs = {row[0]: row[1:] for row in got["repairs"].rows}
    assert repairs["J-TB"] == [3, 1, round(100 / 3, 1)]
    assert repairs["J-TA"][1] == 0


def test_filters_narrow_every_figure(history, users):
    got = trends.gather(users["qa_lead"], _filters(job=history["b"]))
    assert {row[1] for row in got["by_job"].rows} == {"J-TB"}
    assert {row[0] for row in got["repairs"].rows} == {"J-TB"}
    assert trends.gather(users["qa_lead"], _filters(process="SMAW"))["by_job"].rows == []
    tomorrow = timezone.localdate() + timedelta(days=1)
    assert trends.gather(users["qa_lead"], _filters(start=tomorrow, end=tomorrow))["causes"].rows == []


def test_a_viewer_sees_its_customers_figures_only(history, users, client_as):
    got = trends.gather(users["viewer"], _filters())
    assert "J-TX" not in {row[1] for row in got["by_job"].rows}
    assert {row[0] for row in got["first_pass"].rows} == {"J-TA", "J-TB"}
    page = client_as("viewer").get(reverse("inspections:trends")).text
    assert "J-TX" not in page and "J-TA" in page
    text = client_as("viewer").get(reverse("inspections:trends_csv", args=["by_job"])).content.decode()
    assert "J-TX" not in text


def test_the_csv_is_the_charts_table(history, client_as, users):
    response = client_as("qa_lead").get(reverse("inspections:trends_csv", args=["causes"]))
    assert response["Content-Type"].startswith("text/csv")
    rows = list(csv.reader(io.StringIO(response.content.decode())))
    table = trends.gather(users["qa_lead"], _filters())["causes"]
    assert rows[0] == table.headers
    assert rows[1:] == [[str(c) for c in row] for row in table.rows]
    assert client_as("qa_lead").get(reverse("inspections:trends_csv", args=["nope"])).status_code == 404


def test_bad_filters_are_messages_beside_the_field(history, client_as):
    page = client_as("qa_lead").get(reverse("inspections:trends"), {"start": "2026-13-45", "job": "x",
                                                                     "end": "1999-01-01"})
    assert page.status_code == 200
    assert "Enter a valid date." in page.text
    page = client_as("qa_lead").get(reverse("inspections:trends"), {"start": "0001-01-01", "end": "9999-12-31"})
    assert page.status_code == 200 and "Enter a date between 1950 and 2199." in page.text


def test_the_trends_page_takes_a_fixed_number_of_queries(history, make, client_as):
    client = client_as("qa_lead")
    client.get(reverse("inspections:trends"))
    with CaptureQueriesContext(connection) as small:
        client.get(reverse("inspections:trends"))
    for _ in range(3):
        make.make_inspection(make.make_sound_weld(make.make_assembly(make.make_job())), accepted=False)
    with CaptureQueriesContext(connection) as large:
        assert client.get(reverse("inspections:trends")).status_code == 200
    assert len(large.captured_queries) == len(small.captured_queries)


def test_continuity_bands_run_six_months_after_each_use(history, users):
    today = timezone.localdate()
    trend = trends.gather(users["qa_lead"], _filters(start=today - timedelta(days=30)))["continuity"]
    row = next(r for r in trend.rows if r[0] == "T-01")
    # Used today (and its test 30 days ago is not a use): in continuity from today, cut at the range's end.
    assert row[1] == today.isoformat() and row[2] == today.isoformat()
    assert qualification.continuity_until(today) > today


# --- the chart module (plain Python) -----------------------------------------------------------------------------

def test_charts_carry_a_title_and_a_text_alternative_with_the_figures():
    svg = charts.line_chart("Reject rate", ["01 Jun", "08 Jun"], [charts.Series("J-1", (10.0, None))])
    assert svg.startswith("<svg") and "<title>Reject rate</title>" in svg
    assert "<desc>J-1: 01 Jun 10%, 08 Jun no data</desc>" in svg
    bars = charts.bar_chart("Causes", [("Undercut <b>", 3), ("Porosity", 1)], cumulative=True)
    assert "Undercut &lt;b&gt; 3 (cumulative 75%)" in bars and "<b>" not in bars
    assert "No data" in charts.bar_chart("Causes", [])
