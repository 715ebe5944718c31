"""Background work: job packets (django-tasks).

settings.TASKS runs tasks inline in development and tests (ImmediateBackend) and through the database
backend in production, where `manage.py db_worker` picks them up. A task takes primary keys only and is
enqueued after the transaction that created its record commits (inspections.packets.start_packet).
"""

from django_tasks import task

from inspections import packets


@task()
def build_packet_task(packet_pk: int) -> int:
    """Build one queued job packet; returns the packet's pk (its state says done or failed)."""
    return packets.build_packet(packet_pk).pk
