"""The DXF layer table of bracegrid drawings.

Names follow the open discipline-major-minor(-status) layer naming of the
public CAD layer guidelines used in building documentation: ``S`` for the
structural discipline, a four-letter major group, optional minor groups, and
the status codes ``EXST`` (existing) and ``NEWW`` (new work). Where the
guidelines have no fitting group we name it ourselves (marked ``own`` below);
docs/drawings.md lists every layer.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import Enum


@dataclass(frozen=True, slots=True)
class LayerSpec:
    """Appearance and meaning of one layer.

    Attributes:
        name: Layer name written to the DXF.
        color: ACI colour number.
        linetype: Linetype name (defined in :mod:`bracegrid.symbols`).
        lineweight: Lineweight in 1/100 mm (DXF convention).
        description: What the layer holds (written as the layer description).
        own: True where the name is ours, not a group of the layer guidelines.
    """

    name: str
    color: int
    linetype: str
    lineweight: int
    description: str
    own: bool = False


class Layer(Enum):
    """Every layer a bracegrid drawing uses."""

    GRID = LayerSpec("S-GRID", 8, "BG_CHAIN", 18, "grid lines of the frame (member centre lines)")
    GRID_LABEL = LayerSpec("S-GRID-IDEN", 7, "Continuous", 25, "row and column labels (grid bubbles)")
    GRID_DIMS = LayerSpec("S-GRID-DIMS", 7, "Continuous", 18, "dimension chains: column widths, row heights")
    FRAME = LayerSpec("S-FRAM", 7, "Continuous", 35, "standards and ledgers: the frame outline and bars", own=True)
    BRACE_EXST = LayerSpec("S-BRCG-BRCE-EXST", 5, "Continuous", 35, "rigid braces already in place", own=True)
    BRACE_NEWW = LayerSpec("S-BRCG-BRCE-NEWW", 1, "Continuous", 70, "rigid braces proposed", own=True)
    TIE_EXST = LayerSpec("S-BRCG-TIES-EXST", 5, "BG_TIE", 25, "tension-only ties already in place", own=True)
    TIE_NEWW = LayerSpec("S-BRCG-TIES-NEWW", 1, "BG_TIE", 50, "tension-only ties proposed", own=True)
    TIE_SENSE = LayerSpec("S-BRCG-SENS", 7, "Continuous", 25, "racking-sense markers on ties", own=True)
    CRITICAL = LayerSpec(
        "S-BRCG-CRIT", 6, "Continuous", 35, "critical-member markers (single points of failure)", own=True
    )
    OPENING = LayerSpec("S-OPNG", 3, "BG_EDGE", 25, "opening outlines", own=True)
    OPENING_PATT = LayerSpec("S-OPNG-PATT", 8, "Continuous", 13, "hatching of blocked bays and openings", own=True)
    OPENING_LABEL = LayerSpec("S-OPNG-IDEN", 7, "Continuous", 25, "opening and blocked-bay labels", own=True)
    LOOSE = LayerSpec(
        "S-ANNO-LOOS", 30, "Continuous", 13, "shading and tags of loose parts (unstable frames)", own=True
    )
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
            'S-BRCG-BRCE-NEWW'
        """
        return self.value.name


def member_layer(*, brace: bool, existing: bool) -> Layer:
    """The layer of a diagonal member.

    Example:
        >>> member_layer(brace=False, existing=True).layer_name
        'S-BRCG-TIES-EXST'
    """
    if brace:
        return Layer.BRACE_EXST if existing else Layer.BRACE_NEWW
    return Layer.TIE_EXST if existing else Layer.TIE_NEWW
