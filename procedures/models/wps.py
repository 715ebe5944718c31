"""Welding procedure specifications and the qualification records behind them.

A WPS moves draft -> submitted -> approved -> superseded, or approved -> withdrawn. Only a draft is
edited. A change to an approved WPS is a new revision (a new row) that supersedes it when approved.
Every state change writes a ProcedureEvent (who, when, from, to, why).
"""

from django.conf import settings
from django.db import models, transaction
from django.urls import reverse
from django.utils import timezone

from legwork.fields import FlowField, LengthField, SpeedField, TemperatureField
from procedures.models.base import Current, Process, SignedRecordError, UnitSystem, split_codes


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
CODES = [("AWS D1.1:2020", "AWS D1.1/D1.1M:2020"), ("ISO 15609-1:2019", "ISO 15609-1:2019 (ISO 5817 shops)")]


class PQR(models.Model):
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
    electrode = models.CharField("electrode classification", max_length=40)
    electrode_diameter = LengthField(null=True, blank=True)
    current = models.CharField(max_length=4, choices=Current.choices)
    amperage = models.DecimalField("current (A)", max_digits=6, decimal_places=1)
    voltage = models.DecimalField("arc voltage (V)", max_digits=5, decimal_places=2)
    travel_speed = SpeedField()
    heat_input_kj_per_mm = models.DecimalField(
        "heat input (kJ/mm)", max_digits=8, decimal_places=4, null=True, blank=True, editable=False,
        help_text="Computed from voltage, current and travel speed",
    )
    position = models.CharField("test position", max_length=10)
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

    class Meta:
        ordering = ["number"]
        verbose_name = "PQR"
        verbose_name_plural = "PQRs"

    def __str__(self):
        return f"PQR {self.number}"

    def get_absolute_url(self):
        return reverse("procedures:pqr_detail", args=[self.pk])

    @property
    def passed(self):
        tested = [self.visual, self.macroetch, self.bends, self.tensiles, self.fillet_break]
        results = [r for r in tested if r != self.Result.NOT_TESTED]
        return bool(results) and all(r == self.Result.PASS for r in results)


class WPSQuerySet(models.QuerySet):
    def approved(self):
        return self.filter(state=WPSState.APPROVED)


class WPS(models.Model):
    """A welding procedure specification, one row per revision."""

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
    joint_types = models.CharField(max_length=20, default="fillet", help_text="Comma-separated: fillet, groove")
    base_metals = models.CharField(max_length=200, help_text="Comma-separated, e.g. ASTM A992, ASTM A572 Gr 50")
    thickness_min = LengthField("base metal thickness min")
    thickness_max = LengthField("base metal thickness max")
    fillet_size_min = LengthField(null=True, blank=True)
    fillet_size_max = LengthField(null=True, blank=True)
    single_pass_size_max = LengthField("largest single-pass fillet", null=True, blank=True)
    preheat_min = TemperatureField("minimum preheat")
    interpass_max = TemperatureField("maximum interpass", null=True, blank=True)
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

    objects = WPSQuerySet.as_manager()

    class Meta:
        ordering = ["number", "-revision"]
        verbose_name = "WPS"
        verbose_name_plural = "WPSs"
        constraints = [models.UniqueConstraint(fields=["number", "revision"], name="wps_number_revision_unique")]

    def __str__(self):
        return f"WPS {self.number} rev {self.revision}"

    def save(self, *args, **kwargs):
        # Approved, superseded and withdrawn rows are frozen; only the transition functions below move
        # them on, and they save nothing but the state fields (update_fields).
        if self.pk and kwargs.get("update_fields") is None:
            stored = WPS.objects.filter(pk=self.pk).values_list("state", flat=True).first()
            if stored is not None and stored not in EDITABLE_STATES:
                raise SignedRecordError(
                    f"{self} is {WPSState(stored).label.lower()} and cannot be changed; start a new revision."
                )
        super().save(*args, **kwargs)

    def delete(self, *args, **kwargs):
        if self.state != WPSState.DRAFT:
            raise SignedRecordError(f"{self} is {self.get_state_display().lower()}; only a draft can be deleted.")
        return super().delete(*args, **kwargs)

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

    # --- state changes: each checks its precondition, locks the row and records an event -----------

    def _move(self, user, to_state, reason="", **fields):
        with transaction.atomic():
            # Lock so two QA leads pressing approve at once cannot both act on a stale state.
            locked = WPS.objects.select_for_update().get(pk=self.pk)
            old = locked.state
            self.state = to_state
            for name, value in fields.items():
                setattr(self, name, value)
            super().save(update_fields=["state", *fields])
            ProcedureEvent.objects.create(wps=self, from_state=old, to_state=to_state, reason=reason, user=user)
        return self


class ProcedureEvent(models.Model):
    """One state change of a WPS: never edited, never deleted."""

    wps = models.ForeignKey(WPS, on_delete=models.PROTECT, related_name="events")
    from_state = models.CharField(max_length=12, choices=WPSState.choices, blank=True)
    to_state = models.CharField(max_length=12, choices=WPSState.choices)
    reason = models.TextField(blank=True)
    user = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    at = models.DateTimeField(default=timezone.now)

    class Meta:
        ordering = ["at", "pk"]

    def __str__(self):
        return f"{self.wps}: {self.from_state or 'new'} -> {self.to_state}"
