"""Load cases and the strength and stiffness of members and grid bars (kN), as the user gives them.

Every value here comes from the project file; none is a default standing in for a code value.
``None`` means "not given": a missing capacity means forces are reported without a utilisation,
and a missing stiffness stops a force analysis with an error naming the field.
"""

from __future__ import annotations

from dataclasses import dataclass

from bracegrid.model.kinds import LoadSense, MemberKind


@dataclass(frozen=True, slots=True)
class LoadCase:
    """One load case of a frame: forces along its grid lines.

    A line's load is spread over the line's nodes by tributary length (see
    :func:`bracegrid.mechanics.loading.nodal_loads`).

    Attributes:
        name: Unique within the frame.
        horizontal_kn: Force along each horizontal grid line 0..R (R + 1 values), + = to the right.
        vertical_kn: Force along each vertical grid line 0..C (C + 1 values), + = upwards; empty
            when the case has none.
        reverse: The case also acts with every force reversed.
        point_kn: Forces at single nodes: (p, q, fx, fy) for the node on horizontal line p and
            vertical line q, kN, + to the right and upwards.
        gravity_kn: Downward force along each vertical grid line 0..C (C + 1 values, + = down),
            spread by tributary height like ``vertical_kn`` but never reversed: the weight that
            acts with the case in either sense. Empty when the case has none.
    """

    name: str
    horizontal_kn: tuple[float, ...]
    vertical_kn: tuple[float, ...] = ()
    reverse: bool = False
    point_kn: tuple[tuple[int, int, float, float], ...] = ()
    gravity_kn: tuple[float, ...] = ()

    @property
    def senses(self) -> tuple[LoadSense, ...]:
        """The senses the case is analysed in: as written, and reversed where asked.

        Example:
            >>> LoadCase("w", (0.0, 1.0), reverse=True).senses
            (<LoadSense.PLUS: '+'>, <LoadSense.MINUS: '-'>)
        """
        return (LoadSense.PLUS, LoadSense.MINUS) if self.reverse else (LoadSense.PLUS,)

    def storey_shears_kn(self) -> tuple[float, ...]:
        """Horizontal shear carried by each row 1..R: the sum of the line loads above its bottom line.

        Example:
            >>> LoadCase("w", (0.0, 1.5, 1.0)).storey_shears_kn()
            (2.5, 1.0)
        """
        h = self.horizontal_kn
        out = []
        running = 0.0
        for p in range(len(h) - 1, 0, -1):
            running += h[p]
            out.append(running)
        return tuple(reversed(out))


@dataclass(frozen=True, slots=True)
class MemberStrength:
    """Design capacities and axial stiffness of one diagonal member kind.

    Attributes:
        tension_kn: Design capacity in tension.
        compression_kn: Design capacity in compression (its buckling resistance); braces only.
        ea_kn: Axial stiffness E times A.
    """

    tension_kn: float | None = None
    compression_kn: float | None = None
    ea_kn: float | None = None


@dataclass(frozen=True, slots=True)
class GridStrength:
    """Stiffness and capacities of the standards and ledgers of every frame, and of a pinned base.

    Attributes:
        ea_kn: Axial stiffness E times A of a standard or ledger segment.
        standard_kn: Axial capacity of a standard segment, tension and compression.
        ledger_kn: Force a ledger segment and its connections can pass, either sense.
        uplift_kn: Upward reaction a pinned base node can take (0: none).
    """

    ea_kn: float | None = None
    standard_kn: float | None = None
    ledger_kn: float | None = None
    uplift_kn: float | None = None


@dataclass(frozen=True, slots=True)
class StrengthCatalogue:
    """Strength and stiffness of every member kind and of the grid bars.

    Attributes:
        brace: Rigid diagonals.
        tie: Tension-only diagonals.
        grid: Standards, ledgers and the base.
    """

    brace: MemberStrength = MemberStrength()
    tie: MemberStrength = MemberStrength()
    grid: GridStrength = GridStrength()

    def of(self, kind: MemberKind) -> MemberStrength:
        """The values of one member kind (the field named after the kind's value).

        Example:
            >>> StrengthCatalogue(tie=MemberStrength(tension_kn=12.0)).of(MemberKind.TIE).tension_kn
            12.0
        """
        got: MemberStrength = getattr(self, kind.value)
        return got
