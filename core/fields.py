"""Model and form fields for quantities. Storage is exact base units; parsing and printing is core.units.

A length is stored as Decimal millimetres with 7 places (1/128 in exact) and comes back as a
units.Length; a temperature as Decimal degrees Celsius (units.Temperature); a force as kN; a speed as
mm/min; a gas flow as L/min. Forms accept what a person types in their job's system.

Whatever is typed, a field answers with a value or a ValidationError shown beside it, never another exception:
the parsers' ValueError, and the ArithmeticError family (decimal.InvalidOperation for a number with more digits
than a Decimal context holds, OverflowError, ZeroDivisionError) become a message, NaN and Infinity are refused,
and each quantity has a ceiling far above any shop value (CEILINGS) so a stored value always fits its column.
"""

import functools
from decimal import Decimal

from django import forms
from django.core.exceptions import ValidationError
from django.db import models

from core import units


class _QuantityField(models.DecimalField):
    """A DecimalField in a base unit whose Python value is a units type."""

    quantity = None  # the units dataclass
    attribute = None  # its Decimal attribute in the base unit
    places = 4

    def __init__(self, *args, **kwargs):
        kwargs.setdefault("max_digits", 16)
        kwargs.setdefault("decimal_places", self.places)
        super().__init__(*args, **kwargs)

    def deconstruct(self):
        name, path, args, kwargs = super().deconstruct()
        if kwargs.get("max_digits") == 16:
            del kwargs["max_digits"]
        if kwargs.get("decimal_places") == self.places:
            del kwargs["decimal_places"]
        return name, path, args, kwargs

    def _wrap(self, value):
        number = value if isinstance(value, Decimal) else Decimal(str(value))
        if not number.is_finite():
            raise ValidationError(f"'{value}' is not a number.", code="invalid")
        return self.quantity(**{self.attribute: number})

    def from_db_value(self, value, expression, connection):
        if value is None:
            return None
        return self._wrap(value)

    def to_python(self, value):
        if value is None or isinstance(value, self.quantity):
            return value
        try:
            return self._parse(value) if isinstance(value, str) and not _is_number(value) else self._wrap(value)
        except (ValueError, ArithmeticError) as exc:
            raise ValidationError(str(exc), code="invalid") from None

    def _parse(self, text):
        raise NotImplementedError

    def get_prep_value(self, value):
        # Not DecimalField.get_prep_value: it would call our to_python and wrap the Decimal again.
        value = models.Field.get_prep_value(self, value)
        if isinstance(value, str):
            value = self.to_python(value)
        if isinstance(value, self.quantity):
            value = getattr(value, self.attribute)
        return models.DecimalField.to_python(self, value)

    def get_db_prep_value(self, value, connection, prepared=False):
        if not prepared:
            value = self.get_prep_value(value)
        if value is None or hasattr(value, "as_sql"):
            return value
        return connection.ops.adapt_decimalfield_value(value, self.max_digits, self.decimal_places)

    def run_validators(self, value):
        # DecimalField's digit validator judges the stored number, rounded to the column's places.
        if isinstance(value, self.quantity):
            try:
                value = getattr(value, self.attribute).quantize(Decimal(1).scaleb(-self.decimal_places))
            except ArithmeticError:
                raise ValidationError("This number is too large to store: check the number and the unit.",
                                      code="max_digits") from None
        super().run_validators(value)

    def value_to_string(self, obj):
        value = self.value_from_object(obj)
        return "" if value is None else str(getattr(value, self.attribute))

    def formfield(self, **kwargs):
        defaults = {"required": not self.blank, "label": self.verbose_name[:1].upper() + self.verbose_name[1:],
                    "help_text": self.help_text}
        defaults.update(kwargs)
        return _FORM_FIELDS[type(self).__name__](**defaults)


def _is_number(text):
    """A plain decimal number (as the database and fixtures hand it over); NaN and Infinity are not."""
    try:
        return Decimal(text).is_finite()
    except ArithmeticError:
        return False


class LengthField(_QuantityField):
    quantity = units.Length
    attribute = "mm"
    places = 7

    def _parse(self, text):
        return units.parse_length(text)


class TemperatureField(_QuantityField):
    quantity = units.Temperature
    attribute = "c"

    def _parse(self, text):
        return units.parse_temperature(text)


class ForceField(_QuantityField):
    quantity = units.Force
    attribute = "kn"

    def _parse(self, text):
        return units.parse_force(text)


class SpeedField(_QuantityField):
    quantity = units.Speed
    attribute = "mm_per_min"

    def _parse(self, text):
        return units.parse_speed(text)


class FlowField(_QuantityField):
    quantity = units.Flow
    attribute = "l_per_min"

    def _parse(self, text):
        return units.parse_flow(text)


# --- form fields ---------------------------------------------------------------------------------

# The largest value a form accepts, in the base unit (common practice, no source: each is far above anything a
# structural shop measures or sets, and far below what the column holds, 12 digits before the point).
CEILINGS = {
    "length": units.MAX_LENGTH_MM,  # 100 m, as core.units bounds a length
    "temperature": Decimal("1000"),  # C; core.units refuses above it too
    "force": Decimal("1000000"),  # kN; core.units refuses above it too
    "speed": Decimal("100000"),  # mm/min: 100 m/min, several times the fastest wire feed
    "flow": Decimal("1000"),  # L/min: shielding gas runs at tens of litres a minute
}
CEILING_TEXT = {"length": "100 m", "temperature": "1000 C", "force": "1,000,000 kN", "speed": "100 m/min",
                "flow": "1000 L/min"}


class QuantityInput(forms.TextInput):
    """A text box (fractions and units are text), with the numeric keypad hint where it helps."""

    def __init__(self, attrs=None):
        base = {"autocomplete": "off", "spellcheck": "false", "autocapitalize": "off"}
        super().__init__({**base, **(attrs or {})})


class _QuantityFormField(forms.CharField):
    widget = QuantityInput
    parse = None  # staticmethod in subclasses
    format = None

    def __init__(self, *, system="US", allow_zero=True, minimum=None, maximum=None, **kwargs):
        self.system = system
        self.allow_zero = allow_zero
        self.minimum = minimum
        self.maximum = maximum
        kwargs.pop("max_length", None)  # units refuses over-long text itself, with a message
        super().__init__(**kwargs)

    def widget_attrs(self, widget):
        return {**super().widget_attrs(widget), "maxlength": str(units.MAX_INPUT_CHARS)}

    def default_unit(self):
        return None

    def prepare_value(self, value):
        if value is not None and not isinstance(value, str) and self.format:
            return type(self).format(value, self.system)
        return value

    def to_python(self, value):
        value = super().to_python(value)
        if value in self.empty_values:
            return None
        try:
            parsed = type(self).parse(value, default_unit=self.default_unit())
            number = self.base(parsed)
            finite = number.is_finite()
        except ValueError as exc:
            raise ValidationError(str(exc), code="invalid") from None
        except ArithmeticError:  # more digits than Decimal holds, an overflow: a number nobody measured
            raise ValidationError(f"'{value}' is too large a number: check the number and the unit.",
                                  code="invalid") from None
        if not finite:
            raise ValidationError(f"'{value}' is not a number.", code="invalid")
        if number > CEILINGS[self.quantity_name]:
            raise ValidationError(f"'{value}' is more than {CEILING_TEXT[self.quantity_name]}: check the number and "
                                  "the unit.", code="max_value")
        return parsed

    def validate(self, value):
        super().validate(value)
        if value is None:
            return
        if not self.allow_zero and self.base(value) == 0:
            raise ValidationError("Enter a value greater than zero.", code="zero")
        if self.minimum is not None and value < self.minimum:
            raise ValidationError(
                f"Enter at least {self.prepare_value(self.minimum)}.", code="min_value")
        if self.maximum is not None and value > self.maximum:
            raise ValidationError(
                f"Enter at most {self.prepare_value(self.maximum)}.", code="max_value")

    def has_changed(self, initial, data):
        try:
            return self.to_python(data) != initial
        except ValidationError:
            return True


class LengthFormField(_QuantityFormField):
    """Every length input in Legwork: '3/16', '1-1/2"', '0.1875 in', '5 mm'.

    A bare number is read in the job's system: inches on a US job, millimetres on an SI job.
    """

    quantity_name = "length"

    parse = staticmethod(units.parse_length)
    format = staticmethod(units.format_length)

    def default_unit(self):
        return "in" if self.system == "US" else "mm"

    def base(self, value):
        return value.mm

    def prepare_value(self, value):
        if isinstance(value, units.Length):
            return exact_length_text(value, self.system)
        return value


def exact_length_text(length, system):
    """Form text that parses back to the same stored value (a fraction only when exact). Memoised on the stored
    length: a weld map repeats a few dozen sizes and thicknesses, so an export of 100,000 welds works out each
    distinct text once instead of running the fraction arithmetic per cell (keyed on the stored Decimal)."""
    return _exact_length_text(length.mm, system)


@functools.lru_cache(maxsize=4096)
def _exact_length_text(mm, system):
    length = units.Length(mm)
    if system == "US":
        whole, num, den, exact = units.inch_fraction(length.inch)
        if exact:
            return units.format_length(length, "US")
        return f"{units._plain(length.inch)} in"
    return f"{units._plain(length.mm)} mm"


class TemperatureFormField(_QuantityFormField):
    """Preheat and interpass: '50 F', '10 C'; a bare number is read in the record's system, as a bare length is
    (50 is 50 °F on a US procedure, 50 °C on an SI one)."""

    quantity_name = "temperature"

    parse = staticmethod(units.parse_temperature)
    format = staticmethod(units.format_temperature)

    def default_unit(self):
        return "F" if self.system == "US" else "C"

    def base(self, value):
        return value.c

    def prepare_value(self, value):
        if isinstance(value, units.Temperature):
            return units.format_temperature(value, self.system).replace("°", "")
        return value


class ForceFormField(_QuantityFormField):
    quantity_name = "force"
    parse = staticmethod(units.parse_force)
    format = staticmethod(units.format_force)

    def default_unit(self):
        return "kip" if self.system == "US" else "kN"

    def base(self, value):
        return value.kn


class SpeedFormField(_QuantityFormField):
    quantity_name = "speed"
    parse = staticmethod(units.parse_speed)
    format = staticmethod(units.format_speed)

    def default_unit(self):
        return "in/min" if self.system == "US" else "mm/min"

    def base(self, value):
        return value.mm_per_min


class FlowFormField(_QuantityFormField):
    quantity_name = "flow"
    parse = staticmethod(units.parse_flow)
    format = staticmethod(units.format_flow)

    def default_unit(self):
        return "cfh" if self.system == "US" else "L/min"

    def base(self, value):
        return value.l_per_min


_FORM_FIELDS = {
    "LengthField": LengthFormField,
    "TemperatureField": TemperatureFormField,
    "ForceField": ForceFormField,
    "SpeedField": SpeedFormField,
    "FlowField": FlowFormField,
}


def set_unit_system(form, system):
    """Point every quantity field of a form at the job's (or procedure's) unit system."""
    for field in form.fields.values():
        if isinstance(field, _QuantityFormField):
            field.system = system
