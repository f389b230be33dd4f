"""The model stage: frozen value types of frames, members, openings, supports, prices and loss likelihoods."""

from bracegrid.model.costs import CostCatalogue, CostRate
from bracegrid.model.frame import Frame, Member, Opening, Project, layout_cost
from bracegrid.model.geometry import bay_box, bays_blocked_by, blocked_bays, opening_polygon
from bracegrid.model.kinds import Diagonal, MemberKind, Racking, Supports
from bracegrid.model.losses import LossLikelihood

__all__ = [
    "CostCatalogue",
    "CostRate",
    "Diagonal",
    "Frame",
    "LossLikelihood",
    "Member",
    "MemberKind",
    "Opening",
    "Project",
    "Racking",
    "Supports",
    "bay_box",
    "bays_blocked_by",
    "blocked_bays",
    "layout_cost",
    "opening_polygon",
]
