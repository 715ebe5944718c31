"""Tablets shared by a crew: a sign-in lasts a shift, pages are not kept by the browser, the page may use the camera
and nothing else, and a proxy's headers are believed only when Legwork is told it sits behind one. Every setting
read from the environment is in the README's deployment table."""

import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
from django.urls import reverse

ROOT = Path(__file__).resolve().parent.parent
PRODUCTION = {"LEGWORK_DEBUG": "0", "LEGWORK_SECRET_KEY": "x" * 60, "LEGWORK_ALLOWED_HOSTS": "legwork.shop.example"}


def _settings(names, **env):
    """The named settings as a fresh process reads them from the environment."""
    code = ("import django, json; django.setup(); from django.conf import settings; "
            f"print(json.dumps({{n: getattr(settings, n) for n in {names!r}}}, default=str))")
    clean = {k: v for k, v in os.environ.items() if not k.startswith("LEGWORK_")}
    result = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True,
                            env={**clean, "DJANGO_SETTINGS_MODULE": "legwork.settings", "PYTHONPATH": str(ROOT),
                                 "LEGWORK_VAR_DIR": os.environ.get("LEGWORK_VAR_DIR", str(ROOT / "var")), **env})
    return json.loads(result.stdout.strip().splitlines()[-1])


def test_in_production_the_proxy_header_is_believed_only_when_told():
    names = ["SECURE_PROXY_SSL_HEADER", "LEGWORK_BEHIND_PROXY"]
    assert _settings(names, **PRODUCTION) == {"SECURE_PROXY_SSL_HEADER": None, "LEGWORK_BEHIND_PROXY": False}
    behind = _settings(names, **PRODUCTION, LEGWORK_BEHIND_PROXY="1")
    assert behind == {"SECURE_PROXY_SSL_HEADER": ["HTTP_X_FORWARDED_PROTO", "https"], "LEGWORK_BEHIND_PROXY": True}


def test_a_sign_in_lasts_a_shift_unless_told_otherwise():
    names = ["SESSION_COOKIE_AGE", "SESSION_EXPIRE_AT_BROWSER_CLOSE"]
    assert _settings(names, **PRODUCTION) == {"SESSION_COOKIE_AGE": 12 * 3600, "SESSION_EXPIRE_AT_BROWSER_CLOSE": False}
    assert _settings(names, **PRODUCTION, LEGWORK_SESSION_HOURS="8", LEGWORK_SESSION_AT_BROWSER_CLOSE="1") == {
        "SESSION_COOKIE_AGE": 8 * 3600, "SESSION_EXPIRE_AT_BROWSER_CLOSE": True}


def test_an_unclaimed_https_header_does_not_make_a_request_secure(client_as, settings):
    settings.SECURE_SSL_REDIRECT = True
    settings.SECURE_PROXY_SSL_HEADER = None
    response = client_as("inspector").get(reverse("home"), HTTP_X_FORWARDED_PROTO="https")
    assert response.status_code == 301 and response.url.startswith("https://")
    settings.SECURE_PROXY_SSL_HEADER = ("HTTP_X_FORWARDED_PROTO", "https")
    assert client_as("inspector").get(reverse("home"), HTTP_X_FORWARDED_PROTO="https").status_code == 200


def _sign_in(client, make, **extra):
    user = make.make_user("inspector", username="rosa")
    return client.post(reverse("login"), {"username": user.username, "password": make.password}, **extra)


def test_the_session_cookie_lasts_the_configured_shift(client, make, settings):
    settings.SESSION_COOKIE_AGE = 12 * 3600
    response = _sign_in(client, make)
    assert response.status_code == 302
    assert response.cookies[settings.SESSION_COOKIE_NAME]["max-age"] == 12 * 3600


def test_the_session_can_end_when_the_browser_closes(client, make, settings):
    settings.SESSION_EXPIRE_AT_BROWSER_CLOSE = True
    cookie = _sign_in(client, make).cookies[settings.SESSION_COOKIE_NAME]
    assert cookie.value and not cookie["max-age"] and not cookie["expires"]


@pytest.mark.parametrize("name, args", [("home", []), ("inspections:job_list", []), ("procedures:wps_list", [])])
def test_signed_in_pages_are_not_stored_and_may_use_only_the_camera(name, args, client_as):
    response = client_as("inspector").get(reverse(name, args=args))
    assert response["Cache-Control"] == "no-store"
    policy = dict(part.strip().split("=", 1) for part in response["Permissions-Policy"].split(","))
    assert policy.pop("camera") == "(self)"
    assert policy and set(policy.values()) == {"()"}
    assert {"microphone", "geolocation", "payment", "usb"} <= set(policy)


def test_files_sent_to_a_signed_in_user_are_not_stored_either(client_as, make):
    photo = make.make_photo()
    assert client_as("inspector").get(reverse("inspections:photo_file", args=[photo.pk]))["Cache-Control"] == \
        "no-store"


def test_every_setting_from_the_environment_is_in_the_readme_table():
    source = (ROOT / "legwork" / "settings.py").read_text()
    names = set(re.findall(r'env_(?:str|bool|int|list)\(\s*"([A-Z_]+)"', source))
    assert {"LEGWORK_BEHIND_PROXY", "LEGWORK_SESSION_HOURS", "LEGWORK_BASE_URL", "LEGWORK_SHOP_NAME"} <= names
    table = "\n".join(line for line in (ROOT / "README.md").read_text().splitlines() if line.startswith("| "))
    missing = sorted(name for name in names if f"`{name}" not in table)
    assert not missing, f"add these settings to the README's deployment table: {missing}"
