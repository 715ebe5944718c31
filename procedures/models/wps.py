"""Welding procedure specifications and the qualification records behind them.

A WPS moves draft -> submitted -> approved -> superseded, or approved -> withdrawn (procedures.services.wps,
each step through core.transitions). Only a draft is edited. A change to an approved WPS is a new revision (a
new row) that supersedes it when approved.
"""

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.urls import reverse
from django.utils import timezone

from core import units
from core.fields import FlowField, LengthField, SpeedField, TemperatureField
from core.locking import Guarded, GuardedQuerySet, Lock, Move
from core.vocabulary import Backing, Current, JointType, Process, Progression, UnitSystem, split_codes
from procedures import heat_input as heat_input_engine
from procedures import prequalified, support


class Transfer(models.TextChoices):
    SHORT_CIRCUIT = "short_circuit", "Short-circuiting (GMAW-S)"
    GLOBULAR = "globular", "Globular"
    SPRAY = "spray", "Spray"
    PULSED = "pulsed", "Pulsed spray"


class Technique(models.TextChoices):
    STRINGER = "stringer", "Stringer"
    WEAVE = "weave", "Weave"
    BOTH = "both", "Stringer or weave"


class Passes(models.TextChoices):
    SINGLE = "single", "Single pass"
    MULTI = "multi", "Multi-pass"
    BOTH = "both", "Single or multi-pass"


class Basis(models.TextChoices):
    PREQUALIFIED = "prequalified", "Prequalified"
    QUALIFIED_BY_TEST = "test", "Qualified by test (PQR)"


class WPSState(models.TextChoices):
    DRAFT = "draft", "Draft"
    SUBMITTED = "submitted", "Submitted for approval"
    APPROVED = "approved", "Approved"
    SUPERSEDED = "superseded", "Superseded"
    WITHDRAWN = "withdrawn", "Withdrawn"


EDITABLE_STATES = {WPSState.DRAFT}
FROZEN_STATES = {WPSState.SUBMITTED, WPSState.APPROVED, WPSState.SUPERSEDED, WPSState.WITHDRAWN}
CODES = [("AWS D1.1:2020", "AWS D1.1/D1.1M:2020"), ("ISO 15609-1:2019", "ISO 15609-1:2019 (ISO 5817 shops)")]


class PQRLock(Lock):
    """A PQR is edited while no procedure beyond a draft names it; behind a submitted, approved, superseded or
    withdrawn WPS it records a test that happened, and is frozen."""

    def frozen_row(self, stored):
        return stored.procedures.exclude(state=WPSState.DRAFT).exists()

    def refusing(self, names):
        return None if names <= self.free else Q(procedures__state__in=FROZEN_STATES)

    def undeletable(self):
        return Q(procedures__state__in=FROZEN_STATES)

    def sql_frozen(self, row="OLD"):
        states = ", ".join(f"'{s}'" for s in sorted(FROZEN_STATES))
        return (f'EXISTS (SELECT 1 FROM "procedures_wps_pqrs" j JOIN "procedures_wps" w ON w."id" = j."wps_id" '
                f'WHERE j."pqr_id" = {row}."id" AND w."state" IN ({states}))')

    def refusal(self, stored, doing="changed"):
        return f"{stored} supports a procedure beyond draft and cannot be {doing}; {self.advice}"


class PQR(Guarded):
    """What was actually used on the test coupon, and how the coupon tested."""

    class Result(models.TextChoices):
        PASS = "pass", "Pass"
        FAIL = "fail", "Fail"
        NOT_TESTED = "not_tested", "Not tested"

    number = models.CharField(max_length=40, unique=True)
    code = models.CharField(max_length=40, choices=CODES, default="AWS D1.1:2020")
    unit_system = models.CharField(max_length=2, choices=UnitSystem.choices, default=UnitSystem.US)
    test_date = models.DateField()
    process = models.CharField(max_length=8, choices=Process.choices)
    transfer = models.CharField("transfer mode (GMAW)", max_length=16, choices=Transfer.choices, blank=True)
    electrode = models.CharField("electrode classification", max_length=40)
    electrode_diameter = LengthField(null=True, blank=True)
    current = models.CharField(max_length=4, choices=Current.choices)
    amperage = models.DecimalField("current (A)", max_digits=6, decimal_places=1)
    voltage = models.DecimalField("arc voltage (V)", max_digits=5, decimal_places=2)
    travel_speed = SpeedField()
    # Nine places, as units.HeatInput rounds: a WPS limit computed from the same volts, amps and speed
    # compares equal to its PQR's value (four places made 30 kJ/in read as 29.9999 and fail the check).
    heat_input_kj_per_mm = models.DecimalField(
        "heat input (kJ/mm)", max_digits=18, decimal_places=9, null=True, blank=True, editable=False,
        help_text="Computed from voltage, current and travel speed",
    )
    position = models.CharField("test position", max_length=10)
    joint = models.CharField("test weld", max_length=8, choices=JointType.choices, blank=True,
                             help_text="Blank: read from the test position (1F-4F, PB, PD fillet; the rest groove)")
    base_metal = models.CharField(max_length=80)
    thickness = LengthField("coupon thickness")
    shielding_gas = models.CharField(max_length=60, blank=True)
    preheat = TemperatureField(null=True, blank=True)
    visual = models.CharField(max_length=12, choices=Result.choices, default=Result.NOT_TESTED)
    macroetch = models.CharField(max_length=12, choices=Result.choices, default=Result.NOT_TESTED)
    bends = models.CharField(max_length=12, choices=Result.choices, default=Result.NOT_TESTED)
    tensiles = models.CharField(max_length=12, choices=Result.choices, default=Result.NOT_TESTED)
    fillet_break = models.CharField(max_length=12, choices=Result.choices, default=Result.NOT_TESTED)
    laboratory = models.CharField(max_length=80, blank=True)
    notes = models.TextField(blank=True)
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = PQRLock("PQR", name=("number",), advice="record a new PQR for a new test.")
    history_exclude = frozenset({"heat_input_kj_per_mm"})  # recomputed from volts, amps and speed, which show

    class Meta:
        ordering = ["number"]
        verbose_name = "PQR"
        verbose_name_plural = "PQRs"
        base_manager_name = "objects"

    def __str__(self):
        return f"PQR {self.number}"

    def get_absolute_url(self):
        return reverse("procedures:pqr_detail", args=[self.pk])

    RESULT_FIELDS = ("visual", "macroetch", "bends", "tensiles", "fillet_break")

    @property
    def passed(self):
        tested = [getattr(self, name) for name in self.RESULT_FIELDS]
        results = [r for r in tested if r != self.Result.NOT_TESTED]
        return bool(results) and all(r == self.Result.PASS for r in results)

    @property
    def results(self):
        """(label, value, display) of each test, in the order a PQR prints them."""
        return [(self._meta.get_field(name).verbose_name.capitalize(), getattr(self, name),
                 getattr(self, f"get_{name}_display")()) for name in self.RESULT_FIELDS]

    @property
    def heat_input(self):
        """The coupon's heat input as a units.HeatInput, recomputed exactly from the recorded volts, amps and
        speed (the stored column is kJ/mm rounded to 9 places, for lists and queries: 30 kJ/in read back
        from it is 29.999999995)."""
        return self.compute_heat_input()

    def compute_heat_input(self):
        """Heat input from the coupon's volts, amps and travel speed (procedures.heat_input does the arithmetic)."""
        if self.voltage is None or self.amperage is None or self.travel_speed is None:
            return None
        try:
            return heat_input_engine.heat_input(self.voltage, self.amperage, self.travel_speed)
        except ValueError:
            return None  # the form refuses such readings beside their fields; a stray one shows no figure

    @property
    def test_joint(self) -> str:
        """The test weld: as recorded, else read from the position (1F-4F, PB and PD are fillet tests)."""
        if self.joint:
            return self.joint
        parts = [p for p in (self.position or "").upper().replace(" ", "").split("+") if p]
        return "fillet" if parts and all(p.endswith("F") or p in ("PB", "PD") for p in parts) else "groove"

    def support_input(self) -> dict:
        """The dict procedures.support reads for this PQR; a value not recorded is None, and the engine names it."""
        system = self.unit_system
        return {
            "number": self.number,
            "process": self.process or None,
            "transfer": (self.transfer or None) if self.process == Process.GMAW else None,
            "electrode": self.electrode or None,
            "current": self.current or None,
            "position": self.position or None,
            "joint": self.test_joint,
            "test_thickness": _length_text(self.thickness, system),
            "amperage": self.amperage,
            "voltage": self.voltage,
            "travel_speed": _speed_text(self.travel_speed, system),
            "shielding_gas": self.shielding_gas or None,
            "preheat": _temperature_text(self.preheat, system),
            "base_metals": split_codes(self.base_metal) or None,
        }

    def save(self, *args, **kwargs):
        # Never typed: always the engine's figure from what was recorded, so it cannot disagree with them.
        computed = self.compute_heat_input()
        self.heat_input_kj_per_mm = computed.kj_per_mm if computed else None
        update_fields = kwargs.get("update_fields")
        if update_fields is not None and "heat_input_kj_per_mm" not in update_fields:
            kwargs["update_fields"] = [*update_fields, "heat_input_kj_per_mm"]
        super().save(*args, **kwargs)


class WPSQuerySet(GuardedQuerySet):
    def approved(self):
        return self.filter(state=WPSState.APPROVED)


class WPS(Guarded):
    """A welding procedure specification, one row per revision. Only a draft is edited (by version); a submitted,
    approved, superseded or withdrawn one changes only by its steps (procedures.services.wps)."""

    number = models.CharField(max_length=40)
    revision = models.PositiveIntegerField(default=0)
    title = models.CharField(max_length=120)
    state = models.CharField(max_length=12, choices=WPSState.choices, default=WPSState.DRAFT, editable=False)
    code = models.CharField("code and edition", max_length=40, choices=CODES, default="AWS D1.1:2020")
    unit_system = models.CharField(max_length=2, choices=UnitSystem.choices, default=UnitSystem.US)
    basis = models.CharField(max_length=12, choices=Basis.choices, default=Basis.PREQUALIFIED)
    pqrs = models.ManyToManyField(PQR, blank=True, related_name="procedures", verbose_name="supporting PQRs")

    process = models.CharField(max_length=8, choices=Process.choices)
    transfer = models.CharField("transfer mode (GMAW)", max_length=16, choices=Transfer.choices, blank=True)
    electrode = models.CharField("electrode classification", max_length=40)
    electrode_diameter = LengthField()
    current = models.CharField("current and polarity", max_length=4, choices=Current.choices)
    amperage_min = models.DecimalField("current min (A)", max_digits=6, decimal_places=1)
    amperage_max = models.DecimalField("current max (A)", max_digits=6, decimal_places=1)
    voltage_min = models.DecimalField("voltage min (V)", max_digits=5, decimal_places=2)
    voltage_max = models.DecimalField("voltage max (V)", max_digits=5, decimal_places=2)
    wire_feed_min = SpeedField("wire feed speed min", null=True, blank=True)
    wire_feed_max = SpeedField("wire feed speed max", null=True, blank=True)
    travel_speed_min = SpeedField()
    travel_speed_max = SpeedField()
    ctwd_min = LengthField("contact-tip-to-work distance min", null=True, blank=True)
    ctwd_max = LengthField("contact-tip-to-work distance max", null=True, blank=True)
    work_angle = models.CharField(max_length=40, blank=True, help_text="e.g. 45° ± 10°")
    travel_angle = models.CharField(max_length=40, blank=True, help_text="e.g. 5° to 15° drag")
    technique = models.CharField(max_length=10, choices=Technique.choices, default=Technique.STRINGER)
    passes = models.CharField(max_length=10, choices=Passes.choices, default=Passes.BOTH)
    interpass_cleaning = models.CharField(max_length=120, blank=True)
    shielding_gas = models.CharField(max_length=60, blank=True, help_text="e.g. 75% Ar / 25% CO2; blank for SMAW")
    gas_flow_min = FlowField(null=True, blank=True)
    gas_flow_max = FlowField(null=True, blank=True)
    positions = models.CharField(max_length=20, help_text="Comma-separated: F, H, V, OH")
    progression = models.CharField("vertical progression", max_length=4, choices=Progression.choices, blank=True,
                                   help_text="For vertical welds; blank when the WPS has no vertical position")
    backing = models.CharField("backing (groove welds)", max_length=12, choices=Backing.choices, blank=True)
    joint_types = models.CharField(max_length=20, default="fillet", help_text="Comma-separated: fillet, groove")
    base_metals = models.CharField(max_length=200, help_text="Comma-separated, e.g. ASTM A992, ASTM A572 Gr 50")
    thickness_min = LengthField("base metal thickness min")
    thickness_max = LengthField("base metal thickness max")
    fillet_size_min = LengthField(null=True, blank=True)
    fillet_size_max = LengthField(null=True, blank=True)
    single_pass_size_max = LengthField("largest single-pass fillet", null=True, blank=True)
    preheat_min = TemperatureField("minimum preheat")
    interpass_max = TemperatureField("maximum interpass", null=True, blank=True)
    toughness_required = models.BooleanField(
        "CVN toughness testing required", default=False,
        help_text="When the contract calls for CVN testing, heat input above the supporting PQRs' is not qualified",
    )
    notes = models.TextField(blank=True)

    supersedes = models.OneToOneField(
        "self", null=True, blank=True, on_delete=models.PROTECT, related_name="superseded_by", editable=False
    )
    created_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, null=True, on_delete=models.PROTECT, related_name="+", editable=False
    )
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    approved_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT, related_name="+", editable=False
    )
    approved_at = models.DateTimeField(null=True, blank=True, editable=False)
    withdrawn_at = models.DateTimeField(null=True, blank=True, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = WPSQuerySet.as_manager()
    lock = Lock(
        "WPS", state="state", frozen=FROZEN_STATES, name=("number", " rev ", "revision"),
        advice="start a new revision (a submitted one: ask the QA lead to return it to draft).",
        moves=[Move(WPSState.DRAFT, WPSState.SUBMITTED), Move(WPSState.SUBMITTED, WPSState.DRAFT),
               Move(WPSState.SUBMITTED, WPSState.APPROVED, ("approved_by", "approved_at")),
               Move(WPSState.APPROVED, WPSState.SUPERSEDED),
               Move(WPSState.APPROVED, WPSState.WITHDRAWN, ("withdrawn_at",))],
    )

    class Meta:
        ordering = ["number", "-revision"]
        verbose_name = "WPS"
        verbose_name_plural = "WPSs"
        constraints = [models.UniqueConstraint(fields=["number", "revision"], name="wps_number_revision_unique")]
        base_manager_name = "objects"

    def __str__(self):
        return f"WPS {self.number} rev {self.revision}"

    def get_absolute_url(self):
        return reverse("procedures:wps_detail", args=[self.pk])

    @property
    def is_editable(self):
        return self.state in EDITABLE_STATES

    @property
    def position_list(self):
        return split_codes(self.positions)

    @property
    def joint_type_list(self):
        return split_codes(self.joint_types)

    @property
    def base_metal_list(self):
        return split_codes(self.base_metals)

    # --- review: the engines judge, the record only maps itself to their input ------------------------

    def _temperature_text(self, temp):
        return _temperature_text(temp, self.unit_system)

    def review_input(self, joint=None, loading=None):
        """The dict procedures.prequalified.review() reads; a value the WPS does not give is left out.

        joint: "fillet" or "groove" (the engine judges one joint type at a time); None: the first listed.
        loading: "static" or "cyclic" where a job is known (Job.loading): cyclic work has a minimum fillet size.
        """
        joints = self.joint_type_list
        joint = joint or (joints[0] if joints else None)
        values = {
            "process": self.process or None,
            "transfer": (self.transfer or None) if self.process == Process.GMAW else None,
            "electrode": self.electrode or None,
            "electrode_diameter": _length_text(self.electrode_diameter, self.unit_system),
            "current": self.current or None,
            "positions": self.position_list or None,
            "joint": joint,
            "single_pass_size_max": _length_text(self.single_pass_size_max, self.unit_system),
            "base_metals": self.base_metal_list or None,
            "thickness_min": _length_text(self.thickness_min, self.unit_system),
            "thickness_max": _length_text(self.thickness_max, self.unit_system),
            "fillet_size_min": _length_text(self.fillet_size_min, self.unit_system),
            "fillet_size_max": _length_text(self.fillet_size_max, self.unit_system),
            "preheat_min": self._temperature_text(self.preheat_min),
            "interpass_max": self._temperature_text(self.interpass_max),
            "amperage_min": self.amperage_min, "amperage_max": self.amperage_max,
            "voltage_min": self.voltage_min, "voltage_max": self.voltage_max,
            "travel_speed_min": self.travel_speed_min, "travel_speed_max": self.travel_speed_max,
            "wire_feed_speed_min": self.wire_feed_min, "wire_feed_speed_max": self.wire_feed_max,
            "unit_system": self.unit_system or None,
            "loading": loading,
        }
        return {key: value for key, value in values.items() if value is not None}

    def heat_input_range(self):
        """Lowest and highest heat input the ranges allow (procedures.heat_input); None while incomplete."""
        try:
            return heat_input_engine.heat_input_range_of(self.review_input())
        except ValueError:
            return None  # incomplete or backwards ranges: review() reports those next to the fields

    def findings(self, pqrs=None, loading=None):
        """Everything a reviewer would mark on this WPS, errors first: the prequalified review of each joint
        type, the heat input against the supporting PQRs, and the basis. pqrs: the supporting PQRs when
        they are not saved yet (a form being typed); else self.pqrs.all() (prefetch it on busy pages).
        loading: the job's ("static" or "cyclic") where the WPS is reviewed for a job (Job.loading)."""
        found = []
        if not self.process:
            return [prequalified.Finding("incomplete", "warning", "Choose the welding process to start the review.",
                                         "Legwork review", "process")]
        if self.code in prequalified.KNOWN_CODES:
            for joint in self.joint_type_list or [None]:
                try:
                    found.extend(prequalified.review(self.review_input(joint, loading), code=self.code))
                except ValueError as exc:
                    found.append(prequalified.Finding("unreadable", "error", str(exc), "Legwork review"))
        else:
            found.append(prequalified.Finding(
                "no_prequalified_review", "warning",
                f"Legwork reviews prequalified limits of {prequalified.CODE} only; {self.code} procedures are "
                "qualified by test: check them against that standard.", self.code))
        found.extend(self._basis_findings(pqrs))
        unique = list(dict.fromkeys(found))  # the same finding from the fillet and the groove review once
        order = {severity: n for n, severity in enumerate(prequalified.SEVERITIES)}
        return sorted(unique, key=lambda f: order[f.severity])

    def _basis_findings(self, pqrs=None):
        if self.basis != Basis.QUALIFIED_BY_TEST:
            return []
        if pqrs is None:
            pqrs = list(self.pqrs.all()) if self.pk else []
        if not pqrs:
            return [prequalified.Finding(
                "basis_without_pqr", "error",
                "The WPS says it is qualified by test, but no supporting PQR is linked.", SOURCE_QUALIFIED_BY_TEST,
                "pqrs")]
        found = [prequalified.Finding("pqr_not_passed", "error", f"{pqr} did not pass all its tests.",
                                      SOURCE_QUALIFIED_BY_TEST, "pqrs") for pqr in pqrs if not pqr.passed]
        heat_inputs = {str(pqr): pqr.heat_input for pqr in pqrs if pqr.heat_input is not None}
        wps_range = self.heat_input_range()
        if heat_inputs and wps_range is not None:
            try:
                found.extend(heat_input_engine.check_against_pqrs(
                    wps_range, heat_inputs, toughness_required=self.toughness_required,
                    code=self.code if self.code in prequalified.KNOWN_CODES else prequalified.CODE,
                    system=self.unit_system))
            except ValueError as exc:
                found.append(prequalified.Finding("unreadable", "error", str(exc), "Legwork review", "heat_input"))
        found.extend(self.support_findings(pqrs))
        return found

    def support_input(self, joint=None):
        """The dict procedures.support.review() reads: the review dict with (low, high) pairs and the gas."""
        values = self.review_input(joint)
        for key in ("wire_feed_speed_min", "wire_feed_speed_max"):
            values.pop(key, None)
        for key in ("amperage", "voltage", "travel_speed"):
            low, high = values.pop(f"{key}_min", None), values.pop(f"{key}_max", None)
            if low is not None and high is not None:
                values[key] = (low, high)
        if "travel_speed" in values:
            values["travel_speed"] = tuple(_speed_text(v, self.unit_system) for v in values["travel_speed"])
        values["shielding_gas"] = self.shielding_gas or None
        return values

    def support_code(self):
        """The procedures.support code for this WPS's standard (None: the engine has no rules for it)."""
        return SUPPORT_CODES.get(self.code)

    def _support_rows(self, pqrs, answer):
        """answer(wps dict, pqr dicts, code) per joint type; (results, error message or '')."""
        code = self.support_code()
        if code is None:
            return [], f"Legwork holds no PQR support rules for {self.code}: check the PQRs against that standard."
        pqr_input = [pqr.support_input() for pqr in pqrs]
        results = []
        try:
            for joint in self.joint_type_list or [None]:
                results.append((joint, answer(self.support_input(joint), pqr_input, code)))
        except ValueError as exc:
            return [], str(exc)
        return results, ""

    def support_findings(self, pqrs):
        """procedures.support.review of this WPS against these PQRs (each joint type), as findings."""
        results, error = self._support_rows(pqrs, support.review)
        if error:
            severity = "error" if self.support_code() else "warning"
            return [prequalified.Finding("support_unreadable", severity, f"PQR support cannot be checked: {error}",
                                         support.SOURCE_NO_PQR, "pqrs")]
        return [finding for _, found in results for finding in found]

    def support_envelope(self, pqrs=None):
        """(rows per joint type as [(joint, [EnvelopeRow])], error text) for the page's envelope table."""
        if self.basis != Basis.QUALIFIED_BY_TEST:
            return [], ""
        pqrs = list(self.pqrs.all()) if pqrs is None else pqrs
        if not pqrs:
            return [], "No supporting PQR is linked."
        return self._support_rows(pqrs, support.envelope)

    def in_force_on(self, day):
        """None when this revision was approved on `day` (approved that day or before) and was neither withdrawn nor
        superseded before it; otherwise why not, in words. Reads superseded_by: select_related it on lists."""
        if self.approved_at is None or self.state in (WPSState.DRAFT, WPSState.SUBMITTED):
            return f"{self} is {self.get_state_display().lower()}: it was never approved."
        approved = timezone.localdate(self.approved_at)
        if approved > day:
            return f"{self} was approved on {approved.isoformat()}, after the weld date {day.isoformat()}."
        if self.state == WPSState.WITHDRAWN:
            if self.withdrawn_at is None:
                return f"{self} is withdrawn (the date is not recorded)."
            withdrawn = timezone.localdate(self.withdrawn_at)
            if withdrawn < day:
                return f"{self} was withdrawn on {withdrawn.isoformat()}, before the weld date {day.isoformat()}."
        try:
            successor = self.superseded_by
        except WPS.DoesNotExist:
            successor = None
        if successor is not None and successor.approved_at is not None:
            superseded = timezone.localdate(successor.approved_at)
            if superseded < day:
                return (f"{self} was superseded by revision {successor.revision} on {superseded.isoformat()}, before "
                        f"the weld date {day.isoformat()}.")
        return None

    def applicability_input(self):
        """The dict procedures.applicability.review() reads for this WPS."""
        return {
            "label": str(self), "code": self.code, "unit_system": self.unit_system, "process": self.process,
            "transfer": (self.transfer or None) if self.process == Process.GMAW else None,
            "positions": self.position_list, "progression": self.progression or None,
            "joint_types": self.joint_type_list, "thickness_min": self.thickness_min,
            "thickness_max": self.thickness_max, "fillet_size_min": self.fillet_size_min,
            "fillet_size_max": self.fillet_size_max,
        }

    def approval_blockers(self, findings=None):
        """Why this WPS cannot be approved as it stands (empty: it can, state and role aside)."""
        findings = self.findings() if findings is None else findings
        blockers = [f"{f.message} ({f.source})" for f in findings if f.severity == "error"]
        if self.basis == Basis.PREQUALIFIED:
            blockers += [f"Not prequalified: {f.message} ({f.source}). Qualify it by test and link the PQRs."
                         for f in findings if f.severity == "not_prequalified"]
        return blockers


SOURCE_QUALIFIED_BY_TEST = "AWS D1.1/D1.1M:2020 clause 6: a WPS that is not prequalified is qualified by a PQR test"
# The procedure standard a WPS names -> the code procedures.support judges its PQRs by.
SUPPORT_CODES = {"AWS D1.1:2020": support.AWS, "ISO 15609-1:2019": support.ISO}


def _temperature_text(temp, system):
    """A temperature as text the engines read back, in the record's system ('50 F', '10 C')."""
    if temp is None:
        return None
    return f"{units._plain(temp.f)} F" if system == UnitSystem.US else f"{units._plain(temp.c)} C"


def _speed_text(speed, system):
    """A travel speed for procedures.support: exact mm/min text on an SI record (so its messages speak mm/min),
    the Speed itself on a US record (in/min is not exact in text; the engine speaks in/min by default)."""
    if speed is None or system != UnitSystem.SI:
        return speed
    return f"{units._plain(speed.mm_per_min)} mm/min"


def _length_text(length, system):
    """A length as text the engines read back exactly, in the WPS's system ('0.045 in', '1.2 mm')."""
    if length is None:
        return None
    return f"{units._plain(length.inch)} in" if system == UnitSystem.US else f"{units._plain(length.mm)} mm"
