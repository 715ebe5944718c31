"""A small shop's worth of signed records, every kind the record chain seals, made through the real steps.

Used by the chain, backup and export tests: an approved WPS, inspections (fit-up, final, rejected), photos, an NCR
repaired and closed by re-inspection, one accepted as is, a released assembly (its welds on welders), an issued
traveler, optionally a built packet, and a welder's test report file. Times carry microseconds (timezone.now()).
"""

from datetime import timedelta

from django.core.files.base import ContentFile
from django.utils import timezone

from inspections.services.assemblies import release
from inspections.services.ncr import disposition_repair, disposition_use_as_is
from inspections.services.repairs import record_repair
from procedures.models.wps import WPSState
from tests.pages_travelers import build_assembly


def build(make, *, packet=False, issue_traveler=True) -> dict:
    qa = make.make_user("qa_lead", first_name="Mara", last_name="Lindqvist")
    shipped = build_assembly(make, welds=2, photos=1, piece_mark="B101")  # W01 rejected: an NCR opens
    job = shipped.job
    welds = list(shipped.welds.order_by("mark"))
    wps, welder, inspector = make._traveler_wps, make._traveler_welder, make._traveler_inspector
    # The rejected weld is repaired and re-inspected: the NCR is dispositioned, then closed.
    ncr = welds[0].ncrs.get()
    repair_welder = make.make_welder(name="Ines Halvorsen")
    make.make_qualification(welder=repair_welder, test_date=timezone.localdate() - timedelta(days=30))
    disposition_repair(ncr, qa, wps, repair_welder, "Grind out the short leg and re-weld")
    record_repair(ncr, inspector, wps=wps, welders=[repair_welder], welded_on=timezone.localdate())
    make.make_inspection(welds[0], user=inspector, stage="final")
    release(shipped, qa, "All welds accepted at final visual")

    held = build_assembly(make, welds=2, job=job, piece_mark="B102")  # W01 rejected again: accepted as is
    use_as_is = held.welds.get(mark="W01").ncrs.get()
    disposition_use_as_is(use_as_is, qa, "P. Lindqvist, PE (engineer of record)", timezone.localdate(),
                          "Capacity checked as inspected")
    traveler = None
    if issue_traveler:
        from inspections.traveler import issue

        traveler, _created = issue(held, qa)
    built = None
    if packet:
        from inspections import packets

        built = packets.start_packet(job, [shipped.pk, held.pk], qa)
        built = packets.build_packet(built.pk)  # what the task runs after commit (a no-op if it already ran)
    qualification = make.make_qualification(welder=welder, report=ContentFile(b"%PDF-1.4 test report\n",
                                                                              name="wpq-dana.pdf"))
    superseded = make.make_wps(state=WPSState.SUPERSEDED)
    return {"job": job, "shipped": shipped, "held": held, "ncr": ncr, "use_as_is": use_as_is, "qa": qa,
            "traveler": traveler, "packet": built, "qualification": qualification, "wps": wps,
            "superseded": superseded, "inspection": welds[1].latest_final, "photo": _a_photo(shipped)}


def _a_photo(assembly):
    from inspections.models import Photo

    return Photo.objects.filter(inspection__weld__assembly=assembly).first()
