"""Consumable control: the shop's electrode ovens and their log (temperature readings, electrodes issued and
returned, rebakes). Judged by the engine inspections.consumables (AWS D1.1/D1.1M:2020 clause 7.3, from memory);
steps in inspections.services.consumables; the proof chain reads the issues (services.chain, `exposure_problem`).

Registers of the shop: a customer's viewer never opens them (core.visibility.SHOP_REGISTERS). Every row is a fact,
never edited: an oven is retired with a reason, an issue is closed once (returned to an oven, or discarded), a
reading or a rebake is followed by the next one. docs/decisions/2026-12-05-consumable-control.md says why.
"""

from decimal import Decimal

from django.core.validators import MaxValueValidator, MinValueValidator
from django.db import models
from django.urls import reverse

from core.fields import TemperatureField
from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, Move
from core.units import format_temperature
from inspections.models.trace import FillerLot, Recorded


class OvenKind(models.TextChoices):
    HOLDING = "holding", "Holding oven (storage)"
    ROD = "rod", "Portable rod oven"
    FLUX = "flux", "Flux drying oven"


class OvenState(models.TextChoices):
    IN_SERVICE = "in_service", "In service"
    RETIRED = "retired", "Retired"


SYSTEMS = [("US", "°F"), ("SI", "°C")]


class ElectrodeOven(Recorded, Guarded):
    """An oven of the register. Never edited: a mistake is retired with a reason and recorded again."""

    number = models.CharField("register number", max_length=30, unique=True, help_text="e.g. OV-02")
    kind = models.CharField(max_length=10, choices=OvenKind.choices, default=OvenKind.HOLDING)
    description = models.CharField(max_length=120, blank=True, help_text="Make, model, capacity")
    location = models.CharField(max_length=80, blank=True, help_text="Where it stands, e.g. bay 2 crib")
    system = models.CharField("its thermometer reads", max_length=2, choices=SYSTEMS, default="US",
                              help_text="Readings are judged as the standard prints the limit in that scale")
    state = models.CharField(max_length=12, choices=OvenState.choices, default=OvenState.IN_SERVICE, editable=False)
    retired_reason = models.CharField(max_length=200, blank=True, editable=False)
    retired_at = models.DateTimeField(null=True, blank=True, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("electrode oven", state="state", frozen=ALWAYS, name=("number",),
                advice="retire it with a reason and record it again.",
                moves=[Move(OvenState.IN_SERVICE, OvenState.RETIRED, ("retired_reason", "retired_at"))])

    class Meta:
        ordering = ["number"]
        base_manager_name = "objects"

    def __str__(self):
        return self.number

    def get_absolute_url(self):
        return reverse("inspections:oven_detail", args=[self.pk])

    @property
    def holds_electrodes(self) -> bool:
        """A holding or rod oven, judged against the electrode minimum; a flux oven keeps the flux maker's
        temperature, which the shop reads but Legwork does not judge."""
        return self.kind != OvenKind.FLUX

    def reading_ok(self, temperature) -> bool | None:
        """The reading against D1.1 clause 7.3.2.1's minimum (from memory); None for a flux oven."""
        from inspections import consumables

        return consumables.reading_ok(temperature, self.system) if self.holds_electrodes else None


class OvenReading(Recorded, Guarded):
    """One temperature reading of an oven: when, what, by whom (the person who recorded it)."""

    oven = models.ForeignKey(ElectrodeOven, on_delete=models.PROTECT, related_name="readings")
    read_at = models.DateTimeField("read at")
    temperature = TemperatureField()
    note = models.CharField(max_length=200, blank=True)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("oven reading", frozen=ALWAYS, name=("id",), advice="record the next reading; this one stays.")

    class Meta:
        ordering = ["oven", "-read_at", "-pk"]
        base_manager_name = "objects"
        indexes = [models.Index(fields=["oven", "read_at"], name="oven_reading_at")]

    def __str__(self):
        return f"{self.oven} {format_temperature(self.temperature, self.oven.system)} at {self.read_at:%Y-%m-%d %H:%M}"

    def facts(self):
        from inspections import consumables

        return consumables.OvenReading(self.pk, self.read_at, self.temperature)


class QuantityUnit(models.TextChoices):
    ELECTRODES = "electrodes", "electrodes"
    LB = "lb", "lb"
    KG = "kg", "kg"


class Rebake(Recorded, Guarded):
    """Electrodes of one lot rebaked in an oven: a batch. `previous` names the batch these electrodes came from when
    they had been rebaked before; `number` counts the rebakes (1 the first; D1.1 allows one, from memory)."""

    oven = models.ForeignKey(ElectrodeOven, on_delete=models.PROTECT, related_name="rebakes")
    lot = models.ForeignKey(FillerLot, on_delete=models.PROTECT, related_name="rebakes", verbose_name="filler lot")
    started_at = models.DateTimeField("started at")
    temperature = TemperatureField()
    hours = models.DecimalField(max_digits=4, decimal_places=2,
                                validators=[MinValueValidator(Decimal("0.01")), MaxValueValidator(99)])
    quantity = models.PositiveIntegerField(validators=[MinValueValidator(1), MaxValueValidator(100000)])
    unit = models.CharField(max_length=10, choices=QuantityUnit.choices, default=QuantityUnit.ELECTRODES)
    previous = models.ForeignKey("self", null=True, blank=True, on_delete=models.PROTECT, related_name="+",
                                 verbose_name="rebaked before in batch",
                                 help_text="When these electrodes had already been rebaked: that batch")
    number = models.PositiveSmallIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("rebake", frozen=ALWAYS, name=("id",), advice="record another rebake; this one stays.")

    class Meta:
        ordering = ["-started_at", "-pk"]
        base_manager_name = "objects"

    def __str__(self):
        return f"rebake {self.pk} of lot {self.lot.lot_number} ({self.started_at:%Y-%m-%d})"


class IssueState(models.TextChoices):
    OUT = "out", "Out of the oven"
    RETURNED = "returned", "Returned to an oven"
    DISCARDED = "discarded", "Discarded"


class ElectrodeIssue(Recorded, Guarded):
    """Electrodes of one lot taken out of an oven by one welder; closed once, when returned to an oven or
    discarded. Its time out is judged by inspections.consumables.exposure; it covers that welder's welds with that
    lot dated from the day taken out to the day back (docs/decisions/2026-12-05-consumable-control.md)."""

    oven = models.ForeignKey(ElectrodeOven, on_delete=models.PROTECT, related_name="issues",
                             verbose_name="taken from")
    lot = models.ForeignKey(FillerLot, on_delete=models.PROTECT, related_name="issues", verbose_name="filler lot")
    welder = models.ForeignKey("procedures.Welder", on_delete=models.PROTECT, related_name="electrode_issues")
    quantity = models.PositiveIntegerField(validators=[MinValueValidator(1), MaxValueValidator(100000)])
    unit = models.CharField(max_length=10, choices=QuantityUnit.choices, default=QuantityUnit.ELECTRODES)
    taken_out_at = models.DateTimeField("taken out at")
    rebake = models.ForeignKey(Rebake, null=True, blank=True, on_delete=models.PROTECT, related_name="issues",
                               verbose_name="from rebake batch", help_text="When the electrodes were rebaked")
    state = models.CharField(max_length=10, choices=IssueState.choices, default=IssueState.OUT, editable=False)
    back_at = models.DateTimeField("returned or discarded at", null=True, blank=True, editable=False)
    returned_to = models.ForeignKey(ElectrodeOven, null=True, blank=True, on_delete=models.PROTECT,
                                    related_name="returns", editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("electrode issue", state="state", frozen=ALWAYS, name=("id",),
                advice="it is closed once: return or discard what is out, and record a new issue.",
                moves=[Move(IssueState.OUT, IssueState.RETURNED, ("back_at", "returned_to")),
                       Move(IssueState.OUT, IssueState.DISCARDED, ("back_at",))])

    class Meta:
        ordering = ["-taken_out_at", "-pk"]
        base_manager_name = "objects"
        indexes = [models.Index(fields=["lot", "welder", "taken_out_at"], name="electrode_issue_lot_welder")]

    def __str__(self):
        return f"lot {self.lot.lot_number} to {self.welder.stamp} at {self.taken_out_at:%Y-%m-%d %H:%M}"

    def get_absolute_url(self):
        return reverse("inspections:oven_detail", args=[self.oven_id]) + f"#issue-{self.pk}"


class FluxEvent(models.TextChoices):
    """The engine's flux events (inspections.consumables.FLUX_EVENTS)."""

    OPENED_INTACT = "opened_intact", "Package opened, intact"
    OPENED_DAMAGED = "opened_damaged", "Package opened, damaged"
    DRIED = "dried", "Dried"
    WET = "wet", "Found wet (discarded)"
    CONTAMINATED = "contaminated", "Found contaminated (discarded)"


class FluxRecord(Recorded, Guarded):
    """One fact of a SAW flux lot's condition, in the log of the oven (or hopper station) where it happened: a
    package opened intact or damaged, a drying (temperature, hours), flux found wet or contaminated and discarded.
    The lot's standing at a moment is inspections.consumables.flux_at over its records (clause 7.3.3.2, from
    memory)."""

    oven = models.ForeignKey(ElectrodeOven, on_delete=models.PROTECT, related_name="flux_records")
    lot = models.ForeignKey(FillerLot, on_delete=models.PROTECT, related_name="flux_records",
                            verbose_name="flux lot")
    event = models.CharField(max_length=16, choices=FluxEvent.choices)
    at = models.DateTimeField("at")
    temperature = TemperatureField(null=True, blank=True, help_text="When dried")
    hours = models.DecimalField(max_digits=4, decimal_places=2, null=True, blank=True, help_text="When dried",
                                validators=[MinValueValidator(Decimal("0.01")), MaxValueValidator(99)])
    note = models.CharField(max_length=200, blank=True)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("flux record", frozen=ALWAYS, name=("id",), advice="record the next fact; this one stays.")

    class Meta:
        ordering = ["-at", "-pk"]
        base_manager_name = "objects"
        indexes = [models.Index(fields=["lot", "at"], name="flux_record_lot_at")]

    def __str__(self):
        return f"flux lot {self.lot.lot_number}: {self.get_event_display().lower()} at {self.at:%Y-%m-%d %H:%M}"

    def facts(self):
        from inspections import consumables

        return consumables.FluxEvent(self.pk, self.at, self.event, self.temperature, self.hours)
