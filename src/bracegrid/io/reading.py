"""Reading project files: TOML text -> a validated :class:`~bracegrid.model.Project`.

Validation collects every problem it finds, each with the file, line (of the
table it sits in), field and value and a way to fix it, then raises one
:class:`~bracegrid.errors.InputError` holding them all. The file format is
documented in docs/project-file.md.
"""

from __future__ import annotations

import difflib
import math
import os
import stat
import tomllib
import warnings
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, TypeVar

import tomlkit
import tomlkit.exceptions
from shapely.geometry import box
from shapely.validation import explain_validity

import bracegrid.io.general as general
import bracegrid.io.loads as loads
import bracegrid.io.rules as rules
from bracegrid.errors import InputError
from bracegrid.io.positions import Positions, cite, locate
from bracegrid.io.robustness import TABLE as ROBUSTNESS_TABLE
from bracegrid.io.robustness import read_robustness
from bracegrid.model import (
    MAX_CONTINGENCY_PCT,
    MAX_LAYOUT_PRICE,
    MAX_RATE,
    CostCatalogue,
    CostRate,
    Diagonal,
    Frame,
    Member,
    MemberKind,
    Opening,
    Project,
    Supports,
    blocked_bays,
    opening_polygon,
)
from bracegrid.units import MAX_BAY_MM, MAX_LENGTH_MM, MM_PER_UNIT, cut_length_mm, parse_length

_PROJECT_KEYS = {"name", "length_unit"}
_COST_KEYS = {*(k.value for k in MemberKind), "contingency_pct"}
_RATE_KEYS = {"per_piece", "per_metre", "labour_per_piece"} | loads.RATE_KEYS
_FRAME_KEYS = {
    "name", "widths", "heights", "supports", "blocked", "allow", "opening",
    "member", "opening_overlap", "redundancy",
} | loads.FRAME_KEYS | general.FRAME_KEYS | rules.FRAME_KEYS  # fmt: skip
_OPENING_KEYS = {"name", "polygon"}
_MEMBER_KEYS = {"row", "col", "kind", "diagonal", "status"}
_STATUS = {"existing": True, "proposed": False}
_E = TypeVar("_E", MemberKind, Diagonal, Supports)

#: Largest ``redundancy`` (members a layout must survive losing); far above what any frame reaches.
MAX_REDUNDANCY = 1000

#: Largest project file read (bytes): the biggest demo is a few kB; a 3000 x 3000 frame with every member
#: listed as a [[frame.member]] table would need far more, but such frames are given without members.
MAX_FILE_BYTES = 16 * 1024 * 1024

#: Deepest nesting of arrays and inline tables a project file may use: valid files need 3
#: (``point = [[...], ...]`` inside a table); the bound is checked on the text before any parser
#: walks it, so a file nested thousands deep is refused in words, not with a RecursionError.
MAX_NESTING = 16


@dataclass(slots=True)
class _Lines:
    """Line numbers of the file's tables and fields, from tomlkit's parser (:mod:`bracegrid.io.positions`)."""

    found: Positions = field(default_factory=Positions)

    @classmethod
    def scan(cls, text: str) -> _Lines:
        return cls(locate(text) if text else Positions())

    def frame(self, index: int) -> str:
        """``"line N, "`` for the ``index``-th (from 0) ``[[frame]]``, or ``""``."""
        return cite(self.found.element_line(("frame",), index))

    def table(self, *path: str) -> str:
        """``"line N, "`` for a table (:meth:`~bracegrid.io.positions.Positions.within`), or ``""``."""
        return cite(self.found.within(*path))

    def key(self, table: tuple[str, ...], key: str) -> str:
        """``"line N, "`` for a field of a table (``()`` = the top level), or the table's line, or ``""``."""
        line = self.found.key(table, key)
        return cite(line) if line is not None else (self.table(*table) if table else "")

    def item(self, index: int, kind: str, k: int) -> str:
        """The line of the ``k``-th ``[[frame.<kind>]]`` of frame ``index``, or of its inline ``<kind> = [...]`` key."""
        return cite(self.found.element_item(("frame",), index, kind, k))


class _Collector:
    """Gathers problems while reading one file."""

    def __init__(self) -> None:
        self.problems: list[str] = []

    def add(self, where: str, what: str) -> None:
        self.problems.append(f"{where}: {what}")

    def unknown_keys(
        self, where: str, table: Mapping[str, Any], known: set[str], *, line: Callable[[str], str] | None = None
    ) -> None:
        for key in table:
            if key not in known:
                guess = difflib.get_close_matches(key, sorted(known), n=1)
                hint = f"; did you mean {guess[0]!r}?" if guess else f"; known fields: {', '.join(sorted(known))}"
                self.add(f"{line(key) if line else ''}{where}", f"unknown field {key!r}{hint}")

    def number(
        self, where: str, value: object, *, minimum: float = 0.0, maximum: float = math.inf, integer: bool = False
    ) -> float | None:
        """A number in ``minimum..maximum``, or None (give every field its documented range as ``maximum``)."""
        ok = isinstance(value, int) if integer else isinstance(value, int | float)
        if isinstance(value, bool) or not ok:
            kind = "a whole number" if integer else "a number"
            self.add(where, f"expected {kind}, got {value!r}")
            return None
        assert isinstance(value, int | float)
        # Compare before converting: a huge integer (9223372036854775807 and beyond) stays exact.
        if not (isinstance(value, int) or math.isfinite(value)) or not minimum <= value <= maximum:
            span = f"from {minimum:g} to {maximum:g}" if math.isfinite(maximum) else f"of at least {minimum:g}"
            self.add(where, f"{value!r} is out of range; give a value {span}")
            return None
        return float(value)

    def table(self, where: str, value: object) -> Mapping[str, Any] | None:
        if not isinstance(value, dict):
            self.add(where, f"expected a table, got {type(value).__name__}")
            return None
        return value

    def text(self, where: str, value: object) -> str | None:
        if not isinstance(value, str) or not value.strip():
            self.add(where, f"expected a non-empty string, got {value!r}")
            return None
        return value


def nesting_depth(text: str) -> tuple[int, int]:
    """The deepest nesting of ``[`` and ``{`` outside strings and comments, and the line it is first reached on.

    A plain scan of the characters (no recursion), so any text, however deep, is measured safely.
    Table headers count too (``[[frame]]`` is 2 deep for a moment), which only makes it stricter.

    Example:
        >>> nesting_depth('a = [[1, "[[["], {b = [2]}]  # [[[[')
        (3, 1)
    """
    depth = deepest = 0
    line = deepest_line = 1
    k, n = 0, len(text)
    while k < n:
        c = text[k]
        if c == "\n":
            line += 1
        elif c == "#":
            end = text.find("\n", k)
            k = n if end < 0 else end
            continue
        elif c in "\"'":
            triple = text.startswith(c * 3, k)
            close = c * 3 if triple else c
            j = k + len(close)
            while j < n and not text.startswith(close, j):
                if text[j] == "\\" and c == '"':
                    j += 1
                elif text[j] == "\n" and not triple:
                    break
                j += 1
            line += text.count("\n", k, j)
            k = j + len(close)
            continue
        elif c in "[{":
            depth += 1
            if depth > deepest:
                deepest, deepest_line = depth, line
        elif c in "]}":
            depth = max(0, depth - 1)
        k += 1
    return deepest, deepest_line


def _read_rate(col: _Collector, where: str, raw: object) -> CostRate | None:
    table = col.table(where, raw)
    if table is None:
        return None
    col.unknown_keys(where, table, _RATE_KEYS)
    values: dict[str, float] = {}
    for key in ("per_piece", "per_metre"):
        if key not in table:
            col.add(where, f"missing field {key!r}; add e.g. `{key} = 10.0` (money)")
            continue
        got = col.number(f"{where}.{key}", table[key], maximum=MAX_RATE)
        if got is not None:
            values[key] = got
    labour = col.number(f"{where}.labour_per_piece", table.get("labour_per_piece", 0.0), maximum=MAX_RATE)
    if len(values) < 2 or labour is None:
        return None
    return CostRate(values["per_piece"], values["per_metre"], labour)


def _read_costs(col: _Collector, raw: object, lines: _Lines) -> CostCatalogue | None:
    if raw is None:
        col.add("[costs]", "missing; add [costs.brace] and [costs.tie] tables with per_piece and per_metre")
        return None
    table = col.table(f"{lines.key((), 'costs')}[costs]", raw)
    if table is None:
        return None
    col.unknown_keys("[costs]", table, _COST_KEYS, line=lambda key: lines.key(("costs",), key))
    rates: dict[str, CostRate | None] = {}
    for kind in (k.value for k in MemberKind):
        if kind not in table:
            col.add(f"{lines.table('costs')}[costs.{kind}]", "missing; add it with per_piece and per_metre (money)")
            rates[kind] = None
        else:
            rates[kind] = _read_rate(col, f"{lines.table('costs', kind)}[costs.{kind}]", table[kind])
    contingency = col.number(
        f"{lines.key(('costs',), 'contingency_pct')}[costs].contingency_pct",
        table.get("contingency_pct", 0.0),
        maximum=MAX_CONTINGENCY_PCT,
    )
    if contingency is None or any(r is None for r in rates.values()):
        return None
    return CostCatalogue(**rates, contingency_pct=contingency)  # type: ignore[arg-type]  # None ruled out above


def _read_sizes(col: _Collector, where: str, raw: object, unit: str) -> tuple[int, ...] | None:
    if not isinstance(raw, list) or not raw:
        col.add(where, f"expected a non-empty list of lengths (e.g. [3.0, 2.4]), got {raw!r}")
        return None
    out: list[int] = []
    for k, item in enumerate(raw, start=1):
        try:
            mm = parse_length(item, unit=unit)
        except ValueError as exc:
            col.add(f"{where}[{k}]", str(exc))
            continue
        if not 1 <= mm <= MAX_BAY_MM:
            what = "size must be positive" if mm < 1 else "size is out of range"
            col.add(f"{where}[{k}]", f"{what}: a bay size runs from 1 mm to 1 km, got {item!r}")
            continue
        out.append(mm)
    if len(out) != len(raw):
        return None
    if sum(out) > MAX_LENGTH_MM:
        col.add(where, f"the sizes add up to {sum(out) / 1e6:g} km; a frame may be at most 100 km across")
        return None
    return tuple(out)


def _read_bay(col: _Collector, where: str, raw: object, rows: int | None, cols: int | None) -> tuple[int, int] | None:
    if (
        not isinstance(raw, list)
        or len(raw) != 2
        or not all(isinstance(v, int) and not isinstance(v, bool) for v in raw)
    ):
        col.add(where, f"expected [row, col] with whole numbers, got {raw!r}")
        return None
    row, column = int(raw[0]), int(raw[1])
    return _check_bay(col, where, row, column, rows, cols)


def _check_bay(
    col: _Collector, where: str, row: int, column: int, rows: int | None, cols: int | None
) -> tuple[int, int] | None:
    ok = True
    if rows is not None and not 1 <= row <= rows:
        col.add(where, f"row {row} is outside the frame; rows run 1..{rows} from the bottom")
        ok = False
    if cols is not None and not 1 <= column <= cols:
        col.add(where, f"col {column} is outside the frame; columns run 1..{cols} from the left")
        ok = False
    return (row, column) if ok and rows is not None and cols is not None else None


def _read_enum(col: _Collector, where: str, raw: object, enum: type[_E]) -> _E | None:
    choices = [e.value for e in enum]
    if isinstance(raw, str) and raw.strip().lower() in choices:
        return enum(raw.strip().lower())
    col.add(where, f"{raw!r} is not one of {', '.join(repr(c) for c in choices)}")
    return None


def _read_opening(
    col: _Collector, where: str, raw: object, unit: str, frame_box: tuple[int, int] | None
) -> Opening | None:
    table = col.table(where, raw)
    if table is None:
        return None
    col.unknown_keys(where, table, _OPENING_KEYS)
    name = col.text(f"{where}.name", table.get("name"))
    pts = table.get("polygon")
    if not isinstance(pts, list) or len(pts) < 3:
        col.add(f"{where}.polygon", f"expected at least 3 [x, y] points in {unit}, got {pts!r}")
        return None
    coords: list[tuple[int, int]] = []
    for k, p in enumerate(pts, start=1):
        if not isinstance(p, list) or len(p) != 2:
            col.add(f"{where}.polygon[{k}]", f"expected [x, y], got {p!r}")
            continue
        try:
            coords.append((parse_length(p[0], unit=unit), parse_length(p[1], unit=unit)))
        except ValueError as exc:
            col.add(f"{where}.polygon[{k}]", str(exc))
    if len(coords) != len(pts) or name is None:
        return None
    opening = Opening(name=name, polygon=tuple(coords))
    with warnings.catch_warnings(record=True) as caught:  # shapely's numeric warnings become problems
        warnings.simplefilter("always")
        poly = opening_polygon(opening)
        valid, area = poly.is_valid, poly.area
        reason = explain_validity(poly) if not valid else "it has no area"
    if caught:
        col.add(
            f"{where}.polygon",
            f"opening {name!r}: its geometry cannot be computed ({caught[0].message}); check the coordinates",
        )
        return None
    if not valid or area <= 0:
        col.add(f"{where}.polygon", f"opening {name!r} is not a valid polygon ({reason}); list its corners in order")
        return None
    if frame_box is not None:
        w, h = frame_box
        if not box(0, 0, w, h).buffer(1.0).contains(poly):
            x0, y0, x1, y1 = poly.bounds
            col.add(
                f"{where}.polygon",
                f"opening {name!r} (x {x0:.0f}-{x1:.0f} mm, y {y0:.0f}-{y1:.0f} mm) extends beyond the frame "
                f"(0-{w} mm by 0-{h} mm); clip it to the frame or add bays",
            )
            return None
    return opening


def _read_member(col: _Collector, where: str, raw: object, rows: int | None, cols: int | None) -> Member | None:
    table = col.table(where, raw)
    if table is None:
        return None
    col.unknown_keys(where, table, _MEMBER_KEYS)
    ok = True
    for key in ("row", "col", "kind", "diagonal"):
        if key not in table:
            col.add(where, f"missing field {key!r}")
            ok = False
    if not ok:
        return None
    row, column = table["row"], table["col"]
    if not (isinstance(row, int) and isinstance(column, int)) or isinstance(row, bool) or isinstance(column, bool):
        col.add(where, f"row and col must be whole numbers, got row={row!r}, col={column!r}")
        return None
    bay = _check_bay(col, where, row, column, rows, cols)
    kind = _read_enum(col, f"{where}.kind", table["kind"], MemberKind)
    diagonal = _read_enum(col, f"{where}.diagonal", table["diagonal"], Diagonal)
    status = table.get("status", "existing")
    if status not in _STATUS:
        col.add(f"{where}.status", f"{status!r} is not 'existing' or 'proposed'")
        return None
    if bay is None or kind is None or diagonal is None:
        return None
    return Member(row=row, col=column, kind=kind, diagonal=diagonal, existing=_STATUS[status])


def _table_array(col: _Collector, where: str, table: Mapping[str, Any], key: str) -> list[Any]:
    raw = table.get(key, [])
    if isinstance(raw, list):
        return raw
    col.add(f"{where}.{key}", f"write each {key} as a [[frame.{key}]] table")
    return []


def _read_frame(col: _Collector, index: int, raw: object, unit: str, lines: _Lines) -> Frame | None:
    where0 = f"{lines.frame(index)}[[frame]] #{index + 1}"
    table = col.table(where0, raw)
    if table is None:
        return None
    name = col.text(f"{where0}.name", table.get("name"))
    where = f"{lines.frame(index)}frame {name!r}" if name else where0
    col.unknown_keys(where, table, _FRAME_KEYS)
    widths = _read_sizes(col, f"{where}.widths", table.get("widths"), unit)
    heights = _read_sizes(col, f"{where}.heights", table.get("heights"), unit)
    rows = len(heights) if heights else None
    cols = len(widths) if widths else None
    supports = _read_enum(col, f"{where}.supports", table.get("supports", "free"), Supports)
    blocked: set[tuple[int, int]] = set()
    raw_blocked = table.get("blocked", [])
    if not isinstance(raw_blocked, list):
        col.add(f"{where}.blocked", f"expected a list of [row, col] pairs, got {raw_blocked!r}")
    else:
        for k, item in enumerate(raw_blocked, start=1):
            bay = _read_bay(col, f"{where}.blocked[{k}]", item, rows, cols)
            if bay is not None:
                blocked.add(bay)
    allow: set[MemberKind] = set()
    allow_ok = True
    raw_allow = table.get("allow", ["brace", "tie"])
    if not isinstance(raw_allow, list) or not raw_allow:
        col.add(f"{where}.allow", f'expected a non-empty list such as ["brace", "tie"], got {raw_allow!r}')
        allow_ok = False
    else:
        for k, item in enumerate(raw_allow, start=1):
            kind = _read_enum(col, f"{where}.allow[{k}]", item, MemberKind)
            if kind is None:
                allow_ok = False
            else:
                allow.add(kind)  # a kind named twice ("brace", "Brace") is the same kind: merged
    overlap = col.number(f"{where}.opening_overlap", table.get("opening_overlap", 0.0), maximum=1.0)
    if overlap is not None and overlap >= 1.0:
        col.add(f"{where}.opening_overlap", f"must be a fraction below 1 (0 = any overlap blocks), got {overlap}")
    redundancy = col.number(f"{where}.redundancy", table.get("redundancy", 0), maximum=MAX_REDUNDANCY, integer=True)
    frame_box = (sum(widths), sum(heights)) if widths and heights else None
    openings: list[Opening] = []
    for k, item in enumerate(_table_array(col, where, table, "opening")):
        at = lines.item(index, "opening", k)
        got = _read_opening(col, f"{at}frame {name!r} opening #{k + 1}", item, unit, frame_box)
        if got is not None:
            openings.append(got)
    names = [o.name for o in openings]
    for dup in sorted({n for n in names if names.count(n) > 1}):
        col.add(f"{where}.opening", f"two openings are named {dup!r}; give each a unique name")
    members: list[Member] = []
    member_where: list[str] = []
    for k, item in enumerate(_table_array(col, where, table, "member")):
        at = lines.item(index, "member", k)
        here = f"{at}frame {name!r} member #{k + 1}"
        member = _read_member(col, here, item, rows, cols)
        if member is not None:
            members.append(member)
            member_where.append(here)
    if (
        name is None
        or widths is None
        or heights is None
        or supports is None
        or overlap is None
        or overlap >= 1.0
        or redundancy is None
        or not allow_ok
    ):
        return None
    frame = Frame(
        name=name,
        widths=widths,
        heights=heights,
        supports=supports,
        blocked=frozenset(blocked),
        openings=tuple(openings),
        allow=frozenset(allow),
        members=tuple(members),
        opening_overlap=overlap,
        redundancy=int(redundancy),
    )
    _check_members(col, frame, member_where)
    return frame


def _check_layout_price(col: _Collector, frame: Frame, costs: CostCatalogue | None) -> None:
    """The dearest layout of the frame (both diagonals of every bay, dearest kind) must be priced exactly."""
    if costs is None:
        return
    longest = cut_length_mm(max(frame.widths), max(frame.heights))
    dearest = max(costs.member_price_cents(kind, longest) for kind in MemberKind) / 100
    total = dearest * 2 * frame.rows * frame.cols
    if total > MAX_LAYOUT_PRICE:
        col.add(
            f"frame {frame.name!r}",
            f"the dearest layout would cost {total:.3g} (every bay braced both ways at {dearest:.3g} a member); "
            f"prices and sizes must keep it below {MAX_LAYOUT_PRICE:.0e} so costs stay exact: check the units "
            "of the prices in [costs] and of widths and heights",
        )


def _check_members(col: _Collector, frame: Frame, where: list[str]) -> None:
    closed = blocked_bays(frame)
    seen: dict[tuple[int, int, Diagonal], str] = {}
    listed = frame.blocked
    for member, here in zip(frame.members, where, strict=True):
        if member.bay in closed:
            why = "listed in 'blocked'" if member.bay in listed else "covered by an opening"
            col.add(
                here,
                f"a {member.kind.value} in bay r{member.row}c{member.col} but that bay is {why}; "
                "remove the member or unblock the bay",
            )
        key = (member.row, member.col, member.diagonal)
        if key in seen:
            col.add(
                here,
                f"the {member.diagonal.value} diagonal of bay r{member.row}c{member.col} already holds "
                f"a member ({seen[key]}); one member per diagonal",
            )
        else:
            seen[key] = here


def syntax_error_position(text: str, exc: tomllib.TOMLDecodeError) -> str:
    """The standard library's message, with a line and column where it only says "at end of document".

    tomlkit reads the same text with its own parser and names the line and column where it
    stopped; its position is used only to place the message, never for the values.
    """
    message = str(exc)
    if "end of document" not in message:
        return message
    try:
        tomlkit.parse(text)
    except tomlkit.exceptions.ParseError as err:
        return f"{message.replace(' (at end of document)', '')} (line {err.line}, column {err.col})"
    except Exception:  # tomlkit accepts or fails differently: keep the standard message
        return message
    lines = text.count("\n") + (0 if text.endswith("\n") else 1)
    return f"{message.replace(' (at end of document)', '')} (at the end, line {lines})"


def parse_project(text: str, *, source: str = "<string>") -> Project:
    """Read and validate a project from TOML text.

    Args:
        text: The TOML document.
        source: File name used in error messages.

    Returns:
        The validated project.

    Raises:
        InputError: With every problem found.

    Example:
        >>> p = parse_project('''
        ... [project]
        ... name = "demo"
        ... [costs.brace]
        ... per_piece = 25.0
        ... per_metre = 8.0
        ... [costs.tie]
        ... per_piece = 9.0
        ... per_metre = 3.0
        ... [[frame]]
        ... name = "f"
        ... widths = [3.0, 3.0]
        ... heights = [2.0]
        ... ''')
        >>> p.frames[0].widths
        (3000, 3000)
    """
    depth, line = nesting_depth(text)
    if depth > MAX_NESTING:
        msg = (
            f"line {line}: arrays or inline tables nested {depth} deep; a project file needs at most "
            f"{MAX_NESTING} levels of [ ] and {{ }}; check for a bracket left open"
        )
        raise InputError(msg, source=source)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        msg = f"not valid TOML: {syntax_error_position(text, exc)}; fix the syntax at that place"
        raise InputError(msg, source=source) from None
    return project_from_data(data, source=source, text=text)


def project_from_data(data: Mapping[str, Any], *, source: str = "<data>", text: str = "") -> Project:
    """Validate a project given as the tables of a parsed project file (what ``tomllib`` returns).

    Shells that edit a project (the browser editor) hand their edits over in the file's own
    field names, so every value is checked by the same rules and worded in the same messages
    as a file.

    Args:
        data: The parsed tables: ``project``, ``costs``, ``frame`` as in a project file.
        source: Name used in error messages.
        text: The TOML text the tables came from, if any (messages then carry line numbers).

    Returns:
        The validated project.

    Raises:
        InputError: With every problem found.

    Example:
        >>> costs = {"brace": {"per_piece": 25.0, "per_metre": 8.0}, "tie": {"per_piece": 9.0, "per_metre": 3.0}}
        >>> frame = {"name": "f", "widths": [3.0, "x"], "heights": [2.0]}
        >>> try:
        ...     project_from_data({"project": {"name": "p"}, "costs": costs, "frame": [frame]})
        ... except InputError as exc:
        ...     print(exc.problems[0].split(";")[0])
        frame 'f'.widths[2]: cannot read 'x' as a length
    """
    col = _Collector()
    lines = _Lines.scan(text)
    col.unknown_keys(
        "top level",
        data,
        {"project", "costs", "frame", ROBUSTNESS_TABLE} | loads.TOP_KEYS,
        line=lambda key: lines.table(key) or lines.key((), key),
    )
    at_project = lines.table("project")
    head = col.table(f"{at_project}[project]", data.get("project", {}))
    name = "untitled"
    unit = "m"
    if head is not None:
        col.unknown_keys("[project]", head, _PROJECT_KEYS, line=lambda key: lines.key(("project",), key))
        if "name" not in head:
            col.add(f"{at_project}[project]", "missing field 'name'; add e.g. name = \"My site\"")
        else:
            name = col.text(f"{lines.key(('project',), 'name')}[project].name", head["name"]) or name
        raw_unit = head.get("length_unit", "m")
        if raw_unit not in MM_PER_UNIT:
            col.add(
                f"{lines.key(('project',), 'length_unit')}[project].length_unit",
                f"{raw_unit!r} is not one of {', '.join(MM_PER_UNIT)}",
            )
        else:
            unit = raw_unit
    costs = _read_costs(col, data.get("costs"), lines)
    likelihood, robustness_problems = read_robustness(data.get(ROBUSTNESS_TABLE), lines=lines.found)
    col.problems.extend(robustness_problems)
    raw_frames = data.get("frame")
    frames: list[Frame] = []
    if not isinstance(raw_frames, list) or not raw_frames:
        col.add("[[frame]]", "no frames; add at least one [[frame]] table with name, widths and heights")
        raw_frames = []
    for index, raw in enumerate(raw_frames):
        before = len(col.problems)
        got = _read_frame(col, index, raw, unit, lines)
        if got is not None:
            got = rules.add_frame_rules(col, got, raw, where=f"frame {got.name!r}")
            got = loads.add_frame_loads(col, got, raw, index=index, lines=lines.found)
            got = general.add_frame_general(col, got, raw, index=index, lines=lines.found)
            frames.append(got)
            _check_layout_price(col, got, costs)
        elif len(col.problems) == before:  # never drop a frame without saying why
            col.add(f"{lines.frame(index)}[[frame]] #{index + 1}", "could not be read; check its fields")
    names = [f.name for f in frames]
    for dup in sorted({n for n in names if names.count(n) > 1}):
        col.add("[[frame]]", f"two frames are named {dup!r}; give each a unique name")
    strength = loads.read_strength(col, data, frames)
    if col.problems or costs is None:
        raise InputError(col.problems or ["costs could not be read"], source=source)
    return Project(
        name=name, frames=tuple(frames), costs=costs, length_unit=unit, source=source, strength=strength,
        loss_likelihood=likelihood,
    )  # fmt: skip


def load_project(path: str | Path) -> Project:
    """Read and validate a project file.

    Args:
        path: The TOML file.

    Returns:
        The validated project.

    Raises:
        InputError: If the file cannot be read or holds any problem.
    """
    p = Path(path)
    return parse_project(read_project_text(p), source=str(p))


def read_project_text(path: str | Path) -> str:
    """The text of a project file, refusing anything that is not a regular file of at most :data:`MAX_FILE_BYTES`.

    The file is opened without blocking (a FIFO with no writer would otherwise wait for ever) and
    checked with ``fstat`` on the open descriptor before a byte is read; at most one byte more than
    the limit is ever read, so ``/dev/zero`` or a growing file cannot fill the memory.

    Raises:
        InputError: If it is missing, not a regular file, too big, unreadable or not UTF-8.
    """
    p = Path(path)
    if not str(path):
        msg = "empty file name; give the path of a project file"
        raise InputError(msg)
    try:
        fd = os.open(p, os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0))
    except FileNotFoundError:
        msg = "file not found; check the path"
        raise InputError(msg, source=str(p)) from None
    except OSError as exc:
        msg = f"cannot open the file ({exc.strerror or exc}); check it is a file you may read"
        raise InputError(msg, source=str(p)) from None
    try:
        info = os.fstat(fd)
        if not stat.S_ISREG(info.st_mode):
            what = "a folder" if stat.S_ISDIR(info.st_mode) else "not a regular file (a device, pipe or socket)"
            msg = f"is {what}; give the path of a project file (TOML)"
            raise InputError(msg, source=str(p))
        if info.st_size > MAX_FILE_BYTES:
            msg = f"{info.st_size} bytes is too big for a project file (at most {MAX_FILE_BYTES} bytes)"
            raise InputError(msg, source=str(p))
        os.set_blocking(fd, True)
        with os.fdopen(fd, "rb", closefd=False) as handle:
            data = handle.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        msg = f"cannot read the file ({exc.strerror or exc}); check it is a file you may read"
        raise InputError(msg, source=str(p)) from None
    finally:
        os.close(fd)
    if len(data) > MAX_FILE_BYTES:
        msg = f"grew beyond {MAX_FILE_BYTES} bytes while being read; give a finished project file"
        raise InputError(msg, source=str(p))
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        msg = f"is not UTF-8 text (byte {exc.start + 1} cannot be read); save it as UTF-8"
        raise InputError(msg, source=str(p)) from None
