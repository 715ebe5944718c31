"""WPS and PQR forms: what an engineer types, read in the procedure's unit system; rules stay in the engines.

Every length goes through LengthFormField and every temperature through TemperatureFormField; a bare number is
read in the procedure's unit system (50 is 50 °F on a US WPS, 50 °C on an SI one), as lengths are. A filler
classification is read by procedures.electrodes.decode, whose message says which part is wrong. A range whose
minimum is above its maximum is refused beside the minimum. Anything else a reviewer would mark (prequalified
limits) is a finding, shown in the review panel, not a form error: a draft may be saved while it is still wrong.
"""

from crispy_forms.helper import FormHelper
from crispy_forms.layout import Column, Field, Fieldset, Layout, Row
from django import forms
from django.core.exceptions import ValidationError

from core import units
from core.fields import set_unit_system
from core.forms import VersionedModelForm, read_decimal_comma
from core.vocabulary import JointType, Position, Process, UnitSystem
from procedures.electrodes import decode
from procedures.models.wps import PQR, WPS

# (minimum field, maximum field): a minimum above its maximum is refused beside the minimum.
RANGES = (
    ("amperage_min", "amperage_max"), ("voltage_min", "voltage_max"), ("wire_feed_min", "wire_feed_max"),
    ("travel_speed_min", "travel_speed_max"), ("ctwd_min", "ctwd_max"), ("gas_flow_min", "gas_flow_max"),
    ("thickness_min", "thickness_max"), ("fillet_size_min", "fillet_size_max"),
)
ELECTRICAL = ("amperage_min", "amperage_max", "voltage_min", "voltage_max")


def _system_of(form, data, instance):
    """The unit system bare numbers are read in: the one posted (if valid), else the record's, else US."""
    posted = data.get(form.add_prefix("unit_system")) if data is not None else None
    if posted in UnitSystem.values:
        return posted
    return getattr(instance, "unit_system", None) or UnitSystem.US


def _positive(form):
    """Amps and volts: read by core.units, which refuses zero, a sign, and figures no arc runs at; a decimal comma
    reads as a point, and a stored 250.0 A prints as 250 (core.forms.read_decimal_comma)."""
    read_decimal_comma(form)
    for name, field in form.fields.items():
        parser = units.parse_amperage if "amperage" in name else units.parse_voltage if "voltage" in name else None
        if parser is not None:
            field.widget.attrs.update({"inputmode": "decimal", "autocomplete": "off"})
            field.validators.append(_reading(parser))


def _reading(parser):
    def validate(value):
        if value is None:
            return
        try:
            parser(value)
        except ValueError as exc:
            # not code="invalid": a field's own error_messages would replace the message with "Enter a number."
            raise ValidationError(str(exc), code="reading") from None

    return validate


def clean_classification(text):
    """A filler classification, normalised by the decoder; its message names the part it cannot read."""
    text = (text or "").strip()
    try:
        return decode(text).classification
    except ValueError as exc:
        raise ValidationError(str(exc), code="electrode") from None


class WPSForm(VersionedModelForm):
    positions = forms.MultipleChoiceField(choices=Position.choices, widget=forms.CheckboxSelectMultiple,
                                          help_text="Positions this procedure is written for")
    joint_types = forms.MultipleChoiceField(choices=JointType.choices, widget=forms.CheckboxSelectMultiple,
                                            label="Joint types")
    pqrs = forms.ModelMultipleChoiceField(PQR.objects.all(), required=False, widget=forms.CheckboxSelectMultiple,
                                          label="Supporting PQRs", help_text="Needed when the basis is a test")

    class Meta:
        model = WPS
        fields = [
            "number", "title", "code", "unit_system", "basis", "pqrs", "toughness_required",
            "process", "transfer", "electrode", "electrode_diameter", "current",
            "amperage_min", "amperage_max", "voltage_min", "voltage_max", "wire_feed_min", "wire_feed_max",
            "travel_speed_min", "travel_speed_max", "ctwd_min", "ctwd_max", "work_angle", "travel_angle",
            "technique", "passes", "interpass_cleaning", "shielding_gas", "gas_flow_min", "gas_flow_max",
            "positions", "progression", "joint_types", "backing", "base_metals", "thickness_min", "thickness_max",
            "fillet_size_min", "fillet_size_max", "single_pass_size_max", "preheat_min", "interpass_max", "notes",
        ]
        widgets = {"notes": forms.Textarea(attrs={"rows": 3})}
        help_texts = {"electrode": "AWS classification, e.g. E7018, ER70S-6, E71T-1C, F7A2-EM12K"}

    def __init__(self, data=None, *args, **kwargs):
        super().__init__(data, *args, **kwargs)
        set_unit_system(self, _system_of(self, data, self.instance))
        _positive(self)
        self.fields["pqrs"].queryset = PQR.objects.order_by("number")
        self.fields["pqrs"].label_from_instance = (
            lambda pqr: f"{pqr.number}: {pqr.process} {pqr.electrode}, {pqr.position}, {pqr.base_metal}, "
                        f"tested {pqr.test_date:%Y-%m-%d}{'' if pqr.passed else ' (not passed)'}")
        if self.instance.pk:
            self.initial["positions"] = self.instance.position_list
            self.initial["joint_types"] = self.instance.joint_type_list
        if self.instance.pk and (self.instance.revision or self.instance.supersedes_id):
            # A revision keeps the number of the WPS it revises.
            self.fields["number"].disabled = True
        self.helper = _wps_layout()

    def clean_number(self):
        number = " ".join(self.cleaned_data["number"].split())
        clash = WPS.objects.filter(number__iexact=number).exclude(pk=self.instance.pk)
        if not self.fields["number"].disabled and clash.exists():
            raise ValidationError(
                f"WPS {number} already exists; to change an approved WPS, start a new revision from it.",
                code="unique")
        return number

    def clean_electrode(self):
        return clean_classification(self.cleaned_data.get("electrode"))

    def clean_positions(self):
        return ", ".join(p for p in Position.values if p in self.cleaned_data["positions"])

    def clean_joint_types(self):
        return ", ".join(j for j in JointType.values if j in self.cleaned_data["joint_types"])

    def clean_base_metals(self):
        metals = [" ".join(part.split()) for part in self.cleaned_data["base_metals"].split(",") if part.strip()]
        if not metals:
            raise ValidationError("Name at least one base metal, e.g. ASTM A992.", code="required")
        return ", ".join(dict.fromkeys(metals))

    def clean(self):
        cleaned = super().clean()
        for low, high in RANGES:
            if cleaned.get(low) is not None and cleaned.get(high) is not None and cleaned[low] > cleaned[high]:
                shown = self.fields[high].prepare_value(cleaned[high])
                self.add_error(low, ValidationError(
                    f"The minimum is above the maximum ({shown}).", code="range"))
        if cleaned.get("process") == Process.GMAW and not cleaned.get("transfer"):
            self.add_error("transfer", ValidationError("Choose the transfer mode for GMAW.", code="required"))
        elif cleaned.get("process") and cleaned.get("process") != Process.GMAW:
            cleaned["transfer"] = ""
        if cleaned.get("progression") and "V" not in (cleaned.get("positions") or ""):
            cleaned["progression"] = ""  # a progression means something for vertical welds only
        if cleaned.get("backing") and "groove" not in (cleaned.get("joint_types") or ""):
            cleaned["backing"] = ""  # backing is a groove weld's
        return cleaned


def _wps_layout():
    helper = FormHelper()
    helper.form_tag = False
    helper.disable_csrf = True
    helper.render_hidden_fields = True  # the version the page was opened at (core.forms)

    def pair(*names, size=6):
        return Row(*(Column(Field(name), css_class=f"col-md-{size}") for name in names))

    helper.layout = Layout(
        Fieldset("Procedure", pair("number", "title"), pair("code", "unit_system"),
                 pair("basis", "toughness_required"), "pqrs"),
        Fieldset("Process and filler metal", pair("process", "transfer"),
                 pair("electrode", "electrode_diameter", "current", size=4)),
        Fieldset("Electrical and travel", pair("amperage_min", "amperage_max", "voltage_min", "voltage_max", size=3),
                 pair("wire_feed_min", "wire_feed_max", "travel_speed_min", "travel_speed_max", size=3),
                 pair("ctwd_min", "ctwd_max")),
        Fieldset("Technique", pair("technique", "passes"), pair("work_angle", "travel_angle"), "interpass_cleaning"),
        Fieldset("Shielding", Row(Column("shielding_gas", css_class="col-md-6"),
                                  Column("gas_flow_min", css_class="col-md-3"),
                                  Column("gas_flow_max", css_class="col-md-3"))),
        Fieldset("Joints and base metal", pair("positions", "joint_types"), pair("progression", "backing"),
                 "base_metals",
                 pair("thickness_min", "thickness_max"),
                 pair("fillet_size_min", "fillet_size_max", "single_pass_size_max", size=4)),
        Fieldset("Temperatures", pair("preheat_min", "interpass_max")),
        Fieldset("Notes", "notes"),
    )
    return helper


class PQRForm(VersionedModelForm):
    class Meta:
        model = PQR
        fields = [
            "number", "code", "unit_system", "test_date", "process", "transfer", "electrode", "electrode_diameter",
            "current", "amperage", "voltage", "travel_speed", "position", "joint", "base_metal", "thickness",
            "shielding_gas",
            "preheat", "visual", "macroetch", "bends", "tensiles", "fillet_break", "laboratory", "notes",
        ]
        widgets = {"test_date": forms.DateInput(attrs={"type": "date"}), "notes": forms.Textarea(attrs={"rows": 3})}
        help_texts = {"position": "Test position of the coupon, e.g. 2F, 3G, 4F",
                      "amperage": "As measured on the coupon", "voltage": "As measured on the coupon"}

    def __init__(self, data=None, *args, **kwargs):
        super().__init__(data, *args, **kwargs)
        set_unit_system(self, _system_of(self, data, self.instance))
        _positive(self)
        helper = FormHelper()
        helper.form_tag = False
        helper.disable_csrf = True
        helper.render_hidden_fields = True

        def row(*names):
            return Row(*(Column(name, css_class=f"col-md-{12 // len(names)}") for name in names))

        helper.layout = Layout(
            Fieldset("Record", row("number", "code", "unit_system", "test_date")),
            Fieldset("As welded on the coupon", row("process", "transfer", "electrode", "electrode_diameter",
                                                    "current"),
                     row("amperage", "voltage", "travel_speed"), row("position", "joint", "base_metal", "thickness"),
                     row("shielding_gas", "preheat")),
            Fieldset("Test results", row("visual", "macroetch", "bends", "tensiles", "fillet_break"),
                     "laboratory", "notes"),
        )
        self.helper = helper

    def clean_number(self):
        number = " ".join(self.cleaned_data["number"].split())
        if PQR.objects.filter(number__iexact=number).exclude(pk=self.instance.pk).exists():
            raise ValidationError(f"PQR {number} already exists.", code="unique")
        return number

    def clean_electrode(self):
        return clean_classification(self.cleaned_data.get("electrode"))

    def clean_position(self):
        return self.cleaned_data["position"].strip().upper()

    def clean(self):
        cleaned = super().clean()
        if cleaned.get("process") == Process.GMAW and not cleaned.get("transfer"):
            self.add_error("transfer", ValidationError("Choose the transfer mode the coupon was welded with: a GMAW "
                                                       "PQR qualifies only its own transfer.", code="required"))
        elif cleaned.get("process") and cleaned.get("process") != Process.GMAW:
            cleaned["transfer"] = ""
        return cleaned


class ReasonForm(forms.Form):
    """Why a procedure is withdrawn or returned: required, kept in its history."""

    reason = forms.CharField(widget=forms.Textarea(attrs={"rows": 3}), max_length=1000, strip=True,
                             help_text="Kept in the procedure's history with your name and the time")
