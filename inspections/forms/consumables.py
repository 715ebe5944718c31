"""Forms of consumable control: an oven of the register, and its log (a reading, electrodes issued, their return
or discard, a rebake). Times are checked for the future here; the rules are the engine's (inspections.consumables)
and the steps' (inspections.services.consumables)."""

from crispy_forms.layout import Column, Layout, Row
from django import forms
from django.core.exceptions import ValidationError
from django.utils import timezone

from core.fields import TemperatureFormField
from inspections.forms.trace import _helper
from inspections.models import (
    ElectrodeIssue,
    ElectrodeOven,
    FillerLot,
    FluxEvent,
    FluxRecord,
    OvenReading,
    OvenState,
    Rebake,
)
from procedures.electrodes import decode
from procedures.models import Welder

FORMATS = ["%Y-%m-%dT%H:%M", "%Y-%m-%d %H:%M"]


def moment(label, help_text=""):
    return forms.DateTimeField(label=label, input_formats=FORMATS, help_text=help_text,
                               widget=forms.DateTimeInput(attrs={"type": "datetime-local"}, format=FORMATS[0]))


def _not_future(value, what):
    if value is not None and value > timezone.now():
        raise ValidationError(f"{what} is in the future: record it once it has happened.", code="future")
    return value


def _electrode_lots(process="SMAW"):
    """Lots of covered (SMAW) electrodes, or SAW flux-wire lots: the oven log's concern (decoded in Python, one
    query)."""
    lots = FillerLot.objects.order_by("classification", "-received_on", "-pk")
    keep = []
    for lot in lots:
        try:
            if process in decode(lot.classification).processes:
                keep.append(lot.pk)
        except ValueError:
            continue
    return FillerLot.objects.filter(pk__in=keep).order_by("classification", "-received_on", "-pk")


class OvenForm(forms.ModelForm):
    class Meta:
        model = ElectrodeOven
        fields = ["number", "kind", "description", "location", "system"]

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        _helper(self, Layout(Row(Column("number"), Column("kind"), Column("system")),
                             Row(Column("description"), Column("location"))))

    def clean_number(self):
        number = self.cleaned_data["number"].strip().upper()
        if not number:
            raise ValidationError("Give the oven its register number, e.g. OV-02.", code="required")
        return number


class ReadingForm(forms.ModelForm):
    read_at = moment("Read at")
    temperature = TemperatureFormField(label="Temperature", help_text="As the oven's thermometer reads: 300 F, 150 C")

    class Meta:
        model = OvenReading
        fields = ["read_at", "temperature", "note"]

    def __init__(self, *args, oven=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["temperature"].system = oven.system if oven else "US"
        self.initial.setdefault("read_at", timezone.localtime().strftime(FORMATS[0]))
        _helper(self, Layout(Row(Column("read_at"), Column("temperature"), Column("note"))))

    def clean_read_at(self):
        return _not_future(self.cleaned_data.get("read_at"), "The reading")


class IssueForm(forms.ModelForm):
    taken_out_at = moment("Taken out at")

    class Meta:
        model = ElectrodeIssue
        fields = ["lot", "welder", "quantity", "unit", "taken_out_at", "rebake"]

    def __init__(self, *args, oven=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["lot"].queryset = _electrode_lots()
        self.fields["welder"].queryset = Welder.objects.filter(active=True).order_by("stamp")
        self.fields["rebake"].queryset = Rebake.objects.select_related("lot").order_by("-started_at", "-pk")
        self.initial.setdefault("taken_out_at", timezone.localtime().strftime(FORMATS[0]))
        _helper(self, Layout(Row(Column("lot"), Column("welder")), Row(Column("quantity"), Column("unit"),
                                                                       Column("taken_out_at")), Row(Column("rebake"))))

    def clean_taken_out_at(self):
        return _not_future(self.cleaned_data.get("taken_out_at"), "The time taken out")

    def clean(self):
        data = super().clean()
        lot, rebake = data.get("lot"), data.get("rebake")
        if lot and rebake and rebake.lot_id != lot.pk:
            self.add_error("rebake", f"That batch is of lot {rebake.lot.lot_number}, not {lot.lot_number}.")
        return data


RETURNED, DISCARDED = "returned", "discarded"


class CloseIssueForm(forms.Form):
    outcome = forms.ChoiceField(label="What became of them", choices=[(RETURNED, "Returned to an oven"),
                                                                     (DISCARDED, "Discarded")])
    returned_to = forms.ModelChoiceField(label="Returned to", required=False, queryset=ElectrodeOven.objects.none())
    back_at = moment("At")

    def __init__(self, *args, issue=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.issue = issue
        self.fields["returned_to"].queryset = ElectrodeOven.objects.filter(state=OvenState.IN_SERVICE)
        if issue is not None:
            self.initial.setdefault("returned_to", issue.oven_id)
        self.initial.setdefault("back_at", timezone.localtime().strftime(FORMATS[0]))
        _helper(self, Layout(Row(Column("outcome"), Column("returned_to"), Column("back_at"))))

    def clean_back_at(self):
        back = _not_future(self.cleaned_data.get("back_at"), "The time back")
        if back is not None and self.issue is not None and back < self.issue.taken_out_at:
            raise ValidationError("That is before they were taken out: check the time.", code="order")
        return back

    def clean(self):
        data = super().clean()
        if data.get("outcome") == RETURNED and not data.get("returned_to"):
            self.add_error("returned_to", "Choose the oven they went back to.")
        return data


class RebakeForm(forms.ModelForm):
    started_at = moment("Started at")
    temperature = TemperatureFormField(label="Temperature", help_text="As the oven's thermometer reads: 600 F")

    class Meta:
        model = Rebake
        fields = ["lot", "started_at", "temperature", "hours", "quantity", "unit", "previous"]

    def __init__(self, *args, oven=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["temperature"].system = oven.system if oven else "US"
        self.fields["lot"].queryset = _electrode_lots()
        self.fields["previous"].queryset = Rebake.objects.select_related("lot").order_by("-started_at", "-pk")
        _helper(self, Layout(Row(Column("lot"), Column("started_at")),
                             Row(Column("temperature"), Column("hours"), Column("quantity"), Column("unit")),
                             Row(Column("previous"))))

    def clean_started_at(self):
        return _not_future(self.cleaned_data.get("started_at"), "The rebake")

    def clean(self):
        data = super().clean()
        lot, previous = data.get("lot"), data.get("previous")
        if lot and previous and previous.lot_id != lot.pk:
            self.add_error("previous", f"That batch is of lot {previous.lot.lot_number}, not {lot.lot_number}.")
        return data


class FluxForm(forms.ModelForm):
    at = moment("At")
    temperature = TemperatureFormField(label="Dried at", required=False,
                                       help_text="When dried, as the oven's thermometer reads: 550 F")

    class Meta:
        model = FluxRecord
        fields = ["lot", "event", "at", "temperature", "hours", "note"]

    def __init__(self, *args, oven=None, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["temperature"].system = oven.system if oven else "US"
        self.fields["lot"].queryset = _electrode_lots("SAW")
        self.initial.setdefault("at", timezone.localtime().strftime(FORMATS[0]))
        _helper(self, Layout(Row(Column("lot"), Column("event"), Column("at")),
                             Row(Column("temperature"), Column("hours"), Column("note"))))

    def clean_at(self):
        return _not_future(self.cleaned_data.get("at"), "The flux record")

    def clean(self):
        data = super().clean()
        if data.get("event") == FluxEvent.DRIED:
            for name, words in (("temperature", "Give the drying temperature."), ("hours", "Give the hours dried.")):
                if data.get(name) is None and name not in self.errors:
                    self.add_error(name, words)
        return data
