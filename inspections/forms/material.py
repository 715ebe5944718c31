"""Material forms: a mill certificate as printed, a part of an assembly, the parts a weld joins. Grades are read by
inspections.material (a grade it cannot read is refused beside the field); strengths by core.units (ksi or MPa)."""

from decimal import Decimal

from crispy_forms.layout import Column, Fieldset, Layout, Row
from django import forms
from django.core.exceptions import ValidationError

from core import units
from core.documents import ACCEPT, clean_document
from core.fields import LengthFormField
from inspections import material as engine
from inspections.forms.trace import _helper
from inspections.models import MaterialState, MillCertificate, Part
from procedures.forms.welders import DateInput, _not_after_today


def _grade(text):
    try:
        engine.parse_grades(text)
    except ValueError as exc:
        raise ValidationError(str(exc), code="grade") from None
    return " ".join(text.split())


class StressFormField(forms.CharField):
    """A strength as printed: '50 ksi', '355 MPa' (a bare number: ksi on a US form); answers (MPa, system)."""

    def __init__(self, **kwargs):
        kwargs.setdefault("max_length", 30)
        super().__init__(**kwargs)

    def to_python(self, value):
        value = super().to_python(value)
        if value in self.empty_values:
            return None
        try:
            stress, system = units.parse_stress(value)
        except ValueError as exc:
            raise ValidationError(f"{exc} Write it with its unit, e.g. 50 ksi or 355 MPa.", code="invalid") from None
        except ArithmeticError:
            raise ValidationError(f"'{value}' is too large a number.", code="invalid") from None
        return stress.mpa.quantize(Decimal("0.01")), system


class MillCertificateForm(forms.ModelForm):
    thickness = LengthFormField(label="Thickness", required=False, help_text="Plates: as printed, e.g. 3/4 in, "
                                                                                 "20 mm; blank for shapes")
    yield_strength = StressFormField(label="Yield strength", required=False, help_text="As printed: ksi or MPa")
    tensile_strength = StressFormField(label="Tensile strength", required=False, help_text="As printed: ksi or MPa")

    class Meta:
        model = MillCertificate
        fields = ["heat_number", "producer", "grade", "product", "thickness", "certificate_type",
                  "certificate_number", "issued_on", *engine.ELEMENTS, "ce", "elongation", "document"]
        widgets = {"issued_on": DateInput()}

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["thickness"].system = "US"
        self.fields["document"].widget.attrs["accept"] = ACCEPT
        _helper(self, Layout(
            Fieldset("The heat", Row(Column("heat_number"), Column("producer"), Column("grade")),
                     Row(Column("product"), Column("thickness"))),
            Fieldset("The certificate", Row(Column("certificate_type"), Column("certificate_number"),
                                            Column("issued_on")), Row(Column("document"))),
            Fieldset("Chemistry, % by mass as printed", Row(*[Column(n) for n in engine.ELEMENTS[:6]]),
                     Row(*[Column(n) for n in engine.ELEMENTS[6:]], Column("ce"))),
            Fieldset("Mechanical values as printed", Row(Column("yield_strength"), Column("tensile_strength"),
                                                         Column("elongation"))),
        ))

    def clean_heat_number(self):
        number = " ".join(self.cleaned_data["heat_number"].split()).upper()
        if not number:
            raise ValidationError("Give the heat number printed on the certificate and stencilled on the steel.",
                                  code="required")
        return number

    def clean_producer(self):
        producer = " ".join(self.cleaned_data["producer"].split())
        if not producer:
            raise ValidationError("Name the mill that made the heat.", code="required")
        return producer

    def clean_grade(self):
        return _grade(self.cleaned_data["grade"])

    def clean_issued_on(self):
        return _not_after_today(self.cleaned_data.get("issued_on"), "The certificate date")

    def clean_document(self):
        return clean_document(self.cleaned_data.get("document"), "mill certificate")

    def clean(self):
        data = super().clean()
        for name in (*engine.ELEMENTS, "ce"):
            value = data.get(name)
            limit = engine.CE_LIMIT if name == "ce" else engine.ELEMENT_LIMIT
            if value is not None and not Decimal(0) <= value <= limit:
                self.add_error(name, f"Between 0 and {limit} % (as printed, in percent by mass).")
        elongation = data.get("elongation")
        if elongation is not None and not Decimal(0) < elongation <= 100:
            self.add_error("elongation", "A percentage above 0 and at most 100.")
        strengths = {}
        for name, field in (("yield_strength", "yield_mpa"), ("tensile_strength", "tensile_mpa")):
            value = data.get(name)
            setattr(self.instance, field, value[0] if value else None)
            if value:
                strengths[name] = value
                self.instance.printed_system = value[1]
        if len(strengths) == 2 and strengths["tensile_strength"][0] < strengths["yield_strength"][0]:
            self.add_error("tensile_strength", "The tensile strength is below the yield strength: check both.")
        if data.get("thickness") is not None and data["thickness"].mm <= 0:
            self.add_error("thickness", "Enter a thickness greater than zero.")
        unique = (MillCertificate.objects.filter(producer__iexact=data.get("producer") or "",
                                                 heat_number=data.get("heat_number") or "",
                                                 state=MaterialState.ON_FILE))
        if data.get("heat_number") and unique.exists():
            self.add_error("heat_number", "This producer's heat is already on file: withdraw it first to record it "
                                          "again.")
        return data


class PartForm(forms.ModelForm):
    thickness = LengthFormField(label="Thickness", allow_zero=False,
                                help_text="The thickness welded: plate, flange or web (a bare number: the job's units)")

    class Meta:
        model = Part
        fields = ["mark", "role", "description", "specified_grade", "thickness", "heat"]

    def __init__(self, *args, assembly, **kwargs):
        super().__init__(*args, **kwargs)
        self.assembly = assembly
        self.fields["thickness"].system = assembly.job.unit_system
        self.fields["heat"].queryset = MillCertificate.objects.filter(state=MaterialState.ON_FILE).order_by(
            "heat_number", "-pk")
        _helper(self, Layout(Row(Column("mark"), Column("role"), Column("description")),
                             Row(Column("specified_grade"), Column("thickness"), Column("heat"))))

    def clean_mark(self):
        mark = " ".join(self.cleaned_data["mark"].split()).upper()
        if not mark:
            raise ValidationError("Give the part mark from the drawing, e.g. P1.", code="required")
        if Part.objects.filter(assembly=self.assembly, mark=mark, state=MaterialState.ON_FILE).exists():
            raise ValidationError(f"{self.assembly.piece_mark} already has part {mark}: withdraw it first.",
                                  code="unique")
        return mark

    def clean_specified_grade(self):
        return _grade(self.cleaned_data["specified_grade"])


class WeldPartsForm(forms.Form):
    part1 = forms.ModelChoiceField(label="Part 1", required=False, queryset=Part.objects.none())
    part2 = forms.ModelChoiceField(label="Part 2", required=False, queryset=Part.objects.none())
    take_thickness = forms.BooleanField(label="Take the thicknesses from the parts", required=False, initial=True,
                                        help_text="The weld's thickness of part 1 and part 2 become the parts'")

    def __init__(self, *args, weld, **kwargs):
        super().__init__(*args, **kwargs)
        parts = Part.objects.filter(assembly_id=weld.assembly_id, state=MaterialState.ON_FILE).order_by("mark")
        self.fields["part1"].queryset = parts
        self.fields["part2"].queryset = parts
        _helper(self, Layout(Row(Column("part1"), Column("part2")), "take_thickness"))

    def clean(self):
        data = super().clean()
        if data.get("part1") and data.get("part1") == data.get("part2"):
            self.add_error("part2", "A weld joins two parts (or a part to itself only as a seam: leave part 2 blank).")
        return data
