"""The invented demo shop. Every name, number and record here is made up for the demo.

Brannock Steelworks fabricates for three jobs: a parking-garage frame (US customary, AWS D1.1
statically loaded), crane-runway girders (US customary, AWS D1.1 cyclically loaded) and a ferry-terminal
canopy (SI, ISO 5817 quality level C). Records go through the same functions the pages use, so the
demo shows verdicts, findings and states exactly as the app computes them.
"""

from datetime import date, timedelta

from django.utils import timezone

from legwork.models import User
from legwork.roles import Role
from legwork.units import parse_force, parse_length, parse_speed, parse_temperature

PASSWORD = "brannock-demo"
MARKER_JOB = "J-2417"

_ACCOUNTS = [
    ("engineer", "Eli", "Marsh", Role.WELDING_ENGINEER, ""),
    ("inspector", "Rosa", "Quint", Role.INSPECTOR, "CWI 21-0417"),
    ("qalead", "Hank", "Delaney", Role.QA_LEAD, ""),
    ("viewer", "Mara", "Okonjo", Role.VIEWER, ""),
]


def L(text):  # noqa: N802 - reads like the unit it builds
    return parse_length(text)


def accounts():
    return [(u, f"{first} {last}", Role(role).label) for u, first, last, role, _ in _ACCOUNTS]


def _users():
    users = {}
    for username, first, last, role, stamp in _ACCOUNTS:
        user, _ = User.objects.get_or_create(username=username, defaults=dict(
            first_name=first, last_name=last, role=role, stamp=stamp))
        user.set_password(PASSWORD)
        user.save()
        users[role] = user
    return users


def load() -> bool:
    """Load the shop unless it is there; always (re)set the demo accounts. True when records were made."""
    from inspections.models import Job

    users = _users()
    if Job.objects.filter(number=MARKER_JOB).exists():
        return False
    today = timezone.localdate()
    pqrs = _pqrs()
    procedures = _procedures(users, pqrs)
    welders = _welders(users, today)
    _jobs(users, procedures, welders, today)
    return True


def _pqrs():
    from procedures.models import PQR

    return {
        "fcaw": PQR.objects.create(
            number="PQR-BSW-031", test_date=date(2024, 5, 14), process="FCAW", electrode="E71T-1C",
            electrode_diameter=L("0.045 in"), current="DCEP", amperage=205, voltage="25.5",
            travel_speed=parse_speed("11 in/min"), position="3G", base_metal="ASTM A572 Gr 50",
            thickness=L("1 in"), shielding_gas="100% CO2", preheat=parse_temperature("60 F"),
            visual="pass", macroetch="pass", bends="pass", tensiles="pass", laboratory="Keystone Materials Lab",
        ),
        "gmaw_si": PQR.objects.create(
            number="WPQR-BSW-M07", code="ISO 15609-1:2019", unit_system="SI", test_date=date(2025, 2, 3),
            process="GMAW", electrode="ER70S-6", electrode_diameter=L("1.2 mm"), current="DCEP", amperage=270,
            voltage="28", travel_speed=parse_speed("380 mm/min"), position="PB", base_metal="EN 10025-2 S355J2",
            thickness=L("12 mm"), shielding_gas="M21 (Ar + 18% CO2)", preheat=parse_temperature("15 C"),
            visual="pass", macroetch="pass", fillet_break="pass", laboratory="Keystone Materials Lab",
        ),
    }


def _procedures(users, pqrs):
    from procedures.models import WPS

    common_fcaw = dict(
        title="FCAW fillet welds, structural shapes, all positions", code="AWS D1.1:2020", unit_system="US",
        process="FCAW", electrode="E71T-1C", electrode_diameter=L("0.045 in"), current="DCEP",
        amperage_min=160, amperage_max=220, voltage_min=22, voltage_max=27,
        wire_feed_min=parse_speed("250 in/min"), wire_feed_max=parse_speed("400 in/min"),
        travel_speed_min=parse_speed("8 in/min"), travel_speed_max=parse_speed("16 in/min"),
        ctwd_min=L("1/2 in"), ctwd_max=L("1 in"), work_angle="45° ± 10°", travel_angle="5° to 15° drag",
        technique="stringer", passes="both", interpass_cleaning="Chip slag and wire brush between passes",
        shielding_gas="100% CO2", positions="F, H, V, OH", joint_types="fillet",
        base_metals="ASTM A992, ASTM A572 Gr 50, ASTM A36", thickness_min=L("1/4 in"),
        thickness_max=L("1-1/2 in"), fillet_size_min=L("3/16 in"), fillet_size_max=L("5/8 in"),
        single_pass_size_max=L("5/16 in"), preheat_min=parse_temperature("50 F"),
        interpass_max=parse_temperature("550 F"),
    )
    records = {}
    old = WPS.objects.create(number="BSW-101", revision=0, created_by=users[Role.WELDING_ENGINEER],
                             **{**common_fcaw, "ctwd_max": L("3/4 in")})
    records["fcaw_old"] = old
    records["fcaw"] = dict(common_fcaw)
    records["smaw"] = WPS.objects.create(
        number="BSW-102", revision=0, title="SMAW fillet welds, low-hydrogen, all positions",
        code="AWS D1.1:2020", unit_system="US", process="SMAW", electrode="E7018",
        electrode_diameter=L("1/8 in"), current="DCEP", amperage_min=110, amperage_max=150, voltage_min=21,
        voltage_max=25, travel_speed_min=parse_speed("4 in/min"), travel_speed_max=parse_speed("10 in/min"),
        technique="stringer", passes="both", interpass_cleaning="Remove slag completely",
        positions="F, H, V, OH", joint_types="fillet, groove", base_metals="ASTM A36, ASTM A992",
        thickness_min=L("1/8 in"), thickness_max=L("2 in"), fillet_size_min=L("3/16 in"),
        fillet_size_max=L("1/2 in"), single_pass_size_max=L("5/16 in"), preheat_min=parse_temperature("50 F"),
        interpass_max=parse_temperature("450 F"), created_by=users[Role.WELDING_ENGINEER],
    )
    records["gmaw_s"] = WPS.objects.create(
        number="BSW-103", revision=0, title="GMAW short-circuit tack and seal welds, light gauge",
        code="AWS D1.1:2020", unit_system="US", process="GMAW", transfer="short_circuit", electrode="ER70S-6",
        electrode_diameter=L("0.035 in"), current="DCEP", amperage_min=90, amperage_max=140, voltage_min=17,
        voltage_max=20, travel_speed_min=parse_speed("10 in/min"), travel_speed_max=parse_speed("18 in/min"),
        ctwd_min=L("3/8 in"), ctwd_max=L("1/2 in"), shielding_gas="75% Ar / 25% CO2",
        positions="F, H, V", joint_types="fillet", base_metals="ASTM A36", thickness_min=L("1/8 in"),
        thickness_max=L("3/8 in"), fillet_size_min=L("1/8 in"), fillet_size_max=L("3/16 in"),
        single_pass_size_max=L("3/16 in"), preheat_min=parse_temperature("50 F"),
        created_by=users[Role.WELDING_ENGINEER],
    )
    records["saw"] = WPS.objects.create(
        number="BSW-105", revision=0, title="SAW fillet welds, girder web-to-flange, flat",
        code="AWS D1.1:2020", unit_system="US", process="SAW", electrode="F7A2-EM12K",
        electrode_diameter=L("5/32 in"), current="DCEP", amperage_min=500, amperage_max=650, voltage_min=30,
        voltage_max=34, travel_speed_min=parse_speed("18 in/min"), travel_speed_max=parse_speed("26 in/min"),
        ctwd_min=L("1 in"), ctwd_max=L("1-1/4 in"), positions="F", joint_types="fillet",
        base_metals="ASTM A572 Gr 50", thickness_min=L("1/2 in"), thickness_max=L("2 in"),
        fillet_size_min=L("5/16 in"), fillet_size_max=L("1/2 in"), single_pass_size_max=L("1/2 in"),
        preheat_min=parse_temperature("50 F"), created_by=users[Role.WELDING_ENGINEER],
    )
    records["gmaw_si"] = WPS.objects.create(
        number="BSW-M201", revision=0, title="GMAW spray fillet welds, S355, PA and PB",
        code="ISO 15609-1:2019", unit_system="SI", basis="test", process="GMAW", transfer="spray",
        electrode="ER70S-6", electrode_diameter=L("1.2 mm"), current="DCEP", amperage_min=240, amperage_max=300,
        voltage_min=26, voltage_max=30, travel_speed_min=parse_speed("300 mm/min"),
        travel_speed_max=parse_speed("450 mm/min"), ctwd_min=L("15 mm"), ctwd_max=L("20 mm"),
        shielding_gas="M21 (Ar + 18% CO2)", positions="F, H", joint_types="fillet",
        base_metals="EN 10025-2 S355J2", thickness_min=L("6 mm"), thickness_max=L("24 mm"),
        fillet_size_min=L("4 mm"), fillet_size_max=L("10 mm"), single_pass_size_max=L("8 mm"),
        preheat_min=parse_temperature("15 C"), interpass_max=parse_temperature("250 C"),
        created_by=users[Role.WELDING_ENGINEER],
    )
    records["gmaw_si"].pqrs.add(pqrs["gmaw_si"])
    return records


def _welders(users, today):
    from procedures.models import Welder

    welders = {
        "B-07": Welder.objects.create(name="Dana Whitcomb", stamp="B-07", employer="Brannock Steelworks"),
        "B-12": Welder.objects.create(name="Luis Ferreira", stamp="B-12", employer="Brannock Steelworks"),
        "B-19": Welder.objects.create(name="Priya Nandakumar", stamp="B-19", employer="Brannock Steelworks"),
        "B-23": Welder.objects.create(name="Tomas Halloran", stamp="B-23", employer="Brannock Steelworks"),
        "N-31": Welder.objects.create(name="Ingrid Solheim", stamp="N-31", employer="Brannock Steelworks"),
    }
    return welders


def _jobs(users, procedures, welders, today):
    from inspections.models import Job

    Job.objects.create(number=MARKER_JOB, name="Harlan Transit Garage, level 2 framing",
                       customer="Harlan County Transit Authority", unit_system="US",
                       criteria_key="aws-d1.1-2020-static")
    Job.objects.create(number="J-2422", name="Crane runway girders, bay 3", customer="Ostrander Mill Services",
                       unit_system="US", criteria_key="aws-d1.1-2020-cyclic")
    Job.objects.create(number="J-2431", name="Ferry terminal canopy, Nordvik quay",
                       customer="Nordvik Havn (invented)", unit_system="SI", criteria_key="iso-5817-2014-C")


__all__ = ["PASSWORD", "accounts", "load", "parse_force", "timedelta"]
