"""Heat input of a weld pass and of a WPS range, and a check of that range against the PQRs behind it.

HI = 60 V A / (1000 S): V arc volts, A amperes, S travel speed; kJ/in with S in in/min, kJ/mm with S in mm/min.
The arithmetic runs on exact fractions and is rounded once, so 25 V, 200 A, 10 in/min is 30 kJ/in exactly and
a WPS limit equal to its PQR's value compares equal.

How findings are formed: check_against_pqrs() returns the same Finding shape as procedures.prequalified
(rule, severity, message, source, field). When CVN toughness testing applies, a WPS whose maximum heat input
is above the highest heat input of the PQRs that support it is an "error": the WPS claims a qualification the
PQRs do not give. A decrease in heat input is not checked (it is not a supplementary essential variable as far
as this engine knows, from memory). Without toughness testing the check has nothing to say and returns [].
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from fractions import Fraction

from core.units import (
    HeatInput,
    format_heat_input,
    parse_amperage,
    parse_heat_input,
    parse_speed,
    parse_voltage,
)
from procedures.prequalified import CODE, KNOWN_CODES, Finding

SOURCE_FORMULA = ("HI = 60 V A / (1000 S): common practice, no source of its own; AWS D1.1/D1.1M:2020 clause 6 and "
                  "ASME BPVC Section IX QW-409.1 use the same form")
SOURCE_PQR_HEAT_INPUT = ("AWS D1.1/D1.1M:2020 clause 6, PQR supplementary essential variables where CVN toughness "
                         "testing applies: an increase in heat input over that qualified (Table 6.5, table number "
                         "from memory)")


@dataclass(frozen=True)
class HeatInputRange:
    """The heat input a WPS allows: lowest volts and amps at the fastest travel, highest at the slowest."""

    minimum: HeatInput
    maximum: HeatInput

    def __str__(self):
        return f"{format_heat_input(self.minimum)} to {format_heat_input(self.maximum)}"


def _exact_kj_per_mm(voltage, amperage, travel_speed) -> Fraction:
    volts = Fraction(parse_voltage(voltage))
    amps = Fraction(parse_amperage(amperage))
    mm_per_min = Fraction(parse_speed(travel_speed).mm_per_min)
    return 60 * volts * amps / (1000 * mm_per_min)  # SOURCE_FORMULA, with S in mm/min -> kJ/mm


def heat_input(voltage, amperage, travel_speed) -> HeatInput:
    """Heat input from arc voltage ('25 V' or 25), current ('200 A' or 200) and travel speed ('10 in/min',
    '300 mm/min' or a units.Speed). SOURCE_FORMULA."""
    return HeatInput.from_fraction(_exact_kj_per_mm(voltage, amperage, travel_speed))


def _ordered(low, high, parser, what):
    if parser(low) > parser(high):
        raise ValueError(f"{what}: the minimum {low} is above the maximum {high}.")


def heat_input_range(voltage_min, voltage_max, amperage_min, amperage_max, travel_speed_min,
                     travel_speed_max) -> HeatInputRange:
    """Lowest and highest heat input a WPS range allows. SOURCE_FORMULA: HI rises with V and A, falls with S."""
    _ordered(voltage_min, voltage_max, parse_voltage, "voltage")
    _ordered(amperage_min, amperage_max, parse_amperage, "amperage")
    _ordered(travel_speed_min, travel_speed_max, parse_speed, "travel speed")
    return HeatInputRange(minimum=heat_input(voltage_min, amperage_min, travel_speed_max),
                          maximum=heat_input(voltage_max, amperage_max, travel_speed_min))


RANGE_KEYS = ("voltage_min", "voltage_max", "amperage_min", "amperage_max", "travel_speed_min", "travel_speed_max")


def heat_input_range_of(wps: Mapping) -> HeatInputRange:
    """The heat input range of a WPS dict, from the same keys procedures.prequalified.review() reads."""
    if not isinstance(wps, Mapping):
        raise ValueError(f"The WPS must be a dict with {', '.join(RANGE_KEYS)}, not {type(wps).__name__}.")
    missing = [key for key in RANGE_KEYS if wps.get(key) is None]
    if missing:
        raise ValueError(f"A heat input range needs {', '.join(RANGE_KEYS)}; missing: {', '.join(missing)}.")
    return heat_input_range(*(wps[key] for key in RANGE_KEYS))


def _as_range(value) -> HeatInputRange:
    if isinstance(value, HeatInputRange):
        return value
    if isinstance(value, Mapping):
        return heat_input_range_of(value)
    if isinstance(value, tuple) and len(value) == 2:
        low, high = parse_heat_input(value[0]), parse_heat_input(value[1])
        if low > high:
            raise ValueError(f"WPS heat input range: the minimum {value[0]} is above the maximum {value[1]}.")
        return HeatInputRange(low, high)
    raise ValueError("Give the WPS heat input range as a HeatInputRange, a (minimum, maximum) pair such as "
                     "('20 kJ/in', '35 kJ/in'), or a WPS dict with voltage, amperage and travel speed ranges.")


def _pqr_values(pqr_heat_inputs) -> list[tuple[str, HeatInput]]:
    if isinstance(pqr_heat_inputs, Mapping):
        items = [(str(label), value) for label, value in pqr_heat_inputs.items()]
    elif isinstance(pqr_heat_inputs, Iterable) and not isinstance(pqr_heat_inputs, (str, bytes)):
        items = [(f"PQR {number}", value) for number, value in enumerate(pqr_heat_inputs, start=1)]
    else:
        raise ValueError("Give the supporting PQRs' heat inputs as a dict {'PQR-12': '30 kJ/in', ...} or a list "
                         "of heat inputs.")
    if not items:
        raise ValueError("At least one supporting PQR heat input is needed to check a WPS against it.")
    parsed = []
    for label, value in items:
        try:
            parsed.append((label, parse_heat_input(value)))
        except ValueError as exc:
            raise ValueError(f"{label}: {exc}") from None
    return parsed


def check_against_pqrs(wps_range, pqr_heat_inputs, *, toughness_required: bool = True,
                       code: str = CODE, system: str = "US") -> list[Finding]:
    """Findings when the WPS heat input range goes above what its supporting PQRs qualified.

    wps_range: HeatInputRange, a (min, max) pair of heat inputs, or a WPS dict with voltage / amperage /
    travel speed ranges. pqr_heat_inputs: {label: heat input} or a list of heat inputs ('30 kJ/in', HeatInput).
    toughness_required: CVN testing applies to the WPS (only then is heat input a qualified limit here).
    system: the unit system the messages speak first ('US' or 'SI').
    """
    if not isinstance(code, str) or code.strip() not in KNOWN_CODES:
        raise ValueError(f"Code {code!r} is not known to the heat input check; known: {', '.join(KNOWN_CODES)}.")
    if not isinstance(toughness_required, bool):
        raise ValueError(f"toughness_required must be True or False, not {toughness_required!r}.")
    if system not in ("US", "SI"):
        raise ValueError(f"system must be 'US' or 'SI', not {system!r}.")
    wps = _as_range(wps_range)
    pqrs = _pqr_values(pqr_heat_inputs)
    if not toughness_required:
        return []
    other = "SI" if system == "US" else "US"
    label, qualified = max(pqrs, key=lambda item: item[1])
    if wps.maximum > qualified:
        return [Finding("heat_input_above_pqr", "error",
                        f"WPS maximum heat input {format_heat_input(wps.maximum, system, 4)} "
                        f"({format_heat_input(wps.maximum, other, 4)}) is above the highest supporting PQR heat "
                        f"input {format_heat_input(qualified, system, 4)} ({label}): with CVN toughness testing, "
                        "an increase over the qualified heat input needs a new PQR; otherwise lower the WPS volts "
                        "and amps or raise its minimum travel speed.", SOURCE_PQR_HEAT_INPUT, "heat_input")]
    return []
