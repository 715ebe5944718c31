"""The demo shop loads through the same functions the pages use, and loading it twice changes nothing."""

from django.core.management import call_command

from core.models import User
from demo import scenario as demo
from inspections.models import NCR, Assembly, Inspection, Job
from procedures.models import WPS


def test_the_demo_shop_loads_once_and_again_without_duplicates(db):
    call_command("load_demo", verbosity=0)
    counts = (Job.objects.count(), Assembly.objects.count(), Inspection.objects.count(), WPS.objects.count())
    call_command("load_demo", verbosity=0)
    assert (Job.objects.count(), Assembly.objects.count(), Inspection.objects.count(), WPS.objects.count()) == counts
    assert {u.username for u in User.objects.all()} >= {"engineer", "inspector", "qalead", "viewer"}
    assert User.objects.get(username="qalead").check_password(demo.PASSWORD)


def test_the_demo_shows_every_state_a_user_meets(db):
    call_command("load_demo", verbosity=0)
    assert set(Job.objects.values_list("unit_system", flat=True)) == {"US", "SI"}
    assert set(WPS.objects.values_list("state", flat=True)) == {"draft", "submitted", "approved", "superseded",
                                                               "withdrawn"}
    assert Inspection.objects.filter(accepted=False).exists() and Inspection.objects.filter(accepted=True).exists()
    assert set(NCR.objects.values_list("state", flat=True)) >= {"open", "closed"}
    assert "released" in set(Assembly.objects.values_list("state", flat=True))


def test_the_demo_has_a_welder_in_each_continuity_state(db):
    from procedures.eligibility import welder_statuses
    from procedures.models import Welder

    call_command("load_demo", verbosity=0)
    states = {status.state for status in welder_statuses(Welder.objects.all()).values()}
    assert {"qualified", "lapsing", "lapsed"} <= states


def test_the_demo_shows_the_proof_chain_three_ways(db):
    from inspections.services.assemblies import release_blockers

    call_command("load_demo", verbosity=0)
    garage = {a.piece_mark: a for a in Assembly.objects.filter(job__number=demo.MARKER_JOB)}
    assert garage["BR3"].state == "released"  # every link held
    stair = release_blockers(garage["S7"])
    assert len(stair) == 1 and "BSW-103 rev 0 is draft: it was never approved" in stair[0]
    embed = release_blockers(garage["P2"])
    assert len(embed) == 1 and "welder B-23" in embed[0] and "continuity lapsed" in embed[0]
    girder = Assembly.objects.get(job__number="J-2422", piece_mark="G1")  # fit-up held, repair recorded, closed
    assert release_blockers(girder) == []
    canopy = Assembly.objects.get(job__number="J-2431", piece_mark="K-07")  # ISO: WPS supported by its WPQR
    assert not any("WPS" in b for b in release_blockers(canopy))
