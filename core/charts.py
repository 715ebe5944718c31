"""Charts drawn on the server as SVG text: plain Python, no Django, no script.

    line_chart(title, x_labels, series, ...)     lines over weeks (a percentage axis by default)
    bar_chart(title, bars, ..., cumulative=)     horizontal bars; a Pareto adds the cumulative share
    timeline(title, start, end, rows)            one row per name, spans and marks between two dates

Every chart scales to its container (viewBox, width 100 %), keeps text at least 12 px at a 768 px wide page, and
draws series with a dash pattern as well as a colour so a black-and-white print still tells them apart. Each SVG
carries role="img", a <title> and a <desc> that gives every figure in words (the page also prints the same figures
as a table, and as CSV).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date
from html import escape

WIDTH = 720
# Colour and dash per series, in order: told apart in colour and in a grey print.
STYLES = (("#2b3137", ""), ("#b3261e", "8 4"), ("#1f6f9f", "2 3"), ("#9a6b00", "12 3 3 3"), ("#2e7d4f", "4 4"),
          ("#6a3d9a", "1 2"))
GRID = "#d0cdc5"
FONT = 'font-family="system-ui, sans-serif" font-size="13"'


@dataclass(frozen=True)
class Series:
    name: str
    values: tuple  # one value (or None: no data) per x label


def _open(title: str, desc: str, height: int) -> list[str]:
    return [f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {WIDTH} {height}" width="100%" role="img" '
            f'class="lw-chart" preserveAspectRatio="xMinYMin meet" {FONT}>',
            f"<title>{escape(title)}</title>", f"<desc>{escape(desc)}</desc>"]


def _number(value, unit="") -> str:
    if value is None:
        return "no data"
    text = f"{value:.1f}".rstrip("0").rstrip(".") if isinstance(value, float) else str(value)
    return f"{text}{unit}"


def _empty(title: str, words: str = "No data for these filters.") -> str:
    parts = _open(title, words, 60)
    parts.append(f'<text x="10" y="35" fill="#5d636a">{escape(words)}</text></svg>')
    return "".join(parts)


def line_chart(title: str, x_labels, series, *, unit: str = "%", y_max: float | None = 100.0) -> str:
    """Lines over the x labels (weeks); a gap where a value is None. The y axis runs from 0 to y_max (or the
    largest value, rounded up)."""
    x_labels = list(x_labels)
    series = [s for s in series if any(v is not None for v in s.values)]
    if not x_labels or not series:
        return _empty(title)
    top = y_max or max(v for s in series for v in s.values if v is not None) or 1
    left, right, top_pad, plot_h = 52, 12, 14, 220
    legend_rows = (len(series) + 2) // 3
    height = top_pad + plot_h + 40 + legend_rows * 22
    width = WIDTH - left - right
    step = width / max(len(x_labels) - 1, 1)

    def x(i):
        return left + (i * step if len(x_labels) > 1 else width / 2)

    def y(v):
        return top_pad + plot_h - (min(v, top) / top) * plot_h

    desc = "; ".join(f"{s.name}: " + ", ".join(f"{label} {_number(v, unit)}" for label, v in zip(x_labels, s.values,
                                                                                                   strict=True))
                     for s in series)
    parts = _open(title, desc, height)
    for k in range(5):
        value = top * k / 4
        parts.append(f'<line x1="{left}" x2="{WIDTH - right}" y1="{y(value):.1f}" y2="{y(value):.1f}" '
                     f'stroke="{GRID}"/>')
        parts.append(f'<text x="{left - 6}" y="{y(value) + 4:.1f}" text-anchor="end">{_number(round(value, 1), unit)}'
                     "</text>")
    every = max(1, -(-len(x_labels) // 7))  # at most seven labels along the bottom, never overlapping
    for i, label in enumerate(x_labels):
        if i % every == 0:
            anchor = "end" if i == len(x_labels) - 1 and len(x_labels) > 1 else "middle"
            parts.append(f'<text x="{x(i):.1f}" y="{top_pad + plot_h + 18}" text-anchor="{anchor}">'
                         f"{escape(label)}</text>")
    for n, s in enumerate(series):
        colour, dash = STYLES[n % len(STYLES)]
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        run = []
        for i, v in enumerate(list(s.values) + [None]):
            if v is not None:
                run.append(f"{x(i):.1f},{y(v):.1f}")
                continue
            if len(run) > 1:
                parts.append(f'<polyline points="{" ".join(run)}" fill="none" stroke="{colour}" stroke-width="2.5"'
                             f"{dash_attr}/>")
            for point in run:
                px, py = point.split(",")
                parts.append(f'<circle cx="{px}" cy="{py}" r="3" fill="{colour}"/>')
            run = []
        lx = left + (n % 3) * (width / 3)
        ly = top_pad + plot_h + 40 + (n // 3) * 22
        parts.append(f'<line x1="{lx:.1f}" x2="{lx + 28:.1f}" y1="{ly - 4}" y2="{ly - 4}" stroke="{colour}" '
                     f'stroke-width="3"{dash_attr}/>')
        parts.append(f'<text x="{lx + 34:.1f}" y="{ly}">{escape(s.name[:28])}</text>')
    parts.append("</svg>")
    return "".join(parts)


def bar_chart(title: str, bars, *, unit: str = "", cumulative: bool = False, x_max: float | None = None) -> str:
    """Horizontal bars, one per (label, value), in the order given; cumulative=True (a Pareto: bars sorted largest
    first) writes each bar's running share of the total beside it."""
    bars = [(str(label), value) for label, value in bars]
    if not bars:
        return _empty(title)
    total = sum(v for _l, v in bars if v is not None) or 0
    top = x_max or max((v for _l, v in bars if v is not None), default=0) or 1
    left, right, row = 200, 190, 28
    height = 10 + row * len(bars) + 10
    width = WIDTH - left - right
    running = 0
    words = []
    parts = []
    for i, (label, value) in enumerate(bars):
        y = 10 + i * row
        parts.append(f'<text x="{left - 8}" y="{y + 18}" text-anchor="end">{escape(label[:26])}</text>')
        if value is None:
            parts.append(f'<text x="{left + 4}" y="{y + 18}" fill="#5d636a">no data</text>')
            words.append(f"{label} no data")
            continue
        length = width * min(value, top) / top
        parts.append(f'<rect x="{left}" y="{y + 4}" width="{length:.1f}" height="{row - 8}" fill="#2b3137"/>')
        text = _number(value, unit)
        if cumulative and total:
            running += value
            text += f" (cumulative {_number(round(100 * running / total, 1), '%')})"
        if left + length + 6 + 7.5 * len(text) <= WIDTH:  # beside the bar, or inside its end when it would not fit
            parts.append(f'<text x="{left + length + 6:.1f}" y="{y + 18}">{escape(text)}</text>')
        else:
            parts.append(f'<text x="{left + length - 6:.1f}" y="{y + 18}" text-anchor="end" fill="#fff">'
                         f"{escape(text)}</text>")
        words.append(f"{label} {text}")
    return "".join(_open(title, "; ".join(words), height) + parts + ["</svg>"])


@dataclass(frozen=True)
class TimelineRow:
    name: str
    spans: tuple  # (first day, last day) pairs: a filled band
    marks: tuple = ()  # single days: a tick
    note: str = ""  # said in the text alternative


def timeline(title: str, start: date, end: date, rows) -> str:
    """One row per name from `start` to `end`: filled spans (e.g. in continuity) and ticks (e.g. days welded)."""
    rows = list(rows)
    if not rows or end <= start:
        return _empty(title)
    left, right, row = 150, 12, 26
    height = 30 + row * len(rows) + 10
    width = WIDTH - left - right
    days = (end - start).days

    def x(day):
        return left + width * max(0, min((day - start).days, days)) / days

    parts = []
    month = date(start.year, start.month, 1)
    while month <= end:
        if month >= start:
            parts.append(f'<line x1="{x(month):.1f}" x2="{x(month):.1f}" y1="22" y2="{height - 10}" stroke="{GRID}"/>')
            if x(month) + 70 <= WIDTH:  # a month too near the end keeps its line, not its label
                parts.append(f'<text x="{x(month) + 3:.1f}" y="16">{month:%b %Y}</text>')
        month = date(month.year + month.month // 12, month.month % 12 + 1, 1)
    words = []
    for i, r in enumerate(rows):
        y = 30 + i * row
        parts.append(f'<text x="{left - 8}" y="{y + 16}" text-anchor="end">{escape(r.name[:20])}</text>')
        parts.append(f'<line x1="{left}" x2="{WIDTH - right}" y1="{y + 12}" y2="{y + 12}" stroke="{GRID}"/>')
        for first, last in r.spans:
            parts.append(f'<rect x="{x(first):.1f}" y="{y + 5}" width="{max(x(last) - x(first), 1.5):.1f}" '
                         f'height="14" fill="#9fc3b0" stroke="#2e7d4f"/>')
        for day in r.marks:
            parts.append(f'<line x1="{x(day):.1f}" x2="{x(day):.1f}" y1="{y + 2}" y2="{y + 22}" stroke="#2b3137" '
                         'stroke-width="1.5"/>')
        spans = ", ".join(f"{a.isoformat()} to {b.isoformat()}" for a, b in r.spans) or "none"
        words.append(f"{r.name}: in continuity {spans}; {len(r.marks)} days welded" + (f"; {r.note}" if r.note else ""))
    return "".join(_open(title, "; ".join(words), height) + parts + ["</svg>"])
