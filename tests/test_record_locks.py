"""Frozen records refuse change and deletion on every path: save, update, bulk_update, delete, the base manager,
and raw SQL (the database triggers), on whichever database the suite runs (SQLite and PostgreSQL in CI).

Each case builds a record through the real steps and tries to change one field (or delete the row) by every path;
the stored row must be as it was. The legal moves the steps make are exercised by the rest of the suite.
"""

from datetime import date
from decimal import Decimal

import pytest
from django.db import DatabaseError, connection, transaction
from django.utils import timezone

from core import triggers
from core.errors import RecordLocked
from core.models import Event
from inspections.models import AssemblyState, Photo
from inspections.services import ncr as ncr_steps
from inspections.services.assemblies import release
from procedures.models.wps import WPSState
from tests.factory import L
from tests.pages_travelers import _issued, _packet
from tests.test_jobs_pages import qualified_welder


def _released(make):
    weld = make.make_sound_weld()
    make.make_inspection(weld, accepted=True)
    return release(weld.assembly, make.make_user("qa_lead"))


def _released_weld(make):
    return _released(make).welds.get()


def _inspected_weld(make):
    weld = make.make_weld()
    make.make_inspection(weld, stage="in_process", accepted=True)
    weld.refresh_from_db()
    return weld


def _final_weld(make):
    weld = make.make_weld(welded_on=date(2026, 4, 2))
    make.make_inspection(weld, accepted=True)
    weld.refresh_from_db()
    return weld


def _repair_ncr(make):
    ncr = make.make_ncr()
    return ncr_steps.disposition_repair(ncr, make.make_user("qa_lead"), make.make_wps(state=WPSState.APPROVED),
                                        qualified_welder(make), "Grind out and re-weld")


def _closed_ncr(make):
    ncr = make.make_ncr()
    return ncr_steps.disposition_use_as_is(ncr, make.make_user("qa_lead"), "M. Ferreira, PE", timezone.localdate())


def _event(make):
    wps = make.make_wps()
    return Event.objects.filter(subject_id=wps.pk, subject_type__model="wps").get()


def _client_set(make):
    from tests.pages_jobs import make_client_set

    return make_client_set(make)


# name: (builder, field, new value)
CASES = {
    "submitted WPS": (lambda make: make.make_wps(state=WPSState.SUBMITTED), "amperage_max", Decimal("400")),
    "approved WPS": (lambda make: make.make_wps(state=WPSState.APPROVED), "title", "Changed in place"),
    "superseded WPS": (lambda make: make.make_wps(state=WPSState.SUPERSEDED), "electrode", "E7018"),
    "withdrawn WPS": (lambda make: make.make_wps(state=WPSState.WITHDRAWN), "notes", "changed"),
    "signed inspection": (lambda make: make.make_inspection(min_size="1/8 in"), "accepted", True),
    "photo": (lambda make: make.make_photo(), "caption", "changed"),
    "open NCR": (lambda make: make.make_ncr(), "description", "changed"),
    "dispositioned NCR": (_repair_ncr, "disposition_notes", "changed"),
    "closed NCR": (_closed_ncr, "engineer_name", "Someone Else, PE"),
    "issued traveler": (_issued, "pages", 9),
    "done packet": (lambda make: _packet(make, done=True), "pages", 9),
    "released assembly": (_released, "drawing_revision", "Z"),
    "weld of a released assembly": (_released_weld, "welded_on", date(2026, 1, 1)),
    "inspected weld (drawing data)": (_inspected_weld, "size", L("5/16 in")),
    "final-inspected weld (who, when)": (_final_weld, "welded_on", date(2026, 1, 5)),
    "history row": (_event, "reason", "rewritten"),
    "client criteria set": (_client_set, "title", "changed"),
}
CHANGE_PATHS = ["save", "save_update_fields", "update", "bulk_update", "base_manager_update", "raw_sql"]
DELETE_PATHS = ["delete", "queryset_delete", "base_manager_delete", "raw_sql"]


def _stored(record, field):
    return getattr(type(record)._base_manager.get(pk=record.pk), record._meta.get_field(field).attname)


def _raw(sql, params):
    """Run raw SQL in a savepoint; return the database's refusal in words (DatabaseError expected)."""
    with pytest.raises(DatabaseError) as refused:  # IntegrityError on both databases
        with transaction.atomic(), connection.cursor() as cursor:
            cursor.execute(sql, params)
    return str(refused.value)


def _named(message, record):
    """The refusal names the record: on PostgreSQL by its kind and key, on SQLite (fixed text) kind and table."""
    lock = type(record).lock
    assert "Legwork" in message and lock.noun in message, message
    if connection.vendor == "postgresql":
        key = str(getattr(record, lock.name[0]))
        assert key in message, message
    else:
        assert record._meta.db_table in message, message


@pytest.mark.parametrize("path", CHANGE_PATHS)
@pytest.mark.parametrize("case", sorted(CASES))
def test_a_frozen_record_refuses_change_on_every_path(make, case, path):
    build, field, value = CASES[case]
    record = build(make)
    model = type(record)
    before = _stored(record, field)
    assert before != value
    if path == "raw_sql":
        model_field = model._meta.get_field(field)
        message = _raw(f'UPDATE "{model._meta.db_table}" SET "{model_field.column}" = %s WHERE "id" = %s',
                       [model_field.get_db_prep_value(value, connection), record.pk])
        _named(message, record)
    else:
        with pytest.raises(RecordLocked):
            if path in ("save", "save_update_fields", "bulk_update"):
                setattr(record, field, value)
            if path == "save":
                record.save()
            elif path == "save_update_fields":
                record.save(update_fields=[field])
            elif path == "update":
                model.objects.filter(pk=record.pk).update(**{field: value})
            elif path == "bulk_update":
                model.objects.bulk_update([record], [field])
            else:
                model._base_manager.filter(pk=record.pk).update(**{field: value})
    assert _stored(record, field) == before


@pytest.mark.parametrize("path", DELETE_PATHS)
@pytest.mark.parametrize("case", sorted(CASES))
def test_a_frozen_record_refuses_deletion_on_every_path(make, case, path):
    record = CASES[case][0](make)
    model = type(record)
    if path == "raw_sql":
        _named(_raw(f'DELETE FROM "{model._meta.db_table}" WHERE "id" = %s', [record.pk]), record)
    else:
        with pytest.raises(RecordLocked):
            if path == "delete":
                record.delete()
            elif path == "queryset_delete":
                model.objects.filter(pk=record.pk).delete()
            else:
                model._base_manager.filter(pk=record.pk).delete()
    assert model._base_manager.filter(pk=record.pk).exists()


# --- the state moves only by the steps ----------------------------------------------------------------------

@pytest.mark.parametrize("start, target", [
    (WPSState.APPROVED, WPSState.DRAFT),  # the case: an approved WPS put back to draft behind its back
    (WPSState.DRAFT, WPSState.APPROVED),  # approved without an approver
    (WPSState.WITHDRAWN, WPSState.APPROVED),
])
def test_a_wps_state_moves_only_by_its_steps(make, start, target):
    wps = make.make_wps(state=start)
    with pytest.raises(RecordLocked):
        type(wps).objects.filter(pk=wps.pk).update(state=target)
    wps.state = target
    with pytest.raises(RecordLocked):
        wps.save()
    message = _raw('UPDATE "procedures_wps" SET "state" = %s WHERE "id" = %s', [target, wps.pk])
    assert "only by its steps" in message
    assert type(wps).objects.get(pk=wps.pk).state == start


def test_a_closed_ncr_cannot_be_reopened_by_sql(make):
    ncr = _closed_ncr(make)
    assert "only by its steps" in _raw('UPDATE "inspections_ncr" SET "state" = %s WHERE "id" = %s', ["open", ncr.pk])
    assert type(ncr).objects.get(pk=ncr.pk).state == "closed"


def test_the_database_allows_the_moves_the_steps_make(make):
    """The triggers refuse the shape of a change, not its author: a legal move by SQL passes (history is the steps')."""
    wps = make.make_wps(state=WPSState.APPROVED)
    with connection.cursor() as cursor:
        cursor.execute('UPDATE "procedures_wps" SET "state" = %s WHERE "id" = %s', ["withdrawn", wps.pk])
    assert type(wps).objects.get(pk=wps.pk).state == "withdrawn"


# --- adding to what is closed -----------------------------------------------------------------------------------

def test_no_photo_is_added_to_an_inspection_of_a_released_assembly(make):
    assembly = _released(make)
    inspection = assembly.welds.get().latest_final
    with pytest.raises(RecordLocked, match="released"):
        make.make_photo(inspection)
    photo = Photo.objects.filter(inspection__weld__assembly=assembly)
    assert not photo.exists()
    message = _raw('INSERT INTO "inspections_photo" ("inspection_id", "image", "thumbnail", "caption", "width", '
                   '"height", "content_type", "sha256", "uploaded_by_id", "uploaded_at") '
                   "VALUES (%s, 'x.jpg', 'x.jpg', '', 1, 1, 'image/jpeg', '', %s, %s)",
                   [inspection.pk, inspection.inspector_id, timezone.now()])
    assert "Legwork" in message and not photo.exists()


def test_no_weld_is_added_to_a_released_assembly_by_sql(make):
    assembly = _released(make)
    weld = assembly.welds.get()
    with pytest.raises(RecordLocked):
        make.make_weld(assembly=assembly, mark="W99")
    columns = [f for f in type(weld)._meta.concrete_fields if not f.primary_key]
    values = [f.get_db_prep_value(getattr(weld, f.attname), connection) if f.name != "mark" else "W98"
              for f in columns]
    _raw(f'INSERT INTO "inspections_weld" ({", ".join(chr(34) + f.column + chr(34) for f in columns)}) '
         f'VALUES ({", ".join(["%s"] * len(columns))})', values)
    assert assembly.welds.count() == 1


def test_the_welders_of_a_final_inspected_weld_do_not_change(make):
    weld = _final_weld(make)
    welder = make.make_welder()
    # Django's add() runs in a block without a savepoint: the test gives it one, as a form's save does.
    with pytest.raises(RecordLocked), transaction.atomic():
        weld.welders.add(welder)
    with pytest.raises(RecordLocked), transaction.atomic():
        welder.welds.add(weld)  # from the other side of the link
    _raw('INSERT INTO "inspections_weld_welders" ("weld_id", "welder_id") VALUES (%s, %s)', [weld.pk, welder.pk])
    assert not weld.welders.exists()


def test_the_pqrs_of_an_approved_wps_do_not_change(make):
    wps = make.make_wps()
    pqr = make.make_pqr()
    wps.pqrs.add(pqr)
    make.move_wps(wps, WPSState.APPROVED)
    with pytest.raises(RecordLocked), transaction.atomic():
        wps.pqrs.clear()
    _raw('DELETE FROM "procedures_wps_pqrs" WHERE "wps_id" = %s', [wps.pk])
    assert list(wps.pqrs.all()) == [pqr]
    pqr.notes = "edited after approval"
    with pytest.raises(RecordLocked, match="supports a procedure"):
        pqr.save()


def test_a_welders_stamp_stays_once_records_bear_it(make):
    welder = make.make_welder(stamp="B-90")
    make.make_qualification(welder=welder)
    welder.stamp = "B-91"
    with pytest.raises(RecordLocked):
        welder.save()
    _raw('UPDATE "procedures_welder" SET "stamp" = %s WHERE "id" = %s', ["B-91", welder.pk])
    welder.refresh_from_db()
    assert welder.stamp == "B-90"
    welder.name = "Corrected Name"
    welder.save()  # the rest of the welder is edited in place
    assert type(welder).objects.get(pk=welder.pk).name == "Corrected Name"


def test_every_frozen_table_has_its_trigger(db):
    assert triggers.expected_tables() <= triggers.installed(connection)
    assert {"core_event", "procedures_wps", "inspections_inspection", "inspections_photo", "inspections_ncr",
            "inspections_traveler", "inspections_jobpacket", "inspections_assembly",
            "inspections_weld"} <= triggers.expected_tables()


def test_the_weld_pointers_signing_keeps_pass_the_trigger(make):
    """sign_inspection moves a weld's pointers to its latest inspections: bookkeeping the triggers allow."""
    weld = _final_weld(make)
    again = make.make_inspection(weld, accepted=True)
    weld.refresh_from_db()
    assert weld.latest_final_id == again.pk and weld.latest_inspection_id == again.pk


def test_a_released_assembly_is_frozen_but_may_still_be_scrapped(make):
    assembly = _released(make)
    from inspections.services.assemblies import scrap

    scrap(assembly, make.make_user("qa_lead"), "Dropped in handling")
    assert type(assembly).objects.get(pk=assembly.pk).state == AssemblyState.SCRAPPED


# --- the pages and crafted posts --------------------------------------------------------------------------------

def test_a_crafted_post_cannot_change_a_released_assembly(make, client_as):
    from django.urls import reverse

    assembly = _released(make)
    client = client_as("qa_lead")
    url = reverse("inspections:assembly_edit", args=[assembly.pk])
    assert client.get(url).status_code == 302
    response = client.post(url, {"piece_mark": assembly.piece_mark, "drawing": assembly.drawing, "quantity": 1,
                                 "drawing_revision": "Z", "opened_version": assembly.version})
    assert response.status_code == 409 and "released" in " ".join(response.context["form"].non_field_errors())
    assert type(assembly).objects.get(pk=assembly.pk).drawing_revision != "Z"


def test_a_crafted_post_cannot_change_a_pqr_in_use(make, client_as):
    from django.urls import reverse

    from tests.test_stale_saves import form_data

    pqr = make.make_pqr()
    wps = make.make_wps()
    wps.pqrs.add(pqr)
    client = client_as("welding_engineer")
    url = reverse("procedures:pqr_edit", args=[pqr.pk])
    data = form_data(client.get(url).context["form"])  # opened while the WPS was a draft
    make.move_wps(wps, WPSState.SUBMITTED)
    response = client.post(url, {**data, "laboratory": "Another lab"})
    assert response.status_code == 409
    assert type(pqr).objects.get(pk=pqr.pk).laboratory != "Another lab"


def test_no_photo_is_attached_through_the_page_once_the_assembly_is_released(make, client_as):
    from django.core.files.uploadedfile import SimpleUploadedFile
    from django.urls import reverse

    from tests.factory import png_bytes

    assembly = _released(make)
    inspection = assembly.welds.get().latest_final
    response = client_as("inspector").post(reverse("inspections:photo_add", args=[inspection.pk]), {
        "image": SimpleUploadedFile("weld.png", png_bytes(), content_type="image/png"), "caption": "after release"})
    assert response.status_code == 409
    assert not Photo.objects.filter(inspection=inspection).exists()
