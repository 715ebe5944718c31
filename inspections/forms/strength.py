"""The standalone fillet weld calculator: typed inputs in, engine-ready text out, the engine's words as field errors.

Every length goes through LengthFormField (a bare number in the chosen system); FEXX, Fy, Fu and the angle are
checked by the engine itself (inspections.strength), so its message appears next to the field.
"""

from django import forms

from core.fields import ForceFormField, LengthFormField, set_unit_system
from core.units import parse_area
from inspections import strength
from inspections.services.capacity import CalculatorInputError, capacity_for_calculator, length_arg

SYSTEMS = [("US", "US (in, ksi, kip)"), ("SI", "SI (mm, MPa, kN)")]
METHODS = [("LRFD", "LRFD (factored load, φRn)"), ("ASD", "ASD (service load, Rn / Ω)")]
STRESS_UNIT = {"US": "ksi", "SI": "MPa"}
AREA_UNIT = {"US": "in2", "SI": "mm2"}


def _with_unit(text: str, unit: str) -> str:
    """A bare number gets the chosen system's unit; anything else goes to the engine as typed."""
    text = (text or "").strip()
    try:
        float(text)
    except ValueError:
        return text
    return f"{text} {unit}"


class StrengthCalculatorForm(forms.Form):
    system = forms.ChoiceField(label="Units", choices=SYSTEMS, initial="US", required=False,
                               widget=forms.RadioSelect, help_text="A bare number is read in these units.")
    leg = LengthFormField(label="Leg", allow_zero=False, help_text='e.g. 1/4, 5/16", 6 mm')
    leg2 = LengthFormField(label="Second leg", required=False, allow_zero=False,
                           help_text="Only for unequal legs")
    length = LengthFormField(label="Length of the weld line", allow_zero=False)
    fexx = forms.CharField(label="Filler metal strength FEXX", initial="70 ksi", max_length=40,
                           help_text="70 ksi (E70) or 480 MPa")
    angle = forms.CharField(label="Load angle to the weld axis (deg)", initial="0", max_length=40,
                            help_text="0 = along the weld, 90 = across it")
    end_loaded = forms.BooleanField(label="End loaded (long weld reduction)", required=False)
    intermittent = forms.BooleanField(label="Intermittent segment", required=False)
    thinner_part = LengthFormField(label="Thinner part joined", required=False, allow_zero=False,
                                   help_text="Checks the minimum size")
    edge_thickness = LengthFormField(label="Thickness along the edge", required=False, allow_zero=False,
                                     help_text="Checks the maximum size along an edge")
    plate_thickness = LengthFormField(label="Plate thickness", required=False, allow_zero=False,
                                      help_text="Adds shear of the plate along the weld")
    plate_width = LengthFormField(label="Plate width", required=False, allow_zero=False,
                                  help_text="Adds tension of the plate")
    material = forms.ChoiceField(label="Plate material", required=False)
    fy = forms.CharField(label="Fy", required=False, max_length=40, help_text="Only without a material")
    fu = forms.CharField(label="Fu", required=False, max_length=40, help_text="Only without a material")
    net_area = forms.CharField(label="Effective net area Ae", required=False, max_length=40,
                               help_text="Leave empty for Ae = Ag")
    required = ForceFormField(label="Required strength", required=False, allow_zero=False,
                              help_text="From the engineer of record")
    method = forms.ChoiceField(label="Design method", choices=METHODS, initial="LRFD", required=False)

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.system = self.data.get("system") if self.data.get("system") in ("US", "SI") else "US"
        set_unit_system(self, self.system)
        self.fields["material"].choices = [("", "none: give Fy and Fu")] + [
            (key, label) for key, (label, _, _) in strength.MATERIALS.items()]
        self.snapshot = None

    def clean_system(self):
        return self.cleaned_data.get("system") or "US"

    def clean_method(self):
        return self.cleaned_data.get("method") or "LRFD"

    def clean_fexx(self):
        text = _with_unit(self.cleaned_data["fexx"], STRESS_UNIT[self.system])
        try:
            strength.filler_strength(text)
        except ValueError as exc:
            raise forms.ValidationError(str(exc), code="fexx") from None
        return text

    def clean_angle(self):
        text = self.cleaned_data["angle"].strip()
        try:
            strength.directional_factor(text)
        except ValueError as exc:
            raise forms.ValidationError(str(exc), code="angle") from None
        return text

    def clean_fy(self):
        return _with_unit(self.cleaned_data["fy"], STRESS_UNIT[self.system])

    def clean_fu(self):
        return _with_unit(self.cleaned_data["fu"], STRESS_UNIT[self.system])

    def clean_net_area(self):
        text = _with_unit(self.cleaned_data["net_area"], AREA_UNIT[self.system])
        if text:
            try:
                parse_area(text)
            except ValueError as exc:
                raise forms.ValidationError(str(exc), code="net_area") from None
        return text

    def clean(self):
        data = super().clean()
        if self.errors:
            return data
        if data.get("plate_width") and not data.get("plate_thickness"):
            self.add_error("plate_thickness", "Give the plate thickness too: the tension check needs both.")
        if data.get("plate_thickness") and not data.get("material") and not (data.get("fy") and data.get("fu")):
            self.add_error("material", "Choose the plate material, or give both Fy and Fu.")
        if data.get("material") and (data.get("fy") or data.get("fu")):
            self.add_error("fy", "Give either a material or Fy and Fu, not both.")
        if self.errors:
            return data
        try:
            self.snapshot = capacity_for_calculator(self.engine_inputs(data))
        except CalculatorInputError as exc:
            self.add_error(exc.field, str(exc))
        return data

    def engine_inputs(self, data) -> dict:
        """The cleaned inputs as the engine reads them: lengths as text with their unit, in the chosen system."""
        system = data["system"]

        def length(name):
            value = data.get(name)
            return None if value is None else length_arg(value, system)

        return {
            "system": system, "method": data["method"], "leg": length("leg"), "leg2": length("leg2"),
            "length": length("length"), "fexx": data["fexx"], "angle": data["angle"],
            "end_loaded": data.get("end_loaded", False), "intermittent": data.get("intermittent", False),
            "thinner_part": length("thinner_part"), "edge_thickness": length("edge_thickness"),
            "plate_thickness": length("plate_thickness"), "plate_width": length("plate_width"),
            "material": data.get("material") or "", "fy": data.get("fy") or None, "fu": data.get("fu") or None,
            "net_area": data.get("net_area") or None,
            "required": None if data.get("required") is None else f"{data['required'].kn} kN",
        }
