"""Tablet forms: find an assembly, record one weld's inspection (or a correction), attach a photo.

Every length goes through LengthFormField in the job's unit system: a bare number is inches on a US job and
millimetres on an SI job; '5/32', '1-1/2"', '0.1875 in' and '4 mm' work everywhere.
"""

from django import forms

from core.fields import set_unit_system
from core.units import parse_length
from inspections.models import Inspection, InspectionStage, Weld
from inspections.models.inspection import FLAG_OBSERVATIONS, LENGTH_OBSERVATIONS
from inspections.photos import PhotoError, clean_photo

MAX_DEFECT = parse_length("1000 mm")  # nothing a fillet gauge reads on one weld is longer than a metre
MAX_SIZE = parse_length("100 mm")

FLAG_LABELS = {
    "crack": "Crack",
    "incomplete_fusion": "Incomplete fusion",
    "unfilled_crater": "Unfilled crater",
    "overlap": "Overlap",
    "arc_strike": "Arc strike",
}


class FindAssemblyForm(forms.Form):
    q = forms.CharField(label="Piece mark", max_length=30, strip=True,
                        widget=forms.TextInput(attrs={
                            "autofocus": True, "autocomplete": "off", "autocapitalize": "characters",
                            "spellcheck": "false", "placeholder": "e.g. B12", "enterkeyhint": "search",
                            "class": "form-control-lg lw-search"}))


class InspectionForm(forms.ModelForm):
    """One weld's observations, read and bounded; judging and saving is inspections.services.inspect's."""

    class Meta:
        model = Inspection
        fields = ["stage", *LENGTH_OBSERVATIONS, "pores_per_4in", *FLAG_OBSERVATIONS, "remarks"]
        labels = {**FLAG_LABELS, "min_size": "Smallest leg measured", "pores_per_4in": "Pores in the worst 4 in"}
        widgets = {"remarks": forms.Textarea(attrs={"rows": 2})}

    fit_up_ok = forms.BooleanField(
        required=False, label="Fit-up acceptable",
        help_text="Fit-up only: joint, root opening, alignment and cleanliness match the drawing and the WPS.")

    def __init__(self, *args, weld: Weld, **kwargs):
        super().__init__(*args, **kwargs)
        self.weld = weld
        self.fields["fit_up_ok"].widget.attrs.update({"role": "switch", "class": "form-check-input lw-flag"})
        system = weld.assembly.job.unit_system
        set_unit_system(self, system)
        unit = "in" if system == "US" else "mm"
        # US: a full keyboard so '/' and '-' are there for 5/32 or 1-1/2 (the decimal keypad has neither);
        # SI: the decimal keypad (digits and the decimal point).
        inputmode = "text" if system == "US" else "decimal"
        for name in LENGTH_OBSERVATIONS:
            field = self.fields[name]
            field.maximum = MAX_SIZE if name in ("min_size", "throat", "convexity", "face_width") else MAX_DEFECT
            field.widget.attrs.update({"inputmode": inputmode, "enterkeyhint": "next", "data-unit": unit})
        self.fields["min_size"].allow_zero = False
        self.fields["min_size"].widget.attrs["placeholder"] = "e.g. 5/32" if system == "US" else "e.g. 4"
        self.fields["pores_per_4in"].widget.attrs.update({"inputmode": "numeric", "min": 0, "max": 1000})
        self.fields["pores_per_4in"].max_value = 1000
        if system == "SI":
            self.fields["pores_per_4in"].label = "Pores in the worst 100 mm"
            self.fields["porosity_sum_1in"].label = "Sum of pore diameters, worst 25 mm"
            self.fields["porosity_sum_12in"].label = "Sum of pore diameters, worst 300 mm"
            self.fields["undercut_length"].label = "Undercut length over the general limit (worst 300 mm)"
        else:
            self.fields["porosity_sum_1in"].label = "Sum of pore diameters, worst 1 in"
            self.fields["porosity_sum_12in"].label = "Sum of pore diameters, worst 12 in"
            self.fields["undercut_length"].label = "Undercut length over the general limit (worst 12 in)"
        self.fields["stage"].widget = forms.RadioSelect(choices=InspectionStage.choices, attrs={"class": "btn-check"})
        for name in FLAG_OBSERVATIONS:
            self.fields[name].widget.attrs.update({"role": "switch", "class": "form-check-input lw-flag"})

    def clean_pores_per_4in(self):
        value = self.cleaned_data.get("pores_per_4in")
        if value is not None and value > 1000:
            raise forms.ValidationError("Enter at most 1000 pores; count the worst 4 in (100 mm) only.")
        return value

    def clean(self):
        data = super().clean()
        weld = self.weld
        if self.errors:
            return data
        if data.get("stage") == InspectionStage.FIT_UP:
            return self._clean_fit_up(data)
        if data.get("min_size") is None and data.get("throat") is None:
            self.add_error("min_size", "Enter the smallest leg measured (or, on ISO jobs, the throat).")
            return data
        for name in ("undersize_length", "undercut_length"):
            if data.get(name) is not None and data[name] > weld.length:
                self.add_error(name, "This is longer than the weld itself; measure it along this weld only.")
        return data

    def _clean_fit_up(self, data):
        """Fit-up comes before welding: weld measurements and weld defects belong to a later inspection."""
        for name in [*LENGTH_OBSERVATIONS, "pores_per_4in", *FLAG_OBSERVATIONS]:
            if data.get(name) not in (None, False):
                self.add_error(name, "Fit-up comes before welding: record this at the in-process or final "
                                     "inspection, or choose that stage.")
        return data

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
    caption = forms.CharField(max_length=200, required=False)

    def clean_image(self):
        upload = self.cleaned_data["image"]
        try:
            self.photo = clean_photo(upload)
        except PhotoError as exc:
            raise forms.ValidationError(str(exc), code="photo") from None
        return upload
