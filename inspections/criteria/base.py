"""The building blocks of a criteria set: limit types as a standard prints them, the set, derive, (de)serialise.

A criteria set is data: each limit carries its source (standard, edition, table or clause) and its status
("published", "from memory", or a client requirement), so every finding can cite what it applied.
The checks that read these limits live in inspections.acceptance; a set only names which checks it runs.
Plain Python, no Django: the Django layer stores a client's set with to_dict() and passes it back.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field, replace
from decimal import Decimal, InvalidOperation
from types import MappingProxyType

from core.units import Length, UnitError, format_length, inch_fraction, number_text, parse_length

SYSTEMS = ("US", "SI")
PUBLISHED = "published"
FROM_MEMORY = "from memory"
_KEY = re.compile(r"^[A-Za-z0-9][A-Za-z0-9._-]{0,79}$")
_BIG = Length(Decimal("100000"))  # 100 m: beyond every weld, plate and face width; "infinity" for comparisons
_SYMBOLS = {"t": "base metal thickness t", "a": "nominal throat a", "b": "face width b"}


def _plain(value: Decimal) -> str:
    value = value.normalize()
    return format(value.quantize(Decimal(1)) if value.as_tuple().exponent > 0 else value, "f")


def length_text(length: Length, system: str = "SI") -> str:
    """A length as text that parse_length reads back exactly: '1/32 in', '0.01 in', '1-1/2 in', '2.5 mm'."""
    if system == "US":
        inch = length.inch
        whole, num, den, exact = inch_fraction(inch)
        if exact:
            if num == 0:
                return f"{whole} in"
            return f"{whole}-{num}/{den} in" if whole else f"{num}/{den} in"
        if -inch.as_tuple().exponent <= 4:
            return f"{_plain(inch)} in"
    return f"{_plain(length.mm)} mm"


def _length(value, what: str) -> Length:
    try:
        return parse_length(value)
    except UnitError as exc:
        raise UnitError(f"{what}: {exc}") from None


def _decimal(value, what: str) -> Decimal:
    """A plain number from text, an int or a Decimal (floats refused: they cannot hold 0.1 exactly)."""
    if isinstance(value, bool) or not isinstance(value, (str, int, Decimal)):
        raise ValueError(f"{what} must be a number written as text such as '0.1', not {type(value).__name__}.")
    try:
        text = number_text(value).rstrip("%").strip() if isinstance(value, str) else value
    except UnitError as exc:
        raise ValueError(f"{what}: {exc}") from None
    try:
        number = Decimal(text)
    except InvalidOperation:
        raise ValueError(f"{what}: '{value}' is not a number; write it such as '0.1' or '10 %'.") from None
    if not number.is_finite() or number < 0:
        raise ValueError(f"{what} must be a finite number of zero or more, not '{value}'.")
    if isinstance(value, str) and value.strip().endswith("%"):
        number = number / 100
    return number


def _text(value, what: str, *, empty_ok: bool = False) -> str:
    if not isinstance(value, str) or (not empty_ok and not value.strip()):
        raise ValueError(f"{what} must be non-empty text, not {value!r}.")
    return value.strip()


# --- limit types -------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Limit:
    """A value of a criteria set with where it comes from. Subclasses say how large the allowance is."""

    source: str
    status: str

    def __post_init__(self):
        _text(self.source, "A limit's source")
        _text(self.status, "A limit's status")

    def cite(self, status: str | None = None) -> str:
        """The source as a finding shows it: the status is added unless it is plainly published."""
        status = status or self.status
        return self.source if status == PUBLISHED else f"{self.source} ({status})"


@dataclass(frozen=True)
class Fixed(Limit):
    """One allowance in each system, as the standard prints them (1/16 in and 2 mm: not conversions)."""

    us: Length | None = None
    si: Length | None = None

    kind = "fixed"

    def allowance(self, system: str, x: Length | None = None) -> Length:
        value = self.us if system == "US" else self.si
        if value is None:
            raise ValueError(f"This limit has no {system} value ({self.source}).")
        return value

    def points(self, system):
        return []

    def to_dict(self):
        return {"type": self.kind, "us": _opt_text(self.us, "US"), "si": _opt_text(self.si, "SI"),
                "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Band:
    """One row of a table by size: up to (and, if inclusive, at) `up_to` the allowance is `limit`."""

    up_to: Length | None
    limit: Length
    inclusive: bool = True
    status: str | None = None

    def covers(self, x: Length) -> bool:
        return self.up_to is None or x < self.up_to or (self.inclusive and x == self.up_to)

    def describe(self, system: str) -> str:
        if self.up_to is None:
            return "the largest sizes"
        return f"{'up to and including' if self.inclusive else 'below'} {format_length(self.up_to, system)}"


@dataclass(frozen=True)
class Banded(Limit):
    """An allowance that steps with a size (undersize by nominal leg, convexity by face width)."""

    by: str = "size"
    us: tuple[Band, ...] = ()
    si: tuple[Band, ...] = ()

    kind = "banded"

    def __post_init__(self):
        super().__post_init__()
        for system, bands in (("US", self.us), ("SI", self.si)):
            if not bands:
                continue
            if bands[-1].up_to is not None:
                raise ValueError(f"The last {system} band of '{self.source}' must have no upper bound (up_to null).")
            bounds = [b.up_to for b in bands[:-1]]
            if any(b is None for b in bounds) or bounds != sorted(bounds) or len(set(bounds)) != len(bounds):
                raise ValueError(f"The {system} bands of '{self.source}' must rise in size, each bound once.")

    def band(self, system: str, x: Length) -> Band:
        bands = self.us if system == "US" else self.si
        if not bands:
            raise ValueError(f"This limit has no {system} values ({self.source}).")
        return next(b for b in bands if b.covers(x))

    def allowance(self, system: str, x: Length | None = None) -> Length:
        if x is None:
            raise ValueError(f"This limit depends on the {self.by}, which was not given.")
        return self.band(system, x).limit

    def points(self, system):
        return [b.up_to for b in (self.us if system == "US" else self.si) if b.up_to is not None]

    def to_dict(self):
        def rows(bands, system):
            return [{"up_to": _opt_text(b.up_to, system), "inclusive": b.inclusive,
                     "limit": length_text(b.limit, system), **({"status": b.status} if b.status else {})}
                    for b in bands]

        return {"type": self.kind, "by": self.by, "us": rows(self.us, "US"), "si": rows(self.si, "SI"),
                "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Proportional(Limit):
    """ISO 5817 style: h <= plus + factor * (t, a or b), at most `max` (None: no cap)."""

    plus: Length = Length(Decimal(0))
    factor: Decimal = Decimal(0)
    of: str = "t"
    max: Length | None = None

    kind = "proportional"

    def __post_init__(self):
        super().__post_init__()
        if self.of not in _SYMBOLS:
            raise ValueError(f"A proportional limit is a share of t, a or b, not {self.of!r}.")
        if not isinstance(self.factor, Decimal) or self.factor < 0:
            raise ValueError(f"A proportional limit's factor must be a Decimal of zero or more, not {self.factor!r}.")

    def allowance(self, system: str, x: Length | None = None) -> Length:
        if x is None:
            raise ValueError(f"This limit depends on the {_SYMBOLS[self.of]}, which was not given.")
        value = self.plus + x * self.factor
        return value if self.max is None else min(value, self.max)

    def points(self, system):
        if self.max is None or self.factor == 0 or self.max <= self.plus:
            return []
        return [(self.max - self.plus) / self.factor]

    def formula(self, measured: str = "h") -> str:
        """'h <= 1 mm + 0.25 b, max 5 mm': the rule as the standard writes it, in mm."""
        terms = []
        if self.plus:
            terms.append(length_text(self.plus))
        if self.factor:
            terms.append(f"{_plain(self.factor)} {self.of}")
        text = f"{measured} <= {' + '.join(terms) or '0 mm'}"
        return text + (f", max {length_text(self.max)}" if self.max is not None else "")

    def to_dict(self):
        return {"type": self.kind, "plus": length_text(self.plus), "factor": _plain(self.factor), "of": self.of,
                "max": _opt_text(self.max, "SI"), "source": self.source, "status": self.status}


PERMISSION_RULES = ("not_permitted", "refer", "permitted_if", "permitted")  # tightest first


@dataclass(frozen=True)
class Permission(Limit):
    """Whether an imperfection may be present at all: not_permitted; refer (judge against the standard: the
    limit is not stored here, so the weld is held); permitted_if (a condition the inspector confirms); permitted."""

    rule: str = "not_permitted"
    condition: str = ""
    measured: bool = False  # True where it stands for a measured allowance ("not permitted": 0; "permitted": none)

    kind = "permission"

    def __post_init__(self):
        super().__post_init__()
        if self.rule not in PERMISSION_RULES:
            raise ValueError(f"A permission is one of {', '.join(PERMISSION_RULES)}, not {self.rule!r}.")
        if not isinstance(self.measured, bool):
            raise ValueError("A permission's 'measured' is true or false.")

    @property
    def rank(self) -> int:
        return PERMISSION_RULES.index(self.rule)

    def allowance(self, system: str, x: Length | None = None) -> Length | None:
        return Length(Decimal(0)) if self.rank < 2 else None

    def points(self, system):
        return []

    def to_dict(self):
        return {"type": self.kind, "rule": self.rule, "condition": self.condition, "measured": self.measured,
                "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Count(Limit):
    """A largest number of something (pores in a length)."""

    value: int = 0

    kind = "count"

    def __post_init__(self):
        super().__post_init__()
        if isinstance(self.value, bool) or not isinstance(self.value, int) or self.value < 0:
            raise ValueError(f"A count limit must be a whole number of zero or more, not {self.value!r}.")

    def to_dict(self):
        return {"type": self.kind, "value": self.value, "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Ratio(Limit):
    """A largest share of something (undersize portion of the weld length): 0.10 is 10 %."""

    value: Decimal = Decimal(0)

    kind = "ratio"

    def __post_init__(self):
        super().__post_init__()
        if not isinstance(self.value, Decimal) or not (0 <= self.value <= 1):
            raise ValueError(f"A ratio limit must be a Decimal from 0 to 1 (0.10 is 10 %), not {self.value!r}.")

    def to_dict(self):
        return {"type": self.kind, "value": _plain(self.value), "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Angle(Limit):
    """A smallest angle in degrees (ISO 5817 505 incorrect weld toe: the toe angle alpha at least 100 degrees)."""

    minimum: Decimal = Decimal(0)

    kind = "angle_min"

    def __post_init__(self):
        super().__post_init__()
        if not isinstance(self.minimum, Decimal) or not (0 <= self.minimum <= 180):
            raise ValueError(f"An angle limit is a Decimal number of degrees from 0 to 180, not {self.minimum!r}.")

    def to_dict(self):
        return {"type": self.kind, "minimum": _plain(self.minimum), "source": self.source, "status": self.status}


@dataclass(frozen=True)
class Threshold(Limit):
    """Where a rule changes or the window it counts over (material 1 in thick, any 12 in): not an allowance,
    so a derived set cannot override it."""

    us: Length | None = None
    si: Length | None = None

    kind = "threshold"

    def value(self, system: str) -> Length:
        value = self.us if system == "US" else self.si
        if value is None:
            raise ValueError(f"This threshold has no {system} value ({self.source}).")
        return value

    def to_dict(self):
        return {"type": self.kind, "us": _opt_text(self.us, "US"), "si": _opt_text(self.si, "SI"),
                "source": self.source, "status": self.status}


def is_measured(limit: Limit) -> bool:
    """Whether a limit gives an allowance for a measured depth or size (rather than present / not present)."""
    return isinstance(limit, (Fixed, Banded, Proportional)) or (isinstance(limit, Permission) and limit.measured)


def _opt_text(length, system):
    return None if length is None else length_text(length, system)


# --- the set ---------------------------------------------------------------------------------------


@dataclass(frozen=True)
class CriteriaSet:
    """A named, versioned set of acceptance limits and the checks that read them.

    `systems` are the unit systems whose values the standard prints: ("US", "SI") for AWS, ("SI",) for ISO.
    A derived set (a client's) remembers its base key and version and which limits it changed.
    """

    key: str
    title: str
    standard: str
    version: int
    systems: tuple[str, ...]
    checks: tuple[str, ...]
    limits: MappingProxyType = field(default_factory=lambda: MappingProxyType({}))
    base_key: str | None = None
    base_version: int | None = None
    signed_by_engineer: bool = False
    overridden: tuple[str, ...] = ()
    loosened: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()

    def __post_init__(self):
        if not isinstance(self.key, str) or not _KEY.match(self.key):
            raise ValueError(f"A criteria set key is letters, digits, '.', '-' or '_' (up to 80), "
                             f"such as 'client-acme-2025', not {self.key!r}.")
        _text(self.title, "A criteria set's title")
        _text(self.standard, "A criteria set's standard")
        if isinstance(self.version, bool) or not isinstance(self.version, int) or self.version < 1:
            raise ValueError(f"A criteria set's version is a whole number from 1, not {self.version!r}.")
        if not self.systems or any(s not in SYSTEMS for s in self.systems):
            raise ValueError(f"A criteria set's systems are 'US' and/or 'SI', not {self.systems!r}.")
        if not self.checks or not all(isinstance(c, str) and c for c in self.checks):
            raise ValueError("A criteria set must name at least one check.")
        if self.base_key is not None and not isinstance(self.base_key, str):
            raise ValueError(f"A derived set's base_key is the key of its base set, not {self.base_key!r}.")
        if self.base_version is not None and (isinstance(self.base_version, bool)
                                              or not isinstance(self.base_version, int)):
            raise ValueError(f"A derived set's base_version is a whole number, not {self.base_version!r}.")
        if not isinstance(self.signed_by_engineer, bool):
            raise ValueError("signed_by_engineer is True or False.")
        if not all(isinstance(x, str) for name in ("systems", "checks", "overridden", "loosened", "notes")
                   for x in getattr(self, name)):
            raise ValueError("A criteria set's systems, checks, overridden, loosened and notes are lists of text.")
        limits = dict(self.limits)
        for name, limit in limits.items():
            if not isinstance(name, str) or not isinstance(limit, Limit):
                raise ValueError(f"Limit {name!r} of set {self.key} is not a limit value.")
        object.__setattr__(self, "limits", MappingProxyType(limits))
        for name in ("systems", "checks", "overridden", "loosened", "notes"):
            object.__setattr__(self, name, tuple(getattr(self, name)))

    __hash__ = None  # the limits mapping is not hashable; compare sets with ==

    def limit(self, name: str) -> Limit:
        try:
            return self.limits[name]
        except KeyError:
            raise ValueError(f"Criteria set {self.key} has no limit '{name}'; it has: "
                             f"{', '.join(sorted(self.limits))}.") from None

    def to_dict(self) -> dict:
        """A JSON-friendly copy (lengths as text with units) that from_dict reads back equal."""
        return {"key": self.key, "title": self.title, "standard": self.standard, "version": self.version,
                "systems": list(self.systems), "checks": list(self.checks),
                "limits": {name: limit.to_dict() for name, limit in self.limits.items()},
                "base_key": self.base_key, "base_version": self.base_version,
                "signed_by_engineer": self.signed_by_engineer, "overridden": list(self.overridden),
                "loosened": list(self.loosened), "notes": list(self.notes)}


# --- reading a set back from a plain dict ----------------------------------------------------------


def _opt_length(value, what):
    return None if value is None else _length(value, what)


def limit_from_dict(data, name: str = "limit", *, source: str | None = None, status: str | None = None) -> Limit:
    """Read one limit from its to_dict() form; source and status default to the given ones (an override's)."""
    if not isinstance(data, dict):
        raise ValueError(f"Limit '{name}' must be a dict with a 'type', not {type(data).__name__}.")
    kind = data.get("type")
    known = {cls.kind: cls for cls in (Fixed, Banded, Proportional, Permission, Count, Ratio, Threshold, Angle)}
    if not isinstance(kind, str) or kind not in known:
        raise ValueError(f"Limit '{name}' has type {kind!r}; use one of {', '.join(known)}.")
    src = data.get("source", source)
    stat = data.get("status", status)
    if src is None or stat is None:
        raise ValueError(f"Limit '{name}' needs a 'source' and a 'status' (published, from memory, ...).")
    what = f"limit '{name}'"
    try:
        if kind in ("fixed", "threshold"):
            unknown = set(data) - {"type", "us", "si", "source", "status"}
            if unknown:
                raise ValueError(f"{what} has unknown fields {sorted(unknown)}.")
            return known[kind](source=src, status=stat, us=_opt_length(data.get("us"), what),
                               si=_opt_length(data.get("si"), what))
        if kind == "banded":
            def rows(items):
                if not isinstance(items, list):
                    raise ValueError(f"{what}: bands are a list of {{up_to, inclusive, limit}}.")
                out = []
                for row in items:
                    if not isinstance(row, dict) or "limit" not in row or "up_to" not in row:
                        raise ValueError(f"{what}: each band is a dict with 'up_to' (null for the last) and 'limit'.")
                    inclusive = row.get("inclusive", True)
                    if not isinstance(inclusive, bool):
                        raise ValueError(f"{what}: a band's 'inclusive' is true or false.")
                    out.append(Band(_opt_length(row["up_to"], what), _length(row["limit"], what), inclusive,
                                    row.get("status")))
                return tuple(out)

            return Banded(source=src, status=stat, by=_text(data.get("by", "size"), f"{what} 'by'"),
                          us=rows(data.get("us", [])), si=rows(data.get("si", [])))
        if kind == "proportional":
            return Proportional(source=src, status=stat, plus=_length(data.get("plus", "0 mm"), what),
                                factor=_decimal(data.get("factor", "0"), f"{what} factor"), of=data.get("of", "t"),
                                max=_opt_length(data.get("max"), what))
        if kind == "permission":
            measured = data.get("measured", False)
            if not isinstance(measured, bool):
                raise ValueError(f"{what}: 'measured' is true or false.")
            return Permission(source=src, status=stat, rule=_rule(data.get("rule"), what),
                              condition=_text(data.get("condition", ""), f"{what} condition", empty_ok=True),
                              measured=measured)
        if kind == "count":
            return Count(source=src, status=stat, value=_count(data.get("value"), what))
        if kind == "angle_min":
            return Angle(source=src, status=stat, minimum=_degrees(data.get("minimum"), what))
        return Ratio(source=src, status=stat, value=_decimal(data.get("value"), what))
    except TypeError as exc:  # a wrong-typed field in a stored set
        raise ValueError(f"{what} cannot be read: {exc}.") from None


def _rule(value, what):
    rule = value.strip().lower().replace(" ", "_") if isinstance(value, str) else value
    if rule not in PERMISSION_RULES:
        raise ValueError(f"{what}: a permission is one of {', '.join(PERMISSION_RULES)}, not {value!r}.")
    return rule


def _degrees(value, what) -> Decimal:
    """A number of degrees from text ('100', '100°'), an int or a Decimal."""
    if isinstance(value, str):
        value = value.strip().replace("º", "°").removesuffix("°").strip()
    degrees = _decimal(value, what)
    if degrees > 180:
        raise ValueError(f"{what} is an angle from 0 to 180 degrees, not {value!r}.")
    return degrees


def _count(value, what):
    if isinstance(value, str) and value.strip().isdigit():
        value = int(value.strip())
    if isinstance(value, bool) or not isinstance(value, int) or value < 0:
        raise ValueError(f"{what} must be a whole number of zero or more, such as 1, not {value!r}.")
    return value


def from_dict(data) -> CriteriaSet:
    """Read a set stored with to_dict(); anything missing or malformed raises ValueError saying what."""
    if not isinstance(data, dict):
        raise ValueError(f"A stored criteria set is a dict (from CriteriaSet.to_dict()), not {type(data).__name__}.")
    required = ("key", "title", "standard", "version", "systems", "checks", "limits")
    missing = [k for k in required if k not in data]
    if missing:
        raise ValueError(f"A stored criteria set lacks {', '.join(missing)}.")
    if not isinstance(data["limits"], dict):
        raise ValueError("A stored criteria set's 'limits' is a dict of limit name to limit.")
    for name in ("systems", "checks", "overridden", "loosened", "notes"):
        if not isinstance(data.get(name, []), (list, tuple)):
            raise ValueError(f"A stored criteria set's '{name}' is a list.")
    signed = data.get("signed_by_engineer", False)
    if not isinstance(signed, bool):
        raise ValueError("A stored criteria set's 'signed_by_engineer' is true or false.")
    limits = {str(name): limit_from_dict(value, name) for name, value in data["limits"].items()}
    return CriteriaSet(key=data["key"], title=data["title"], standard=data["standard"], version=data["version"],
                       systems=tuple(data["systems"]), checks=tuple(data["checks"]), limits=limits,
                       base_key=data.get("base_key"), base_version=data.get("base_version"), signed_by_engineer=signed,
                       overridden=tuple(data.get("overridden", [])), loosened=tuple(data.get("loosened", [])),
                       notes=tuple(data.get("notes", [])))


# --- derived (client) sets -------------------------------------------------------------------------


def _allow_mm(limit: Limit, system: str, x: Length):
    value = limit.allowance(system, x)
    return None if value is None else value.mm


def _looser(new: Limit, old: Limit, systems) -> bool:
    """True when `new` allows more than `old` for some weld: compared at every size where either steps,
    between those sizes, at zero and at 100 m (both are piecewise constant or linear in the size)."""
    if isinstance(old, Permission) and isinstance(new, Permission):
        return new.rank > old.rank
    if isinstance(old, Angle):
        return new.minimum < old.minimum  # a smaller smallest angle admits a sharper toe
    if isinstance(old, (Count, Ratio)):
        return new.value > old.value
    for system in systems:
        bounds = sorted({Length(Decimal(0)), _BIG, *old.points(system), *new.points(system)})
        samples = bounds + [Length((a.mm + b.mm) / 2) for a, b in zip(bounds, bounds[1:], strict=False)]
        for x in samples:
            a, b = _allow_mm(new, system, x), _allow_mm(old, system, x)
            if b is not None and (a is None or a > b):
                return True
    return False


def _override(name: str, old: Limit, value, source: str, status: str) -> Limit:
    """Read an override in the shorthand a client writes: a length ('1/64 in') for either system, a dict
    {'us': ..., 'si': ...}, 'not permitted', a count, a ratio ('5 %'), or a full limit dict."""
    what = f"override of '{name}'"
    if isinstance(old, Threshold):
        raise ValueError(f"'{name}' is where the rule changes or the length it counts over, not an allowance: "
                         "it cannot be overridden.")
    word = value.strip().lower().replace("_", " ") if isinstance(value, str) else None
    if isinstance(value, Limit):
        new = value
    elif isinstance(value, dict) and "type" in value:
        new = limit_from_dict(value, name, source=source, status=status)
    elif isinstance(old, Count):
        new = Count(source=source, status=status, value=_count(value, what))
    elif isinstance(old, Ratio):
        new = Ratio(source=source, status=status, value=_decimal(value, what))
    elif isinstance(old, Angle):
        new = Angle(source=source, status=status, minimum=_degrees(value, what))
    elif word in ("not permitted", "refer", "permitted if", "permitted", "unlimited"):
        rule = "permitted" if word == "unlimited" else word
        condition = old.condition if isinstance(old, Permission) and rule == "permitted_if" else ""
        new = Permission(source=source, status=status, rule=_rule(rule, what), condition=condition,
                         measured=is_measured(old))
    elif not is_measured(old):
        raise ValueError(f"{what}: write 'not permitted', 'refer', 'permitted' or a full limit dict.")
    elif isinstance(value, (str, Length)):
        length = _length(value, what)
        new = Fixed(source=source, status=status, us=length, si=length)
    elif isinstance(value, dict) and value and set(value) <= {"us", "si"}:
        us = _opt_length(value.get("us"), what)
        si = _opt_length(value.get("si"), what)
        keep = old if isinstance(old, Fixed) else Fixed(source=source, status=status)
        new = Fixed(source=source, status=status, us=us if us is not None else keep.us,
                    si=si if si is not None else keep.si)
    elif isinstance(value, dict) and value and isinstance(old, Proportional) and set(value) <= {"plus", "factor",
                                                                                                "max"}:
        new = Proportional(source=source, status=status,
                           plus=_length(value["plus"], what) if "plus" in value else old.plus,
                           factor=_decimal(value["factor"], what) if "factor" in value else old.factor, of=old.of,
                           max=_opt_length(value["max"], what) if "max" in value else old.max)
    else:
        raise ValueError(f"{what}: {value!r} is not a limit; write a length such as '1/64 in', a dict "
                         "{'us': '1/64 in', 'si': '0.5 mm'}, 'not permitted', or a full limit dict.")
    if is_measured(old) != is_measured(new) or (not is_measured(old) and type(old) is not type(new)):
        raise ValueError(f"{what}: '{name}' takes a {'measured' if is_measured(old) else old.kind} limit, "
                         f"not a {new.kind} one.")
    if is_measured(new):
        for system in (("US", "SI") if isinstance(new, (Fixed, Banded)) else ()):
            if _has_values(old, system) and not _has_values(new, system):
                raise ValueError(f"{what}: the base prints a {system} value; give one too.")
    return new


def _has_values(limit, system):
    if isinstance(limit, Fixed):
        return (limit.us if system == "US" else limit.si) is not None
    if isinstance(limit, Banded):
        return bool(limit.us if system == "US" else limit.si)
    return True  # a proportional or permission limit reads the same in both systems


def derive(base: CriteriaSet, new_key: str, overrides: dict, title: str, signed_by_engineer: bool = False,
           *, version: int = 1, known_keys=()) -> CriteriaSet:
    """A client's set: the base with some limits replaced. A limit that allows more than the base's is
    refused unless the engineer signed for it (then it is listed in `loosened`)."""
    if not isinstance(overrides, dict):
        raise ValueError(f"Overrides are a dict of limit name to value, not {type(overrides).__name__}.")
    if not isinstance(signed_by_engineer, bool):
        raise ValueError("signed_by_engineer is True or False.")
    title = _text(title, "The derived set's title")
    if new_key in known_keys:
        raise ValueError(f"'{new_key}' is the key of a published set; give the client's set its own key.")
    source = f"client set {new_key} ({title}), derived from {base.key} v{base.version}"
    limits = dict(base.limits)
    loosened = []
    for name, value in overrides.items():
        if name not in base.limits:
            raise ValueError(f"{base.key} has no limit '{name}'; the limits are: {', '.join(sorted(base.limits))}.")
        old = base.limits[name]
        new = _override(name, old, value, source, "client requirement")
        if _looser(new, old, base.systems):
            if not signed_by_engineer:
                raise ValueError(f"The override of '{name}' allows more than {base.key} ({old.cite()}); a looser "
                                 "limit needs signed_by_engineer=True.")
            loosened.append(name)
            if new.status == "client requirement":
                new = replace(new, status="client requirement, looser than the base, signed by the engineer")
        limits[name] = new
    return CriteriaSet(key=new_key, title=title, standard=base.standard, version=version, systems=base.systems,
                       checks=base.checks, limits=limits, base_key=base.key, base_version=base.version,
                       signed_by_engineer=signed_by_engineer,
                       overridden=tuple(dict.fromkeys((*base.overridden, *overrides))),
                       loosened=tuple(dict.fromkeys((*base.loosened, *loosened))), notes=base.notes)
