"""The fields of a general frame: ``[[frame.missing]]`` grid bar segments and the ``absent`` bays of an outline.

Read through one hook line in :mod:`bracegrid.io.reading`, written through one in
:mod:`bracegrid.io.writing` (docs/project-file.md, "General frames")::

    absent = [[4, 1], [4, 2]]   # bays outside the outline, [row, col]

    [[frame.missing]]
    bar = "ledger"      # or "standard"
    line = 3            # horizontal grid line of a ledger (0..R), vertical grid line of a standard (0..C)
    span = 4            # the column (ledger) or row (standard) the segment spans, 1-based
"""

from __future__ import annotations

import dataclasses
import re
from collections.abc import Mapping
from typing import Any

from bracegrid.io.loads import Problems
from bracegrid.io.positions import Positions, cite
from bracegrid.model import (
    Frame,
    GridBar,
    GridBarKind,
    bay_corners,
    bay_present,
    on_grid,
    outline_bar,
    present_nodes,
)

#: Keys of a ``[[frame]]`` table read here.
FRAME_KEYS = {"missing", "absent"}
_MISSING_KEYS = {"bar", "line", "span"}


def _whole(col: Problems, where: str, value: object) -> int | None:
    if isinstance(value, bool) or not isinstance(value, int):
        col.add(where, f"expected a whole number, got {value!r}")
        return None
    return value


def _read_missing(col: Problems, where: str, raw: object, frame: Frame) -> GridBar | None:
    if not isinstance(raw, Mapping):
        col.add(where, "write each missing grid bar as a [[frame.missing]] table with bar, line and span")
        return None
    col.unknown_keys(where, raw, _MISSING_KEYS)
    kinds = [k.value for k in GridBarKind]
    kind_raw = raw.get("bar")
    if not isinstance(kind_raw, str) or kind_raw.strip().lower() not in kinds:
        col.add(f"{where}.bar", f'expected "ledger" or "standard", got {kind_raw!r}')
        return None
    kind = GridBarKind(kind_raw.strip().lower())
    line, span = _whole(col, f"{where}.line", raw.get("line")), _whole(col, f"{where}.span", raw.get("span"))
    if line is None or span is None:
        return None
    bar = GridBar(kind, line, span)
    if not on_grid(frame, bar):
        lines, spans = (frame.rows, frame.cols) if kind is GridBarKind.LEDGER else (frame.cols, frame.rows)
        what = "column" if kind is GridBarKind.LEDGER else "row"
        col.add(
            where,
            f"{bar.label} is outside the frame: a {kind.value} needs line 0..{lines} and a {what} span "
            f"1..{spans}; fix line or span",
        )
        return None
    if not outline_bar(frame, bar):
        col.add(where, f"{bar.label} borders only absent bays, so the frame has no such bar; remove this entry")
        return None
    return bar


def _read_absent(col: Problems, where: str, raw: object, frame: Frame) -> set[tuple[int, int]]:
    out: set[tuple[int, int]] = set()
    if not isinstance(raw, list):
        col.add(where, f"expected a list of [row, col] pairs, got {raw!r}")
        return out
    for k, item in enumerate(raw, start=1):
        here = f"{where}[{k}]"
        if (
            not isinstance(item, list)
            or len(item) != 2
            or not all(isinstance(v, int) and not isinstance(v, bool) for v in item)
        ):
            col.add(here, f"expected [row, col] with whole numbers, got {item!r}")
            continue
        row, c = int(item[0]), int(item[1])
        if not (1 <= row <= frame.rows and 1 <= c <= frame.cols):
            col.add(here, f"bay r{row}c{c} is outside the frame (rows 1..{frame.rows}, columns 1..{frame.cols})")
            continue
        out.add((row, c))
    if out and len(out) == frame.rows * frame.cols:
        col.add(where, "every bay is absent; keep at least one bay inside the outline")
    return out


def add_frame_general(col: Problems, frame: Frame, raw: Mapping[str, Any], *, index: int, lines: Positions) -> Frame:
    """The frame with its ``absent`` bays and ``[[frame.missing]]`` grid bars read from its table.

    Members in an absent bay, or in a bay one of whose corner nodes no grid bar reaches any more,
    are recorded as problems (they would hang in the air).

    Args:
        col: The reader's problem collector.
        frame: The frame as read so far.
        raw: Its table in the document.
        index: Its position among the ``[[frame]]`` tables (for line numbers).
        lines: Where the file's tables and fields are (:func:`bracegrid.io.positions.locate`).

    Returns:
        The frame with its outline and missing bars (problems are recorded, not raised).
    """
    frame_line = lines.element_line(("frame",), index)
    at_frame = cite(frame_line)

    def field_at(key: str) -> str:  # the field's own line, else its frame's
        line = lines.element_key(("frame",), index, key)
        return cite(frame_line if line is None else line)

    where = f"frame {frame.name!r}"
    absent = _read_absent(col, f"{field_at('absent')}{where}.absent", raw.get("absent", []), frame)
    if len(absent) == frame.rows * frame.cols:
        absent = set()
    shaped = dataclasses.replace(frame, absent=frozenset(absent))
    raw_missing = raw.get("missing", [])
    if not isinstance(raw_missing, list):
        col.add(f"{field_at('missing')}{where}.missing", "write each missing grid bar as a [[frame.missing]] table")
        raw_missing = []
    missing: dict[GridBar, str] = {}
    for k, item in enumerate(raw_missing):
        line = lines.element_item(("frame",), index, "missing", k)  # its [[frame.missing]], or `missing = [...]`
        here = f"{cite(frame_line if line is None else line)}{where} missing #{k + 1}"
        bar = _read_missing(col, here, item, shaped)
        if bar is None:
            continue
        if bar in missing:
            col.add(here, f"{bar.label} is already listed ({missing[bar]}); list each missing bar once")
            continue
        missing[bar] = here
    out = dataclasses.replace(shaped, missing=frozenset(missing))
    if out.is_complete:
        return out
    nodes = present_nodes(out)
    for m in out.members:
        if not bay_present(out, m.row, m.col):
            col.add(
                f"{at_frame}{where} member {m.label}",
                f"bay r{m.row}c{m.col} is absent (outside the outline); remove the member or the bay from 'absent'",
            )
            continue
        gone = [f"({p}, {q})" for p, q in bay_corners(m.row, m.col) if (p, q) not in nodes]
        if gone:
            col.add(
                f"{at_frame}{where} member {m.label}",
                f"corner node {', '.join(gone)} of bay r{m.row}c{m.col} has no grid bar left (node = (line, line)); "
                "remove the member or restore a bar at that node",
            )
    return out


_INLINE_MISSING = re.compile(r"^missing = \[\n((?:    \{[^\n]*\},\n)+)\]\n", re.MULTILINE)
_ENTRY = re.compile(r'\{ bar = "(\w+)", line = (\d+), span = (\d+) \}')


def missing_as_tables(text: str) -> str:
    r"""Write each frame's ``missing`` list in the fixed ``[[frame.missing]]`` table form.

    The TOML writer puts short tables inline (``missing = [{ bar = ... }]``); the meaning is the same,
    but the file form of missing bars is fixed as tables. ``missing`` is the last plain key of a
    frame's table (tables follow it), so its tables can stand where the inline list stood.

    Example:
        >>> print(missing_as_tables('missing = [\n    { bar = "ledger", line = 1, span = 2 },\n]\n'), end="")
        [[frame.missing]]
        bar = "ledger"
        line = 1
        span = 2
    """

    def tables(match: re.Match[str]) -> str:
        rows = _ENTRY.findall(match.group(1))
        return "\n".join(f'[[frame.missing]]\nbar = "{b}"\nline = {line}\nspan = {span}\n' for b, line, span in rows)

    return _INLINE_MISSING.sub(tables, text)


def frame_general_fields(frame: Frame) -> dict[str, Any]:
    """The ``absent`` and ``missing`` entries of a frame's table (empty for a complete frame).

    Example:
        >>> f = Frame("f", (1000,), (1000,), missing=frozenset({GridBar(GridBarKind.LEDGER, 1, 1)}))
        >>> frame_general_fields(f)
        {'missing': [{'bar': 'ledger', 'line': 1, 'span': 1}]}
    """
    out: dict[str, Any] = {}
    if frame.absent:
        out["absent"] = [list(b) for b in sorted(frame.absent)]
    if frame.missing:
        out["missing"] = [
            {"bar": b.kind.value, "line": b.line, "span": b.span}
            for b in sorted(frame.missing, key=lambda b: (b.kind.value, b.line, b.span))
        ]
    return out
