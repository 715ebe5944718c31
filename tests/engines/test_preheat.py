"""inspections.preheat at its edges: AWS D1.1/D1.1M:2020 Table 5.8 (minimum preheat and interpass temperature,
thicker part; Category B over 3/4 to 1-1/2 in: 50 F) and the WPS's own minimum and maximum. At the limit is
acceptable, one degree past it is not."""

import pytest

from core.units import parse_length, parse_temperature
from inspections import preheat


def t(text):
    return parse_temperature(text)


GMAW = {"process": "GMAW"}  # low-hydrogen process, no base metal named: Category B


def test_table_5_8_category_b_band_edges_at_three_quarters_inch():
    at = preheat.table_5_8_minimum(GMAW, parse_length("3/4 in"), "US")
    past = preheat.table_5_8_minimum(GMAW, parse_length("0.751 in"), "US")
    assert at.category == "B" and at.temperature == t("32 F")
    assert past.temperature == t("50 F")


def test_the_table_minimum_governs_when_above_the_wps_and_is_cited():
    code = preheat.table_5_8_minimum(GMAW, parse_length("1 in"), "US")
    ok = preheat.judge(t("50 F"), "preheat", wps_min=t("32 F"), wps_max=None, code=code, system="US")
    low = preheat.judge(t("49 F"), "preheat", wps_min=t("32 F"), wps_max=None, code=code, system="US")
    assert ok.ok and not low.ok
    assert "Table 5.8" in low.source and "below the minimum 50 °F" in low.message


def test_the_wps_minimum_governs_when_higher():
    code = preheat.table_5_8_minimum(GMAW, parse_length("1/2 in"), "US")  # 32 F
    assert preheat.judge(t("150 F"), "preheat", wps_min=t("150 F"), wps_max=None, code=code, system="US").ok
    low = preheat.judge(t("149 F"), "preheat", wps_min=t("150 F"), wps_max=None, code=code, system="US")
    assert not low.ok and "WPS" in low.source


def test_interpass_has_the_same_minimum_and_the_wps_maximum():
    args = dict(wps_min=t("65 C"), wps_max=t("250 C"), code=None, system="SI")
    assert preheat.judge(t("250 C"), "interpass", **args).ok
    hot = preheat.judge(t("251 C"), "interpass", **args)
    assert not hot.ok and "above the maximum interpass temperature 250 °C" in hot.message
    assert not preheat.judge(t("64 C"), "interpass", **args).ok


def test_si_jobs_use_the_table_in_celsius():
    code = preheat.table_5_8_minimum(GMAW, parse_length("30 mm"), "SI")
    assert code.temperature == t("10 C")


def test_a_wps_that_cannot_be_read_gives_no_table_minimum_and_a_bad_kind_is_refused():
    assert preheat.table_5_8_minimum({"process": "SMAW"}, parse_length("1 in"), "US") is None  # no electrode
    with pytest.raises(ValueError, match="kind must be one of"):
        preheat.judge(t("50 F"), "post-heat", wps_min=None, wps_max=None, code=None, system="US")
