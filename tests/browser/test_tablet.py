"""The tablet flow in real headless Chromium: find the assembly, tap a weld, type a rejecting leg, watch the
undersize criterion turn red, take a photo before signing (held, then attached), sign, attach another photo from
the 'camera', see the NCR, go on to the next weld. At 768 px and 1280 px."""

import pytest
from selenium.webdriver.common.by import By
from selenium.webdriver.support import expected_conditions as ec
from selenium.webdriver.support.ui import WebDriverWait

from inspections.models import NCR, Inspection, Photo
from tests.factory import L, png_bytes

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def _tap(browser, element):
    """Scroll at once (Bootstrap asks for smooth scrolling, which moves the target while Selenium clicks), tap."""
    browser.execute_script("arguments[0].scrollIntoView({block: 'center', behavior: 'instant'})", element)
    element.click()


def _sign_in(browser, live_server, user, password):
    browser.get(f"{live_server.url}/accounts/login/")
    browser.find_element(By.NAME, "username").send_keys(user.username)
    browser.find_element(By.NAME, "password").send_keys(password)
    browser.find_element(By.CSS_SELECTOR, "form [type=submit]").click()
    WebDriverWait(browser, 10).until(ec.url_to_be(f"{live_server.url}/"))


@pytest.mark.parametrize("width", [768, 1280])
def test_an_inspector_rejects_an_undersize_fillet_and_sees_the_ncr(width, browser, live_server, make, media_root,
                                                                    tmp_path):
    inspector = make.make_user("inspector", first_name="Dana", last_name="Ruiz")
    job = make.make_job(unit_system="US", criteria_key="aws-d1.1-2020-static")
    assembly = make.make_assembly(job=job, piece_mark=f"B7{width}")
    make.make_weld(assembly=assembly, mark="W1", size=L("1/4 in"), length=L("12 in"))
    w2 = make.make_weld(assembly=assembly, mark="W2", size=L("5/16 in"), length=L("6 in"))
    browser.delete_all_cookies()
    browser.set_window_size(width, 1000)
    wait = WebDriverWait(browser, 10)
    _sign_in(browser, live_server, inspector, make.password)

    # Find the assembly by its piece mark: one match goes straight to it.
    browser.get(f"{live_server.url}/inspections/inspect/")
    browser.find_element(By.NAME, "q").send_keys(assembly.piece_mark.lower())
    browser.find_element(By.CSS_SELECTOR, ".lw-find button[type=submit]").click()
    wait.until(ec.url_contains(f"/inspections/a/{assembly.pk}/"))
    _tap(browser, browser.find_element(By.CSS_SELECTOR, "[data-weld='W1']"))

    # A fraction goes in as typed; the undersize criterion turns red without saving anything.
    leg = wait.until(ec.element_to_be_clickable((By.NAME, "min_size")))
    assert leg.get_attribute("inputmode") == "text"
    leg.send_keys("1/8")
    failing = wait.until(ec.visibility_of_element_located(
        (By.CSS_SELECTOR, "#lw-findings .lw-finding-fail[data-criterion='undersize']")))
    assert failing.value_of_css_property("border-left-color") == "rgba(179, 38, 30, 1)"  # --lw-fail
    assert "Rejected" in browser.find_element(By.CSS_SELECTOR, "#lw-findings .lw-verdict").text
    assert Inspection.objects.count() == 0

    # A photo before signing: held with the draft (nothing signed), shown as a thumbnail.
    before = tmp_path / "toe.png"
    before.write_bytes(png_bytes((80, 60)))
    browser.find_element(By.ID, "id_photo_caption").send_keys("north toe")
    browser.find_element(By.CSS_SELECTOR, "#lw-inspect-form input[name=photo]").send_keys(str(before))
    held = wait.until(ec.visibility_of_element_located((By.CSS_SELECTOR, "#lw-held .lw-held-photo img")))
    wait.until(lambda d: d.execute_script("return arguments[0].complete && arguments[0].naturalWidth > 0", held))
    assert Inspection.objects.count() == 0 and Photo.objects.count() == 0
    browser.save_screenshot(str(tmp_path / f"form-{width}.png"))

    # Sign: the inspection page shows the verdict, the photo taken before, and the NCR it opened.
    _tap(browser, browser.find_element(By.CSS_SELECTOR, "button.lw-sign"))
    ncr_link = wait.until(ec.visibility_of_element_located((By.CSS_SELECTOR, ".lw-ncr-box a")))
    inspection = Inspection.objects.get()
    ncr = NCR.objects.get()
    assert not inspection.accepted and ncr.inspection == inspection
    assert [p.caption for p in inspection.photos.all()] == ["north toe"]
    ncr_text = ncr_link.text
    assert ncr.number in ncr_text

    # A photo straight from the camera input.
    photo = tmp_path / "weld.png"
    photo.write_bytes(png_bytes((64, 48)))
    file_input = browser.find_element(By.CSS_SELECTOR, ".lw-photo-form input[type=file]")
    assert file_input.get_attribute("capture") == "environment"
    file_input.send_keys(str(photo))
    _tap(browser, browser.find_element(By.CSS_SELECTOR, ".lw-photo-form button[type=submit]"))
    # two thumbnails now: the one taken before signing and this one (wait for the second, not the first)
    wait.until(lambda d: len(d.find_elements(By.CSS_SELECTOR, "#photos .lw-photo img")) == 2)
    thumb = browser.find_elements(By.CSS_SELECTOR, "#photos .lw-photo img")[-1]
    wait.until(lambda d: d.execute_script("return arguments[0].complete && arguments[0].naturalWidth > 0", thumb))
    assert Photo.objects.filter(inspection=inspection).count() == 2
    assert browser.find_element(By.CSS_SELECTOR, ".lw-ncr-box a").text == ncr_text

    # Next weld: straight to W2's form.
    _tap(browser, browser.find_element(By.CSS_SELECTOR, "[data-next='W2']"))
    wait.until(ec.url_contains(f"/inspections/inspect/weld/{w2.pk}/"))

    # Back on the assembly, the weld card says why it holds the assembly.
    browser.get(f"{live_server.url}/inspections/a/{assembly.pk}/")
    assert "Open NCR" in browser.find_element(By.CSS_SELECTOR, "[data-weld='W1']").text
