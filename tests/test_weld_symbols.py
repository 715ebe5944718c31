"""Weld symbols drawn as SVG: AWS A2.4 on AWS D1.1 jobs, ISO 2553:2019 system A on ISO 5817 jobs, whatever the
unit system (structure, not pixels); without a standard, US draws AWS and SI draws ISO as before.

AWS A2.4: arrow-side weld below the reference line, other side above; size left of the symbol, length (and
pitch, as length-pitch) right of it; all-around circle and field-weld flag at the arrow/reference junction.
ISO 2553:2019 system A: solid reference line plus dashed identification line; arrow-side weld on the solid line,
other side on the dashed line; no dashed line for a weld on both sides; "z" prefix for the leg, "a" for the throat,
"×" in dimensions (the l (e) form for intermittent welds and "n ×" are from memory). Both omit an empty tail.
"""

import re
import xml.etree.ElementTree as ET

import pytest

from inspections.criteria import get_criteria
from inspections.weld_symbols import ALL_AROUND_R, AWS, ISO, REF_Y, drawing_standard, symbol_for, weld_symbol_svg

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
    # the staff stands on the circle: no point of it lies inside the circle
    assert max(float(staff.get("y1")), float(staff.get("y2"))) <= float(circle.get("cy")) - float(circle.get("r"))


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
    assert texts(root, "ws-length") == ["4 \u00d7 50 (100)"]  # n × l (e), e = pitch - l: from memory


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


# --- the lean drawing for PDFs (print_svg): same meaning, fewer elements -----------------------------------------

def lean(system, **weld):
    return ET.fromstring(weld_symbol_svg(system, lean=True, **weld))


def subpaths(root):
    """The stroked path's subpaths as lists of absolute points (M, L, H, V, Z commands only)."""
    (path,) = by_class(root, "ws-strokes")
    out = []
    for command, args in re.findall(r"([MLHVZ])([^MLHVZ]*)", path.get("d")):
        numbers = [float(n) for n in args.replace(",", " ").split()]
        if command == "M":
            out.append([tuple(numbers)])
        elif command == "L":
            out[-1].append(tuple(numbers))
        elif command == "H":
            out[-1].append((numbers[0], out[-1][-1][1]))
        elif command == "V":
            out[-1].append((out[-1][-1][0], numbers[0]))
    return out


def triangles(root):
    return [points for points in subpaths(root) if len(points) == 3 and points[0][0] == points[1][0]]


def test_the_lean_symbol_draws_every_line_as_one_path_and_both_heads_as_another():
    root = lean("US", sides="arrow", size="1/4 in", length="12 in", field_weld=True)
    shapes = [e for e in root if e.tag != "{http://www.w3.org/2000/svg}text"]
    assert [e.tag.split("}")[1] for e in shapes] == ["path", "path"]
    assert root.find("s:title", NS) is None and not by_class(root, "ws-tail-text")
    reference, leader = subpaths(root)[:2]
    assert reference == [(46, REF_Y), (206, REF_Y)]  # the reference line, at REF_Y
    assert leader[0] == reference[0] and leader[1][1] > REF_Y  # the arrow leaves the line's left end downward


@pytest.mark.parametrize("system, sides, below", [("US", "arrow", True), ("US", "other", False),
                                                  ("SI", "arrow", False)])
def test_the_lean_symbol_puts_the_fillet_on_the_side_the_convention_says(system, sides, below):
    root = lean(system, sides=sides, size="1/4 in" if system == "US" else "6 mm", length="6 in")
    assert root.get("data-sides") == sides and root.get("data-convention") == (AWS if system == "US" else ISO)
    (triangle,) = triangles(root)
    ys = [y for _, y in triangle]
    assert (max(ys) > REF_Y) == below and REF_Y in ys  # standing on (or hanging from) the reference line
    xs = sorted(x for x, _ in triangle)
    assert xs[0] == xs[1] < xs[2]  # perpendicular leg on the left
    (size,) = by_class(root, "ws-size")
    (length,) = by_class(root, "ws-length")
    assert f"ws-{sides}-side" in size.get("class")
    assert float(size.get("x")) < xs[0] < xs[2] < float(length.get("x"))  # size left, length right
    assert not by_class(root, "ws-id-line") if system == "US" else by_class(root, "ws-id-line")


def test_the_lean_iso_symbol_keeps_the_dashed_line_and_hangs_the_other_side_from_it():
    root = lean("SI", sides="other", size="8 mm", length="50 mm", pitch="150 mm", segments=4)
    (ident,) = by_class(root, "ws-id-line")
    assert ident.get("stroke-dasharray") and float(ident.get("y1")) > REF_Y
    (triangle,) = triangles(root)
    assert min(y for _, y in triangle) == float(ident.get("y1"))
    assert texts(root, "ws-size") == ["z8"] and texts(root, "ws-length") == ["4 \u00d7 50 (100)"]
    assert not by_class(lean("SI", sides="both", size="5 mm"), "ws-id-line")


def test_the_lean_symbol_prints_both_sides_intermittent_lengths_and_unequal_legs():
    root = lean("US", sides="both", size="1/4 in", size2="3/8 in", length="4 in", pitch="12 in")
    assert len(triangles(root)) == 2
    assert texts(root, "ws-size") == ["1/4 x 3/8"] * 2 and texts(root, "ws-length") == ["4-12"] * 2


def test_the_lean_symbol_keeps_all_around_and_field_flag_at_the_junction():
    root = lean("US", sides="arrow", size="1/4 in", all_around=True, field_weld=True)
    (circle,) = by_class(root, "ws-all-around")
    assert (float(circle.get("cx")), float(circle.get("cy"))) == subpaths(root)[1][0]  # where the leader starts
    staff = subpaths(root)[-1]
    assert "ws-field-flag" in by_class(root, "ws-strokes")[0].get("class")
    # the staff rises from the top of the circle, not through it
    assert staff[0] == (float(circle.get("cx")), REF_Y - float(circle.get("r"))) and staff[1][1] < staff[0][1]
    (heads,) = by_class(root, "ws-heads")
    assert heads.get("d").count("Z") == 2  # arrowhead and pennant
    plain = lean("US", sides="arrow", size="1/4 in")
    assert not by_class(plain, "ws-all-around") and "ws-field-flag" not in by_class(plain, "ws-strokes")[0].get("class")
    assert by_class(plain, "ws-heads")[0].get("d").count("Z") == 1


def test_the_lean_symbol_says_so_for_a_groove_and_escapes_text():
    root = lean("US", size="1/4 in", joint="groove")
    assert not triangles(root) and "see drawing" in texts(root, "ws-note")[0]
    assert "&lt;A&amp;B&gt;" in weld_symbol_svg("US", lean=True, size="1/4 in", joint="<A&B>")


# --- the drawing standard follows the job's code, not its unit system ------------------------------------------

def test_an_aws_job_in_millimetres_draws_aws_a2_4_with_millimetre_numbers():
    root = parse("SI", standard="aws-d1.1-2020-static", sides="arrow", size="6 mm", size2="8 mm", length="50 mm",
                 pitch="150 mm")
    assert root.get("data-convention") == AWS and not by_class(root, "ws-id-line")
    (fillet,) = by_class(root, "ws-fillet")
    assert max(y for _, y in fillet_points(fillet)) > REF_Y  # AWS: arrow side below the line
    assert texts(root, "ws-size") == ["6 x 8"] and texts(root, "ws-length") == ["50-150"]


def test_an_iso_job_in_inches_draws_iso_2553_with_inch_numbers():
    root = parse("US", standard="iso-5817-2014-C", sides="arrow", size="1/4 in", length="12 in")
    assert root.get("data-convention") == ISO and by_class(root, "ws-id-line")
    (fillet,) = by_class(root, "ws-fillet")
    assert max(y for _, y in fillet_points(fillet)) == REF_Y  # ISO: arrow side on the solid line
    assert texts(root, "ws-size") == ["z1/4"] and texts(root, "ws-length") == ["12"]


@pytest.mark.parametrize("code, standard", [
    ("aws-d1.1-2020-cyclic", AWS), ("AWS D1.1:2020", AWS), ("AWS", AWS), (AWS, AWS), ("iso-5817-2014-B", ISO),
    ("ISO 5817:2014", ISO), (ISO, ISO), (get_criteria("iso-5817-2014-D"), ISO),
    (get_criteria("aws-d1.1-2020-static").to_dict(), AWS),
])
def test_the_drawing_standard_of_a_code(code, standard):
    assert drawing_standard(code) == standard


@pytest.mark.parametrize("code", ["EN 1090", "", 3, {"standard": "CSA W59"}])
def test_a_code_with_no_drawing_standard_is_refused(code):
    with pytest.raises(ValueError, match="AWS D1.1 jobs draw"):
        symbol_for("US", standard=code, size="1/4 in")
    with pytest.raises(ValueError, match="AWS D1.1 jobs draw"):
        drawing_standard(code)


def test_without_a_standard_the_unit_system_still_chooses_as_before():
    assert parse("US", size="1/4 in").get("data-convention") == AWS
    assert parse("SI", size="6 mm").get("data-convention") == ISO


def test_iso_prints_a_for_a_throat_and_z_for_a_leg_as_the_drawing_gives_it():
    assert texts(parse("SI", standard="ISO", throat="5 mm", length="100 mm"), "ws-size") == ["a5"]
    assert texts(parse("SI", standard="ISO", size="7 mm"), "ws-size") == ["z7"]
    assert texts(parse("SI", standard="ISO", size="7 mm", throat="5 mm"), "ws-size") == ["a5"]  # the design a


def test_iso_dimensions_use_the_multiplication_sign():
    root = parse("SI", standard="ISO", size="6 mm", size2="8 mm", length="50 mm", pitch="150 mm", segments=3)
    assert texts(root, "ws-size") == ["z6 \u00d7 8"] and texts(root, "ws-length") == ["3 \u00d7 50 (100)"]
    assert "x" not in "".join(texts(root, "ws-size") + texts(root, "ws-length"))


def test_aws_needs_the_leg():
    with pytest.raises(ValueError, match="AWS A2.4 gives the leg"):
        symbol_for("US", standard="AWS", throat="0.18 in")
    with pytest.raises(ValueError, match="leg size or the throat"):
        symbol_for("SI", standard="ISO")


@pytest.mark.parametrize("lean_drawing", [False, True])
def test_there_is_no_empty_tail_fork(lean_drawing):
    bare = ET.fromstring(weld_symbol_svg("US", lean=lean_drawing, size="1/4 in"))
    assert not by_class(bare, "ws-tail") and not by_class(bare, "ws-tail-text")
    if lean_drawing:
        assert len(subpaths(bare)) == 3  # reference line, leader, fillet: no fork
    with_reference = ET.fromstring(weld_symbol_svg("US", lean=lean_drawing, size="1/4 in", tail="WPS-7"))
    assert by_class(with_reference, "ws-tail") and texts(with_reference, "ws-tail-text") == ["WPS-7"]


@pytest.mark.parametrize("lean_drawing", [False, True])
def test_the_flag_staff_starts_at_the_junction_without_an_all_around_circle(lean_drawing):
    root = ET.fromstring(weld_symbol_svg("US", lean=lean_drawing, size="1/4 in", field_weld=True))
    if lean_drawing:
        assert subpaths(root)[-1][0][1] == REF_Y
    else:
        (staff,) = by_class(root, "ws-flag-staff")
        assert float(staff.get("y1")) == REF_Y
    with_circle = ET.fromstring(weld_symbol_svg("US", lean=lean_drawing, size="1/4 in", field_weld=True,
                                                all_around=True))
    foot = (subpaths(with_circle)[-1][0][1] if lean_drawing
            else float(by_class(with_circle, "ws-flag-staff")[0].get("y1")))
    assert foot == REF_Y - ALL_AROUND_R
