"""Tablet forms: find an assembly, record one weld's inspection (or a pass over identical welds, or a correction),
attach a photo.

The boxes and switches come from the one table of observations (inspections.observations): its labels in the job's
units, only what the job's criteria set judges (asked_by), grouped as the table groups them; the root opening is
what fit-up measures (AT_FIT_UP). Every length goes through LengthFormField in the job's unit system: a bare number
is inches on a US job and millimetres on an SI job; '5/32', '1-1/2"', '0.1875 in', '4 mm' and '0,4' work
everywhere (core.units reads a decimal comma). Angles are read by core.units.parse_angle.
"""

from django import forms
from django.utils import timezone

from core import units
from core.fields import TemperatureFormField, set_unit_system
from core.inputs import parse_id
from core.units import parse_length
from inspections import observations, preheat
from inspections.criteria import resolve
from inspections.models import Gauge, Inspection, InspectionStage, TemperatureMethod, Weld
from inspections.photos import PhotoError, clean_photo
from inspections.services import trace

MAX_DEFECT = parse_length("1000 mm")  # nothing a fillet gauge reads on one weld is longer than a metre
MAX_SIZE = parse_length("100 mm")
SIZES = ("min_size", "min_size2", "throat", "convexity", "face_width", "leg_difference", "root_gap",
         "overlap_width", "crater_depth", "pore_max", "undercut_depth")
ALONG_THE_WELD = ("undersize_length", "undercut_length", "throat_short_length")
OBSERVED = [o.name for o in observations.OBSERVATIONS]
TEMPERATURES = ("preheat_measured", "interpass_measured")


class FindAssemblyForm(forms.Form):
    q = forms.CharField(label="Piece mark", max_length=30, strip=True,
                        widget=forms.TextInput(attrs={
                            "autofocus": True, "autocomplete": "off", "autocapitalize": "characters",
                            "spellcheck": "false", "placeholder": "e.g. B12", "enterkeyhint": "search",
                            "class": "form-control-lg lw-search"}))


class AngleFormField(forms.CharField):
    """An angle in degrees as typed ('100', '100°', '100,5'), read by core.units.parse_angle (0 to 180°)."""

    def to_python(self, value):
        value = super().to_python(value)
        if value in self.empty_values:
            return None
        try:
            return units.parse_angle(value, 0, 180)
        except ValueError as exc:
            raise forms.ValidationError(str(exc), code="invalid") from None

    def prepare_value(self, value):
        if value is None or isinstance(value, str):
            return value
        return f"{units._plain(value)}"


def judges_throat_first(criteria) -> bool:
    """ISO 5817 sets judge the throat a, not the leg: their forms lead with it."""
    checks = resolve(criteria).checks
    return "throat" in checks and "undersize" not in checks


class InspectionForm(forms.ModelForm):
    """One weld's observations, read and bounded; judging and saving is inspections.services.inspect's."""

    class Meta:
        model = Inspection
        fields = ["stage", *OBSERVED, "remarks"]
        widgets = {"remarks": forms.Textarea(attrs={"rows": 2})}

    fit_up_ok = forms.BooleanField(
        required=False, label="Fit-up acceptable",
        help_text="Joint, alignment and cleanliness match the drawing and the WPS.")
    shown_verdict = forms.CharField(required=False, widget=forms.HiddenInput(attrs={"id": "lw-shown"}))
    preheat_measured = TemperatureFormField(
        required=False, label="Preheat measured",
        help_text="At fit-up or in-process, before the arc; a bare number is read in the job's units. "
                  + preheat.MEASURED_WHERE)
    interpass_measured = TemperatureFormField(
        required=False, label="Interpass temperature measured", help_text="In-process, before the next pass.")
    temperature_method = forms.ChoiceField(label="Measured with", required=False,
                                           choices=[("", "—"), *TemperatureMethod.choices])
    gauge = forms.CharField(
        required=False, label="Gauge used", max_length=20, widget=forms.Select(),
        help_text="From the gauge register: only gauges in calibration today are offered. Optional: an inspection "
                  "that measured nothing names none.")

    def __init__(self, *args, weld: Weld, batch=(), **kwargs):
        super().__init__(*args, **kwargs)
        self.weld = weld
        job = weld.assembly.job
        self.system = system = job.unit_system
        self.criteria = job.criteria_for_evaluation()
        self.throat_first = judges_throat_first(self.criteria)
        asked = {o.name for o in observations.asked_by(self.criteria)}
        self.asked = asked
        for name in OBSERVED:
            if name not in asked and name not in observations.AT_FIT_UP:
                del self.fields[name]
        set_unit_system(self, system)
        unit = "in" if system == "US" else "mm"
        # US: a full keyboard so '/' and '-' are there for 5/32 or 1-1/2 (the decimal keypad has neither);
        # SI: the decimal keypad (digits and the decimal mark, a comma on many locales: core.units reads it).
        inputmode = "text" if system == "US" else "decimal"
        for name, field in self.fields.items():
            if name not in observations.BY_NAME:
                continue
            o = observations.get(name)
            field.label = o.label(system)
            field.help_text = ""  # a glove-sized page: the table's help is the box's tooltip, not a paragraph
            field.widget.attrs["title"] = o.help
            if o.kind == "length":
                field.maximum = MAX_SIZE if name in SIZES else MAX_DEFECT
                field.widget.attrs.update({"inputmode": inputmode, "enterkeyhint": "next", "data-unit": unit})
            elif o.kind == "angle":
                self.fields[name] = AngleFormField(label=field.label, required=False,
                                                   max_length=units.MAX_INPUT_CHARS)
                self.fields[name].widget.attrs.update({"inputmode": "decimal", "data-unit": "\u00b0", "title": o.help,
                                                       "autocomplete": "off", "placeholder": "e.g. 110"})
            elif o.kind == "count":
                field.max_value = 1000
                field.widget.attrs.update({"inputmode": "numeric", "min": 0, "max": 1000})
            else:
                field.widget.attrs.update({"class": "lw-tile-input"})
        lead = "throat" if self.throat_first else "min_size"
        if lead in self.fields:
            self.fields[lead].widget.attrs["placeholder"] = "e.g. 5/32" if system == "US" else "e.g. 4,5"
        if "min_size" in self.fields:
            self.fields["min_size"].allow_zero = False
        self.fields["fit_up_ok"].widget.attrs.update({"class": "lw-tile-input"})
        for name in TEMPERATURES:
            self.fields[name].system = system
            self.fields[name].widget.attrs.update({"inputmode": inputmode, "data-unit": "°F" if system == "US"
                                                   else "°C", "placeholder": "e.g. 150" if system == "US"
                                                   else "e.g. 65"})
        self.fields["gauge"].widget.choices = self._gauge_choices  # read when the page is drawn: a signing reads
        # the chosen gauge itself (clean_gauge)
        if weld.assembly.job.gauge_required:  # the job's switch: not optional at the final visual
            self.fields["gauge"].help_text = ("From the gauge register: only gauges in calibration today are "
                                              "offered. This job requires the gauge used at the final visual.")
        self.fields["stage"].widget = forms.RadioSelect(choices=InspectionStage.choices, attrs={"class": "btn-check"})
        self.batch = list(batch)
        if self.batch:
            self.fields["welds"] = forms.MultipleChoiceField(
                label="Welds in this pass", required=True, widget=forms.CheckboxSelectMultiple,
                choices=[(str(w.pk), w.mark) for w in [weld, *self.batch]],
                help_text="Identical welds judged together with one verdict; untick one to inspect it on its own.",
                error_messages={"required": "Keep at least one weld in this pass."})
            self.fields["welds"].widget.attrs.update({"class": "lw-tile-input"})
            if not self.is_bound:
                self.initial["welds"] = [str(w.pk) for w in [weld, *self.batch]]

    def _gauge_choices(self):
        """The register's gauges usable today, read once per form, the first time the select is drawn."""
        if not hasattr(self, "_gauges_offered"):
            self._gauges_offered = [("", "— none —")] + [
                (str(g.pk), f"{g.number} · {g.get_kind_display()}") for g in trace.usable_gauges(timezone.localdate())]
        return self._gauges_offered

    # --- what the page lays out ---------------------------------------------------------------------------

    def groups(self):
        """(key, heading, [bound fields], open) of the weld observations this job asks, grouped and ordered as the
        table groups them; on ISO jobs the throat a leads. The root opening is laid out with the fit-up switch.
        open: something in the group is typed, ticked or wrong (a folded group then opens)."""
        out = []
        for key, heading in observations.GROUPS:
            names = [o.name for o in observations.in_group(key) if o.name in self.fields
                     and o.name not in observations.AT_FIT_UP]
            if key == "size" and self.throat_first:
                lead = [n for n in ("throat", "throat_short_length") if n in names]
                names = lead + [n for n in names if n not in lead]
                heading = "Throat and legs"
            elif key == "size" and "throat" not in names:
                heading = "Legs"
            if names:
                fields = [self[name] for name in names]
                typed = any(bf.value() not in (None, "", False) or bf.errors for bf in fields)
                out.append((key, heading, fields, typed))
        return out

    def root_opening_at_fit_up_only(self) -> bool:
        """AWS sets judge the root opening at fit-up only; ISO 5817 also on the finished weld (item 617)."""
        return "root_gap" not in self.asked

    def selected_batch(self) -> list[Weld]:
        """The welds of this pass as chosen (the weld itself first), after is_valid()."""
        if not self.batch:
            return [self.weld]
        chosen = set(self.cleaned_data.get("welds") or [])
        return [w for w in [self.weld, *self.batch] if str(w.pk) in chosen]

    # --- cleaning ------------------------------------------------------------------------------------------

    def clean_pores_per_4in(self):
        value = self.cleaned_data.get("pores_per_4in")
        if value is not None and value > 1000:
            raise forms.ValidationError(f"Enter at most 1000 pores; count the worst "
                                        f"{'4 in' if self.system == 'US' else '100 mm'} only.")
        return value

    def clean_gauge(self):
        """The Gauge chosen, or None; a gauge out of calibration today is refused with the reason."""
        text = self.cleaned_data.get("gauge") or ""
        if not text.strip():
            return None
        pk = parse_id(text)
        gauge = Gauge.objects.filter(pk=pk).first() if pk is not None else None
        if gauge is None:
            raise forms.ValidationError("Choose a gauge from the register.", code="invalid_choice")
        why = trace.gauge_refusal(gauge, timezone.localdate())
        if why:
            raise forms.ValidationError(why, code="out_of_calibration")
        return gauge

    def clean(self):
        data = super().clean()
        weld = self.weld
        self._clean_temperatures(data)
        if self.errors:
            return data
        if data.get("stage") == InspectionStage.FIT_UP:
            return self._clean_fit_up(data)
        if (data.get("stage") == InspectionStage.FINAL and data.get("gauge") is None
                and weld.assembly.job.gauge_required):
            self.add_error("gauge", trace.GAUGE_REQUIRED)
        if data.get("min_size") is None and data.get("throat") is None:
            if self.throat_first:
                self.add_error("throat", "Enter the smallest throat a measured (or the smallest leg z below).")
            else:
                self.add_error("min_size", "Enter the smallest leg measured.")
            return data
        if "root_gap" in self.fields and self.root_opening_at_fit_up_only() and data.get("root_gap") is not None:
            self.add_error("root_gap", "The root opening is gauged at fit-up, before welding: record it there.")
        for name in ALONG_THE_WELD:
            if data.get(name) is not None and data[name] > weld.length:
                self.add_error(name, "This is longer than the weld itself; measure it along this weld only.")
        return data

    def _clean_temperatures(self, data):
        """Preheat is measured before the arc (fit-up or in-process), interpass between passes (in-process); each
        reading names what measured it."""
        stage = data.get("stage")
        typed = [name for name in TEMPERATURES if data.get(name) is not None]
        if stage == InspectionStage.FINAL:
            for name in typed:
                self.add_error(name, "Temperatures are measured before and during welding: record this at fit-up "
                                     "or in-process.")
            return
        if stage == InspectionStage.FIT_UP and data.get("interpass_measured") is not None:
            self.add_error("interpass_measured", "Interpass temperature is measured between passes: record it "
                                                 "in-process.")
        if typed and not data.get("temperature_method"):
            self.add_error("temperature_method", "Say what the temperature was measured with.")
        if data.get("temperature_method") and not typed:
            self.add_error("temperature_method", "Enter the temperature measured, or leave this empty.")

    def _clean_fit_up(self, data):
        """Fit-up comes before welding: the root opening is gauged; weld measurements and defects come later."""
        for name in OBSERVED:
            if name in self.fields and name not in observations.AT_FIT_UP and data.get(name) not in (None, False):
                self.add_error(name, "Fit-up comes before welding: record this at the in-process or final "
                                     "inspection, or choose that stage.")
        if self.weld.joint_type == "fillet" and data.get("root_gap") is None:
            self.add_error("root_gap", "Gauge the root opening between the parts (0 when they touch).")
        return data

    def typed_anything(self) -> bool:
        """Has anything been typed or ticked yet (the stage aside)? An empty form is not judged on the panel."""
        names = [*OBSERVED, *TEMPERATURES, "fit_up_ok", "remarks"]
        return any(self.data.get(self.add_prefix(name)) not in (None, "") for name in names if name in self.fields)

    def observed(self) -> dict:
        """The cleaned observations, for the service (after is_valid())."""
        data = self.cleaned_data
        observed = {name: data.get(name) for name in OBSERVED if name in self.fields}
        observed["fit_up_ok"] = bool(data.get("fit_up_ok"))
        for name in (*TEMPERATURES, "temperature_method"):
            observed[name] = data.get(name) or None
        return observed

    def _post_clean(self):
        # The inspection is built by services.inspect.sign_inspection, not by this ModelForm's instance.
        pass

    def save(self, commit=True):
        raise NotImplementedError("Sign through inspections.services.inspect.sign_inspection.")


class CorrectionForm(InspectionForm):
    correction_reason = forms.CharField(
        label="Why is this inspection being corrected?", max_length=2000,
        error_messages={"required": "Say why the inspection is being corrected."},
        widget=forms.Textarea(attrs={"rows": 2}),
        help_text="Kept with both records: e.g. 'misread the gauge on the web side'.")

    class Meta(InspectionForm.Meta):
        fields = [*InspectionForm.Meta.fields, "correction_reason"]

    def clean_correction_reason(self):
        reason = self.cleaned_data.get("correction_reason", "").strip()
        if not reason:
            raise forms.ValidationError("Say why the inspection is being corrected.")
        return reason


class PhotoForm(forms.Form):
    image = forms.FileField(label="Photo", widget=forms.FileInput(attrs={
        "accept": "image/*", "capture": "environment"}))
    caption = forms.CharField(max_length=200, required=False,
                              widget=forms.TextInput(attrs={"placeholder": "What it shows, e.g. toe at the north end"}))

    def clean_image(self):
        upload = self.cleaned_data["image"]
        try:
            self.photo = clean_photo(upload)
        except PhotoError as exc:
            raise forms.ValidationError(str(exc), code="photo") from None
        return upload


__all__ = ["AngleFormField", "CorrectionForm", "FindAssemblyForm", "InspectionForm", "PhotoForm"]
