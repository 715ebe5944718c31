"""No lost updates: two people edit one record from pages opened at the same time.

The first save wins; the second saves nothing, keeps its input on the page, says who changed the record and when,
and marks each field they changed. Saving again from that page (now at the current version) is a deliberate
overwrite, and it is in the history too.
"""

import pytest
from django import forms
from django.test import Client
from django.urls import reverse

from core.errors import Stale
from core.history import history_of
from core.roles import Role

# name: (url name, builder, role, field, value A, value B)
CASES = {
    "draft WPS": ("procedures:wps_edit", lambda make: make.make_wps(), Role.WELDING_ENGINEER, "title",
                  "FCAW fillet, beams", "FCAW fillet, columns"),
    "PQR": ("procedures:pqr_edit", lambda make: make.make_pqr(), Role.WELDING_ENGINEER, "laboratory",
            "Ridgeway Testing Lab, Dayton", "Ridgeway Testing Lab, Akron"),
    "welder": ("procedures:welder_edit", lambda make: make.make_welder(), Role.WELDING_ENGINEER, "employer",
               "Brannock Steelworks, Yard 1", "Brannock Steelworks, Yard 2"),
    "job": ("inspections:job_edit", lambda make: make.make_job(), Role.QA_LEAD, "customer",
            "Harlan County Transit", "Harlan Transit Authority"),
    "assembly": ("inspections:assembly_edit", lambda make: make.make_assembly(), Role.QA_LEAD, "drawing_revision",
                 "2", "3"),
    "weld": ("inspections:weld_edit", lambda make: make.make_weld(), Role.WELDING_ENGINEER, "count", "2", "3"),
}


def form_data(form):
    """What the browser would post back for this form as shown (every field as rendered)."""
    data = {}
    for name, field in form.fields.items():
        value = form[name].value()
        if isinstance(field.widget, forms.MultiWidget):  # the admin's date and time boxes
            for n, part in enumerate(field.widget.decompress(value)):
                data[f"{name}_{n}"] = "" if part is None else str(part)
        elif isinstance(field, forms.BooleanField):
            if value:
                data[name] = "on"
        elif isinstance(value, (list, tuple)):
            data[name] = [str(v) for v in value]
        else:
            data[name] = "" if value is None else str(value)
    return data


def posted(form):
    """The form's (bound) data as a dict a test client can post again."""
    return {key: form.data.getlist(key) for key in form.data}


def _client(make, role):
    user = make.make_user(role)
    client = Client()
    client.force_login(user)
    return client, user


@pytest.mark.parametrize("case", sorted(CASES))
def test_the_second_of_two_editors_overwrites_nothing_and_is_told_who_changed_it(make, case):
    name, build, role, field, value_a, value_b = CASES[case]
    record = build(make)
    url = reverse(name, args=[record.pk])
    (first, first_user), (second, _second_user) = _client(make, role), _client(make, role)
    page_a, page_b = first.get(url), second.get(url)  # both open the record
    assert page_a.status_code == page_b.status_code == 200

    saved = first.post(url, {**form_data(page_a.context["form"]), field: value_a})
    assert saved.status_code == 302

    refused = second.post(url, {**form_data(page_b.context["form"]), field: value_b})
    assert refused.status_code == 409
    form = refused.context["form"]
    said = " ".join(form.non_field_errors())
    assert str(first_user) in said and "Nothing was saved" in said
    assert "changed this" in " ".join(form.errors[field])  # beside the field the first editor changed
    assert str(form[field].value()) == value_b  # the second editor's input is still on the page
    stored = type(record).objects.get(pk=record.pk)
    assert str(getattr(stored, field)) == value_a

    edits = list(history_of(record).filter(action="edited"))
    assert [e.user for e in edits] == [first_user] and value_a in str(edits[0].changes)

    # Saving again from that page is a decision made with the other change in view: it goes through.
    again = second.post(url, posted(form))
    assert again.status_code == 302
    assert str(getattr(type(record).objects.get(pk=record.pk), field)) == value_b
    assert history_of(record).filter(action="edited").count() == 2


def test_a_form_without_its_version_saves_nothing(make, client_as):
    wps = make.make_wps()
    client = client_as("welding_engineer")
    url = reverse("procedures:wps_edit", args=[wps.pk])
    data = form_data(client.get(url).context["form"])
    del data["opened_version"]
    response = client.post(url, {**data, "title": "Crafted"})
    assert response.status_code == 200 and "opened_version" in response.context["form"].errors
    assert type(wps).objects.get(pk=wps.pk).title != "Crafted"


def test_a_stale_instance_is_refused_by_the_model_too(make):
    """Not only forms: any save() of a record loaded before someone else's save is refused."""
    job = make.make_job()
    mine, theirs = type(job).objects.get(pk=job.pk), type(job).objects.get(pk=job.pk)
    theirs.name = "Level 2 framing, revised"
    theirs.save()
    mine.name = "Someone overwriting"
    with pytest.raises(Stale):
        mine.save()
    stored = type(job).objects.get(pk=job.pk)
    assert (stored.name, stored.customer, stored.version) == ("Level 2 framing, revised", job.customer, 2)


def test_a_state_step_makes_an_open_form_stale(make, client_as):
    """Submitted and returned to draft meanwhile: the version moved on with each step."""
    from procedures.services import wps as steps

    wps = make.make_wps()
    client = client_as("welding_engineer")
    url = reverse("procedures:wps_edit", args=[wps.pk])
    data = form_data(client.get(url).context["form"])
    returner = make.make_user("qa_lead", first_name="Hank", last_name="Delaney")
    steps.submit(wps, make.make_user("welding_engineer"))
    steps.return_to_draft(wps, returner, "Add the interpass temperature")
    response = client.post(url, {**data, "title": "Edited after the round trip"})
    assert response.status_code == 409
    assert "Hank Delaney changed" in " ".join(response.context["form"].non_field_errors())
    assert type(wps).objects.get(pk=wps.pk).title != "Edited after the round trip"


def test_a_role_change_in_the_admin_is_in_the_users_history_and_a_stale_one_is_refused(make):
    person = make.make_user("inspector", username="r.quint")
    admins = []
    for _ in range(2):
        client = Client()
        admin = make.make_user("qa_lead", is_staff=True, is_superuser=True)
        client.force_login(admin)
        admins.append((client, admin))
    url = reverse("admin:core_user_change", args=[person.pk])
    (first, first_admin), (second, _) = admins
    forms_ = [c.get(url).context["adminform"].form for c, _ in admins]
    assert first.post(url, {**form_data(forms_[0]), "role": "qa_lead"}).status_code == 302
    refused = second.post(url, {**form_data(forms_[1]), "role": "viewer"})
    assert refused.status_code == 200
    assert str(first_admin) in " ".join(refused.context["adminform"].form.non_field_errors())
    person.refresh_from_db()
    assert person.role == "qa_lead"
    event = history_of(person).get(action="edited")
    assert event.user == first_admin and event.changes["role"] == ["Inspector", "QA lead"]
    assert "Inspector → QA lead" in first.get(url).content.decode()  # the admin page shows the history
