"""What the WPS, PQR and welder pages show and their printed documents print, gathered before rendering.

Views and the packet builder (inspections.packets) both call these, so a page and its PDF never disagree and no
module imports a view. Nothing here renders or answers a request.
"""

from django.db.models import Prefetch
from django.urls import NoReverseMatch
from django.utils import timezone

from core import history, units
from core.vocabulary import JointType, Process
from procedures import eligibility
from procedures.electrodes import decode
from procedures.models.welders import ContinuityEntry, ContinuityRun, Qualification, Welder
from procedures.models.wps import WPS, WPSState


def _range(low, high, fmt):
    if low is None and high is None:
        return "—"
    if low is None or high is None or low == high:
        return fmt(low if low is not None else high)
    return f"{fmt(low)} to {fmt(high)}"

def _electrode(wps):
    try:
        return decode(wps.electrode), ""
    except ValueError as exc:
        return None, str(exc)

def variables(wps):
    """Every variable of the WPS as (section, [(label, text)]) in its own unit system; pages and the PDF."""
    system = wps.unit_system

    def length(value):
        return units.format_length(value, system) if value is not None else "—"

    def temp(value):
        return units.format_temperature(value, system) if value is not None else "—"

    def speed(value):
        return units.format_speed(value, system)

    def flow(value):
        return units.format_flow(value, system)

    def plain(unit):
        return lambda value: f"{units._plain(value)} {unit}"

    heat = wps.heat_input_range()
    process = wps.get_process_display()
    if wps.process == Process.GMAW and wps.transfer:
        process += f"; transfer: {wps.get_transfer_display()}"
    return [
        ("Process and filler metal", [
            ("Process", process),
            ("Electrode", wps.electrode),
            ("Electrode diameter", diameter(wps.electrode_diameter, system)),
            ("Current and polarity", wps.get_current_display()),
        ]),
        ("Electrical and travel", [
            ("Current", _range(wps.amperage_min, wps.amperage_max, plain("A"))),
            ("Arc voltage", _range(wps.voltage_min, wps.voltage_max, plain("V"))),
            ("Wire feed speed", _range(wps.wire_feed_min, wps.wire_feed_max, speed)),
            ("Travel speed", _range(wps.travel_speed_min, wps.travel_speed_max, speed)),
            ("Heat input", heat_text(heat, system)),
            ("Contact tip to work (stick-out)", _range(wps.ctwd_min, wps.ctwd_max, length)),
        ]),
        ("Technique", [
            ("Technique", wps.get_technique_display()),
            ("Passes", wps.get_passes_display()),
            ("Work angle", wps.work_angle or "—"),
            ("Travel angle", wps.travel_angle or "—"),
            ("Interpass cleaning", wps.interpass_cleaning or "—"),
            ("Shielding gas", wps.shielding_gas or "None (self-shielded or flux)"),
            ("Gas flow", _range(wps.gas_flow_min, wps.gas_flow_max, flow)),
        ]),
        ("Joints and base metal", [
            ("Positions", ", ".join(wps.position_list) or "—"),
            ("Joint types", ", ".join(JointType(j).label for j in wps.joint_type_list if j in JointType.values) or "—"),
            ("Base metals", wps.base_metals or "—"),
            ("Base metal thickness", _range(wps.thickness_min, wps.thickness_max, length)),
            ("Fillet size", _range(wps.fillet_size_min, wps.fillet_size_max, length)),
            ("Largest single-pass fillet", length(wps.single_pass_size_max)),
        ]),
        ("Temperatures", [
            ("Minimum preheat", temp(wps.preheat_min)),
            ("Maximum interpass", temp(wps.interpass_max)),
        ]),
    ]

def diameter(value, system):
    """Wire is sold by decimal inch (0.045"), rod by fraction (1/8"): a fraction only when it is exact."""
    if value is None:
        return "—"
    if system == "US" and not units.inch_fraction(value.inch)[3]:
        return f'{units._plain(value.inch)}"'
    return units.format_length(value, system)

def in_order(codes, order=("F", "H", "V", "OH")):
    return ", ".join(sorted(codes, key=lambda c: order.index(c) if c in order else len(order)))

def heat_text(heat, system):
    if heat is None:
        return "— (needs volts, amps and travel speed ranges)"
    other = "SI" if system == "US" else "US"
    return (f"{units.format_heat_input(heat.minimum, system)} to {units.format_heat_input(heat.maximum, system)} "
            f"({units.format_heat_input(heat.minimum, other)} to {units.format_heat_input(heat.maximum, other)})")

def wps_context(wps):
    """What the WPS page and the printed WPS show, gathered in a fixed number of queries."""
    findings = wps.findings()
    decoded, decode_error = _electrode(wps)
    envelope, envelope_error = wps.support_envelope()
    return {
        "envelope": envelope, "envelope_error": envelope_error,
        "wps": wps,
        "findings": findings,
        "errors": [f for f in findings if f.severity == "error"],
        "blockers": wps.approval_blockers(findings),
        "sections": variables(wps),
        "decoded": decoded,
        "decoded_positions": in_order(decoded.positions) if decoded else "",
        "decoded_currents": in_order(decoded.currents, ("AC", "DCEP", "DCEN")) if decoded else "",
        "decoded_processes": ", ".join(sorted(decoded.processes)) if decoded else "",
        "decode_error": decode_error,
        "pqrs": list(wps.pqrs.all()),
        "history": history.panel(wps),
        "heat": wps.heat_input_range(),
        "next_revision": WPS.objects.filter(supersedes=wps).only("pk", "number", "revision").first(),
    }

def wps_document(wps):
    """Everything the printed WPS shows, gathered before rendering (the renderer never queries)."""
    context = wps_context(wps)
    context["approved"] = wps.state in (WPSState.APPROVED, WPSState.SUPERSEDED) and wps.approved_by_id is not None
    return context

def pqr_rows(pqr):
    """The coupon's values as (label, text) in the PQR's unit system."""
    system = pqr.unit_system
    heat = pqr.heat_input
    other = "SI" if system == "US" else "US"
    return [
        ("Process", pqr.get_process_display()),
        ("Electrode", pqr.electrode),
        ("Electrode diameter", diameter(pqr.electrode_diameter, system)),
        ("Current and polarity", pqr.get_current_display()),
        ("Current", f"{units._plain(pqr.amperage)} A"),
        ("Arc voltage", f"{units._plain(pqr.voltage)} V"),
        ("Travel speed", units.format_speed(pqr.travel_speed, system)),
        ("Heat input", f"{units.format_heat_input(heat, system)} ({units.format_heat_input(heat, other)})"
         if heat else "—"),
        ("Test position", pqr.position),
        ("Base metal", pqr.base_metal),
        ("Coupon thickness", units.format_length(pqr.thickness, system)),
        ("Shielding gas", pqr.shielding_gas or "—"),
        ("Preheat", units.format_temperature(pqr.preheat, system) if pqr.preheat else "—"),
    ]


# --- welders ------------------------------------------------------------------------------------------

def welder_with_records(pk, continuity=True):
    """One welder with everything its page shows, in a fixed number of queries; continuity=False leaves the
    continuity history out (the page shows it a page at a time: welder_context(continuity=...))."""
    prefetches = [Prefetch("qualifications", queryset=Qualification.objects.select_related("wps", "recorded_by")
                           .order_by("-test_date", "-pk")),
                  Prefetch("continuity_runs", queryset=ContinuityRun.objects.order_by("-last_use"))]
    if continuity:
        prefetches.append(Prefetch("continuity", queryset=continuity_entries()))
    return Welder.objects.prefetch_related(*prefetches).get(pk=pk)


def continuity_entries():
    """Continuity entries newest first, with what their lines print."""
    return ContinuityEntry.objects.select_related("weld__assembly__job", "repair__weld__assembly__job", "repair__ncr",
                                                  "entered_by").order_by("-date", "-pk")


def continuity_evidence(welder) -> tuple[list, int]:
    """(the entries a printed summary lists, how many are recorded): per process the fewest uses that show every
    run unbroken (procedures.qualification.continuity_evidence), newest first. Two queries whatever the history's
    length: ten years of a welder's production print as a few lines a year, not thousands."""
    from procedures.qualification import continuity_evidence as fewest

    rows = list(welder.continuity.order_by("process", "date", "pk").values_list("pk", "process", "date"))
    days = {}
    for pk, process, day in rows:
        days.setdefault(process, {}).setdefault(day, pk)
    wanted = [found[day] for found in days.values() for day in fewest(found)]
    return list(continuity_entries().filter(pk__in=wanted)), len(rows)


def welder_context(welder, continuity=None):
    """What the welder page and the printed qualification summary show; continuity: the entries to list (default
    every one, as the printed summary lists them)."""
    today = timezone.localdate()
    status = eligibility.welder_status(welder, on=today)
    by_pk = {r.qualification.pk: r for r in status.records}
    tests = [{"q": q, "ranges": eligibility.describe(q), "status": by_pk[q.pk].status,
              "thickness": eligibility.length_text(q.test_thickness, q.unit_system)}
             for q in welder.qualifications.all()]
    entries = list(welder.continuity.all() if continuity is None else continuity)
    return {
        "welder": welder, "status": status, "tests": tests, "today": today,
        "runs": list(welder.continuity_runs.all()),
        # (entry, link, hidden): core.visibility.continuity_for hides other customers' jobs from a viewer
        "continuity": [(entry, weld_url(entry.weld_used), False) for entry in entries],
        "history": history.panel(welder, *welder.qualifications.all(), *entries),
        "history_mixed": True,
    }


def weld_url(weld):
    """The weld's page (or its assembly's) when the jobs pages have one; None otherwise."""
    if weld is None:
        return None
    for record in (weld, weld.assembly):
        try:
            return record.get_absolute_url()
        except NoReverseMatch:
            continue
    return None
