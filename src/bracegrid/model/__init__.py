"""The model stage: frozen value types of frames, members, openings, supports, prices, loads, strengths, losses."""

from bracegrid.model.costs import CostCatalogue, CostRate
from bracegrid.model.frame import Frame, Member, Opening, Project, layout_cost, layout_cost_cents, layout_length_mm
from bracegrid.model.geometry import bay_box, bays_blocked_by, blocked_bays, opening_polygon
from bracegrid.model.kinds import Diagonal, Edge, LoadSense, MemberKind, Racking, Supports
from bracegrid.model.loads import GridStrength, LoadCase, MemberStrength, StrengthCatalogue
from bracegrid.model.losses import LossLikelihood
from bracegrid.model.rules import RULE_FIELDS, SpreadRules

__all__ = [
    "RULE_FIELDS",
    "CostCatalogue",
    "CostRate",
    "Diagonal",
    "Edge",
    "Frame",
    "GridStrength",
    "LoadCase",
    "LoadSense",
    "LossLikelihood",
    "Member",
    "MemberKind",
    "MemberStrength",
    "Opening",
    "Project",
    "Racking",
    "SpreadRules",
    "StrengthCatalogue",
    "Supports",
    "bay_box",
    "bays_blocked_by",
    "blocked_bays",
    "layout_cost",
    "layout_cost_cents",
    "layout_length_mm",
    "opening_polygon",
]
