"""Test records from the invented demo scenario: Brannock Steelworks and its jobs.

Plain methods, sensible defaults, override anything by keyword. No record here describes a real
shop, structure or person.
"""

import io
import itertools
from datetime import date

from core.models import User
from core.units import Length, parse_force, parse_length, parse_speed, parse_temperature
from procedures.models import PQR, WPS, Qualification, Welder
from procedures.models.wps import WPSState

_counter = itertools.count(1)


def L(text):  # noqa: N802 - reads like the unit it builds
    return parse_length(text)


class Factory:
    password = "weld-demo-pass"
    # Jobs are made for this customer unless told otherwise; conftest's viewer account is tied to it. The role
    # matrix switches it to another customer to check that the viewer sees none of that one's records.
    customer_name = "Harlan County Transit Authority"

    def make_customer(self, name=None, viewers=()):
        from inspections.models import Customer

        customer, _ = Customer.objects.get_or_create(name=name or self.customer_name)
        if viewers:
            customer.viewers.add(*viewers)
        return customer

    @staticmethod
    def put(record, **fields):
        """Write fields straight to a stored row, past the Python guard of core.locking, as a fixture shortcut
        (an assembly released without its welds inspected). The database triggers still apply: only a legal state
        move, or a change to a row that is not frozen, gets through."""
        from django.db import models

        for name, value in fields.items():
            setattr(record, name, value)
        models.Model.save(record, update_fields=list(fields))
        return record

    def make_user(self, role, username=None, credential=True, **kwargs):
        username = username or f"{role}-{next(_counter)}"
        user = User(username=username, role=role, first_name=kwargs.pop("first_name", role.replace("_", " ").title()),
                    **kwargs)
        user.set_password(self.password)
        user.save()
        if role == "inspector" and credential:  # an inspector signs final visuals only under a current credential
            self.make_credential(user)
        return user

    def make_credential(self, inspector=None, **kwargs):
        """An AWS CWI credential, current from a year ago to two years ahead, eye examination a year ago."""
        from datetime import timedelta

        from django.utils import timezone

        from inspections.models import InspectorCredential

        today = timezone.localdate()
        fields = dict(scheme="aws_cwi", number=f"CWI {next(_counter):02d}-{today:%m%d}",
                      issued_on=today - timedelta(days=365), expires_on=today + timedelta(days=730),
                      eye_exam_on=today - timedelta(days=365))
        fields.update(kwargs)
        credential = InspectorCredential(inspector=inspector or self.make_user("inspector", credential=False),
                                         **fields)
        credential.save()
        return credential

    def make_gauge(self, number=None, kind="fillet", calibrated_on=None, due_on=None, result="in_tolerance"):
        """A gauge of the register with one calibration (calibrated 100 days ago, due in a year) unless result=None."""
        from datetime import timedelta

        from django.utils import timezone

        from inspections.models import Gauge

        today = timezone.localdate()
        gauge = Gauge(number=number or f"FG-{next(_counter):02d}", kind=kind, description="Fillet gauge set")
        gauge.save()
        if result is not None:
            self.calibrate(gauge, calibrated_on or today - timedelta(days=100), due_on or today + timedelta(days=265),
                           result)
        return gauge

    def make_filler_lot(self, classification="E71T-1C", **kwargs):
        """A filler lot as received (no certificate attached)."""
        from inspections.models import FillerLot

        fields = dict(classification=classification, specification="AWS A5.20/A5.20M", diameter=L("0.045 in"),
                      lot_number=f"LOT-{next(_counter):04d}", manufacturer="Kessler Wire Co.",
                      received_on=date(2026, 9, 14))
        fields.update(kwargs)
        lot = FillerLot(**fields)
        lot.save()
        return lot

    def make_heat(self, grade="ASTM A992/A572-50", certificate_type="mtr", **kwargs):
        """A heat of steel with its mill certificate (no scan attached unless document= is given)."""
        from decimal import Decimal

        from inspections.models import MillCertificate

        fields = dict(heat_number=f"H{next(_counter):05d}", producer="Ostrander Mill", grade=grade,
                      product="W18x35", certificate_type=certificate_type, issued_on=date(2026, 8, 3),
                      c=Decimal("0.08"), mn=Decimal("1.10"), yield_mpa=Decimal("379.21"))
        fields.update(kwargs)
        heat = MillCertificate(**fields)
        heat.save()
        return heat

    def make_part(self, assembly=None, heat=None, specified_grade="ASTM A992", **kwargs):
        """A part of an assembly (a main member 3/8 in thick) cut from `heat` (none: no heat recorded)."""
        from inspections.models import Part

        fields = dict(assembly=assembly or self.make_assembly(), mark=f"P{next(_counter)}", role="main",
                      specified_grade=specified_grade, thickness=L("3/8 in"), heat=heat)
        fields.update(kwargs)
        part = Part(**fields)
        part.save()
        return part

    @staticmethod
    def calibrate(gauge, calibrated_on, due_on, result="in_tolerance"):
        from inspections.models import GaugeCalibration

        record = GaugeCalibration(gauge=gauge, calibrated_on=calibrated_on, due_on=due_on, result=result,
                                  performed_by="Brannock QA bench, reference block set R-2")
        record.save()
        return record

    def make_wps(self, state=WPSState.DRAFT, via_steps=True, **kwargs):
        """A WPS in `state`, taken there through the real steps; via_steps=False stores the row in that state
        directly (a record whose review would not pass today, e.g. submitted before a rule was added)."""
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
        if not via_steps:
            return WPS.objects.create(state=state, **fields)
        wps = WPS.objects.create(**fields)
        return self.move_wps(wps, state)

    def move_wps(self, wps, state):
        """Take a draft WPS to `state` through the real steps (procedures.services.wps)."""
        from procedures.services import wps as steps

        engineer, qa = self.make_user("welding_engineer"), self.make_user("qa_lead")
        if state == WPSState.DRAFT:
            return wps
        steps.submit(wps, engineer)
        if state in (WPSState.APPROVED, WPSState.SUPERSEDED, WPSState.WITHDRAWN):
            steps.approve(wps, qa)
        if state == WPSState.WITHDRAWN:
            steps.withdraw(wps, qa, "No longer used")
        if state == WPSState.SUPERSEDED:
            steps.approve(steps.submit(steps.new_revision(wps, engineer), engineer), qa)
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

    # A WPS inside what make_pqr's coupon supports (procedures.support, AWS D1.1:2020 clause 6 Part B): a 3F
    # fillet test qualifies V fillets; 200 A +/- 10 %, 25 V +/- 7 %, 10 in/min +/- 25 %; 50 F preheat.
    SUPPORTED_BY_DEFAULT_PQR = dict(positions="V", progression="up", amperage_min=180, amperage_max=220,
                                    voltage_min="23.25", voltage_max="26.75", travel_speed_min=parse_speed("8 in/min"),
                                    travel_speed_max=parse_speed("12.5 in/min"))

    def make_tested_wps(self, state=WPSState.DRAFT, pqr=None, **kwargs):
        """A WPS qualified by test on one PQR (make_pqr) that supports every value of it; taken to `state`."""
        pqr = pqr or self.make_pqr()
        wps = self.make_wps(basis="test", **{**self.SUPPORTED_BY_DEFAULT_PQR, **kwargs})
        wps.pqrs.add(pqr)
        return self.move_wps(wps, state)

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
        fields = dict(number=f"J-{2400 + n}", name="Harlan Transit Garage, level 2 framing", unit_system="US",
                      criteria_key="aws-d1.1-2020-static")
        fields.update(kwargs)
        customer = fields.get("customer")
        if not hasattr(customer, "pk"):  # a name, or nothing: the factory's current customer
            fields["customer"] = self.make_customer(customer)
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

    def make_qualified_welder(self, process="FCAW", **kwargs):
        """A welder with a passed all-position groove test on 1 in plate 30 days ago (in continuity today)."""
        from datetime import timedelta

        from django.utils import timezone

        welder = self.make_welder(**kwargs)
        self.make_qualification(welder=welder, process=process,
                                electrode={"SMAW": "E7018", "GMAW": "ER70S-6"}.get(process, "E71T-1C"),
                                test_date=timezone.localdate() - timedelta(days=30))
        return welder

    def approved_wps(self):
        """One approved FCAW fillet WPS (the default make_wps) shared by this factory's sound welds."""
        if getattr(self, "_approved_wps", None) is None:
            self._approved_wps = self.make_wps(state=WPSState.APPROVED)
        return self._approved_wps

    def make_sound_weld(self, assembly=None, *, wps=None, welders=None, welded_on=None, **kwargs):
        """A weld whose chain holds up to inspection: an approved WPS that covers it (approved today), a welder
        qualified and in continuity, welded today, its continuity recorded. Inspect it to complete the chain."""
        from django.utils import timezone

        from inspections.services.assemblies import record_production

        weld = self.make_weld(assembly, wps=wps or self.approved_wps(), welded_on=welded_on or timezone.localdate(),
                              **kwargs)
        weld.welders.set(welders if welders is not None else [self.make_qualified_welder()])
        record_production(weld)
        return weld

    def make_inspection(self, weld=None, *, accepted=None, stage="final", user=None, supersedes=None, reason="",
                        gauge=None, **observed):
        """A signed inspection through the one signing path (inspections.services.inspect.sign_inspection).

        With no observations: accepted=True (the default) measures the full specified leg; accepted=False a leg
        1/16 in under size over 3 in of a 12 in weld (AWS D1.1:2020 Table 8.1 allows 10 % of the length), so the
        engine rejects it and an NCR opens for a final inspection. At fit-up, `accepted` is the inspector's call.
        Text values are lengths ("3/16 in").
        """
        from inspections.services.inspect import sign_inspection

        weld = weld or (supersedes.weld if supersedes is not None else self.make_weld())
        user = user or (supersedes.inspector if supersedes is not None else self.make_user("inspector"))
        observed = {k: (parse_length(v) if isinstance(v, str) and k != "temperature_method" else v)
                    for k, v in observed.items()}
        if stage == "fit_up":
            observed.setdefault("fit_up_ok", accepted is not False)
        elif not observed:
            if accepted is False:
                observed = {"min_size": Length(weld.size.mm - L("1/16 in").mm), "undersize_length": L("3 in")}
            else:
                observed = {"min_size": weld.size}
        inspection = sign_inspection(weld, observed, stage, user, supersedes=supersedes, reason=reason, gauge=gauge)
        if accepted is not None:
            assert inspection.accepted == accepted, f"the engine judged {observed} otherwise: {inspection.findings}"
        return inspection

    def make_ncr(self, inspection=None):
        """The NCR a rejected final inspection opened (inspections.services.ncr.open_ncr)."""
        from inspections.services.ncr import open_ncr

        inspection = inspection or self.make_inspection(accepted=False)
        return open_ncr(inspection, inspection.inspector, "Leg undersize over 3 in at the north end")

    def make_photo(self, inspection=None, content=None):
        """A stored photo (files go to the test media folder) cleaned as an upload would be."""
        from django.core.files.base import ContentFile

        from core import seals
        from inspections.models import Photo
        from inspections.photos import clean_photo

        inspection = inspection or self.make_inspection()
        clean = clean_photo(io.BytesIO(content or png_bytes()))
        with seals.sealing():  # as the photo page does
            photo = Photo.objects.create(
                inspection=inspection, width=clean.width, height=clean.height, content_type=clean.content_type,
                sha256=clean.sha256, uploaded_by=inspection.inspector,
                image=ContentFile(clean.content, name=f"{inspection.pk}-test.{clean.extension}"),
                thumbnail=ContentFile(clean.thumbnail, name=f"{inspection.pk}-test-thumb.jpg"))
            seals.seal(photo, "photo.attached")
        return photo

    def use_on_job(self, wps=None, welder=None, pqr=None, criteria=None):
        """Put procedures, a welder or a client criteria set to use on a weld of a job of the factory's customer,
        so that customer's viewer may see them (core.visibility); returns the weld."""
        if pqr is not None:
            wps = wps or self.make_wps()
            wps.pqrs.add(pqr)
        job = self.make_job(client_criteria=criteria, criteria_key=criteria.key) if criteria else None
        weld = self.make_weld(assembly=self.make_assembly(job=job) if job else None, wps=wps)
        if welder is not None:
            weld.welders.add(welder)
        return weld

    # --- consumable control (tests/test_consumables.py) ---

    def make_oven(self, number=None, system="US", reading="300 F", at=None):
        """An oven of the register with one reading (at `at`, default two hours ago) unless reading=None."""
        from datetime import timedelta

        from django.utils import timezone

        from inspections.models import ElectrodeOven, OvenReading

        oven = ElectrodeOven(number=number or f"OV-{next(_counter):02d}", system=system, location="Bay 2 crib")
        oven.save()
        if reading is not None:
            OvenReading(oven=oven, read_at=at or timezone.now() - timedelta(hours=2),
                        temperature=parse_temperature(reading)).save()
        return oven

    def make_smaw_weld(self, assembly=None, electrode="E7018", **kwargs):
        """A sound weld (make_sound_weld) made to an approved SMAW WPS by a welder qualified for SMAW."""
        if getattr(self, "_smaw_wps", None) is None:
            self._smaw_wps = self.make_wps(
                state=WPSState.APPROVED, title="SMAW fillet, all positions", process="SMAW", electrode=electrode,
                electrode_diameter=L("1/8 in"), current="DCEP", amperage_min=110, amperage_max=150, voltage_min=21,
                voltage_max=25, ctwd_min=None, ctwd_max=None, shielding_gas="", single_pass_size_max=L("5/16 in"))
        kwargs.setdefault("welders", [self.make_qualified_welder(process="SMAW")])
        return self.make_sound_weld(assembly, wps=self._smaw_wps, **kwargs)

    def make_signin_pause(self, username="inspector-7", ip_address="127.0.0.1"):
        """A sign-in paused after too many wrong passwords (a django-axes attempt at the failure limit)."""
        from axes.models import AccessAttempt
        from django.conf import settings
        from django.utils import timezone

        return AccessAttempt.objects.create(
            username=username, ip_address=ip_address, user_agent="test", get_data="", post_data="", http_accept="*/*",
            path_info="/accounts/login/", failures_since_start=settings.AXES_FAILURE_LIMIT,
            attempt_time=timezone.now())


def png_bytes(size=(40, 30), color=(200, 60, 20), fmt="PNG", **save):
    """An image file's bytes, made in memory."""
    from PIL import Image

    out = io.BytesIO()
    Image.new("RGB", size, color).save(out, fmt, **save)
    return out.getvalue()


__all__ = ["Factory", "L", "parse_force", "png_bytes"]
