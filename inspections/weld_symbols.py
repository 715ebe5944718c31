"""Draw a fillet weld symbol as SVG from a weld's data. Plain Python, no Django.

Two drawing standards, chosen by the job's code (not its unit system): an AWS D1.1 job draws AWS A2.4 in either
unit system; an ISO 5817 job draws ISO 2553 (system A). symbol_for(system, standard=...) takes the standard; left
out, it falls back to the old rule (US: AWS A2.4, SI: ISO 2553) so existing callers draw as before. The job's unit
system decides only how the numbers read (fractions of an inch, or millimetres), never the layout.

- AWS A2.4 (Standard Symbols for Welding, Brazing, and Nondestructive Examination). One reference line; the
  arrow-side weld is drawn BELOW the line, the other-side weld ABOVE it. Size to the left of the symbol (a fraction
  of an inch with no inch mark, "1/4", or millimetres with no unit, "6"; unequal legs "1/4 x 3/8"), length to the
  right ("12"), intermittent welds as length-pitch ("4-12", pitch centre to centre).
- ISO 2553:2019 system A. A dual reference line: a solid reference line and a dashed identification line below
  it. A weld on the arrow side is drawn on the solid line, one on the other side on the dashed line; a weld on both
  sides needs no dashed line. The size carries its meaning as a prefix, as the drawing gives it: "a5" for a 5 mm
  throat, "z6" for a 6 mm leg; unequal legs "z6 × 8". Intermittent welds as "l (e)": segment length and, in
  brackets, the gap between segments (e = pitch - l); the number of segments "n × " goes first when it is known.
  Dimensions use the multiplication sign ×, not the letter x.

Both: the fillet is a right triangle with its perpendicular leg on the LEFT; the all-around circle sits at the
junction of arrow and reference line; the field-weld flag rises from the same junction (from the top of the
all-around circle when there is one, so the staff never crosses it) and points toward the tail; a tail (a fork at
the far end) is drawn only when it carries a reference such as the WPS number (AWS A2.4 and ISO 2553 both omit an
empty tail).

From memory, not checked against the documents: the ISO "l (e)" form and the "n ×" prefix, placing the dashed
line below the solid one (ISO 2553 allows either; below is what we draw), the unequal-leg form "z6 × 8", the AWS
field-flag direction (A2.4 allows either; toward the tail is what we draw), and that a symbol whose drawing gives
both the throat and the leg prints the throat (a), the ISO design dimension.

Every element carries a class (ws-ref-line, ws-id-line, ws-arrow, ws-fillet ws-arrow-side/ws-other-side,
ws-size, ws-length, ws-all-around, ws-field-flag, ws-tail) so tests and stylesheets can find it; the SVG
uses presentation attributes only (no style attribute: the pages' CSP forbids inline styles).
"""

from __future__ import annotations

from dataclasses import dataclass
from xml.sax.saxutils import escape, quoteattr

from core.units import Length, format_length, parse_length

AWS = "AWS A2.4"
ISO = "ISO 2553:2019"
STANDARDS = (AWS, ISO)
SIDES = ("arrow", "other", "both")
TIMES = "\u00d7"  # ×, the multiplication sign of ISO dimensions

# Geometry (SVG user units; the symbol is 270 x 60 and scales with its width attribute).
WIDTH, HEIGHT = 270, 60  # drawn from y = TOP down
TOP = 12
REF_Y = 40  # the reference (solid) line
ID_GAP = 6  # ISO: the dashed identification line lies this far below the solid line
JUNCTION_X = 46  # where the arrow meets the reference line
REF_END_X = 206  # far end of the reference line, where the tail starts
ALL_AROUND_R = 5.5  # radius of the all-around circle at the junction
ARROW_TIP = (16, 68)  # the arrowhead touches the joint here
SYMBOL_X = 118  # left (perpendicular) leg of the fillet triangle
LEG = 13  # triangle leg length
FONT = "DejaVu Sans, Arial, sans-serif"
INK = "#111"


@dataclass(frozen=True)
class WeldSymbol:
    """What the symbol shows, already in words: dimensions as the convention prints them."""

    convention: str  # AWS or ISO
    sides: str  # "arrow", "other", "both"
    size: str  # "1/4", "z6"
    length: str = ""  # "12", "4-12", "50 (100)"
    all_around: bool = False
    field_weld: bool = False
    tail: str = ""
    joint: str = "fillet"

    def description(self) -> str:
        where = {"arrow": "arrow side", "other": "other side", "both": "both sides"}[self.sides]
        parts = [f"{self.joint.capitalize()} weld, {where}", f"size {self.size}"]
        if self.length:
            parts.append(f"length {self.length}")
        if self.all_around:
            parts.append("all around")
        if self.field_weld:
            parts.append("field weld")
        if self.tail:
            parts.append(f"reference {self.tail}")
        return f"{', '.join(parts)} ({self.convention})"


def _as_length(value) -> Length | None:
    if value is None or value == "":
        return None
    if isinstance(value, Length):
        return value
    return parse_length(str(value))


def _number(length: Length, system: str) -> str:
    """A dimension as symbols print it: 1/4 (no inch mark) on US jobs, 6 (no unit) on SI jobs."""
    text = format_length(length, system)
    return text[:-1] if system == "US" else text[: -len(" mm")]


def drawing_standard(code) -> str:
    """The drawing standard of a job's code: AWS A2.4 for an AWS D1.1 job, ISO 2553 for an ISO 5817 job.

    code: a criteria set key ("aws-d1.1-2020-static", "iso-5817-2014-C"), a code name ("AWS D1.1:2020",
    "ISO 5817:2014"), a drawing standard (AWS, ISO, "AWS", "ISO"), or a criteria set or its stored dict."""
    if isinstance(code, str):
        word = code.strip().upper()
        if word in (AWS.upper(), "AWS") or word.startswith("AWS"):
            return AWS
        if word in (ISO.upper(), "ISO") or word.startswith("ISO"):
            return ISO
    standard = getattr(code, "standard", None) or (code.get("standard") if isinstance(code, dict) else None)
    if isinstance(standard, str) and standard != code:
        return drawing_standard(standard)
    raise ValueError(f"The drawing standard follows the job's code: AWS D1.1 jobs draw {AWS}, ISO 5817 jobs draw "
                     f"{ISO}; {code!r} is neither.")


def symbol_for(system: str, *, standard=None, sides="arrow", size=None, size2=None, throat=None, length=None,
               pitch=None, segments=None, all_around=False, field_weld=False, tail="", joint="fillet") -> WeldSymbol:
    """The symbol of a weld, drawn to `standard` (AWS A2.4 or ISO 2553: see drawing_standard) with numbers in the
    job's unit system ("US": inches, "SI": millimetres). standard=None keeps the old rule: US draws AWS A2.4, SI
    draws ISO 2553.

    size (and size2 for unequal legs) is the leg z; throat the throat a, where the drawing gives it (ISO prints
    "a" then; AWS A2.4 gives the leg, so it needs size). Lengths are core.units.Length values or strings with a
    unit ("1/4 in", "6 mm"). ValueError names what is wrong (an unknown side, system or standard, a pitch not
    longer than the segment).
    """
    if system not in ("US", "SI"):
        raise ValueError(f"Unit system must be 'US' or 'SI', not {system!r}.")
    convention = (AWS if system == "US" else ISO) if standard is None else drawing_standard(standard)
    if sides not in SIDES:
        raise ValueError(f"Sides must be one of {', '.join(SIDES)}, not {sides!r}.")
    size, size2, throat, length, pitch = (_as_length(v) for v in (size, size2, throat, length, pitch))
    if size is None and (convention == AWS or throat is None):
        raise ValueError("A fillet weld symbol needs the leg size" + (" (AWS A2.4 gives the leg, not the throat)."
                                                                      if convention == AWS else
                                                                      " or the throat a."))
    if pitch is not None and length is None:
        raise ValueError("An intermittent weld needs its segment length as well as its pitch.")
    if pitch is not None and pitch.mm <= length.mm:
        raise ValueError("The pitch (centre to centre of segments) must be longer than the segment length.")
    unequal = size2 is not None and size is not None and size2 != size
    if convention == AWS:
        size_text = _number(size, system) + (f" x {_number(size2, system)}" if unequal else "")
        length_text = ""
        if length is not None:
            length_text = _number(length, system) + (f"-{_number(pitch, system)}" if pitch else "")
        return WeldSymbol(AWS, sides, size_text, length_text, bool(all_around), bool(field_weld), tail or "", joint)
    if throat is not None:
        size_text = "a" + _number(throat, system)
    else:
        size_text = "z" + _number(size, system) + (f" {TIMES} {_number(size2, system)}" if unequal else "")
    length_text = ""
    if length is not None:
        length_text = _number(length, system)
        if pitch is not None:
            gap = Length(pitch.mm - length.mm)
            length_text = f"{length_text} ({_number(gap, system)})"
            if segments:
                length_text = f"{int(segments)} {TIMES} {length_text}"
    return WeldSymbol(ISO, sides, size_text, length_text, bool(all_around), bool(field_weld), tail or "", joint)


# --- drawing ---------------------------------------------------------------------------------------------------

def _line(x1, y1, x2, y2, cls, dashed=False, width="1.4"):
    dash = ' stroke-dasharray="5 3"' if dashed else ""
    return (f'<line class="{cls}" x1="{x1}" y1="{y1}" x2="{x2}" y2="{y2}" stroke="{INK}" '
            f'stroke-width="{width}"{dash}/>')


def _text(x, y, text, cls, anchor="start", size=11):
    return (f'<text class="{cls}" x="{x}" y="{y}" font-family="{FONT}" font-size="{size}" fill="{INK}" '
            f'text-anchor="{anchor}">{escape(text)}</text>')


def _fillet(base_y, up: bool, side: str) -> str:
    """Right triangle standing on base_y, perpendicular leg on the left, apex up (or down)."""
    apex_y = base_y - LEG if up else base_y + LEG
    points = f"{SYMBOL_X},{base_y} {SYMBOL_X},{apex_y} {SYMBOL_X + LEG},{base_y}"
    return (f'<polygon class="ws-fillet ws-{side}-side" points="{points}" fill="none" stroke="{INK}" '
            f'stroke-width="1.4" stroke-linejoin="miter"/>')


def _dimensions(symbol: WeldSymbol, base_y, up: bool, side: str) -> list[str]:
    # Text sits beside the triangle: baseline just clear of the line above it, or below it.
    y = base_y - 3 if up else base_y + 11
    parts = [_text(SYMBOL_X - 4, y, symbol.size, f"ws-size ws-{side}-side", anchor="end")]
    if symbol.length:
        parts.append(_text(SYMBOL_X + LEG + 4, y, symbol.length, f"ws-length ws-{side}-side"))
    return parts


def _arrow() -> list[str]:
    tip_x, tip_y = ARROW_TIP
    head = f"{tip_x},{tip_y} {tip_x + 4.2},{tip_y - 10.6} {tip_x + 10.4},{tip_y - 5.5}"
    return [
        '<g class="ws-arrow">',
        _line(JUNCTION_X, REF_Y, tip_x + 5, tip_y - 5, "ws-leader"),
        f'<polygon class="ws-arrowhead" points="{head}" fill="{INK}" stroke="{INK}" stroke-width="0.6"/>',
        "</g>",
    ]


FLAG_TOP = REF_Y - 25


def _staff_foot(symbol: WeldSymbol) -> float:
    """Where the flag staff starts: the junction, or the top of the all-around circle (the staff never crosses it)."""
    return REF_Y - ALL_AROUND_R if symbol.all_around else REF_Y


def _field_flag(symbol: WeldSymbol) -> str:
    top = FLAG_TOP
    pennant = f"{JUNCTION_X},{top} {JUNCTION_X + 14},{top + 5} {JUNCTION_X},{top + 10}"
    return ('<g class="ws-field-flag">'
            + _line(JUNCTION_X, _staff_foot(symbol), JUNCTION_X, top, "ws-flag-staff")
            + f'<polygon class="ws-flag" points="{pennant}" fill="{INK}" stroke="{INK}" stroke-width="0.6"/>'
            + "</g>")


def _tail(symbol: WeldSymbol) -> list[str]:
    """The tail fork with its reference; nothing when there is no reference (no empty fork)."""
    if not symbol.tail:
        return []
    return ['<g class="ws-tail">',
            _line(REF_END_X, REF_Y, REF_END_X + 9, REF_Y - 9, "ws-tail-line"),
            _line(REF_END_X, REF_Y, REF_END_X + 9, REF_Y + 9, "ws-tail-line"),
            _text(REF_END_X + 11, REF_Y + 3.5, symbol.tail, "ws-tail-text", size=8),
            "</g>"]


def svg(symbol: WeldSymbol, width: str | None = None, *, title: bool = True) -> str:
    """The symbol as a standalone <svg> element (inline in HTML, or a file of its own).

    title=False leaves out the <title> child (the aria-label still names the symbol): a PDF embeds the symbol
    as an image, where a title is never shown, and WeasyPrint spends as long on it as on a drawn text.
    """
    label = symbol.description()
    size_attrs = f' width="{width}"' if width else ""
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="weld-symbol" viewBox="0 {TOP} {WIDTH} {HEIGHT}"'
        f'{size_attrs} role="img" aria-label={quoteattr(label)} data-convention={quoteattr(symbol.convention)}>',
        f"<title>{escape(label)}</title>" if title else "",
        _line(JUNCTION_X, REF_Y, REF_END_X, REF_Y, "ws-ref-line"),
    ]
    iso = symbol.convention == ISO
    if iso and symbol.sides != "both":
        # ISO 2553 system A: the identification line says which side the solid line stands for.
        out.append(_line(JUNCTION_X + 4, REF_Y + ID_GAP, REF_END_X - 4, REF_Y + ID_GAP, "ws-id-line", dashed=True,
                         width="1.1"))
    out += _arrow()
    if symbol.joint == "fillet":
        for side, base_y, up in _placements(symbol):
            out.append(_fillet(base_y, up, side))
            out += _dimensions(symbol, base_y, up, side)
    else:
        # Only fillet welds are drawn; other joints say so in words where the symbol would be.
        out.append(_text(SYMBOL_X, REF_Y - 4, f"{symbol.joint}: see drawing", "ws-note", size=9))
    if symbol.all_around:
        out.append(_all_around())
    if symbol.field_weld:
        out.append(_field_flag(symbol))
    out += _tail(symbol)
    out.append("</svg>")
    return "".join(out)


def _all_around() -> str:
    return (f'<circle class="ws-all-around" cx="{JUNCTION_X}" cy="{REF_Y}" r="{ALL_AROUND_R}" fill="none" '
            f'stroke="{INK}" stroke-width="1.4"/>')


def _placements(symbol: WeldSymbol) -> list[tuple[str, float, bool]]:
    """(side, base line, triangle points up?) for each side the weld is on."""
    if symbol.convention == ISO:
        return {"arrow": [("arrow", REF_Y, True)],
                "other": [("other", REF_Y + ID_GAP, False)],
                "both": [("arrow", REF_Y, True), ("other", REF_Y, False)]}[symbol.sides]
    # AWS A2.4: arrow side below the reference line, other side above
    return {"arrow": [("arrow", REF_Y, False)],
            "other": [("other", REF_Y, True)],
            "both": [("arrow", REF_Y, False), ("other", REF_Y, True)]}[symbol.sides]


def print_svg(symbol: WeldSymbol, width: str | None = None) -> str:
    """The same drawing in as few SVG elements as it takes, for a PDF.

    WeasyPrint draws an SVG image node by node on every occurrence (it caches the parsed file, not the drawing),
    so a traveler of 20 welds drew some 250 nodes. Here every stroked line (reference line, arrow leader, fillet
    triangles, tail fork, field-flag staff) is ONE path, the two filled heads (arrowhead, pennant) a second one;
    the ISO dashed identification line, the all-around circle and the texts stay elements of their own. Same
    geometry and classes as svg(): the stroked path's subpaths are, in order, the reference line, the leader,
    the fillet triangle(s) (arrow side first), the tail fork (only with a reference, whose text is printed too)
    and the flag staff. No <title>.
    """
    f = _fmt
    tip_x, tip_y = ARROW_TIP
    strokes = [f"M{f(JUNCTION_X)} {f(REF_Y)}H{f(REF_END_X)}",  # reference line
               f"M{f(JUNCTION_X)} {f(REF_Y)}L{f(tip_x + 5)} {f(tip_y - 5)}"]  # arrow leader
    fills = [f"M{f(tip_x)} {f(tip_y)}L{f(tip_x + 4.2)} {f(tip_y - 10.6)}L{f(tip_x + 10.4)} {f(tip_y - 5.5)}Z"]
    texts = []
    classes = ["ws-ref-line", "ws-arrow"]
    if symbol.joint == "fillet":
        for side, base_y, up in _placements(symbol):
            apex_y = base_y - LEG if up else base_y + LEG
            strokes.append(f"M{f(SYMBOL_X)} {f(base_y)}V{f(apex_y)}L{f(SYMBOL_X + LEG)} {f(base_y)}Z")
            classes.append(f"ws-fillet-{side}-side")
            texts += _dimensions(symbol, base_y, up, side)
    else:
        texts.append(_text(SYMBOL_X, REF_Y - 4, f"{symbol.joint}: see drawing", "ws-note", size=9))
    if symbol.tail:
        strokes.append(f"M{f(REF_END_X + 9)} {f(REF_Y - 9)}L{f(REF_END_X)} {f(REF_Y)}L{f(REF_END_X + 9)} "
                       f"{f(REF_Y + 9)}")
        classes.append("ws-tail")
        texts.append(_text(REF_END_X + 11, REF_Y + 3.5, symbol.tail, "ws-tail-text", size=8))
    if symbol.field_weld:
        top = FLAG_TOP
        strokes.append(f"M{f(JUNCTION_X)} {f(_staff_foot(symbol))}V{f(top)}")
        fills.append(f"M{f(JUNCTION_X)} {f(top)}L{f(JUNCTION_X + 14)} {f(top + 5)}L{f(JUNCTION_X)} {f(top + 10)}Z")
        classes.append("ws-field-flag")
    size_attrs = f' width="{width}"' if width else ""
    out = [
        f'<svg xmlns="http://www.w3.org/2000/svg" class="weld-symbol" viewBox="0 {TOP} {WIDTH} {HEIGHT}"'
        f'{size_attrs} role="img" aria-label={quoteattr(symbol.description())} '
        f'data-convention={quoteattr(symbol.convention)} data-sides="{symbol.sides}">',
        f'<path class="ws-strokes {" ".join(classes)}" d="{"".join(strokes)}" fill="none" stroke="{INK}" '
        f'stroke-width="1.4"/>',
        f'<path class="ws-heads" d="{"".join(fills)}" fill="{INK}" stroke="{INK}" stroke-width="0.6"/>',
    ]
    if symbol.convention == ISO and symbol.sides != "both":
        out.append(_line(JUNCTION_X + 4, REF_Y + ID_GAP, REF_END_X - 4, REF_Y + ID_GAP, "ws-id-line", dashed=True,
                         width="1.1"))
    if symbol.all_around:
        out.append(_all_around())
    out += texts
    out.append("</svg>")
    return "".join(out)


def _fmt(value: float) -> str:
    return f"{value:g}"


def weld_symbol_svg(system: str, width: str | None = None, *, title: bool = True, lean: bool = False, standard=None,
                    **weld) -> str:
    """symbol_for(system, standard=standard, **weld) drawn: the one call pages and PDFs make (lean=True: print_svg,
    for PDFs). Pass the job's code as standard (a criteria key will do); left out, US draws AWS, SI draws ISO."""
    symbol = symbol_for(system, standard=standard, **weld)
    return print_svg(symbol, width=width) if lean else svg(symbol, width=width, title=title)


__all__ = ["AWS", "ISO", "STANDARDS", "WeldSymbol", "drawing_standard", "print_svg", "svg", "symbol_for",
           "weld_symbol_svg"]
