"""The trade's vocabulary that procedures, welders, jobs and inspections share: units, processes, positions."""

from django.db import models


class UnitSystem(models.TextChoices):
    US = "US", "US customary (in, kip, °F)"
    SI = "SI", "SI (mm, kN, °C)"


class Process(models.TextChoices):
    SMAW = "SMAW", "SMAW (stick)"
    GMAW = "GMAW", "GMAW (MIG/MAG)"
    FCAW = "FCAW", "FCAW (flux-cored)"
    SAW = "SAW", "SAW (submerged arc)"
    GTAW = "GTAW", "GTAW (TIG)"


class Position(models.TextChoices):
    F = "F", "Flat"
    H = "H", "Horizontal"
    V = "V", "Vertical"
    OH = "OH", "Overhead"


# A weld's position on the weld map: AWS words, or ISO 6947 codes for a metric shop's ISO jobs.
WELD_POSITION_CHOICES = [
    ("AWS", Position.choices),
    ("ISO 6947", [("PA", "PA flat"), ("PB", "PB horizontal-vertical"), ("PC", "PC horizontal"),
                  ("PD", "PD horizontal-overhead"), ("PE", "PE overhead"), ("PF", "PF vertical up"),
                  ("PG", "PG vertical down")]),
]


class Current(models.TextChoices):
    AC = "AC", "AC"
    DCEP = "DCEP", "DCEP (reverse)"
    DCEN = "DCEN", "DCEN (straight)"


class Progression(models.TextChoices):
    """Vertical progression (AWS D1.1:2020 Table 6.12 for welders, Table 6.5 for procedures, from memory)."""

    UP = "up", "Vertical up"
    DOWN = "down", "Vertical down"


class Backing(models.TextChoices):
    """Backing of a groove weld (ISO 9606-1 welding details: ss nb, ss mb, bs)."""

    WITHOUT = "without", "Without backing (open root, ss nb)"
    WITH = "with", "With backing (ss mb)"
    BOTH_SIDES = "both_sides", "Welded from both sides (bs)"


# A weld map may name the process; GMAW-S (short-circuiting transfer) is a process of its own for welders and
# procedures alike. Blank on the weld: the WPS's process.
WELD_PROCESS_CHOICES = [*Process.choices, ("GMAW-S", "GMAW-S (short-circuiting)")]


class JointType(models.TextChoices):
    FILLET = "fillet", "Fillet"
    GROOVE = "groove", "Groove"


def split_codes(text: str) -> list[str]:
    """'F, H,OH' -> ['F', 'H', 'OH']: positions and joint types are stored as comma-separated codes."""
    return [part.strip() for part in (text or "").split(",") if part.strip()]
