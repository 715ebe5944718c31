"""Weld maps in and out as CSV, in the shape a detailer exports.

Import is two steps: read_weld_map() gives a preview with one error per bad row and changes nothing (a row whose
WPS is not approved today or does not cover the weld is a bad row: inspections.services.chain.wps_check);
import_weld_map() writes every row or none, in one transaction, after reading the file again. Each row is
checked by the same form as the weld page (WeldSpecForm), so a rule lives once; what a file repeats is worked out
once per file with the same answer (each field's cleaning of a value, each WPS's reading: _prototype,
chain.WpsChecker), and no query is asked per row (tests/test_weldmap_csv.py counts them). Export writes the same
columns, lengths in the job's system as text that reads back exactly, and defuses cells a spreadsheet would run as
a formula (OWASP "CSV injection": a leading = + - @, tab or carriage return gets a leading ').
"""

import csv
import functools
import io
import itertools
from dataclasses import dataclass, field

from django.core.exceptions import ValidationError
from django.db import IntegrityError, transaction
from django.db.models.expressions import DatabaseDefault
from django.utils import timezone

from core import history, lists
from core.errors import Refused
from core.fields import exact_length_text
from core.vocabulary import WELD_PROCESS_CHOICES
from inspections import uses
from inspections.forms.jobs import WeldSpecForm
from inspections.models import Assembly, Weld
from inspections.services import chain
from procedures.models import WPS
from procedures.models.wps import WPSState

COLUMNS = ["piece_mark", "weld_mark", "joint", "size", "size2", "throat", "length", "count", "sides", "thickness1",
           "thickness2", "position", "wps_number", "process"]
# The size: the leg (size) on AWS jobs; on ISO jobs the throat a, the leg z, or both, as the drawing gives them (the
# form says which is missing). A file needs the columns it uses, so "throat", "size2" and "process" are optional.
REQUIRED = {"piece_mark", "weld_mark", "length", "thickness1", "thickness2"}
# CSV column -> WeldSpecForm field
FORM_FIELD = {"weld_mark": "mark", "joint": "joint_type", "size": "size", "size2": "size2", "throat": "throat",
              "length": "length", "count": "count", "sides": "sides", "thickness1": "thickness1",
              "thickness2": "thickness2", "position": "position"}
DEFAULTS = {"joint": "fillet", "count": "1", "sides": "arrow", "position": "F"}
PROCESSES = {value.upper(): value for value, _ in WELD_PROCESS_CHOICES}
MAX_BYTES = 1024 * 1024
MAX_ROWS = 5000
MAX_CELL = 200
SHOWN_BAD = 200  # rows with problems listed on the preview page; the summary counts them all
FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


@dataclass
class Row:
    line: int  # line number in the file, header = 1
    values: dict
    errors: list = field(default_factory=list)
    assembly: Assembly | None = None
    wps: WPS | None = None
    cleaned: dict | None = None
    process: str = ""
    weld: Weld | None = None  # the weld the row makes (its form's instance), WPS and process set by the import
    flags: list = field(default_factory=list)  # what the weld page would flag (inspections.services.flags)


@dataclass
class Preview:
    rows: list = field(default_factory=list)
    file_errors: list = field(default_factory=list)

    @property
    def ok(self):
        return not self.file_errors and bool(self.rows) and not any(r.errors for r in self.rows)

    @property
    def bad_rows(self):
        return [r for r in self.rows if r.errors]

    @property
    def shown_bad_rows(self):
        """The rows with problems a preview page lists (the first SHOWN_BAD; the count says how many more)."""
        return self.bad_rows[:SHOWN_BAD]

    @property
    def shown_flagged_rows(self):
        """The rows a flag asks the engineer of record about (the first SHOWN_BAD): they import all the same."""
        return [r for r in self.rows if r.flags][:SHOWN_BAD]

    @property
    def summary(self):
        """[(piece mark, welds ready, rows with problems)] in file order: the preview's summary of the whole file."""
        found = {}
        for row in self.rows:
            piece = row.values.get("piece_mark", "")
            ready, bad = found.get(piece, (0, 0))
            found[piece] = (ready, bad + 1) if row.errors else (ready + 1, bad)
        return [(piece, ready, bad) for piece, (ready, bad) in found.items()]


def _decode(data: bytes) -> str:
    if len(data) > MAX_BYTES:
        raise ValueError(f"The file is {len(data) // 1024} KB; a weld map may be at most {MAX_BYTES // 1024} KB. "
                         "Split it by assembly.")
    if b"\x00" in data:
        raise ValueError("This is not a text file. Save the weld map as CSV (UTF-8).")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise ValueError("The file is not UTF-8 text. In the spreadsheet, save as 'CSV UTF-8 (comma delimited)'.") \
            from None


def _unescape(text: str) -> str:
    """Undo our own export's formula guard: "'=B1" read back is "=B1"."""
    if len(text) > 1 and text[0] == "'" and text[1] in FORMULA_STARTS:
        return text[1:]
    return text


def _records(text: str):
    first = text.split("\n", 1)[0]
    delimiter = ";" if first.count(";") > first.count(",") else ","
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=True)
    try:
        header = next(reader, None)
        if header is None:
            raise ValueError("The file is empty; the first line names the columns: " + ", ".join(COLUMNS) + ".")
        names = [h.strip().lower().replace(" ", "_") for h in header]
        unknown = [h for h in names if h and h not in COLUMNS]
        missing = sorted(REQUIRED - set(names))
        if unknown or missing:
            parts = []
            if missing:
                parts.append("missing column(s) " + ", ".join(missing))
            if unknown:
                parts.append("unknown column(s) " + ", ".join(unknown[:10]))
            raise ValueError("The header row has " + " and ".join(parts) + ". The columns are: " +
                             ", ".join(COLUMNS) + ".")
        if len(set(names)) != len(names):
            raise ValueError("A column is named twice in the header row.")
        records = []
        for cells in reader:
            if not any(c.strip() for c in cells):
                continue
            if len(records) >= MAX_ROWS:
                raise ValueError(f"More than {MAX_ROWS} welds in one file; split it by assembly.")
            records.append((reader.line_num, names, cells))
        return records
    except csv.Error as exc:
        raise ValueError(f"The CSV cannot be read (line {reader.line_num}): {exc}.") from None


class _RowForm(WeldSpecForm):
    """The weld page's form for one row of the file: the same fields and rules, but the weld mark's uniqueness is
    answered once for the whole file (the sets in read_weld_map), not by two queries per row (the form's unique
    check and the model's constraint check); the database's constraint still guards the insert. The model's field
    checks run for every row, each value's answer remembered for the file (_model_clean_fields)."""

    model_cleaned = None  # {(field, type, value): the model field's cleaned value}, one dict per file (_prototype)

    def clean_mark(self):
        return self.cleaned_data["mark"].strip()

    def validate_unique(self):
        pass

    def _post_clean(self):
        self.instance.validate_constraints = lambda exclude=None: None  # weld_mark_unique_in_assembly: see above
        if self.model_cleaned is not None:
            self.instance.clean_fields = functools.partial(_model_clean_fields, self.instance, self.model_cleaned)
        super()._post_clean()


def _model_clean_fields(instance, known, exclude=None):
    """Model.clean_fields() (Django 5.2's loop, unchanged) with each field's answer for a value remembered in
    `known`: a model field's cleaning of the fields a weld map fills is a function of the value alone. A value
    refused is checked again each time, so each row gets its own error."""
    if exclude is None:
        exclude = set()
    errors = {}
    for f in instance._meta.fields:
        if f.name in exclude or f.generated:
            continue
        raw_value = getattr(instance, f.attname)
        if f.blank and raw_value in f.empty_values:
            continue
        if isinstance(raw_value, DatabaseDefault):
            continue
        key = (f.attname, type(raw_value), raw_value)
        try:
            value = known[key]
        except KeyError:
            try:
                value = known[key] = f.clean(raw_value, instance)
            except ValidationError as e:
                errors[f.name] = e.error_list
                continue
        setattr(instance, f.attname, value)
    if errors:
        raise ValidationError(errors)


def _remembered(clean):
    """A form field's clean() that answers a value it has cleaned before from memory: a field's cleaning is a
    function of the value alone once the field is set up for the job, and a weld map repeats its thicknesses, sizes
    and choices row after row. A value refused is checked again each time (the same words, each row its own)."""
    known = {}

    def remembered(value):  # the value is a cell's text
        try:
            return known[value]
        except KeyError:
            known[value] = result = clean(value)
            return result

    return remembered


def _prototype(assembly) -> _RowForm:
    """The file's one form: its fields set up for the job (the same for every row), each remembering the values it
    has cleaned (_remembered). The rows' forms share its fields (_row_form)."""
    prototype = _RowForm(data={}, assembly=assembly, auto_id=False)  # never drawn: no HTML ids to make per row
    for form_field in prototype.fields.values():
        form_field.clean = _remembered(form_field.clean)
    prototype.model_cleaned = {}
    return prototype


def _row_form(prototype: _RowForm, values: dict, assembly) -> _RowForm:
    """A bound form for one row that shares the prototype's fields: building a form deep-copies its fields, a
    third of the import's time, and the fields depend only on the job, the same for every row."""
    form = _RowForm.__new__(_RowForm)  # copy.copy(prototype), without the copy protocol's detour
    form.__dict__.update(prototype.__dict__)
    form.data, form.files, form.is_bound, form._errors = values, {}, True, None
    form._bound_fields_cache = {}
    form.assembly, form.instance = assembly, Weld(assembly=assembly)
    return form


def _resolve_wps(number, cache):
    """The WPS a weld map names by number: its approved revision, else its newest draft or submitted one."""
    if number in cache:
        return cache[number]
    revisions = list(WPS.objects.filter(number__iexact=number).exclude(
        state__in=[WPSState.WITHDRAWN, WPSState.SUPERSEDED]).order_by("-revision"))
    approved = [w for w in revisions if w.state == WPSState.APPROVED]
    cache[number] = approved[0] if approved else (revisions[0] if revisions else None)
    return cache[number]


def read_weld_map(data: bytes, job) -> Preview:
    """Check every row of the file against the job; nothing is written."""
    preview = Preview()
    try:
        records = _records(_decode(data))
    except ValueError as exc:
        preview.file_errors.append(str(exc))
        return preview
    if not records:
        preview.file_errors.append("The file has a header row but no welds.")
        return preview
    assemblies = {a.piece_mark.lower(): a for a in Assembly.objects.filter(job=job).select_related("job")}
    existing = {(pm, m.lower()) for pm, m in Weld.objects.filter(assembly__job=job)
                .values_list("assembly__piece_mark", "mark")}
    existing = {(pm.lower(), m) for pm, m in existing}
    seen, wps_cache = {}, {}
    prototype = None
    # The same check as the weld form, for every row on one day: approved now (the file has no weld dates).
    wps_checker = chain.WpsChecker(job, timezone.localdate())
    for line, names, cells in records:
        row = Row(line=line, values={})
        if len(cells) > len(names):
            row.errors.append(f"{len(cells)} cells but {len(names)} columns.")
        for name, cell in zip(names, cells, strict=False):
            if len(cell) > MAX_CELL:
                row.errors.append(f"{name}: longer than {MAX_CELL} characters.")
                cell = cell[:MAX_CELL]
            row.values[name] = _unescape(cell.strip())
        preview.rows.append(row)
        if row.errors:
            continue
        values = {k: row.values.get(k) or DEFAULTS.get(k, "") for k in COLUMNS}
        piece = values["piece_mark"]
        row.assembly = assemblies.get(piece.lower())
        if not piece:
            row.errors.append("piece_mark: empty.")
            continue
        if row.assembly is None:
            row.errors.append(f"piece_mark: job {job.number} has no assembly {piece}; add it first.")
            continue
        if row.assembly.is_closed:
            row.errors.append(f"piece_mark: {piece} is {row.assembly.get_state_display().lower()}; its weld map is "
                              "frozen.")
            continue
        if not values["weld_mark"]:  # before the duplicate check: two blank marks are each missing, not a pair
            row.errors.append("weld_mark: empty.")
            continue
        key = (piece.lower(), values["weld_mark"].lower())
        if key in existing:
            row.errors.append(f"weld_mark: {piece} already has weld {values['weld_mark']}.")
            continue
        if key in seen:
            row.errors.append(f"weld_mark: {piece} / {values['weld_mark']} is also on line {seen[key]}.")
            continue
        seen[key] = line
        if values["wps_number"]:
            row.wps = _resolve_wps(values["wps_number"], wps_cache)
            if row.wps is None:
                row.errors.append(f"wps_number: no WPS {values['wps_number']} in use.")
        if values["process"]:
            row.process = PROCESSES.get(values["process"].strip().upper(), "")
            if not row.process:
                row.errors.append(f"process: {values['process']} is not one of {', '.join(PROCESSES.values())} "
                                  "(leave it blank for the WPS's process).")
        data = {FORM_FIELD[k]: values[k] for k in FORM_FIELD}
        prototype = prototype or _prototype(row.assembly)
        form = _row_form(prototype, data, row.assembly)
        if form.is_valid():
            row.cleaned, row.flags = form.cleaned_data, list(form.flags)
            row.weld = form.instance  # the row's cleaned values, as the model checked them
            row.weld.process = row.process
            if row.wps is not None:
                # approved now and covering the weld
                row.errors += [f"wps_number: {error}" for error in wps_checker.check(row.weld, row.wps).errors]
        else:
            reverse = {v: k for k, v in FORM_FIELD.items()}
            for name, errors in form.errors.items():
                row.errors.append(f"{reverse.get(name, name)}: {' '.join(errors)}")
    return preview


def import_weld_map(data: bytes, job, user=None) -> list:
    """Read the file again and write every weld, or none: raises Refused with the preview's errors.

    Each weld gets its created row in the history (the import named as the reason), `user` the importer.
    """
    with transaction.atomic():
        preview = read_weld_map(data, job)
        if not preview.ok:
            problems = preview.file_errors + [f"Line {r.line}: {'; '.join(r.errors)}" for r in preview.bad_rows]
            raise Refused(problems or ["Nothing to import."], code="invalid")
        welds = [row.weld for row in preview.rows]
        for weld, row in zip(welds, preview.rows, strict=True):
            weld.wps = row.wps
        try:
            with transaction.atomic():
                Weld.objects.bulk_create(welds)
        except IntegrityError:  # someone added the same mark meanwhile (or released the assembly: the trigger)
            raise Refused("A weld mark in the file was added by someone else meanwhile, or its assembly was "
                          "released; preview it again.", code="race") from None
        uses.add(wps={(job.pk, weld.wps_id) for weld in welds})  # bulk_create sends no signal (inspections.uses)
        history.record_many(welds, user, history.CREATED, reason=f"Weld map imported ({len(welds)} welds)")
    return welds


def _safe(value) -> str:
    text = "" if value is None else str(value)
    return "'" + text if text.startswith(FORMULA_STARTS) else text


EXPORT_FIELDS = ("assembly__piece_mark", "mark", "joint_type", "size", "size_on_drawing", "size2", "throat", "length",
                 "count", "sides", "thickness1", "thickness2", "position", "wps__number", "process")


def export_lines(job):
    """The job's weld map as CSV lines in the import's shape, lengths in the job's system: read with values_list in
    chunks (no model objects) and each distinct length formatted once (core.fields.exact_length_text), so a
    100,000-weld export streams at steady memory."""
    system = job.unit_system
    welds = (Weld.objects.filter(assembly__job=job).order_by("assembly__piece_mark", "mark")
             .values_list(*EXPORT_FIELDS).iterator(chunk_size=lists.CSV_CHUNK))

    def text(length):
        return exact_length_text(length, system) if length is not None else ""

    first = next(welds, None)  # the query runs now: a database that fails answers 503 before the response starts

    def rows():
        for piece, mark, joint, size, drawn, size2, throat, length, count, sides, t1, t2, position, wps, process \
                in itertools.chain([first] if first else [], welds):
            leg_drawn = drawn or throat is None  # a leg derived from the throat is not exported
            # only the typed text (marks, WPS number) can start like a formula; lengths and choices cannot
            yield [_safe(piece), _safe(mark), joint, text(size) if leg_drawn else "", text(size2), text(throat),
                   text(length), count, sides, text(t1), text(t2), position, _safe(wps), process]

    return lists.csv_lines(COLUMNS, rows())


def export_weld_map(job) -> str:
    """The whole export as one text (tests, small jobs); pages stream export_lines."""
    return "".join(export_lines(job))
