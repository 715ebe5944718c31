"""The record chain: every signing seals its record; verify_records finds a change made anywhere, by any path.

Tampering is done as someone with the database file or a superuser's SQL would do it: raw SQL, past the models'
guards and past any trigger (tamper() drops SQLite triggers on the table for the statement and skips them on
PostgreSQL), because the chain exists for the case where every other lock has been got round.
"""

import json
import os
from pathlib import Path

import pytest
from django.core.management import CommandError, call_command
from django.db import IntegrityError, connection, transaction

from core import seals
from core.models import Seal, SealHead
from inspections.models import Inspection
from tests import shop_records


def tamper(sql, params=()):
    """Run one UPDATE or DELETE past the models and any trigger, as a person with the database itself could."""
    with transaction.atomic(), connection.cursor() as cursor:
        if connection.vendor == "postgresql":
            cursor.execute("SET LOCAL session_replication_role = replica")  # triggers off, this transaction only
            cursor.execute(sql, params)
            return
        table = sql.split()[1] if sql.upper().startswith("UPDATE") else sql.split()[2]
        cursor.execute("SELECT name, sql FROM sqlite_master WHERE type = 'trigger' AND tbl_name = %s", [table])
        triggers = cursor.fetchall()
        for name, _sql in triggers:
            cursor.execute(f'DROP TRIGGER "{name}"')
        cursor.execute(sql, params)
        for _name, create in triggers:
            cursor.execute(create)


@pytest.fixture
def shop(make):
    return shop_records.build(make)


def _verify_fails(*args):
    with pytest.raises(CommandError) as failed:
        call_command("verify_records", *args)
    return str(failed.value)


def test_every_signing_is_sealed_in_one_unbroken_chain(shop, capsys):
    kinds = set(Seal.objects.values_list("kind", flat=True))
    assert kinds == set(seals.KINDS) - {"packet.built"}
    sequences = list(Seal.objects.values_list("sequence", flat=True))
    assert sequences == list(range(1, len(sequences) + 1))
    report = seals.verify()
    assert report.ok, [str(p) for p in report.problems]
    assert report.files >= 4  # the photo and its thumbnail, the traveler, the test report
    call_command("verify_records")
    out = capsys.readouterr().out
    assert f"{len(sequences)} seals checked" in out and "Records intact" in out
    last = Seal.objects.order_by("-sequence").first()
    assert SealHead.objects.get().chain_sha256 == last.chain_sha256


def test_each_seal_holds_the_canonical_content_it_hashed(shop):
    inspection = shop["inspection"]
    stored = Seal.objects.get(kind="inspection.signed", record_id=inspection.pk)
    content = json.loads(stored.content)
    assert stored.content == seals.canonical_json(content)
    assert content["record"] == "inspections.inspection" and content["id"] == inspection.pk
    assert content["fields"]["min_size"] == f"{inspection.min_size.mm:.7f}"  # exact text, in mm, 7 places
    assert content["fields"]["inspected_at"].endswith("+00:00") and "." in content["fields"]["inspected_at"]
    assert seals.sha256_text(stored.content) == stored.content_sha256
    released = json.loads(Seal.objects.get(kind="assembly.released").content)
    assert [w["mark"] for w in released["welds"]] == ["W01", "W02"]
    assert "latest_inspection" not in released["welds"][0]
    photo = json.loads(Seal.objects.get(kind="photo.attached").content)["fields"]
    assert photo["image"]["sha256"] == shop["photo"].sha256


def test_a_measured_leg_changed_by_raw_sql_is_named(shop):
    inspection = shop["inspection"]
    tamper("UPDATE inspections_inspection SET min_size = %s WHERE id = %s", ["4.7625000", inspection.pk])
    message = _verify_fails()
    assert f"inspection {inspection.pk}" in message and "content changed" in message
    assert "min_size sealed as" in message and "4.7625000" in message


def test_a_released_time_changed_by_raw_sql_is_named(shop):
    assembly = shop["shipped"]
    tamper("UPDATE inspections_assembly SET released_at = %s WHERE id = %s",
           ["2020-01-01 00:00:00+00:00", assembly.pk])
    message = _verify_fails()
    assert f"assembly {assembly.pk}" in message and "released_at" in message


def test_a_weld_of_a_released_assembly_changed_is_named(shop):
    weld = shop["shipped"].welds.get(mark="W02")
    tamper("UPDATE inspections_weld SET length = %s WHERE id = %s", ["25.4000000", weld.pk])
    assert f"welds[{weld.pk}].length" in _verify_fails()


def test_a_deleted_photo_file_is_named(shop):
    photo = shop["photo"]
    os.remove(Path(photo.image.path))
    message = _verify_fails()
    assert f"photo {photo.pk}" in message and "file missing" in message and photo.image.name in message


def test_a_changed_traveler_file_is_named(shop):
    traveler = shop["traveler"]
    Path(traveler.file.path).write_bytes(b"%PDF-1.7 something else")
    message = _verify_fails()
    assert f"traveler {traveler.pk}" in message and "file changed" in message


def test_a_replaced_test_report_is_named(shop):
    qualification = shop["qualification"]
    Path(qualification.report.path).write_bytes(b"another report")
    message = _verify_fails()
    assert f"qualification test report {qualification.pk}" in message and "file changed" in message


def test_a_seal_rewritten_by_raw_sql_breaks_the_chain(shop):
    first = Seal.objects.order_by("sequence").first()
    tamper("UPDATE core_seal SET content_sha256 = %s WHERE id = %s", ["f" * 64, first.pk])
    message = _verify_fails()
    assert f"seal #{first.sequence}" in message and "seal altered" in message


def test_a_chain_recomputed_after_a_change_no_longer_matches_a_printed_head(shop, capsys):
    """Someone who changes a record and recomputes every seal after it still cannot match a printed head."""
    printed = seals.head()
    call_command("verify_records", "--anchor", f"{printed.sequence}:{printed.chain_sha256}")
    assert "is in the chain" in capsys.readouterr().out
    inspection = shop["inspection"]
    target = Seal.objects.get(kind="inspection.signed", record_id=inspection.pk)
    tamper("UPDATE inspections_inspection SET accepted = %s WHERE id = %s", [False, inspection.pk])
    previous = Seal.objects.get(sequence=target.sequence - 1).chain_sha256 if target.sequence > 1 else seals.GENESIS
    for seal in Seal.objects.filter(sequence__gte=target.sequence).order_by("sequence"):
        content = seal.content
        if seal.pk == target.pk:
            content = seals.canonical_json(seals.contents(seals.KINDS[seal.kind], [seal.record_id])[seal.record_id])
        seal.content, seal.content_sha256, seal.previous_sha256 = content, seals.sha256_text(content), previous
        previous = seals.chain_hash_of(seal)
        tamper("UPDATE core_seal SET content = %s, content_sha256 = %s, previous_sha256 = %s, chain_sha256 = %s "
               "WHERE id = %s", [content, seal.content_sha256, seal.previous_sha256, previous, seal.pk])
    tamper("UPDATE core_sealhead SET chain_sha256 = %s", [previous])
    assert seals.verify().ok  # the rewrite is self-consistent ...
    message = _verify_fails("--anchor", f"{printed.sequence}:{printed.chain_sha256}")
    assert f"printed chain head #{printed.sequence}" in message  # ... but not what the customer holds


def test_seals_removed_from_the_end_leave_records_unsealed(shop):
    last = Seal.objects.order_by("-sequence").first()
    tamper("DELETE FROM core_seal WHERE id = %s", [last.pk])
    message = _verify_fails()
    assert "chain head" in message or "not sealed" in message
    report = seals.verify()
    assert {p.reason for p in report.problems} == {"chain head", "not sealed"}


def test_a_seal_added_beyond_the_head_is_named(shop):
    last = seals.head()
    tamper("UPDATE core_sealhead SET sequence = %s", [last.sequence - 1])
    report = seals.verify()
    assert any(p.reason == "chain broken" and p.sequence == last.sequence for p in report.problems)


def test_a_record_signed_around_the_steps_is_reported_unsealed(make, shop):
    weld = shop["held"].welds.get(mark="W02")
    stray = Inspection.objects.create(weld=weld, inspector=make.make_user("inspector"), accepted=True, findings=[],
                                      criteria_key="aws-d1.1-2020-static", criteria_version=1)
    message = _verify_fails()
    assert f"inspection {stray.pk}" in message and "not sealed" in message


def test_a_record_is_sealed_once_per_signing_and_only_as_its_own_kind(make, shop):
    with pytest.raises(IntegrityError), transaction.atomic():
        seals.seal(shop["inspection"], "inspection.signed")
    with pytest.raises(TypeError), transaction.atomic():
        seals.seal(shop["inspection"], "photo.attached")
    assert seals.verify().ok


def test_the_demo_shop_verifies(db, capsys):
    call_command("load_demo")
    report = seals.verify()
    assert report.ok and report.seals > 10, [str(p) for p in report.problems]


def test_the_admin_shows_seals_and_changes_none(make, shop, client):
    client.force_login(make.make_user("qa_lead", is_staff=True, is_superuser=True))
    seal = Seal.objects.first()
    assert client.get("/admin/core/seal/").status_code == 200
    assert client.post(f"/admin/core/seal/{seal.pk}/change/", {"kind": "x"}).status_code == 403
    assert client.post(f"/admin/core/seal/{seal.pk}/delete/", {"post": "yes"}).status_code == 403


def test_unsealed_fields_are_real_fields():
    from django.apps import apps

    for kind in seals.KINDS.values():
        names = {f.name for f in seals.sealable_fields(apps.get_model(kind.model))}
        assert set(kind.unsealed) <= names, kind.name
        for part in kind.parts:
            assert set(part.unsealed) <= {f.name for f in seals.sealable_fields(apps.get_model(part.model))}


def test_a_field_added_after_sealing_does_not_change_an_old_seal(shop):
    """A seal names the fields it covers; verification recomputes those, so a later column is not a change."""
    stored = Seal.objects.get(kind="inspection.signed", record_id=shop["inspection"].pk)
    content = json.loads(stored.content)
    fewer = dict(content, fields={k: v for k, v in content["fields"].items() if k != "remarks"})
    text = seals.canonical_json(fewer)
    kind = seals.KINDS["inspection.signed"]
    recomputed = seals.contents(kind, [stored.record_id], names=list(fewer["fields"]))[stored.record_id]
    assert seals.canonical_json(recomputed) == text
