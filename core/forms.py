"""The form of a record edited in place: it carries the version it was opened at, so no save overwrites another.

Two people open the same draft; the first saves; the second's save finds the record's version moved on
(core.locking compares and sets it) and saves nothing. The form then keeps the second person's input on the
page, says who changed the record and when (from its history), marks each field they changed with the old and
new value, and carries the current version: saving again is a decision made with the other change in view.
"""

from decimal import Decimal

from django import forms
from django.db import transaction
from django.utils import timezone

from core import history, units
from core.errors import RecordLocked, Stale
from core.locking import stale


class VersionedModelForm(forms.ModelForm):
    # Not named "version": a form field may not share the name of the model's non-editable field (the admin).
    opened_version = forms.IntegerField(widget=forms.HiddenInput, required=False, min_value=0)
    opened_at = forms.DateTimeField(widget=forms.HiddenInput, required=False)

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        if self.instance.pk is not None:
            self.initial.setdefault("opened_version", self.instance.version)
            self.initial.setdefault("opened_at", timezone.now())

    def clean_opened_version(self):
        version = self.cleaned_data.get("opened_version")
        if self.instance.pk is not None and version is None:
            raise forms.ValidationError("This form lost track of the record's version: open the record again.",
                                        code="version")
        return version

    def _post_clean(self):
        super()._post_clean()
        version = self.cleaned_data.get("opened_version")
        if self.instance.pk is not None and version is not None:
            self.instance.version = version  # the save compares this with the stored version

    def save(self, commit=True):
        """Save the record and its links as one history row (core.history.one_entry), all or nothing."""
        if not commit:
            return super().save(commit=False)
        with transaction.atomic(), history.one_entry():
            return super().save(commit=True)

    def save_or_explain(self):
        """The saved record; or None, with the refusal on the form (a stale or frozen record), the input kept."""
        try:
            return self.save()
        except Stale as exc:
            self.explain_stale(exc)
        except RecordLocked as exc:
            if hasattr(exc, "error_dict"):
                for name, errors in exc.message_dict.items():
                    self.add_error(name if name in self.fields else None, errors)
            else:
                self.add_error(None, exc.messages)
        return None

    def explain_stale(self, exc):
        """Put the refusal at the top and, beside each field the other person changed, their old and new value
        (code "stale": not an error in the input, a review ignores them)."""
        events = history.since(exc.current, self.cleaned_data.get("opened_at")) if exc.current is not None else []
        if events:  # name the change made since this page was opened (the newest row may be older than that)
            exc = stale(self.instance, exc.current, events[-1])
        self.add_error(None, forms.ValidationError(" ".join(exc.messages), code="stale"))
        by_label = {history.label_of(f): f.name for f in self._meta.model._meta.get_fields()
                    if hasattr(f, "verbose_name")}
        marked = set()
        for event in reversed(events or exc.events):
            who = str(event.user) if event.user else "Legwork"
            for label, (old, new) in (event.changes or {}).items():
                name = by_label.get(label)
                if name in self.fields and name not in marked:
                    marked.add(name)
                    self.add_error(name, forms.ValidationError(
                        f"{who} changed this at {timezone.localtime(event.at):%Y-%m-%d %H:%M}: {old or '—'} → "
                        f"{new or '—'}. Your value is kept here.", code="stale"))
        if exc.version is not None:
            # The next save is compared with the record as it is now: made with the other change in view.
            data = self.data.copy()
            data[self.add_prefix("opened_version")] = str(exc.version)
            data[self.add_prefix("opened_at")] = timezone.now().isoformat()
            self.data = data


# --- plain numbers ---------------------------------------------------------------------------------------------
# Plain numbers in forms, read as quantities are: a decimal comma ('27,5') is a decimal point, and a stored number
# prints without the trailing zeros its column keeps (250, not 250.0; 27.5, not 27.50).
#
# core.units decides what a typed number means (core.units.number_text: a comma is the decimal mark only with no
# point and one comma; a thousands-looking '1,000' is refused with a message). read_decimal_comma(form) gives every
# DecimalField of a form that reading; the quantity fields (core.fields) have it already.


class CommaDecimalField(forms.DecimalField):
    """A DecimalField that reads a decimal comma and prints its value plainly."""

    def to_python(self, value):
        if isinstance(value, str) and value.strip():
            try:
                value = units.number_text(value.strip())
            except units.UnitError as exc:
                raise forms.ValidationError(str(exc), code="invalid") from None
        return super().to_python(value)

    def prepare_value(self, value):
        if isinstance(value, Decimal):
            return units._plain(value)
        return super().prepare_value(value)

    def widget_attrs(self, widget):
        attrs = super().widget_attrs(widget)
        # a text box with the decimal keypad: type="number" refuses a comma before the server sees it
        attrs.pop("step", None)
        attrs.update({"inputmode": "decimal", "autocomplete": "off"})
        return attrs


def read_decimal_comma(form) -> None:
    """Give every plain DecimalField of the form the decimal comma and plain printing (CommaDecimalField)."""
    for field in form.fields.values():
        if type(field) is forms.DecimalField:
            field.__class__ = CommaDecimalField
            field.widget = forms.TextInput(attrs={**field.widget.attrs, **CommaDecimalField.widget_attrs(field,
                                                                                                         None)})
            for key in ("step", "type"):
                field.widget.attrs.pop(key, None)
