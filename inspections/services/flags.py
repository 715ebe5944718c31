"""What a weld-map line should be flagged with, in words: the pages (weld form, weld page, tablet card and form)
read these, the rules stay in their engines.

- Cyclically loaded work: fillet welds of at least 3/16 in [5 mm] (procedures.prequalified.CYCLIC_FILLET_MIN,
  AWS D1.1/D1.1M:2020 clause 4 Part C, from memory). The weld map records what the drawing gives, so a smaller
  fillet on a cyclic job is flagged, not refused: the engineer of record answers it.
- A WPS reviewed for this job's loading (WPS.findings(loading=...)): its cyclic minimum-size finding.
"""

from core.units import format_length
from procedures.prequalified import CYCLIC_FILLET_MIN, SOURCE_CYCLIC_FILLET


def cyclic_fillet_flag(job, joint_type, size, size2=None) -> str | None:
    """The flag for a fillet under the cyclic minimum on a cyclically loaded job (None when it does not apply)."""
    if job.loading != "cyclic" or joint_type != "fillet" or size is None:
        return None
    system = job.unit_system
    least = CYCLIC_FILLET_MIN.in_system(system)
    smallest = min(leg for leg in (size, size2) if leg is not None)
    if smallest >= least:
        return None
    return (f"A {format_length(smallest, system)} fillet on a cyclically loaded job: fillet welds are at least "
            f"{format_length(least, system)} there ({SOURCE_CYCLIC_FILLET}). Ask the engineer of record.")


def weld_flags(weld) -> list[str]:
    """Every flag of a weld (weld.assembly.job loaded)."""
    flags = []
    cyclic = cyclic_fillet_flag(weld.assembly.job, weld.joint_type, weld.size, weld.size2)
    if cyclic:
        flags.append(cyclic)
    return flags


def wps_flags_for_job(wps, job) -> list[str]:
    """The WPS reviewed for this job's loading: the findings the job's loading adds (cyclic minimum fillet)."""
    loading = job.loading
    if wps is None or loading != "cyclic":
        return []
    return [f"WPS {wps.number}: {f.message} ({f.source})" for f in wps.findings(loading=loading)
            if f.rule == "cyclic_fillet_size"]
