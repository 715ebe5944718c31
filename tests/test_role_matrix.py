"""Every URL, every role, and an anonymous visitor: the expected status for a GET.

PAGES must name every URL pattern the project has; a page added without a row here fails
test_every_url_is_in_the_matrix, so the matrix keeps up as pages are added.
"""

import importlib
import re
from pathlib import Path

import pytest
from django.urls import URLPattern, URLResolver, get_resolver, reverse

from tests.conftest import ROLES

OK, LOGIN, DENIED, GONE, GONE_404 = 200, 302, 403, 405, 404
ALL_OK = {role: OK for role in ROLES}


def only(*roles, other=DENIED):
    return {role: (OK if role in roles else other) for role in ROLES}


# name -> (kwargs builder from the factory, {role: status}). Anonymous always redirects to login.
PAGES = {
    "home": (lambda make: {}, ALL_OK),
    "login": (lambda make: {}, ALL_OK),
    "lockouts": (lambda make: make.make_signin_pause() and {}, only("qa_lead")),
}

# Patterns that a GET cannot reach as a page: POST-only actions, admin, logout. Name -> kwargs builder.
NOT_PAGES = {
    "logout": lambda make: {},
}

# Each area keeps its rows in tests/pages_<area>.py (PAGES and NOT_PAGES dicts of the same shape),
# so that people adding pages in different areas do not edit one file.
for _module in sorted(Path(__file__).parent.glob("pages_*.py")):
    _area = importlib.import_module(f"tests.{_module.stem}")
    PAGES.update(getattr(_area, "PAGES", {}))
    NOT_PAGES.update(getattr(_area, "NOT_PAGES", {}))


def _names(resolver=None, namespace=""):
    resolver = resolver or get_resolver()
    for entry in resolver.url_patterns:
        if isinstance(entry, URLResolver):
            if entry.namespace == "admin" or getattr(entry, "app_name", None) == "admin":
                continue
            ns = f"{namespace}{entry.namespace}:" if entry.namespace else namespace
            yield from _names(entry, ns)
        elif isinstance(entry, URLPattern) and entry.name:
            yield f"{namespace}{entry.name}"


def test_every_url_is_in_the_matrix():
    missing = sorted(set(_names()) - set(PAGES) - set(NOT_PAGES))
    assert not missing, f"add these URL names to tests/test_role_matrix.py PAGES or NOT_PAGES: {missing}"


@pytest.mark.parametrize("name", sorted(PAGES))
@pytest.mark.parametrize("role", [None, *ROLES])
def test_page_answers_each_role_as_expected(name, role, client_as, make):
    build, expected = PAGES[name]
    url = reverse(name, kwargs=build(make))
    response = client_as(role).get(url)
    if role is None:
        want = OK if name == "login" else LOGIN
        assert response.status_code == want, f"anonymous GET {url}"
        if want == LOGIN:
            assert response.url.startswith(reverse("login"))
    else:
        assert response.status_code == expected[role], f"{role} GET {url}"
        if response.status_code == OK and response.get("Content-Type", "").startswith("text/html"):
            title = re.search(r"<title>(.*?)</title>", response.content.decode(), re.S)
            assert title is None or "<" not in title.group(1), f"{url}: markup inside the page title"


@pytest.mark.parametrize("name", sorted(NOT_PAGES))
def test_action_urls_refuse_get(name, client_as, make):
    response = client_as("qa_lead").get(reverse(name, kwargs=NOT_PAGES[name](make)))
    assert response.status_code == GONE


# --- POST: every URL, every role, generated from the URL configuration ----------------------------------------

def _callbacks(resolver=None, namespace=""):
    resolver = resolver or get_resolver()
    for entry in resolver.url_patterns:
        if isinstance(entry, URLResolver):
            if entry.namespace == "admin":
                continue
            yield from _callbacks(entry, f"{namespace}{entry.namespace}:" if entry.namespace else namespace)
        elif isinstance(entry, URLPattern) and entry.name:
            yield f"{namespace}{entry.name}", entry.callback


ACTIONS_OF = {name: getattr(callback, "legwork_actions", ()) for name, callback in _callbacks()}
# Views anyone signed in may post to (no role action): signing in and out.
OPEN_POSTS = {"login", "logout"}


def _rows():
    from django.apps import apps

    return {model._meta.label: model._base_manager.count() for model in apps.get_models()
            if model._meta.app_label in ("core", "procedures", "inspections")}


@pytest.mark.parametrize("name", sorted(set(PAGES) | set(NOT_PAGES)))
@pytest.mark.parametrize("role", [None, *ROLES])
def test_post_answers_each_role_as_expected(name, role, client_as, make, users):
    """A POST (empty: the least a crafted request can send) from a role the URL's action does not allow is 403
    and changes nothing; an allowed role is never refused for its role; a page no role acts on refuses POST."""
    build = PAGES[name][0] if name in PAGES else NOT_PAGES[name]
    url = reverse(name, kwargs=build(make))
    client = client_as(role)
    before = _rows()
    response = client.post(url, {})
    actions = ACTIONS_OF[name]
    if role is None:
        assert response.status_code in ((200, 302) if name in OPEN_POSTS else (302,)), f"anonymous POST {url}"
        if name not in OPEN_POSTS:
            assert response.url.startswith(reverse("login"))
            assert _rows() == before
        return
    from core.roles import can

    user = users[role]
    if name in OPEN_POSTS:
        assert response.status_code in (200, 302)
    elif not actions:
        assert response.status_code == GONE, f"{role} POST {url}: a read-only page must refuse POST"
        assert _rows() == before
    elif any(can(user, action) for action in actions):
        assert response.status_code not in (403, 500), f"{role} may {actions} but POST {url} answered " \
                                                       f"{response.status_code}"
    else:
        assert response.status_code in (403, GONE), f"{role} may not {actions}: POST {url}"
        assert _rows() == before, f"{role} POST {url} changed records"


def test_every_state_changing_url_names_its_action():
    """A URL that accepts POST and changes records names the role action it needs (core.roles.role_required)."""
    unnamed = sorted(name for name, actions in ACTIONS_OF.items() if not actions and name not in OPEN_POSTS
                     and name in NOT_PAGES)
    assert not unnamed, f"POST-only URLs without a role action: {unnamed}"


# --- a second customer: its records are not found by the first customer's viewer ------------------------------

def reverse_kwargs_needed(name):
    """Whether the URL names a record (it takes arguments)."""
    return bool(dict(_patterns()).get(name).pattern.converters)


def _patterns(resolver=None, namespace=""):
    resolver = resolver or get_resolver()
    for entry in resolver.url_patterns:
        if isinstance(entry, URLResolver):
            if entry.namespace == "admin":
                continue
            yield from _patterns(entry, f"{namespace}{entry.namespace}:" if entry.namespace else namespace)
        elif isinstance(entry, URLPattern) and entry.name:
            yield f"{namespace}{entry.name}", entry


OTHER_CUSTOMER = "Ostrander Mill Services"
# The published criteria sets belong to no customer; a trends chart's name is no record (its figures are the
# viewer's customers' own: tests/test_trends.py).
PUBLIC = {"inspections:criteria_detail", "inspections:trends_csv"}


@pytest.mark.parametrize("name", sorted(n for n in PAGES if n not in PUBLIC and reverse_kwargs_needed(n)))
def test_the_viewer_of_one_customer_does_not_find_another_customers_records(name, client_as, make, users):
    """Every page of a record, its record made for a second customer: the first customer's viewer gets 404 where
    it would read its own customer's record, and every shop role answers as in the matrix above."""
    make.customer_name = OTHER_CUSTOMER
    build, expected = PAGES[name]
    url = reverse(name, kwargs=build(make))
    for role in ROLES:
        want = GONE_404 if role == "viewer" and expected[role] == OK else expected[role]
        assert client_as(role).get(url).status_code == want, f"{role} GET {url} (a record of {OTHER_CUSTOMER})"


def test_a_viewer_of_both_customers_reads_both(client_as, make, users):
    make.customer_name = OTHER_CUSTOMER
    make.make_customer(viewers=[users["viewer"]])
    build, _ = PAGES["inspections:ncr_detail"]
    assert client_as("viewer").get(reverse("inspections:ncr_detail", kwargs=build(make))).status_code == OK
