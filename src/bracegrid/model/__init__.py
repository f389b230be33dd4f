"""The model stage: frozen value types of frames, members, openings, supports, prices, loads, strengths, losses."""

from bracegrid.model.costs import MAX_CONTINGENCY_PCT, MAX_LAYOUT_PRICE, MAX_RATE, CostCatalogue, CostRate
from bracegrid.model.frame import (
    Frame,
    GridBar,
    Member,
    Opening,
    Project,
    layout_cost,
    layout_cost_cents,
    layout_length_mm,
)
from bracegrid.model.geometry import bay_box, bays_blocked_by, blocked_bays, opening_polygon
from bracegrid.model.gridbars import (
    all_grid_bars,
    bay_corners,
    bay_present,
    bays_without_corners,
    closed_bays,
    on_grid,
    outline_bar,
    present_grid_bars,
    present_nodes,
)
from bracegrid.model.kinds import Diagonal, Edge, GridBarKind, LoadSense, MemberKind, Racking, Supports
from bracegrid.model.loads import GridStrength, LoadCase, MemberStrength, StrengthCatalogue
from bracegrid.model.losses import LossLikelihood
from bracegrid.model.rules import RULE_FIELDS, SpreadRules

__all__ = [
    "MAX_CONTINGENCY_PCT",
    "MAX_LAYOUT_PRICE",
    "MAX_RATE",
    "RULE_FIELDS",
    "CostCatalogue",
    "CostRate",
    "Diagonal",
    "Edge",
    "Frame",
    "GridBar",
    "GridBarKind",
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
    "all_grid_bars",
    "bay_box",
    "bay_corners",
    "bay_present",
    "bays_blocked_by",
    "bays_without_corners",
    "blocked_bays",
    "closed_bays",
    "layout_cost",
    "layout_cost_cents",
    "layout_length_mm",
    "on_grid",
    "opening_polygon",
    "outline_bar",
    "present_grid_bars",
    "present_nodes",
]
