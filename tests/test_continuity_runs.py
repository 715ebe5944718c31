"""Continuity as a fact (procedures.continuity, ContinuityRun): the runs kept with every entry equal what a scan of
the whole history computes, and the pages that judge welders read the runs, in queries and rows that do not grow
with the history. Rule: six calendar months between uses, AWS D1.1/D1.1M:2020 clause 6.2.3.1 (clause number from
memory), ISO 9606-1:2012 9.2. Invented scenario (Brannock Steelworks)."""

from datetime import date, timedelta

from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from procedures import continuity, eligibility
from procedures.models import ContinuityEntry, ContinuityRun
from procedures.qualification import continuity_runs, continuity_until

START = date(2020, 1, 1)


def scan(test_date, days, on):
    """The history scan the runs replace: the end of the unbroken chain of uses since the test, up to `on`."""
    current, last = test_date, None
    for day in sorted(days):
        if day < test_date:
            continue
        if day > on or day > continuity_until(current):
            break
        current = last = day
    return last


def stored_runs(welder):
    return {(r.process, r.first_use, r.last_use, r.valid_until)
            for r in ContinuityRun.objects.filter(welder=welder)}


def expected_runs(welder):
    found = {}
    for entry in ContinuityEntry.objects.filter(welder=welder):
        found.setdefault(entry.process, []).append(entry.date)
    return {(process, first, last, continuity_until(last))
            for process, days in found.items() for first, last in continuity_runs(days)}


def test_runs_split_at_a_gap_longer_than_six_months_and_not_at_exactly_six():
    # 2026-01-31 + 6 months = 2026-07-31: a use that day continues the run, the day after starts a new one.
    assert continuity_runs([date(2026, 1, 31), date(2026, 7, 31)]) == [(date(2026, 1, 31), date(2026, 7, 31))]
    assert continuity_runs([date(2026, 1, 31), date(2026, 8, 1)]) == [
        (date(2026, 1, 31), date(2026, 1, 31)), (date(2026, 8, 1), date(2026, 8, 1))]
    assert continuity_runs([]) == []


offsets = st.lists(st.integers(min_value=0, max_value=6 * 365), max_size=25)


@settings(max_examples=40, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(uses=offsets, tests=st.lists(st.integers(min_value=0, max_value=6 * 365), min_size=1, max_size=3),
       asked=st.lists(st.integers(min_value=-30, max_value=7 * 365), min_size=1, max_size=6))
def test_the_fact_equals_the_history_scan_on_random_histories(db, make, uses, tests, asked):
    welder = make.make_welder()
    quals = [make.make_qualification(welder, process="FCAW", test_date=START + timedelta(days=t)) for t in tests]
    days = [START + timedelta(days=u) for u in uses]
    for day in days:  # a hand entry each: the signal keeps the runs
        ContinuityEntry.objects.create(welder=welder, process="FCAW", date=day, source="manual", note="shop log")
    assert stored_runs(welder) == expected_runs(welder)
    on_days = [START + timedelta(days=a) for a in asked]
    loaded = eligibility._load([welder], on_days)[welder.pk]
    for on in on_days:
        for q in quals:
            fact = eligibility.facts(q, loaded.runs.get("FCAW", []), on, loaded.near.get("FCAW", ()))
            assert fact.last_use_of_process == scan(q.test_date, days, on), (q.test_date, on)


def test_runs_follow_a_production_weld_moved_to_another_day_and_a_welder_taken_off(make):
    wps = make.make_wps(process="FCAW", electrode="E71T-1C")
    a, b = make.make_welder(), make.make_welder()
    ContinuityEntry.objects.create(welder=a, process="FCAW", date=date(2025, 1, 6), source="manual", note="log")
    weld = make.make_weld(wps=wps, welded_on=date(2025, 3, 4))
    weld.welders.set([a, b])
    eligibility.record_production(weld)
    assert stored_runs(a) == {("FCAW", date(2025, 1, 6), date(2025, 3, 4), date(2025, 9, 4))}
    weld.welded_on = date(2025, 12, 1)  # past six months from the hand entry: a second run
    weld.save()
    eligibility.record_production(weld)  # moves the entries by a queryset update, which sends no signal
    assert stored_runs(a) == expected_runs(a) and len(stored_runs(a)) == 2
    weld.welders.set([a])
    eligibility.record_production(weld)
    assert stored_runs(b) == set() == expected_runs(b)


def test_rebuild_and_the_migration_function_agree_with_the_kept_runs(make):
    welder = make.make_welder()
    for day in (date(2024, 1, 2), date(2024, 5, 2), date(2025, 2, 1)):
        ContinuityEntry.objects.create(welder=welder, process="SMAW", date=day, source="manual", note="log")
    kept = stored_runs(welder)
    ContinuityRun.objects.all().delete()
    continuity.rebuild()
    assert stored_runs(welder) == kept == expected_runs(welder)


def _history(welder, days, process="FCAW"):
    ContinuityEntry.objects.bulk_create(
        [ContinuityEntry(welder=welder, process=process, date=day, source="manual", note="old shop log")
         for day in days])
    continuity.refresh([welder.pk])


def _queries(client, url):
    with CaptureQueriesContext(connection) as ctx:
        response = client.get(url)
    assert response.status_code == 200
    return ctx.captured_queries


def test_the_welder_list_reads_runs_never_the_history_whatever_its_length(client_as, make):
    client = client_as("inspector")
    welder = make.make_qualified_welder()
    short = _queries(client, reverse("procedures:welder_list"))
    today = date.today()
    _history(welder, [today - timedelta(days=3 * n) for n in range(1, 400)])  # three years, every third day
    long = _queries(client, reverse("procedures:welder_list"))
    assert len(long) == len(short)
    assert not any("continuityentry" in q["sql"].lower() for q in long)


def test_the_assembly_page_keeps_its_queries_when_the_welders_history_grows(client_as, make):
    welder = make.make_qualified_welder()
    assembly = make.make_assembly()
    for _ in range(3):
        make.make_sound_weld(assembly, welders=[welder])
    client = client_as("qa_lead")
    url = reverse("inspections:assembly_detail", args=[assembly.pk])
    short = _queries(client, url)
    today = date.today()
    _history(welder, [today - timedelta(days=2 * n) for n in range(1, 600)])
    long = _queries(client, url)
    assert len(long) == len(short)
    assert "qualified" in client.get(url).text


def test_the_welder_page_lists_its_history_a_page_at_a_time_in_fixed_queries(client_as, make):
    client = client_as("qa_lead")
    welder = make.make_qualified_welder()
    url = reverse("procedures:welder_detail", args=[welder.pk])
    today = date.today()
    _history(welder, [today - timedelta(days=n) for n in range(1, 4)])
    short = _queries(client, url)
    _history(welder, [today - timedelta(days=n) for n in range(4, 130)])
    long = _queries(client, url)
    assert len(long) == len(short)
    response = client.get(url, {"page": "3"})
    assert len(response.context["continuity"]) == 29 and "Page 3 of 3" in response.text
    assert "without a six-month gap" in response.text  # the run, summarised


def test_the_job_page_lists_its_assemblies_a_page_at_a_time_in_fixed_queries(client_as, make):
    from inspections.models import Assembly

    client = client_as("inspector")
    job = make.make_job()
    url = reverse("inspections:job_detail", args=[job.pk])
    make.make_sound_weld(make.make_assembly(job))
    short = _queries(client, url)
    Assembly.objects.bulk_create([Assembly(job=job, piece_mark=f"K{n:03d}", drawing="E-9") for n in range(80)])
    long = _queries(client, url)
    assert len(long) == len(short)
    response = client.get(url, {"page": "2"})
    assert len(response.context["page"]) == 31 and "K079" in response.text
