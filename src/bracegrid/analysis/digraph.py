"""The row/column digraph: the one home of its node numbering, its arc rules and its graph searches.

Every row and every column of a frame is a node, numbered ``row i -> i - 1`` and
``column j -> R + j - 1`` (both 1-based); a pinned base adds the ground node ``R + C``.
Arc ``u -> v`` reads "racking of u <= racking of v". The arc rules (docs/theory.md):

* a rigid brace in bay (i, j) gives ``row_i -> col_j`` (*up*) and ``col_j -> row_i`` (*down*);
* a rising tie gives the up arc only, a falling tie the down arc only;
* a pinned base joins the ground both ways to every column, with arcs that are never lost.

Other modules never write these rules out again: they call :func:`member_arrays` /
:func:`build_arcs` for members, :func:`bay_arc_counts` / :func:`bay_arcs` for per-bay counts (the
optimizer), :func:`strong_components` and :func:`flow_cuts` for the searches, and
:func:`leaving_bays` for which bays cross a node set, :func:`components_merged` for what one more
member would lock, and the batched searches (:func:`batch_strongly_connected`,
:func:`strong_bottleneck`) that the robustness statistics run on thousands of variants at once.

References:
    E. D. Bolker and H. Crapo, "Bracing rectangular frameworks. I",
    SIAM J. Appl. Math. 36(3), 473-490 (1979), doi:10.1137/0136036.
    J. A. Baglivo and J. E. Graver, *Incidence and Symmetry in Design and
    Architecture*, Cambridge University Press (1983), ch. 10.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Sequence
from dataclasses import dataclass
from operator import attrgetter

import networkx as nx
import numpy as np
import numpy.typing as npt
from scipy.sparse import csr_matrix
from scipy.sparse.csgraph import breadth_first_order, connected_components, maximum_flow, shortest_path

from bracegrid.model import Diagonal, Frame, Member, MemberKind, Supports

IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]


# --------------------------------------------------------------------------- node numbering


def node_count(frame: Frame) -> int:
    """Nodes of the frame's digraph: rows, columns and (pinned base) the ground.

    Example:
        >>> node_count(Frame("f", (3000,) * 3, (2000,) * 2, supports=Supports.BASE))
        6
    """
    return frame.rows + frame.cols + (1 if frame.supports is Supports.BASE else 0)


def node_name(frame: Frame, node: int) -> tuple[str, int]:
    """Readable name of a node: ``("row", i)``, ``("col", j)`` or ``("ground", 0)``.

    Example:
        >>> f = Frame("f", (3000,) * 3, (2000,) * 2)
        >>> node_name(f, 0), node_name(f, 2)
        (('row', 1), ('col', 1))
    """
    if node < frame.rows:
        return ("row", node + 1)
    if node < frame.rows + frame.cols:
        return ("col", node - frame.rows + 1)
    return ("ground", 0)


def bay_nodes(rows: int, i: int, j: int) -> tuple[int, int]:
    """Row node and column node of the bay at 0-based array index (i, j) (bay r{i+1}c{j+1}).

    Example:
        >>> bay_nodes(4, 0, 2)
        (0, 6)
    """
    return i, rows + j


def split_labels(rows: int, labels: IntArray) -> tuple[IntArray, IntArray]:
    """Per-node labels (e.g. strong components) split into those of the rows and of the columns.

    Example:
        >>> [a.tolist() for a in split_labels(2, np.array([5, 6, 7]))]
        [[5, 6], [7]]
    """
    return labels[:rows], labels[rows:]


def split_nodes(rows: int, cols: int, nodes: Iterable[int]) -> tuple[tuple[int, ...], tuple[int, ...]]:
    """The 1-based rows and columns among some nodes (the ground is left out).

    Example:
        >>> split_nodes(2, 3, [0, 3, 5])
        ((1,), (2,))
    """
    picked = sorted(int(n) for n in nodes)
    return (
        tuple(n + 1 for n in picked if n < rows),
        tuple(n - rows + 1 for n in picked if rows <= n < rows + cols),
    )


# --------------------------------------------------------------------------- arc rules


def gives_up(kind: MemberKind, diagonal: Diagonal) -> bool:
    """Whether a member gives the up arc ``row -> col`` (a brace or a rising tie)."""
    return kind is MemberKind.BRACE or diagonal is Diagonal.RISING


def gives_down(kind: MemberKind, diagonal: Diagonal) -> bool:
    """Whether a member gives the down arc ``col -> row`` (a brace or a falling tie)."""
    return kind is MemberKind.BRACE or diagonal is Diagonal.FALLING


def _ids(values: Iterable[object], count: int) -> IntArray:
    return np.fromiter(map(id, values), dtype=np.int64, count=count)


def member_arrays(members: Sequence[Member]) -> tuple[IntArray, IntArray, BoolArray, BoolArray]:
    """Rows, columns, is-brace and is-rising of members as numpy arrays (1-based bays).

    Enum members are singletons, so identity (``id``) comparison is exact and
    keeps the conversion at C speed for a million members.
    """
    n = len(members)
    rows = np.fromiter(map(attrgetter("row"), members), dtype=np.int64, count=n)
    cols = np.fromiter(map(attrgetter("col"), members), dtype=np.int64, count=n)
    brace = _ids(map(attrgetter("kind"), members), n) == id(MemberKind.BRACE)
    rising = _ids(map(attrgetter("diagonal"), members), n) == id(Diagonal.RISING)
    return rows, cols, brace, rising


def bay_arc_counts(braces: IntArray, rising: IntArray, falling: IntArray) -> tuple[IntArray, IntArray]:
    """Member arcs per bay from per-bay counts of braces, rising ties and falling ties: (up, down).

    Example:
        >>> up, down = bay_arc_counts(np.array([[1, 0]]), np.array([[0, 1]]), np.array([[0, 0]]))
        >>> up.tolist(), down.tolist()
        ([[1, 1]], [[1, 0]])
    """
    return braces + rising, braces + falling


def member_bay_counts(members: Iterable[Member], rows: int, cols: int) -> tuple[IntArray, IntArray]:
    """Member arcs per bay, shape (R, C) indexed [row - 1, col - 1]: (up, down).

    Example:
        >>> m = Member(1, 2, MemberKind.TIE, Diagonal.FALLING)
        >>> [a.tolist() for a in member_bay_counts([m], 1, 2)]
        [[[0, 0]], [[0, 1]]]
    """
    up = np.zeros((rows, cols), dtype=np.int64)
    down = np.zeros((rows, cols), dtype=np.int64)
    for m in members:
        up[m.row - 1, m.col - 1] += gives_up(m.kind, m.diagonal)
        down[m.row - 1, m.col - 1] += gives_down(m.kind, m.diagonal)
    return up, down


def bay_arcs(up: IntArray, down: IntArray) -> tuple[IntArray, IntArray, IntArray]:
    """(tails, heads, multiplicities) of the member arcs of a free frame from per-bay arc counts.

    Example:
        >>> src, dst, mult = bay_arcs(np.array([[1, 0]]), np.array([[2, 0]]))
        >>> src.tolist(), dst.tolist(), mult.tolist()
        ([0, 1], [1, 0], [1, 2])
    """
    r_count = up.shape[0]
    ui, uj = np.nonzero(up)
    di, dj = np.nonzero(down)
    src = np.concatenate([ui, r_count + dj]).astype(np.int64)
    dst = np.concatenate([r_count + uj, di]).astype(np.int64)
    mult = np.concatenate([up[ui, uj], down[di, dj]]).astype(np.int64)
    return src, dst, mult


def node_sides(rows: int, cols: int, s: Iterable[int]) -> tuple[BoolArray, BoolArray]:
    """Which rows and which columns are in node set S (ground excluded), as boolean arrays."""
    in_row = np.zeros(rows, dtype=bool)
    in_col = np.zeros(cols, dtype=bool)
    for v in s:
        if v < rows:
            in_row[v] = True
        elif v < rows + cols:
            in_col[v - rows] = True
    return in_row, in_col


def leaving_bays(rows: int, cols: int, s: frozenset[int]) -> tuple[BoolArray, BoolArray]:
    """Bays whose arcs leave node set S: (row -> col arcs, col -> row arcs), each shape (R, C).

    A row -> col arc leaves S when its row is in S and its column is not; a col -> row arc when
    its column is in S and its row is not.

    Example:
        >>> up, down = leaving_bays(2, 2, frozenset({0}))
        >>> up.astype(int).tolist(), down.astype(int).tolist()
        ([[1, 1], [0, 0]], [[0, 0], [0, 0]])
    """
    in_row, in_col = node_sides(rows, cols, s)
    return in_row[:, None] & ~in_col[None, :], ~in_row[:, None] & in_col[None, :]


# --------------------------------------------------------------------------- member arcs


@dataclass(frozen=True, slots=True)
class ArcSet:
    """The distinct arcs of a frame's digraph with the members behind them.

    An arc's key is ``tail * nodes + head``.

    Attributes:
        nodes: Number of nodes.
        src: Tail of each distinct arc (sorted by key).
        dst: Head of each distinct arc.
        multiplicity: Members giving each arc (ground arcs count as 2: never lost).
        member_keys: For each member, the keys of the arcs it gives, shape
            (M, 2): column 0 the row->col arc, column 1 the col->row arc, -1
            where the member gives no such arc.
        braces: Number of rigid braces among the members.
    """

    nodes: int
    src: IntArray
    dst: IntArray
    multiplicity: IntArray
    member_keys: IntArray
    braces: int

    @property
    def keys(self) -> IntArray:
        """Sorted keys of the distinct arcs."""
        return self.src * self.nodes + self.dst


def build_arcs(frame: Frame, members: Sequence[Member]) -> ArcSet:
    """Build the distinct arcs of the layout's digraph.

    Args:
        frame: Gives the numbers of rows and columns and the supports.
        members: The members in place.

    Returns:
        The arcs, merged where several members give the same arc.
    """
    r_count, c_count = frame.rows, frame.cols
    rows, cols, brace, rising = member_arrays(members)
    nodes = node_count(frame)
    row_node = rows - 1
    col_node = r_count + cols - 1
    # The arc rules, vectorised: up arc for a brace or a rising tie, down arc for a brace or a falling tie.
    up_key = np.where(brace | rising, row_node * nodes + col_node, -1)
    down_key = np.where(brace | ~rising, col_node * nodes + row_node, -1)
    parts = [up_key[up_key >= 0], down_key[down_key >= 0]]
    if frame.supports is Supports.BASE:
        ground = nodes - 1
        cnodes = np.arange(r_count, r_count + c_count, dtype=np.int64)
        ground_keys = np.concatenate([ground * nodes + cnodes, cnodes * nodes + ground])
        parts += [ground_keys, ground_keys]  # twice: a ground arc can never be lost
    all_keys = np.concatenate(parts)
    counts = np.bincount(all_keys, minlength=0) if nodes * nodes <= 4 * len(all_keys) + 1024 else None
    if counts is not None:
        unique = np.flatnonzero(counts)
        mult = counts[unique]
    else:
        unique, mult = np.unique(all_keys, return_counts=True)
    return ArcSet(
        nodes=nodes,
        src=(unique // nodes).astype(np.int64),
        dst=(unique % nodes).astype(np.int64),
        multiplicity=mult.astype(np.int64),
        member_keys=np.stack([up_key, down_key], axis=1),
        braces=int(brace.sum()),
    )


def frame_digraph(frame: Frame, members: Iterable[Member] | None = None) -> nx.DiGraph:
    """The layout's digraph as networkx, with readable node names.

    Nodes are ``("row", i)``, ``("col", j)`` and, on a pinned base,
    ``("ground", 0)``. Meant for inspection and teaching; the check itself
    works on arrays.

    Example:
        >>> f = Frame("f", (3000,), (2000,))
        >>> g = frame_digraph(f, [Member(1, 1, MemberKind.TIE, Diagonal.RISING)])
        >>> sorted(g.edges())
        [(('row', 1), ('col', 1))]
    """
    g: nx.DiGraph = nx.DiGraph()
    g.add_nodes_from(("row", i) for i in range(1, frame.rows + 1))
    g.add_nodes_from(("col", j) for j in range(1, frame.cols + 1))
    if frame.supports is Supports.BASE:
        for j in range(1, frame.cols + 1):
            g.add_edge(("ground", 0), ("col", j))
            g.add_edge(("col", j), ("ground", 0))
    for m in frame.members if members is None else members:
        r, c = ("row", m.row), ("col", m.col)
        if gives_up(m.kind, m.diagonal):
            g.add_edge(r, c)
        if gives_down(m.kind, m.diagonal):
            g.add_edge(c, r)
    return g


# --------------------------------------------------------------------------- searches


def csr(nodes: int, src: IntArray, dst: IntArray) -> csr_matrix:
    """Adjacency matrix of arcs (duplicates merged)."""
    data = np.ones(len(src), dtype=np.int8)
    return csr_matrix((data, (src, dst)), shape=(nodes, nodes))


def strong_components(nodes: int, src: IntArray, dst: IntArray) -> tuple[int, IntArray]:
    """Strong components of a digraph: (count, label of each node). Linear time.

    Example:
        >>> count, labels = strong_components(3, np.array([0, 1]), np.array([1, 0]))
        >>> count, labels[0] == labels[1], labels[0] == labels[2]
        (2, np.True_, np.False_)
    """
    count, labels = connected_components(csr(nodes, src, dst), directed=True, connection="strong")
    return int(count), labels.astype(np.int64)


def arc_strong_components(arcs: ArcSet, keep: BoolArray | None = None) -> tuple[int, IntArray]:
    """Strong components of an arc set, optionally of the arcs ``keep`` marks only."""
    src, dst = (arcs.src, arcs.dst) if keep is None else (arcs.src[keep], arcs.dst[keep])
    return strong_components(arcs.nodes, src, dst)


def components_merged(frame: Frame, members: Sequence[Member], candidates: Sequence[Member]) -> IntArray:
    """For each candidate member, by how many the strong components drop when it alone is added.

    Adding arcs can only merge the strong components that the new arcs close a directed cycle
    through. With the components' reachability R (in the condensation, a DAG, R reflexive) and a
    candidate in the bay of row node u (component a) and column node w (component b):

    * up arc only (a -> b): the merged part is (R(a) | R(b)) & R^-1(a);
    * down arc only (b -> a): (R(a) | R(b)) & R^-1(b);
    * both (a brace): (R(a) | R(b)) & (R^-1(a) | R^-1(b)).

    The drop is the merged part's size less one. Cost: one all-pairs reachability of the
    condensation (components x (components + arcs)), then a vectorised count per candidate.

    Args:
        frame: Gives the numbers of rows and columns and the supports.
        members: The layout in place.
        candidates: Members that might be added, each on its own.

    Returns:
        Shape (candidates,): components merged away (loose parts locked) by each.

    Example:
        >>> t = MemberKind.TIE
        >>> chain = [Member(1, 1, t, Diagonal.RISING), Member(1, 2, t, Diagonal.FALLING),
        ...          Member(2, 2, t, Diagonal.RISING)]
        >>> f = Frame("2x2", (3000, 3000), (2000, 2000))
        >>> components_merged(f, chain, [Member(2, 1, t, Diagonal.FALLING), Member(2, 1, t, Diagonal.RISING)]).tolist()
        [3, 0]
    """
    arcs = build_arcs(frame, members)
    count, labels = arc_strong_components(arcs)
    if not candidates:
        return np.zeros(0, dtype=np.int64)
    cs, cd = labels[arcs.src], labels[arcs.dst]
    between = cs != cd
    reach = np.isfinite(shortest_path(csr(count, cs[between], cd[between]), unweighted=True, directed=True))
    rows, cols, brace, rising = member_arrays(candidates)
    a = labels[rows - 1]
    b = labels[frame.rows + cols - 1]
    up = brace | rising
    down = brace | ~rising
    out = np.zeros(len(candidates), dtype=np.int64)
    step = max(1, (1 << 24) // max(1, count))
    for lo in range(0, len(candidates), step):
        sl = slice(lo, lo + step)
        ahead = reach[a[sl]] | reach[b[sl]]
        behind = (reach.T[a[sl]] & up[sl, None]) | (reach.T[b[sl]] & down[sl, None])
        out[sl] = (ahead & behind).sum(axis=1) - 1
    return out


def reachable(graph: csr_matrix, start: int) -> IntArray:
    """Nodes reachable from ``start`` along arcs with positive entries (``start`` included)."""
    positive = graph.copy()
    positive.data = (positive.data > 0).astype(np.int8)
    positive.eliminate_zeros()
    order: IntArray = breadth_first_order(positive, start, directed=True, return_predecessors=False)
    return order


@dataclass(frozen=True, slots=True)
class FlowCut:
    """One maximum flow between node 0 and another node, and the minimum cut it proves.

    Attributes:
        value: The flow value: the fewest arcs (by capacity) leaving ``leaving_set()``.
        graph: The capacity graph the flow ran on (reversed for flows into node 0).
        flow: The flow matrix.
        reverse: True for a flow from the other node into node 0.
    """

    value: int
    graph: csr_matrix
    flow: csr_matrix
    reverse: bool

    def leaving_set(self, nodes: int) -> frozenset[int]:
        """A node set with exactly ``value`` capacity on the arcs leaving it.

        Forwards it is the source side of the residual graph (holds node 0); for a flow into
        node 0, run on the reversed graph, the source side has few arcs *entering* it, so the
        set is its complement.
        """
        side = frozenset(reachable((self.graph - self.flow).tocsr(), 0).tolist())
        return frozenset(range(nodes)) - side if self.reverse else side


def flow_cuts(nodes: int, src: IntArray, dst: IntArray, capacity: IntArray) -> Iterator[FlowCut]:
    """Maximum flows from node 0 to every other node and back, lazily.

    The smallest value over all of them is the arc connectivity of the digraph with these
    capacities (Menger; Edmonds): every node set S != {} with 0 in S or not is crossed by some
    pair. Callers stop early when they have what they need.
    """
    graph = csr_matrix((capacity.astype(np.int32), (src, dst)), shape=(nodes, nodes))
    back = graph.T.tocsr()
    for v in range(1, nodes):
        for g, reverse in ((graph, False), (back, True)):
            result = maximum_flow(g, 0, v)
            yield FlowCut(int(result.flow_value), g, result.flow, reverse)


# --------------------------------------------------------------------------- batched searches
#
# Many variants of one digraph at once (the same distinct arcs, each variant with its own arc
# weights): the robustness engine asks "which variants are strongly connected?" for thousands
# of random loss patterns. Work arrays are (arcs, variants), so that picking arcs copies whole
# rows; callers batch the variants.

FloatArray = npt.NDArray[np.float64]

#: Largest bitset work array (nodes x words x variants) built at once, in 64-bit words (64 MiB).
_BITSET_WORDS = 1 << 23


def arc_members(arcs: ArcSet) -> IntArray:
    """For each distinct arc, the indices of the members that give it, padded with -1.

    Returns:
        Shape (arcs, width), width the most members behind one arc (at least 1). A row of -1
        only is an arc no member gives (a pinned base's ground arcs): it is never lost.

    Example:
        >>> f = Frame("f", (3000,), (2000,))
        >>> b, t = MemberKind.BRACE, MemberKind.TIE
        >>> arcs = build_arcs(f, [Member(1, 1, b, Diagonal.RISING), Member(1, 1, t, Diagonal.FALLING)])
        >>> arc_members(arcs).tolist()  # arc row1->col1 from member 0; col1->row1 from members 0 and 1
        [[0, -1], [0, 1]]
    """
    keys = arcs.member_keys
    member = np.repeat(np.arange(len(keys), dtype=np.int64), 2)
    flat = keys.ravel()
    given = flat >= 0
    arc = np.searchsorted(arcs.keys, flat[given])
    member = member[given]
    order = np.lexsort((member, arc))
    arc, member = arc[order], member[order]
    counts = np.bincount(arc, minlength=len(arcs.src))
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]])
    slot = np.arange(len(arc), dtype=np.int64) - starts[arc]
    table = np.full((len(arcs.src), max(1, int(counts.max(initial=0)))), -1, dtype=np.int64)
    table[arc, slot] = member
    return table


def _grouped_max(values: FloatArray, groups: IntArray, nodes: int) -> FloatArray:
    """Per node and variant, the largest value over the node's arcs; -inf for a node with none."""
    order = np.argsort(groups, kind="stable")
    heads, first = np.unique(groups[order], return_index=True)
    out = np.full((nodes, values.shape[1]), -np.inf)
    if len(heads):
        out[heads] = np.maximum.reduceat(values[order], first, axis=0)
    return out


def node_cut_bound(arcs: ArcSet, weight: FloatArray) -> FloatArray:
    """Per variant, an upper bound on :func:`strong_bottleneck`: the weakest single-node cut.

    A node whose heaviest in-arc (or out-arc) has weight w is cut off from the rest as soon as
    the threshold passes w, so no threshold above w leaves the digraph strongly connected.

    Args:
        arcs: The distinct arcs.
        weight: Shape (arcs, variants).

    Returns:
        Shape (variants,).
    """
    into = _grouped_max(weight, arcs.dst, arcs.nodes).min(axis=0)
    out_of = _grouped_max(weight, arcs.src, arcs.nodes).min(axis=0)
    bound: FloatArray = np.minimum(into, out_of)
    return bound


def _bitset_reach(tails: IntArray, heads: IntArray, present: BoolArray, nodes: int) -> npt.NDArray[np.uint64]:
    """Per variant, the nodes reachable from node 0 along present arcs: bitsets, shape (words, variants)."""
    words = (nodes + 63) // 64
    count = present.shape[1]
    adjacency = np.zeros((nodes, words, count), dtype=np.uint64)
    bit = np.left_shift(np.uint64(1), (heads % 64).astype(np.uint64))
    for w in range(words):
        in_word = np.flatnonzero(heads // 64 == w)
        if not len(in_word):
            continue
        picked = in_word[np.argsort(tails[in_word], kind="stable")]
        groups, first = np.unique(tails[picked], return_index=True)
        bits = np.where(present[picked], bit[picked][:, None], np.uint64(0))
        adjacency[groups, w] = np.bitwise_or.reduceat(bits, first, axis=0)
    reach = np.zeros((words, count), dtype=np.uint64)
    reach[0] = 1
    one = np.uint64(1)
    while True:
        grown = reach.copy()
        for v in range(nodes):
            has = (reach[v // 64] >> np.uint64(v % 64)) & one
            grown |= adjacency[v] & (np.uint64(0) - has)
        if np.array_equal(grown, reach):
            return reach
        reach = grown


def batch_strongly_connected(arcs: ArcSet, present: BoolArray) -> BoolArray:
    """Which variants of the digraph are strongly connected.

    Node 0 must reach every node and every node must reach node 0; both reaches are grown as
    bitsets (64 nodes to a word), one sweep over the nodes per step, for every variant at once.
    Steps: at most the longest shortest path from or to node 0, plus one.

    Args:
        arcs: The distinct arcs.
        present: Shape (arcs, variants): which arcs each variant keeps.

    Returns:
        Shape (variants,).

    Example:
        >>> f = Frame("f", (3000,), (2000,))
        >>> arcs = build_arcs(f, [Member(1, 1, MemberKind.BRACE, Diagonal.RISING)])
        >>> batch_strongly_connected(arcs, np.array([[True, True], [True, False]])).tolist()
        [True, False]
    """
    nodes = arcs.nodes
    words = (nodes + 63) // 64
    full = np.array([(1 << min(64, nodes - 64 * w)) - 1 for w in range(words)], dtype=np.uint64)[:, None]
    out = np.zeros(present.shape[1], dtype=bool)
    step = max(1, _BITSET_WORDS // (nodes * words))
    for lo in range(0, present.shape[1], step):
        part = present[:, lo : lo + step]
        forward = _bitset_reach(arcs.src, arcs.dst, part, nodes)
        backward = _bitset_reach(arcs.dst, arcs.src, part, nodes)
        out[lo : lo + step] = ((forward == full) & (backward == full)).all(axis=0)
    return out


def _maximin_from_root(tails: IntArray, heads: IntArray, weight: FloatArray, nodes: int) -> FloatArray:
    """Per variant, over nodes v, the smallest widest-path value from node 0 to v (Bellman-Ford)."""
    order = np.argsort(heads, kind="stable")
    t, w = tails[order], weight[order]
    targets, first = np.unique(heads[order], return_index=True)
    best = np.full((nodes, weight.shape[1]), -np.inf)
    best[0] = np.inf
    for _ in range(nodes):
        reached = np.maximum.reduceat(np.minimum(best[t], w), first, axis=0)
        grown = np.maximum(best[targets], reached)
        if np.array_equal(grown, best[targets]):
            break
        best[targets] = grown
        best[0] = np.inf
    low: FloatArray = best.min(axis=0)
    return low


def strong_bottleneck(arcs: ArcSet, weight: FloatArray) -> FloatArray:
    """Per variant, the largest threshold t such that the arcs of weight >= t are strongly connected.

    A digraph is strongly connected iff node 0 reaches every node and every node reaches node 0,
    so the answer is the smaller of two widest-path (maximin) values: over nodes v, the least
    widest path from node 0 to v, and from v to node 0. It is found in two passes: the weakest
    single-node cut (:func:`node_cut_bound`) bounds it from above and is the answer whenever the
    arcs at least that heavy are strongly connected (one :func:`batch_strongly_connected`), which
    holds for most random variants; the others run Bellman-Ford on the maximin semiring
    (at most ``nodes`` rounds). -inf when even every arc together is not strongly connected.

    Args:
        arcs: The distinct arcs.
        weight: Shape (arcs, variants); inf for an arc that is never lost.

    Returns:
        Shape (variants,).

    Example:
        >>> t = MemberKind.TIE
        >>> ties = [Member(1, 1, t, Diagonal.RISING), Member(1, 2, t, Diagonal.FALLING),
        ...         Member(2, 2, t, Diagonal.RISING), Member(2, 1, t, Diagonal.FALLING)]
        >>> arcs = build_arcs(Frame("f", (3000, 3000), (2000, 2000)), ties)
        >>> strong_bottleneck(arcs, np.array([[0.4], [0.9], [0.2], [0.7]])).tolist()  # a 4-cycle: its weakest arc
        [0.2]
    """
    bound = node_cut_bound(arcs, weight)
    holds = batch_strongly_connected(arcs, weight >= bound[None, :])
    out = bound.copy()
    rest = np.flatnonzero(~holds)
    if len(rest):
        w = weight[:, rest]
        forward = _maximin_from_root(arcs.src, arcs.dst, w, arcs.nodes)
        backward = _maximin_from_root(arcs.dst, arcs.src, w, arcs.nodes)
        out[rest] = np.minimum(forward, backward)
    return out


def short_supply_set(nodes: int, src: IntArray, dst: IntArray, capacity: IntArray, supply: IntArray) -> frozenset[int]:
    """A node set whose net supply exceeds the capacity of the arcs leaving it (empty if none).

    Gale's feasibility theorem (Ahuja, Magnanti & Orlin, *Network Flows*, 1993, sec. 6.2): a
    flow meeting every supply (+) and demand (-) within the arc capacities exists iff no node set
    S has ``supply(S) > capacity(arcs leaving S)``. One maximum flow from a super source (arcs to
    each supply) to a super sink (arcs from each demand) finds such a set when the flow falls short:
    the source side of the residual graph. Capacities and supplies are whole numbers (scaled by
    the caller); supplies should sum to 0.

    Example:
        >>> sorted(short_supply_set(2, np.array([0]), np.array([1]), np.array([3]), np.array([5, -5])))
        [0]
        >>> short_supply_set(2, np.array([0]), np.array([1]), np.array([5]), np.array([5, -5]))
        frozenset()
    """
    source, sink = nodes, nodes + 1
    plus = np.flatnonzero(supply > 0)
    minus = np.flatnonzero(supply < 0)
    tails = np.concatenate([src, np.full(len(plus), source), minus]).astype(np.int64)
    heads = np.concatenate([dst, plus, np.full(len(minus), sink)]).astype(np.int64)
    caps = np.concatenate([capacity, supply[plus], -supply[minus]]).astype(np.int64)
    if caps.size and int(caps.max()) >= 2**31:
        msg = "capacities must fit 32 bits: scale them down"
        raise ValueError(msg)
    graph = csr_matrix((caps.astype(np.int32), (tails, heads)), shape=(nodes + 2, nodes + 2))
    result = maximum_flow(graph, source, sink)
    if int(result.flow_value) >= int(supply[plus].sum()):
        return frozenset()
    side = reachable((graph - result.flow).tocsr(), source)
    return frozenset(int(v) for v in side if v < nodes)
