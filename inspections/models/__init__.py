"""Jobs, assemblies and their weld maps, inspections with photos, NCRs, client criteria sets."""

from inspections.models.criteria import ClientCriteriaSet
from inspections.models.inspection import Inspection, InspectionStage, Photo
from inspections.models.jobs import Assembly, AssemblyState, Customer, Job, Weld
from inspections.models.ncr import NCR
from inspections.models.traveler import JobPacket, PacketState, Traveler

__all__ = ["NCR", "Assembly", "AssemblyState", "ClientCriteriaSet", "Customer", "Inspection", "InspectionStage",
           "Job", "JobPacket", "PacketState", "Photo", "Traveler", "Weld"]
