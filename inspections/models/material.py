"""Material traceability: the heats of steel the shop bought (their mill certificates) and the parts of each
assembly cut from them. The proof chain (inspections.services.chain) asks inspections.material whether a part's heat
meets its specified grade, and whether the certificate is the kind the job needs.

Both are recorded once and never edited, like the other registers: a mistyped certificate or part is withdrawn with
a reason (inspections.services.material) and recorded again; welds, travelers and packets keep naming what they
named. A certificate belongs to the shop's registers (a viewer reads its heat only as printed on its travelers); a
part belongs to its job.
"""

from decimal import Decimal

from django.db import models
from django.db.models import Q
from django.urls import reverse

from core.fields import LengthField
from core.locking import ALWAYS, Guarded, GuardedQuerySet, Lock, Move
from inspections import material as engine
from inspections.models.trace import DocumentMixin, Recorded, document_path


class MaterialState(models.TextChoices):
    ON_FILE = "on_file", "On file"
    WITHDRAWN = "withdrawn", "Withdrawn"


WITHDRAW = Move(MaterialState.ON_FILE, MaterialState.WITHDRAWN, ("withdrawn_reason", "withdrawn_at"))


class Withdrawable(models.Model):
    """On file until withdrawn with a reason (the one move of its Lock: WITHDRAW)."""

    state = models.CharField(max_length=12, choices=MaterialState.choices, default=MaterialState.ON_FILE,
                             editable=False)
    withdrawn_reason = models.CharField(max_length=200, blank=True, editable=False)
    withdrawn_at = models.DateTimeField(null=True, blank=True, editable=False)

    class Meta:
        abstract = True


def _percent(label):
    return models.DecimalField(label, max_digits=7, decimal_places=4, null=True, blank=True)


class MillCertificate(DocumentMixin, Recorded, Withdrawable, Guarded):
    """One heat of steel as its mill certificate prints it: grade(s), chemistry and mechanical values, the
    certificate's type and a scan. A fact, never edited."""

    heat_number = models.CharField("heat number", max_length=40)
    producer = models.CharField("producer (mill)", max_length=80)
    grade = models.CharField("specification and grade", max_length=120,
                             help_text="As printed; a dual-certified heat names each, e.g. ASTM A992/A572-50")
    product = models.CharField(max_length=80, blank=True, help_text="Shape or product as printed, e.g. W14x90, PL")
    thickness = LengthField(null=True, blank=True, help_text="Plate thickness as printed; blank for shapes")
    certificate_type = models.CharField(max_length=4, choices=list(engine.CERTIFICATE_TYPES.items()))
    certificate_number = models.CharField(max_length=40, blank=True)
    issued_on = models.DateField("certificate date")
    c = _percent("C")
    mn = _percent("Mn")
    p = _percent("P")
    s = _percent("S")
    si = _percent("Si")
    cu = _percent("Cu")
    ni = _percent("Ni")
    cr = _percent("Cr")
    mo = _percent("Mo")
    v = _percent("V")
    ce = _percent("CE as printed")
    yield_mpa = models.DecimalField("yield strength (MPa)", max_digits=7, decimal_places=2, null=True, blank=True)
    tensile_mpa = models.DecimalField("tensile strength (MPa)", max_digits=7, decimal_places=2, null=True, blank=True)
    elongation = models.DecimalField("elongation (%)", max_digits=5, decimal_places=2, null=True, blank=True)
    printed_system = models.CharField(max_length=2, default="US", editable=False,
                                      help_text="The units the strengths were printed in (ksi: US, MPa: SI)")
    document = models.FileField("certificate", upload_to=document_path, blank=True)
    document_sha256 = models.CharField(max_length=64, blank=True, editable=False)
    objects = GuardedQuerySet.as_manager()
    lock = Lock("mill certificate", state="state", frozen=ALWAYS, name=("heat_number",),
                advice="withdraw it with a reason and record the certificate again.", moves=[WITHDRAW])

    class Meta:
        ordering = ["-issued_on", "-pk"]
        base_manager_name = "objects"
        constraints = [models.UniqueConstraint(fields=["producer", "heat_number"], condition=Q(state="on_file"),
                                               name="heat_on_file_unique")]

    def __str__(self):
        return f"heat {self.heat_number}"

    def get_absolute_url(self):
        return reverse("inspections:heat_detail", args=[self.pk])

    @property
    def grades(self):
        """The grades it is certified to (inspections.material.parse_grades); () when they cannot be read."""
        try:
            return engine.parse_grades(self.grade)
        except ValueError:
            return ()

    @property
    def chemistry(self) -> dict:
        return {name: getattr(self, name) for name in engine.ELEMENTS}

    @property
    def computed_ce(self):
        return engine.carbon_equivalent(self.chemistry)

    def strength(self, mpa) -> str:
        """A strength in the units the certificate printed it in (ksi or MPa)."""
        if mpa is None:
            return ""
        from core.units import KSI_TO_MPA

        if self.printed_system == "US":
            return f"{(mpa / KSI_TO_MPA).quantize(Decimal('0.1'))} ksi"
        return f"{mpa.quantize(Decimal('1'))} MPa"

    @property
    def mechanical(self) -> str:
        words = [f"{name} {self.strength(value)}" for name, value in (("yield", self.yield_mpa),
                                                                      ("tensile", self.tensile_mpa)) if value]
        if self.elongation is not None:
            words.append(f"elongation {self.elongation.normalize():f} %")
        return ", ".join(words)

    def printed(self) -> str:
        """The heat as a traveler prints it beside a part."""
        return f"heat {self.heat_number} {self.grade} ({self.producer}, {self.get_certificate_type_display()})"


class PartRole(models.TextChoices):
    MAIN = "main", "Main member"
    PLATE = "plate", "Plate"
    STIFFENER = "stiffener", "Stiffener"
    CONNECTION = "connection", "Connection plate / shear tab"
    BASE = "base", "Base or cap plate"
    OTHER = "other", "Other"


class Part(Recorded, Withdrawable, Guarded):
    """A part of an assembly: its part mark, role, the grade the drawing specifies, its thickness, and the heat it
    was cut from. Never edited: a mistake is withdrawn with a reason and the part recorded again."""

    assembly = models.ForeignKey("inspections.Assembly", on_delete=models.PROTECT, related_name="parts")
    mark = models.CharField("part mark", max_length=20)
    role = models.CharField(max_length=12, choices=PartRole.choices, default=PartRole.PLATE)
    description = models.CharField(max_length=80, blank=True, help_text="Shape or size, e.g. W18x35, PL 3/8x6")
    specified_grade = models.CharField("specified grade", max_length=60, help_text="As the drawing names it, e.g. "
                                                                                   "ASTM A992, S355J2")
    thickness = LengthField(help_text="The thickness welded: plate thickness, or the flange or web joined")
    heat = models.ForeignKey(MillCertificate, null=True, blank=True, on_delete=models.PROTECT, related_name="parts",
                             help_text="The heat it was cut from (its mill certificate)")
    objects = GuardedQuerySet.as_manager()
    lock = Lock("part", state="state", frozen=ALWAYS, name=("mark",),
                advice="withdraw it with a reason and record the part again.", moves=[WITHDRAW])

    class Meta:
        ordering = ["assembly", "mark", "pk"]
        base_manager_name = "objects"
        constraints = [models.UniqueConstraint(fields=["assembly", "mark"], condition=Q(state="on_file"),
                                               name="part_mark_unique_in_assembly")]

    def __str__(self):
        return f"part {self.mark}"

    def get_absolute_url(self):
        return reverse("inspections:assembly_parts", args=[self.assembly_id])

    def history_system(self):
        return self.assembly.job.unit_system
