"""Weld symbols drawn as SVG: AWS A2.4 on US jobs, ISO 2553:2019 system A on SI jobs (structure, not pixels).

AWS A2.4: arrow-side weld below the reference line, other side above; size left of the symbol, length (and
pitch, as length-pitch) right of it; all-around circle and field-weld flag at the arrow/reference junction.
ISO 2553:2019 system A: solid reference line plus dashed identification line; arrow-side weld on the solid line,
other side on the dashed line; no dashed line for a weld on both sides; "z" prefix for the leg (the l (e) form
for intermittent welds is from memory).
"""

import xml.etree.ElementTree as ET

import pytest

from inspections.weld_symbols import AWS, ISO, REF_Y, symbol_for, weld_symbol_svg

NS = {"s": "http://www.w3.org/2000/svg"}


def parse(system, **weld):
    return ET.fromstring(weld_symbol_svg(system, **weld))


def by_class(root, cls):
    return [e for e in root.iter() if cls in (e.get("class") or "").split()]


def fillet_points(element):
    return [tuple(float(v) for v in p.split(",")) for p in element.get("points").split()]


def texts(root, cls):
    return [e.text for e in by_class(root, cls)]


def test_aws_arrow_side_fillet_is_drawn_below_the_reference_line_with_size_and_length():
    root = parse("US", sides="arrow", size="1/4 in", length="12 in")
    assert root.tag == "{http://www.w3.org/2000/svg}svg" and root.get("data-convention") == AWS
    (ref,) = by_class(root, "ws-ref-line")
    assert float(ref.get("y1")) == float(ref.get("y2")) == REF_Y
    (fillet,) = by_class(root, "ws-fillet")
    assert "ws-arrow-side" in fillet.get("class")
    points = fillet_points(fillet)
    assert max(y for _, y in points) > REF_Y and min(y for _, y in points) == REF_Y  # below the line
    # Perpendicular leg on the left: the two left points share x and the right point is on the line.
    xs = sorted(x for x, _ in points)
    assert xs[0] == xs[1] < xs[2]
    assert texts(root, "ws-size") == ["1/4"] and texts(root, "ws-length") == ["12"]
    size_x = float(by_class(root, "ws-size")[0].get("x"))
    length_x = float(by_class(root, "ws-length")[0].get("x"))
    assert size_x < xs[0] < xs[2] < length_x  # size left of the symbol, length right of it
    assert not by_class(root, "ws-id-line") and not by_class(root, "ws-all-around")


def test_aws_other_side_fillet_is_drawn_above_the_line():
    root = parse("US", sides="other", size="5/16 in", length="6 in")
    (fillet,) = by_class(root, "ws-fillet")
    assert "ws-other-side" in fillet.get("class")
    assert min(y for _, y in fillet_points(fillet)) < REF_Y
    assert float(by_class(root, "ws-size")[0].get("y")) < REF_Y


def test_aws_both_sides_draws_two_triangles_each_with_its_dimensions():
    root = parse("US", sides="both", size="1/4 in", length="6 in")
    sides = sorted(e.get("class") for e in by_class(root, "ws-fillet"))
    assert sides == ["ws-fillet ws-arrow-side", "ws-fillet ws-other-side"]
    assert texts(root, "ws-size") == ["1/4", "1/4"] and texts(root, "ws-length") == ["6", "6"]


def test_aws_intermittent_weld_reads_length_dash_pitch():
    root = parse("US", sides="arrow", size="3/16 in", length="4 in", pitch="12 in")
    assert texts(root, "ws-length") == ["4-12"]


def test_aws_unequal_legs_print_both_sizes():
    assert texts(parse("US", size="1/4 in", size2="3/8 in", length="6 in"), "ws-size") == ["1/4 x 3/8"]


def test_all_around_circle_and_field_flag_sit_at_the_arrow_junction():
    root = parse("US", sides="arrow", size="1/4 in", all_around=True, field_weld=True)
    (circle,) = by_class(root, "ws-all-around")
    (leader,) = by_class(root, "ws-leader")
    assert (float(circle.get("cx")), float(circle.get("cy"))) == (float(leader.get("x1")), float(leader.get("y1")))
    (flag,) = by_class(root, "ws-field-flag")
    staff = by_class(flag, "ws-flag-staff")[0]
    assert float(staff.get("x1")) == float(circle.get("cx")) and float(staff.get("y2")) < REF_Y


def test_the_arrow_leads_from_the_reference_line_to_the_joint_with_a_head():
    root = parse("US", size="1/4 in")
    (arrow,) = by_class(root, "ws-arrow")
    assert by_class(arrow, "ws-leader") and by_class(arrow, "ws-arrowhead")
    (ref,) = by_class(root, "ws-ref-line")
    (leader,) = by_class(root, "ws-leader")
    assert leader.get("x1") == ref.get("x1") and float(leader.get("y2")) > REF_Y


def test_the_tail_carries_the_reference():
    root = parse("US", size="1/4 in", tail="BSW-101")
    assert texts(root, "ws-tail-text") == ["BSW-101"]
    assert "reference BSW-101" in root.find("s:title", NS).text


def test_iso_arrow_side_sits_on_the_solid_line_with_the_dashed_line_below():
    root = parse("SI", sides="arrow", size="6 mm", length="300 mm")
    assert root.get("data-convention") == ISO
    (ident,) = by_class(root, "ws-id-line")
    assert ident.get("stroke-dasharray") and float(ident.get("y1")) > REF_Y
    (fillet,) = by_class(root, "ws-fillet")
    points = fillet_points(fillet)
    assert max(y for _, y in points) == REF_Y and min(y for _, y in points) < REF_Y  # standing on the solid line
    assert texts(root, "ws-size") == ["z6"] and texts(root, "ws-length") == ["300"]


def test_iso_other_side_hangs_from_the_dashed_line():
    root = parse("SI", sides="other", size="8 mm", length="50 mm", pitch="150 mm", segments=4)
    (ident,) = by_class(root, "ws-id-line")
    (fillet,) = by_class(root, "ws-fillet")
    assert min(y for _, y in fillet_points(fillet)) == float(ident.get("y1"))
    assert texts(root, "ws-length") == ["4 x 50 (100)"]  # n x l (e), e = pitch - l: from memory


def test_iso_both_sides_needs_no_identification_line():
    root = parse("SI", sides="both", size="5 mm", length="100 mm")
    assert not by_class(root, "ws-id-line") and len(by_class(root, "ws-fillet")) == 2


def test_a_groove_joint_says_so_instead_of_a_fillet():
    root = parse("US", size="1/4 in", joint="groove")
    assert not by_class(root, "ws-fillet") and "see drawing" in texts(root, "ws-note")[0]


def test_text_is_escaped():
    root = parse("US", size="1/4 in", tail="<A&B>")
    assert texts(root, "ws-tail-text") == ["<A&B>"]


@pytest.mark.parametrize("kwargs, message", [
    ({"system": "metric", "size": "1/4 in"}, "Unit system"),
    ({"system": "US", "size": "1/4 in", "sides": "left"}, "Sides"),
    ({"system": "US", "size": None}, "leg size"),
    ({"system": "US", "size": "1/4 in", "pitch": "12 in"}, "segment length"),
    ({"system": "US", "size": "1/4 in", "length": "12 in", "pitch": "6 in"}, "pitch"),
    ({"system": "US", "size": "banana"}, "."),
])
def test_bad_weld_data_raises_a_value_error_with_a_reason(kwargs, message):
    system = kwargs.pop("system")
    with pytest.raises(ValueError, match=message):
        symbol_for(system, **kwargs)
