"""Procedure records (WPS, PQR) and welders with their qualifications: one module per aggregate."""

from procedures.models.base import SignedRecordError, UnitSystem
from procedures.models.welders import ContinuityEntry, Qualification, Welder, WelderEvent
from procedures.models.wps import PQR, WPS, ProcedureEvent

__all__ = ["PQR", "WPS", "ContinuityEntry", "ProcedureEvent", "Qualification", "SignedRecordError", "UnitSystem",
           "Welder", "WelderEvent"]
