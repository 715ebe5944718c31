"""The WPSs and welders each job uses, kept as a fact (inspections.uses, JobWPS, JobWelder): after every kind of
write that can name or drop a WPS or welder, the stored rows equal what a scan of the welds and NCRs computes, and a
customer's viewer is shown exactly those. Invented scenario (Brannock Steelworks)."""

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext
from django.urls import reverse

from core.visibility import visible
from inspections import uses
from inspections.models import Job, JobWelder, JobWPS, Weld
from inspections.services.ncr import disposition_repair
from inspections.services.weldmap_csv import import_weld_map
from procedures.models import WPS, Welder
from procedures.models.wps import WPSState


def stored():
    return (set(JobWPS.objects.values_list("job_id", "wps_id")),
            set(JobWelder.objects.values_list("job_id", "welder_id")))


def in_step():
    """The fact equals the truth, and says something (a check on empty sets proves nothing)."""
    truth = uses.computed(None)
    assert stored() == truth
    return truth


def test_a_weld_names_and_drops_its_wps_and_welders(make):
    job = make.make_job(number="J-2610")
    first, second = make.make_wps(number="BSW-611"), make.make_wps(number="BSW-612")
    weld = make.make_weld(make.make_assembly(job=job), wps=first)
    assert in_step() == ({(job.pk, first.pk)}, set())

    weld.wps = second
    weld.save()
    assert in_step()[0] == {(job.pk, second.pk)}  # the first WPS is no longer named on the job

    other = make.make_weld(weld.assembly, wps=second)
    weld.refresh_from_db()
    weld.wps = None
    weld.save()
    assert in_step()[0] == {(job.pk, second.pk)}  # still named by the other weld

    rook, vance = make.make_welder(name="D. Rook"), make.make_welder(name="T. Vance")
    weld.welders.add(rook, vance)
    assert in_step()[1] == {(job.pk, rook.pk), (job.pk, vance.pk)}
    weld.welders.remove(rook)
    assert in_step()[1] == {(job.pk, vance.pk)}
    vance.welds.add(other)  # from the welder's side
    weld.welders.clear()
    assert in_step()[1] == {(job.pk, vance.pk)}  # other weld still has T. Vance
    weld.welders.set([rook])
    assert in_step()[1] == {(job.pk, vance.pk), (job.pk, rook.pk)}
    vance.welds.remove(other)
    assert in_step()[1] == {(job.pk, rook.pk)}

    other.delete()
    weld.refresh_from_db()
    weld.delete()
    assert in_step() == (set(), set())


def test_a_weld_moved_to_another_jobs_assembly_takes_its_uses_along(make):
    first, second = make.make_job(number="J-2611"), make.make_job(number="J-2612")
    wps, welder = make.make_wps(number="BSW-613"), make.make_welder(name="M. Okafor")
    weld = make.make_weld(make.make_assembly(job=first), wps=wps)
    weld.welders.add(welder)
    weld.assembly = make.make_assembly(job=second)
    weld.save()
    assert in_step() == ({(second.pk, wps.pk)}, {(second.pk, welder.pk)})

    assembly = weld.assembly
    assembly.job = first
    assembly.save()
    assert in_step() == ({(first.pk, wps.pk)}, {(first.pk, welder.pk)})


def test_a_repair_disposition_names_its_wps_and_welder_on_the_job(make, users):
    weld = make.make_sound_weld()
    ncr = make.make_ncr(make.make_inspection(weld, accepted=False, user=users["inspector"]))
    repairer = make.make_qualified_welder(name="A. Lindqvist")
    repair_wps = make.make_wps(number="BSW-614", state=WPSState.APPROVED)
    disposition_repair(ncr, users["qa_lead"], repair_wps, repairer)
    wps, welders = in_step()
    job = weld.assembly.job_id
    assert (job, repair_wps.pk) in wps and (job, repairer.pk) in welders


def test_an_imported_weld_map_names_its_wpss(make):
    job = make.make_job(number="J-2615")
    make.make_assembly(job=job, piece_mark="B7")
    wps = make.make_wps(number="BSW-615", state=WPSState.APPROVED, joint_types="fillet, groove")
    import_weld_map(b"piece_mark,weld_mark,size,length,thickness1,thickness2,position,wps_number\n"
                    b"B7,W1,1/4 in,12 in,3/8 in,1/2 in,F,BSW-615\nB7,W2,1/4 in,12 in,3/8 in,1/2 in,F,\n", job)
    assert Weld.objects.filter(assembly__job=job).count() == 2
    assert in_step()[0] == {(job.pk, wps.pk)}


def test_rebuild_restores_the_fact_from_the_welds(make):
    weld = make.make_weld(wps=make.make_wps(number="BSW-616"))
    weld.welders.add(make.make_welder(name="K. Brandt"))
    before = in_step()
    JobWPS.objects.all().delete()
    JobWelder.objects.all().delete()
    uses.rebuild()
    assert stored() == before and before != (set(), set())


def test_the_viewer_sees_the_wps_of_its_job_and_no_longer_once_it_is_changed_away(make, users):
    viewer = users["viewer"]
    job = make.make_job(number="J-2617")  # the factory's customer: the viewer's
    other_customer = make.make_job(number="J-2618", customer="Osterhout Bridge Co.")
    ours, theirs = make.make_wps(number="BSW-617"), make.make_wps(number="BSW-618")
    weld = make.make_weld(make.make_assembly(job=job), wps=ours)
    make.make_weld(make.make_assembly(job=other_customer), wps=theirs)
    assert list(visible(viewer, WPS.objects.all())) == [ours]
    weld.wps = theirs
    weld.save()
    assert list(visible(viewer, WPS.objects.all())) == [theirs]
    weld.wps = None
    weld.save()
    assert not visible(viewer, WPS.objects.all()).exists()
    assert not visible(viewer, Welder.objects.all()).exists()
    assert Job.objects.count() == 2


@pytest.mark.parametrize("name", ["procedures:wps_list", "procedures:welder_list"])
def test_the_viewers_lists_read_the_fact_not_the_welds(make, users, client_as, name):
    """The viewer's list queries do not touch the weld table: their cost does not grow with a job's weld map."""
    job = make.make_job(number="J-2619")
    welder = make.make_welder(name="R. Haas")
    for _ in range(3):
        make.use_on_job(wps=make.make_wps(), welder=welder)
    make.make_weld(make.make_assembly(job=job), wps=make.make_wps())
    client = client_as("viewer")
    with CaptureQueriesContext(connection) as queries:
        response = client.get(reverse(name))
    assert response.status_code == 200
    assert "R. Haas" in response.text if name.endswith("welder_list") else response.text.count("BSW") >= 3
    weld_table = Weld._meta.db_table
    assert not [q["sql"] for q in queries if f'"{weld_table}"' in q["sql"]]
