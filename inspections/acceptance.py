"""Visual acceptance of a fillet weld: criteria set + weld + observations -> verdict with one finding per criterion.

The criteria set (inspections.criteria) holds the limits with their sources; this module holds one small check
per criterion that reads them. A set names the checks it runs in `checks`; CHECKS below maps those names to the
functions. Adding a rule: write check_<name>(job) -> Finding, add it to CHECKS, list it in the sets that apply it.

Inputs (see the engine contract): an absent measurement of a defect means none was seen, an absent boolean is
False; a defect seen but not measured (a pore with no diameter, convexity with no face width) is not accepted
until it is measured. Weld data a judgement needs (thickness for undercut, length for the undersize portion)
must be given, or ValueError says which.

Weld data: the specified leg `size` (and `size2` for unequal legs, each leg judged against its own size), the
nominal throat `throat` (ISO: a; either a or the legs z will do, and messages report both), `length`, `thickness`,
and the flags. Observations: the table in inspections.observations (names, kinds, labels, which checks read them);
on ISO sets without a measured throat the effective throat of the smallest leg(s) is judged. Error messages speak
in the observations' labels and the set's name, never in these keys.

Unit system of the verdict: weld["system"] ("US" or "SI") when given; otherwise the system the weld size is
written in (inches: US, mm: SI). The US values of a set apply on a US job and the SI values on an SI job, as the
standard prints them. A set with SI values only (ISO 5817) is judged and reported in millimetres.
"""

from __future__ import annotations

from dataclasses import dataclass, make_dataclass, replace
from decimal import Decimal

from core.units import (
    APPROX,
    Length,
    UnitError,
    format_length,
    inch_fraction,
    length_system,
    parse_angle,
    parse_length,
    significant,
)

from . import observations
from .criteria import CriteriaSet, derive, get_criteria, list_criteria, resolve
from .criteria.base import SYSTEMS, Angle, Banded, Count, Limit, Permission, Proportional, Ratio, Threshold, is_measured
from .strength import THROAT_EQUAL_LEGS, effective_throat

__all__ = ["CHECKS", "Finding", "Verdict", "derive", "evaluate", "get_criteria", "list_criteria"]

ZERO = Length(Decimal(0))


@dataclass(frozen=True)
class Finding:
    """One criterion judged: what was measured against which limit, and where the limit comes from."""

    criterion: str
    ok: bool
    message: str
    source: str
    limit: Length | Decimal | int | None = None  # the applied allowance (None: none applies, or not permitted)
    measured: Length | Decimal | int | bool | None = None
    criteria_key: str = ""
    criteria_version: int = 0


@dataclass(frozen=True)
class Verdict:
    """Accepted only when every finding is ok; stored with the set's key and version."""

    accepted: bool
    findings: tuple[Finding, ...]
    criteria_key: str
    criteria_version: int
    criteria_title: str
    system: str

    @property
    def rejections(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if not f.ok)


# --- reading the weld and the observations ---------------------------------------------------------------

WELD_LENGTHS = ("size", "size2", "throat", "length", "thickness")
WELD_FLAGS = ("primary_member", "transverse_to_tension", "stiffener_to_web")
OBSERVED_LENGTHS = observations.LENGTHS
OBSERVED_FLAGS = observations.FLAGS
OBSERVED_COUNTS = observations.COUNTS
OBSERVED_ANGLES = observations.ANGLES


@dataclass(frozen=True)
class Weld:
    size: Length | None
    size2: Length | None  # the second specified leg of an unequal-leg fillet (None: equal legs)
    throat: Length | None
    length: Length | None
    thickness: Length | None
    primary_member: bool
    transverse_to_tension: bool
    stiffener_to_web: bool


# One field per observation of the table (inspections.observations): a length, a count or a flag.
_FIELD_TYPES = {"length": Length | None, "count": int | None, "flag": bool, "angle": Decimal | None}
Observed = make_dataclass("Observed", [(o.name, _FIELD_TYPES[o.kind]) for o in observations.OBSERVATIONS],
                          frozen=True)
Observed.__doc__ = "What the inspector saw, read from the observed dict (absent: None, or False for a flag)."


_WHAT = {"weld": "The weld data", "observed": "The observations"}


def _words(name: str, system: str = "US", what: str = "weld") -> str:
    """The words for a key of the weld dict or the observed dict, as a person reads them."""
    return observations.weld_label(name) if what == "weld" else observations.label(name, system)


def _cap(text: str) -> str:
    return text[:1].upper() + text[1:]


def _read(data, what, lengths, flags, counts=(), extra=(), positive=(), system="US", angles=()):
    if not isinstance(data, dict):
        raise ValueError(f"{_WHAT[what]} must be a dict such as {{'size': '1/4 in'}}, not {type(data).__name__}.")
    known = (*lengths, *counts, *angles, *flags, *extra)
    unknown = [k for k in data if k not in known]
    if unknown:
        raise ValueError(f"{_WHAT[what]} hold {', '.join(map(repr, unknown))}, which this engine does not read; "
                         f"it reads: {', '.join(_words(k, system, what) for k in known)}.")
    out = {}
    for key in lengths:
        value = data.get(key)
        if key not in data:
            out[key] = None
            continue
        try:
            out[key] = parse_length(value)
        except UnitError as exc:
            hint = " Leave it out when nothing was measured." if what == "observed" else ""
            raise UnitError(f"{_cap(_words(key, system, what))}: {exc}{hint}") from None
        if key in positive and out[key] == ZERO:
            raise ValueError(f"The {_words(key, system, what)} cannot be zero: give it such as "
                             f"{'1/4 in' if system == 'US' else '6 mm'}.")
    for key in flags:
        value = data.get(key, False)
        if not isinstance(value, bool):
            raise ValueError(f"{_cap(_words(key, system, what))} is yes or no (True or False), not {value!r}.")
        out[key] = value
    for key in counts:
        value = data.get(key)
        if isinstance(value, str) and value.strip().isdigit():
            value = int(value.strip())
        if key in data and (isinstance(value, bool) or not isinstance(value, int) or value < 0):
            raise ValueError(f"{_cap(_words(key, system, what))} is a whole number of zero or more, such as 1, "
                             f"not {value!r}.")
        out[key] = value
    for key in angles:
        if key not in data:
            out[key] = None
            continue
        try:
            out[key] = parse_angle(data[key], 0, 180)
        except UnitError as exc:
            raise UnitError(f"{_cap(_words(key, system, what))}: {exc}") from None
        if out[key] == 0:
            raise ValueError(f"{_cap(_words(key, system, what))} cannot be 0°: give it in degrees such as 120°.")
    return out


def _text_system(data) -> str:
    """The system the words of an error are written for: the weld dict's system or its size's unit, else US."""
    if isinstance(data, dict):
        if data.get("system") in SYSTEMS:
            return data["system"]
        try:
            return length_system(data["size"]) or "US"
        except (KeyError, ValueError, TypeError):
            pass
    return "US"


def read_weld(weld) -> Weld:
    return Weld(**_read(weld, "weld", WELD_LENGTHS, WELD_FLAGS, extra=("system",), positive=WELD_LENGTHS,
                        system=_text_system(weld)))


def read_observed(observed, system: str = "US") -> Observed:
    return Observed(**_read(observed, "observed", OBSERVED_LENGTHS, OBSERVED_FLAGS, OBSERVED_COUNTS, system=system,
                            angles=OBSERVED_ANGLES))


def set_words(cset: CriteriaSet) -> str:
    """The set as a person names it: its title up to the first comma ('ISO 5817:2014 quality level C')."""
    return cset.title.split(",")[0].strip()


def verdict_system(cset: CriteriaSet, weld) -> str:
    """The system whose values apply: weld['system'], else the unit the size is written in; SI-only sets: SI."""
    explicit = weld.get("system") if isinstance(weld, dict) else None
    if explicit is not None and explicit not in SYSTEMS:
        raise ValueError(f"The unit system of the job is 'US' or 'SI', not {explicit!r}.")
    size = weld.get("size") if isinstance(weld, dict) else None
    job = explicit or (length_system(size) if isinstance(size, str) else None)
    if job in cset.systems:
        return job
    if len(cset.systems) == 1:
        return cset.systems[0]
    if size is None:
        raise ValueError(f"{set_words(cset)} needs the specified leg (such as '1/4 in' or '6 mm'); its unit "
                         "decides whether the US or the SI values apply (or give the job's unit system).")
    raise ValueError(f"The specified leg was given without a unit system (a computed length): give the job's unit "
                     f"system, US or SI, so {set_words(cset)} knows which of its printed values apply.")


# --- the job a check reads -----------------------------------------------------------------------------


def _positive(length: Length | None) -> bool:
    return length is not None and length > ZERO


def _within(measured: Length, allowed: Length | None) -> bool:
    """Exactly at a limit is accepted; None is no limit at all."""
    return allowed is None or measured <= allowed


@dataclass(frozen=True)
class Job:
    """What a check needs: the set, the system of the verdict, the weld and what was seen."""

    cset: CriteriaSet
    system: str
    weld: Weld
    seen: Observed

    def limit(self, name: str, *kinds) -> Limit:
        limit = self.cset.limit(name)
        if kinds and not isinstance(limit, kinds):
            raise ValueError(f"Limit '{name}' of {set_words(self.cset)} is a {limit.kind} limit; this check needs "
                             f"{' or '.join(k.kind for k in kinds)}.")
        return limit

    def measured_limit(self, name: str) -> Limit:
        limit = self.cset.limit(name)
        if not is_measured(limit):
            raise ValueError(f"Limit '{name}' of {set_words(self.cset)} must give an allowance (a length, bands, a "
                             f"proportional rule or 'not permitted'), not a {limit.kind} limit.")
        return limit

    def threshold(self, name: str) -> Length:
        return self.limit(name, Threshold).value(self.system)

    def needs(self, name: str, why: str) -> Length:
        value = getattr(self.weld, name)
        if value is None:
            raise ValueError(f"{set_words(self.cset)} needs the {_words(name)} {why}; give it such as "
                             f"{'1/2 in' if self.system == 'US' else '12 mm'}.")
        return value

    def fmt(self, length: Length | None) -> str:
        """3/16" or 0.01" on a US job (fractions when exact), 2.5 mm on an SI job; None (no allowance): no limit."""
        if length is None:
            return "no limit"
        if self.system == "SI":
            return format_length(length, "SI")
        if inch_fraction(length.inch)[3]:
            return format_length(length, "US")
        shown = significant(length.inch, 3)
        return f'{"" if shown == length.inch else APPROX}{format(shown.normalize(), "f")}"'

    def allowance(self, limit: Limit, x: Length | None = None):
        """The allowance and, for a banded limit, the status of the band that applied."""
        status = limit.band(self.system, x).status if isinstance(limit, Banded) and x is not None else None
        return limit.allowance(self.system, x), status

    def rule_text(self, limit: Limit, allowed: Length | None, symbol: str = "h") -> str:
        if isinstance(limit, Permission):
            return "not permitted" if allowed is not None else "no limit applies"
        if isinstance(limit, Proportional):
            return f"the limit is {self.fmt(allowed)} ({limit.formula(symbol)})"
        return f"the limit is {self.fmt(allowed)}"

    def finding(self, criterion: str, ok: bool, message: str, limit: Limit, *, status: str | None = None,
                applied=None, measured=None, verdict: str | None = None) -> Finding:
        word = verdict or ("accepted" if ok else "rejected")
        return Finding(criterion=criterion, ok=ok, message=f"{message} \u2014 {word}", source=limit.cite(status),
                       limit=applied, measured=measured, criteria_key=self.cset.key,
                       criteria_version=self.cset.version)

    def unmeasured(self, criterion: str, message: str, limit: Limit, measured=None) -> Finding:
        return self.finding(criterion, False, message, limit, measured=measured, verdict="rejected until measured")


def _judge(job: Job, criterion: str, limit: Limit, measured: Length, x: Length | None, what: str,
           symbol: str = "h") -> Finding:
    """A measured depth or size against an allowance that may depend on x (t, a, b or the face width)."""
    allowed, status = job.allowance(limit, x)
    ok = _within(measured, allowed)
    return job.finding(criterion, ok, f"{what}; {job.rule_text(limit, allowed, symbol)}", limit, status=status,
                       applied=allowed, measured=measured)


# --- checks: present / not present ------------------------------------------------------------------------


def _flag(job: Job, criterion: str, seen: bool, what: str) -> Finding:
    limit = job.limit(criterion, Permission)
    if not seen:
        return job.finding(criterion, True, f"no {what} seen", limit, measured=False)
    condition = f" ({limit.condition})" if limit.condition else ""
    if limit.rule == "not_permitted":
        return job.finding(criterion, False, f"{what} seen: not permitted{condition}", limit, measured=True)
    if limit.rule == "refer":
        return job.finding(criterion, False, f"{what} seen{condition}", limit, measured=True,
                           verdict="rejected until judged")
    if limit.rule == "permitted_if":
        return job.finding(criterion, True, f"{what} seen: permitted only if {limit.condition}; confirm it", limit,
                           measured=True)
    return job.finding(criterion, True, f"{what} seen: permitted", limit, measured=True)


def check_crack(job: Job) -> Finding:
    """A crack; where the set has no crater-crack line of its own (AWS D1.1), a crater crack is a crack too."""
    if "crater_crack" in job.cset.checks or not job.seen.crater_crack:
        return _flag(job, "crack", job.seen.crack, "crack")
    return _flag(job, "crack", True, "crack (in a crater)" if not job.seen.crack else "crack, also in a crater")


def check_crater_crack(job: Job) -> Finding:
    """ISO 5817 104 crater crack."""
    return _flag(job, "crater_crack", job.seen.crater_crack, "crater crack")


def check_poor_restart(job: Job) -> Finding:
    """ISO 5817 517 poor restart."""
    return _flag(job, "poor_restart", job.seen.poor_restart, "poor restart")


def check_spatter(job: Job) -> Finding:
    """ISO 5817 602 spatter."""
    return _flag(job, "spatter", job.seen.spatter, "spatter")


def check_fusion(job: Job) -> Finding:
    return _flag(job, "fusion", job.seen.incomplete_fusion, "incomplete fusion")


def check_crater(job: Job) -> Finding:
    return _flag(job, "crater", job.seen.unfilled_crater or _positive(job.seen.crater_depth), "unfilled crater")


def check_overlap(job: Job) -> Finding:
    return _flag(job, "overlap", job.seen.overlap, "overlap")


def check_arc_strike(job: Job) -> Finding:
    return _flag(job, "arc_strike", job.seen.arc_strike, "arc strike")


# --- checks: AWS D1.1 -------------------------------------------------------------------------------------


def _percent(value: Decimal) -> str:
    return f"{format((value * 100).quantize(Decimal('0.1')).normalize(), 'f')} %"


@dataclass(frozen=True)
class _Leg:
    """One leg of a fillet judged for undersize against its own specified size (AWS D1.1 Table 8.1)."""

    name: str  # "" for an equal-leg fillet measured on one leg, else "first leg" / "second leg"
    nominal: Length
    smallest: Length | None
    allowed: Length | None
    status: str | None

    @property
    def under(self) -> Length:
        return self.nominal - self.smallest

    def text(self, job: Job) -> str:
        if self.smallest is None:
            return f"{self.name}: not measured (specified {job.fmt(self.nominal)})"
        head = f"{self.name}: smallest {job.fmt(self.smallest)}" if self.name else \
            f"smallest leg {job.fmt(self.smallest)}"
        if self.under <= ZERO:
            return f"{head} is not under the specified {job.fmt(self.nominal)}"
        if self.name:
            return (f"{head} is {job.fmt(self.under)} under the specified {job.fmt(self.nominal)} (limit for a "
                    f"{job.fmt(self.nominal)} leg: {job.fmt(self.allowed)})")
        return (f"{head} is {job.fmt(self.under)} under the specified {job.fmt(self.nominal)}; the limit for a "
                f"{job.fmt(self.nominal)} fillet is {job.fmt(self.allowed)}")


def _legs(job: Job, limit: Limit) -> list[_Leg]:
    """The legs to judge: one for an equal-leg fillet (two when both legs were measured), two for unequal legs."""
    size = job.needs("size", "to judge undersize (the specified leg)")
    size2, seen = job.weld.size2, job.seen
    if seen.min_size is None:
        raise ValueError(f"{set_words(job.cset)} judges the smallest leg: give the smallest leg measured (such as "
                         f"{'3/16 in' if job.system == 'US' else '5 mm'}).")
    pairs = [("", size, seen.min_size)]
    if (size2 is not None and size2 != size) or seen.min_size2 is not None:
        pairs = [("first leg", size, seen.min_size), ("second leg", size2 or size, seen.min_size2)]
    legs = []
    for name, nominal, smallest in pairs:
        allowed, status = job.allowance(limit, nominal)
        legs.append(_Leg(name, nominal, smallest, allowed, status))
    return legs


def check_undersize(job: Job) -> Finding:
    """Each leg's smallest against its own nominal size band (unequal legs: each its own, AWS D1.1:2020 Table 8.1),
    then the undersize portion of the weld length."""
    limit = job.measured_limit("undersize")
    legs = _legs(job, limit)
    under_length = job.seen.undersize_length
    text = "; ".join(leg.text(job) for leg in legs)
    measured = [leg for leg in legs if leg.smallest is not None]
    over = [leg for leg in measured if leg.allowed is not None and leg.under > leg.allowed]
    if over:
        worst = max(over, key=lambda leg: leg.under - leg.allowed)
        return job.finding("undersize", False, text, limit, status=worst.status, applied=worst.allowed,
                           measured=worst.under)
    under = [leg for leg in measured if leg.under > ZERO]
    if len(measured) < len(legs):
        return job.unmeasured("undersize", f"{text}: measure the smallest leg on the second leg too", limit,
                              measured=max(legs[0].under, ZERO))
    if not under:
        if _positive(under_length):
            raise ValueError(f"The length under the specified size is {job.fmt(under_length)}, but no leg is "
                             f"under its specified size ({text}): check both.")
        return job.finding("undersize", True, text, limit, applied=legs[0].allowed, measured=ZERO)
    governing = max(under, key=lambda leg: leg.under - leg.allowed if leg.allowed is not None else leg.under)
    allowed, status = governing.allowed, governing.status
    portion = job.limit("undersize_portion", Ratio)
    if under_length is None:
        return job.unmeasured("undersize", f"{text}; measure the length under size (at most "
                              f"{_percent(portion.value)} of the weld length)", limit, measured=governing.under)
    length = job.needs("length", "to judge the undersize portion of the weld length")
    if under_length > length:
        raise ValueError(f"The length under the specified size ({job.fmt(under_length)}) is longer than the weld "
                         f"({job.fmt(length)}): check both.")
    share = under_length / length
    ok = share <= portion.value
    text += (f"; under size for {job.fmt(under_length)} of {job.fmt(length)} ({_percent(share)}), "
             f"{'within' if ok else 'more than'} {_percent(portion.value)} of the weld length")
    status = status or (None if portion.status == limit.status else portion.status)
    return job.finding("undersize", ok, text, limit, status=status, applied=allowed, measured=governing.under)


def _undercut_unmeasured(job: Job, limit: Limit) -> Finding | None:
    if job.seen.undercut_depth is None and _positive(job.seen.undercut_length):
        return job.unmeasured("undercut", f"undercut over {job.fmt(job.seen.undercut_length)} but no depth: "
                              "measure the deepest undercut", limit)
    if not _positive(job.seen.undercut_depth):
        return job.finding("undercut", True, "no undercut measured", limit, measured=ZERO)
    return None


def check_undercut_by_thickness(job: Job) -> Finding:
    """Statically loaded: by the thickness of the material at the toe; a short deeper length on thin material."""
    general = job.measured_limit("undercut_thin")
    early = _undercut_unmeasured(job, general)
    if early:
        return early
    depth = job.seen.undercut_depth
    t = job.needs("thickness", "to judge undercut (the base metal at the toe)")
    on = f"undercut {job.fmt(depth)} deep on {job.fmt(t)} material"
    if t >= job.threshold("undercut_thick_material"):
        return _judge(job, "undercut", job.measured_limit("undercut_thick"), depth, t,
                      f"{on} ({job.fmt(job.threshold('undercut_thick_material'))} or more, any length)")
    allowed, _ = job.allowance(general, t)
    if _within(depth, allowed):
        return job.finding("undercut", True, f"{on}; within the {job.fmt(allowed)} limit", general, applied=allowed,
                           measured=depth)
    short = job.measured_limit("undercut_thin_short")
    short_allowed, _ = job.allowance(short, t)
    if not _within(depth, short_allowed):
        return job.finding("undercut", False, f"{on}; over {job.fmt(short_allowed)}, the most allowed for any "
                           "length", short, applied=short_allowed, measured=depth)
    window = job.threshold("undercut_window")
    length_limit = job.measured_limit("undercut_thin_short_length")
    most, _ = job.allowance(length_limit, t)
    accumulated = job.seen.undercut_length
    deeper = (f"{on}, over the {job.fmt(allowed)} general limit; up to {job.fmt(short_allowed)} is allowed for an "
              f"accumulated {job.fmt(most)} in any {job.fmt(window)}")
    if accumulated is None:
        return job.unmeasured("undercut", f"{deeper}: measure the accumulated length deeper than "
                              f"{job.fmt(allowed)} in the worst {job.fmt(window)}", short, measured=depth)
    if accumulated > window:
        raise ValueError(f"The undercut length over the general limit is counted in the worst {job.fmt(window)}; "
                         f"{job.fmt(accumulated)} is longer than that stretch of weld.")
    ok = _within(accumulated, most)
    return job.finding("undercut", ok, f"{deeper}; {job.fmt(accumulated)} accumulated is deeper than "
                       f"{job.fmt(allowed)}", length_limit,
                       applied=short_allowed, measured=depth)


def check_undercut_by_member(job: Job) -> Finding:
    """Cyclically loaded: the tighter limit on a primary member with the weld transverse to tensile stress."""
    critical = job.weld.primary_member and job.weld.transverse_to_tension
    limit = job.measured_limit("undercut_primary_transverse" if critical else "undercut_other")
    early = _undercut_unmeasured(job, limit)
    if early:
        return early
    where = ("a primary member with the weld transverse to tensile stress" if critical
             else "other than a primary member with the weld transverse to tensile stress")
    return _judge(job, "undercut", limit, job.seen.undercut_depth, job.weld.thickness,
                  f"undercut {job.fmt(job.seen.undercut_depth)} deep on {where}")


def _porosity_sums(job: Job) -> Finding:
    seen = job.seen
    counted_from = job.threshold("porosity_counted_from")
    sum_1, sum_12 = seen.porosity_sum_1in or ZERO, seen.porosity_sum_12in or ZERO
    notes = ""
    if seen.pore_max is not None and seen.pore_max >= counted_from and seen.pore_max > sum_1:
        sum_1, notes = seen.pore_max, " (at least the largest pore)"
    sum_12 = max(sum_12, sum_1)  # the worst 12 in holds the worst 1 in
    limit_1, limit_12 = job.measured_limit("porosity_sum_1in"), job.measured_limit("porosity_sum_12in")
    if sum_12 == ZERO:
        return job.finding("porosity", True, f"no piping porosity of {job.fmt(counted_from)} or larger seen",
                           limit_1, measured=ZERO)
    short, long = job.threshold("porosity_window_short"), job.threshold("porosity_window_long")
    allowed_1, _ = job.allowance(limit_1)
    allowed_12, _ = job.allowance(limit_12)
    ok_1, ok_12 = _within(sum_1, allowed_1), _within(sum_12, allowed_12)
    text = (f"piping porosity: sum of diameters {job.fmt(sum_1)}{notes} in the worst {job.fmt(short)} (limit "
            f"{job.fmt(allowed_1)}), {job.fmt(sum_12)} in the worst {job.fmt(long)} (limit {job.fmt(allowed_12)})")
    worst = limit_1 if not ok_1 or ok_12 else limit_12
    return job.finding("porosity", ok_1 and ok_12, text, worst, applied=allowed_1 if worst is limit_1 else allowed_12,
                       measured=sum_1 if worst is limit_1 else sum_12)


def check_porosity_sums(job: Job) -> Finding:
    """Statically loaded fillet welds: sums of piping pore diameters in any 1 in and any 12 in."""
    return _porosity_sums(job)


def check_porosity_pores(job: Job) -> Finding:
    """Cyclically loaded: the largest pore and the number of pores in each 4 in (stiffener-to-web: the sums)."""
    if job.weld.stiffener_to_web:
        return _porosity_sums(job)
    seen = job.seen
    limit = job.measured_limit("pore_max")
    count_limit = job.limit("pores_per_4in", Count)
    window = job.threshold("porosity_count_window")
    count = seen.pores_per_4in or 0
    any_seen = _positive(seen.pore_max) or count > 0 or _positive(seen.porosity_sum_1in) or \
        _positive(seen.porosity_sum_12in)
    if not any_seen:
        return job.finding("porosity", True, "no piping porosity seen", limit, measured=ZERO)
    if seen.pore_max is None:
        return job.unmeasured("porosity", "piping porosity seen: measure the largest pore and count the pores in "
                              f"the worst {job.fmt(window)}", limit)
    count = max(count, 1 if _positive(seen.pore_max) else 0)
    allowed, _ = job.allowance(limit)
    ok_size, ok_count = _within(seen.pore_max, allowed), count <= count_limit.value
    text = (f"piping porosity: largest pore {job.fmt(seen.pore_max)} (limit {job.fmt(allowed)}), {count} "
            f"pore{'s' if count != 1 else ''} in the worst {job.fmt(window)} (limit {count_limit.value})")
    if not ok_count and ok_size:
        return job.finding("porosity", False, text, count_limit, applied=count_limit.value, measured=count)
    return job.finding("porosity", ok_size and ok_count, text, limit, applied=allowed, measured=seen.pore_max)


def check_convexity(job: Job) -> Finding:
    """Convexity against the face width (AWS bands by W; ISO 503: 1 mm + k b, max)."""
    limit = job.measured_limit("convexity")
    convexity, width = job.seen.convexity, job.seen.face_width
    if not _positive(convexity):
        return job.finding("convexity", True, "no convexity measured", limit, measured=ZERO)
    if width is None:
        return job.unmeasured("convexity", f"convexity {job.fmt(convexity)}: measure the face width to judge it",
                              limit, measured=convexity)
    return _judge(job, "convexity", limit, convexity, width,
                  f"convexity {job.fmt(convexity)} on a face {job.fmt(width)} wide")


# --- checks: ISO 5817 -------------------------------------------------------------------------------------


def check_undercut_depth(job: Job) -> Finding:
    """ISO 5817 5011/5012: depth h against a share of the thickness t, capped."""
    limit = job.measured_limit("undercut")
    early = _undercut_unmeasured(job, limit)
    if early:
        return early
    t = job.needs("thickness", "to judge undercut (h against t)")
    return _judge(job, "undercut", limit, job.seen.undercut_depth, t,
                  f"undercut {job.fmt(job.seen.undercut_depth)} deep, t = {job.fmt(t)}")


def nominal_throat(job: Job) -> tuple[Length, str]:
    """(a, z text): the nominal throat and the nominal leg(s) of an ISO weld from weld['throat'] and/or the
    specified legs weld['size'] (and 'size2'), in ISO 2553 notation.

    Only the legs given: a is their effective throat (inspections.strength.effective_throat: 0.707 z for equal legs,
    z1 z2 / sqrt(z1^2 + z2^2) for unequal). Only the throat given: z = a / 0.707, for the message only. Both given:
    each as given (a deep-penetration weld may have a larger a than its legs show)."""
    a, z, z2 = job.weld.throat, job.weld.size, job.weld.size2
    if a is None and z is None:
        raise ValueError(f"{set_words(job.cset)} judges the throat against the nominal throat a: give the specified "
                         "throat a or the specified leg z (such as 5 mm or 7 mm).")
    if a is None:
        a = effective_throat(z, z2)
    if z is None:
        return a, job.fmt(Length(a.mm / THROAT_EQUAL_LEGS))
    return a, (f"{job.fmt(z)} x {job.fmt(z2)}" if z2 is not None and z2 != z else job.fmt(z))


def measured_throat(job: Job) -> tuple[Length, str]:
    """The measured throat a and how it was had: measured with a throat gauge, or from the smallest leg(s) z."""
    seen = job.seen
    if seen.throat is not None:
        return seen.throat, f"throat a = {job.fmt(seen.throat)} measured"
    if seen.min_size is not None and seen.min_size2 is not None:
        a = effective_throat(seen.min_size, seen.min_size2)
        return a, (f"throat a = {job.fmt(a)} (a = z1 z2 / sqrt(z1^2 + z2^2) of the smallest legs measured, "
                   f"z1 = {job.fmt(seen.min_size)}, z2 = {job.fmt(seen.min_size2)})")
    if seen.min_size is not None:
        a = effective_throat(seen.min_size)
        return a, f"throat a = {job.fmt(a)} (a = 0.707 x z measured, z = {job.fmt(seen.min_size)})"
    raise ValueError(f"{set_words(job.cset)} judges the throat a (items 5213/5214): give the smallest throat "
                     "measured (such as 4.5 mm), or the smallest leg measured, whose effective throat is then "
                     "judged.")


def check_throat(job: Job) -> Finding:
    """ISO 5817 5213 (too small: short imperfections only) and 5214 (too large) against the nominal throat a."""
    nominal, leg = nominal_throat(job)
    measured, how = measured_throat(job)
    against = f"the nominal a = {job.fmt(nominal)} (z = {leg})"
    short_length = job.seen.throat_short_length
    if measured < nominal:
        return _throat_shortfall(job, nominal, measured, f"{how} is {job.fmt(nominal - measured)} under {against}")
    if _positive(short_length):
        raise ValueError(f"The length with the throat under nominal is {job.fmt(short_length)}, but the throat "
                         f"judged ({job.fmt(measured)}) is not under the nominal a = {job.fmt(nominal)}: check both.")
    if measured > nominal:
        h = measured - nominal
        return _judge(job, "throat", job.measured_limit("throat_large"), h, nominal,
                      f"{how} is {job.fmt(h)} over {against}")
    return job.finding("throat", True, f"{how} equals {against}", job.limit("throat_small"), measured=ZERO)


def _throat_shortfall(job: Job, nominal: Length, measured: Length, text: str) -> Finding:
    """5213: the depth h against its limit, then its length: only a short imperfection is permitted (ISO 5817:2014,
    short imperfection: at most 25 mm in any 100 mm of weld, or 25 % of a weld shorter than 100 mm)."""
    limit = job.measured_limit("throat_small")
    h = nominal - measured
    allowed, status = job.allowance(limit, nominal)
    text = f"{text}; {job.rule_text(limit, allowed)}"
    if not _within(h, allowed):
        return job.finding("throat", False, text, limit, status=status, applied=allowed, measured=h)
    window = job.threshold("short_imperfection_window")
    length = job.seen.throat_short_length
    if length is None:
        return job.unmeasured("throat", f"{text}; only a short shortfall is permitted: measure the length with the "
                              f"throat under nominal in the worst {job.fmt(window)}", limit, measured=h)
    weld_length = job.needs("length", "to judge the length of a throat shortfall")
    if length > min(window, weld_length):
        raise ValueError(f"The length with the throat under nominal is counted in the worst {job.fmt(window)} of "
                         f"weld; {job.fmt(length)} is longer than that (or than the {job.fmt(weld_length)} weld).")
    if weld_length < window:
        share = job.limit("short_imperfection_share", Ratio)
        most, rule = weld_length * share.value, share
        what = f"{_percent(share.value)} of a weld shorter than {job.fmt(window)}"
    else:
        rule = job.measured_limit("short_imperfection")
        most = job.allowance(rule)[0]
        what = f"{job.fmt(most)} in any {job.fmt(window)} of weld"
    ok = _within(length, most)
    text += (f"; under nominal for {job.fmt(length)}: a short imperfection is at most {what} ({job.fmt(most)})"
             + ("" if ok else ", so this longer shortfall is not permitted"))
    found = job.finding("throat", ok, text, limit, status=status, applied=allowed, measured=h)
    return replace(found, source=f"{found.source}; {rule.cite()}")


def check_asymmetry(job: Job) -> Finding:
    """ISO 5817 512 excessive asymmetry: the difference of the legs h against plus + factor a (unequal legs not
    prescribed)."""
    limit = job.measured_limit("asymmetry")
    difference = job.seen.leg_difference
    if job.weld.size2 is not None and job.weld.size is not None and job.weld.size2 != job.weld.size:
        return job.finding("asymmetry", True, f"unequal legs specified ({job.fmt(job.weld.size)} x "
                           f"{job.fmt(job.weld.size2)}): item 512 does not apply", limit)
    if not _positive(difference):
        return job.finding("asymmetry", True, "no difference between the legs measured", limit, measured=ZERO)
    nominal, _ = nominal_throat(job)
    return _judge(job, "asymmetry", limit, difference, nominal,
                  f"legs differ by {job.fmt(difference)}, a = {job.fmt(nominal)}")


def check_weld_toe(job: Job) -> Finding:
    """ISO 5817 505 incorrect weld toe: the toe angle alpha at least the set's smallest angle."""
    limit = job.limit("weld_toe", Angle)
    angle = job.seen.toe_angle
    if angle is None:
        return job.finding("weld_toe", True, "no sharp weld toe seen (toe angle not measured)", limit)
    ok = angle >= limit.minimum
    return job.finding("weld_toe", ok, f"sharpest weld toe angle {_degrees(angle)}; the toe angle must be at least "
                       f"{_degrees(limit.minimum)}", limit, applied=limit.minimum, measured=angle)


def _degrees(value: Decimal) -> str:
    return f"{format(value.normalize(), 'f')}\u00b0"


def check_root_gap(job: Job) -> Finding:
    """ISO 5817 617 incorrect root gap for fillet welds: h against plus + factor a, capped."""
    limit = job.measured_limit("root_gap")
    gap = job.seen.root_gap
    if not _positive(gap):
        return job.finding("root_gap", True, "no root gap measured", limit, measured=ZERO)
    nominal, _ = nominal_throat(job)
    finding = _judge(job, "root_gap", limit, gap, nominal, f"root gap {job.fmt(gap)}, a = {job.fmt(nominal)}")
    if finding.ok:
        return finding
    return replace(finding, message=finding.message.replace(
        " \u2014 rejected", "; a larger throat may in certain cases make up for the gap: the engineer decides "
                            "\u2014 rejected"))


def check_overlap_by_width(job: Job) -> Finding:
    """ISO 5817 506 overlap: not permitted (B, C), or h, how far it reaches beyond the toe, against the face width."""
    limit = job.limit("overlap")
    seen, width = job.seen.overlap, job.seen.overlap_width
    if not (seen or _positive(width)):
        return job.finding("overlap", True, "no overlap seen", limit, measured=ZERO)
    if isinstance(limit, Permission):
        return _flag(job, "overlap", True, "overlap")
    if width is None:
        return job.unmeasured("overlap", "overlap seen: measure how far it reaches beyond the toe", limit)
    b = job.seen.face_width
    if b is None:
        return job.unmeasured("overlap", f"overlap {job.fmt(width)} beyond the toe: measure the face width to "
                              "judge it", limit, measured=width)
    return _judge(job, "overlap", limit, width, b, f"overlap {job.fmt(width)} beyond the toe on a face "
                  f"{job.fmt(b)} wide")


def check_surface_pore(job: Job) -> Finding:
    """ISO 5817 2017: the largest surface pore d against a share of the nominal throat a, capped."""
    limit = job.measured_limit("surface_pore")
    seen = job.seen
    if not (_positive(seen.pore_max) or (seen.pores_per_4in or 0) > 0 or _positive(seen.porosity_sum_1in)
            or _positive(seen.porosity_sum_12in)):
        return job.finding("porosity", True, "no surface pore seen", limit, measured=ZERO)
    if isinstance(limit, Permission) and limit.rank < 2:
        return job.finding("porosity", False, "surface pore seen: not permitted", limit, applied=ZERO,
                           measured=seen.pore_max)
    if seen.pore_max is None:
        return job.unmeasured("porosity", "surface pore seen: measure the largest pore diameter", limit)
    nominal, _ = nominal_throat(job)
    return _judge(job, "porosity", limit, seen.pore_max, nominal,
                  f"largest surface pore {job.fmt(seen.pore_max)}, a = {job.fmt(nominal)}", symbol="d")


def check_crater_pipe(job: Job) -> Finding:
    """ISO 5817 2025: the depth h of an end crater pipe against a share of t, capped."""
    limit = job.measured_limit("crater_pipe")
    depth = job.seen.crater_depth
    if not (job.seen.unfilled_crater or _positive(depth)):
        return job.finding("crater", True, "no end crater pipe seen", limit, measured=ZERO)
    if isinstance(limit, Permission) and limit.rank < 2:
        return job.finding("crater", False, "end crater pipe seen: not permitted", limit, applied=ZERO,
                           measured=depth)
    if depth is None:
        return job.unmeasured("crater", "end crater pipe seen: measure its depth", limit)
    t = job.needs("thickness", "to judge an end crater pipe (h against t)")
    return _judge(job, "crater", limit, depth, t, f"end crater pipe {job.fmt(depth)} deep, t = {job.fmt(t)}")


CHECKS = {
    "crack": check_crack,
    "fusion": check_fusion,
    "crater": check_crater,
    "overlap": check_overlap,
    "arc_strike": check_arc_strike,
    "undersize": check_undersize,
    "undercut_by_thickness": check_undercut_by_thickness,
    "undercut_by_member": check_undercut_by_member,
    "porosity_sums": check_porosity_sums,
    "porosity_pores": check_porosity_pores,
    "convexity": check_convexity,
    "undercut_depth": check_undercut_depth,
    "throat": check_throat,
    "surface_pore": check_surface_pore,
    "crater_pipe": check_crater_pipe,
    "crater_crack": check_crater_crack,
    "poor_restart": check_poor_restart,
    "spatter": check_spatter,
    "asymmetry": check_asymmetry,
    "weld_toe": check_weld_toe,
    "root_gap": check_root_gap,
    "overlap_by_width": check_overlap_by_width,
}


def _in_scope(job: Job) -> None:
    if "applies_above_thickness" in job.cset.limits and job.weld.thickness is not None:
        floor = job.threshold("applies_above_thickness")
        if job.weld.thickness <= floor:
            raise ValueError(f"{set_words(job.cset)} holds the limits for material thicker than {job.fmt(floor)} "
                             f"only; the base metal thickness given is {job.fmt(job.weld.thickness)}.")


def evaluate(criteria, weld, observed) -> Verdict:
    """Judge one weld's observations against a criteria set (a key, a CriteriaSet or its stored dict).

    Works on partial observations (what is absent was not seen), so a tablet page can call it as the
    inspector types. Accepted only when every finding is ok.
    """
    cset = resolve(criteria)
    unknown = [name for name in cset.checks if name not in CHECKS]
    if unknown:
        raise ValueError(f"{set_words(cset)} names unknown checks {', '.join(unknown)}; the checks are: "
                         f"{', '.join(CHECKS)}.")
    parsed_weld = read_weld(weld)
    system = verdict_system(cset, weld)
    seen = read_observed(observed, system)
    job = Job(cset=cset, system=system, weld=parsed_weld, seen=seen)
    _in_scope(job)
    findings = tuple(CHECKS[name](job) for name in cset.checks)
    return Verdict(accepted=all(f.ok for f in findings), findings=findings, criteria_key=cset.key,
                   criteria_version=cset.version, criteria_title=cset.title, system=job.system)
