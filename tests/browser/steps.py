"""Steps the tablet browser tests share: sign in, tap, wait for the live panel to settle."""

from selenium.webdriver.common.by import By
from selenium.webdriver.support import expected_conditions as ec
from selenium.webdriver.support.ui import WebDriverWait


def tap(browser, element):
    """Scroll at once (Bootstrap asks for smooth scrolling, which moves the target while Selenium clicks), tap."""
    browser.execute_script("arguments[0].scrollIntoView({block: 'center', behavior: 'instant'})", element)
    element.click()


def sign_in(browser, live_server, user, password, width=768):
    browser.delete_all_cookies()
    browser.set_window_size(width, 1000)
    browser.get(f"{live_server.url}/accounts/login/")
    browser.find_element(By.NAME, "username").send_keys(user.username)
    browser.find_element(By.NAME, "password").send_keys(password)
    browser.find_element(By.CSS_SELECTOR, "form [type=submit]").click()
    WebDriverWait(browser, 10).until(ec.url_to_be(f"{live_server.url}/"))


SETTLED = """
const form = document.getElementById('lw-inspect-form');
const verdict = document.querySelector('#lw-findings .lw-verdict');
const shown = document.getElementById('lw-shown');
return !form.classList.contains('htmx-request') && !!verdict && !!shown
       && verdict.dataset.digest === shown.value && shown.value !== '';
"""


def panel(browser, timeout=10):
    """Wait until the live panel has answered the last change and the sign button carries its fingerprint; then
    (accepted, {criterion: pass/fail}, digest)."""
    wait = WebDriverWait(browser, timeout)
    # htmx waits 250 ms after the last keystroke before it asks: let any pending request start first.
    browser.execute_script("return new Promise(r => setTimeout(r, 400))")
    wait.until(lambda d: d.execute_script(SETTLED))
    verdict = browser.find_element(By.CSS_SELECTOR, "#lw-findings .lw-verdict")
    results = {li.get_attribute("data-criterion"): li.get_attribute("data-result")
               for li in browser.find_elements(By.CSS_SELECTOR, "#lw-findings .lw-finding")}
    return verdict.get_attribute("data-accepted") == "yes", results, verdict.get_attribute("data-digest")


def sign_label(browser) -> str:
    return browser.find_element(By.ID, "lw-sign-verdict").text.strip(": ").strip()
