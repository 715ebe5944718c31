"""Each role's morning page and the trends page in real headless Chromium at 768 px and 1280 px: nothing wider
than the window (no horizontal scroll), every chart drawn inside its box. Screenshots go to the test's temporary
folder, or to LEGWORK_SCREENSHOTS when set, to be looked at."""

import os
from pathlib import Path

import pytest
from selenium.webdriver.common.by import By
from selenium.webdriver.support import expected_conditions as ec
from selenium.webdriver.support.ui import WebDriverWait

from procedures.models.wps import WPSState

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]

ROLES = ("qa_lead", "inspector", "welding_engineer", "viewer")


@pytest.fixture
def shop(make):
    """Enough of a shop for every section to show something, with long names that could push a page wide."""
    users = {role: make.make_user(role) for role in ROLES}
    make.make_customer(viewers=[users["viewer"]])
    welder = make.make_qualified_welder(name="Bartholomew Featherstonehaugh-Wolstenholme")
    job = make.make_job(name="Harlan Transit Garage, level 2 framing, east stair core and the elevator machine room")
    for n in range(3):
        assembly = make.make_assembly(job, description="W18x35 beam with shear tabs both ends")
        make.make_sound_weld(assembly, welders=[welder])
        make.make_inspection(make.make_sound_weld(assembly, welders=[welder]), accepted=n != 1)
    make.make_wps(state=WPSState.SUBMITTED, title="FCAW fillet welds, structural shapes, all positions, A992 and A572")
    make.make_wps()
    return users


def _sign_in(browser, live_server, user, password):
    browser.delete_all_cookies()
    browser.get(f"{live_server.url}/accounts/login/")
    browser.find_element(By.NAME, "username").send_keys(user.username)
    browser.find_element(By.NAME, "password").send_keys(password)
    browser.find_element(By.CSS_SELECTOR, "form [type=submit]").click()
    WebDriverWait(browser, 10).until(ec.url_to_be(f"{live_server.url}/"))


def _no_overflow(browser, name, folder):
    browser.save_screenshot(str(folder / f"{name}.png"))
    widths = browser.execute_script(
        "return [document.documentElement.scrollWidth, document.documentElement.clientWidth]")
    assert widths[0] <= widths[1], f"{name}: the page is {widths[0]} px wide in a {widths[1]} px window"
    wide = browser.execute_script(
        "const w = document.documentElement.clientWidth;"
        "return [...document.querySelectorAll('main *')].filter(e => e.getBoundingClientRect().right > w + 1)"
        ".map(e => e.tagName + ' ' + (e.textContent || '').slice(0, 40)).slice(0, 5)")
    assert not wide, f"{name}: elements past the right edge: {wide}"


@pytest.fixture
def folder(tmp_path):
    keep = os.environ.get("LEGWORK_SCREENSHOTS")
    return Path(keep) if keep else tmp_path


@pytest.mark.parametrize("width", [768, 1280])
def test_morning_pages_and_trends_fit_the_window(width, browser, live_server, make, shop, folder):
    folder.mkdir(parents=True, exist_ok=True)
    browser.set_window_size(width, 1100)
    for role in ROLES:
        _sign_in(browser, live_server, shop[role], make.password)
        browser.find_element(By.CSS_SELECTOR, ".lw-today-section")
        _no_overflow(browser, f"home-{role}-{width}", folder)
    _sign_in(browser, live_server, shop["qa_lead"], make.password)
    browser.get(f"{live_server.url}/inspections/trends/")
    charts = browser.find_elements(By.CSS_SELECTOR, "svg.lw-chart")
    assert len(charts) == 7
    for chart in charts:
        box = chart.rect
        assert box["x"] + box["width"] <= width, "a chart runs past the window"
    _no_overflow(browser, f"trends-qa_lead-{width}", folder)
