"""Test records from the invented demo scenario: Brannock Steelworks and its jobs.

Plain methods, sensible defaults, override anything by keyword. No record here describes a real
shop, structure or person.
"""

import itertools
from datetime import date

from legwork.models import User
from legwork.units import parse_force, parse_length, parse_speed, parse_temperature
from procedures.models import PQR, WPS, Qualification, Welder
from procedures.models.wps import WPSState

_counter = itertools.count(1)


def L(text):  # noqa: N802 - reads like the unit it builds
    return parse_length(text)


class Factory:
    password = "weld-demo-pass"

    def make_user(self, role, username=None, **kwargs):
        username = username or f"{role}-{next(_counter)}"
        user = User(username=username, role=role, first_name=kwargs.pop("first_name", role.replace("_", " ").title()),
                    **kwargs)
        user.set_password(self.password)
        user.save()
        return user

    def make_wps(self, state=WPSState.DRAFT, **kwargs):
        fields = dict(
            number=f"BSW-{100 + next(_counter)}", revision=0, title="FCAW fillet, structural shapes, all positions",
            code="AWS D1.1:2020", unit_system="US", process="FCAW", electrode="E71T-1C",
            electrode_diameter=L("0.045 in"), current="DCEP", amperage_min=160, amperage_max=220,
            voltage_min=22, voltage_max=27, travel_speed_min=parse_speed("8 in/min"),
            travel_speed_max=parse_speed("16 in/min"), ctwd_min=L("1/2 in"), ctwd_max=L("3/4 in"),
            shielding_gas="100% CO2", positions="F, H, V, OH", joint_types="fillet",
            base_metals="ASTM A992, ASTM A572 Gr 50", thickness_min=L("1/4 in"), thickness_max=L("1-1/2 in"),
            fillet_size_min=L("3/16 in"), fillet_size_max=L("1/2 in"), single_pass_size_max=L("5/16 in"),
            preheat_min=parse_temperature("50 F"),
        )
        fields.update(kwargs)
        wps = WPS.objects.create(**fields)
        if state != WPSState.DRAFT:
            WPS.objects.filter(pk=wps.pk).update(state=state)  # fixture shortcut past the approval flow
            wps.refresh_from_db()
        return wps

    def make_pqr(self, **kwargs):
        """A passed FCAW fillet test coupon: 25 V, 200 A, 10 in/min = 30 kJ/in."""
        fields = dict(
            number=f"PQR-{300 + next(_counter)}", code="AWS D1.1:2020", unit_system="US", test_date=date(2025, 11, 4),
            process="FCAW", electrode="E71T-1C", electrode_diameter=L("0.045 in"), current="DCEP", amperage=200,
            voltage=25, travel_speed=parse_speed("10 in/min"), position="3F", base_metal="ASTM A572 Gr 50",
            thickness=L("1 in"), shielding_gas="100% CO2", preheat=parse_temperature("50 F"), visual="pass",
            macroetch="pass", fillet_break="pass", laboratory="Ridgeway Testing Lab",
        )
        fields.update(kwargs)
        return PQR.objects.create(**fields)

    def make_welder(self, **kwargs):
        n = next(_counter)
        fields = dict(name=f"Welder {n}", stamp=f"B-{n:02d}", employer="Brannock Steelworks")
        fields.update(kwargs)
        return Welder.objects.create(**fields)

    def make_qualification(self, welder=None, **kwargs):
        fields = dict(
            welder=welder or self.make_welder(), code="AWS D1.1:2020", process="FCAW", joint="groove",
            test_position="3G+4G", test_thickness=L("1 in"), electrode="E71T-1C", test_date=date(2026, 3, 10),
            result="pass", examiner="R. Okafor, CWI",
        )
        fields.update(kwargs)
        return Qualification.objects.create(**fields)

    def make_job(self, **kwargs):
        from inspections.models import Job

        n = next(_counter)
        fields = dict(number=f"J-{2400 + n}", name="Harlan Transit Garage, level 2 framing",
                      customer="Harlan County Transit Authority", unit_system="US",
                      criteria_key="aws-d1.1-2020-static")
        fields.update(kwargs)
        return Job.objects.create(**fields)

    def make_assembly(self, job=None, **kwargs):
        from inspections.models import Assembly

        n = next(_counter)
        fields = dict(job=job or self.make_job(), piece_mark=f"B{n}", drawing=f"E-{200 + n}",
                      drawing_revision="1", quantity=1, description="W18x35 beam with shear tabs")
        fields.update(kwargs)
        return Assembly.objects.create(**fields)

    def make_weld(self, assembly=None, **kwargs):
        from inspections.models import Weld

        n = next(_counter)
        fields = dict(assembly=assembly or self.make_assembly(), mark=f"W{n}", joint_type="fillet",
                      size=L("1/4 in"), length=L("12 in"), count=1, thickness1=L("3/8 in"),
                      thickness2=L("1/2 in"), position="F")
        fields.update(kwargs)
        return Weld.objects.create(**fields)

    def make_inspection(self, weld=None, accepted=True, stage="final", inspector=None, **kwargs):
        """A signed inspection row as the tablet flow stores it (verdict given, not judged: for state tests)."""
        from inspections.models import Inspection

        fields = dict(weld=weld or self.make_weld(), stage=stage, inspector=inspector or self.make_user("inspector"),
                      accepted=accepted, criteria_key="aws-d1.1-2020-static", criteria_version=1,
                      findings=[{"criterion": "undersize", "ok": accepted, "message": "demo", "source": "demo"}])
        if not accepted:
            fields.setdefault("min_size", L("3/16 in"))
            fields.setdefault("undersize_length", L("3 in"))
        fields.update(kwargs)
        return Inspection.objects.create(**fields)

    def make_ncr(self, inspection=None, **kwargs):
        """An open NCR from a rejected final inspection."""
        from inspections.models import NCR

        inspection = inspection or self.make_inspection(accepted=False)
        fields = dict(number=f"NCR-{next(_counter):04d}", weld=inspection.weld, inspection=inspection,
                      description="Leg undersize over 3 in at the north end", raised_by=inspection.inspector)
        fields.update(kwargs)
        return NCR.objects.create(**fields)


__all__ = ["Factory", "L", "parse_force"]
