"""Jobs, their assemblies (piece marks) and each assembly's weld map."""

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.urls import reverse
from django.utils import timezone

from core.errors import RecordLocked
from core.fields import ForceField, LengthField
from core.locking import Guarded, GuardedQuerySet, Lock, Move, sql_text
from core.units import Length
from core.vocabulary import WELD_POSITION_CHOICES, WELD_PROCESS_CHOICES, JointType, Position, UnitSystem
from inspections.strength import effective_throat


class Customer(Guarded):
    """Whom jobs are built for. A viewer account tied to a customer sees that customer's jobs and what hangs from
    them, and nothing else (core.visibility)."""

    name = models.CharField(max_length=120, unique=True)
    viewers = models.ManyToManyField(
        settings.AUTH_USER_MODEL, blank=True, related_name="customers",
        help_text="Viewer accounts (the customer's people, or its third-party inspector) that see this customer's "
                  "jobs")
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("customer", name=("name",))

    class Meta:
        ordering = ["name"]
        base_manager_name = "objects"

    def __str__(self):
        return self.name


class Job(Guarded):
    number = models.CharField(max_length=30, unique=True)
    name = models.CharField(max_length=120)
    customer = models.ForeignKey(Customer, on_delete=models.PROTECT, related_name="jobs")
    unit_system = models.CharField(max_length=2, choices=UnitSystem.choices, default=UnitSystem.US)
    criteria_key = models.CharField(
        "criteria set", max_length=60, default="aws-d1.1-2020-static",
        help_text="Built-in set key (inspections.criteria) unless a client set is chosen",
    )
    client_criteria = models.ForeignKey("inspections.ClientCriteriaSet", null=True, blank=True,
                                        on_delete=models.PROTECT, related_name="jobs")
    fit_up_hold_point = models.BooleanField(
        "fit-up hold point required", default=False,
        help_text="Every weld needs an accepted fit-up inspection before the assembly is released",
    )
    # Traceability the contract may ask for (issue 18): off by default, a shop starts its registers part-way.
    filler_lot_required = models.BooleanField(
        "filler lot required", default=False,
        help_text="Every weld names the filler lot it was made with before the assembly is released",
    )
    gauge_required = models.BooleanField(
        "gauge required at final visual", default=False,
        help_text="Every final visual names the gauge it was measured with (a gauge in calibration that day)",
    )
    # Blank: required on ISO jobs, not on AWS jobs (docs/decisions/2026-12-05-mill-certificates.md).
    mill_certificates = models.BooleanField(
        "mill certificates required", null=True, blank=True,
        help_text="Every part needs a heat with its mill certificate on file before release; blank: required on "
                  "ISO jobs (EN 1090-2), not on AWS jobs")
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock("job", name=("number",))

    class Meta:
        ordering = ["-number"]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.number} {self.name}"

    def get_absolute_url(self):
        return reverse("inspections:job_detail", args=[self.pk])

    def criteria_for_evaluation(self):
        """What inspections.acceptance.evaluate takes for this job: a built-in key, or a client set's stored dict."""
        if self.client_criteria_id:
            return self.client_criteria.definition
        return self.criteria_key

    def criteria_identity(self) -> tuple[str, int]:
        """(key, version) a verdict stores, so it keeps the set it was judged by after the set moves on."""
        if self.client_criteria_id:
            return self.client_criteria.key, self.client_criteria.version
        from inspections.criteria import get_criteria

        return self.criteria_key, get_criteria(self.criteria_key).version

    @property
    def code_family(self) -> str:
        """'AWS' or 'ISO': the family of the standard the job's criteria set judges by (read client_criteria with
        select_related on lists). A WPS written to the other family does not apply on this job."""
        if self.client_criteria_id:
            standard = str(self.client_criteria.definition.get("standard", ""))
        else:
            from inspections.criteria import get_criteria

            try:
                standard = get_criteria(self.criteria_key).standard
            except ValueError:
                standard = self.criteria_key
        return "ISO" if standard.strip().upper().startswith("ISO") else "AWS"

    @property
    def requires_mill_certificates(self) -> bool:
        """The job's setting, else the code family's default: on for ISO jobs, off for AWS jobs."""
        return self.mill_certificates if self.mill_certificates is not None else self.code_family == "ISO"

    def applicability_input(self) -> dict:
        """The job as procedures.applicability.review() reads it."""
        return {"label": f"job {self.number}", "code_family": self.code_family, "unit_system": self.unit_system}

    @property
    def loading(self) -> str | None:
        """'cyclic' or 'static' for an AWS D1.1 job (its criteria set, or the set a client set derives from, says
        which), None for other codes: what the WPS review reads where a job is known."""
        from inspections.criteria import resolve

        try:
            cset = resolve(self.criteria_for_evaluation())
        except ValueError:
            return None
        if not cset.standard.upper().startswith("AWS D1.1"):
            return None
        words = f"{cset.key} {cset.base_key or ''} {cset.title}".lower()
        return "cyclic" if "cyclic" in words else "static"

    @property
    def criteria_label(self) -> str:
        """The criteria set as a person names it: 'ISO 5817:2014 quality level C', or the client set's title."""
        if self.client_criteria_id:
            return str(self.client_criteria)
        return criteria_words(self.criteria_key)


def criteria_words(key: str) -> str:
    """A built-in criteria set's key in words ('aws-d1.1-2020-static' -> 'AWS D1.1/D1.1M:2020 visual acceptance'
    with its loading); any other key (a client set's own) as it is."""
    from inspections.criteria import REGISTRY

    cset = REGISTRY.get(key)
    return cset.title if cset is not None else str(key)


class AssemblyState(models.TextChoices):
    IN_FABRICATION = "in_fabrication", "In fabrication"
    AWAITING_INSPECTION = "awaiting_inspection", "Awaiting inspection"
    REJECTED = "rejected", "Rejected"
    RELEASED = "released", "Released"
    SCRAPPED = "scrapped", "Scrapped"


CLOSED_STATES = (AssemblyState.RELEASED, AssemblyState.SCRAPPED)
OPEN_STATES = (AssemblyState.IN_FABRICATION, AssemblyState.AWAITING_INSPECTION, AssemblyState.REJECTED)


class Assembly(Guarded):
    """A piece mark of a job with its weld map. Edited in place (by version) until released or scrapped; its state
    moves only by its steps (inspections.services.assemblies)."""

    job = models.ForeignKey(Job, on_delete=models.PROTECT, related_name="assemblies")
    piece_mark = models.CharField(max_length=30)
    drawing = models.CharField(max_length=40)
    drawing_revision = models.CharField(max_length=10, default="0")
    quantity = models.PositiveIntegerField(default=1)
    description = models.CharField(max_length=200, blank=True)
    state = models.CharField(max_length=20, choices=AssemblyState.choices, default=AssemblyState.IN_FABRICATION,
                             editable=False)
    released_by = models.ForeignKey(settings.AUTH_USER_MODEL, null=True, blank=True, on_delete=models.PROTECT,
                                    related_name="+", editable=False)
    released_at = models.DateTimeField(null=True, blank=True, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = Lock(
        "assembly", state="state", frozen=CLOSED_STATES, name=("piece_mark",),
        advice="a problem found after release is a new record (an NCR), not a change to the released one.",
        moves=[Move(AssemblyState.IN_FABRICATION, AssemblyState.AWAITING_INSPECTION),
               Move(AssemblyState.IN_FABRICATION, AssemblyState.REJECTED),
               Move(AssemblyState.AWAITING_INSPECTION, AssemblyState.REJECTED),
               Move(AssemblyState.REJECTED, AssemblyState.AWAITING_INSPECTION),
               *(Move(state, AssemblyState.RELEASED, ("released_by", "released_at")) for state in OPEN_STATES),
               *(Move(state, AssemblyState.SCRAPPED) for state in (*OPEN_STATES, AssemblyState.RELEASED))],
    )

    class Meta:
        ordering = ["job", "piece_mark"]
        verbose_name_plural = "assemblies"
        constraints = [models.UniqueConstraint(fields=["job", "piece_mark"], name="piece_mark_unique_in_job")]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.piece_mark} ({self.job.number})"

    def get_absolute_url(self):
        return reverse("inspections:assembly_detail", args=[self.pk])

    @property
    def is_closed(self):
        """Released or scrapped: the weld map is frozen."""
        return self.state in CLOSED_STATES

    def history_system(self):
        return self.job.unit_system


class Sides(models.TextChoices):
    ARROW = "arrow", "Arrow side"
    OTHER = "other", "Other side"
    BOTH = "both", "Both sides"


# Who welded it, when, to which WPS (and the welders, a many-to-many link): recorded after fit-up, frozen at the
# first final visual inspection. Everything else a weld holds is the drawing's data, frozen at its first inspection.
PRODUCTION_FIELDS = ("wps", "welded_on", "filler_lot")
WELD_POINTERS = ("latest_inspection", "latest_final")


def _closed_sql(row):
    states = ", ".join(sql_text(s) for s in CLOSED_STATES)
    return f'((SELECT a."state" FROM "inspections_assembly" a WHERE a."id" = {row}."assembly_id") IN ({states}))'


class WeldLock(Lock):
    """A weld's drawing data freezes at its first inspection; who welded it, when and to which WPS at its first
    final visual inspection; everything once its assembly is released or scrapped. After that, only a revision
    (inspections.services.welds.revise: a step with a reason) changes it, and sends it back for inspection.
    sign_inspection sets the pointers to the latest inspections (bookkeeping, free while the assembly is open)."""

    steps_only = ("revision", "revised_at")
    related = ("assembly__job",)
    lock_of = ("self", "assembly")  # a release waits for a weld being saved, and the reverse

    def frozen_row(self, stored):
        return self.changeable(stored) is not None

    def changeable(self, stored):
        if stored.assembly.state in CLOSED_STATES:
            return frozenset()
        if stored.latest_inspection_id is None:
            return None
        return self.free | (frozenset(PRODUCTION_FIELDS) if stored.latest_final_id is None else frozenset())

    def check_change(self, stored, changed):
        stepped = [n for n in changed if n in self.step_fields]
        allowed = self.changeable(stored)
        refused = [n for n in changed if allowed is not None and n not in allowed]
        if stepped or refused:
            raise RecordLocked(self.refusal(stored, "changed", refused or stepped))

    def m2m_frozen(self, stored, name):
        return stored.assembly.state in CLOSED_STATES or stored.latest_final_id is not None

    def refusing(self, names):
        if names & self.step_fields:
            return super().refusing(names)
        closed = Q(assembly__state__in=CLOSED_STATES)
        if names <= self.free:
            return None  # sign_inspection, the one writer of the pointers, checks the assembly under its lock
        if names <= self.free | set(PRODUCTION_FIELDS):
            return closed | Q(latest_final__isnull=False)
        return closed | Q(latest_inspection__isnull=False)

    def undeletable(self):
        return Q(assembly__state__in=CLOSED_STATES) | Q(latest_inspection__isnull=False)

    def check_insert(self, record):
        state = Assembly.objects.filter(pk=record.assembly_id).values_list("state", flat=True).first()
        if state in CLOSED_STATES:
            raise RecordLocked(f"Assembly {record.assembly.piece_mark} is {AssemblyState(state).label.lower()}: its "
                               "weld map is frozen.")

    def refusal(self, stored, doing="changed", fields=()):
        if stored is None:
            return super().refusal(stored, doing)
        if stored.assembly.state in CLOSED_STATES:
            return (f"Weld {stored.mark} of {stored.assembly.piece_mark} cannot be {doing}: the assembly is "
                    f"{stored.assembly.get_state_display().lower()} and its weld map is frozen.")
        if doing == "deleted":
            return f"Weld {stored.mark} of {stored.assembly.piece_mark} has been inspected and cannot be deleted."
        if set(fields) & self.step_fields:
            return f"Weld {stored.mark}: its revision changes only by the revision step, with a reason."
        what = self._labels(fields) if fields else "its data"
        when = "its final visual inspection" if stored.latest_final_id else "its first inspection"
        return (f"Weld {stored.mark} of {stored.assembly.piece_mark}: {what} cannot be changed after {when}. "
                "Revise the weld instead (with a reason): it then goes back for inspection.")

    # the database triggers

    def sql_frozen(self):
        return f'(OLD."latest_inspection_id" IS NOT NULL OR {_closed_sql("OLD")})'

    def sql_allowances(self):
        free = self.columns(sorted(self.free)) + ("version",)
        production = self.columns(PRODUCTION_FIELDS)
        fixed = {"id", "assembly_id"}
        everything = tuple(f.column for f in self.model._meta.concrete_fields if f.column not in fixed)
        still_open = f"NOT {_closed_sql('OLD')}"
        return [
            (still_open, free),
            (f'{still_open} AND OLD."latest_final_id" IS NULL', free + production),
            # The revision step: the revision number moves on by one and the weld goes back for inspection.
            (f'{still_open} AND NEW."revision" = OLD."revision" + 1 AND NEW."latest_inspection_id" IS NULL '
             'AND NEW."latest_final_id" IS NULL', everything),
        ]

    def sql_state_moves(self):
        return None

    def sql_insert_refused(self):
        return _closed_sql("NEW")

    def sql_m2m_frozen(self, name):
        return f'(p."latest_final_id" IS NOT NULL OR {_closed_sql("p")})'

    def sql_words(self, doing="changed"):
        if doing == "changed":
            return ("cannot be changed after its inspection, or once its assembly is released, except by a "
                    "revision that sends it back for inspection (a database rule of Legwork)")
        if doing == "added":
            return "cannot be added to a released or scrapped assembly (a database rule of Legwork)"
        return "cannot be deleted once inspected or released (a database rule of Legwork)"


class Weld(Guarded):
    """A line of the weld map: what the drawing asks for, who welded it, to which WPS (see WeldLock)."""

    assembly = models.ForeignKey(Assembly, on_delete=models.PROTECT, related_name="welds")
    mark = models.CharField("weld mark", max_length=20)
    joint_type = models.CharField(max_length=8, choices=JointType.choices, default=JointType.FILLET)
    size = LengthField("specified leg", help_text="Nominal fillet leg z; the vertical leg when legs differ")
    size2 = LengthField("second leg", null=True, blank=True, help_text="Only for unequal legs")
    # ISO 2553 drawings give the throat a, the leg z, or both. A weld whose drawing gives only a keeps the leg that
    # throat needs (leg_for_throat) in `size`, so strength and fit-up read a leg, and says so here.
    throat = LengthField("specified throat a", null=True, blank=True,
                         help_text="ISO drawings: the design throat a, when the drawing gives it")
    size_on_drawing = models.BooleanField("the drawing gives the leg", default=True,
                                          help_text="Off when the drawing gives only the throat a")
    length = LengthField("length of each weld")
    count = models.PositiveIntegerField(default=1, help_text="How many of this weld on one assembly")
    sides = models.CharField(max_length=5, choices=Sides.choices, default=Sides.ARROW)
    all_around = models.BooleanField(default=False)
    field_weld = models.BooleanField(default=False)
    pitch = LengthField("pitch (intermittent)", null=True, blank=True)
    thickness1 = LengthField("thickness of part 1")
    thickness2 = LengthField("thickness of part 2")
    position = models.CharField(max_length=2, choices=WELD_POSITION_CHOICES, default=Position.F)
    process = models.CharField(max_length=8, choices=WELD_PROCESS_CHOICES, blank=True,
                               help_text="When the drawing or weld map names one; blank: the WPS's process")
    wps = models.ForeignKey("procedures.WPS", null=True, blank=True, on_delete=models.PROTECT, related_name="welds",
                            verbose_name="WPS")
    welders = models.ManyToManyField("procedures.Welder", blank=True, related_name="welds")
    welded_on = models.DateField("date welded", null=True, blank=True)
    filler_lot = models.ForeignKey("inspections.FillerLot", null=True, blank=True, on_delete=models.PROTECT,
                                   related_name="welds", verbose_name="filler lot",
                                   help_text="The lot of filler metal the weld was made with (the filler register)")
    # The parts joined (inspections.models.material), when the weld map names them: their thicknesses feed
    # thickness1/thickness2 (inspections.services.material.record_weld_parts); drawing data, frozen with the rest.
    part1 = models.ForeignKey("inspections.Part", null=True, blank=True, on_delete=models.PROTECT, related_name="+",
                              verbose_name="part 1")
    part2 = models.ForeignKey("inspections.Part", null=True, blank=True, on_delete=models.PROTECT, related_name="+",
                              verbose_name="part 2")
    completed_at = models.DateTimeField(
        "weld completed and cooled", null=True, blank=True,
        help_text="When the weld was finished and cooled to ambient; the delayed final visual of quenched and "
                  "tempered steels counts from it")
    base_metals = models.CharField(
        max_length=200, blank=True,
        help_text="The steels of the parts joined, when the drawing names them: e.g. ASTM A514, ASTM A572 Gr 50")
    primary_member = models.BooleanField(default=False)
    transverse_to_tension = models.BooleanField("transverse to tensile stress", default=False)
    required_strength = ForceField(null=True, blank=True, help_text="From the engineer of record, when given")
    load_angle = models.DecimalField("load angle to weld axis (°)", max_digits=5, decimal_places=2, default=0)
    # Kept by inspections.services.inspect.sign_inspection, the one path by which inspections are stored: the
    # weld's latest current inspection of any stage, and its latest current final visual inspection.
    latest_inspection = models.ForeignKey("inspections.Inspection", null=True, blank=True, editable=False,
                                          on_delete=models.PROTECT, related_name="+")
    latest_final = models.ForeignKey("inspections.Inspection", null=True, blank=True, editable=False,
                                     on_delete=models.PROTECT, related_name="+")
    revision = models.PositiveIntegerField(default=0, editable=False,
                                           help_text="Moved on by each revision after inspection (with its reason)")
    revised_at = models.DateTimeField(null=True, blank=True, editable=False)
    version = models.PositiveIntegerField(default=1, editable=False)

    objects = GuardedQuerySet.as_manager()
    lock = WeldLock("weld", free=WELD_POINTERS, name=("mark", " (id ", "id", ")"))

    class Meta:
        ordering = ["assembly", "mark"]
        constraints = [models.UniqueConstraint(fields=["assembly", "mark"], name="weld_mark_unique_in_assembly")]
        base_manager_name = "objects"

    def __str__(self):
        return f"{self.assembly.piece_mark} / {self.mark}"

    def get_absolute_url(self):
        return reverse("inspections:weld_detail", args=[self.pk])

    def applicability_input(self, label=None) -> dict:
        """The weld as procedures.applicability.review() reads it."""
        return {"label": label or f"Weld {self.mark}", "joint": self.joint_type, "position": self.position,
                "thicknesses": [t for t in (self.thickness1, self.thickness2) if t is not None],
                "size": self.size, "size2": self.size2, "process": self.process or None}

    def history_system(self):
        return self.assembly.job.unit_system

    @property
    def inspected(self) -> bool:
        """Inspected since its last revision: its drawing data is frozen."""
        return self.latest_inspection_id is not None

    @property
    def thinner_part(self):
        return min(self.thickness1, self.thickness2)

    # --- the weld's size, said once: every page, PDF and service reads these -------------------------------

    @property
    def smaller_leg(self) -> Length:
        """The smaller specified leg (unequal legs) or the leg."""
        return min(self.size, self.size2) if self.size2 is not None else self.size

    @property
    def nominal_throat(self) -> Length:
        """The specified throat a: as the drawing gives it, else the effective throat of the specified legs
        (inspections.strength.effective_throat, AISC 360-16 J2.2a; ISO 5817's nominal a)."""
        if self.throat is not None:
            return self.throat
        return effective_throat(self.size, self.size2)

    @property
    def base_metal_list(self) -> list[str]:
        return [part.strip() for part in self.base_metals.split(",") if part.strip()]

    @property
    def thicker_part(self):
        return max(self.thickness1, self.thickness2)
