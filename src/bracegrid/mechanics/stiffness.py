"""Direct stiffness assembly (COO -> CSR) and sparse factorisations reused across solves.

The compatibility matrix ``B`` maps the free nodal displacements (mm) to bar elongations (mm); a
bar's elongation is ``e . (u_end - u_start)`` with ``e`` its unit vector, to first order. The
stiffness matrix is ``K = B^T diag(w) B`` for bar stiffnesses ``w`` (kN/mm), assembled element by
element as COO triplets and summed into CSR.
"""

from __future__ import annotations

from collections import OrderedDict
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt
from scipy.sparse import coo_matrix, csc_matrix, csr_matrix
from scipy.sparse.linalg import splu

from bracegrid.mechanics.framework import BarFramework, BoolArray, FloatArray, IntArray


@dataclass(frozen=True, slots=True)
class DofMap:
    """Which degrees of freedom are free, and their index in the reduced system.

    Attributes:
        free: Global indices of the free degrees of freedom, ascending.
        index: For every global degree of freedom its reduced index, -1 where fixed.
    """

    free: IntArray
    index: IntArray

    @classmethod
    def of(cls, dofs: int, fixed: BoolArray) -> DofMap:
        """Map of ``dofs`` degrees of freedom with ``fixed`` ones removed.

        Example:
            >>> DofMap.of(4, np.array([True, False, False, True])).index.tolist()
            [-1, 0, 1, -1]
        """
        free = np.flatnonzero(~fixed).astype(np.int64)
        index = np.full(dofs, -1, dtype=np.int64)
        index[free] = np.arange(len(free), dtype=np.int64)
        return cls(free=free, index=index)

    @property
    def size(self) -> int:
        """Number of free degrees of freedom."""
        return len(self.free)


def _element_dofs(fw: BarFramework) -> tuple[IntArray, FloatArray]:
    """Global dofs (m, 4) of every bar and the row of B on them (m, 4): ``[-e, e]``."""
    a, b = fw.ends[:, 0], fw.ends[:, 1]
    dofs = np.stack([2 * a, 2 * a + 1, 2 * b, 2 * b + 1], axis=1).astype(np.int64)
    e = fw.unit_vectors()
    coef = np.concatenate([-e, e], axis=1)
    return dofs, coef


def compatibility_matrix(fw: BarFramework, dof_map: DofMap) -> csr_matrix:
    """Elongation of every bar per free displacement: shape (bars, free dofs).

    Example:
        >>> from bracegrid.model import Frame, GridStrength, StrengthCatalogue, Supports
        >>> from bracegrid.mechanics.framework import build_framework
        >>> fw = build_framework(Frame("f", (3000,), (2000,), supports=Supports.BASE),
        ...                      StrengthCatalogue(grid=GridStrength(ea_kn=1.0)), members=[])
        >>> compatibility_matrix(fw, DofMap.of(fw.dofs, fw.fixed_mask())).shape
        (4, 4)
    """
    dofs, coef = _element_dofs(fw)
    reduced = dof_map.index[dofs]
    keep = reduced >= 0
    rows = np.broadcast_to(np.arange(fw.bars, dtype=np.int64)[:, None], dofs.shape)
    matrix = coo_matrix((coef[keep], (rows[keep], reduced[keep])), shape=(fw.bars, dof_map.size))
    return matrix.tocsr()


def full_compatibility_matrix(fw: BarFramework) -> csr_matrix:
    """Elongation of every bar per displacement of every degree of freedom (supports included)."""
    return compatibility_matrix(fw, DofMap.of(fw.dofs, np.zeros(fw.dofs, dtype=bool)))


def assemble_stiffness(fw: BarFramework, dof_map: DofMap, weights: FloatArray) -> csr_matrix:
    """The stiffness matrix on the free degrees of freedom, assembled bar by bar (COO -> CSR).

    Args:
        fw: The framework.
        dof_map: Free degrees of freedom.
        weights: Stiffness of every bar in kN/mm (0 leaves a bar out).

    Returns:
        ``B^T diag(weights) B``, symmetric, shape (free, free).
    """
    dofs, coef = _element_dofs(fw)
    reduced = dof_map.index[dofs]
    # element matrices k s s^T on the (start x, start y, end x, end y) dofs, 16 triplets per bar
    block = weights[:, None, None] * coef[:, :, None] * coef[:, None, :]
    rows = np.broadcast_to(reduced[:, :, None], block.shape)
    cols = np.broadcast_to(reduced[:, None, :], block.shape)
    keep = (rows >= 0) & (cols >= 0) & (block != 0.0)
    n = dof_map.size
    return coo_matrix((block[keep], (rows[keep], cols[keep])), shape=(n, n)).tocsr()


class Factorisation:
    """A sparse LU factorisation of a symmetric positive definite matrix (SuperLU, symmetric ordering)."""

    def __init__(self, matrix: csr_matrix) -> None:
        self._lu = splu(
            csc_matrix(matrix),
            permc_spec="MMD_AT_PLUS_A",
            diag_pivot_thresh=0.0,
            options={"SymmetricMode": True},
        )

    def solve(self, rhs: npt.NDArray[np.float64]) -> FloatArray:
        """Solve ``K x = rhs``."""
        out: FloatArray = self._lu.solve(rhs)
        return out


class FactorCache:
    """Factorisations keyed by the pattern of bar weights, so load cases share them.

    A small least-recently-used store: the first Newton matrix (every tie taut) is the same for
    every load case of a layout, and cases that differ only in size meet the same active sets.
    This is working state inside one analysis, never part of a result.
    """

    def __init__(self, *, size: int = 6) -> None:
        self._size = size
        self._store: OrderedDict[bytes, Factorisation] = OrderedDict()
        self.built = 0
        self.reused = 0

    def get(self, key: bytes) -> Factorisation | None:
        """The factorisation stored under ``key``, if any."""
        got = self._store.get(key)
        if got is not None:
            self._store.move_to_end(key)
            self.reused += 1
        return got

    def put(self, key: bytes, matrix: csr_matrix) -> Factorisation:
        """Factorise ``matrix`` and store it under ``key``."""
        made = Factorisation(matrix)
        self.built += 1
        self._store[key] = made
        if len(self._store) > self._size:
            self._store.popitem(last=False)
        return made
