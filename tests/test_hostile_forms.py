"""Every form the URL configuration exposes, posted with hostile values field by field: never a server error,
and no change to records the form has nothing to do with.

Nothing here lists a form by hand. For every URL pattern (the role matrix keeps a way to build each one's
arguments, and fails when a URL has none), the test finds the page that shows a form aimed at that URL, reads
the form's fields from the HTML (inputs, selects, text areas, hx-post/hx-get targets and their query strings)
as a role allowed to use it (the view's `legwork_actions`, set by @role_required). Hypothesis then sends the
form as the page would, with some of its fields (one, once shrunk) replaced by values from tests/hostile.py or
generated text. A form added tomorrow is walked the day it appears on a page; a URL that accepts POST with no
page aiming a form at it fails.

Each example runs in a savepoint that is rolled back, so the next one starts from the same records. A bystander
job (with a weld, an inspection, an NCR, a photo, a traveler and a packet) must come through every example
unchanged.
"""

from html.parser import HTMLParser
from urllib.parse import parse_qsl, urljoin, urlsplit

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.db import transaction
from django.urls import reverse
from hypothesis import given, settings
from hypothesis import strategies as st

from core.roles import can
from tests.conftest import ROLES
from tests.hostile import HOSTILE
from tests.test_role_matrix import ACTIONS_OF, NOT_PAGES, OPEN_POSTS, PAGES

EXAMPLES = 25  # per form; about 30 forms, so the walk adds well under a minute to the suite
SKIP_FIELDS = {"csrfmiddlewaretoken"}
FILES = ("pdf", "pdf/", ".csv", ".sha256")  # routes that answer with a file, never a page with a form


# --- reading forms from HTML ---------------------------------------------------------------------------------

class _Forms(HTMLParser):
    """Each <form>: its targets (method, url) and fields [(name, kind, value, options)] as a browser sends them."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.forms, self._form, self._select, self._textarea = [], None, None, None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "form":
            targets = [((a.get("method") or "get").lower(), a.get("action") or "")]
            for verb in ("post", "get"):
                if a.get(f"hx-{verb}"):
                    targets.append((verb, a[f"hx-{verb}"]))
            self._form = {"targets": targets, "fields": [], "multipart": "multipart" in (a.get("enctype") or "")}
            self.forms.append(self._form)
            return
        if self._form is not None and tag in ("button", "input"):  # a button that posts its form elsewhere
            for attr in ("formaction", "hx-post"):
                if a.get(attr) and ("post", a[attr]) not in self._form["targets"]:
                    self._form["targets"].append(("post", a[attr]))
        if self._form is None or "name" not in a or "disabled" in a:
            return
        name = a["name"]
        if tag == "input":
            kind = (a.get("type") or "text").lower()
            if kind in ("checkbox", "radio"):
                self._form["fields"].append((name, kind, a.get("value", "on"), "checked" in a))
            elif kind in ("submit", "button", "image", "reset"):
                return
            else:
                self._form["fields"].append((name, kind, a.get("value", ""), True))
        elif tag == "select":
            self._select = [name, "multiple" in a, []]
        elif tag == "option" and self._select is not None:
            self._select[2].append((a.get("value", ""), "selected" in a))
        elif tag == "textarea":
            self._textarea = [name, ""]

    def handle_data(self, data):
        if self._textarea is not None:
            self._textarea[1] += data

    def handle_endtag(self, tag):
        if tag == "form":
            self._form = None
        elif tag == "select" and self._select is not None and self._form is not None:
            name, multiple, options = self._select
            chosen = [v for v, selected in options if selected] or ([] if multiple else [options[0][0]] if options
                                                                      else [])
            for value in chosen:
                self._form["fields"].append((name, "select", value, True))
            self._select = None
        elif tag == "textarea" and self._textarea is not None and self._form is not None:
            self._form["fields"].append((self._textarea[0], "textarea", self._textarea[1].lstrip("\n"), True))
            self._textarea = None


def forms_aimed_at(html, page_url, target_path):
    """[(method, query fields, fields, multipart)] of the forms in the page that send to target_path."""
    parser = _Forms()
    parser.feed(html)
    found = []
    for form in parser.forms:
        for method, action in form["targets"]:
            url = urlsplit(urljoin(page_url, action))
            if url.path == target_path:
                query = [(k, v) for k, v in parse_qsl(url.query, keep_blank_values=True)]
                found.append((method, query, form["fields"], form["multipart"]))
    return found


# --- finding each URL's form ---------------------------------------------------------------------------------

def _patterns(resolver=None, namespace=""):
    from django.urls import URLPattern, URLResolver, get_resolver

    resolver = resolver or get_resolver()
    for entry in resolver.url_patterns:
        if isinstance(entry, URLResolver):
            if entry.namespace == "admin":
                continue
            yield from _patterns(entry, f"{namespace}{entry.namespace}:" if entry.namespace else namespace)
        elif isinstance(entry, URLPattern) and entry.name:
            yield f"{namespace}{entry.name}", entry


PATTERNS = dict(_patterns())


def _build(name, make):
    build = PAGES[name][0] if name in PAGES else NOT_PAGES[name]
    return build(make)


def _roles_for(name, users):
    """Who may use the URL: the roles its actions allow; anyone signed in for a page without an action."""
    if name in OPEN_POSTS:
        return [None] if name == "login" else ["qa_lead"]
    actions = ACTIONS_OF[name]
    if not actions:
        return ["qa_lead", "welding_engineer", "inspector", "viewer"]
    return [role for role in ROLES if any(can(users[role], action) for action in actions)]


def _candidates(name, kwargs):
    """Pages that may show the URL's form: itself first, then the pages taking the same arguments, nearest route
    first (assemblies/<pk>/submit/ is a button on assemblies/<pk>/). PDFs and CSV files show no forms."""
    route = str(PATTERNS[name].pattern)

    def shared(other):
        other_route, n = str(PATTERNS[other].pattern), 0
        while n < min(len(route), len(other_route)) and route[n] == other_route[n]:
            n += 1
        return n

    others = [p for p in PAGES if p != name and set(PATTERNS[p].pattern.converters) <= set(kwargs)
              and not str(PATTERNS[p].pattern).endswith(FILES)]
    return ([name] if name in PAGES else []) + sorted(others, key=lambda p: (-shared(p), p))


def _serves_a_file(name, make, users, client_as):
    """The URL answers a GET, as a role that may use it, with a file rather than a page."""
    if name not in PAGES:
        return False
    url = reverse(name, kwargs=_build(name, make))
    for role in _roles_for(name, users):
        response = client_as(role).get(url)
        if response.status_code == 200:
            return "html" not in response.get("Content-Type", "")
    return False


def find_form(name, make, users, client_as):
    """(role, url, method, query, fields) of the first form found aimed at the URL, or None.

    A URL that accepts POST is looked for on the pages around it, as each role that may use it; a page that only
    reads has its own search or filter form, if any (a PDF, a CSV or a file has none and is not fetched)."""
    kwargs = _build(name, make)
    target = reverse(name, kwargs=kwargs)
    if name in POST_URLS:
        roles, pages = _roles_for(name, users), _candidates(name, kwargs)
    elif str(PATTERNS[name].pattern).endswith(FILES):
        return None
    else:
        roles, pages = _roles_for(name, users)[:1], [name]
    for role in roles:
        for page in pages:
            if name in SHOWN_ELSEWHERE:  # the form sits on its parent's page, reached by the parent's id
                parent_page, parent_kwargs = SHOWN_ELSEWHERE[name]
                page_url = reverse(parent_page, kwargs=parent_kwargs(kwargs))
            else:
                page_url = reverse(page, kwargs={k: v for k, v in kwargs.items()
                                                 if k in PATTERNS[page].pattern.converters})
            response = client_as(role).get(page_url)
            if response.status_code != 200 or "html" not in response.get("Content-Type", ""):
                continue
            found = forms_aimed_at(response.content.decode(), page_url, target)
            if found:
                return (role, target, *found[0][:3])
    return None


def _part_parent(kwargs):
    from inspections.models import Part

    return {"pk": Part.objects.get(pk=kwargs["pk"]).assembly_id}


# Forms shown on a parent's page whose id is not the form's own (the ids only matched by chance on SQLite, where a
# test's first part and first assembly are both number 1; PostgreSQL's sequences run on across tests).
SHOWN_ELSEWHERE = {"inspections:part_withdraw": ("inspections:assembly_parts", _part_parent)}

# A held photo answers only the inspector whose draft holds it (the role matrix checks everyone else gets 404), and
# its Remove button posts no typed field: there is nothing hostile to type into it.
OWNER_ONLY = {"inspections:draft_photo_file", "inspections:draft_photo_remove"}
# Rows that any signing moves on, whoever's record it is: not the bystander's (core.seals keeps one chain head).
MOVES_WITH_EVERY_SIGNING = {"core.SealHead"}
POST_URLS = sorted(name for name in set(PAGES) | set(NOT_PAGES) if ACTIONS_OF.get(name) or name in OPEN_POSTS)
ALL_URLS = sorted(set(PAGES) | set(NOT_PAGES))


# --- the bystander: records no form of the walk is aimed at ---------------------------------------------------

def _bystander(make):
    """Another job with everything that hangs from it; returns {model label: {pk: values}} of its rows."""
    from procedures.models.wps import WPSState
    from tests.pages_travelers import _issued, _packet

    before = _snapshot()
    job = make.make_job(number="J-BYSTANDER", name="Bystander framing")
    assembly = make.make_assembly(job=job, piece_mark="BY1")
    wps = make.make_wps(state=WPSState.APPROVED, number="BSW-BYSTANDER")
    welder = make.make_welder(name="Bystander Welder", stamp="B-99")
    make.make_qualification(welder=welder)
    weld = make.make_weld(assembly=assembly, mark="BW1", wps=wps)
    weld.welders.add(welder)
    inspection = make.make_inspection(weld, accepted=False)
    make.make_photo(inspection)
    _issued(make)
    _packet(make)
    after = _snapshot()
    return {model: {pk: values for pk, values in rows.items() if pk not in before[model]}
            for model, rows in after.items()}


def _snapshot():
    """Every row of every Legwork table, as values."""
    from django.apps import apps

    rows = {}
    for model in apps.get_models():
        if model._meta.label in MOVES_WITH_EVERY_SIGNING:
            continue
        if model._meta.app_label in ("core", "procedures", "inspections"):
            pk = model._meta.pk.attname
            rows[model._meta.label] = {r[pk]: r for r in model._base_manager.values()}
    return rows


def _unchanged(bystander, label):
    """The bystander's rows are all still there, with the same values."""
    from django.apps import apps

    for model, rows in bystander.items():
        if not rows:
            continue
        klass = apps.get_model(model)
        pk = klass._meta.pk.attname
        now = {r[pk]: r for r in klass._base_manager.filter(pk__in=list(rows)).values()}
        for key, values in rows.items():
            assert key in now, f"{label}: {model} {key} was deleted"
            assert now[key] == values, f"{label}: {model} {key} changed"


# --- the walk ------------------------------------------------------------------------------------------------

def _payload(fields, query):
    """The form as the page would send it: {name: [values]} (checkboxes and multi-selects repeat a name)."""
    data = {}
    for name, kind, value, on in [*fields, *((k, "query", v, True) for k, v in query)]:
        if name in SKIP_FIELDS or kind == "file":
            continue
        data.setdefault(name, [])
        if on:
            data[name].append(value)
    return data


def _as_sent(kind, value):
    if kind == "file":  # the hostile text as a file's name and content
        return SimpleUploadedFile(f"{value[:40]}.png", value.encode("utf-8", "surrogatepass"),
                                  content_type="image/png")
    return value


VALUES = st.one_of(st.sampled_from(HOSTILE), st.sampled_from(HOSTILE), st.text(max_size=60))


def walk(client, form, bystander):
    """Post the form as the page would, with one or two fields hostile; every answer below 500."""
    _role, url, method, query, fields = form
    kinds = {name: kind for name, kind, _, _ in fields}
    names = sorted({name for name in kinds if name not in SKIP_FIELDS} | {k for k, _ in query})
    base = _payload(fields, query)

    def send(data, label):
        with transaction.atomic():
            if method == "post":
                response = client.post(url, {k: v[0] if len(v) == 1 else v for k, v in data.items()})
            else:
                response = client.get(url, data)
            assert response.status_code < 500, f"{label}: {response.status_code}"
            _unchanged(bystander, label)
            transaction.set_rollback(True)

    if not names:  # a button: nothing to type into
        send(base, f"{method.upper()} {url}")
        return

    @settings(max_examples=EXAMPLES)
    @given(st.dictionaries(st.sampled_from(names), VALUES, min_size=1))
    def example(changes):
        data = {k: list(v) for k, v in base.items()}
        for name, value in changes.items():
            data[name] = [_as_sent(kinds.get(name), value)]
        send(data, f"{method.upper()} {url} with {changes!r}")

    example()


@pytest.mark.parametrize("name", ALL_URLS)
def test_hostile_values_in_every_form_give_no_server_error(name, make, users, client_as):
    form = find_form(name, make, users, client_as)
    if form is None:
        if name in OWNER_ONLY or (name in POST_URLS and _serves_a_file(name, make, users, client_as)):
            return  # a role-guarded download (a held photo, a job's export): nothing is typed into it
        assert name not in POST_URLS, f"{name} accepts POST but no page shows a form aimed at it"
        return  # a file, a PDF or a page nothing is typed into
    walk(client_as(form[0]), form, _bystander(make))
