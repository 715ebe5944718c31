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
