"""Debian's headless Chromium driven by Selenium against pytest-django's live_server (loopback only).

The tests skip, saying why, only when /usr/bin/chromium is absent; `./dev.sh test` installs it, so CI runs them.
"""

import os
import shutil
import tempfile
from pathlib import Path

import pytest

CHROMIUM = Path("/usr/bin/chromium")
CHROMEDRIVER = Path("/usr/bin/chromedriver")


@pytest.fixture(scope="module")
def browser():
    if not CHROMIUM.exists() or not CHROMEDRIVER.exists():
        pytest.skip("Debian's chromium and chromium-driver are not installed (/usr/bin/chromium, "
                    "/usr/bin/chromedriver): apt-get install chromium chromium-driver, or run ./dev.sh test")
    from selenium import webdriver
    from selenium.webdriver.chrome.service import Service

    profile = tempfile.mkdtemp(prefix="legwork-chromium-")
    options = webdriver.ChromeOptions()
    options.binary_location = str(CHROMIUM)
    for arg in ("--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage",
                "--disable-background-networking", "--disable-component-update", "--disable-sync",
                "--no-first-run", f"--user-data-dir={profile}"):
        options.add_argument(arg)
    driver = webdriver.Chrome(service=Service(str(CHROMEDRIVER)), options=options)
    driver.set_page_load_timeout(30)
    try:
        yield driver
    finally:
        # Quit while this module's live server requests are still the current ones: Chrome's idle keep-alive
        # sockets closing later would make the server threads close a database connection from a later test.
        driver.get("about:blank")
        driver.quit()
        shutil.rmtree(profile, ignore_errors=True)


@pytest.fixture
def media_root(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"
    os.makedirs(settings.MEDIA_ROOT, exist_ok=True)
    return settings.MEDIA_ROOT
