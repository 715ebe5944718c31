"""Welder forms: a welder, a qualification test, a manual continuity entry, a reason, the weld check.

The rules stay in the engines: procedures.qualification says which test positions exist and what a test
plate thickness qualifies, procedures.electrodes.decode reads the filler classification. Their messages are
shown next to the field they are about. The test thickness goes through LengthFormField, read in the units
the engineer picks for the record ("3/8", "3/8 in", "10 mm").
"""

from crispy_forms.helper import FormHelper
from crispy_forms.layout import Column, Field, Fieldset, Layout, Row
from django import forms
from django.conf import settings
from django.core.exceptions import ValidationError
from django.utils import timezone

from core import units
from core.documents import ACCEPT, clean_document
from core.fields import LengthFormField, set_unit_system
from core.forms import VersionedModelForm
from core.vocabulary import Backing, JointType, Position, Process, Progression, UnitSystem
from procedures import qualification as engine
from procedures.electrodes import decode
from procedures.models.welders import Qualification, QualificationCode, Welder
from procedures.models.wps import WPS, Transfer

REPORT_MAX_BYTES = settings.LEGWORK_REPORT_MAX_BYTES


class DateInput(forms.DateInput):
    input_type = "date"

    def __init__(self, attrs=None):
        super().__init__(attrs, format="%Y-%m-%d")


def _not_after_today(day, what):
    if day is not None and day > timezone.localdate():
        raise ValidationError(f"{what} is after today ({timezone.localdate():%Y-%m-%d}): record it once it has "
                              "happened.", code="future")
    return day


class WelderForm(VersionedModelForm):
    class Meta:
        model = Welder
        fields = ["name", "stamp", "employer"]
        help_texts = {"stamp": "The mark the welder puts beside each weld, e.g. B-14"}

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.helper = FormHelper()
        self.helper.form_tag = False

    def clean_stamp(self):
        return self.cleaned_data["stamp"].strip().upper()


class QualificationForm(forms.ModelForm):
    """Record a welder qualification test (WPQ). Ranges and lapse dates are derived, never typed."""

    test_thickness = LengthFormField(label="Test plate thickness", help_text='e.g. 3/8, 1 in, 10 mm')

    class Meta:
        model = Qualification
        fields = ["code", "process", "transfer", "joint", "test_position", "progression", "backing", "unit_system",
                  "test_thickness", "electrode", "wps", "test_date", "result", "examiner", "report",
                  "iso_revalidation"]
        widgets = {"test_date": DateInput()}
        labels = {"joint": "Test weld", "report": "Test report (PDF or photo)"}
        help_texts = {
            "unit_system": "For a thickness typed without a unit",
            "test_position": "Plate: 1G, 2G, 3G, 4G, 1F-4F, or both as 3G+4G; ISO 9606-1: PA-PJ",
            "electrode": "AWS classification, e.g. E7018, E71T-1C, ER70S-6",
            "iso_revalidation": "ISO 9606-1 only",
        }

    def __init__(self, *args, welder=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.welder = welder
        data = kwargs.get("data") if "data" in kwargs else (args[0] if args else None)
        posted = data.get("unit_system") if data is not None else None
        set_unit_system(self, posted if posted in UnitSystem.values else UnitSystem.US)
        self.fields["wps"].queryset = WPS.objects.order_by("number", "-revision")
        self.fields["wps"].required = False
        self.fields["report"].widget.attrs["accept"] = ACCEPT
        self.helper = FormHelper()
        self.helper.form_tag = False
        self.helper.layout = Layout(
            Fieldset("The test", Row(Column("code"), Column("process"), Column("transfer"), Column("joint")),
                     Row(Column("test_position"), Column("unit_system"), Column("test_thickness")),
                     Row(Column("progression"), Column("backing")),
                     Row(Column("electrode"), Column("wps"))),
            Fieldset("The result", Row(Column(Field("test_date")), Column("result"), Column("examiner")),
                     Row(Column("report"), Column("iso_revalidation"))),
        )

    def clean_test_position(self):
        return self.cleaned_data["test_position"].strip().upper().replace(" ", "")

    def clean_test_date(self):
        return _not_after_today(self.cleaned_data.get("test_date"), "The test date")

    def clean_electrode(self):
        text = self.cleaned_data["electrode"]
        try:
            return decode(text).classification
        except ValueError as exc:
            raise ValidationError(str(exc), code="electrode") from None

    def clean_report(self):
        return clean_document(self.cleaned_data.get("report"), "test report", REPORT_MAX_BYTES)

    def clean(self):
        data = super().clean()
        code, process, joint = data.get("code"), data.get("process"), data.get("joint")
        position, thickness, electrode = data.get("test_position"), data.get("test_thickness"), data.get("electrode")
        system = self._system_written(data)
        if code and joint and position:
            try:
                engine.positions_qualified(position, code, joint=joint)
                data["test_position"] = engine.normalise_test_position(position, code)
            except ValueError as exc:
                self.add_error("test_position", str(exc))
        if code and joint and thickness is not None:
            try:
                engine.thickness_qualified(thickness, joint, code, system=system)
            except ValueError as exc:
                self.add_error("test_thickness", str(exc))
        if process and electrode:
            self._check_electrode(code, process, electrode)
        wps = data.get("wps")
        if wps is not None and process and wps.process != process:
            self.add_error("wps", f"{wps} is a {wps.process} procedure; this test is {process}.")
        if code != QualificationCode.ISO:
            data["iso_revalidation"] = ""
        if process and process != "GMAW":
            data["transfer"] = ""  # a metal transfer mode is GMAW's (GMAW-S: GMAW, short-circuiting)
        if data.get("backing") and joint != "groove":
            data["backing"] = ""  # backing is recorded for groove (butt) tests
        if not self.errors:
            self._check_facts(data)
        return data

    def _system_written(self, data):
        """A thickness written with its unit ("3/8 in", "10 mm") makes the record that system; a bare number is
        read in the system chosen. AWS D1.1M applies its own SI figures to a record in millimetres."""
        chosen = data.get("unit_system") or UnitSystem.US
        if data.get("test_thickness") is None:
            return chosen
        try:
            written = units.length_system(self.data.get(self.add_prefix("test_thickness"), ""))
        except ValueError:
            written = None
        data["unit_system"] = written or chosen
        return data["unit_system"]

    def _check_electrode(self, code, process, electrode):
        decoded = decode(electrode)
        if process not in decoded.processes:
            self.add_error("electrode", f"{decoded.classification} is a filler for "
                                        f"{', '.join(sorted(decoded.processes))}, not for {process} ({decoded.spec}).")
        elif process == "SMAW" and code == QualificationCode.AWS:
            try:
                engine.smaw_electrode_group(electrode)
            except ValueError as exc:
                self.add_error("electrode", str(exc))

    def _check_facts(self, data):
        """The record must be one the engine can read (the check of every later weld depends on it)."""
        try:
            engine.QualificationFacts(
                process=data["process"], joint=data["joint"], test_position=data["test_position"],
                test_thickness=data["test_thickness"], test_date=data["test_date"],
                passed=data["result"] == Qualification.Result.PASS, electrode=data["electrode"], code=data["code"],
                iso_revalidation=data.get("iso_revalidation") or None, unit_system=data.get("unit_system") or None,
                progression=data.get("progression") or None, backing=data.get("backing") or None,
                transfer=data.get("transfer") or None,
            )
        except (KeyError, ValueError) as exc:
            raise ValidationError(str(exc), code="engine") from None


class ContinuityForm(forms.Form):
    """A use of a process outside Legwork (another shop's job, a repair), logged by the QA lead with a note."""

    process = forms.ChoiceField(choices=Process.choices)
    date = forms.DateField(widget=DateInput(), label="Date welded")
    note = forms.CharField(max_length=200, help_text="What was welded, e.g. the job, work order or repair",
                           widget=forms.TextInput(attrs={"placeholder": "e.g. Work order 5512, stair stringers"}))

    def __init__(self, *args, welder=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.welder = welder
        self.helper = FormHelper()
        self.helper.form_tag = False

    def clean_date(self):
        return _not_after_today(self.cleaned_data.get("date"), "The date")

    def clean_note(self):
        note = self.cleaned_data["note"].strip()
        if not note:
            raise ValidationError("Say what the welder welded.", code="required")
        return note


class ReasonForm(forms.Form):
    """Why a step is taken (deactivate a welder, withdraw a record, retire an instrument); `example` is the
    placeholder, in the words of that step."""

    reason = forms.CharField(max_length=200, widget=forms.TextInput(
        attrs={"placeholder": "e.g. Left the shop on 2026-11-30"}))

    def __init__(self, *args, example=None, **kwargs):
        super().__init__(*args, **kwargs)
        if example:
            self.fields["reason"].widget.attrs["placeholder"] = example
        self.helper = FormHelper()
        self.helper.form_tag = False

    def clean_reason(self):
        reason = self.cleaned_data["reason"].strip()
        if not reason:
            raise ValidationError("Give a reason.", code="required")
        return reason


class WeldCheckForm(forms.Form):
    """"Could this welder make this weld?" on the welder page: what a weld would ask, read by the engine."""

    code = forms.ChoiceField(choices=QualificationCode.choices, initial=QualificationCode.AWS)
    process = forms.ChoiceField(choices=Process.choices)
    joint = forms.ChoiceField(choices=JointType.choices, label="Weld")
    position = forms.ChoiceField(choices=[
        ("AWS D1.1", Position.choices),
        ("ISO 6947", [(p, p) for p in engine.ISO_POSITIONS]),
    ], initial=Position.F)
    thickness = LengthFormField(label="Base metal thickness", help_text="e.g. 1/2, 12 mm")
    electrode = forms.CharField(max_length=40, required=False)
    transfer = forms.ChoiceField(choices=[("", "Not stated"), *Transfer.choices], required=False,
                                 label="GMAW transfer")
    progression = forms.ChoiceField(choices=[("", "Not stated"), *Progression.choices], required=False,
                                    label="Vertical progression")
    backing = forms.ChoiceField(choices=[("", "Not stated"), *Backing.choices], required=False,
                                label="Backing (groove)")
    on = forms.DateField(widget=DateInput(), label="On", required=False, help_text="Blank: today")

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.helper = FormHelper()
        self.helper.form_tag = False
        self.helper.form_show_labels = True
        self.helper.layout = Layout(
            Row(Column("code", css_class="col-sm-7"), Column("process", css_class="col-sm-5")),
            Row(Column("joint", css_class="col-6"), Column("position", css_class="col-6")),
            Row(Column("thickness", css_class="col-sm-4"), Column("electrode", css_class="col-sm-4"),
                Column("on", css_class="col-sm-4")),
            Row(Column("transfer", css_class="col-sm-4"), Column("progression", css_class="col-sm-4"),
                Column("backing", css_class="col-sm-4")),
        )

    def clean(self):
        data = super().clean()
        if self.errors:
            return data
        try:
            data["demand"] = engine.WeldDemand(
                process=data["process"], joint=data["joint"], position=data["position"],
                thickness=data["thickness"], electrode=data.get("electrode") or None, code=data["code"],
                transfer=(data.get("transfer") or None) if data["process"] == "GMAW" else None,
                progression=data.get("progression") or None,
                backing=(data.get("backing") or None) if data["joint"] == "groove" else None)
        except ValueError as exc:
            raise ValidationError(str(exc), code="engine") from None
        data["on"] = data.get("on") or timezone.localdate()
        return data
