"""A weld's size in the words of its job: the one place pages, PDFs and the traveler say how big a weld is.

AWS jobs (either unit system) give the leg: 5/16", 1/4" × 3/8", 8 mm. ISO jobs lead with the throat a, the design
dimension of ISO 2553 and what ISO 5817 judges, and give the leg z where the drawing gives it: "a4" (the drawing gives
a), "a4 z6" (both), "a4.24 z6" (the drawing gives z; a is its effective throat, Weld.nominal_throat). Lengths along
the weld print in feet and inches from 2 ft on US jobs (core.units.format_length_long).
"""

from core.units import Length, format_length, format_length_long
from inspections import weld_symbols

TIMES = "\u00d7"


def throat_first(job) -> bool:
    """Does this job's code draw and judge the throat first (ISO 5817 / ISO 2553)? Read client_criteria with
    select_related on lists."""
    try:
        return weld_symbols.drawing_standard(job.criteria_for_evaluation()) == weld_symbols.ISO
    except ValueError:
        return False


def _bare(length: Length, system: str) -> str:
    """6 or 4.24 (mm) on SI jobs, 1/4 on US jobs: the number as a size prefix carries it (a4, z6)."""
    text = format_length(length, system)
    return text[: -len(" mm")] if system == "SI" else text.rstrip('"')


def size_text(weld, system: str, iso: bool) -> str:
    """The specified size of a weld as its job writes it (see the module docstring)."""
    unequal = weld.size2 is not None and weld.size2 != weld.size
    if iso:
        parts = [f"a{_bare(weld.nominal_throat, system)}"]
        if weld.size_on_drawing or weld.throat is None:
            parts.append(f"z{_bare(weld.size, system)}" + (f" {TIMES} {_bare(weld.size2, system)}" if unequal else ""))
        return " ".join(parts)
    text = format_length(weld.size, system)
    return f"{text} {TIMES} {format_length(weld.size2, system)}" if unequal else text


def weld_size(weld) -> str:
    """size_text in the weld's own job (weld.assembly.job must be loaded)."""
    job = weld.assembly.job
    return size_text(weld, job.unit_system, throat_first(job))


def run_length(length, system: str) -> str:
    """A length along the weld or the member: 30'-0" from 2 ft on US jobs, else as format_length."""
    return format_length_long(length, system) if length is not None else ""


__all__ = ["run_length", "size_text", "throat_first", "weld_size"]
