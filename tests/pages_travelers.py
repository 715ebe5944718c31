"""Role-matrix rows for the traveler and packet pages, and the builders the traveler tests share."""

from django.utils import timezone

from core.units import parse_force, parse_length
from inspections import packets
from procedures.models.wps import WPSState
from tests.conftest import ROLES

OK, DENIED = 200, 403
ALL_OK = {role: OK for role in ROLES}
QA_ONLY = {role: (OK if role == "qa_lead" else DENIED) for role in ROLES}


def build_assembly(make, welds=3, photos=0, *, job=None, required_every=5, inspect=True, **assembly):
    """An assembly with `welds` welds on an approved WPS, a qualified welder, fit-up and final inspections,
    and `photos` photos; every `required_every`-th weld carries a required strength."""
    job = job or make.make_job()
    assembly = make.make_assembly(job=job, **assembly)
    wps = getattr(make, "_traveler_wps", None)
    if wps is None:
        wps = make._traveler_wps = make.make_wps(state=WPSState.APPROVED, number=f"BSW-T{job.pk}")
        welder = make._traveler_welder = make.make_qualified_welder(name="Dana Kessler")
        make._traveler_inspector = make.make_user("inspector", first_name="Ruth", last_name="Okafor")
    welder, inspector = make._traveler_welder, make._traveler_inspector
    made = []
    for n in range(welds):
        weld = make.make_weld(
            assembly=assembly, mark=f"W{n + 1:02d}", wps=wps, welded_on=timezone.localdate(),  # WPS approved today
            sides=["arrow", "other", "both"][n % 3], all_around=(n % 4 == 3), field_weld=(n % 5 == 4),
            pitch=parse_length("12 in") if n % 6 == 5 else None,
            length=parse_length("4 in") if n % 6 == 5 else parse_length("12 in"),
            required_strength=parse_force("40 kip") if required_every and n % required_every == 0 else None)
        weld.welders.add(welder)
        made.append(weld)
    if inspect:
        for i, weld in enumerate(made):
            make.make_inspection(weld, user=inspector, stage="fit_up")
            final = make.make_inspection(weld, user=inspector, stage="final",
                                    min_size=parse_length("3/16 in") if i == 0 else parse_length("1/4 in"))
            if i < photos:
                make.make_photo(final)
        for extra in range(max(0, photos - len(made))):
            make.make_photo(make.make_inspection(made[extra % len(made)], user=inspector, stage="in_process"))
    assembly.refresh_from_db()
    return assembly


def _issued(make):
    """A stored traveler row with a small file (the role matrix needs no real render)."""
    from django.core.files.base import ContentFile

    from inspections.models import Traveler

    assembly = make.make_assembly()
    traveler = Traveler(assembly=assembly, revision=0, document_number=f"TRV-TEST-{assembly.pk}", sha256="0" * 64,
                        snapshot_sha256="0" * 64, pages=1, size_bytes=9, generator_version="test",
                        generated_by=make.make_user("qa_lead"), snapshot={})
    traveler.file.save(f"TRV-TEST-{assembly.pk}.pdf", ContentFile(b"%PDF-test"), save=False)
    traveler.save()
    return traveler


def _packet(make, done=False):
    from django.core.files.base import ContentFile

    from inspections.models import JobPacket

    assembly = make.make_assembly()
    packet = JobPacket.objects.create(job=assembly.job, document_number=f"PKT-TEST-{assembly.pk}",
                                      assembly_pks=[assembly.pk], requested_by=make.make_user("qa_lead"))
    if done:
        packets.start(packet, 1)
        packets.finish(packet, ContentFile(b"%PDF-test", name=f"{packet.document_number}.pdf"), "0" * 64, 1, [])
    return packet


PAGES = {
    "inspections:traveler_list": (lambda make: {"pk": make.make_assembly().pk}, ALL_OK),
    "inspections:traveler_index": (lambda make: {}, ALL_OK),
    "inspections:packet_index": (lambda make: {}, ALL_OK),
    "inspections:traveler_download": (lambda make: {"pk": _issued(make).pk}, ALL_OK),
    "inspections:traveler_sha256": (lambda make: {"pk": _issued(make).pk}, ALL_OK),
    "inspections:packet_list": (lambda make: {"pk": make.make_job().pk}, ALL_OK),
    "inspections:packet_detail": (lambda make: {"pk": _packet(make).pk}, ALL_OK),
    "inspections:packet_progress": (lambda make: {"pk": _packet(make).pk}, ALL_OK),
    "inspections:packet_download": (lambda make: {"pk": _packet(make, done=True).pk}, ALL_OK),
}

NOT_PAGES = {
    "inspections:traveler_issue": lambda make: {"pk": make.make_assembly().pk},
    "inspections:packet_start": lambda make: {"pk": make.make_job().pk},
}
