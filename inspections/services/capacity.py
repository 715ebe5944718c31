"""Fillet weld capacity of a weld-map line, of an inspection, and of the standalone calculator, as snapshots.

Every figure comes from the engine, inspections.strength (AISC 360-16 J2, J4, B3); this module only gathers the
inputs from the records, calls the engine and turns its results into a JSON-friendly snapshot dict that the
pages, the calculation sheet (HTML and PDF), the NCR (NCR.capacity_calculation) and the traveler all read.
A snapshot never raises: bad or missing data comes back as snapshot["error"] with a message a person can act on.

Conventions (recorded in DEVELOPERS.md):
- One weld line: a Weld row is `count` identical welds of `length` each (two per count when welded on both
  sides). The capacity and the required strength are for ONE weld line; the mark's total (lines x one line) is
  printed as information only, since separate welds share one load only when the drawing says so.
- Load angle from Weld.load_angle; not end loaded (the weld map does not record it); intermittent when the
  weld has a pitch. FEXX from the WPS electrode (procedures.electrodes.decode(...).tensile_ksi), else 70 ksi,
  and the snapshot says which.
- Required strength is read as LRFD (factored) unless the caller asks for ASD: the job does not record the
  design method, so the snapshot states the assumption.
- As inspected: the smallest measured leg over the length recorded under size; with a leg under size and no
  length recorded, the whole length (conservative). Unequal legs: each leg credited min(measured, specified).

Snapshot keys: kind, title, engine {name, function, spec, version}, system, other_system, method, subject
[(label, value)], inputs [{label, value}], assumptions [str], results [{label, note, main {nominal, lrfd, asd},
other {...}, values {nominal_kip, ...}}], required, ratio, ratio_conservative, ok, governs, trail [{title,
rows [{label, expression, value}]}], steps [[label, expression, value]] (the trail flattened), fexx, findings
[{criterion, ok, message, source}], error, caution, computed_at, links {sheet, pdf}.
"""

from __future__ import annotations

from decimal import Decimal

from django.urls import reverse
from django.utils import timezone

from core.units import (
    KIP_TO_KN,
    Force,
    Length,
    format_force,
    format_length,
    inch_fraction,
    parse_force,
    parse_length,
    significant,
)
from inspections import strength
from procedures.electrodes import decode

DEFAULT_FEXX = "70 ksi"
METHODS = ("LRFD", "ASD")
FIGURES = 4  # significant figures printed for forces (the engine keeps full Decimal precision)

CAUTION = ("The engineer of record decides whether a weld is adequate; Legwork checks the arithmetic of AISC 360-16 "
           "section J2 from the inputs shown, not the design, the load or the load path.")
# What a weld-metal figure of AISC 360-16 J2.4 never counts: said on every capacity card, sheet and traveler.
NOT_COUNTED = ("The figure is the weld metal's shear strength from the throat and length only: it does not count "
               "cracks, undercut, porosity, incomplete fusion or any other defect, and the base metal along the weld "
               "(AISC 360-16 J4) is not checked unless a base-metal check is made.")
# Findings that speak of the throat's size: their rejection is what the as-inspected figure does count.
SIZE_CRITERIA = ("undersize", "throat", "root_opening", "fit_up")


# --- small formatting helpers (printing only: no engineering rule lives here) --------------------------------

def other_system(system: str) -> str:
    return "SI" if system == "US" else "US"


def length_arg(length: Length, system: str) -> str:
    """A stored length as text the engine reads in the job's system: '0.25 in', '6 mm' (exact where it can be)."""
    if system == "US":
        inches = length.inch
        if not inch_fraction(inches)[3]:
            inches = inches.quantize(Decimal("1e-10")).normalize()  # a mm value in inches: 10 places is plenty
        return f"{format(inches, 'f')} in"
    return f"{format(length.mm.normalize(), 'f')} mm"


def length_shown(length: Length | None, system: str) -> str:
    """1/4" (6.35 mm) on a US job, 6 mm (0.236 in) on an SI job."""
    if length is None:
        return "-"
    if system == "US":
        return f"{format_length(length, 'US')} ({format_length(length, 'SI')})"
    return f"{format_length(length, 'SI')} ({_fig(length.inch, 3)} in)"


def _fig(value: Decimal, figures: int = FIGURES) -> str:
    return format(significant(Decimal(value), figures).normalize(), "f")


def force_shown(kip: Decimal, system: str) -> str:
    return f"{_fig(kip * KIP_TO_KN)} kN" if system == "SI" else f"{_fig(kip)} kip"


def _force_text(force: Force | None, system: str) -> str | None:
    if force is None:
        return None
    return f"{format_force(force, system)} ({format_force(force, other_system(system))})"


def _figures(result, system: str) -> dict:
    nominal = getattr(result, "nominal_kip", None)  # a connection has no single nominal strength
    return {"nominal": "-" if nominal is None else force_shown(nominal, system),
            "lrfd": force_shown(result.lrfd_kip, system), "asd": force_shown(result.asd_kip, system)}


def _row(label: str, result, system: str, note: str = "") -> dict:
    return {
        "label": label, "note": note, "main": _figures(result, system),
        "other": _figures(result, other_system(system)),
        "values": {name: str(getattr(result, name)) for name in
                   ("nominal_kip", "lrfd_kip", "asd_kip", "nominal_kN", "lrfd_kN", "asd_kN")
                   if hasattr(result, name)},
    }


def _flat_steps(snapshot: dict) -> None:
    """Also every step as [label, expression, value] under "steps": the shape NCR JSON stored before snapshots."""
    snapshot["steps"] = [[row["label"], row["expression"], row["value"]] for section in snapshot["trail"]
                         for row in section["rows"]]


def _section(title: str, steps) -> dict:
    return {"title": title, "rows": [{"label": s.label, "expression": s.expression, "value": s.value} for s in steps]}


def _findings(findings) -> list:
    return [{"criterion": f.criterion, "ok": f.ok, "message": f.message, "source": f.source} for f in findings]


def _ratio(value: Decimal | None) -> str | None:
    return None if value is None else format(significant(Decimal(value), 3), "f")  # 1.50, 0.619


def _snapshot(kind: str, title: str, function: str, system: str, method: str) -> dict:
    return {
        "kind": kind, "title": title,
        "engine": {"name": "inspections.strength", "function": function, "spec": strength.SPEC,
                   "version": strength.ENGINE_VERSION},
        "system": system, "other_system": other_system(system), "method": method,
        "subject": [], "inputs": [], "assumptions": [], "results": [], "required": None, "ratio": None,
        "ratio_conservative": None, "ok": None, "governs": None, "trail": [], "steps": [], "findings": [],
        "error": None, "fexx": None, "not_counted": NOT_COUNTED, "defects_not_counted": [],
        "caution": CAUTION, "computed_at": timezone.localtime().isoformat(timespec="seconds"), "links": {},
    }


def base_metal_check_url(weld, leg=None) -> str:
    """The calculator with this weld's data, ready for the base-metal check (plate thickness = the thinner part;
    the engineer picks the material): AISC 360-16 J4 next to J2.4."""
    from urllib.parse import urlencode

    system = weld.assembly.job.unit_system
    fexx, _ = fexx_for_weld(weld)
    query = {"system": system, "leg": length_arg(leg or weld.size, system), "length": length_arg(weld.length, system),
             "fexx": fexx, "angle": format(weld.load_angle.normalize(), "f"),
             "thinner_part": length_arg(weld.thinner_part, system),
             "plate_thickness": length_arg(weld.thinner_part, system)}
    if weld.size2 is not None and leg is None:
        query["leg2"] = length_arg(weld.size2, system)
    if weld.required_strength is not None:
        query["required"] = format_force(weld.required_strength, system)
    material = _weakest_known_material(weld)
    if material:
        query["material"] = material
    return f"{reverse('inspections:strength_calculator')}?{urlencode(query)}"


def _weakest_known_material(weld) -> str | None:
    """The calculator's material for the weld's steels (Weld.base_metals), the weakest where they differ; None when
    the weld map names none the calculator knows (the engineer then picks it, or gives Fy and Fu)."""
    from procedures.base_metals import base_metal_key

    known = [base_metal_key(name) for name in weld.base_metal_list]
    known = [key for key in known if key in strength.MATERIALS]
    if not known:
        return None
    return min(known, key=lambda key: strength.MATERIALS[key][1][1])


# --- records -> engine inputs -------------------------------------------------------------------------------

def fexx_for_weld(weld) -> tuple[str, str]:
    """(FEXX text, where it came from): the WPS electrode's tensile strength, else 70 ksi (stated)."""
    if weld.wps_id:
        electrode = weld.wps.electrode
        try:
            return f"{decode(electrode).tensile_ksi} ksi", f"from {weld.wps}, electrode {electrode}"
        except ValueError:
            return DEFAULT_FEXX, (f"the WPS electrode {electrode!r} could not be read: 70 ksi assumed "
                                  "(E70 filler metal)")
    return DEFAULT_FEXX, "no WPS on the weld: 70 ksi assumed (E70 filler metal)"


def _lines(weld) -> int:
    return weld.count * (2 if weld.sides == "both" else 1)


def _subject(weld) -> list:
    assembly = weld.assembly
    return [["Job", str(assembly.job)], ["Assembly", f"{assembly.piece_mark} (drawing {assembly.drawing} rev "
                                                       f"{assembly.drawing_revision})"], ["Weld", weld.mark]]


def _weld_inputs(weld, system: str, fexx: str, fexx_source: str) -> list:
    legs = length_shown(weld.size, system)
    if weld.size2 is not None and weld.size2 != weld.size:
        legs = f"{legs} x {length_shown(weld.size2, system)}"
    rows = [{"label": "Specified throat a (the drawing gives it)", "value": length_shown(weld.throat, system)}] \
        if weld.throat is not None else []
    rows += [
        {"label": "Specified leg(s)" + ("" if weld.size_on_drawing or weld.throat is None else
                                        " (from the throat a: w = a / 0.707)"), "value": legs},
        {"label": "Length of one weld line", "value": length_shown(weld.length, system)},
        {"label": "Weld lines of this mark", "value": f"{weld.count} x {weld.get_sides_display().lower()}"
                                                      f" = {_lines(weld)}"},
        {"label": "Filler metal FEXX", "value": f"{fexx} ({fexx_source})"},
        {"label": "Load angle to the weld axis", "value": f"{_fig(weld.load_angle, 4)} deg"},
        {"label": "Thinner part joined", "value": length_shown(weld.thinner_part, system)},
    ]
    if weld.pitch is not None:
        rows.append({"label": "Intermittent, pitch", "value": length_shown(weld.pitch, system)})
    return rows


def _not_fillet(snapshot: dict, weld) -> dict:
    snapshot["error"] = (f"Weld {weld.mark} is a {weld.get_joint_type_display().lower()} weld: Legwork calculates "
                         "fillet welds only (AISC 360-16 J2.4); the engineer of record rates other welds.")
    return snapshot


def _method(method) -> str:
    return method if method in METHODS else "LRFD"


def capacity_for_weld(weld, method: str = "LRFD") -> dict:
    """Design capacity of one weld line as the weld map specifies it (size/size2, length, angle, WPS filler).

    weld should come with assembly__job and wps selected. Never raises: see snapshot["error"]."""
    method = _method(method)
    system = weld.assembly.job.unit_system
    snapshot = _snapshot("design", f"Design capacity of weld {weld.mark}", "fillet_strength", system, method)
    snapshot["subject"] = _subject(weld)
    snapshot["links"] = {"sheet": reverse("inspections:weld_capacity", args=[weld.pk]),
                         "pdf": reverse("inspections:weld_capacity_pdf", args=[weld.pk])}
    if weld.joint_type != "fillet":
        return _not_fillet(snapshot, weld)
    snapshot["links"]["base_metal"] = base_metal_check_url(weld)
    fexx, fexx_source = fexx_for_weld(weld)
    snapshot["fexx"] = fexx
    snapshot["inputs"] = _weld_inputs(weld, system, fexx, fexx_source)
    snapshot["assumptions"] = [f"Filler metal: {fexx_source}.", "Not end loaded (the weld map does not say).",
                               f"Figures are for one weld line; required strength as {method}."]
    try:
        result = strength.fillet_strength(
            length_arg(weld.size, system), length_arg(weld.length, system), fexx, str(weld.load_angle),
            leg2=None if weld.size2 is None else length_arg(weld.size2, system),
            thinner_part=length_arg(weld.thinner_part, system), intermittent=weld.pitch is not None)
        check = _required(result, weld.required_strength, method)
    except ValueError as exc:
        snapshot["error"] = f"The capacity cannot be calculated from this weld map line: {exc}"
        return snapshot
    snapshot["results"] = [_row("One weld line as specified", result, system)]
    lines = _lines(weld)
    if lines > 1:
        total = strength.Capacity(**{k: getattr(result, k) * lines for k in
                                     ("nominal_kip", "lrfd_kip", "asd_kip", "nominal_kN", "lrfd_kN", "asd_kN")})
        snapshot["results"].append(_row(f"All {lines} lines of this mark", total, system,
                                        note="sum of identical lines: only where they share one load"))
    snapshot["trail"] = [_section("Fillet weld, one line (AISC 360-16 J2.4)", result.steps)]
    snapshot["findings"] = _findings(result.findings)
    _apply_check(snapshot, check, system)
    _flat_steps(snapshot)
    return snapshot


def _required(result, required: Force | None, method: str):
    if required is None:
        return None
    return strength.demand_capacity(result, f"{required.kn} kN", method)


def _apply_check(snapshot: dict, check, system: str) -> None:
    if check is None:
        return
    snapshot["required"] = _force_text(check.required, system)
    snapshot["ratio"] = _ratio(check.ratio)
    snapshot["ok"] = check.ok
    snapshot["trail"].append(_section(f"Required strength ({strength.SPEC} B3)", check.steps))
    snapshot["findings"] += _findings(check.findings)


def capacity_for_inspection(inspection, method: str = "LRFD") -> dict:
    """As-inspected capacity of the inspected weld line from its smallest measured leg and the length under size,
    with the conservative figure and the required-strength ratio. Never raises: see snapshot["error"].

    inspection should come with weld__assembly__job and weld__wps selected."""
    method = _method(method)
    weld = inspection.weld
    system = weld.assembly.job.unit_system
    snapshot = _snapshot("as_inspected", f"As-inspected capacity of weld {weld.mark}", "as_inspected_capacity",
                         system, method)
    snapshot["subject"] = _subject(weld) + [
        ["Inspection", f"{inspection.get_stage_display()}, {timezone.localtime(inspection.inspected_at):%Y-%m-%d %H:%M}"
                       f", {inspection.inspector}, {'accepted' if inspection.accepted else 'rejected'}"]]
    snapshot["links"] = {"sheet": reverse("inspections:inspection_capacity", args=[inspection.pk]),
                         "pdf": reverse("inspections:inspection_capacity_pdf", args=[inspection.pk])}
    if weld.joint_type != "fillet":
        return _not_fillet(snapshot, weld)
    fexx, fexx_source = fexx_for_weld(weld)
    snapshot["fexx"] = fexx
    smallest_spec = weld.smaller_leg
    snapshot["defects_not_counted"] = defects_not_counted(inspection)
    assumptions = [f"Filler metal: {fexx_source}.", "Not end loaded (the weld map does not say).",
                   f"Figures are for the one weld line inspected; required strength as {method}."]
    measured, under = inspection.smallest_leg, inspection.undersize_length
    snapshot["links"]["base_metal"] = base_metal_check_url(
        weld, leg=measured if measured is not None and measured < smallest_spec else None)
    if measured is None:
        measured, under = smallest_spec, Length(Decimal(0))
        assumptions.append("No smallest leg was recorded: the weld is taken at its specified size.")
    elif under is None:
        if measured < smallest_spec:
            under = weld.length
            assumptions.append("A leg under size was recorded without the length under size: the whole length is "
                               "taken as under size (conservative).")
        else:
            under = Length(Decimal(0))
    if under > weld.length:
        assumptions.append(f"The length under size recorded ({format_length(under, system)}) is longer than the "
                           "weld: the whole length is taken.")
        under = weld.length
    snapshot["assumptions"] = assumptions
    from_throat = inspection.min_size is None and inspection.min_size2 is None and inspection.throat is not None
    snapshot["inputs"] = _weld_inputs(weld, system, fexx, fexx_source) + [
        {"label": "Smallest leg measured" + (f" (from the throat a = {format_length(inspection.throat, system)} "
                                             "measured)" if from_throat else ""),
         "value": length_shown(measured, system)},
        {"label": "Length under size", "value": length_shown(under, system)},
    ]
    required = weld.required_strength
    if required is not None:
        snapshot["inputs"].append({"label": f"Required strength ({method})", "value": _force_text(required, system)})
    try:
        result = strength.as_inspected_capacity(
            length_arg(weld.size, system), length_arg(weld.length, system), length_arg(measured, system),
            length_arg(under, system), fexx=fexx, angle=str(weld.load_angle),
            required=None if required is None else f"{required.kn} kN", method=method,
            specified_leg2=None if weld.size2 is None else length_arg(weld.size2, system))
    except ValueError as exc:
        snapshot["error"] = f"The capacity cannot be calculated from this inspection: {exc}"
        return snapshot
    snapshot["results"] = [
        _row("As inspected", result.as_inspected, system, note="smallest leg over the length under size"),
        _row("Conservative", result.conservative, system, note="smallest leg over the whole length"),
        _row("As specified", result.specified, system, note="the weld map's size"),
    ]
    snapshot["trail"] = [_section("Specified weld (AISC 360-16 J2.4)", result.specified.steps),
                         _section("As inspected (AISC 360-16 J2.4)", result.steps)]
    snapshot["findings"] = _findings(result.findings)
    if result.ratio is not None:
        snapshot["required"] = _force_text(result.required, system)
        snapshot["ratio"], snapshot["ratio_conservative"] = _ratio(result.ratio), _ratio(result.ratio_conservative)
        snapshot["ok"] = result.ratio <= 1
    _flat_steps(snapshot)
    return snapshot


# --- the standalone calculator ------------------------------------------------------------------------------

class CalculatorInputError(ValueError):
    """An engine refusal tied to one calculator input (field is the form field's name, or None)."""

    def __init__(self, field: str | None, message: str):
        super().__init__(message)
        self.field = field


_PLATE_FIELDS = (("Net area", "net_area"), ("Plate width", "plate_width"), ("Plate thickness", "plate_thickness"),
                 ("Fy", "fy"), ("Fu", "fu"), ("material", "material"), ("Material", "material"))


def _plate_field(message: str) -> str | None:
    for word, name in _PLATE_FIELDS:
        if word in message:
            return name
    return None


def capacity_for_calculator(data: dict) -> dict:
    """A calculation from typed inputs, no record. data holds engine-ready text (lengths with units):

    system, leg, leg2, length, fexx, angle, end_loaded, intermittent, thinner_part, edge_thickness, plate_width,
    plate_thickness, material (an inspections.strength.MATERIALS key or ''), fy, fu, net_area, required, method.
    Raises CalculatorInputError (with the field) when the engine refuses an input."""
    system, method = data["system"], _method(data.get("method"))
    snapshot = _snapshot("calculator", "Fillet weld strength", "fillet_strength", system, method)
    snapshot["fexx"] = data["fexx"]
    try:
        weld = strength.fillet_strength(
            data["leg"], data["length"], data["fexx"], data["angle"], leg2=data.get("leg2"),
            end_loaded=bool(data.get("end_loaded")), thinner_part=data.get("thinner_part"),
            along_edge_thickness=data.get("edge_thickness"), intermittent=bool(data.get("intermittent")))
    except ValueError as exc:
        raise CalculatorInputError(None, str(exc)) from None
    snapshot["results"] = [_row("Fillet weld line", weld, system)]
    snapshot["trail"] = [_section("Fillet weld (AISC 360-16 J2.4)", weld.steps)]
    snapshot["findings"] = _findings(weld.findings)

    plates, governing = [], weld
    if data.get("plate_thickness"):
        material = data.get("material") or None
        named = strength.MATERIALS[material][0] if material else None
        stresses = {"material": named} if named else {"fy": data.get("fy"), "fu": data.get("fu")}
        try:
            plates.append(strength.base_metal_shear(data["plate_thickness"], data["length"], **stresses))
            if data.get("plate_width"):
                plates.append(strength.plate_tension(data["plate_width"], data["plate_thickness"],
                                                     net_area=data.get("net_area"), **stresses))
        except ValueError as exc:
            raise CalculatorInputError(_plate_field(str(exc)), str(exc)) from None
        for plate in plates:
            title = "Plate shear along the weld" if plate.check == "shear" else "Plate in tension"
            for state in plate.limit_states:
                snapshot["results"].append(_row(f"Plate: {state.name}", state, system, note=state.source))
            snapshot["trail"].append(_section(f"{title} ({strength.SPEC} J4)", plate.steps))
        connection = strength.connection_capacity(weld, plates)
        governing = connection
        snapshot["results"].append(_row("Connection: the smallest governs", connection, system,
                                        note=f"LRFD: {connection.governing_lrfd}; ASD: {connection.governing_asd}"))
        snapshot["governs"] = connection.governing_lrfd if method == "LRFD" else connection.governing_asd
        snapshot["trail"].append(_section("Which governs: the welds or the plate", connection.steps))
    if data.get("required"):
        try:
            check = strength.demand_capacity(governing, data["required"], method)
        except ValueError as exc:
            raise CalculatorInputError("required", str(exc)) from None
        _apply_check(snapshot, check, system)

    def shown(name):
        return length_shown(parse_length(data[name]), system) if data.get(name) else None

    legs = shown("leg") + (f" x {shown('leg2')}" if data.get("leg2") else "")
    stress = strength.filler_strength(data["fexx"])
    inputs = [("Leg(s)", legs), ("Length of the weld line", shown("length")),
              ("Filler metal FEXX", f"{data['fexx']} ({_fig(stress.mpa, 4)} MPa, {_fig(stress.ksi, 4)} ksi)"),
              ("Load angle to the weld axis", f"{data['angle']} deg"),
              ("End loaded", "yes" if data.get("end_loaded") else "no"),
              ("Intermittent segment", "yes" if data.get("intermittent") else "no"),
              ("Thinner part joined", shown("thinner_part")), ("Thickness along the edge", shown("edge_thickness")),
              ("Plate thickness", shown("plate_thickness")), ("Plate width", shown("plate_width")),
              ("Plate material", strength.MATERIALS[data["material"]][0] if data.get("material") else None),
              ("Fy", data.get("fy")), ("Fu", data.get("fu")), ("Effective net area", data.get("net_area")),
              (f"Required strength ({method})",
               _force_text(parse_force(data["required"]), system) if data.get("required") else None)]
    snapshot["inputs"] = [{"label": label, "value": value} for label, value in inputs if value]
    snapshot["assumptions"] = ["One weld line loaded through its centroid.",
                               "Plate tension without a net area takes Ae = Ag (U = 1.0): shear lag is the "
                               "engineer's (AISC 360-16 D3)." if len(plates) > 1 and not data.get("net_area") else ""]
    snapshot["assumptions"] = [a for a in snapshot["assumptions"] if a]
    _flat_steps(snapshot)
    return snapshot


# --- stored snapshots and the summary partial ---------------------------------------------------------------

def normalize(snapshot: dict | None) -> dict | None:
    """A stored calculation as the summary partial reads it; older NCR JSON (steps as lists) is mapped over."""
    if not snapshot or not isinstance(snapshot, dict):
        return None
    if "trail" in snapshot:
        snapshot.setdefault("not_counted", NOT_COUNTED)  # stored before the limits were said on every figure
        snapshot.setdefault("defects_not_counted", [])
        return snapshot
    system = snapshot.get("system") if snapshot.get("system") in ("US", "SI") else "US"
    shaped = _snapshot("as_inspected", "As-inspected capacity (as stored)", str(snapshot.get("engine", "")), system,
                       _method(snapshot.get("method")))
    shaped["computed_at"] = snapshot.get("computed_at")
    try:
        values = {k: Decimal(str(snapshot[k])) for k in ("lrfd_kip", "asd_kip")}
        shaped["results"] = [{"label": "As inspected", "note": "", "values": {},
                              "main": {"nominal": "", "lrfd": force_shown(values["lrfd_kip"], system),
                                       "asd": force_shown(values["asd_kip"], system)},
                              "other": {"nominal": "", "lrfd": force_shown(values["lrfd_kip"], other_system(system)),
                                        "asd": force_shown(values["asd_kip"], other_system(system))}}]
    except (KeyError, ArithmeticError, TypeError, ValueError):
        shaped["results"] = []
    rows = [{"label": s[0], "expression": s[1], "value": s[2]} for s in snapshot.get("steps") or []
            if isinstance(s, (list, tuple)) and len(s) == 3]
    shaped["trail"] = [{"title": "Calculation", "rows": rows}] if rows else []
    shaped["findings"] = [f for f in snapshot.get("findings") or [] if isinstance(f, dict)]
    ratio = snapshot.get("ratio")
    if ratio is not None:
        try:
            shaped["ratio"] = _ratio(Decimal(str(ratio)))
            shaped["ok"] = Decimal(str(ratio)) <= 1
        except ArithmeticError:
            pass
    return shaped


def latest_inspection(weld):
    """The weld's most recent inspection that no correction supersedes (kept on the weld row at signing), or None."""
    return weld.latest_inspection


def capacity_cards(*, weld=None, inspection=None, ncr=None, method: str = "LRFD") -> list[dict]:
    """What templates/inspections/partials/capacity_summary.html reads, for a weld, an inspection or an NCR.

    NCR: the calculation stored with its use-as-is disposition when there is one (as issued, never recomputed),
    otherwise the live figure from the inspection that opened it. Weld: the design capacity, and the as-inspected
    capacity of its latest current inspection when that found a leg under size. Inspection: the as-inspected
    capacity when it found a leg under size (nothing otherwise: a full-size weld has its design capacity).
    The inspection should come with weld__wps selected, else one query reads the WPS."""
    capacities = []
    if ncr is not None:
        stored = normalize(ncr.capacity_calculation)
        if stored is not None:
            stored["stored"] = True
            stored["defects_not_counted"] = stored["defects_not_counted"] or defects_not_counted(ncr.inspection)
            capacities.append(stored)
        else:
            capacities.append(capacity_for_inspection(ncr.inspection, method))
    elif inspection is not None:
        if found_undersize(inspection, inspection.weld):
            capacities.append(capacity_for_inspection(inspection, method))
    elif weld is not None:
        capacities.append(capacity_for_weld(weld, method))
        latest = latest_inspection(weld)
        if latest is not None and found_undersize(latest, weld):
            latest.weld = weld  # already loaded with its job and WPS
            capacities.append(capacity_for_inspection(latest, method))
    return capacities


def found_undersize(inspection, weld) -> bool:
    """Did the inspection record a leg under the specified size (Inspection.smallest_leg against
    Weld.smaller_leg)? Only then is an as-inspected figure news."""
    measured = inspection.smallest_leg
    return measured is not None and measured < weld.smaller_leg


def defects_not_counted(inspection) -> list[str]:
    """The criteria this inspection failed that the capacity figure does not count (a crack, undercut, ...), in the
    findings' words."""
    from inspections.observations import criterion_label

    return [criterion_label(f.get("criterion", "")) for f in inspection.findings or []
            if isinstance(f, dict) and not f.get("ok") and f.get("criterion") not in SIZE_CRITERIA]
