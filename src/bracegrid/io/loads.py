"""Project-file fields of the force analysis: load cases, held edges, capacities and stiffness.

Read through a few hook lines in :mod:`bracegrid.io.reading` (with its problem collector) and
written back through hook lines in :mod:`bracegrid.io.writing`. Every field is optional; a file
without them reads as before. docs/project-file.md documents each one.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence
from typing import Any, Protocol

from bracegrid.io.positions import Positions, cite
from bracegrid.model import (
    Edge,
    Frame,
    GridStrength,
    LoadCase,
    MemberKind,
    MemberStrength,
    StrengthCatalogue,
    Supports,
)

#: Fields a ``[costs.<kind>]`` table may hold besides its prices.
RATE_KEYS = {"tension_kn", "compression_kn", "ea_kn"}
#: Fields a ``[[frame]]`` table may hold for the force analysis.
FRAME_KEYS = {"load", "held_edges"}
#: Top-level tables added by the force analysis.
TOP_KEYS = {"grid"}
_GRID_KEYS = {"ea_kn", "standard_kn", "ledger_kn", "uplift_kn"}
_LOAD_KEYS = {"name", "horizontal", "vertical", "gravity", "point", "reverse"}

#: Largest force or capacity accepted, kN: far above any frame bracegrid is meant for, and small
#: enough that products of forces and millimetre lengths stay exact in double precision.
MAX_KN = 1.0e7
#: Axial stiffness accepted, kN (E times A): from a thin strap to a heavy steel section, with room.
MIN_EA_KN, MAX_EA_KN = 1.0e-3, 1.0e10
#: Largest ratio between the stiffness values of one project: beyond it the stiffness matrix loses
#: more digits than the residual check (1e-9 of the load) can spare.
MAX_EA_RATIO = 1.0e6


class Problems(Protocol):
    """The reader's problem collector (see :mod:`bracegrid.io.reading`)."""

    def add(self, where: str, what: str) -> None:
        """Record one problem."""

    def unknown_keys(self, where: str, table: Mapping[str, Any], known: set[str]) -> None:
        """Record every key of ``table`` not in ``known``."""


def _kn(col: Problems, where: str, value: object, *, positive: bool, limit: float = MAX_KN) -> float | None:
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(float(value)):
        col.add(where, f"expected a number of kN, got {value!r}")
        return None
    got = float(value)
    if positive and got <= 0:
        col.add(where, f"must be above 0 kN (leave the field out to report forces only), got {value!r}")
        return None
    if got < 0:
        col.add(where, f"must be 0 or more kN, got {value!r}")
        return None
    if got > limit:
        col.add(where, f"{value!r} kN is above the largest value accepted ({limit:g} kN); check the unit (kN)")
        return None
    return got


def _strength(col: Problems, where: str, table: Mapping[str, Any], keys: Sequence[str]) -> dict[str, float | None]:
    out: dict[str, float | None] = {}
    for key in keys:
        if key not in table:
            out[key] = None
        elif key == "ea_kn":
            got = _kn(col, f"{where}.{key}", table[key], positive=True, limit=MAX_EA_KN)
            if got is not None and got < MIN_EA_KN:
                col.add(f"{where}.{key}", f"{got:g} kN is below the smallest stiffness accepted ({MIN_EA_KN:g} kN)")
                got = None
            out[key] = got
        else:
            out[key] = _kn(col, f"{where}.{key}", table[key], positive=key != "uplift_kn")
    return out


def read_strength(col: Problems, data: Mapping[str, Any], frames: Sequence[Frame]) -> StrengthCatalogue:
    """Capacities and stiffness from ``[grid]`` and the ``[costs.<kind>]`` tables; checks loaded frames.

    Args:
        col: The reader's problem collector.
        data: The whole parsed document.
        frames: The frames read (those with load cases must find every stiffness they need).

    Returns:
        The catalogue (fields not given stay None).
    """
    costs = data.get("costs")
    kinds: dict[str, MemberStrength] = {}
    for kind in MemberKind:
        raw = costs.get(kind.value) if isinstance(costs, dict) else None
        table = raw if isinstance(raw, dict) else {}
        where = f"[costs.{kind.value}]"
        if kind is MemberKind.TIE and "compression_kn" in table:
            col.add(f"{where}.compression_kn", "a tie acts in tension only; remove compression_kn (or use a brace)")
        values = _strength(col, where, table, ("tension_kn", "compression_kn", "ea_kn"))
        if kind is MemberKind.TIE:
            values["compression_kn"] = None
        kinds[kind.value] = MemberStrength(**values)
    raw_grid = data.get("grid", {})
    grid_table: Mapping[str, Any] = {}
    if not isinstance(raw_grid, dict):
        col.add("[grid]", f"expected a table, got {type(raw_grid).__name__}")
    else:
        grid_table = raw_grid
        col.unknown_keys("[grid]", grid_table, _GRID_KEYS)
    grid = GridStrength(**_strength(col, "[grid]", grid_table, ("ea_kn", "standard_kn", "ledger_kn", "uplift_kn")))
    strength = StrengthCatalogue(brace=kinds["brace"], tie=kinds["tie"], grid=grid)
    _check_stiffness(col, strength, frames)
    return strength


def _check_stiffness(col: Problems, strength: StrengthCatalogue, frames: Sequence[Frame]) -> None:
    loaded = [f for f in frames if f.loads]
    if not loaded:
        return
    names = ", ".join(repr(f.name) for f in loaded)
    if strength.grid.ea_kn is None:
        col.add(
            "[grid].ea_kn",
            f"missing: frame {names} has load cases, and member forces depend on the axial stiffness of the "
            "standards and ledgers; add `ea_kn = ...` (E times A, kN) to a [grid] table",
        )
    needed: dict[MemberKind, list[str]] = {}
    for f in loaded:
        for kind in sorted(f.allow | {m.kind for m in f.members}, key=lambda k: k.value):
            needed.setdefault(kind, []).append(f.name)
    for kind, who in needed.items():
        if strength.of(kind).ea_kn is None:
            col.add(
                f"[costs.{kind.value}].ea_kn",
                f"missing: frame {', '.join(repr(n) for n in who)} has load cases and may hold {kind.value}s, "
                f"and forces in an indeterminate layout depend on their stiffness; add `ea_kn = ...` "
                f"(E times A, kN) to [costs.{kind.value}]",
            )
    values = [v for v in (strength.grid.ea_kn, strength.brace.ea_kn, strength.tie.ea_kn) if v is not None]
    if values and max(values) > MAX_EA_RATIO * min(values):
        col.add(
            "[grid].ea_kn",
            f"the stiffness values ({', '.join(f'{v:g}' for v in values)} kN) are more than {MAX_EA_RATIO:g} times "
            "apart, beyond what the solve can carry accurately; check the units (every ea_kn is E times A in kN)",
        )


def _line_values(col: Problems, where: str, raw: object, counts: tuple[int, ...], what: str) -> list[float] | None:
    if not isinstance(raw, list) or len(raw) not in counts:
        want = " or ".join(str(c) for c in counts)
        got = f"{len(raw)} values" if isinstance(raw, list) else repr(raw)
        col.add(where, f"expected a list of {want} forces in kN ({what}), got {got}")
        return None
    out: list[float] = []
    for k, item in enumerate(raw, start=1):
        if isinstance(item, bool) or not isinstance(item, int | float) or not math.isfinite(float(item)):
            col.add(f"{where}[{k}]", f"expected a force in kN, got {item!r}")
            return None
        if abs(float(item)) > MAX_KN:
            col.add(f"{where}[{k}]", f"{item!r} kN is beyond the largest force accepted ({MAX_KN:g} kN)")
            return None
        out.append(float(item))
    return out


def _read_load(col: Problems, where: str, raw: object, frame: Frame) -> LoadCase | None:
    if not isinstance(raw, dict):
        col.add(where, f"expected a table, got {type(raw).__name__}")
        return None
    col.unknown_keys(where, raw, _LOAD_KEYS)
    name = raw.get("name")
    if not isinstance(name, str) or not name.strip():
        col.add(f"{where}.name", f"expected a non-empty string, got {name!r}")
        name = None
    r_count, c_count = frame.rows, frame.cols
    horizontal: list[float] | None = [0.0] * (r_count + 1)
    if "horizontal" in raw:
        got = _line_values(col, f"{where}.horizontal", raw["horizontal"], (r_count, r_count + 1),
                           f"one per horizontal grid line 1..{r_count}, or 0..{r_count}")  # fmt: skip
        horizontal = None if got is None else ([0.0, *got] if len(got) == r_count else got)
    vertical: list[float] | None = []
    if "vertical" in raw:
        vertical = _line_values(col, f"{where}.vertical", raw["vertical"], (c_count + 1,),
                                f"one per vertical grid line 0..{c_count}")  # fmt: skip
    gravity: list[float] | None = []
    if "gravity" in raw:
        gravity = _line_values(col, f"{where}.gravity", raw["gravity"], (c_count + 1,),
                               f"downwards, one per vertical grid line 0..{c_count}")  # fmt: skip
        if frame.held_edges:
            col.add(f"{where}.gravity", "a plan grid with held edges lies flat: weight acts out of its plane; "
                    "remove gravity (use vertical for in-plane forces along the vertical grid lines)")  # fmt: skip
            gravity = None
    points: list[tuple[int, int, float, float]] | None = []
    if "point" in raw:
        points = _points(col, f"{where}.point", raw["point"], frame)
    if not any(k in raw for k in ("horizontal", "vertical", "gravity", "point")):
        col.add(where, f"no forces: add horizontal = [...] (kN along horizontal grid lines 1..{r_count})")
        return None
    reverse = raw.get("reverse", False)
    if not isinstance(reverse, bool):
        col.add(f"{where}.reverse", f"expected true or false, got {reverse!r}")
        return None
    if name is None or horizontal is None or vertical is None or points is None or gravity is None:
        return None
    return LoadCase(
        name=name, horizontal_kn=tuple(horizontal), vertical_kn=tuple(vertical), reverse=reverse,
        point_kn=tuple(points), gravity_kn=tuple(gravity),
    )  # fmt: skip


def _points(col: Problems, where: str, raw: object, frame: Frame) -> list[tuple[int, int, float, float]] | None:
    form = "[[p, q, fx, fy], ...] (node on horizontal line p and vertical line q; kN)"
    if not isinstance(raw, list):
        col.add(where, f"expected {form}, got {raw!r}")
        return None
    out = []
    for k, item in enumerate(raw, start=1):
        here = f"{where}[{k}]"
        if not isinstance(item, list) or len(item) != 4:
            col.add(here, f"expected [p, q, fx, fy], got {item!r}")
            return None
        p, q, fx, fy = item
        if not all(isinstance(v, int) and not isinstance(v, bool) for v in (p, q)):
            col.add(here, f"p and q must be whole numbers, got {p!r}, {q!r}")
            return None
        if not (0 <= p <= frame.rows and 0 <= q <= frame.cols):
            col.add(here, f"node ({p}, {q}) is outside the frame; p runs 0..{frame.rows}, q runs 0..{frame.cols}")
            return None
        forces = []
        for v in (fx, fy):
            if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(float(v)) or abs(v) > MAX_KN:
                col.add(here, f"fx and fy must be forces in kN (at most {MAX_KN:g}), got {v!r}")
                return None
            forces.append(float(v))
        out.append((p, q, forces[0], forces[1]))
    return out


def add_frame_loads(col: Problems, frame: Frame, raw: Mapping[str, Any], *, index: int, lines: Positions) -> Frame:
    """The frame with its ``held_edges`` and ``[[frame.load]]`` cases read from its table.

    Args:
        col: The reader's problem collector.
        frame: The frame as read so far.
        raw: Its table in the document.
        index: Its position among the ``[[frame]]`` tables (for line numbers).
        lines: Where the file's tables and fields are (:func:`bracegrid.io.positions.locate`).

    Returns:
        The frame with loads and held edges (unchanged where they have problems, which are recorded).
    """
    frame_line = lines.element_line(("frame",), index)

    def field_at(key: str) -> str:  # the field's own line, else its frame's
        line = lines.element_key(("frame",), index, key)
        return cite(frame_line if line is None else line)

    def load_at(k: int) -> str:  # the k-th [[frame.load]] (or the inline `load = [...]`), else the frame
        line = lines.element_item(("frame",), index, "load", k)
        return cite(frame_line if line is None else line)

    where = f"frame {frame.name!r}"
    held: set[Edge] = set()
    raw_held = raw.get("held_edges", [])
    names = [e.value for e in Edge]
    at_held = field_at("held_edges")
    if not isinstance(raw_held, list):
        col.add(f"{at_held}{where}.held_edges", f'expected a list such as ["left", "right"], got {raw_held!r}')
    else:
        for k, item in enumerate(raw_held, start=1):
            if isinstance(item, str) and item.strip().lower() in names:
                held.add(Edge(item.strip().lower()))
            else:
                col.add(f"{at_held}{where}.held_edges[{k}]",
                        f"{item!r} is not one of {', '.join(repr(n) for n in names)}")  # fmt: skip
    if held and frame.supports is Supports.BASE:
        col.add(f"{at_held}{where}.held_edges", "a frame on a pinned base is held by its base; held edges are for "
                "plan grids (supports = \"free\"); remove held_edges or set supports = \"free\"")  # fmt: skip
    frame = dataclasses.replace(frame, held_edges=frozenset(held))
    cases: list[LoadCase] = []
    raw_loads = raw.get("load", [])
    if not isinstance(raw_loads, list):
        col.add(f"{field_at('load')}{where}.load", "write each load case as a [[frame.load]] table")
        raw_loads = []
    read_at: list[int] = []  # the position among the load tables of each case read
    for k, item in enumerate(raw_loads):
        got = _read_load(col, f"{load_at(k)}{where} load #{k + 1}", item, frame)
        if got is not None:
            cases.append(got)
            read_at.append(k)
    seen = [c.name for c in cases]
    for dup in sorted({n for n in seen if seen.count(n) > 1}):
        again = [k for k, n in zip(read_at, seen, strict=True) if n == dup][1]  # the line of the second one
        col.add(f"{load_at(again)}{where}.load", f"two load cases are named {dup!r}; give each a unique name")
    if cases and frame.supports is Supports.FREE and not held:
        col.add(
            f"{load_at(0)}{where}.load",
            'the frame has load cases but nothing holds it: set supports = "base", or list the edges wall lines '
            'hold in held_edges (e.g. ["left", "right", "bottom"])',
        )
    return dataclasses.replace(frame, loads=tuple(cases))


# --------------------------------------------------------------------------- writing


def strength_fields(values: MemberStrength) -> dict[str, float | int]:
    """The capacity and stiffness fields of one ``[costs.<kind>]`` table (only those given)."""
    out: dict[str, float | int] = {}
    for key in ("tension_kn", "compression_kn", "ea_kn"):
        got = getattr(values, key)
        if got is not None:
            out[key] = float(got)
    return out


def grid_table(strength: StrengthCatalogue) -> dict[str, Any]:
    """The ``[grid]`` table (empty when nothing is given)."""
    g = strength.grid
    return {k: float(v) for k in ("ea_kn", "standard_kn", "ledger_kn", "uplift_kn") if (v := getattr(g, k)) is not None}


def frame_load_fields(frame: Frame) -> dict[str, Any]:
    """The ``held_edges`` list and ``[[frame.load]]`` tables of a frame (empty when it has none)."""
    out: dict[str, Any] = {}
    if frame.held_edges:
        out["held_edges"] = [e.value for e in Edge if e in frame.held_edges]
    cases = []
    for case in frame.loads:
        item: dict[str, Any] = {"name": case.name}
        h = case.horizontal_kn
        if any(h):
            item["horizontal"] = [float(v) for v in (h[1:] if h[0] == 0.0 else h)]
        if case.vertical_kn and any(case.vertical_kn):
            item["vertical"] = [float(v) for v in case.vertical_kn]
        if case.gravity_kn and any(case.gravity_kn):
            item["gravity"] = [float(v) for v in case.gravity_kn]
        if case.point_kn:
            item["point"] = [[p, q, float(fx), float(fy)] for p, q, fx, fy in case.point_kn]
        if not any(k in item for k in ("horizontal", "vertical", "gravity", "point")):
            item["horizontal"] = [0.0] * frame.rows
        if case.reverse:
            item["reverse"] = True
        cases.append(item)
    if cases:
        out["load"] = cases
    return out
