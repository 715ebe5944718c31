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


class JointType(models.TextChoices):
    FILLET = "fillet", "Fillet"
    GROOVE = "groove", "Groove"


def split_codes(text: str) -> list[str]:
    """'F, H,OH' -> ['F', 'H', 'OH']: positions and joint types are stored as comma-separated codes."""
    return [part.strip() for part in (text or "").split(",") if part.strip()]
