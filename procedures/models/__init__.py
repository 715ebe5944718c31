"""Procedure records (WPS, PQR) and welders with their qualifications: one module per aggregate."""

from procedures.models.welders import ContinuityEntry, ContinuityRun, Qualification, Welder
from procedures.models.wps import PQR, WPS

__all__ = ["PQR", "WPS", "ContinuityEntry", "ContinuityRun", "Qualification", "Welder"]
