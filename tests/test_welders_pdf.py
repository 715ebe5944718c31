"""The printable qualification summary: rendered for real by WeasyPrint and read back with pypdf."""

from datetime import date, timedelta
from io import BytesIO

from django.urls import reverse
from django.utils import timezone
from pypdf import PdfReader

from procedures.eligibility import record_production
from procedures.services import welders as welder_steps
from tests.factory import L


def pdf_text(response):
    assert response["Content-Type"] == "application/pdf"
    reader = PdfReader(BytesIO(response.content))
    return " ".join(" ".join((page.extract_text() or "").split()) for page in reader.pages)


def test_the_summary_prints_ranges_lapse_dates_and_continuity(client_as, make, users):
    today = timezone.localdate()
    welder = make.make_welder(name="Tomas Reyes", stamp="B-14")
    make.make_qualification(welder, joint="fillet", test_position="3F+4F", test_thickness=L("1/2 in"),
                            process="SMAW", electrode="E7018", test_date=today - timedelta(days=20))
    make.make_qualification(welder, test_date=date(2026, 1, 12))
    weld = make.make_weld(wps=make.make_wps(), welded_on=date(2026, 5, 4), mark="W-9")
    weld.welders.set([welder])
    record_production(weld)
    welder_steps.log_continuity(welder, "FCAW", date(2026, 9, 1), "Work order 5512", users["qa_lead"])

    response = client_as("viewer").get(reverse("procedures:welder_pdf", args=[welder.pk]))
    text = pdf_text(response)

    assert "Welder qualification summary" in text
    assert "Tomas Reyes" in text and "B-14" in text
    assert "Fillet welds in flat, horizontal, vertical and overhead positions; no groove welds" in text
    assert "SMAW electrode groups F4, F3, F2, F1" in text
    # FCAW: test 2026-01-12, production weld 2026-05-04, manual entry 2026-09-01 -> valid until 2027-03-01.
    assert "2027-03-01" in text
    assert f"W-9, job {weld.assembly.job.number}" in text
    assert "Work order 5512" in text
    assert "Caution." in text and "Page 1 of" in text
    assert response["Content-Disposition"].startswith('inline; filename="welder-b-14-qualifications-')


def test_the_summary_of_a_welder_with_nothing_recorded_still_prints(client_as, make):
    welder = make.make_welder(stamp='Q"/1')
    response = client_as("inspector").get(reverse("procedures:welder_pdf", args=[welder.pk]))
    text = pdf_text(response)
    assert "No qualification test recorded" in text
    assert "No passed test on record" in text
    assert '"' not in response["Content-Disposition"].split("filename=")[1].strip('"')


def test_a_long_history_prints_the_fewest_uses_that_prove_the_chain(client_as, make, users):
    # Use at least once in any 6 months (AWS D1.1/D1.1M:2020 clause 6.2.3.1, from memory): two years of weekly
    # hand entries print as one use every six months or so, the first and the last always among them.
    from procedures.models import ContinuityEntry

    welder = make.make_welder(stamp="B-31")
    make.make_qualification(welder, test_date=date(2024, 1, 8))
    start = date(2024, 1, 15)
    ContinuityEntry.objects.bulk_create([
        ContinuityEntry(welder=welder, process="FCAW", date=start + timedelta(weeks=n), source="manual",
                        note=f"Work order {7000 + n}", entered_by=users["qa_lead"]) for n in range(104)])
    from procedures import continuity
    continuity.refresh([welder.pk])
    text = pdf_text(client_as("qa_lead").get(reverse("procedures:welder_pdf", args=[welder.pk])))
    shown = [n for n in range(104) if f"Work order {7000 + n}" in text]
    assert shown[0] == 0 and shown[-1] == 103 and len(shown) == 5  # 2024-01-15, then each latest within reach
    assert "5 of 104 recorded uses shown" in text
