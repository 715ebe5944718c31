"""Criteria sets as data: registry, the values against their published tables, storing and deriving client sets.

Sources: AWS D1.1/D1.1M:2020 Table 8.1 (2015: Table 6.1), Tables 7.8/7.9; ISO 5817:2014 fillet welds t > 3 mm.
"""

import json
from decimal import Decimal

import pytest
from hypothesis import given
from hypothesis import strategies as st

from core.units import parse_length
from inspections.acceptance import evaluate
from inspections.criteria import (
    REGISTRY,
    Fixed,
    Permission,
    Proportional,
    derive,
    from_dict,
    get_criteria,
    length_text,
    list_criteria,
)

STATIC, CYCLIC = "aws-d1.1-2020-static", "aws-d1.1-2020-cyclic"
ISO_KEYS = ("iso-5817-2014-B", "iso-5817-2014-C", "iso-5817-2014-D")
L = parse_length


# --- registry -------------------------------------------------------------------------------------------


def test_the_contract_keys_are_registered_with_a_version_and_a_title():
    keys = [s.key for s in list_criteria()]
    assert set(keys) >= {STATIC, CYCLIC, *ISO_KEYS}
    assert keys == sorted(keys)
    for cset in list_criteria():
        assert cset.version >= 1 and cset.title and cset.standard and cset.checks


@pytest.mark.parametrize("key", ["aws-d1.1-2015-static", "", None, 3, ["aws-d1.1-2020-static"]])
def test_an_unknown_key_names_the_known_ones(key):
    with pytest.raises(ValueError) as err:
        get_criteria(key)
    for known in REGISTRY:
        assert known in str(err.value)


def test_every_limit_names_its_source_and_status():
    for cset in list_criteria():
        for name, limit in cset.limits.items():
            assert cset.standard.split(":")[0] in limit.source, name
            assert any(word in limit.status for word in ("published", "from memory")), name


def test_aws_sets_print_us_and_si_values_iso_sets_si_only():
    for key in (STATIC, CYCLIC):
        assert get_criteria(key).systems == ("US", "SI")
    for key in ISO_KEYS:
        assert get_criteria(key).systems == ("SI",)


# --- the values, against the reference tables -----------------------------------------------------------


def test_aws_static_undercut_values_as_printed_not_converted():
    # AWS D1.1/D1.1M:2020 Table 8.1, statically loaded: 1/32 in [1 mm], 1/16 in [2 mm] for 2 in [50 mm] in 12 in
    s = get_criteria(STATIC)
    assert (s.limit("undercut_thin").us, s.limit("undercut_thin").si) == (L("1/32 in"), L("1 mm"))
    assert (s.limit("undercut_thin_short").us, s.limit("undercut_thin_short").si) == (L("1/16 in"), L("2 mm"))
    assert s.limit("undercut_thin_short_length").si == L("50 mm")
    assert s.limit("undercut_thick").us == L("1/16 in")
    assert s.limit("undercut_thin").us != s.limit("undercut_thin").si


def test_aws_cyclic_values_and_their_memory_marks():
    # AWS D1.1/D1.1M:2020 Table 8.1, cyclically loaded: 0.01 in [0.25 mm] (mm from memory); pores 3/32 in
    # [2.5 mm] published; one pore in each 4 in [100 mm] from memory
    c = get_criteria(CYCLIC)
    assert c.limit("undercut_primary_transverse").us == L("0.01 in")
    assert "from memory" in c.limit("undercut_primary_transverse").status
    assert c.limit("pore_max").us == L("3/32 in") and c.limit("pore_max").status == "published"
    assert c.limit("pores_per_4in").value == 1 and c.limit("pores_per_4in").status == "from memory"


def test_aws_arc_strike_clause_is_marked_from_memory():
    assert "from memory" in get_criteria(STATIC).limit("arc_strike").cite()


def test_iso_values_per_level():
    # ISO 5817:2014 5011/5012, 503, 2017 (published); 5213 from memory for 2014; 601 from memory
    b, c, d = (get_criteria(k) for k in ISO_KEYS)
    assert (b.limit("undercut").factor, b.limit("undercut").max) == (Decimal("0.05"), L("0.5 mm"))
    assert (d.limit("convexity").plus, d.limit("convexity").factor, d.limit("convexity").max) == (
        L("1 mm"), Decimal("0.25"), L("5 mm"))
    assert c.limit("surface_pore").factor == Decimal("0.2")
    assert b.limit("throat_small").rule == "not_permitted" and "from memory" in b.limit("throat_small").status
    assert d.limit("throat_large").rule == "permitted" and d.limit("throat_large").status == "from memory"
    assert d.limit("arc_strike").rule == "permitted_if" and d.limit("arc_strike").status == "from memory"


# --- storing a set as a plain dict ----------------------------------------------------------------------


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_every_set_round_trips_through_json(key):
    cset = get_criteria(key)
    stored = json.loads(json.dumps(cset.to_dict()))
    assert from_dict(stored) == cset


def test_lengths_are_stored_as_text_with_units():
    stored = get_criteria(CYCLIC).to_dict()["limits"]
    assert stored["undercut_other"]["us"] == "1/32 in" and stored["undercut_other"]["si"] == "1 mm"
    assert stored["undercut_primary_transverse"]["us"] == "0.01 in"
    assert stored["undersize"]["us"][0] == {"up_to": "1/4 in", "inclusive": False, "limit": "1/16 in"}


@pytest.mark.parametrize("length,system,text", [
    ("1/32 in", "US", "1/32 in"), ("1-1/2 in", "US", "1-1/2 in"), ("12 in", "US", "12 in"),
    ("0.01 in", "US", "0.01 in"), ("2.5 mm", "SI", "2.5 mm"), ("6 mm", "US", "6 mm"), ("300 mm", "SI", "300 mm")])
def test_length_text_reads_back_exactly(length, system, text):
    assert length_text(L(length), system) == text
    assert L(text) == L(length)


@pytest.mark.parametrize("change,match", [
    (lambda d: "not a dict", "dict"),
    (lambda d: {k: v for k, v in d.items() if k != "limits"}, "limits"),
    (lambda d: {**d, "version": 0}, "version"),
    (lambda d: {**d, "version": "1"}, "version"),
    (lambda d: {**d, "systems": ["metric"]}, "systems"),
    (lambda d: {**d, "key": "has spaces"}, "key"),
    (lambda d: {**d, "limits": {**d["limits"], "undercut_thin": {"type": "fuzzy"}}}, "type"),
    (lambda d: {**d, "limits": {**d["limits"], "undercut_thin": {**d["limits"]["undercut_thin"], "us": "1/32"}}},
     "unit"),
    (lambda d: {**d, "limits": {**d["limits"], "crack": {**d["limits"]["crack"], "rule": "maybe"}}}, "permission"),
    (lambda d: {**d, "limits": {**d["limits"], "undercut_thin": "1/32 in"}}, "dict"),
    (lambda d: {**d, "signed_by_engineer": "yes"}, "true or false"),
])
def test_a_malformed_stored_set_is_refused(change, match):
    with pytest.raises(ValueError, match=match):
        from_dict(change(get_criteria(STATIC).to_dict()))


# --- derived (client) sets ------------------------------------------------------------------------------


def test_a_tighter_client_set_remembers_its_base_and_has_its_own_version():
    client = derive(STATIC, "acme-bridge", {"undercut_thin": "1/64 in"}, "Acme bridge spec")
    assert (client.base_key, client.base_version, client.version) == (STATIC, 1, 1)
    assert client.overridden == ("undercut_thin",) and client.loosened == ()
    assert client.limit("undercut_thin").us == L("1/64 in") and "acme-bridge" in client.limit("undercut_thin").source
    # AWS D1.1/D1.1M:2020 Table 8.1 accepts 1/32 in undercut on 1/2 in plate; the client's set does not
    weld, seen = {"size": "1/4 in", "thickness": "1/2 in"}, {"min_size": "1/4 in", "undercut_depth": "1/32 in"}
    assert evaluate(STATIC, weld, seen).accepted
    verdict = evaluate(client, weld, seen)
    assert not verdict.accepted and verdict.criteria_key == "acme-bridge"
    assert evaluate(client.to_dict(), weld, seen) == verdict


@pytest.mark.parametrize("key,overrides,name", [
    (STATIC, {"undercut_thin": "1/16 in"}, "undercut_thin"),
    (STATIC, {"undercut_thin": {"si": "1.5 mm"}}, "undercut_thin"),        # looser in SI only
    (STATIC, {"undersize_portion": "15 %"}, "undersize_portion"),
    (STATIC, {"crack": "permitted"}, "crack"),
    (STATIC, {"convexity": "1/8 in"}, "convexity"),                         # looser for W <= 5/16 in only
    (CYCLIC, {"pores_per_4in": 2}, "pores_per_4in"),
    ("iso-5817-2014-B", {"undercut": {"factor": "0.04", "max": "0.6 mm"}}, "undercut"),  # looser for t > 12.5 mm
    ("iso-5817-2014-B", {"throat_small": "0.1 mm"}, "throat_small"),
    ("iso-5817-2014-C", {"arc_strike": "permitted"}, "arc_strike"),
])
def test_derive_refuses_a_looser_limit_and_names_it(key, overrides, name):
    with pytest.raises(ValueError, match=name):
        derive(key, "client-x", overrides, "Client X")


def test_a_looser_limit_signed_by_the_engineer_is_kept_and_listed():
    client = derive(STATIC, "client-x", {"undercut_thin": "1/16 in"}, "Client X", signed_by_engineer=True)
    assert client.loosened == ("undercut_thin",) and client.signed_by_engineer
    assert "signed by the engineer" in client.limit("undercut_thin").status


@pytest.mark.parametrize("key,overrides", [
    (STATIC, {"undercut_thin": "not permitted"}),
    (STATIC, {"undercut_thin": {"us": "1/64 in"}}),
    (STATIC, {"undersize_portion": "5 %", "porosity_sum_1in": {"us": "1/4 in", "si": "6 mm"}}),
    (CYCLIC, {"pores_per_4in": 0}),
    ("iso-5817-2014-B", {"undercut": {"factor": "0.04"}}),
    ("iso-5817-2014-D", {"arc_strike": "not permitted", "throat_large": "3 mm"}),
])
def test_derive_accepts_tighter_or_equal_limits(key, overrides):
    client = derive(key, "client-y", overrides, "Client Y")
    assert client.loosened == () and set(client.overridden) == set(overrides)


@pytest.mark.parametrize("args,match", [
    ((STATIC, STATIC, {}, "Copy"), "published set"),
    ((STATIC, "bad key!", {}, "Bad"), "key"),
    ((STATIC, "client-z", {}, ""), "title"),
    ((STATIC, "client-z", ["undercut_thin"], "Z"), "dict"),
    ((STATIC, "client-z", {"undercutthin": "1/64 in"}, "Z"), "undercut_thin"),
    ((STATIC, "client-z", {"undercut_window": "6 in"}, "Z"), "cannot be overridden"),
    ((STATIC, "client-z", {"crack": "1/16 in"}, "Z"), "not permitted"),
    ((STATIC, "client-z", {"undercut_thin": "1/64"}, "Z"), "unit"),
    ((STATIC, "client-z", {"undercut_thin": 0.01}, "Z"), "undercut_thin"),
    ((CYCLIC, "client-z", {"pores_per_4in": "one"}, "Z"), "whole number"),
    (("no-such-base", "client-z", {}, "Z"), "known sets"),
])
def test_derive_bad_input_raises_value_error(args, match):
    with pytest.raises(ValueError, match=match):
        derive(*args)


def test_signed_by_engineer_must_be_a_bool():
    with pytest.raises(ValueError, match="True or False"):
        derive(STATIC, "client-z", {}, "Z", signed_by_engineer="yes")


def test_a_client_set_can_be_derived_from_a_stored_client_set():
    first = derive(STATIC, "acme-2025", {"undercut_thin": "1/64 in"}, "Acme 2025")
    second = derive(first.to_dict(), "acme-2026", {"undersize_portion": "5 %"}, "Acme 2026", version=2)
    assert (second.base_key, second.version) == ("acme-2025", 2)
    assert second.overridden == ("undercut_thin", "undersize_portion")
    assert from_dict(json.loads(json.dumps(second.to_dict()))) == second
    with pytest.raises(ValueError, match="undercut_thin"):  # looser than the stored base, though not the code
        derive(first.to_dict(), "acme-2027", {"undercut_thin": "1/32 in"}, "Acme 2027")


_fixed_limits = [(key, name) for key in sorted(REGISTRY) for name, limit in REGISTRY[key].limits.items()
                 if isinstance(limit, Fixed)]
_proportional_limits = [(key, name) for key in ISO_KEYS for name, limit in REGISTRY[key].limits.items()
                        if isinstance(limit, Proportional)]


@given(st.sampled_from(_fixed_limits), st.integers(min_value=1, max_value=400))
def test_derive_refuses_every_increase_of_a_fixed_limit(case, percent):
    # loosening is judged against the base set's own printed values, in each system it prints
    key, name = case
    limit = REGISTRY[key].limit(name)
    bigger = {s: f"{format((getattr(limit, s).mm * (100 + percent) / 100).normalize(), 'f')} mm" for s in ("us", "si")
              if getattr(limit, s) is not None}  # ISO prints SI values only
    with pytest.raises(ValueError, match=name):
        derive(key, "client-p", {name: bigger}, "Client P")
    signed = derive(key, "client-p", {name: bigger}, "Client P", signed_by_engineer=True)
    assert signed.loosened == (name,)


@given(st.sampled_from(_proportional_limits), st.sampled_from(["plus", "factor", "max"]),
       st.integers(min_value=1, max_value=100))
def test_derive_refuses_every_increase_of_an_iso_rule_term(case, term, percent):
    # ISO 5817:2014 h <= plus + factor x, max: raising any term allows more for some weld
    key, name = case
    limit = REGISTRY[key].limit(name)
    if term == "max" and limit.max is None:
        return  # no cap to raise (512 asymmetry)
    grow = Decimal(100 + percent) / 100
    value = {"plus": f"{format((limit.plus.mm * grow + Decimal('0.01')).normalize(), 'f')} mm",
             "factor": format(limit.factor * grow, "f"),
             "max": f"{format((limit.max.mm * grow).normalize(), 'f')} mm" if limit.max else None}[term]
    with pytest.raises(ValueError, match=name):
        derive(key, "client-q", {name: {term: value}}, "Client Q")


def test_a_permission_that_only_confirms_a_condition_is_looser_than_not_permitted():
    # ISO 5817:2014 601 stray arc (from memory): C not permitted; D permitted if the parent metal is unaffected
    d_rule = get_criteria("iso-5817-2014-D").limit("arc_strike")
    assert isinstance(d_rule, Permission)
    with pytest.raises(ValueError, match="arc_strike"):
        derive("iso-5817-2014-C", "client-r", {"arc_strike": d_rule.to_dict()}, "Client R")


# --- ISO 5817:2014 version 2: the lines added for fillet welds ----------------------------------------------


def test_iso_sets_version_2_judge_the_added_items():
    # ISO 5817:2014 104, 505, 512, 517, 602, 617 and the 5213 length (short imperfection definition, published)
    for key in ISO_KEYS:
        cset = get_criteria(key)
        assert cset.version == 2
        assert {"crater_crack", "weld_toe", "asymmetry", "poor_restart", "spatter", "root_gap",
                "overlap_by_width"} <= set(cset.checks)
        assert cset.limit("short_imperfection").si == L("25 mm") and cset.limit("short_imperfection").us is None
        assert cset.limit("short_imperfection_share").value == Decimal("0.25")
        assert cset.limit("short_imperfection_window").si == L("100 mm")
        for name in ("weld_toe", "crater_crack", "poor_restart", "spatter", "overlap", "fusion"):
            assert "from memory" in cset.limit(name).status, (key, name)


def test_iso_level_d_no_longer_holds_fusion_and_overlap_for_judgement():
    # ISO 5817:2014 level D: 401 at the surface not permitted, 506 h <= 0.2 b (both from memory)
    d = get_criteria("iso-5817-2014-D")
    assert d.limit("fusion").rule == "not_permitted"
    assert (d.limit("overlap").factor, d.limit("overlap").of, d.limit("overlap").max) == (Decimal("0.2"), "b", None)


def test_a_client_may_ask_a_blunter_weld_toe_but_a_sharper_one_needs_the_engineer():
    # ISO 5817:2014 level C 505: alpha >= 100 degrees (from memory)
    key = "iso-5817-2014-C"
    assert derive(key, "client-t", {"weld_toe": "105°"}, "Client T").limit("weld_toe").minimum == Decimal(105)
    with pytest.raises(ValueError, match="weld_toe"):
        derive(key, "client-t", {"weld_toe": "95"}, "Client T")
    signed = derive(key, "client-t", {"weld_toe": "95"}, "Client T", signed_by_engineer=True)
    assert signed.loosened == ("weld_toe",)
    assert from_dict(json.loads(json.dumps(signed.to_dict()))) == signed
    with pytest.raises(ValueError, match="0 to 180"):
        derive(key, "client-t", {"weld_toe": "190"}, "Client T")


def test_a_client_share_may_be_typed_with_a_decimal_comma():
    # AWS D1.1/D1.1M:2020 Table 8.1: undersize portion at most 10 %; a client's 5 % typed as 0,05
    assert derive(STATIC, "client-c", {"undersize_portion": "0,05"}, "Client C").limit("undersize_portion").value \
        == Decimal("0.05")
    with pytest.raises(ValueError, match="comma and a point"):
        derive(STATIC, "client-c", {"undersize_portion": "0,05.1"}, "Client C")
