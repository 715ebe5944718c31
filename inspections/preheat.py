"""Measured preheat and interpass temperature against the WPS (and, for a prequalified AWS D1.1 WPS, the Table 5.8
minimum for the thicker part). A plain engine: readings and limits in, one Finding per reading out.

The minimum is the higher of the WPS minimum and, where the WPS is prequalified, the Table 5.8 minimum for its
category and the thicker part joined (procedures.prequalified: the table lives there once; AWS D1.1/D1.1M:2020
Table 5.8 is titled minimum preheat AND interpass temperature, so the interpass reading has the same minimum). The
maximum is the WPS maximum interpass temperature, applied to both readings. A reading at the limit is acceptable;
one degree past it is not. Where a temperature is measured: at least the thickness of the thicker part, and not less
than 3 in [75 mm], from the point of welding (AWS D1.1/D1.1M:2020 clause 5.6; ISO 13916:2017; both from memory);
the tablet says so beside the box.
"""

from dataclasses import dataclass
from decimal import Decimal

from core.units import Length, Temperature, format_temperature
from inspections.acceptance import Finding
from procedures import prequalified

WPS_SOURCE = "the WPS's preheat and interpass limits (AWS D1.1/D1.1M:2020 clause 5; ISO 15609-1:2019 item preheat)"
MEASURED_WHERE = ("Measured at least the thickness of the thicker part, and not less than 3 in [75 mm], from the point "
                  "of welding (AWS D1.1/D1.1M:2020 clause 5.6; ISO 13916:2017; from memory).")
KINDS = {"preheat": "preheat", "interpass": "interpass temperature"}


@dataclass(frozen=True)
class CodeMinimum:
    """The Table 5.8 minimum for a prequalified WPS and the thicker part: in the job's system as the table prints."""

    temperature: Temperature
    category: str
    band: str


def table_5_8_minimum(review_input: dict, thicker: Length, system: str) -> CodeMinimum | None:
    """The Table 5.8 minimum of a prequalified AWS WPS (its review_input) for the thicker part joined; None when the
    WPS does not say enough to tell its category (the WPS review reports that)."""
    try:
        procedure = prequalified.parse_procedure(review_input)
    except ValueError:
        return None
    category = prequalified.preheat_category(procedure)
    if category is None or thicker is None:
        return None
    f, c, band = prequalified.minimum_preheat(category, thicker, system)
    temperature = Temperature.from_f(f) if system == "US" else Temperature(Decimal(c))
    return CodeMinimum(temperature, category, band)


def judge(reading: Temperature, kind: str, *, wps_min: Temperature | None, wps_max: Temperature | None,
          code: CodeMinimum | None, system: str, wps_name: str = "the WPS") -> Finding:
    """One reading (kind 'preheat' or 'interpass') judged against the minimum and maximum that apply."""
    if kind not in KINDS:
        raise ValueError(f"kind must be one of {', '.join(KINDS)}, not {kind!r}.")
    words = KINDS[kind]
    shown = format_temperature(reading, system)
    minimum, source = wps_min, f"{wps_name}: {WPS_SOURCE}"
    if code is not None and (minimum is None or code.temperature > minimum):
        minimum = code.temperature
        source = (f"{prequalified.SOURCE_TABLE_5_8}; Category {code.category}, thicker part {code.band} "
                  f"(above {wps_name}'s minimum)")
    if minimum is not None and reading < minimum:
        return Finding(kind, False, f"{words} {shown} measured, below the minimum "
                                    f"{format_temperature(minimum, system)}: the weld is made below preheat",
                       source, limit=minimum, measured=reading)
    if wps_max is not None and reading > wps_max:
        return Finding(kind, False, f"{words} {shown} measured, above the maximum interpass temperature "
                                    f"{format_temperature(wps_max, system)}",
                       f"{wps_name}: {WPS_SOURCE}", limit=wps_max, measured=reading)
    limits = " to ".join(format_temperature(t, system) for t in (minimum, wps_max) if t is not None) or "none given"
    return Finding(kind, True, f"{words} {shown} measured, within {limits}", source, limit=minimum,
                   measured=reading)
