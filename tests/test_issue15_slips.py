"""Every slip issue 15 found on the pages around the tablet, with a test that fails if it comes back, and the
documents printed right on every job (a/z on ISO jobs, the job's paper, the shop's name and address).

The trade's notation (φ, Ω, in², ≤, ×, feet and inches) is the trade's own, no source needed; the 2 ft threshold
for feet and inches is common practice, no source (core.units.FEET_FROM_INCHES).
"""

import io
import re
from pathlib import Path

from django.db import connection
from django.urls import reverse
from pypdf import PdfReader

from core.pdf import paper_for
from inspections.models import Assembly, JobPacket
from inspections.traveler import gather, issue, read_stored
from procedures.models.wps import WPSState
from tests.factory import L, parse_force
from tests.pages_travelers import build_assembly

ROOT = Path(__file__).resolve().parent.parent
PROGRAM_WORDS = re.compile(r"observed\[|\b(?:min_size|undersize_length|throat_short_length|arc_strike|root_gap)\b"
                           r"|\b(?:aws|iso)-[0-9]")


def _text(content: bytes) -> str:
    return "\n".join(page.extract_text() for page in PdfReader(io.BytesIO(content)).pages)


def _page_size(content: bytes) -> tuple[int, int]:
    box = PdfReader(io.BytesIO(content)).pages[0].mediabox
    return round(float(box.width)), round(float(box.height))


# --- words on the pages -------------------------------------------------------------------------------------

def test_counts_agree_with_their_nouns_on_the_home_page(make, client_as):
    make.make_wps(state=WPSState.SUBMITTED)
    make.make_ncr()
    html = client_as("qa_lead").get(reverse("home")).content.decode()
    text = re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html))
    # The morning page (inspections/services/today.py) heads each section with its noun and puts the figure apart.
    assert "Procedures waiting for approval 1" in text and "1 procedures" not in text
    assert "NCRs awaiting disposition, by age 1" in text
    assert "1 Awaiting disposition, 0 to 7 days old" in text and not re.search(r"\b1 assemblies\b", text)


def test_a_built_packet_does_not_say_done_twice(make, users, client_as):
    from inspections.packets import build_packet, start_packet

    assembly = build_assembly(make, welds=1)
    packet = build_packet(start_packet(assembly.job, [assembly.pk], users["qa_lead"]).pk)
    assert packet.state == "done"
    html = client_as("viewer").get(reverse("inspections:packet_progress", args=[packet.pk])).content.decode()
    text = re.sub(r"<[^>]+>", " ", html)
    assert not re.search(r"\bDone\s+Done\b", text)
    detail = client_as("viewer").get(reverse("inspections:packet_detail", args=[packet.pk])).content.decode()
    assert "1 assembly ·" in detail and "1 assemblies" not in detail
    assert JobPacket.objects.get(pk=packet.pk).step != "Done"


def test_traveler_open_items_say_what_an_open_ncr_waits_for_once(make):
    assembly = build_assembly(make, welds=1, inspect=False)
    weld = assembly.welds.get()
    make.make_inspection(weld, accepted=False)
    items = " ".join(gather(assembly.pk)["open_items"])
    assert "open (open)" not in items and "awaiting disposition" in items


def test_welder_reasons_in_open_items_end_each_sentence_once(make):
    assembly = build_assembly(make, welds=1, inspect=False)
    weld = assembly.welds.get()
    weld.welders.add(make.make_welder())  # never tested: not qualified, with reasons that end in a full stop
    items = " ".join(gather(assembly.pk)["open_items"])
    assert "not qualified" in items and ".;" not in items and ".." not in items


def test_an_ncr_prints_each_finding_once(make, client_as):
    ncr = make.make_ncr(make.make_inspection(min_size="1/8 in", undersize_length="3 in"))
    html = client_as("viewer").get(reverse("inspections:ncr_detail", args=[ncr.pk])).content.decode()
    message = ncr.inspection.findings[[f["ok"] for f in ncr.inspection.findings].index(False)]["message"]
    shown = message.replace('"', "&quot;")
    assert html.count(shown) == 1
    assert "Undersize:" in html and "undersize:" not in html  # the heading, never the engine's name


def test_no_photo_is_captioned_with_a_placeholder(make, client_as):
    assembly = build_assembly(make, welds=1, photos=1)
    photo = assembly.welds.get().inspections.get(stage="final").photos.get()
    assert gather(assembly.pk)["photos"][0]["caption"] == ""
    assert str(photo) != f"Photo {photo.pk}"
    html = client_as("viewer").get(photo.inspection.get_absolute_url()).content.decode()
    assert f"Photo {photo.pk}" not in html


def test_pages_print_the_trade_notation_the_pdfs_print(make, client_as):
    weld = make.make_weld(size=L("1/4 in"), length=L("12 in"), required_strength=parse_force("20 kip"))
    for url in (reverse("inspections:weld_detail", args=[weld.pk]),
                reverse("inspections:weld_capacity", args=[weld.pk]),
                reverse("inspections:strength_calculator") + "?leg=1/4&length=2&thinner_part=3/8&plate_thickness="
                "3/8&plate_width=4&material=a36&net_area=1.2"):
        html = client_as("viewer").get(url).content.decode()
        text = re.sub(r"<[^>]+>", " ", html)
        assert "φRn" in text and "Ω" in text, url
        assert not re.search(r"\bphi\b|\bOmega\b|\bin2\b|<=|&lt;=", text), (url, re.findall(
            r".{30}(?:\bphi\b|\bOmega\b|\bin2\b|&lt;=).{30}", text))


def test_findings_print_less_or_equal_as_a_sign(make, client_as):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("5 mm"), length=L("200 mm"),
                          thickness1=L("8 mm"), thickness2=L("10 mm"))
    inspection = make.make_inspection(weld, throat=L("3.5 mm"), throat_short_length=L("10 mm"), pore_max=L("1.5 mm"))
    html = client_as("viewer").get(inspection.get_absolute_url()).content.decode()
    assert "≤" in html and "&lt;=" not in html


def test_long_us_lengths_print_in_feet_and_inches(make, client_as):
    assembly = make.make_assembly()
    weld = make.make_weld(assembly=assembly, mark="W1", size=L("5/16 in"), length=L("360 in"))
    card = client_as("inspector").get(reverse("inspections:inspect_assembly", args=[assembly.pk])).content.decode()
    assert "30&#x27;-0&quot; long" in card and "360&quot;" not in card
    assert "30'-0\"" in gather(assembly.pk)["welds"][0]["length"]
    form = client_as("inspector").get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert "30&#x27;-0&quot; long" in form


def test_the_wps_edit_form_prints_amps_and_volts_as_typed(make, client_as):
    wps = make.make_wps(amperage_min=250, voltage_max=27)
    html = client_as("welding_engineer").get(reverse("procedures:wps_edit", args=[wps.pk])).content.decode()
    assert 'value="250"' in html and 'value="27"' in html
    assert 'value="250.0"' not in html and 'value="27.00"' not in html


def test_a_decimal_comma_is_read_in_plain_number_boxes(make, client_as):
    wps = make.make_wps()
    from tests.test_wps_views import VALID

    data = {**VALID, "voltage_min": "22,5", "preheat_min": "50", "opened_version": wps.version}
    response = client_as("welding_engineer").post(reverse("procedures:wps_edit", args=[wps.pk]),
                                                  {k: v for k, v in data.items() if v is not None})
    assert response.status_code == 302, response.content.decode()[:3000]
    wps.refresh_from_db()
    assert str(wps.voltage_min) == "22.50" and wps.preheat_min.f == 50


def test_scrap_asks_for_confirmation(make, client_as):
    ncr = make.make_ncr()
    url = reverse("inspections:ncr_disposition", args=[ncr.pk, "scrap"])
    response = client_as("qa_lead").post(url, {"scrap-disposition_notes": "Burn-through"})
    assert response.status_code == 400 and "Tick to confirm" in response.content.decode()
    ncr.refresh_from_db()
    assert ncr.state == "open"
    response = client_as("qa_lead").post(url, {"scrap-disposition_notes": "Burn-through", "scrap-confirm": "on"})
    assert response.status_code == 302
    assert Assembly.objects.get(pk=ncr.weld.assembly_id).state == "scrapped"


def test_no_program_name_reaches_the_tablet_page(make, client_as):
    """observed['throat'], observed['undersize_length'] and their kind are program words, not an inspector's."""
    iso = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    iso_weld = make.make_weld(assembly=make.make_assembly(job=iso), size=L("6 mm"), length=L("200 mm"),
                              thickness1=L("10 mm"), thickness2=L("12 mm"))
    us_weld = make.make_weld(size=L("1/4 in"), length=L("12 in"))
    client = client_as("inspector")
    cases = [(iso_weld, {"stage": "final", "min_size": "6"}), (iso_weld, {"stage": "final", "throat": "4"}),
             (us_weld, {"stage": "final", "min_size": "1/4", "undersize_length": "1"}),
             (us_weld, {"stage": "final", "min_size": "3/16"}), (us_weld, {"stage": "fit_up", "root_gap": "1/4"})]
    for weld, data in cases:
        html = client.post(reverse("inspections:inspect_preview", args=[weld.pk]), data).content.decode()
        text = re.sub(r"<[^>]+>", " ", html)
        assert not PROGRAM_WORDS.search(text), (data, PROGRAM_WORDS.search(text))
    inspection = make.make_inspection(iso_weld, throat=L("4.3 mm"))
    for url in (reverse("inspections:inspect_weld", args=[iso_weld.pk]), inspection.get_absolute_url(),
                reverse("inspections:inspect_assembly", args=[iso_weld.assembly_id]),
                reverse("inspections:weld_detail", args=[iso_weld.pk])):
        text = re.sub(r"<[^>]+>", " ", client.get(url).content.decode())
        text = re.sub(r"<script.*?</script>", " ", text, flags=re.S)
        assert not PROGRAM_WORDS.search(text), (url, PROGRAM_WORDS.search(text))
        assert "ISO 5817:2014 quality level C" in text


def test_an_iso_job_judges_the_leg_it_leads_with_and_shows_a_and_z(make, client_as):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("6 mm"), length=L("200 mm"),
                          thickness1=L("10 mm"), thickness2=L("12 mm"))
    client = client_as("inspector")
    html = client.post(reverse("inspections:inspect_preview", args=[weld.pk]),
                       {"stage": "final", "min_size": "6"}).content.decode()
    assert 'data-accepted="yes"' in html and "a = 4.24 mm" in html  # the leg read as its throat, judged
    page = client.get(reverse("inspections:inspect_weld", args=[weld.pk])).content.decode()
    assert "a4.24 z6" in page
    assert page.index('name="throat"') < page.index('name="min_size"')  # the throat a leads


def test_an_iso_weld_drawn_with_the_throat_only(make, client_as):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    assembly = make.make_assembly(job=job)
    response = client_as("welding_engineer").post(reverse("inspections:weld_create", args=[assembly.pk]), {
        "mark": "N1", "joint_type": "fillet", "throat": "4", "length": "200", "count": "1", "sides": "arrow",
        "thickness1": "10", "thickness2": "12", "position": "PB", "load_angle": "0"})
    assert response.status_code == 302, response.content.decode()[:2000]
    weld = assembly.welds.get()
    assert weld.throat == L("4 mm") and not weld.size_on_drawing and weld.nominal_throat == L("4 mm")
    snapshot = gather(assembly.pk)
    assert snapshot["welds"][0]["size"] == "a4" and snapshot["welds"][0]["symbol"]["size"] is None
    from inspections.traveler import symbol_svg

    assert ">a4<" in symbol_svg(snapshot["welds"][0], "SI", snapshot["convention"])


def test_a_fillet_under_the_cyclic_minimum_is_flagged_on_the_weld_form_and_tablet(make, client_as):
    """AWS D1.1/D1.1M:2020 clause 4 Part C (from memory): cyclically loaded fillet welds at least 3/16 in [5 mm]."""
    job = make.make_job(criteria_key="aws-d1.1-2020-cyclic")
    assembly = make.make_assembly(job=job)
    data = {"mark": "W1", "joint_type": "fillet", "size": "1/8", "length": "6", "count": "1", "sides": "arrow",
            "thickness1": "1/4", "thickness2": "3/8", "position": "F", "load_angle": "0"}
    client = client_as("welding_engineer")
    response = client.post(reverse("inspections:weld_create", args=[assembly.pk]), data, follow=True)
    assert "cyclically loaded job" in response.content.decode()
    small = assembly.welds.get()
    tablet = client_as("inspector").get(reverse("inspections:inspect_weld", args=[small.pk])).content.decode()
    assert "fillet welds are at least 3/16" in tablet
    assert job.loading == "cyclic" and make.make_job().loading == "static"
    other = make.make_assembly(job=job)
    ok = dict(data, mark="W2", size="3/16")
    page = client_as("welding_engineer").post(reverse("inspections:weld_create", args=[other.pk]), ok,
                                              follow=True).content.decode()
    assert "cyclically loaded job" not in page


def test_the_wps_review_reads_the_jobs_loading_where_a_job_is_known(make, client_as):
    wps = make.make_wps(state=WPSState.APPROVED, fillet_size_min=L("1/8 in"))
    cyclic = make.make_weld(assembly=make.make_assembly(job=make.make_job(criteria_key="aws-d1.1-2020-cyclic")),
                            wps=wps)
    static = make.make_weld(wps=wps)
    assert "cyclically loaded" in client_as("viewer").get(cyclic.get_absolute_url()).content.decode()
    assert "cyclically loaded" not in client_as("viewer").get(static.get_absolute_url()).content.decode()
    assert any(f.rule == "cyclic_fillet_size" for f in wps.findings(loading="cyclic"))
    assert not any(f.rule == "cyclic_fillet_size" for f in wps.findings())


# --- capacity says what it does not count -------------------------------------------------------------------

def test_an_ncr_for_a_cracked_weld_says_its_capacity_does_not_count_the_crack(make, client_as):
    ncr = make.make_ncr(make.make_inspection(min_size="1/4 in", crack=True))
    html = client_as("viewer").get(reverse("inspections:ncr_detail", args=[ncr.pk])).content.decode()
    assert "Not counted in this figure:" in html and "cracks found at this inspection" in html
    assert "does not count cracks, undercut, porosity" in html
    assert "Check the base metal (AISC 360-16 J4)" in html
    link = re.search(r'href="(/inspections/strength/\?[^"]+)"', html).group(1).replace("&amp;", "&")
    calculator = client_as("viewer").get(link)
    form = calculator.context["form"]  # prefilled with the weld; the plate's material is the engineer's to give
    assert form["leg"].value() == "0.25 in" and form["plate_thickness"].value() == "0.375 in"
    assert list(form.errors) == ["material"]


def test_the_base_metal_check_takes_the_welds_steel_when_the_weld_map_names_it(make, client_as):
    weld = make.make_weld(size=L("1/4 in"), base_metals="ASTM A572 Gr 50, ASTM A36")
    html = client_as("viewer").get(weld.get_absolute_url()).content.decode()
    link = re.search(r'href="(/inspections/strength/\?[^"]+)"', html).group(1).replace("&amp;", "&")
    calculator = client_as("viewer").get(link)
    assert calculator.context["form"].is_valid() and calculator.context["form"].cleaned_data["material"] == "A36"
    assert "Plate: shear yielding" in calculator.content.decode() or "Plate" in calculator.content.decode()


def test_an_undercut_ncr_card_names_the_undercut(make, client_as):
    weld = make.make_weld(thickness1=L("3/8 in"), thickness2=L("1/2 in"))
    ncr = make.make_ncr(make.make_inspection(weld, min_size="1/4 in", undercut_depth="1/16 in",
                                             undercut_length="3 in"))
    html = client_as("viewer").get(reverse("inspections:ncr_detail", args=[ncr.pk])).content.decode()
    assert "undercut found at this inspection" in html


def test_the_traveler_capacity_matches_the_calculation_sheet_when_the_electrode_is_unreadable(make):
    """One filler rule: the sheet assumes 70 ksi and says so; the traveler did not calculate at all."""
    from inspections.services.capacity import capacity_for_weld

    wps = make.make_wps(electrode="unreadable")  # a draft: its electrode is not checked until it is submitted
    assembly = make.make_assembly()
    weld = make.make_weld(assembly=assembly, wps=wps, required_strength=parse_force("10 kip"))
    row = gather(assembly.pk)["capacity"][0]
    weld.refresh_from_db()
    sheet = capacity_for_weld(type(weld).objects.select_related("assembly__job", "wps").get(pk=weld.pk))
    assert row["specified"] == sheet["results"][0]["main"]["lrfd"] and row["ratio"] == sheet["ratio"]
    assert "70 ksi assumed" in row["note"]


# --- paper, shop name and address --------------------------------------------------------------------------

def test_paper_follows_the_job_unless_the_shop_chooses(settings):
    settings.LEGWORK_PAPER_SIZE = ""
    assert paper_for("US") == "letter" and paper_for("SI") == "A4" and paper_for("US", "ISO 5817:2014") == "A4"
    settings.LEGWORK_PAPER_SIZE = "a4"
    assert paper_for("US") == "A4"
    settings.LEGWORK_PAPER_SIZE = "Letter"
    assert paper_for("SI") == "letter"


def test_an_si_traveler_prints_on_a4_a_us_one_on_letter_with_the_shops_name(make, users, settings):
    settings.LEGWORK_SHOP_NAME = "Brannock Steelworks"
    settings.LEGWORK_BASE_URL = "https://legwork.brannock.example"
    us = build_assembly(make, welds=1)
    iso_job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    si = make.make_assembly(job=iso_job)
    make.make_weld(assembly=si, size=L("6 mm"), length=L("200 mm"), thickness1=L("10 mm"), thickness2=L("12 mm"))
    us_pdf, si_pdf = (read_stored(issue(a, users["qa_lead"])[0]) for a in (us, si))
    assert _page_size(us_pdf) == (792, 612)  # Letter, landscape
    assert _page_size(si_pdf) == (842, 595)  # A4, landscape
    text = _text(si_pdf)
    assert "Brannock Steelworks" in text and "https://legwork.brannock.example/inspections/a/" in text.replace("\n", "")
    assert "a4.24 z6" in text


def test_the_readme_documents_the_shop_settings_and_the_demo_sets_them():
    readme = (ROOT / "README.md").read_text()
    for name in ("LEGWORK_SHOP_NAME", "LEGWORK_BASE_URL", "LEGWORK_PAPER_SIZE", "LEGWORK_INSPECTION_DUE_DAYS"):
        assert f"`{name}`" in readme, name
    dev = (ROOT / "dev.sh").read_text()
    assert "LEGWORK_SHOP_NAME=" in dev and "LEGWORK_BASE_URL=" in dev


def test_the_inspection_save_path_answers_in_a_fixed_number_of_queries_for_a_pass(make, users,
                                                                                   django_assert_num_queries):
    """A pass over identical welds: one judgement, then the same steps per weld (so n welds cost n times)."""
    from inspections.models import Weld
    from inspections.services.inspect import sign_batch

    def pass_of(n):
        assembly = make.make_assembly()
        welds = [make.make_weld(assembly=assembly, mark=f"W{i}") for i in range(n)]
        return list(Weld.objects.select_related("assembly__job__client_criteria").filter(pk__in=[w.pk for w in welds])
                    .order_by("mark"))

    from django.apps import apps
    from django.contrib.contenttypes.models import ContentType

    ContentType.objects.get_for_models(*apps.get_models())
    two, three = pass_of(2), pass_of(3)
    with django_assert_num_queries(PASS_OF_TWO):
        sign_batch(two, {"min_size": L("1/4 in")}, "final", users["inspector"])
    with django_assert_num_queries(PASS_OF_TWO + PER_WELD):
        sign_batch(three, {"min_size": L("1/4 in")}, "final", users["inspector"])


# the inspector's current credential; lock the record chain and the welds, read the state, each weld's latest fit-up;
# per weld: insert with its history row and seal, point the weld at it, close its NCRs (none); then the assembly's
# state (refresh, its move to awaiting inspection with its history row), savepoints. Measured: 38 for two welds, 42
# for three; 33 and 37 since the refresh joins the signing's transaction and reads the state with the facts, and
# SQLite takes no row locks (3 queries on PostgreSQL: the chain, the welds, the assembly).
PASS_OF_TWO = 33 + (3 if connection.features.has_select_for_update else 0)
PER_WELD = 4


def test_the_inspection_report_prints_the_tables_words_on_the_jobs_paper(make, client_as):
    job = make.make_job(unit_system="SI", criteria_key="iso-5817-2014-C")
    weld = make.make_weld(assembly=make.make_assembly(job=job), size=L("6 mm"), length=L("200 mm"),
                          thickness1=L("10 mm"), thickness2=L("12 mm"))
    inspection = make.make_inspection(weld, throat=L("4 mm"), throat_short_length=L("10 mm"), spatter=True)
    make.make_photo(inspection)
    response = client_as("viewer").get(reverse("inspections:inspection_pdf", args=[inspection.pk]))
    assert response.status_code == 200 and response["Content-Type"] == "application/pdf"
    text = _text(response.content)
    assert "Smallest throat measured (a) 4 mm" in text and "Spatter seen" in text
    assert "a4.24 z6" in text and "≤" in text and "<=" not in text
    assert not PROGRAM_WORDS.search(text)
    assert _page_size(response.content) == (595, 842)  # A4 portrait on an ISO job
