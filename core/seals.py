"""The record chain: every signed record sealed with a SHA-256 of its canonical content, linked to the seal before.

A signing step calls seal(record, kind) inside its own transaction: the record is read back from the database,
written as canonical JSON (content_of), hashed, and appended to the one chain (core.Seal) under the chain lock
(the SealHead row, locked FOR UPDATE; on SQLite the IMMEDIATE transaction already holds the write lock). A
change to a signed record, to a stored file it names, or to any seal then shows: verify() recomputes every
seal from the database and the files and names the first that does not match.

Lock order: a transaction that seals and also locks rows others lock before sealing (an assembly, a weld, an
NCR) takes the chain lock FIRST, with `sealing()` (or lock_chain()) at its start; otherwise two signings could
each hold what the other waits for. docs/decisions/2026-12-05-record-chain.md says why and what was weighed.

Canonical JSON (docs/export-format.md shows how to recompute it outside Legwork): keys sorted, no spaces,
UTF-8; a Decimal as fixed-point text with its column's places, in the stored base unit ("6.3500000" mm); a time
as ISO 8601 in UTC to the microsecond; a date as ISO 8601; a relation as the related record's id; a
many-to-many as the sorted ids; a stored file as {"name", "sha256"} of the bytes in storage.
"""

from __future__ import annotations

import datetime
import hashlib
import json
from collections import defaultdict
from collections.abc import Iterable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from decimal import Decimal

from django.apps import apps
from django.core.files.storage import default_storage
from django.db import IntegrityError, models, transaction
from django.utils import timezone

from core.models import Seal, SealHead

FORMAT = "legwork-seal 1"
GENESIS = "0" * 64
CHUNK = 500  # records read per query when verifying (well under SQLite's bound-variable limit)


# --- what is sealed ----------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Part:
    """Rows sealed with the record: e.g. the welds of a released assembly (key "welds", parent field "assembly")."""

    key: str
    model: str
    parent: str
    unsealed: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Kind:
    """One kind of signing: which model, which rows must carry it, which fields move on afterwards (unsealed)."""

    name: str
    model: str
    noun: str
    signed: dict = field(default_factory=dict)  # filter naming the rows that must have this seal
    unsealed: dict = field(default_factory=dict)  # field -> why it may change after signing
    parts: tuple[Part, ...] = ()


KINDS = {kind.name: kind for kind in (
    Kind("inspection.signed", "inspections.Inspection", "inspection"),
    Kind("photo.attached", "inspections.Photo", "photo"),
    Kind("wps.approved", "procedures.WPS", "WPS", {"approved_at__isnull": False},
         {"state": "moves on to superseded or withdrawn after approval",
          "withdrawn_at": "set when an approved WPS is withdrawn (the withdrawal is its own history row)"}),
    Kind("ncr.dispositioned", "inspections.NCR", "NCR", {"dispositioned_at__isnull": False},
         {"state": "moves to closed by the re-inspection of a repair (sealed then as ncr.closed)",
          "closed_by_inspection": "set when the repair's re-inspection closes it (ncr.closed)",
          "closed_at": "set when the repair's re-inspection closes it (ncr.closed)"}),
    Kind("ncr.closed", "inspections.NCR", "NCR", {"state": "closed"}),
    Kind("assembly.released", "inspections.Assembly", "assembly", {"state": "released"},
         parts=(Part("welds", "inspections.Weld", "assembly",
                     {"latest_inspection": "a pointer kept by signing, not part of the weld map",
                      "latest_final": "a pointer kept by signing, not part of the weld map"}),)),
    Kind("traveler.issued", "inspections.Traveler", "traveler"),
    Kind("packet.built", "inspections.JobPacket", "packet", {"state": "done"},
         {"task_id": "the task runner's id, written after the build when the runner answers"}),
)}


def model_of(kind: Kind):
    return apps.get_model(kind.model)


def label_of(model) -> str:
    return model._meta.label_lower


# --- canonical content ---------------------------------------------------------------------------------------------

def canonical_json(value) -> str:
    """Sorted keys, no spaces, UTF-8 text, no NaN: the one spelling that is hashed."""
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)


def sha256_text(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def file_sha256(name: str) -> str | None:
    """SHA-256 of a stored file, read in 1 MiB chunks; None when it is missing from storage."""
    digest = hashlib.sha256()
    try:
        with default_storage.open(name, "rb") as handle:
            for chunk in iter(lambda: handle.read(1 << 20), b""):
                digest.update(chunk)
    except (FileNotFoundError, IsADirectoryError):
        return None
    return digest.hexdigest()


class FileHashes(dict):
    """Stored files' SHA-256 by name, each file read once per verification."""

    def __missing__(self, name):
        self[name] = value = file_sha256(name)
        return value


def encode(obj, model_field, files=None):
    """One field's value as the canonical JSON holds it (see the module docstring)."""
    if model_field.many_to_many:
        return sorted(item.pk for item in getattr(obj, model_field.name).all())
    value = getattr(obj, model_field.attname)
    if isinstance(model_field, models.FileField):
        if not value:
            return None
        name = value.name
        return {"name": name, "sha256": (files[name] if files is not None else file_sha256(name))}
    if value is None:
        return None
    if isinstance(model_field, models.DecimalField):
        number = model_field.get_prep_value(value)  # a quantity field gives its Decimal in the base unit
        return format(Decimal(number).quantize(Decimal(1).scaleb(-model_field.decimal_places)), "f")
    if isinstance(model_field, models.DateTimeField):
        return value.astimezone(datetime.UTC).isoformat(timespec="microseconds")
    if isinstance(model_field, (models.DateField, models.TimeField)):
        return value.isoformat()
    if isinstance(value, (bool, int, str, list, dict)) or isinstance(model_field, models.JSONField):
        return value
    return str(value)


# Bookkeeping no signed content depends on: the edit counter (core.locking) moves with every step, a state
# change included, so sealing it would make a legal transition after signing read as tampering.
NEVER_SEALED = frozenset({"version"})


def sealable_fields(model, unsealed=()) -> list:
    """Every concrete and many-to-many field of the model, by name, except those named unsealed (and the
    bookkeeping fields of NEVER_SEALED)."""
    fields = [*model._meta.concrete_fields, *model._meta.many_to_many]
    return [f for f in fields if f.name not in unsealed and f.name not in NEVER_SEALED]


def _load(model, pks, **filters) -> list:
    m2m = [f.name for f in model._meta.many_to_many]
    found = []
    pks = list(pks)
    for start in range(0, len(pks), CHUNK):
        chunk = pks[start:start + CHUNK]
        query = model._base_manager.filter(pk__in=chunk, **filters).prefetch_related(*m2m)
        # In id order; one record has no order to keep (a signing seals one: no ORDER BY to build for it).
        found += list(query.order_by("pk") if len(chunk) > 1 else query.order_by())
    return found


def _row(obj, fields, names, files) -> dict:
    by_name = {f.name: f for f in fields}
    return {name: (encode(obj, by_name[name], files) if name in by_name else {"absent": True}) for name in names}


def contents(kind: Kind, pks: Iterable[int], names=None, part_names=None, files=None) -> dict[int, dict]:
    """{pk: canonical content} of these records, read from the database (a fixed number of queries per 500).

    names / part_names: the field names to write (a verification passes those the seal holds, so a field added
    to the model later does not change an old seal); default: every sealable field.
    """
    model = model_of(kind)
    fields = sealable_fields(model)
    names = names or [f.name for f in sealable_fields(model, kind.unsealed)]
    objects = _load(model, pks)
    out = {obj.pk: {"record": label_of(model), "id": obj.pk, "fields": _row(obj, fields, names, files)}
           for obj in objects}
    for part in kind.parts:
        part_model = apps.get_model(part.model)
        part_fields = sealable_fields(part_model)
        wanted = (part_names or {}).get(part.key) or [f.name for f in sealable_fields(part_model, part.unsealed)]
        rows = defaultdict(list)
        m2m = [f.name for f in part_model._meta.many_to_many]
        for start in range(0, len(objects), CHUNK):
            parents = [o.pk for o in objects[start:start + CHUNK]]
            for obj in (part_model._base_manager.filter(**{f"{part.parent}__in": parents})
                        .prefetch_related(*m2m).order_by("pk")):
                rows[getattr(obj, f"{part.parent}_id")].append(_row(obj, part_fields, wanted, files))
        for pk, content in out.items():
            content[part.key] = rows[pk]
    return out


# --- the chain -----------------------------------------------------------------------------------------------------

def chain_hash(*, sequence, kind, record_type, record_id, content_sha256, previous_sha256, sealed_at) -> str:
    """SHA-256 of the seal's own canonical JSON: what links it to the one before."""
    return sha256_text(canonical_json({
        "format": FORMAT, "sequence": sequence, "kind": kind, "record": record_type, "id": record_id,
        "content_sha256": content_sha256, "previous_sha256": previous_sha256,
        "sealed_at": sealed_at.astimezone(datetime.UTC).isoformat(timespec="microseconds")}))


def chain_hash_of(seal: Seal) -> str:
    return chain_hash(sequence=seal.sequence, kind=seal.kind, record_type=seal.record_type, record_id=seal.record_id,
                      content_sha256=seal.content_sha256, previous_sha256=seal.previous_sha256,
                      sealed_at=seal.sealed_at)


def lock_chain() -> tuple[int, str]:
    """Lock the chain head (held to the end of the transaction) and return (last sequence, last chain hash)."""
    head = SealHead.objects.select_for_update().filter(pk=1).values_list("sequence", "chain_sha256").first()
    if head is None:  # a new database: make the head row from the chain as it stands (empty, or restored)
        last = Seal.objects.order_by("-sequence").values_list("sequence", "chain_sha256").first()
        try:
            with transaction.atomic():
                SealHead.objects.create(pk=1, sequence=last[0] if last else 0,
                                        chain_sha256=last[1] if last else GENESIS)
        except IntegrityError:
            pass  # another signing made it first; lock theirs
        head = SealHead.objects.select_for_update().filter(pk=1).values_list("sequence", "chain_sha256").get()
    return head


def lock_chain_first() -> None:
    """Take the chain lock at the start of a transaction that seals (the lock order above). A database that locks
    no rows has nothing to take: SQLite's IMMEDIATE transaction holds its one write lock from BEGIN, and seal()
    reads the head when it seals."""
    if transaction.get_connection().features.has_select_for_update:
        lock_chain()


@contextmanager
def sealing():
    """A transaction that will seal, with the chain locked first (see the lock order in the module docstring)."""
    with transaction.atomic():
        lock_chain()
        yield


def seal(record, kind_name: str) -> Seal:
    """Append the record's seal to the chain; call it inside the transaction that signs the record."""
    kind = KINDS[kind_name]
    model = model_of(kind)
    if type(record)._meta.concrete_model is not model:
        raise TypeError(f"{kind_name} seals {kind.model}, not {type(record).__name__}")
    if not transaction.get_connection().in_atomic_block:
        raise RuntimeError("seal() belongs inside the transaction that signs the record")
    content = contents(kind, [record.pk])[record.pk]
    missing = [name for name, value in _files_in(content) if value is None]
    if missing:
        raise RuntimeError(f"Cannot seal {record}: stored file missing: {', '.join(missing)}")
    text = canonical_json(content)
    sequence, previous = lock_chain()
    new = Seal(sequence=sequence + 1, kind=kind_name, record_type=label_of(model), record_id=record.pk,
               content=text, content_sha256=sha256_text(text), previous_sha256=previous, sealed_at=timezone.now())
    new.chain_sha256 = chain_hash_of(new)
    new.save()
    SealHead.objects.filter(pk=1).update(sequence=new.sequence, chain_sha256=new.chain_sha256)
    return new


def head() -> Seal | None:
    """The last seal (no lock): what a packet cover prints."""
    return Seal.objects.order_by("-sequence").first()


def _files_in(content) -> Iterator[tuple[str, str | None]]:
    rows = [content["fields"], *(row for key, value in content.items() if isinstance(value, list) for row in value)]
    for row in rows:
        for value in row.values():
            if isinstance(value, dict) and set(value) == {"name", "sha256"}:
                yield value["name"], value["sha256"]


# --- verification --------------------------------------------------------------------------------------------------

@dataclass
class Problem:
    """One thing that does not match; `reason` is one of the words the command and the page show."""

    reason: str  # content changed | file missing | file changed | record missing | seal altered | chain broken
    #              | not sealed | chain head | anchor
    where: str
    detail: str
    sequence: int | None = None

    def __str__(self):
        seal = f"seal #{self.sequence}, " if self.sequence is not None else ""
        return f"{self.where} ({seal}{self.reason}): {self.detail}"


@dataclass
class Report:
    seals: int = 0
    files: int = 0
    records_unsealed_checked: int = 0
    head: tuple[int, str] | None = None
    problems: list[Problem] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.problems


def describe(kind_name: str, record_id) -> str:
    kind = KINDS.get(kind_name)
    return f"{kind.noun if kind else kind_name} {record_id}"


def _short(value) -> str:
    if isinstance(value, dict) and set(value) == {"name", "sha256"}:
        return f"{value['name']} (SHA-256 {str(value['sha256'])[:16]}…)"
    text = canonical_json(value) if not isinstance(value, str) else repr(value)
    return text if len(text) <= 80 else text[:77] + "…"


def compare(sealed: dict, now: dict | None) -> list[tuple[str, str]]:
    """[(reason, detail)] for what differs between the sealed content and the content recomputed now."""
    if now is None:
        return [("record missing", "the record is no longer in the database")]
    found = []

    def rows(prefix, old, new):
        for name in sorted(set(old) | set(new)):
            before, after = old.get(name, {"absent": True}), new.get(name, {"absent": True})
            if before == after or (name not in old and after is None):  # a column added since, empty on the row
                continue
            label = f"{prefix}{name}"
            if isinstance(before, dict) and set(before) == {"name", "sha256"}:
                if isinstance(after, dict) and after.get("name") == before["name"]:
                    if after.get("sha256") is None:
                        found.append(("file missing", f"{label}: {before['name']} is not in storage"))
                    else:
                        found.append(("file changed", f"{label}: {before['name']} was sealed with SHA-256 "
                                                      f"{before['sha256']}, the stored file has {after['sha256']}"))
                    continue
            found.append(("content changed", f"{label} sealed as {_short(before)}, now {_short(after)}"))

    rows("", sealed.get("fields", {}), now.get("fields", {}))
    for key, value in sealed.items():
        if isinstance(value, list):
            fresh = now.get(key, [])
            old_ids = [row.get("id") for row in value]
            new_ids = [row.get("id") for row in fresh]
            if old_ids != new_ids:
                found.append(("content changed", f"{key}: sealed ids {old_ids}, now {new_ids}"))
            by_id = {row.get("id"): row for row in fresh}
            for row in value:
                if row.get("id") in by_id:
                    rows(f"{key}[{row.get('id')}].", row, by_id[row.get("id")])
    return found


def verify(anchors: Iterable[tuple[int, str]] = (), chunk: int = 1000) -> Report:
    """Recompute every seal, link and stored file; the problems come in chain order, the first one first."""
    report = Report()
    files = FileHashes()
    previous = None  # (sequence, chain hash) of the seal before
    # The head first: seals appended while this runs (the app is live) lie beyond it and are checked next time.
    stored_head = SealHead.objects.filter(pk=1).values_list("sequence", "chain_sha256").first()
    chain = Seal.objects.order_by("sequence")
    if stored_head is not None:
        chain = chain.filter(sequence__lte=max(stored_head[0], 0))
    for batch in _batches(chain, chunk):
        fresh = _fresh_contents(batch, files)
        for seal in batch:
            report.seals += 1
            report.problems += _check_one(seal, previous, fresh.get(seal.pk))
            previous = (seal.sequence, seal.chain_sha256)
    report.head = previous
    last = previous or (0, GENESIS)
    if stored_head is not None and tuple(stored_head) != last:
        report.problems.append(Problem("chain head", "the chain head row",
                                       f"says #{stored_head[0]} {stored_head[1][:16]}…, the last seal is #{last[0]} "
                                       f"{last[1][:16]}… (seals removed from the end?)"))
    head_now = SealHead.objects.filter(pk=1).values_list("sequence", flat=True).first()
    stray = Seal.objects.filter(sequence__gt=head_now or 0).order_by("sequence").first()
    if stray is not None:
        report.problems.append(Problem("chain broken", describe(stray.kind, stray.record_id),
                                       "a seal lies beyond the chain head (added around the chain lock)",
                                       stray.sequence))
    report.problems += list(_unsealed())
    report.problems += list(_file_columns(files))
    for sequence, digest in anchors:
        found = Seal.objects.filter(sequence=sequence).values_list("chain_sha256", flat=True).first()
        if found != digest:
            report.problems.append(Problem("anchor", f"printed chain head #{sequence}",
                                           "no seal has that number" if found is None else
                                           f"the printed hash {digest} is not the chain's {found}"))
    report.files = sum(1 for value in files.values() if value is not None)
    return report


def _batches(query, size):
    batch = []
    for item in query.iterator(chunk_size=size):
        batch.append(item)
        if len(batch) == size:
            yield batch
            batch = []
    if batch:
        yield batch


def _fresh_contents(batch, files) -> dict:
    """{seal pk: content recomputed now (None: record gone; {} when the seal's own content is unreadable)}."""
    out = {}
    groups = defaultdict(list)
    for seal in batch:
        groups[seal.kind].append(seal)
    for kind_name, seals in groups.items():
        kind = KINDS.get(kind_name)
        if kind is None:
            continue
        parsed = {}
        for seal in seals:
            try:
                parsed[seal.pk] = json.loads(seal.content)
            except ValueError:
                parsed[seal.pk] = None
        # Seals made before a field was added name fewer fields: recompute each group of equal field lists.
        by_names = defaultdict(list)
        for seal in seals:
            content = parsed[seal.pk]
            if not isinstance(content, dict) or not isinstance(content.get("fields"), dict):
                out[seal.pk] = {}
                continue
            names = tuple(content["fields"])
            part_names = tuple((part.key, tuple(content[part.key][0]) if content.get(part.key) else ())
                               for part in kind.parts)
            by_names[(names, part_names)].append(seal)
        for (names, part_names), group in by_names.items():
            now = contents(kind, [s.record_id for s in group], names=list(names),
                           part_names={key: list(n) for key, n in part_names if n}, files=files)
            for seal in group:
                out[seal.pk] = now.get(seal.record_id)
    return out


def _check_one(seal, previous, now) -> list[Problem]:
    where = describe(seal.kind, seal.record_id)
    problems = []

    def problem(reason, detail):
        problems.append(Problem(reason, where, detail, seal.sequence))

    expected = previous[0] + 1 if previous else 1
    if seal.sequence != expected:
        problem("chain broken", f"seal #{expected} to #{seal.sequence - 1} are missing" if seal.sequence > expected
                else f"sequence {seal.sequence} after #{previous[0]}")
    if seal.previous_sha256 != (previous[1] if previous else GENESIS):
        problem("chain broken", f"its link to the seal before does not match (it names {seal.previous_sha256[:16]}…)")
    if sha256_text(seal.content) != seal.content_sha256:
        problem("seal altered", "the sealed content no longer matches its hash")
    if chain_hash_of(seal) != seal.chain_sha256:
        problem("seal altered", "the seal's chain hash does not match its own fields")
    if seal.kind not in KINDS:
        problem("seal altered", f"unknown kind {seal.kind!r}")
        return problems
    try:
        sealed = json.loads(seal.content)
    except ValueError:
        problem("seal altered", "the sealed content is not JSON")
        return problems
    if now == {}:
        problem("seal altered", "the sealed content is not a record")
        return problems
    if isinstance(sealed, dict) and (sealed.get("record"), sealed.get("id")) != (seal.record_type, seal.record_id):
        problem("seal altered", "the sealed content names another record")
    for reason, detail in compare(sealed, now):
        problem(reason, detail)
    return problems


def _unsealed(examples: int = 3) -> Iterator[Problem]:
    """Records in a signed state with no seal of that kind (signed around the steps, or seals removed)."""
    for kind in KINDS.values():
        model = model_of(kind)
        sealed_ids = Seal.objects.filter(kind=kind.name).values("record_id")
        missing = model._base_manager.filter(**kind.signed).exclude(pk__in=sealed_ids).order_by("pk")
        ids = list(missing.values_list("pk", flat=True)[:examples + 1])
        if ids:
            more = missing.count() - examples if len(ids) > examples else 0
            listed = ", ".join(str(pk) for pk in ids[:examples]) + (f" and {more} more" if more else "")
            yield Problem("not sealed", f"{kind.noun} {ids[0]}",
                          f"{kind.noun} {listed} {'is' if len(ids) == 1 else 'are'} in a signed state "
                          f"({kind.name}) with no seal")


# Stored files whose SHA-256 is kept in a column beside them: checked against the bytes in storage.
FILE_COLUMNS = (
    ("inspections.Photo", "image", "sha256", "photo"),
    ("inspections.Traveler", "file", "sha256", "traveler"),
    ("inspections.JobPacket", "file", "sha256", "packet"),
    ("procedures.Qualification", "report", "report_sha256", "qualification test report"),
)


def _file_columns(files: FileHashes) -> Iterator[Problem]:
    for label, file_field, hash_field, noun in FILE_COLUMNS:
        model = apps.get_model(label)
        rows = (model._base_manager.exclude(**{file_field: ""}).exclude(**{f"{file_field}__isnull": True})
                .order_by("pk").values_list("pk", file_field, hash_field))
        for pk, name, recorded in rows.iterator(chunk_size=2000):
            actual = files[name]
            if actual is None:
                yield Problem("file missing", f"{noun} {pk}", f"{name} is not in storage")
            elif not recorded:
                yield Problem("file changed", f"{noun} {pk}", f"{name} has no SHA-256 recorded with it")
            elif actual != recorded:
                yield Problem("file changed", f"{noun} {pk}",
                              f"{name} has SHA-256 {actual}; {recorded} was recorded with it")


def check_record(record) -> list[Problem]:
    """The seals of one record, each checked against the record now and against the seal before it."""
    label = label_of(type(record))
    problems = []
    for seal in Seal.objects.filter(record_type=label, record_id=record.pk).order_by("sequence"):
        before = (Seal.objects.filter(sequence__lt=seal.sequence).order_by("-sequence")
                  .values_list("sequence", "chain_sha256").first())
        problems += _check_one(seal, before, _fresh_contents([seal], FileHashes()).get(seal.pk))
    return problems
