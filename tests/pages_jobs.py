"""Role-matrix rows for jobs, assemblies, weld maps, NCRs and criteria set pages."""

from tests.conftest import ROLES

OK, DENIED = 200, 403
ALL_OK = {role: OK for role in ROLES}


def only(*roles):
    return {role: (OK if role in roles else DENIED) for role in ROLES}


MANAGERS = only("welding_engineer", "qa_lead")
RECORDERS = only("welding_engineer", "inspector", "qa_lead")


def _job(make):
    return {"pk": make.make_job().pk}


def _assembly(make):
    return {"pk": make.make_assembly().pk}


def _weld(make):
    return {"pk": make.make_weld().pk}


def _ncr(make):
    return {"pk": make.make_ncr().pk}


PAGES = {
    "inspections:job_list": (lambda make: {}, ALL_OK),
    "inspections:job_create": (lambda make: {}, MANAGERS),
    "inspections:job_detail": (_job, ALL_OK),
    "inspections:job_edit": (_job, MANAGERS),
    "inspections:assembly_edit": (_assembly, MANAGERS),
    "inspections:weld_revise": (lambda make: {"pk": make.make_inspection().weld_id}, MANAGERS),
    "inspections:assembly_create": (_job, MANAGERS),
    "inspections:weldmap_import": (_job, MANAGERS),
    "inspections:weldmap_export": (_job, ALL_OK),
    "inspections:assembly_find": (lambda make: {}, ALL_OK),
    "inspections:assembly_list": (lambda make: {}, ALL_OK),
    "inspections:inspection_list": (lambda make: {}, ALL_OK),
    "inspections:assembly_detail": (_assembly, ALL_OK),
    "inspections:weld_create": (_assembly, MANAGERS),
    "inspections:weld_check": (_assembly, RECORDERS),
    "inspections:weld_detail": (_weld, ALL_OK),
    "inspections:weld_edit": (_weld, RECORDERS),
    "inspections:ncr_list": (lambda make: {}, ALL_OK),
    "inspections:ncr_detail": (_ncr, ALL_OK),
    "inspections:criteria_list": (lambda make: {}, ALL_OK),
    "inspections:criteria_derive": (lambda make: {}, only("qa_lead")),
    "inspections:criteria_detail": (lambda make: {"key": "aws-d1.1-2020-static"}, ALL_OK),
    "inspections:criteria_client_detail": (lambda make: {"pk": _used_client_set(make).pk}, ALL_OK),
}

def _repair_waiting(make):
    """An NCR dispositioned for repair, its repair not yet recorded as welded (the NCR page shows that form)."""
    from inspections.services.ncr import disposition_repair

    ncr = make.make_ncr()
    disposition_repair(ncr, make.make_user("qa_lead"), make.approved_wps(), make.make_qualified_welder())
    return ncr.pk


NOT_PAGES = {
    "inspections:assembly_submit": _assembly,
    "inspections:assembly_release": _assembly,
    "inspections:ncr_disposition": lambda make: {"pk": make.make_ncr().pk, "kind": "scrap"},
    "inspections:ncr_repair": lambda make: {"pk": _repair_waiting(make)},
}


def _used_client_set(make):
    """A client set one of the factory customer's jobs is judged by (what that customer's viewer may read)."""
    cset = make_client_set(make, key=f"client-{make.customer_name[:20].lower().replace(' ', '-')}")
    make.use_on_job(criteria=cset)
    return cset


def make_client_set(make, key="harlan-transit-static", overrides=None, version=1):
    """A stored client set derived (through inspections.criteria.derive) from the AWS static set."""
    from inspections.criteria import derive
    from inspections.models import ClientCriteriaSet

    derived = derive("aws-d1.1-2020-static", key, overrides or {"undercut_thin": {"us": "1/64 in", "si": "0.5 mm"}},
                     "Harlan Transit, static", version=version)
    return ClientCriteriaSet.objects.create(key=key, version=version, title=derived.title, base_key=derived.base_key,
                                            definition=derived.to_dict(), created_by=make.make_user("qa_lead"))
