"""Exports stream and imports preview what matters (issue 16 item 3): the weld-map export and every list's CSV are
StreamingHttpResponses read with values_list in chunks, so memory stays flat as rows grow (tracemalloc over a few
thousand welds); a weld-map import previews a summary by piece mark and only the rows with problems."""

import tracemalloc

import pytest
from django.urls import reverse

from core.fields import _exact_length_text, exact_length_text
from core.units import parse_length
from inspections.models import Weld
from tests.factory import L
from tests.test_weldmap_csv import HEADER, upload


def _welds(assembly, n, start=0):
    Weld.objects.bulk_create([
        Weld(assembly=assembly, mark=f"W{start + i:05d}", joint_type="fillet", size=L("1/4 in"), length=L("12 in"),
             count=1, thickness1=L("3/8 in"), thickness2=L("1/2 in"), position="F") for i in range(n)])


def _peak_while_streaming(client, url):
    tracemalloc.start()
    try:
        response = client.get(url)
        assert response.streaming
        size = sum(len(chunk) for chunk in response.streaming_content)
        return tracemalloc.get_traced_memory()[1], size
    finally:
        tracemalloc.stop()


@pytest.mark.django_db
def test_the_weld_map_export_streams_at_steady_memory(client_as, make):
    job = make.make_job()
    assembly = make.make_assembly(job)
    client = client_as("inspector")
    url = reverse("inspections:weldmap_export", args=[job.pk])
    _welds(assembly, 2500)
    small_peak, small_size = _peak_while_streaming(client, url)
    _welds(assembly, 5000, start=2500)
    big_peak, big_size = _peak_while_streaming(client, url)
    assert big_size > 2.5 * small_size  # three times the rows went out...
    assert big_peak < 2 * small_peak  # ...through about the same memory (rows read a chunk at a time, not 3x)
    assert big_peak < 20 * 1024 * 1024


def test_lengths_are_formatted_once_per_distinct_value():
    _exact_length_text.cache_clear()
    quarter = parse_length("1/4 in")
    for _ in range(1000):
        assert exact_length_text(quarter, "US") == '1/4"'
    info = _exact_length_text.cache_info()
    assert info.misses == 1 and info.hits == 999


def test_a_list_csv_streams_exactly_the_filtered_rows(client_as, make):
    job = make.make_job()
    other = make.make_job()
    make.make_assembly(job, piece_mark="Q1")
    make.make_assembly(other, piece_mark="Q2")
    response = client_as("inspector").get(reverse("inspections:assembly_list"), {"job": job.pk, "format": "csv"})
    assert response.streaming and response["Content-Type"].startswith("text/csv")
    text = b"".join(response.streaming_content).decode()
    assert "Q1" in text and "Q2" not in text


def test_the_import_preview_shows_a_summary_and_only_the_rows_with_problems(client_as, make):
    job = make.make_job(number="J-8900")
    make.make_assembly(job=job, piece_mark="B1")
    make.make_assembly(job=job, piece_mark="C2")
    lines = [f"B1,W{i},fillet,1/4,,12,1,arrow,3/8,1/2,F,\n" for i in range(400)]
    lines += ["C2,W1,fillet,1/4,,12,1,arrow,3/8,1/2,F,\n", "Z9,W1,fillet,1/4,,12,1,arrow,3/8,1/2,F,\n",
              "C2,W2,fillet,banana,,12,1,arrow,3/8,1/2,F,\n"]
    response = client_as("qa_lead").post(reverse("inspections:weldmap_import", args=[job.pk]),
                                         {"file": upload(HEADER + "".join(lines))})
    text = response.text
    assert response.status_code == 400  # a file with problems: nothing saved
    assert "2 of 403 rows cannot be imported" in text
    assert ">400<" in text  # B1: 400 welds ready, in the summary
    assert "job J-8900 has no assembly Z9" in text and "banana" in text
    assert text.count('class="lw-row-bad"') == 2 + 2  # two problem rows, and two summary lines with problems
    assert ">W399<" not in text  # a good row is counted, not listed
    assert len(text) < 60_000
