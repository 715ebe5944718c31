"""Fit-up of a fillet weld, measured: the root opening (gap between the parts joined) against the job's code.

Plain Python, no Django. The fit-up hold point calls judge_root_opening with the gap the inspector gauged; the final
visual judgement calls increased_leg for the leg the weld must then reach.

AWS D1.1/D1.1M:2020 clause 7.21.1 (2015: 5.22.1), fillet weld assembly (clause number and values from memory, high
confidence): the parts are brought as close together as practicable; the root opening is at most 3/16 in [5 mm],
except that on material 3 in [75 mm] thick or more, where the parts cannot be closed enough after straightening and
in assembly, up to 5/16 in [8 mm] is allowed with suitable backing; from 1/16 in [2 mm] the fillet leg is increased
by the amount of the opening (or the contractor shows that the required effective throat was obtained). US and SI
values as the code prints them (1/16 in and 2 mm are not conversions of each other).

ISO 5817:2014 item 617, incorrect root gap for fillet welds, by quality level (the set's "root_gap" limit,
h <= plus + factor a, max; see inspections.criteria.iso_5817_2014 for its status): a gap within the limit needs no
larger leg; over it the joint is not accepted, though a corresponding increase of the throat may in certain cases
make up for it (from memory), which the engineer decides.
"""

from __future__ import annotations

from dataclasses import dataclass
from decimal import Decimal

from core.units import Length, UnitError, format_length, length_system, parse_length

from .criteria import CriteriaSet, resolve
from .criteria.base import FROM_MEMORY, Proportional, is_measured
from .strength import effective_throat

AWS = "AWS D1.1:2020"
_AWS_NAMES = {"aws d1.1:2020", "aws d1.1/d1.1m:2020", "aws-d1.1-2020"}
AWS_SOURCE = "AWS D1.1/D1.1M:2020 clause 7.21.1 (2015: 5.22.1), fit-up of fillet welds"
AWS_STATUS = f"{FROM_MEMORY}, high confidence"

_L = parse_length
ROOT_OPENING_MAX = {"US": _L("3/16 in"), "SI": _L("5 mm")}  # AWS clause 7.21.1 (from memory)
ROOT_OPENING_MAX_THICK = {"US": _L("5/16 in"), "SI": _L("8 mm")}  # material 3 in [75 mm] or more, with backing
THICK_FROM = {"US": _L("3 in"), "SI": _L("75 mm")}
INCREASE_FROM = {"US": _L("1/16 in"), "SI": _L("2 mm")}  # from this opening the leg grows by the opening
ZERO = Length(Decimal(0))


@dataclass(frozen=True)
class RootOpening:
    """The root opening judged: ok, what was measured against which limit, where the limit comes from, and how much
    the specified leg grows because of the opening (zero when it need not)."""

    ok: bool
    message: str
    source: str
    leg_increase: Length
    limit: Length
    opening: Length
    system: str
    code: str


def _length(value, what: str, *, zero_ok: bool) -> Length:
    try:
        length = parse_length(value)
    except UnitError as exc:
        raise UnitError(f"{what}: {exc}") from None
    if length.mm < 0 or (length.mm == 0 and not zero_ok):
        raise ValueError(f"{what} must be {'zero or more' if zero_ok else 'more than zero'}, such as 1/8 in or 3 mm.")
    return length


def _code(code):
    """('AWS', None) for AWS D1.1:2020 or an AWS criteria set; ('ISO', set) for a set that limits the root gap."""
    if isinstance(code, str) and code.strip().lower() in _AWS_NAMES:
        return "AWS", None
    try:
        cset = resolve(code)
    except ValueError:
        raise ValueError(f"Fit-up is judged to {AWS} or to an ISO 5817 quality level (such as 'iso-5817-2014-C'), "
                         f"not {code!r}.") from None
    if cset.standard.startswith("AWS D1.1"):
        return "AWS", cset
    if "root_gap" in cset.limits and is_measured(cset.limits["root_gap"]):
        return "ISO", cset
    raise ValueError(f"{cset.title} holds no root gap limit for fillet welds: judge the fit-up to {AWS} or to an "
                     "ISO 5817 quality level.")


def _system(system, *texts) -> str:
    if system is not None:
        if system not in ("US", "SI"):
            raise ValueError(f"The unit system of the job is 'US' or 'SI', not {system!r}.")
        return system
    for text in texts:
        found = length_system(text) if isinstance(text, str) else None
        if found:
            return found
    raise ValueError("The lengths were given without their unit: give the job's unit system, US or SI, so the "
                     "code's printed values for that system apply.")


def _fmt(length: Length, system: str) -> str:
    return format_length(length, system)


def judge_root_opening(opening, thicker_part, code=AWS, *, throat=None, size=None, system=None) -> RootOpening:
    """The root opening of a fillet weld joint against the code (AWS D1.1:2020, or an ISO 5817 set key / set).

    opening: the gap measured between the parts ("1/8 in", "3 mm"; zero for parts in contact); thicker_part: the
    thicker part joined (AWS allows the wider opening on material 3 in [75 mm] or more). ISO sets limit the gap by
    the nominal throat a: give throat (a) or size (the specified leg z, a = its effective throat). system ('US'
    or 'SI') is needed only when the lengths carry no unit text. Bad input raises ValueError saying what is wrong.
    """
    gap = _length(opening, "The root opening", zero_ok=True)
    thick = _length(thicker_part, "The thicker part joined", zero_ok=False)
    family, cset = _code(code)
    if family == "ISO":
        return _judge_iso(gap, thick, cset, throat, size)
    job = _system(system, opening, thicker_part)
    wide = thick >= THICK_FROM[job]
    limit = (ROOT_OPENING_MAX_THICK if wide else ROOT_OPENING_MAX)[job]
    increase = gap if gap >= INCREASE_FROM[job] else ZERO
    ok = gap <= limit
    on = (f"material {_fmt(THICK_FROM[job], job)} or more, and only where the parts cannot be closed further and "
          "backing is used" if wide else f"material under {_fmt(THICK_FROM[job], job)}")
    text = f"root opening {_fmt(gap, job)}; the limit is {_fmt(limit, job)} ({on})"
    if increase:
        text += (f"; from {_fmt(INCREASE_FROM[job], job)} the specified leg is increased by the opening, "
                 f"{_fmt(increase, job)} (or the required effective throat is shown to be obtained)")
    text += " \u2014 " + ("ready to weld" if ok else "rejected: close the joint and inspect again")
    return RootOpening(ok=ok, message=text, source=f"{AWS_SOURCE} ({AWS_STATUS})", leg_increase=increase,
                       limit=limit, opening=gap, system=job, code=AWS if cset is None else cset.key)


def _nominal_a(cset: CriteriaSet, throat, size) -> Length:
    if throat is not None:
        return _length(throat, "The nominal throat a", zero_ok=False)
    if size is not None:
        return effective_throat(_length(size, "The specified leg z", zero_ok=False))
    raise ValueError(f"{cset.title.split(',')[0]} limits the root gap by the nominal throat a: give the weld's "
                     "throat a or its specified leg z (such as 5 mm or 7 mm).")


def _judge_iso(gap: Length, thick: Length, cset: CriteriaSet, throat, size) -> RootOpening:
    limit = cset.limits["root_gap"]
    floor = cset.limits.get("applies_above_thickness")
    if floor is not None and floor.si is not None and thick <= floor.si:
        raise ValueError(f"{cset.title.split(',')[0]} holds the root gap limits for material thicker than "
                         f"{_fmt(floor.si, 'SI')} only; the thicker part joined is {_fmt(thick, 'SI')}.")
    a = _nominal_a(cset, throat, size)
    allowed = limit.allowance("SI", a)
    ok = allowed is None or gap <= allowed
    rule = f" ({limit.formula('h')})" if isinstance(limit, Proportional) else ""
    text = (f"root gap {_fmt(gap, 'SI')}, a = {_fmt(a, 'SI')}; the limit is "
            f"{'none' if allowed is None else _fmt(allowed, 'SI')}{rule}")
    if not ok:
        text += "; a larger throat may in certain cases make up for the gap: the engineer decides"
    text += " \u2014 " + ("ready to weld" if ok else "rejected: close the joint and inspect again")
    return RootOpening(ok=ok, message=text, source=limit.cite(), leg_increase=ZERO,
                       limit=allowed if allowed is not None else gap, opening=gap, system="SI", code=cset.key)


def increased_leg(specified, opening, code=AWS, *, system=None) -> Length:
    """The leg the fillet must reach for this root opening: AWS D1.1:2020 clause 7.21.1 (from memory) adds the
    opening to the specified leg from 1/16 in [2 mm]; ISO 5817 asks for no larger leg within its limit (a gap over
    it is rejected at fit-up), so the specified leg is returned."""
    leg = _length(specified, "The specified leg", zero_ok=False)
    gap = _length(opening, "The root opening", zero_ok=True)
    family, _ = _code(code)
    if family == "ISO":
        return leg
    job = _system(system, opening, specified)
    return leg + gap if gap >= INCREASE_FROM[job] else leg


__all__ = ["AWS", "RootOpening", "increased_leg", "judge_root_opening"]
