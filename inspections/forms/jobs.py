"""Job, assembly, weld, weld map import, NCR disposition and client criteria forms."""

from django import forms
from django.utils import timezone

from core.fields import LengthFormField, set_unit_system
from core.forms import VersionedModelForm, read_decimal_comma
from core.vocabulary import WELD_PROCESS_CHOICES
from inspections import wording
from inspections.models import Assembly, AssemblyState, ClientCriteriaSet, Customer, FillerLot, Job, Weld
from inspections.services import chain
from inspections.services.flags import cyclic_fillet_flag
from inspections.strength import leg_for_throat
from procedures.models import WPS, Welder
from procedures.models.wps import WPSState

BUILTIN, CLIENT = "builtin", "client"


def criteria_choices():
    """Built-in sets (inspections.criteria) and the latest version of each client set."""
    from inspections.criteria import list_criteria

    builtin = [(f"{BUILTIN}:{s.key}", f"{s.title} ({s.key} v{s.version})") for s in list_criteria()]
    latest = {}
    for cset in ClientCriteriaSet.objects.order_by("key", "-version"):
        latest.setdefault(cset.key, cset)
    client = [(f"{CLIENT}:{c.pk}", str(c)) for c in latest.values()]
    return [("Published sets", builtin)] + ([("Client sets", client)] if client else [])


class JobForm(VersionedModelForm):
    customer = forms.CharField(
        label="Customer", max_length=120,
        widget=forms.TextInput(attrs={"list": "customer-names", "autocomplete": "off"}),
        help_text="An existing customer's name, or a new one. Viewer accounts see the jobs of the customers they "
                  "are tied to (in the admin).")
    criteria = forms.ChoiceField(label="Criteria set", help_text="The acceptance criteria every inspection on this "
                                 "job is judged by; verdicts keep the set and version they were judged by.")

    class Meta:
        model = Job
        fields = ["number", "name", "unit_system", "fit_up_hold_point", "filler_lot_required", "gauge_required",
                  "mill_certificates"]
        labels = {"number": "Job number", "name": "Job name", "unit_system": "Units"}
        widgets = {"mill_certificates": forms.Select(choices=[
            ("unknown", "As the job's code: required on ISO jobs, not on AWS jobs"), ("true", "Required"),
            ("false", "Not required")])}

    field_order = ["number", "name", "customer", "unit_system", "criteria", "fit_up_hold_point",
                   "filler_lot_required", "gauge_required", "mill_certificates"]

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["criteria"].choices = criteria_choices()
        self.customer_names = list(Customer.objects.values_list("name", flat=True))
        if self.instance.pk:
            job = self.instance
            self.initial["customer"] = job.customer.name
            self.initial["criteria"] = (f"{CLIENT}:{job.client_criteria_id}" if job.client_criteria_id
                                        else f"{BUILTIN}:{job.criteria_key}")

    def clean_number(self):
        return self.cleaned_data["number"].strip()

    def clean_customer(self):
        name = " ".join(self.cleaned_data["customer"].split())
        if not name:
            raise forms.ValidationError("Name the customer.", code="required")
        return name

    def save(self, commit=True):
        name = self.cleaned_data["customer"]  # the same customer whatever the case; a new name makes a new one
        self.instance.customer = (Customer.objects.filter(name__iexact=name).first()
                                  or Customer.objects.create(name=name))
        kind, _, value = self.cleaned_data["criteria"].partition(":")
        if kind == CLIENT:
            client = ClientCriteriaSet.objects.get(pk=value)
            self.instance.client_criteria, self.instance.criteria_key = client, client.key
        else:
            self.instance.client_criteria, self.instance.criteria_key = None, value
        return super().save(commit)


class AssemblyForm(VersionedModelForm):
    class Meta:
        model = Assembly
        fields = ["piece_mark", "drawing", "drawing_revision", "quantity", "description"]
        labels = {"drawing_revision": "Revision"}

    def __init__(self, *args, job, **kwargs):
        self.job = job
        super().__init__(*args, **kwargs)
        self.fields["quantity"].min_value = 1
        self.fields["quantity"].widget.attrs["min"] = 1

    def clean_piece_mark(self):
        mark = self.cleaned_data["piece_mark"].strip()
        others = Assembly.objects.filter(job=self.job, piece_mark__iexact=mark).exclude(pk=self.instance.pk)
        if others.exists():
            raise forms.ValidationError(f"Job {self.job.number} already has piece mark {mark}.", code="unique")
        return mark

    def clean_quantity(self):
        quantity = self.cleaned_data["quantity"]
        if quantity is None or quantity < 1:
            raise forms.ValidationError("At least one.", code="min_value")
        return quantity


# The weld's drawing data: what a detailer exports (tests and the CSV import use the same rules).
SPEC_FIELDS = ["mark", "joint_type", "size", "size2", "throat", "length", "count", "sides", "thickness1",
               "thickness2", "position"]
EXTRA_SPEC_FIELDS = ["all_around", "field_weld", "pitch", "primary_member", "transverse_to_tension",
                     "required_strength", "load_angle", "base_metals"]
PRODUCTION_FIELDS = ["process", "wps", "welders", "welded_on", "completed_at"]


class WeldSpecForm(forms.ModelForm):
    """One line of the weld map as the drawing gives it; lengths in the job's system.

    ISO jobs (ISO 2553 drawings) lead with the throat a and take the leg z where the drawing gives it: either will
    do, and a weld drawn with a only keeps the leg that throat needs (strength.leg_for_throat) for the strength and
    fit-up arithmetic, marked as not on the drawing. AWS jobs give the leg."""

    class Meta:
        model = Weld
        fields = SPEC_FIELDS
        labels = {"size": "Leg size", "size2": "Second leg (unequal legs only)", "length": "Length of each weld",
                  "count": "How many", "thickness1": "Part 1 thickness", "thickness2": "Part 2 thickness",
                  "throat": "Throat a"}

    def __init__(self, *args, assembly, **kwargs):
        self.assembly = assembly
        super().__init__(*args, **kwargs)
        set_unit_system(self, assembly.job.unit_system)
        read_decimal_comma(self)
        for name in ("size", "length", "thickness1", "thickness2", "size2", "pitch", "throat"):
            if name in self.fields:
                self.fields[name].allow_zero = False
        self.iso = wording.throat_first(assembly.job)
        if "throat" in self.fields:
            if self.iso:
                self.fields["throat"].help_text = "The design throat a the drawing gives (a5 on the symbol)"
                self.fields["size"].required = False
                self.fields["size"].label = "Leg z"
                self.fields["size"].help_text = "Where the drawing gives the leg (z7 on the symbol)"
                self.order_fields(["mark", "joint_type", "throat", "size"])
            else:
                del self.fields["throat"]
        if "count" in self.fields:
            self.fields["count"].min_value = 1
            self.fields["count"].widget.attrs.update(min=1, max=1000)
        hint = "e.g. 5/16 or 1-1/2\" (inches)" if assembly.job.unit_system == "US" else "e.g. 8 (mm)"
        for field in self.fields.values():
            if isinstance(field, LengthFormField):
                field.widget.attrs.setdefault("placeholder", hint)

    def clean_mark(self):
        mark = self.cleaned_data["mark"].strip()
        taken = Weld.objects.filter(assembly=self.assembly, mark__iexact=mark).exclude(pk=self.instance.pk)
        if taken.exists():
            raise forms.ValidationError(f"{self.assembly.piece_mark} already has weld {mark}.", code="unique")
        return mark

    def clean_count(self):
        count = self.cleaned_data["count"]
        if count is None or not 1 <= count <= 1000:
            raise forms.ValidationError("Between 1 and 1000.", code="range")
        return count

    def clean(self):
        data = super().clean()
        if data.get("size2") is not None and data.get("joint_type") != "fillet":
            self.add_error("size2", "A second leg is given for unequal-leg fillet welds only.")
        if self.iso and "size" in self.fields and "size" not in self.errors and "throat" not in self.errors:
            if data.get("size") is None and data.get("throat") is None:
                self.add_error("throat", "Give the throat a or the leg z, as the drawing gives them.")
            elif data.get("size") is None:
                data["size"] = leg_for_throat(data["throat"])
                data["size_on_drawing"] = False
            else:
                data["size_on_drawing"] = True
            if "size_on_drawing" in data:
                self.instance.size_on_drawing = data["size_on_drawing"]
        self.flags = []
        flag = cyclic_fillet_flag(self.assembly.job, data.get("joint_type"), data.get("size"), data.get("size2"))
        if flag and "size" in self.fields and not self.fields["size"].disabled:
            self.flags.append(flag)
        return data


class WeldForm(VersionedModelForm, WeldSpecForm):
    """The whole weld: drawing data, engineering data and who welded it to which WPS.

    spec_locked: the drawing data shows but does not change (inspected, or a role that records production only);
    production_locked: nothing changes (final-inspected: only a revision changes it).
    """

    welded_on = forms.DateField(label="Date welded", required=False,
                                widget=forms.DateInput(attrs={"type": "date"}))
    completed_at = forms.DateTimeField(
        label="Completed and cooled at", required=False,
        widget=forms.DateTimeInput(attrs={"type": "datetime-local"}, format="%Y-%m-%dT%H:%M"),
        input_formats=["%Y-%m-%dT%H:%M", "%Y-%m-%d %H:%M"],
        help_text="Date and time the weld was finished and cooled: A514, A517 and A709 Gr 100 steels wait 48 h "
                  "from it for their final visual")

    class Meta(WeldSpecForm.Meta):
        fields = SPEC_FIELDS + EXTRA_SPEC_FIELDS + PRODUCTION_FIELDS
        widgets = {"welders": forms.CheckboxSelectMultiple}
        labels = {**WeldSpecForm.Meta.labels, "wps": "WPS", "load_angle": "Load angle to weld axis (degrees)"}

    def __init__(self, *args, spec_locked=False, production_locked=False, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["wps"].queryset = WPS.objects.order_by("number", "-revision")
        self.fields["wps"].choices = wps_choices(self.instance, self.assembly.job,
                                                 self.instance.welded_on or timezone.localdate())
        self.fields["wps"].help_text = ("Approved procedures that cover this weld come first; another is refused "
                                        "with the reason.")
        self.fields["process"].choices = [("", "As the WPS"), *WELD_PROCESS_CHOICES]
        self.fields["process"].help_text = "When the drawing or weld map names the process"
        self.fields["welders"].queryset = Welder.objects.filter(active=True).order_by("stamp")
        self.fields["load_angle"].min_value = 0
        self.fields["load_angle"].max_value = 90
        if spec_locked:  # inspected, or the user may record production only: the drawing data stays as it is
            for name in SPEC_FIELDS + EXTRA_SPEC_FIELDS:
                if name in self.fields:
                    self.fields[name].disabled = True
        if production_locked:
            for name in PRODUCTION_FIELDS:
                if name in self.fields:
                    self.fields[name].disabled = True

    def clean_welded_on(self):
        day = self.cleaned_data.get("welded_on")
        if day and day > timezone.localdate():
            raise forms.ValidationError("The date welded cannot be in the future.", code="future")
        return day

    def clean_completed_at(self):
        moment = self.cleaned_data.get("completed_at")
        if moment and moment > timezone.now() + timezone.timedelta(minutes=5):
            raise forms.ValidationError("The weld cannot be completed in the future.", code="future")
        return moment

    def clean_base_metals(self):
        return ", ".join(dict.fromkeys(" ".join(part.split()) for part in
                                       (self.cleaned_data.get("base_metals") or "").split(",") if part.strip()))

    def clean_load_angle(self):
        angle = self.cleaned_data.get("load_angle")
        if angle is not None and not 0 <= angle <= 90:
            raise forms.ValidationError("From 0 (load along the weld) to 90 degrees (across it).", code="range")
        return angle

    def clean(self):
        data = super().clean()
        if data.get("welders") and not data.get("welded_on"):
            self.add_error("welded_on", "Give the date welded with the welders (it counts toward their continuity).")
        wps = data.get("wps")
        if wps is not None and "welded_on" not in self.errors:
            weld = self._as_entered(data)
            day = data.get("welded_on") or timezone.localdate()
            check = chain.wps_check(weld, wps, self.assembly.job, day) if weld is not None else \
                chain.WpsCheck(wps, [reason] if (reason := wps.in_force_on(day)) else [])
            for error in check.errors:
                self.add_error("wps", error)
        moment, day = data.get("completed_at"), data.get("welded_on")
        if moment and day and timezone.localtime(moment).date() < day:
            self.add_error("completed_at", "The weld is completed on or after the day it was welded.")
        return data

    def _as_entered(self, data):
        """The weld as the form holds it, to judge the WPS against; None while its drawing data is not valid."""
        needed = ("joint_type", "position", "thickness1", "thickness2", "size")
        if any(self.has_error(name) or data.get(name) is None for name in needed):
            return None
        values = {name: data.get(name) for name in (*needed, "size2", "process")}
        return Weld(assembly=self.assembly, mark=data.get("mark") or self.instance.mark or "",
                    **{k: (v if v is not None else getattr(self.instance, k)) for k, v in values.items()})


def wps_choices(weld, job, day):
    """The WPS menu of a weld: the approved procedures that cover it on `day` first, then the rest with what stands
    in the way (a withdrawn WPS is left out). A weld without its drawing data yet is judged on approval alone."""
    candidates = list(WPS.objects.exclude(state=WPSState.WITHDRAWN).order_by("number", "-revision"))
    chain.prime_successors(candidates)
    complete = all(getattr(weld, name, None) is not None
                   for name in ("joint_type", "position", "thickness1", "thickness2", "size"))
    usable, other = [], []
    for wps in candidates:
        label = f"{wps.number} rev {wps.revision} · {wps.get_state_display()}"
        if wps.in_force_on(day):
            other.append((wps.pk, f"{label} · not approved on {day:%Y-%m-%d}"))
        elif complete and chain.wps_check(weld, wps, job, day).errors:
            other.append((wps.pk, f"{label} · does not cover this weld"))
        else:
            usable.append((wps.pk, label))
    heading = "Approved, covering this weld" if complete else "Approved"
    return [("", "---------"), (heading, usable), ("Refused for this weld", other)]


class WeldRevisionForm(WeldForm):
    """A revision of an inspected weld: every field, and why (kept in the weld's history)."""

    reason = forms.CharField(label="Reason for the revision", max_length=500, widget=forms.Textarea(attrs={"rows": 2}),
                             help_text="e.g. Drawing E-204 rev 3 enlarged the leg to 5/16. Kept in the weld's history.")

    def clean_reason(self):
        reason = self.cleaned_data["reason"].strip()
        if not reason:
            raise forms.ValidationError("Say why the weld is revised.", code="required")
        return reason


class PieceMarkSearchForm(forms.Form):
    q = forms.CharField(label="Piece mark", max_length=30, required=False,
                        widget=forms.TextInput(attrs={"placeholder": "Piece mark, e.g. B12", "autocomplete": "off",
                                                      "type": "search"}))


class StepForm(forms.Form):
    reason = forms.CharField(label="Note (optional)", max_length=500, required=False,
                             widget=forms.TextInput())


class WeldMapUploadForm(forms.Form):
    file = forms.FileField(label="Weld map (CSV)", help_text="UTF-8 CSV with a header row; at most 1 MB.")


class RepairForm(forms.Form):
    repair_wps = forms.ModelChoiceField(label="Repair to WPS", queryset=WPS.objects.none())
    repair_welder = forms.ModelChoiceField(label="Repair welder", queryset=Welder.objects.none())
    disposition_notes = forms.CharField(label="Repair instructions", widget=forms.Textarea(attrs={"rows": 3}),
                                        max_length=2000)

    def __init__(self, *args, choices=None, **kwargs):
        """choices: (WPSs, welders) to offer (inspections.services.repairs.repair_choices); default every approved
        WPS and active welder."""
        super().__init__(*args, **kwargs)
        wps, welders = _offered(choices, WPS.objects.approved(), Welder.objects.filter(active=True))
        self.fields["repair_wps"].queryset = wps.order_by("number", "-revision")
        self.fields["repair_welder"].queryset = welders.order_by("stamp")


def _offered(choices, wps, welders, keep=()):
    """Narrow the WPS and welder querysets to the offered ones (and the ones already named, `keep`)."""
    if choices is None:
        return wps, welders
    wps_ids = {w.pk for w in choices[0]} | {pk for pk in keep[:1] if pk}
    welder_ids = {w.pk for w in choices[1]} | {pk for pk in keep[1:] if pk}
    return wps.filter(pk__in=wps_ids), welders.filter(pk__in=welder_ids)


LOTS_OFFERED = 40  # the repair form's filler lot list (newest first), like the repair choices' bound


class RepairRecordForm(forms.Form):
    """The repair as welded: who, to which WPS, when (inspections.services.repairs.record_repair checks it)."""

    wps = forms.ModelChoiceField(label="Welded to WPS", queryset=WPS.objects.none())
    welders = forms.ModelMultipleChoiceField(label="Welded by", queryset=Welder.objects.none(),
                                             widget=forms.CheckboxSelectMultiple)
    welded_on = forms.DateField(label="Date repaired", widget=forms.DateInput(attrs={"type": "date"}))
    filler_lot = forms.ModelChoiceField(label="Filler lot used", queryset=FillerLot.objects.none(), required=False,
                                        help_text="As printed on the spool or box; its classification must be the "
                                                  "repair WPS's.")
    notes = forms.CharField(label="What was done", widget=forms.Textarea(attrs={"rows": 2}), max_length=2000,
                            required=False)

    def __init__(self, *args, ncr=None, choices=None, **kwargs):
        super().__init__(*args, **kwargs)
        keep = (ncr.repair_wps_id, ncr.repair_welder_id) if ncr is not None else ()
        wps, welders = _offered(choices, WPS.objects.exclude(state__in=[WPSState.DRAFT, WPSState.SUBMITTED]),
                                Welder.objects.filter(active=True), keep)
        self.fields["wps"].queryset = wps.order_by("number", "-revision")
        self.fields["welders"].queryset = welders.order_by("stamp")
        lots = self.fields["filler_lot"]
        lots.queryset = FillerLot.objects.all()  # any lot is read back, so a mismatch is named beside the field
        # ...but the list offers only the newest lots of the classifications the offered WPSs specify (one query)
        lots.widget.choices = [("", "—")] + [(lot.pk, str(lot)) for lot in FillerLot.objects.filter(
            classification__in=wps.values("electrode")).order_by("-received_on", "-pk")[:LOTS_OFFERED]]
        if ncr is not None and not self.is_bound:
            self.initial.update(wps=ncr.repair_wps_id, welders=[ncr.repair_welder_id] if ncr.repair_welder_id else [],
                                welded_on=timezone.localdate())


class UseAsIsForm(forms.Form):
    engineer_name = forms.CharField(label="Engineer approving", max_length=120)
    engineer_approved_on = forms.DateField(label="Approved on", widget=forms.DateInput(attrs={"type": "date"}))
    disposition_notes = forms.CharField(label="Basis of acceptance", widget=forms.Textarea(attrs={"rows": 3}),
                                        max_length=2000, required=False)


class ScrapForm(forms.Form):
    disposition_notes = forms.CharField(label="Why scrap", widget=forms.Textarea(attrs={"rows": 3}), max_length=2000)
    confirm = forms.BooleanField(
        label="Yes: scrap the whole assembly. It takes no more inspections and is never released; this cannot be "
              "undone.", error_messages={"required": "Tick to confirm: scrapping cannot be undone."})


def add_step_errors(form, exc):
    """Put a Refused's messages next to the fields they name (others at the top of the form)."""
    if hasattr(exc, "error_dict"):
        for name, errors in exc.message_dict.items():
            form.add_error(name if name in form.fields else None, errors)
    else:
        form.add_error(None, exc.messages)


# --- client criteria sets --------------------------------------------------------------------------------

def base_set_choices():
    from inspections.criteria import list_criteria

    choices = [(s.key, f"{s.title} ({s.key} v{s.version})") for s in list_criteria()]
    latest = {}
    for cset in ClientCriteriaSet.objects.order_by("key", "-version"):
        latest.setdefault(cset.key, cset)
    return choices + [(f"{CLIENT}:{c.pk}", f"Client: {c}") for c in latest.values()]


class CriteriaDeriveForm(forms.Form):
    """A client's set: the base set's limits, with the ones the client tightens (or an engineer loosens) changed.

    One text box per limit (two, US and SI, where the standard prints both); blank keeps the base's value.
    inspections.criteria.derive reads the values and decides what is tighter.
    """

    key = forms.SlugField(label="Key of the client's set", max_length=60,
                          help_text="e.g. harlan-transit-static; an existing key gets a new version")
    title = forms.CharField(max_length=120)
    engineer_name = forms.CharField(label="Engineer signing a looser limit", max_length=120, required=False,
                                    help_text="Only needed when a limit allows more than the base set")

    def __init__(self, *args, base, **kwargs):
        from inspections.criteria.base import Banded, Fixed, Threshold

        super().__init__(*args, **kwargs)
        self.base = base
        self.limit_fields = []  # (limit name, [form field names])
        for name, limit in base.limits.items():
            if isinstance(limit, Threshold):
                continue  # where a rule changes, not an allowance: derive refuses to override it
            if isinstance(limit, (Fixed, Banded)) and len(base.systems) > 1:
                names = [f"{name}__us", f"{name}__si"]
                self.fields[names[0]] = forms.CharField(label=f"{name} (US)", required=False, max_length=40,
                                                        widget=forms.TextInput(attrs={"placeholder": "e.g. 1/64 in"}))
                self.fields[names[1]] = forms.CharField(label=f"{name} (SI)", required=False, max_length=40,
                                                        widget=forms.TextInput(attrs={"placeholder": "e.g. 0.5 mm"}))
            else:
                names = [name]
                self.fields[name] = forms.CharField(label=name, required=False, max_length=40)
            self.limit_fields.append((name, names))

    def overrides(self):
        values = {}
        for name, names in self.limit_fields:
            if len(names) == 2:
                us, si = (self.cleaned_data.get(n, "").strip() for n in names)
                if us or si:
                    values[name] = {k: v for k, v in (("us", us), ("si", si)) if v}
            else:
                value = self.cleaned_data.get(name, "").strip()
                if value:
                    values[name] = value
        return values

    def clean(self):
        data = super().clean()
        if self.errors:
            return data
        if not self.overrides():
            raise forms.ValidationError("Change at least one limit; otherwise use the base set as it is.")
        return data

    def fields_of(self, limit_name):
        return dict(self.limit_fields).get(limit_name, [])


class PacketRuleForm(forms.Form):
    """Which assemblies of a big job go in a packet, by rule (inspections.packets.choose_assemblies): a job with
    hundreds of assemblies is packed by state or piece marks, not by a checkbox per assembly."""

    rule = forms.ChoiceField(label="Assemblies", widget=forms.RadioSelect, initial="all", choices=[
        ("all", "Every assembly of the job"), ("state", "The assemblies in one state"),
        ("marks", "The piece marks typed below")])
    state = forms.ChoiceField(label="State", required=False,
                              choices=[("", "—")] + list(AssemblyState.choices))
    # the most a packet holds (packets.MAX_ASSEMBLIES, 2,000) of the longest piece marks (30) with ", " between
    marks = forms.CharField(label="Piece marks", required=False, max_length=2000 * (30 + 2),
                            widget=forms.Textarea(attrs={"rows": 3, "placeholder": "e.g. B101, B102, C7"}),
                            help_text="Separated by commas, spaces or lines.")

    def __init__(self, *args, counts=None, **kwargs):
        super().__init__(*args, **kwargs)
        if counts:  # the state choices say how many assemblies each holds
            self.fields["state"].choices = [("", "—")] + [
                (value, f"{label} ({counts.get(value, 0):,})") for value, label in AssemblyState.choices]
