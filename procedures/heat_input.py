"""Heat input of a weld pass and of a WPS range, and a check of that range against the PQRs behind it.

HI = 60 V A / (1000 S): V arc volts, A amperes, S travel speed; kJ/in with S in in/min, kJ/mm with S in mm/min.
The arithmetic runs on exact fractions and is rounded once, so 25 V, 200 A, 10 in/min is 30 kJ/in exactly and
a WPS limit equal to its PQR's value compares equal.

Pulsed and other waveform-controlled welding: average volts times average amps understate (or overstate) the
arc energy, so for those the machine's (or a high-sampling meter's) instantaneous energy or power is used, as
ASME BPVC Section IX QW-409.1(c) describes (published; in effect since the 2010 edition): HI = energy / weld
length, or HI = power x arc time / weld length. AWS D1.1:2020 accepts the same for waveform-controlled welding
(clause wording from memory). heat_input() takes energy= (J or kJ) with weld_length=, or power= (W or kW) with
arc_time= and weld_length= (or with the travel speed: P x t / L = P / S); the V x A form stays the default.
heat_input_range_of() reads a WPS's power_min / power_max where it gives them, and method_findings() warns when a
pulsed WPS is judged by V x A alone.

How findings are formed: check_against_pqrs() returns the same Finding shape as procedures.prequalified
(rule, severity, message, source, field). When CVN toughness testing applies, a WPS whose maximum heat input
is above the highest heat input of the PQRs that support it is an "error": the WPS claims a qualification the
PQRs do not give. A decrease in heat input is not checked (it is not a supplementary essential variable as far
as this engine knows, from memory). Without toughness testing the check has nothing to say and returns [].
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from fractions import Fraction

from core.units import (
    HeatInput,
    format_heat_input,
    parse_amperage,
    parse_heat_input,
    parse_length,
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


SOURCE_WAVEFORM = ("ASME BPVC Section IX QW-409.1(c): heat input from instantaneous energy, HI = energy / weld "
                   "length, or instantaneous power, HI = power x arc time / weld length (published); AWS "
                   "D1.1/D1.1M:2020 accepts it for waveform-controlled welding (wording from memory)")

_QUANTITY = re.compile(r"^\s*(?P<num>[0-9]+(?:\.[0-9]+)?)\s*(?P<unit>[A-Za-z]+)?\s*$")
_ENERGY_UNITS = {"j": 1, "kj": 1000}
_POWER_UNITS = {"w": 1, "kw": 1000}
_TIME_UNITS = {"s": 1, "sec": 1, "min": 60}


def _scaled(value, units: dict, what: str, example: str) -> Fraction:
    """A positive quantity with its unit, in the base unit of `units`; a bare number is refused (J or kJ?)."""
    if isinstance(value, bool) or not isinstance(value, str):
        raise ValueError(f"{what} must be text with its unit, e.g. {example}, not {value!r}.")
    match = _QUANTITY.match(unicodedata.normalize("NFKC", value))
    if not match:
        raise ValueError(f"'{value}' is not {what}: write it as {example}.")
    if match["unit"] is None or match["unit"].lower() not in units:
        raise ValueError(f"'{value}': give {what} with its unit ({', '.join(units)}), e.g. {example}.")
    amount = Fraction(match["num"]) * units[match["unit"].lower()]
    if amount <= 0:
        raise ValueError(f"{what} must be more than zero, e.g. {example}; got '{value}'.")
    return amount


def _length_mm(value, what: str) -> Fraction:
    length = parse_length(value)
    if length.mm <= 0:
        raise ValueError(f"{what} must be more than zero, e.g. 12 in or 300 mm; got {value!r}.")
    return Fraction(length.mm)


def heat_input(voltage=None, amperage=None, travel_speed=None, *, energy=None, power=None, arc_time=None,
               weld_length=None) -> HeatInput:
    """Heat input of a pass.

    Default (SOURCE_FORMULA): arc voltage ('25 V' or 25), current ('200 A' or 200) and travel speed
    ('10 in/min', '300 mm/min' or a units.Speed).
    Waveform-controlled or pulsed welding (SOURCE_WAVEFORM): energy= the machine's instantaneous energy for the
    pass ('12.6 kJ', '12600 J') with weld_length= ('12 in'); or power= the instantaneous power ('5.2 kW', '5200 W')
    with arc_time= ('45 s') and weld_length=, or with travel_speed= (P x t / L is P / S when S = L / t).
    """
    if energy is not None or power is not None:
        if voltage is not None or amperage is not None:
            raise ValueError("Give either volts and amps, or the machine's instantaneous energy or power, not both.")
        if energy is not None and power is not None:
            raise ValueError("Give the machine's instantaneous energy (J) or its power (W), not both.")
        if energy is not None:
            if weld_length is None or arc_time is not None or travel_speed is not None:
                raise ValueError("Heat input from energy needs the weld length only: HI = energy / weld length, "
                                 "e.g. energy='12.6 kJ', weld_length='12 in'.")
            joules = _scaled(energy, _ENERGY_UNITS, "the instantaneous energy", "12.6 kJ or 12600 J")
            return HeatInput.from_fraction(joules / 1000 / _length_mm(weld_length, "Weld length"))
        watts = _scaled(power, _POWER_UNITS, "the instantaneous power", "5.2 kW or 5200 W")
        if arc_time is not None and weld_length is not None and travel_speed is None:
            seconds = _scaled(arc_time, _TIME_UNITS, "the arc time", "45 s")
            return HeatInput.from_fraction(watts * seconds / 1000 / _length_mm(weld_length, "Weld length"))
        if travel_speed is not None and arc_time is None and weld_length is None:
            mm_per_s = Fraction(parse_speed(travel_speed).mm_per_min) / 60
            if mm_per_s <= 0:
                raise ValueError(f"Travel speed must be more than zero, not {travel_speed!r}.")
            return HeatInput.from_fraction(watts / 1000 / mm_per_s)
        raise ValueError("Heat input from power needs the arc time and the weld length (HI = power x arc time / "
                         "weld length), or the travel speed alone.")
    if arc_time is not None or weld_length is not None:
        raise ValueError("Arc time and weld length go with the machine's instantaneous energy or power, not with "
                         "volts and amps.")
    if voltage is None or amperage is None or travel_speed is None:
        raise ValueError("Heat input needs the arc voltage, the current and the travel speed (or, for pulsed "
                         "welding, the machine's instantaneous energy or power).")
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


POWER_KEYS = ("power_min", "power_max", "travel_speed_min", "travel_speed_max")
PULSED_TRANSFERS = ("pulsed", "pulsed_spray", "pulsed spray", "waveform", "waveform_controlled")


def heat_input_range_of(wps: Mapping) -> HeatInputRange:
    """The heat input range of a WPS dict, from the same keys procedures.prequalified.review() reads.

    Where the WPS gives the machine's instantaneous power range (power_min, power_max: '4.8 kW'), the range is
    power / travel speed (SOURCE_WAVEFORM); otherwise volts and amps (SOURCE_FORMULA)."""
    if not isinstance(wps, Mapping):
        raise ValueError(f"The WPS must be a dict with {', '.join(RANGE_KEYS)}, not {type(wps).__name__}.")
    if wps.get("power_min") is not None or wps.get("power_max") is not None:
        missing = [key for key in POWER_KEYS if wps.get(key) is None]
        if missing:
            raise ValueError(f"A heat input range from power needs {', '.join(POWER_KEYS)}; missing: "
                             f"{', '.join(missing)}.")
        low = _scaled(wps["power_min"], _POWER_UNITS, "the minimum power", "4.8 kW")
        high = _scaled(wps["power_max"], _POWER_UNITS, "the maximum power", "6.2 kW")
        if low > high:
            raise ValueError(f"power: the minimum {wps['power_min']} is above the maximum {wps['power_max']}.")
        _ordered(wps["travel_speed_min"], wps["travel_speed_max"], parse_speed, "travel speed")
        return HeatInputRange(minimum=heat_input(power=wps["power_min"], travel_speed=wps["travel_speed_max"]),
                              maximum=heat_input(power=wps["power_max"], travel_speed=wps["travel_speed_min"]))
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


def method_findings(wps: Mapping) -> list[Finding]:
    """A warning when a pulsed (waveform-controlled) WPS's heat input can only be had from volts and amps."""
    if not isinstance(wps, Mapping):
        raise ValueError(f"The WPS must be a dict of its values, not {type(wps).__name__}.")
    transfer = wps.get("transfer")
    pulsed = isinstance(transfer, str) and transfer.strip().lower().replace("-", "_") in PULSED_TRANSFERS
    if pulsed and wps.get("power_min") is None and wps.get("power_max") is None:
        return [Finding("heat_input_method", "warning",
                        "Pulsed (waveform-controlled) transfer: average volts x amps do not give the arc energy; "
                        "record the machine's instantaneous power (or energy per pass) to compute heat input.",
                        SOURCE_WAVEFORM, "heat_input")]
    return []
