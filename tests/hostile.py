"""The one list of hostile values: what an attacker or a careless user types into any box of any form.

tests/test_hostile_forms.py posts them field by field into every form the URL configuration exposes, and the
parser tests draw from the same list. Add a value here when a new way to break a parser is found; every form
is then tried with it.
"""

HUGE_DIGITS = "9" * 22  # more digits than a Decimal context's 28 places can quantize with a column's decimals

NUMBERS = [
    "0", "00", "-0", "-1", "+1", "0.0", ".", "..", "1.2.3", "1,5", "1,000.5", "1 000",
    HUGE_DIGITS, "1" + "0" * 30, "9" * 40, "9" * 4400, "0." + "0" * 40 + "1", HUGE_DIGITS + " in",
    HUGE_DIGITS + " mm", HUGE_DIGITS + " in/min", HUGE_DIGITS + " kip", HUGE_DIGITS + " F", HUGE_DIGITS + "/1 in",
    "1/" + HUGE_DIGITS + " in", HUGE_DIGITS + "-1/2 in", "1e3", "1E400", "1e-400", "9e999999999", "1e3 mm",
    "NaN", "nan", "sNaN", "Infinity", "-Infinity", "inf", "NaN in", "Infinity mm",
    "1/0", "0/0", "1/0 in", "1//2", "1-1/0", "3/16 in in", "1'-", "99999999'-0\"",
    "2147483647", "2147483648", "4294967296", "9223372036854775807", "9223372036854775808",
    "-9223372036854775809", "18446744073709551616", "99999999999999999999",
]

UNICODE_DIGITS = ["²", "¹²", "³/₄", "٣", "١٢", "１２", "Ⅻ", "½", "¼ in", "𝟗", "۹۹"]

TEXT = [
    "", " ", "\t", "\n", "\r\n", "\x00", "a\x00b", "\x00" * 10, "\x1b[31m", "\x7f", "\u202e", "\u200b", "\ufeff",
    "e\u0301", "🔥", "a" * 10_000, "<script>alert(1)</script>", '"><img src=x onerror=alert(1)>',
    "javascript:alert(1)", "' OR 1=1 --", "'; DROP TABLE core_user; --", '" OR ""="', "=cmd|' /C calc'!A0",
    "@SUM(1+1)", "-2+3", "{{ 7|add:7 }}", "{% debug %}", "${7*7}", "%s%s%s%n", "../../etc/passwd",
    "..\\..\\windows\\win.ini", "%00", "%2e%2e%2f", "true", "false", "None", "null", "[]", "{}", "0x10",
]

DATES = ["2026-02-30", "0000-00-00", "0001-01-01", "9999-12-31", "10000-01-01", "-1-01-01", "2026-13-01",
         "26-1-1", "2026/01/01"]

HOSTILE = [*NUMBERS, *UNICODE_DIGITS, *TEXT, *DATES]

# Values that must be refused wherever a quantity (length, force, speed, flow, temperature) is read.
NOT_QUANTITIES = [v for v in NUMBERS if v not in ("0", "00", "0.0", "2147483647", "2147483648", "4294967296")]
