"""Heat input: the formula HI = 60 V A / (1000 S) is the source of every computed value here (common practice;
AWS D1.1:2020 clause 6 and ASME Section IX QW-409.1 use the same form), each hand-computed in the comment.
The PQR check: AWS D1.1:2020 clause 6 supplementary essential variable for heat input where CVN testing applies
(table number from memory). The units additions it needs (amps, volts, heat input) are tested here too.
"""

from decimal import Decimal

import pytest
from hypothesis import given
from hypothesis import strategies as st

from core.units import (
    HeatInput,
    UnitError,
    format_heat_input,
    parse_amperage,
    parse_heat_input,
    parse_speed,
    parse_temperature,
    parse_voltage,
    temperature_system,
)
from procedures.heat_input import (
    HeatInputRange,
    check_against_pqrs,
    heat_input,
    heat_input_range,
    heat_input_range_of,
    method_findings,
)
from procedures.prequalified import Finding


def test_25_v_200_a_10_in_per_min_is_30_kj_per_in():  # 60 x 25 x 200 / (1000 x 10) = 30 kJ/in
    hi = heat_input("25 V", "200 A", "10 in/min")
    assert hi.kj_per_in == Decimal(30)
    assert hi.kj_per_mm == Decimal("1.181102362")  # 30 / 25.4, to 1e-9


def test_25_v_200_a_300_mm_per_min_is_1_kj_per_mm():  # 60 x 25 x 200 / (1000 x 300) = 1 kJ/mm = 25.4 kJ/in
    hi = heat_input(25, 200, "300 mm/min")
    assert hi.kj_per_mm == Decimal(1)
    assert hi.kj_per_in == Decimal("25.4")


def test_28_v_250_a_12_in_per_min_is_35_kj_per_in():  # 60 x 28 x 250 / (1000 x 12) = 35 kJ/in
    assert heat_input(Decimal("28"), "250", parse_speed("12 in/min")).kj_per_in == Decimal(35)


def test_fractional_reading():  # 60 x 22.5 x 165 / (1000 x 9) = 24.75 kJ/in
    assert heat_input("22.5 V", "165 A", "9 in/min").kj_per_in == Decimal("24.75")


def test_the_same_speed_in_either_unit_gives_the_same_heat_input():  # 10 in/min = 254 mm/min exactly
    assert heat_input(25, 200, "10 in/min") == heat_input(25, 200, "254 mm/min")


def test_range_takes_low_volts_and_amps_at_fast_travel_for_the_minimum():
    # minimum 60 x 24 x 180 / (1000 x 12) = 21.6 kJ/in; maximum 60 x 28 x 220 / (1000 x 8) = 46.2 kJ/in
    r = heat_input_range("24 V", "28 V", "180 A", "220 A", "8 in/min", "12 in/min")
    assert r.minimum.kj_per_in == Decimal("21.6")
    assert r.maximum.kj_per_in == Decimal("46.2")
    assert str(r) == "21.6 kJ/in to 46.2 kJ/in"


def test_range_of_a_wps_dict_reads_the_review_keys():  # same figures as above
    r = heat_input_range_of(dict(voltage_min="24 V", voltage_max="28 V", amperage_min="180 A", amperage_max="220 A",
                                 travel_speed_min="8 in/min", travel_speed_max="12 in/min", process="GMAW"))
    assert (r.minimum.kj_per_in, r.maximum.kj_per_in) == (Decimal("21.6"), Decimal("46.2"))


@pytest.mark.parametrize("args, named", [
    (("28 V", "24 V", "180 A", "220 A", "8 in/min", "12 in/min"), "voltage"),
    (("24 V", "28 V", "220 A", "180 A", "8 in/min", "12 in/min"), "amperage"),
    (("24 V", "28 V", "180 A", "220 A", "12 in/min", "8 in/min"), "travel speed"),
])
def test_range_with_minimum_above_maximum_is_refused(args, named):
    with pytest.raises(ValueError, match=named):
        heat_input_range(*args)


def test_range_of_a_wps_without_the_keys_names_them():
    with pytest.raises(ValueError, match="missing: travel_speed_min, travel_speed_max"):
        heat_input_range_of(dict(voltage_min=24, voltage_max=28, amperage_min=180, amperage_max=220))


@pytest.mark.parametrize("voltage, amperage, speed", [
    (None, 200, "10 in/min"), ("25", None, "10 in/min"), (25, 200, None), (25, 200, "10"), (25, 200, "0 in/min"),
    (0, 200, "10 in/min"), (25, 0, "10 in/min"), ("-25 V", 200, "10 in/min"), (True, 200, "10 in/min"),
    ("25 A", 200, "10 in/min"), (25, "200 V", "10 in/min"), (float("nan"), 200, "10 in/min"),
    (250, 200, "10 in/min"), (25, 5000, "10 in/min"), (25, 200, "ten in/min"), ([25], 200, "10 in/min"),
])
def test_bad_readings_raise_value_error(voltage, amperage, speed):
    with pytest.raises(ValueError):
        heat_input(voltage, amperage, speed)


# --- check against the supporting PQRs ---------------------------------------------------------------
# AWS D1.1:2020 clause 6, supplementary essential variable where CVN testing applies: an increase in heat input
# over that qualified (Table 6.5, table number from memory).

WPS_RANGE = heat_input_range("24 V", "28 V", "180 A", "220 A", "8 in/min", "12 in/min")  # 21.6 to 46.2 kJ/in


def test_wps_maximum_equal_to_the_pqr_is_supported():  # D1.1:2020 clause 6 CVN: increase over qualified (from memory)
    assert check_against_pqrs(WPS_RANGE, {"PQR-7": "46.2 kJ/in"}) == []


def test_wps_maximum_just_above_the_pqr_is_an_error():  # D1.1:2020 clause 6 CVN: increase over qualified
    findings = check_against_pqrs(WPS_RANGE, {"PQR-7": "46.1 kJ/in"})
    assert len(findings) == 1
    f = findings[0]
    assert isinstance(f, Finding)
    assert (f.rule, f.severity, f.field) == ("heat_input_above_pqr", "error", "heat_input")
    assert "46.2 kJ/in" in f.message and "46.1 kJ/in" in f.message and "PQR-7" in f.message
    assert "AWS D1.1/D1.1M:2020" in f.source and "from memory" in f.source


def test_the_highest_supporting_pqr_sets_the_limit():  # D1.1:2020 clause 6 CVN: increase over qualified
    assert check_against_pqrs(WPS_RANGE, {"PQR-7": "30 kJ/in", "PQR-9": "1.82 kJ/mm"}) == []  # 1.82 kJ/mm = 46.23 kJ/in


def test_pqr_in_kj_per_mm_compares_with_a_wps_in_inches():  # 1.8 kJ/mm = 45.72 kJ/in < 46.2 kJ/in
    findings = check_against_pqrs(WPS_RANGE, ["1.8 kJ/mm"], system="SI")
    assert findings and "1.8 kJ/mm" in findings[0].message and "PQR 1" in findings[0].message


def test_wps_given_as_a_pair_or_a_dict():
    assert check_against_pqrs(("20 kJ/in", "35 kJ/in"), ["35 kJ/in"]) == []
    assert check_against_pqrs(("20 kJ/in", "35.1 kJ/in"), ["35 kJ/in"])
    wps = dict(voltage_min=24, voltage_max=28, amperage_min=180, amperage_max=220, travel_speed_min="8 in/min",
               travel_speed_max="12 in/min")
    assert check_against_pqrs(wps, [HeatInput.from_kj_per_mm("1.8")])


def test_without_toughness_testing_heat_input_is_not_judged():  # D1.1:2020: supplementary only with CVN
    assert check_against_pqrs(WPS_RANGE, ["10 kJ/in"], toughness_required=False) == []


@pytest.mark.parametrize("kwargs, named", [
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs=[]), "At least one"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs="30 kJ/in"), "dict"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs={"PQR-3": "30"}), "PQR-3"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs={"PQR-3": "30 kJ/ft"}), "PQR-3"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs={"PQR-3": None}), "PQR-3"),
    (dict(wps_range=("35 kJ/in", "20 kJ/in"), pqr_heat_inputs=["30 kJ/in"]), "minimum"),
    (dict(wps_range="35 kJ/in", pqr_heat_inputs=["30 kJ/in"]), "range"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs=["30 kJ/in"], code="ASME IX"), "AWS D1.1:2020"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs=["30 kJ/in"], toughness_required="yes"), "True or False"),
    (dict(wps_range=WPS_RANGE, pqr_heat_inputs=["30 kJ/in"], system="metric"), "US"),
])
def test_bad_check_input_raises_value_error(kwargs, named):
    with pytest.raises(ValueError, match=named):
        check_against_pqrs(**kwargs)


# --- the units additions: amps, volts, heat input, temperature system --------------------------------

@pytest.mark.parametrize("text, amps", [("200 A", 200), ("200A", 200), ("200", 200), (200, 200),
                                        (Decimal("187.5"), Decimal("187.5")), ("150 amps", 150)])
def test_parse_amperage(text, amps):
    assert parse_amperage(text) == Decimal(amps)


@pytest.mark.parametrize("text, volts", [("25 V", 25), ("25v", 25), ("24.5", Decimal("24.5")), (30, 30)])
def test_parse_voltage(text, volts):
    assert parse_voltage(text) == Decimal(volts)


@pytest.mark.parametrize("text, kj_per_in", [("30 kJ/in", "30"), ("1 kJ/mm", "25.4"), ("1000 J/mm", "25.4"),
                                             ("10 kJ/cm", "25.4"), ("45.72 KJ/IN", "45.72")])
def test_parse_heat_input(text, kj_per_in):  # 1 in = 25.4 mm exactly
    assert parse_heat_input(text).kj_per_in == Decimal(kj_per_in)


@pytest.mark.parametrize("bad", ["30", "0 kJ/in", "30 kJ/ft", "", None, 30, "-5 kJ/in", "5000 kJ/mm"])
def test_parse_heat_input_refuses(bad):
    with pytest.raises(UnitError):
        parse_heat_input(bad)


def test_format_heat_input():
    hi = heat_input(25, 200, "10 in/min")
    assert format_heat_input(hi) == "30 kJ/in"
    assert format_heat_input(hi, "SI") == "1.18 kJ/mm"
    assert format_heat_input(hi, "SI", 4) == "1.181 kJ/mm"


@pytest.mark.parametrize("text, system", [("50 F", "US"), ("150°F", "US"), ("10 C", "SI"), ("-5 °C", "SI")])
def test_temperature_system(text, system):
    assert temperature_system(text) == system


def test_temperature_system_of_a_value_is_unknown():
    assert temperature_system(parse_temperature("50 F")) is None


# --- properties ----------------------------------------------------------------------------------

volts = st.decimals(min_value=10, max_value=45, places=1)
amps = st.integers(min_value=50, max_value=600)
speeds = st.decimals(min_value=2, max_value=60, places=1)


@given(volts, amps, speeds)
def test_kj_per_in_is_kj_per_mm_times_25_4(v, a, s):  # 1 in = 25.4 mm exactly
    hi = heat_input(v, a, f"{s} in/min")
    assert abs(hi.kj_per_in - hi.kj_per_mm * Decimal("25.4")) < Decimal("0.00000003")


@given(volts, amps, speeds)
def test_heat_input_matches_the_formula(v, a, s):  # HI = 60 V A / (1000 S), kJ/in with S in in/min
    hi = heat_input(v, a, f"{s} in/min")
    assert abs(hi.kj_per_in - Decimal(60) * v * a / (1000 * s)) < Decimal("0.000000001")


@given(volts, volts, amps, amps, speeds, speeds)
def test_range_brackets_every_setting_inside_it(v1, v2, a1, a2, s1, s2):
    (v_lo, v_hi), (a_lo, a_hi), (s_lo, s_hi) = sorted((v1, v2)), sorted((a1, a2)), sorted((s1, s2))
    r = heat_input_range(v_lo, v_hi, a_lo, a_hi, f"{s_lo} in/min", f"{s_hi} in/min")
    assert isinstance(r, HeatInputRange)
    for v in (v_lo, v_hi):
        for a in (a_lo, a_hi):
            for s in (s_lo, s_hi):
                assert r.minimum <= heat_input(v, a, f"{s} in/min") <= r.maximum


# --- pulsed / waveform-controlled: ASME BPVC IX QW-409.1(c) (published): HI = energy / length, or
# power x arc time / length ------------------------------------------------------------------------------------

def test_heat_input_from_instantaneous_energy():  # QW-409.1(c): HI = energy / weld length
    # 12.7 kJ over 10 in is 1.27 kJ/in; over 254 mm, 0.05 kJ/mm (worked by hand)
    hi = heat_input(energy="12.7 kJ", weld_length="10 in")
    assert hi.kj_per_in == Decimal("1.27") and hi.kj_per_mm == Decimal("0.05")
    assert heat_input(energy="12700 J", weld_length="254 mm") == hi


def test_heat_input_from_instantaneous_power_and_arc_time():  # QW-409.1(c): HI = power x arc time / weld length
    # 5.2 kW for 45 s over 9 in: 234 kJ / 9 in = 26 kJ/in (worked by hand)
    assert heat_input(power="5.2 kW", arc_time="45 s", weld_length="9 in").kj_per_in == Decimal("26")
    assert heat_input(power="5200 W", arc_time="0.75 min", weld_length="9 in").kj_per_in == Decimal("26")


def test_power_over_travel_speed_equals_volts_times_amps_at_the_same_power():
    # 25 V x 200 A is 5 kW: at 10 in/min both forms give 30 kJ/in (common practice form and QW-409.1(c))
    assert heat_input(power="5 kW", travel_speed="10 in/min") == heat_input("25 V", "200 A", "10 in/min")
    assert heat_input(power="5 kW", travel_speed="10 in/min").kj_per_in == Decimal("30")


@pytest.mark.parametrize("kwargs, part", [
    (dict(energy="12700", weld_length="10 in"), "with its unit"),  # J or kJ? never guessed
    (dict(energy="12.7 kJ"), "needs the weld length"),
    (dict(energy="0 J", weld_length="10 in"), "more than zero"),
    (dict(power="5 kW", arc_time="45 s"), "needs the arc time and the weld length"),
    (dict(power="5 kW", energy="1 kJ", weld_length="1 in"), "not both"),
    (dict(voltage="25 V", amperage="200 A", power="5 kW", travel_speed="10 in/min"), "not both"),
    (dict(voltage="25 V", amperage="200 A", travel_speed="10 in/min", weld_length="10 in"), "not with volts"),
    (dict(energy="12.7 kWh", weld_length="10 in"), "with its unit"),
    (dict(voltage="25 V", amperage="200 A"), "needs the arc voltage, the current and the travel speed"),
])
def test_bad_pulsed_inputs_are_refused_in_words(kwargs, part):
    with pytest.raises(ValueError) as info:
        heat_input(**kwargs)
    assert part in str(info.value)


POWER_WPS = dict(transfer="pulsed", power_min="4.5 kW", power_max="6 kW", travel_speed_min="10 in/min",
                 travel_speed_max="15 in/min")


def test_wps_range_from_power():  # QW-409.1(c) with S = L / t: 4.5 kW at 15 in/min .. 6 kW at 10 in/min
    heat = heat_input_range_of(POWER_WPS)
    assert heat.minimum.kj_per_in == Decimal("18") and heat.maximum.kj_per_in == Decimal("36")  # by hand


@pytest.mark.parametrize("pqr, flagged", [("36 kJ/in", False), ("35.9 kJ/in", True)])
def test_power_range_against_its_pqr_at_and_just_past_the_limit(pqr, flagged):  # D1.1:2020 Table 6.5 (memory)
    findings = check_against_pqrs(POWER_WPS, [pqr])
    assert bool(findings) is flagged


def test_pulsed_wps_judged_by_volts_and_amps_is_warned():  # QW-409.1(c): V x A does not give the arc energy
    volts_amps = dict(transfer="pulsed", voltage_min="24 V", voltage_max="27 V", amperage_min="180 A",
                      amperage_max="220 A", travel_speed_min="10 in/min", travel_speed_max="14 in/min")
    (finding,) = method_findings(volts_amps)
    assert finding.severity == "warning" and "QW-409.1(c)" in finding.source
    assert method_findings(POWER_WPS) == []
    assert method_findings(dict(volts_amps, transfer="spray")) == []


def test_power_range_backwards_is_refused():
    with pytest.raises(ValueError, match="minimum 6 kW is above"):
        heat_input_range_of(dict(POWER_WPS, power_min="6 kW", power_max="4.5 kW"))
