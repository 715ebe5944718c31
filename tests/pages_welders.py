"""Role matrix rows for the welder pages (read by tests/test_role_matrix.py)."""

from tests.test_role_matrix import ALL_OK, only


def _welder(make):
    welder = make.make_welder()
    make.use_on_job(welder=welder)  # the customer's viewer reads the welders on its jobs (core.visibility)
    return {"pk": welder.pk}


def _qualification(make):
    qualification = make.make_qualification()
    make.use_on_job(welder=qualification.welder)
    return {"pk": qualification.pk}


PAGES = {
    "procedures:welder_list": (lambda make: {}, ALL_OK),
    "procedures:welder_create": (lambda make: {}, only("welding_engineer")),
    "procedures:welder_detail": (_welder, ALL_OK),
    "procedures:welder_edit": (_welder, only("welding_engineer")),
    "procedures:qualification_create": (_welder, only("welding_engineer")),
    "procedures:continuity_create": (_welder, only("qa_lead")),
    "procedures:welder_deactivate": (_welder, only("welding_engineer")),
    "procedures:welder_reactivate": (_welder, only("welding_engineer")),
    "procedures:welder_pdf": (_welder, ALL_OK),
    # A record with no report attached answers 404 to everyone signed in; reports are tested in test_welders_views.
    "procedures:qualification_report": (_qualification, {role: 404 for role in ALL_OK}),
}
