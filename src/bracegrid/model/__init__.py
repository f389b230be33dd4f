"""The model stage: frozen value types of frames, members, openings, supports and prices."""

from bracegrid.model.costs import CostCatalogue, CostRate
from bracegrid.model.frame import Frame, Member, Opening, Project, layout_cost, layout_cost_cents, layout_length_mm
from bracegrid.model.geometry import bay_box, bays_blocked_by, blocked_bays, opening_polygon
from bracegrid.model.kinds import Diagonal, MemberKind, Racking, Supports

__all__ = [
    "CostCatalogue",
    "CostRate",
    "Diagonal",
    "Frame",
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
    "layout_cost_cents",
    "layout_length_mm",
    "opening_polygon",
]
