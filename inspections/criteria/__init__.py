"""Visual acceptance criteria sets, as data: one module per standard and edition, a registry keyed by set key.

Adding a standard or edition: write a module beside aws_d1_1_2020.py that builds CriteriaSet objects from limit
values (each with its source and status) and names the checks it runs (see inspections.acceptance.CHECKS), then
add its SETS to _MODULES below. A client's own set is derived from a published one with derive() and stored as
a plain dict (CriteriaSet.to_dict / from_dict); evaluate() takes a key, a set or such a dict.
"""

from __future__ import annotations

from . import aws_d1_1_2020, iso_5817_2014
from .base import (
    Angle,
    Band,
    Banded,
    Count,
    CriteriaSet,
    Fixed,
    Limit,
    Permission,
    Proportional,
    Ratio,
    Threshold,
    from_dict,
    length_text,
)
from .base import derive as _derive

_MODULES = (aws_d1_1_2020, iso_5817_2014)
REGISTRY: dict[str, CriteriaSet] = {s.key: s for module in _MODULES for s in module.SETS}

__all__ = ["Angle", "Band", "Banded", "Count", "CriteriaSet", "Fixed", "Limit", "Permission", "Proportional", "Ratio",
           "Threshold", "REGISTRY", "derive", "from_dict", "get_criteria", "length_text", "list_criteria",
           "resolve"]


def get_criteria(key) -> CriteriaSet:
    """The published set with this key; an unknown key names the known ones."""
    if not isinstance(key, str) or key not in REGISTRY:
        raise ValueError(f"Unknown criteria set {key!r}; the known sets are: {', '.join(sorted(REGISTRY))}.")
    return REGISTRY[key]


def list_criteria() -> list[CriteriaSet]:
    """Every published set, by key (each has .key, .title, .version, .standard)."""
    return [REGISTRY[key] for key in sorted(REGISTRY)]


def resolve(criteria) -> CriteriaSet:
    """A set from a key, a CriteriaSet, or a stored dict (CriteriaSet.to_dict())."""
    if isinstance(criteria, CriteriaSet):
        return criteria
    if isinstance(criteria, dict):
        return from_dict(criteria)
    return get_criteria(criteria)


def derive(base_key, new_key: str, overrides: dict, title: str, signed_by_engineer: bool = False, *,
           version: int = 1) -> CriteriaSet:
    """A client's set from a published (or stored client) set: each override replaces one limit.

    A limit that allows more than the base's is refused (ValueError naming it) unless signed_by_engineer=True.
    The new set remembers base_key and base_version and starts at its own version (1 unless given).
    """
    return _derive(resolve(base_key), new_key, overrides, title, signed_by_engineer, version=version,
                   known_keys=REGISTRY)
