"""One vocabulary of observations: the table, its labels, what each set asks for, and words that reach a person.

No engineering values are judged here (test_acceptance.py does that against the standards); these tests hold the
table and the engine to each other: every observation the checks read is in the table with the checks that read
it, and no error message of evaluate() shows a program name such as observed['throat'] to an inspector.
"""

import re

import pytest
from hypothesis import given
from hypothesis import strategies as st

from inspections import observations as obs
from inspections.acceptance import CHECKS, Job, Observed, evaluate, read_observed, read_weld, verdict_system
from inspections.criteria import get_criteria, list_criteria

STATIC, CYCLIC = "aws-d1.1-2020-static", "aws-d1.1-2020-cyclic"
ISO_KEYS = ("iso-5817-2014-B", "iso-5817-2014-C", "iso-5817-2014-D")
ALL_KEYS = (STATIC, CYCLIC, *ISO_KEYS)


# --- the table ----------------------------------------------------------------------------------------------


def test_every_observation_has_one_name_a_kind_two_labels_and_help():
    names = [o.name for o in obs.OBSERVATIONS]
    assert len(names) == len(set(names))
    for o in obs.OBSERVATIONS:
        assert o.kind in obs.KINDS and o.us_label and o.si_label and o.help and o.read_by
        assert "_" not in o.us_label + o.si_label  # trade words, not program names
        assert set(o.read_by) <= set(CHECKS), o.name


def test_the_lists_by_kind_partition_the_table_in_table_order():
    assert obs.LENGTHS and obs.COUNTS and obs.FLAGS and obs.ANGLES
    assert sorted(obs.LENGTHS + obs.COUNTS + obs.FLAGS + obs.ANGLES) == sorted(o.name for o in obs.OBSERVATIONS)
    assert obs.LENGTHS == tuple(o.name for o in obs.OBSERVATIONS if o.kind == "length")


def test_the_engine_reads_exactly_the_observations_of_the_table():
    assert [f for f in Observed.__dataclass_fields__] == [o.name for o in obs.OBSERVATIONS]


@pytest.mark.parametrize("name, us, si", [
    ("min_size", "Smallest leg measured", "Smallest leg measured"),
    ("undercut_length", "Undercut length over the general limit, worst 12 in",
     "Undercut length over the general limit, worst 300 mm"),
    ("pores_per_4in", "Pores in the worst 4 in", "Pores in the worst 100 mm"),
])
def test_labels_speak_in_the_jobs_units(name, us, si):
    assert obs.label(name, "US") == us and obs.label(name, "SI") == si


def test_label_refuses_what_is_not_an_observation_and_an_unknown_system():
    with pytest.raises(ValueError, match="Smallest leg measured"):
        obs.label("min_sise")
    with pytest.raises(ValueError, match="'US' or 'SI'"):
        obs.label("min_size", "metric")
    assert obs.weld_label("thickness") == "base metal thickness at the toe"
    with pytest.raises(ValueError, match="weld length"):
        obs.weld_label("lenght")


def test_each_set_asks_for_what_its_checks_judge():
    static = [o.name for o in obs.asked_by(STATIC)]
    assert "min_size" in static and "porosity_sum_1in" in static and "throat" not in static
    cyclic = [o.name for o in obs.asked_by(CYCLIC)]
    assert "pores_per_4in" in cyclic
    for key in ISO_KEYS:
        iso = [o.name for o in obs.asked_by(key)]
        assert "throat" in iso and "undersize_length" not in iso
    # a set object and its stored dict ask for the same
    assert obs.asked_by(get_criteria(STATIC)) == obs.asked_by(get_criteria(STATIC).to_dict()) == obs.asked_by(STATIC)


# --- the table against what the checks really read ----------------------------------------------------------


class Recorder:
    """Stands in for the observations a check reads and remembers which ones it looked at."""

    def __init__(self, seen):
        object.__setattr__(self, "_seen", seen)
        object.__setattr__(self, "read", set())

    def __getattr__(self, name):
        self.read.add(name)
        return getattr(self._seen, name)


_US = {"min_size": "3/16 in", "undersize_length": "1 in", "undercut_depth": "1/16 in", "undercut_length": "1 in",
       "porosity_sum_1in": "1/8 in", "porosity_sum_12in": "1/4 in", "pore_max": "1/16 in", "pores_per_4in": 2,
       "convexity": "1/16 in", "face_width": "1/2 in", "throat": "0.17 in", "throat_short_length": "1/2 in",
       "leg_difference": "1/8 in", "toe_angle": "95°", "root_gap": "1/16 in", "overlap_width": "1/32 in",
       "crater_depth": "1/32 in", "crack": True, "crater_crack": True, "incomplete_fusion": True,
       "unfilled_crater": True, "overlap": True, "poor_restart": True, "spatter": True, "arc_strike": True}
_EXAMPLES = [{}, _US, *({k: v} for k, v in _US.items()), {"undercut_length": "1 in"}, {"pores_per_4in": 1},
             {"porosity_sum_1in": "1/8 in"}, {"unfilled_crater": True}, {"overlap_width": "1/32 in"},
             {"throat": "0.17 in", "throat_short_length": "1/2 in"}, {"min_size": "3/16 in", "throat": "0.17 in"}]


def test_the_checks_read_exactly_the_observations_the_table_says_they_read():
    weld = {"size": "1/4 in", "throat": "0.18 in", "length": "12 in", "thickness": "1/2 in", "primary_member": True,
            "transverse_to_tension": True}
    read = {name: set() for name in CHECKS}
    for key in ALL_KEYS:
        cset = get_criteria(key)
        for example in _EXAMPLES:
            for stiffener in (False, True):
                job_weld = read_weld({**weld, "stiffener_to_web": stiffener})
                seen = Recorder(read_observed(example))
                job = Job(cset=cset, system=verdict_system(cset, weld), weld=job_weld, seen=seen)
                for name in cset.checks:
                    seen.read.clear()
                    try:
                        CHECKS[name](job)
                    except ValueError:
                        pass
                    read[name] |= seen.read
    for name, names in read.items():
        declared = {o.name for o in obs.OBSERVATIONS if name in o.read_by}
        assert names <= declared, f"check {name} reads {names - declared} that the table does not give it"
        assert names == declared, f"the table gives check {name} {declared - names}, which it never reads"


# --- no program name reaches a person -----------------------------------------------------------------------

_RAW = sorted({o.name for o in obs.OBSERVATIONS} | set(obs.WELD_LABELS) | {"size2", "min_size2"})
_RAW_WITH_UNDERSCORE = [name for name in _RAW if "_" in name]


def assert_in_words(message: str):
    assert "observed[" not in message and "weld[" not in message, message
    for name in _RAW_WITH_UNDERSCORE:
        assert not re.search(rf"(?<![A-Za-z0-9_]){re.escape(name)}(?![A-Za-z0-9_])", message), (name, message)
    for key in ALL_KEYS:
        assert key not in message, message  # 'iso-5817-2014-C judges ...': the set's name, not its key


_AWS_WELD = {"size": "1/4 in", "length": "12 in", "thickness": "1/2 in"}
_ISO_WELD = {"size": "7 mm", "throat": "5 mm", "length": "300 mm", "thickness": "10 mm"}
_BAD = [
    (STATIC, _AWS_WELD, {}),  # no smallest leg
    (CYCLIC, _AWS_WELD, {"undersize_length": "1 in"}),
    (STATIC, _AWS_WELD, {"min_size": "1/4 in", "undersize_length": "1 in"}),  # not under size, yet a length
    (STATIC, _AWS_WELD, {"min_size": "3/16 in", "undersize_length": "13 in"}),  # longer than the weld
    (STATIC, {"size": "1/4 in", "thickness": "1/2 in"}, {"min_size": "3/16 in", "undersize_length": "1 in"}),
    (STATIC, {"size": "1/4 in", "length": "12 in"}, {"min_size": "1/4 in", "undercut_depth": "1/32 in"}),
    (STATIC, _AWS_WELD, {"min_size": "1/4 in", "undercut_depth": "1/16 in", "undercut_length": "13 in"}),
    (STATIC, {**_AWS_WELD, "size": "0 in"}, {"min_size": "1/4 in"}),
    (STATIC, {**_AWS_WELD, "primary_member": "yes"}, {"min_size": "1/4 in"}),
    (STATIC, {**_AWS_WELD, "transverse_to_tension": None}, {"min_size": "1/4 in"}),
    (STATIC, {**_AWS_WELD, "stiffener_to_web": 1}, {"min_size": "1/4 in"}),
    (STATIC, {**_AWS_WELD, "system": "metric"}, {"min_size": "1/4 in"}),
    (STATIC, {"length": "12 in"}, {"min_size": "1/4 in"}),
    (STATIC, {**_AWS_WELD, "colour": "red"}, {"min_size": "1/4 in"}),
    (STATIC, _AWS_WELD, {"min_size": "1/4 in", "undercut_dept": "1/32 in"}),
    (STATIC, _AWS_WELD, {"min_size": "1/4 in", "pores_per_4in": "two"}),
    (STATIC, _AWS_WELD, {"min_size": "1/4 in", "pores_per_4in": -1}),
    *((STATIC, _AWS_WELD, {"min_size": "1/4 in", name: "1/4"}) for name in obs.LENGTHS if name != "min_size"),
    *((STATIC, _AWS_WELD, {"min_size": "1/4 in", name: "quarter"}) for name in obs.LENGTHS),
    *((STATIC, _AWS_WELD, {"min_size": "1/4 in", name: "no"}) for name in obs.FLAGS),
    *((key, _ISO_WELD, {"throat": "5 mm", name: bad}) for name in obs.ANGLES for bad in ("steep", "0°", "200°")
      for key in ISO_KEYS),
    (STATIC, {**_AWS_WELD, "size2": "3/8 in"}, {"min_size": "1/4 in", "min_size2": "3/8 in",
                                               "undersize_length": "1 in"}),
    (STATIC, {**_AWS_WELD, "size2": "0 in"}, {"min_size": "1/4 in"}),
    *((key, _ISO_WELD, {"throat": "5 mm", "throat_short_length": "10 mm"}) for key in ISO_KEYS),
    # (level B rejects any throat shortfall before its length is looked at: C and D only)
    *((key, _ISO_WELD, {"throat": "4.5 mm", "throat_short_length": "101 mm"}) for key in ISO_KEYS[1:]),
    *((key, {k: v for k, v in _ISO_WELD.items() if k != "length"}, {"throat": "4.5 mm", "throat_short_length": "9 mm"})
      for key in ISO_KEYS[1:]),
    *((STATIC, {**_AWS_WELD, name: "-1 in"}, {"min_size": "1/4 in"}) for name in ("size", "length", "thickness")),
    *((key, {k: v for k, v in _ISO_WELD.items() if k not in ("throat", "size")}, {"throat": "5 mm"})
      for key in ISO_KEYS),
    *((key, _ISO_WELD, {}) for key in ISO_KEYS),
    *((key, {**_ISO_WELD, "thickness": "3 mm"}, {"throat": "5 mm"}) for key in ISO_KEYS),
    *((key, {k: v for k, v in _ISO_WELD.items() if k != "thickness"}, {"throat": "5 mm", "undercut_depth": "0.2 mm"})
      for key in ISO_KEYS),
]


@pytest.mark.parametrize("key, weld, seen", _BAD)
def test_no_error_message_shows_a_program_name(key, weld, seen):
    with pytest.raises(ValueError) as err:
        evaluate(key, weld, seen)
    assert_in_words(str(err.value))


_junk = st.one_of(st.none(), st.booleans(), st.integers(-3, 3), st.text(max_size=8),
                  st.sampled_from(["1/4 in", "0 mm", "3 mm", "-1 in", "1/0 in", "1e3 mm", "12", "7 mm"]))


@given(st.sampled_from(ALL_KEYS), st.dictionaries(st.sampled_from(sorted(obs.WELD_LABELS)), _junk, max_size=4),
       st.dictionaries(st.sampled_from([o.name for o in obs.OBSERVATIONS]), _junk, max_size=4))
def test_any_bad_input_is_refused_in_words(key, weld, seen):
    try:
        evaluate(key, weld, seen)
    except ValueError as exc:
        assert_in_words(str(exc))


def test_every_published_set_is_named_in_words():
    for cset in list_criteria():
        assert "-" not in cset.title.split(",")[0].replace("D1.1/D1.1M", "")
