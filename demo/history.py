"""Months of invented shop history, so the trends page has something to say. Every record is made up.

Two finished jobs (J-2405 for the garage's owner, J-2408 for the mill) were welded and inspected week by week over
the last HISTORY_WEEKS weeks, every record through the real steps (WPS approval, weld map, signing, NCR
disposition, repair, re-inspection, release) with the clock moved back to the day it happened (time-machine), so
every date is the one a person would have signed. Dana Whitcomb (B-07) rejects about one weld in twenty all along;
Luis Ferreira (B-12) starts as steady and drifts: his reject rate climbs week by week, mostly undersize and undercut,
the story a QA lead should read off the charts. One late NCR is left open (awaiting disposition) to age on the
morning page.

The outcomes come from a seeded random generator: the same history, relative to the day the demo loads, each time.
"""

from __future__ import annotations

import random
from datetime import date, datetime, time, timedelta

import time_machine
from django.utils import timezone

from core.roles import Role
from core.units import parse_length, parse_speed, parse_temperature

HISTORY_WEEKS = 20
SEED = 2405


def L(text):  # noqa: N802 - reads like the unit it builds
    return parse_length(text)


def _at(day: date, hour: int):
    return timezone.make_aware(datetime.combine(day, time(hour, 0)))


# What a rejected weld looked like, by cause: observations the acceptance engine rejects on a 1/4 in fillet of 12 in
# on 3/8 in plate (AWS D1.1:2020 static). Names are inspections.observations names.
DEFECTS = {
    "undersize": {"min_size": L("3/16 in"), "undersize_length": L("3 in")},
    "undercut": {"min_size": L("1/4 in"), "undercut_depth": L("1/16 in"), "undercut_length": L("3 in")},
    "porosity": {"min_size": L("1/4 in"), "porosity_sum_1in": L("1/2 in")},
    "overlap": {"min_size": L("1/4 in"), "overlap": True},
}
SOUND = {"min_size": L("1/4 in")}


def reject_chance(stamp: str, week: int) -> float:
    """The invented drift: B-12 from 4 % in the first week to 60 % in the last; everyone else 5 %."""
    if stamp == "B-12":
        return 0.04 + 0.56 * week / (HISTORY_WEEKS - 1)
    return 0.05


def _cause(rng: random.Random, stamp: str) -> str:
    # B-12's drift is mostly undersize and undercut (travel speed creeping up); the others' rejections are spread.
    weights = {"undersize": 5, "undercut": 3, "porosity": 1, "overlap": 1} if stamp == "B-12" else \
        {"undersize": 1, "undercut": 1, "porosity": 1, "overlap": 1}
    return rng.choices(list(weights), weights=list(weights.values()))[0]


def _wps(users, first_day):
    """BSW-104, the FCAW procedure the history jobs were welded to: approved a week before the first weld."""
    from procedures.models import WPS
    from procedures.services import wps as wps_steps

    with time_machine.travel(_at(first_day - timedelta(days=7), 8), tick=True):
        wps = WPS.objects.create(
            number="BSW-104", revision=0, title="FCAW fillet welds, flat and horizontal, purlins and clips",
            code="AWS D1.1:2020", unit_system="US", process="FCAW", electrode="E71T-1C",
            electrode_diameter=L("0.045 in"), current="DCEP", amperage_min=160, amperage_max=220, voltage_min=22,
            voltage_max=27, wire_feed_min=parse_speed("250 in/min"), wire_feed_max=parse_speed("400 in/min"),
            travel_speed_min=parse_speed("8 in/min"), travel_speed_max=parse_speed("16 in/min"),
            ctwd_min=L("1/2 in"), ctwd_max=L("1 in"), technique="stringer", passes="single",
            shielding_gas="100% CO2", positions="F, H", joint_types="fillet",
            base_metals="ASTM A992, ASTM A572 Gr 50, ASTM A36", thickness_min=L("1/4 in"),
            thickness_max=L("1-1/2 in"), fillet_size_min=L("3/16 in"), fillet_size_max=L("5/16 in"),
            single_pass_size_max=L("5/16 in"), preheat_min=parse_temperature("50 F"),
            interpass_max=parse_temperature("550 F"), created_by=users[Role.WELDING_ENGINEER])
        wps_steps.submit(wps, users[Role.WELDING_ENGINEER])
        wps_steps.approve(wps, users[Role.QA_LEAD], reason="Reviewed against the shop's procedure checklist")
    return wps


def build(users, welders, customers, today: date) -> None:
    from inspections.models import Assembly, Job, Weld
    from inspections.services.assemblies import record_production, release
    from inspections.services.inspect import sign_inspection
    from inspections.services.ncr import disposition_repair
    from inspections.services.repairs import record_repair

    rng = random.Random(SEED)
    monday = today - timedelta(days=today.weekday())
    first = monday - timedelta(weeks=HISTORY_WEEKS)
    wps = _wps(users, first)
    inspector, qa = users[Role.INSPECTOR], users[Role.QA_LEAD]
    dana, luis = welders["B-07"], welders["B-12"]
    with time_machine.travel(_at(first - timedelta(days=3), 8), tick=True):
        jobs = [Job.objects.create(number="J-2405", name="Harlan Transit Garage, level 1 framing",
                                   customer=customers[0], unit_system="US", criteria_key="aws-d1.1-2020-static"),
                Job.objects.create(number="J-2408", name="Mill building purlins and girts, line 1",
                                   customer=customers[1], unit_system="US", criteria_key="aws-d1.1-2020-static")]
    left_open = HISTORY_WEEKS - 5  # the week whose last rejection is left open, about five weeks ago
    for week in range(HISTORY_WEEKS):
        welded_on = first + timedelta(weeks=week)  # Monday
        for n, job in enumerate(jobs):
            with time_machine.travel(_at(welded_on, 7 + n), tick=True):
                assembly = Assembly.objects.create(job=job, piece_mark=f"{'PG' if n == 0 else 'PU'}{week + 1:02d}",
                                                   drawing=f"E-{600 + 50 * n + week}", drawing_revision="0",
                                                   quantity=4, description="Purlin with clip angles")
                welds = []
                for k in range(4 if n == 0 else 3):
                    welder = (dana, luis)[k % 2]
                    weld = Weld.objects.create(assembly=assembly, mark=f"W{k + 1}", wps=wps, welded_on=welded_on,
                                               size=L("1/4 in"), length=L("12 in"), thickness1=L("3/8 in"),
                                               thickness2=L("1/2 in"), position="F" if k < 2 else "H")
                    weld.welders.set([welder])
                    record_production(weld)
                    welds.append((weld, welder))
            rejected, kept_open = [], None
            with time_machine.travel(_at(welded_on + timedelta(days=1), 10 + n), tick=True):
                for k, (weld, welder) in enumerate(welds):
                    late = week == left_open and n == 0 and k == len(welds) - 1  # the NCR left open
                    bad = rng.random() < reject_chance(welder.stamp, week) or late
                    observed = DEFECTS["undersize" if late else _cause(rng, welder.stamp)] if bad else SOUND
                    inspection = sign_inspection(weld, dict(observed), "final", inspector)
                    if late:
                        kept_open = inspection
                    elif not inspection.accepted:
                        rejected.append(inspection)
            for inspection in rejected:
                ncr = inspection.ncrs.get()
                with time_machine.travel(_at(welded_on + timedelta(days=2), 9), tick=True):
                    ncr = disposition_repair(ncr, qa, wps, dana, notes="Grind out and reweld to the WPS")
                with time_machine.travel(_at(welded_on + timedelta(days=3), 9), tick=True):
                    record_repair(ncr, inspector, wps=wps, welders=[dana], welded_on=welded_on + timedelta(days=3),
                                  notes="Rewelded by B-07")
                with time_machine.travel(_at(welded_on + timedelta(days=3), 14), tick=True):
                    sign_inspection(inspection.weld, dict(SOUND), "final", inspector)
            if kept_open is None:
                with time_machine.travel(_at(welded_on + timedelta(days=4), 11), tick=True):
                    release(assembly, qa, reason="All welds accepted at final visual")
