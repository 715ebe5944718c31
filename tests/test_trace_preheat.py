"""Measured preheat and interpass: judged at fit-up or in-process against the WPS (50 F minimum on the factory's
prequalified FCAW WPS) and AWS D1.1/D1.1M:2020 Table 5.8 for the thicker part (Category B over 1-1/2 to 2-1/2 in:
150 F); a weld made below preheat (in-process) is rejected with an NCR; at fit-up a low reading holds the joint."""

import pytest
from django.urls import reverse

from core.units import parse_length, parse_temperature
from inspections import traveler
from inspections.models import NCR
from tests.test_inspect_views import sign

pytestmark = pytest.mark.django_db


def reading(text, method="contact"):
    return {"preheat_measured": parse_temperature(text), "temperature_method": method}


def test_in_process_at_the_wps_minimum_is_accepted_and_a_degree_below_opens_an_ncr(make):
    weld = make.make_weld(wps=make.approved_wps())
    at = make.make_inspection(weld, stage="in_process", min_size="1/4 in", **reading("50 F"))
    assert at.accepted and at.preheat_measured == parse_temperature("50 F")
    assert not NCR.objects.filter(weld=weld).exists()
    low = make.make_inspection(weld, stage="in_process", min_size="1/4 in", **reading("49 F"))
    assert not low.accepted
    ncr = NCR.objects.get(inspection=low)
    assert "in-process inspection" in ncr.description and "Preheat (measured)" in ncr.description


def test_table_5_8_governs_for_the_thicker_part_of_a_prequalified_wps(make):
    weld = make.make_weld(wps=make.approved_wps(), thickness2=parse_length("2 in"))
    low = make.make_inspection(weld, stage="in_process", min_size="1/4 in", **reading("149 F"))
    finding = next(f for f in low.findings if f["criterion"] == "preheat")
    assert not finding["ok"] and "Table 5.8" in finding["source"] and finding["limit"] == "150 °F"
    assert make.make_inspection(weld, stage="in_process", min_size="1/4 in", **reading("150 F")).accepted


def test_interpass_above_the_wps_maximum_rejects(make):
    wps = make.make_wps(state="approved", interpass_max=parse_temperature("500 F"))
    weld = make.make_weld(wps=wps)
    ok = make.make_inspection(weld, stage="in_process", min_size="1/4 in",
                              interpass_measured=parse_temperature("500 F"), temperature_method="crayon")
    assert ok.accepted
    hot = make.make_inspection(weld, stage="in_process", min_size="1/4 in",
                               interpass_measured=parse_temperature("501 F"), temperature_method="crayon")
    assert not hot.accepted and NCR.objects.filter(inspection=hot).exists()


def test_at_fit_up_a_low_reading_holds_the_joint_without_an_ncr(make):
    weld = make.make_weld(wps=make.approved_wps())
    held = make.make_inspection(weld, stage="fit_up", root_gap="0 in", **reading("40 F", "crayon"))
    assert not held.accepted and not NCR.objects.filter(weld=weld).exists()


def test_the_tablet_says_beside_the_field_what_is_wrong(make, client_as):
    weld = make.make_sound_weld()
    client = client_as("inspector")
    url = reverse("inspections:inspect_weld", args=[weld.pk])
    final = client.post(url, {"stage": "final", "min_size": "1/4", "preheat_measured": "150"})
    assert "measured before and during welding" in str(final.context["form"].errors["preheat_measured"])
    no_method = client.post(url, {"stage": "in_process", "min_size": "1/4", "preheat_measured": "150"})
    assert "measured with" in str(no_method.context["form"].errors["temperature_method"])
    fit_up = client.post(url, {"stage": "fit_up", "root_gap": "0", "fit_up_ok": "on",
                               "interpass_measured": "150", "temperature_method": "contact"})
    assert "between passes" in str(fit_up.context["form"].errors["interpass_measured"])
    assert not weld.inspections.exists()
    signed = sign(client, weld, {"stage": "in_process", "min_size": "1/4", "preheat_measured": "150",
                                 "temperature_method": "contact"})
    assert signed.status_code == 302
    assert weld.inspections.get().preheat_measured == parse_temperature("150 F")  # a bare number: the job's F


def test_the_traveler_prints_the_reading_and_its_method(make):
    weld = make.make_sound_weld()
    make.make_inspection(weld, stage="fit_up", root_gap="0 in", accepted=True, **reading("75 F"))
    make.make_inspection(weld)
    fit_up = traveler.gather(weld.assembly_id)["welds"][0]["fit_up"]
    assert "Preheat measured 75 °F (contact thermometer)" in fit_up["recorded"]
