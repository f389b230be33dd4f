"""The DXF layer table of bracegrid drawings.

Names follow the layer-name format of the U.S. National CAD Standard layer
guidelines, version 4.0, in the edition published openly as the A/E/C CAD
Standard, Release 4.0 (U.S. Army ERDC, report ERDC/ITL TR-09-2, July 2009,
approved for public release): discipline ``S`` (structural), a four-letter
major group, up to two four-letter minor groups, and an optional one-letter
status, ``E`` (existing to remain) or ``N`` (new work). Which of our field
codes come from that edition's lists and which are ours is recorded per layer
(:attr:`LayerSpec.ours`); docs/drawings.md prints the same table and a test
keeps the two in step.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum


class Field(Enum):
    """The fields of a layer name whose code may be ours rather than the guideline's."""

    MAJOR = "major group"
    MINOR = "minor group"


@dataclass(frozen=True, slots=True)
class LayerSpec:
    """Appearance and meaning of one layer.

    Attributes:
        name: Layer name written to the DXF.
        color: DXF colour index (1 red ... 7 black/white, 8 grey; 256 = by layer).
        linetype: Linetype name (defined in :mod:`bracegrid.outputs.symbols`).
        lineweight: Lineweight in 1/100 mm (DXF convention).
        description: What the layer holds (docs/drawings.md and the legend say it; not written to the DXF).
        ours: The name fields whose codes are ours, not in the guideline's lists (empty: all the guideline's).
    """

    name: str
    color: int
    linetype: str
    lineweight: int
    description: str
    ours: frozenset[Field] = frozenset()

    @property
    def origin(self) -> str:
        """Where the name's codes come from, as docs/drawings.md writes it.

        Example:
            >>> Layer.OPENING_LABEL.spec.origin
            'ours: major group'
        """
        if not self.ours:
            return "guideline"
        return "ours: " + " and ".join(f.value for f in Field if f in self.ours)


_MAJOR = frozenset({Field.MAJOR})
_MINOR = frozenset({Field.MINOR})
_BOTH = frozenset(Field)


class Layer(Enum):
    """Every layer a bracegrid drawing uses."""

    GRID = LayerSpec("S-GRID", 251, "BG_CHAIN", 30, "grid lines of the frame (member centre lines)")
    GRID_LABEL = LayerSpec("S-GRID-IDEN", 7, "Continuous", 25, "row and column tags of the bays")
    GRID_DIMS = LayerSpec("S-GRID-DIMS", 7, "Continuous", 18, "dimension chains: column widths, row heights")
    FRAME = LayerSpec("S-FRAM", 7, "Continuous", 35, "standards and ledgers: the frame outline and bars", _MAJOR)
    BRACE_EXST = LayerSpec("S-BRCG-BRCE-E", 5, "Continuous", 35, "rigid braces already in place", _BOTH)
    BRACE_NEWW = LayerSpec("S-BRCG-BRCE-N", 1, "Continuous", 70, "rigid braces proposed", _BOTH)
    TIE_EXST = LayerSpec("S-BRCG-TIES-E", 5, "BG_TIE", 25, "tension-only ties already in place", _BOTH)
    TIE_NEWW = LayerSpec("S-BRCG-TIES-N", 1, "BG_TIE", 50, "tension-only ties proposed", _BOTH)
    TIE_SENSE = LayerSpec("S-BRCG-SENS", 7, "Continuous", 25, "racking-sense markers on ties", _BOTH)
    CRITICAL = LayerSpec(
        "S-BRCG-CRIT", 6, "Continuous", 35, "critical-member markers (single points of failure)", _BOTH
    )
    OPENING = LayerSpec("S-OPNG", 94, "BG_EDGE", 35, "opening outlines (set in from the opening's edge)", _MAJOR)
    OPENING_PATT = LayerSpec("S-OPNG-PATT", 8, "Continuous", 18, "hatching of blocked bays", _MAJOR)
    OPENING_LABEL = LayerSpec("S-OPNG-IDEN", 7, "Continuous", 25, "opening names and blocked-bay labels", _MAJOR)
    FRAME_OMIT = LayerSpec(
        "S-FRAM-OMIT", 8, "BG_OMIT", 25, "grid bar segments left out (missing ledgers and standards)", _BOTH
    )
    ABSENT = LayerSpec("S-FRAM-ABSN", 9, "Continuous", 13, "bays outside the frame's outline (absent)", _BOTH)
    FLEX = LayerSpec(
        "S-ANNO-FLEX", 30, "Continuous", 35, "exaggerated deflected shape of a mechanism (general frames)", _MINOR
    )
    LOOSE = LayerSpec("S-ANNO-LOOS", 30, "Continuous", 13, "shading and tags of loose parts (unstable frames)", _MINOR)
    SUPPORT = LayerSpec("S-FNDN", 7, "Continuous", 50, "ground line under a pinned base")
    SUPPORT_SYMBOL = LayerSpec("S-FNDN-SYMB", 7, "Continuous", 25, "pinned-support symbols")
    TEXT = LayerSpec("S-ANNO-TEXT", 7, "Continuous", 25, "frame titles and verdict lines")
    LEGEND = LayerSpec("S-ANNO-LEGN", 7, "Continuous", 18, "legend")
    SCHEDULE = LayerSpec("S-ANNO-SCHD", 7, "Continuous", 18, "bill of materials table")
    TITLE = LayerSpec("S-ANNO-TTLB", 7, "Continuous", 35, "sheet border and title block with the caution")

    @property
    def spec(self) -> LayerSpec:
        """The layer's appearance and meaning."""
        return self.value

    @property
    def layer_name(self) -> str:
        """The name written to the DXF.

        Example:
            >>> Layer.BRACE_NEWW.layer_name
            'S-BRCG-BRCE-N'
        """
        return self.value.name


def member_layer(*, brace: bool, existing: bool) -> Layer:
    """The layer of a diagonal member.

    Example:
        >>> member_layer(brace=False, existing=True).layer_name
        'S-BRCG-TIES-E'
    """
    if brace:
        return Layer.BRACE_EXST if existing else Layer.BRACE_NEWW
    return Layer.TIE_EXST if existing else Layer.TIE_NEWW
