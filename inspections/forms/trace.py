"""Register forms: an inspector's credential as its card prints it, a gauge, a calibration. Dates are checked for
order and for the future; the currency rule itself is the engine's (inspections.credentials)."""

from crispy_forms.helper import FormHelper
from crispy_forms.layout import Column, Fieldset, Layout, Row
from django import forms
from django.core.exceptions import ValidationError
from django.db.models import Q

from core.documents import ACCEPT, clean_document
from core.fields import LengthFormField
from core.inputs import parse_id
from core.models import User
from core.roles import Role
from inspections import credentials as engine
from inspections.models import (
    CalibrationResult,
    FillerLot,
    Gauge,
    GaugeCalibration,
    InspectorCredential,
    MillCertificate,
)
from procedures.electrodes import decode
from procedures.forms.welders import DateInput, _not_after_today


class CredentialForm(forms.ModelForm):
    class Meta:
        model = InspectorCredential
        fields = ["inspector", "scheme", "scheme_name", "number", "level", "endorsements", "issued_on",
                  "expires_on", "eye_exam_on", "document"]
        widgets = {"issued_on": DateInput(), "expires_on": DateInput(), "eye_exam_on": DateInput()}

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["inspector"].queryset = User.objects.filter(role=Role.INSPECTOR, is_active=True).order_by(
            "last_name", "username")
        self.fields["document"].widget.attrs["accept"] = ACCEPT
        self.helper = FormHelper()
        self.helper.form_tag = False
        self.helper.layout = Layout(
            Fieldset("The card", Row(Column("inspector"), Column("scheme"), Column("scheme_name")),
                     Row(Column("number"), Column("level"), Column("endorsements"))),
            Fieldset("Dates", Row(Column("issued_on"), Column("expires_on"), Column("eye_exam_on"))),
            Fieldset("Copy", Row(Column("document"))),
        )

    def clean_number(self):
        return self.cleaned_data["number"].strip()

    def clean_level(self):
        return self.cleaned_data["level"].strip()

    def clean_issued_on(self):
        return _not_after_today(self.cleaned_data.get("issued_on"), "The date it is valid from")

    def clean_eye_exam_on(self):
        return _not_after_today(self.cleaned_data.get("eye_exam_on"), "The eye examination")

    def clean_document(self):
        return clean_document(self.cleaned_data.get("document"), "copy of the card")

    def clean(self):
        data = super().clean()
        scheme, issued, expires = data.get("scheme"), data.get("issued_on"), data.get("expires_on")
        if issued and expires and expires < issued:
            self.add_error("expires_on", "The card expires before it is valid: check both dates.")
        if scheme == engine.NATIONAL and not (data.get("scheme_name") or "").strip():
            self.add_error("scheme_name", "Name the national scheme and its certifying body (e.g. CSA W178.2).")
        level = data.get("level")
        if scheme == engine.ISO_9712 and level not in ("1", "2", "3"):
            self.add_error("level", "ISO 9712 certifies at level 1, 2 or 3 (ISO 9712:2021 clause 6).")
        if scheme in (engine.CWI, engine.SCWI) and level:
            self.add_error("level", "An AWS certification has no level: leave it blank (the scheme says CWI or "
                                    "SCWI).")
        return data


def _helper(form, layout):
    form.helper = FormHelper()
    form.helper.form_tag = False
    form.helper.layout = layout


class GaugeForm(forms.ModelForm):
    class Meta:
        model = Gauge
        fields = ["number", "kind", "description", "serial_number"]

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        _helper(self, Layout(Row(Column("number"), Column("kind")), Row(Column("description"),
                                                                         Column("serial_number"))))

    def clean_number(self):
        number = self.cleaned_data["number"].strip().upper()
        if not number:
            raise ValidationError("Give the gauge its register number, e.g. FG-03.", code="required")
        return number


class CalibrationForm(forms.ModelForm):
    class Meta:
        model = GaugeCalibration
        fields = ["calibrated_on", "result", "due_on", "performed_by", "note", "document"]
        widgets = {"calibrated_on": DateInput(), "due_on": DateInput()}

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["document"].widget.attrs["accept"] = ACCEPT
        _helper(self, Layout(Row(Column("calibrated_on"), Column("result"), Column("due_on")),
                             Row(Column("performed_by"), Column("note")), Row(Column("document"))))

    def clean_calibrated_on(self):
        return _not_after_today(self.cleaned_data.get("calibrated_on"), "The calibration date")

    def clean_document(self):
        return clean_document(self.cleaned_data.get("document"), "certificate")

    def clean(self):
        data = super().clean()
        made, due = data.get("calibrated_on"), data.get("due_on")
        if made and due and due <= made and data.get("result") == CalibrationResult.IN_TOLERANCE:
            self.add_error("due_on", "The next calibration falls due after this one: check the date.")
        return data


class FillerLotForm(forms.ModelForm):
    diameter = LengthFormField(label="Diameter", help_text="e.g. 0.045 in, 1/8, 1.2 mm (a bare number is inches)")

    class Meta:
        model = FillerLot
        fields = ["classification", "specification", "diameter", "lot_number", "manufacturer", "received_on",
                  "document"]
        widgets = {"received_on": DateInput()}

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["diameter"].system = "US"
        self.fields["document"].widget.attrs["accept"] = ACCEPT
        _helper(self, Layout(Row(Column("classification"), Column("specification"), Column("diameter")),
                             Row(Column("lot_number"), Column("manufacturer"), Column("received_on")),
                             Row(Column("document"))))

    def clean_classification(self):
        try:
            return decode(self.cleaned_data["classification"]).classification
        except ValueError as exc:
            raise ValidationError(str(exc), code="classification") from None

    def clean_lot_number(self):
        number = self.cleaned_data["lot_number"].strip()
        if not number:
            raise ValidationError("Give the lot or heat number printed on the package.", code="required")
        return number

    def clean_received_on(self):
        return _not_after_today(self.cleaned_data.get("received_on"), "The date received")

    def clean_document(self):
        return clean_document(self.cleaned_data.get("document"), "certificate")


LOTS_OFFERED = 40  # the newest lots of the WPS's classification a weld's page lists (years of lots stay out)


class WeldFillerForm(forms.Form):
    lot = forms.ModelChoiceField(label="Filler lot used", queryset=FillerLot.objects.none(),
                                 help_text="As printed on the spool or box; its classification should be the WPS's.")

    def __init__(self, *args, weld=None, **kwargs):
        """Any lot is read back (a mismatch is recorded and blocks, as the chain says); the list offers the newest
        lots of the WPS's classification, and the lot the weld names now (one query)."""
        super().__init__(*args, **kwargs)
        lots = self.fields["lot"]
        lots.queryset = FillerLot.objects.all()
        offered = FillerLot.objects.order_by("-received_on", "-pk")
        if weld is not None and weld.wps_id and weld.wps.electrode:
            offered = offered.filter(classification=weld.wps.electrode)
        named = weld.filler_lot_id if weld is not None else None
        rows = list(offered[:LOTS_OFFERED]) if not named else list(
            FillerLot.objects.filter(Q(pk__in=offered.values("pk")[:LOTS_OFFERED]) | Q(pk=named))
            .order_by("-received_on", "-pk"))
        lots.widget.choices = [("", "—")] + [(lot.pk, str(lot)) for lot in rows]
        _helper(self, Layout("lot"))


RECALL_OFFERED = 200  # the newest lots and heats the recall form lists


class RecallForm(forms.Form):
    """Which welds a lot, a gauge or an inspector touched between two dates (inspections.services.trace.recall)."""

    kind = forms.ChoiceField(label="Used", choices=[("lot", "Filler lot"), ("gauge", "Gauge"),
                                                   ("inspector", "Inspector"), ("heat", "Heat of steel")])
    lot = forms.ModelChoiceField(label="Filler lot", required=False, queryset=FillerLot.objects.none())
    gauge = forms.ModelChoiceField(label="Gauge", required=False, queryset=Gauge.objects.none())
    inspector = forms.ModelChoiceField(label="Inspector", required=False, queryset=User.objects.none())
    heat = forms.ModelChoiceField(label="Heat", required=False, queryset=MillCertificate.objects.none())
    date_from = forms.DateField(label="From", required=False, widget=DateInput())
    date_to = forms.DateField(label="To", required=False, widget=DateInput())

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["lot"].queryset = FillerLot.objects.all()
        self.fields["gauge"].queryset = Gauge.objects.order_by("number")
        self.fields["heat"].queryset = MillCertificate.objects.all()
        # Lots and heats pile up over the years: the lists offer the newest (and the one asked now); any older one is
        # read back by its id, which its own page's Recall link carries.
        for name, newest in (("lot", FillerLot.objects.order_by("-received_on", "-pk")),
                             ("heat", MillCertificate.objects.order_by("-recorded_at", "-pk"))):
            asked = parse_id(str(self.data.get(name, ""))) if self.is_bound else None
            rows = list(newest[:RECALL_OFFERED])
            if asked and asked not in {r.pk for r in rows}:
                rows += list(newest.model.objects.filter(pk=asked))
            self.fields[name].widget.choices = [("", "—")] + [(r.pk, str(r)) for r in rows]
        self.fields["inspector"].queryset = User.objects.filter(role=Role.INSPECTOR).order_by("last_name",
                                                                                              "username")

    def clean(self):
        data = super().clean()
        kind = data.get("kind")
        if kind and not data.get(kind):
            self.add_error(kind, "Choose which one.")
        start, end = data.get("date_from"), data.get("date_to")
        if start and end and end < start:
            self.add_error("date_to", "The end comes before the start.")
        return data
