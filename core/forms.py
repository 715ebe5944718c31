"""Plain numbers in forms, read as quantities are: a decimal comma ('27,5') is a decimal point, and a stored number
prints without the trailing zeros its column keeps (250, not 250.0; 27.5, not 27.50).

core.units decides what a typed number means (core.units.number_text: a comma is the decimal mark only with no
point and one comma; a thousands-looking '1,000' is refused with a message). read_decimal_comma(form) gives every
DecimalField of a form that reading; the quantity fields (core.fields) have it already.
"""

from decimal import Decimal

from django import forms

from core import units


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
