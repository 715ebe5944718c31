"""Numbers that run per job (NCR-J-2417-004, PKT-J-2417-002): taken one at a time, so none is taken twice."""

from inspections.models import Job


def next_in_job(job, taken) -> int:
    """The next number of a per-job sequence; `taken` is the queryset of the job's records already numbered.

    The caller holds a transaction. Locking the job row serialises everyone numbering records of that job (on
    PostgreSQL; SQLite's IMMEDIATE transactions already take one writer at a time), so two inspectors rejecting
    welds of one job at the same moment get consecutive numbers instead of one of them a server error.
    """
    Job.objects.select_for_update().filter(pk=job.pk).values_list("pk", flat=True).get()
    return taken.count() + 1
