"""Raw request values that no form field reads: record ids in query strings and lists of ids.

`str.isdigit()` is true for '²' and '٣', which int() refuses or reads as another number, and an id of twenty
digits overflows SQLite's 64-bit integers; so an id is read here, the one way: ASCII digits only, 1 to 2**63 - 1.
"""

import re

MAX_ID = 2**63 - 1  # a 64-bit signed key, SQLite's and PostgreSQL's bigint
_ID = re.compile(r"[0-9]{1,19}")


def parse_id(text) -> int | None:
    """The record id a query string or form value names, or None when it names none."""
    if isinstance(text, int) and not isinstance(text, bool):
        return text if 1 <= text <= MAX_ID else None
    if not isinstance(text, str) or not _ID.fullmatch(text.strip()):
        return None
    value = int(text.strip())
    return value if 1 <= value <= MAX_ID else None


def parse_ids(values, limit: int) -> list[int] | None:
    """Ids of a multiple choice (checkboxes), at most `limit` of them; None when any of them names no record."""
    ids = [parse_id(value) for value in list(values)[:limit]]
    return None if any(value is None for value in ids) else ids
