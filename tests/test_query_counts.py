"""Signing and every NCR step run a fixed number of queries, whatever the weld's or the job's history.

The counts are pinned exactly: a change that adds a query (an N+1, a lost select_related) fails here and has to
say why in the diff. Each is measured with history already present, so a count that grew with the data would
show as a different number on the second record.
"""

import pytest
from django.db import connection
from django.utils import timezone

from inspections.services.inspect import sign_inspection
from inspections.services.ncr import disposition_repair, disposition_scrap, disposition_use_as_is, open_ncr
from inspections.services.repairs import record_repair
from procedures.models.wps import WPSState
from tests.factory import L
from tests.test_jobs_pages import qualified_welder


@pytest.fixture(autouse=True)
def _content_types_known(db):
    """Django caches content types per process after their first use; count as a warm server does."""
    from django.apps import apps
    from django.contrib.contenttypes.models import ContentType

    ContentType.objects.get_for_models(*apps.get_models())


@pytest.fixture
def weld(make):
    """A weld of an assembly that already has history: three inspected welds and an NCR closed as use-as-is."""
    assembly = make.make_assembly()
    for _ in range(3):
        make.make_inspection(weld=make.make_weld(assembly=assembly), accepted=True)
    return make.make_weld(assembly=assembly)


def _weld(weld):
    from inspections.models import Weld

    return Weld.objects.select_related("assembly__job__client_criteria").get(pk=weld.pk)


@pytest.mark.parametrize("earlier", [0, 5])
def test_signing_an_accepted_final_inspection(make, weld, users, django_assert_num_queries, earlier):
    for _ in range(earlier):
        make.make_inspection(weld=weld, accepted=True, stage="in_process")
    fresh = _weld(weld)
    with django_assert_num_queries(SIGN_ACCEPTED):
        sign_inspection(fresh, {"min_size": L("1/4 in")}, "final", users["inspector"])


@pytest.mark.parametrize("earlier", [0, 5])
def test_signing_a_rejected_final_inspection(make, weld, users, django_assert_num_queries, earlier):
    for _ in range(earlier):
        make.make_inspection(weld=weld, accepted=True, stage="in_process")
    fresh = _weld(weld)
    with django_assert_num_queries(SIGN_REJECTED):
        sign_inspection(fresh, {"min_size": L("3/16 in"), "undersize_length": L("3 in")}, "final",
                        users["inspector"])


def test_opening_an_ncr_that_signing_already_opened(make, weld, users, django_assert_num_queries):
    inspection = make.make_inspection(weld=weld, accepted=False)
    with django_assert_num_queries(3):  # a savepoint around the NCR of that inspection, returned as it is
        open_ncr(inspection, users["inspector"], "Undersize")


def test_dispositioning_a_repair(make, weld, users, django_assert_num_queries):
    ncr = make.make_ncr(make.make_inspection(weld=weld, accepted=False))
    wps, welder = make.make_wps(state=WPSState.APPROVED), qualified_welder(make)
    with django_assert_num_queries(REPAIR):
        disposition_repair(ncr, users["qa_lead"], wps, welder, "Grind out and re-weld")


def test_closing_a_repair_by_an_accepted_reinspection(make, weld, users, django_assert_num_queries):
    ncr = make.make_ncr(make.make_inspection(weld=weld, accepted=False))
    wps, welder = make.make_wps(state=WPSState.APPROVED), qualified_welder(make)
    disposition_repair(ncr, users["qa_lead"], wps, welder)
    record_repair(ncr, users["inspector"], wps=wps, welders=[welder], welded_on=timezone.localdate())
    fresh = _weld(weld)
    with django_assert_num_queries(SIGN_CLOSING_REPAIR):
        sign_inspection(fresh, {"min_size": L("1/4 in")}, "final", users["inspector"])


def test_use_as_is(make, weld, users, django_assert_num_queries):
    ncr = make.make_ncr(make.make_inspection(weld=weld, accepted=False))
    with django_assert_num_queries(USE_AS_IS):
        disposition_use_as_is(ncr, users["qa_lead"], "M. Ferreira, PE", timezone.localdate())


def test_scrap(make, weld, users, django_assert_num_queries):
    ncr = make.make_ncr(make.make_inspection(weld=weld, accepted=False))
    with django_assert_num_queries(SCRAP):
        disposition_scrap(ncr, users["qa_lead"], "Burn-through at the cope")


# Savepoints count as queries on both databases (each transition is its own atomic block inside the signing; the
# assembly's refresh joins the signing's or the NCR step's own). A seal (core.seals) costs 4: the record read back,
# the chain head locked, the seal inserted, the head moved on; a signing that seals also locks the chain first (1),
# in its own atomic block where it was not one (2).
# Row locks cost a query each where the database locks rows (PostgreSQL) and none on SQLite, whose IMMEDIATE
# transaction holds the one write lock from its start: a signing locks the chain and its weld rows before anything
# else, and the assembly's refresh its row (then reads the state and the facts in one query).
LOCK = 1 if connection.features.has_select_for_update else 0
SIGN_ACCEPTED = 14 + 3 * LOCK  # credential; state; fit-up; insert + history; seal; point the weld; NCRs; refresh
SIGN_REJECTED = 25 + 3 * LOCK  # + the NCR (job lock, number, insert, history) and the assembly's move to rejected
REPAIR = 20 + LOCK  # the NCR and its records; the WPS's next revision; welder records; chain, transition, seal;
#                    refresh; the job's uses: the repair WPS and welder before, one insert each (inspections.uses)
SIGN_CLOSING_REPAIR = 28 + 3 * LOCK  # an accepted signing + the waiting NCR closed (transition, seal) + the
#                                      assembly's move back
USE_AS_IS = 23 + LOCK  # the NCR with its records; the capacity reads the weld's WPS; chain, transition, two seals;
#                        refresh
SCRAP = 25  # the NCR with its records; chain, its transition and two seals; the assembly's transition to scrapped


def test_signing_on_the_tablet(make, weld, users, client_as, django_assert_num_queries):
    """The POST of the tablet's sign button, as the inspector taps it: what the page reads around the signing."""
    from django.urls import reverse

    from tests.test_inspect_views import shown

    make.make_gauge()  # a register with a gauge: its choices are read when the form is drawn, not when it signs
    client = client_as("inspector")
    url = reverse("inspections:inspect_weld", args=[weld.pk])
    data = {"stage": "final", "min_size": "1/4"}
    data["shown_verdict"] = shown(client, weld, data)
    with django_assert_num_queries(SIGN_ON_THE_TABLET):
        response = client.post(url, data)
    assert response.status_code == 302 and weld.inspections.count() == 1


# session, user, the weld with its assembly, job and client set, the inspector's draft of it; then the signing
SIGN_ON_THE_TABLET = 4 + SIGN_ACCEPTED


def test_the_ncr_page_reads_a_fixed_number_of_queries(make, weld, client_as, django_assert_num_queries):
    """The NCR page: the NCR with its records, history, the capacity card and the recorded observations."""
    ncr = make.make_ncr(make.make_inspection(weld=weld, accepted=False))
    client = client_as("qa_lead")
    url = ncr.get_absolute_url()
    client.get(url)
    with django_assert_num_queries(NCR_PAGE_OPEN):
        assert client.get(url).status_code == 200
    disposition_repair(ncr, make.make_user("qa_lead"), make.make_wps(state=WPSState.APPROVED),
                       qualified_welder(make), "Grind out and re-weld")
    with django_assert_num_queries(NCR_PAGE_DISPOSITIONED):
        assert client.get(url).status_code == 200


# session, user, the NCR with its weld, assembly, job, WPS, inspection and people, its history, and the repair
# choices of the disposition forms (inspections.services.repairs.repair_choices: the approved WPSs that cover the
# weld, their successors when any, the welders qualified for it; an empty choice list asks nothing more)
NCR_PAGE_OPEN = 6
# dispositioned for repair: no disposition forms, but the repair record and the form to record it, offering the
# covering WPSs (two queries) and the welders qualified for the repair (active welders, their tests, their
# continuity runs and the entries near today), then its two lists, and the filler lots of the offered WPSs' classes
NCR_PAGE_DISPOSITIONED = 13
