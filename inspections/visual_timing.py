"""When a final visual inspection may be made: the delay some quenched and tempered steels need.

Plain Python, no Django. AWS D1.1/D1.1M:2020 Table 8.1, note on the timing of visual inspection (note wording and
number from memory, high confidence for the steels and the 48 h): welds in ASTM A514, A517 and A709 Grade 100 and
100W (HPS 100W) steels are visually inspected no sooner than 48 hours after the weld is completed and has cooled to
ambient temperature, because delayed (hydrogen) cracking of these steels can appear hours after welding. Other
steels may be inspected as soon as the weld has cooled.

The steels are recognised through procedures.base_metals.base_metal_key, so 'ASTM A514/A514M', 'A514 Gr B',
'a709 grade hps 100w' all read as the rows below.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import datetime, timedelta

from procedures.base_metals import base_metal_key

SOURCE = ("AWS D1.1/D1.1M:2020 Table 8.1 note: visual inspection of welds in ASTM A514, A517 and A709 Gr 100, 100W "
          "and HPS 100W no sooner than 48 h after the weld has cooled to ambient temperature (from memory)")
DELAY = timedelta(hours=48)
# base_metal_key prefixes: any grade of A514 and A517; the 100 ksi grades of A709.
DELAYED_SPECS = ("A514", "A517")
DELAYED_KEYS = ("A709GR100", "A709GR100W", "A709GRHPS100W")


def _key(name: str) -> str:
    return base_metal_key(name)


def needs_delay(name: str) -> bool:
    """Does a weld in this steel wait 48 h for its final visual (Table 8.1 note)?"""
    key = _key(name)
    return key.startswith(DELAYED_SPECS) or key in DELAYED_KEYS


@dataclass(frozen=True)
class VisualTiming:
    """The earliest moment a final visual may be made, and why (no delay: earliest is the completion itself)."""

    steels: tuple[str, ...]  # the steels that impose the delay, as given
    completed: datetime | None  # when the weld was completed and cooled (None: not recorded)
    earliest: datetime | None  # None: it cannot be said (steels that need the delay, no completion recorded)
    source: str = SOURCE

    @property
    def delayed(self) -> bool:
        return bool(self.steels)

    def allows(self, moment: datetime) -> bool:
        """May the final visual be signed at this moment?"""
        if not self.delayed:
            return True
        return self.earliest is not None and moment >= self.earliest

    def refusal(self, moment: datetime, shown=lambda t: t.isoformat(timespec="minutes")) -> str | None:
        """Why not now (None: it may be made now); `shown` prints a datetime in the shop's words."""
        if self.allows(moment):
            return None
        steels = ", ".join(self.steels)
        if self.earliest is None:
            return (f"{steels}: the final visual is made no sooner than 48 h after the weld has cooled; record when "
                    "the weld was completed (date and time) to know when.")
        return (f"{steels}: the final visual is made no sooner than 48 h after the weld has cooled "
                f"(completed {shown(self.completed)}); it becomes possible at {shown(self.earliest)}.")


def final_visual_timing(base_metals, completed: datetime | None) -> VisualTiming:
    """The timing of the final visual of a weld joining these steels (names such as 'ASTM A514'), completed and
    cooled at `completed` (an aware datetime, or None when not recorded)."""
    if isinstance(base_metals, str):
        base_metals = [part for part in base_metals.split(",")]
    steels = tuple(name.strip() for name in base_metals if isinstance(name, str) and name.strip()
                   and needs_delay(name))
    if not steels:
        return VisualTiming((), completed, completed)
    return VisualTiming(steels, completed, completed + DELAY if completed is not None else None)


__all__ = ["DELAY", "SOURCE", "VisualTiming", "final_visual_timing", "needs_delay"]
