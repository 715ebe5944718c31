"""Jobs, assemblies and their weld maps, inspections with photos, NCRs, client criteria sets."""

from inspections.models.consumables import (
    ElectrodeIssue,
    ElectrodeOven,
    FluxEvent,
    FluxRecord,
    IssueState,
    OvenKind,
    OvenReading,
    OvenState,
    Rebake,
)
from inspections.models.criteria import ClientCriteriaSet
from inspections.models.inspection import (
    DraftPhoto,
    Inspection,
    InspectionDraft,
    InspectionStage,
    Photo,
    TemperatureMethod,
)
from inspections.models.jobs import Assembly, AssemblyState, Customer, Job, Weld
from inspections.models.material import MaterialState, MillCertificate, Part, PartRole
from inspections.models.ncr import NCR
from inspections.models.repair import WeldRepair
from inspections.models.trace import (
    CalibrationResult,
    CredentialState,
    FillerLot,
    Gauge,
    GaugeCalibration,
    GaugeKind,
    GaugeState,
    InspectorCredential,
)
from inspections.models.traveler import JobPacket, PacketState, Traveler
from inspections.models.uses import JobWelder, JobWPS

__all__ = ["NCR", "Assembly", "AssemblyState", "CalibrationResult", "ClientCriteriaSet", "CredentialState",
           "Customer", "DraftPhoto", "FillerLot", "Gauge", "GaugeCalibration", "GaugeKind", "GaugeState", "Inspection",
           "InspectionDraft", "InspectionStage", "InspectorCredential", "Job", "JobPacket", "PacketState", "Photo",
           "TemperatureMethod", "Traveler", "Weld", "WeldRepair"]
__all__ += ["MaterialState", "MillCertificate", "Part", "PartRole"]  # material traceability (issue 18 item 1)
__all__ += ["ElectrodeIssue", "ElectrodeOven", "FluxEvent", "FluxRecord", "IssueState", "OvenKind", "OvenReading",
            "OvenState", "Rebake"]
__all__ += ["JobWPS", "JobWelder"]  # which WPSs and welders each job uses (inspections.uses)
