"""Trade notation for text the engines write in plain ASCII: what pages and PDFs print.

Plain Python, no Django. The engines keep their calculation trails and messages in ASCII ('phi Rn', 'Rn / Omega',
'in2', 'h <= 0.3 mm + 0.1 a', '0.707 x z'), which reads in a log or a test; a person reads the trade's symbols, on
the page as on paper: 'φRn', 'Rn / Ω', 'in²', 'h ≤ 0.3 mm + 0.1 a', '0.707 × z'. Every page and PDF prints such
text through trade(), so the two never differ.
"""

from __future__ import annotations

import re

_RULES = (
    (re.compile(r"\bphi\s+R"), "\u03c6R"),  # phi Rn -> φRn
    # a symbol stands alone: before a space, '=', ',', ')' or the end, never inside a word such as phi-free
    (re.compile(r"\bphi(?=[\s=,)]|$)"), "\u03c6"),
    (re.compile(r"\bOmega(?=[\s=,)]|$)"), "\u03a9"),
    (re.compile(r"\bbeta(?=[\s=,)]|$)"), "\u03b2"),
    (re.compile(r"\balpha(?=[\s=,)]|$)"), "\u03b1"),
    (re.compile(r"\b(in|mm|ft)(?:\^2|2)\b"), "\\1\u00b2"),
    (re.compile(r"<="), "\u2264"),
    (re.compile(r">="), "\u2265"),
    (re.compile(r"\bsqrt\("), "\u221a("),
    (re.compile(r"(?<=[a-zA-Z0-9)])\^2"), "\u00b2"),
    (re.compile(r"(?<=[0-9])\s?deg\b"), "\u00b0"),
    (re.compile(r"(?<=[0-9a-zA-Z)\"'\u00b2])\s+x\s+(?=[0-9a-zA-Z(.])"), " \u00d7 "),  # 0.707 x z -> 0.707 × z
)


def trade(text) -> str:
    """The text with the trade's symbols for the ASCII the engines write (None and '' stay empty)."""
    if text is None:
        return ""
    text = str(text)
    for pattern, replacement in _RULES:
        text = pattern.sub(replacement, text)
    return text


__all__ = ["trade"]
