"""Where each table and field of a project file sits: line numbers taken from tomlkit's own parser.

Messages cite lines. Scanning the text for ``[[frame]]`` would be fooled by a multi-line string
that holds such a line, would miss a quoted header (``[["frame"]]``), and knows nothing of inline
tables; tomlkit (the style-preserving TOML library the writer uses) reads headers and keys where
TOML says they are. Its parser is asked only where each header and key starts; the values are
read by the standard library (``tomllib``) as before.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass, field
from typing import Any

import tomlkit
import tomlkit.exceptions
from tomlkit.items import DottedKey
from tomlkit.parser import Parser

Path = tuple[str, ...]


@dataclass(slots=True)
class Positions:
    """Line numbers (from 1) of a file's table headers and keys.

    Attributes:
        headers: ``(path, is_array_table, line)`` for every ``[...]`` / ``[[...]]`` header, in file order.
        keys: ``(table path, key path) -> line`` for every ``key = value`` (the first, if repeated).
        owners: ``(header, key path, line)`` for every ``key = value`` in file order, ``header`` being
            the index in ``headers`` of the table it sits in (-1: the top level). Unlike ``keys``, it
            tells apart the same field in two elements of an array of tables (two ``[[frame]]``).
    """

    headers: list[tuple[Path, bool, int]] = field(default_factory=list)
    keys: dict[tuple[Path, Path], int] = field(default_factory=dict)
    owners: list[tuple[int, Path, int]] = field(default_factory=list)
    # Indexes built on first use (the positions are complete by then), so a file of many thousand
    # ``[[frame.member]]`` tables is answered in time linear in its size, not quadratic.
    _arrays: dict[tuple[Path, Path], list[list[int]]] = field(default_factory=dict, repr=False, compare=False)
    _elements: dict[Path, list[int]] | None = field(default=None, repr=False, compare=False)
    _owned: dict[tuple[int, Path], int] | None = field(default=None, repr=False, compare=False)

    def table(self, *path: str) -> int | None:
        """The line of a table's header, or of the key that holds it as an inline table (``costs.tie = {...}``)."""
        for where, _, line in self.headers:
            if where == path:
                return line
        best: int | None = None
        for (table, key), line in self.keys.items():
            if table + key == path and (best is None or line < best):
                best = line
        return best

    def within(self, *path: str) -> int | None:
        """The first line that writes into a table: :meth:`table`, else its first sub-table or dotted key.

        ``[robustness.loss_likelihood]`` alone, or ``robustness.loss_likelihood.tie = 3`` at the top
        level, defines ``[robustness]`` without a header of its own: its line is the first of those;
        ``robustness = { loss_likelihood = {...} }`` holds it in an inline table: the line of that key.

        Example:
            >>> p = locate("a.b.c = 1\\n[x.y]\\nz = { w = { v = 1 } }\\n")
            >>> p.within("a", "b"), p.within("x"), p.within("x", "y", "z", "w"), p.within("q")
            (1, 2, 3, None)
        """
        line = self.table(*path)
        if line is not None:
            return line
        found = [n for where, _, n in self.headers if where[: len(path)] == path]
        for (table, key), n in self.keys.items():
            full = table + key
            if full[: len(path)] == path or path[: len(full)] == full:  # a dotted key inside, or an inline table around
                found.append(n)
        return min(found, default=None)

    def element(self, path: Path, index: int) -> int | None:
        """The position in :attr:`headers` of the ``index``-th (from 0) ``[[path]]`` header, or None."""
        if self._elements is None:
            self._elements = {}
            for k, (where, aot, _) in enumerate(self.headers):
                if aot:
                    self._elements.setdefault(where, []).append(k)
        elements = self._elements.get(path, [])
        return elements[index] if index < len(elements) else None

    def element_line(self, path: Path, index: int) -> int | None:
        """The line of the ``index``-th (from 0) ``[[path]]`` header, or None.

        An array of tables written inline (``frame = [{...}, {...}]``) has no headers: each of its
        elements gets the line of that key (the parser notes no line for each item of an inline array).

        Example:
            >>> p = locate("frame = [{}, {}]\\n")
            >>> p.element_line(("frame",), 1), p.element_line(("other",), 0)
            (1, None)
        """
        header = self.element(path, index)
        if header is not None:
            return self.headers[header][2]
        if path and self._elements is not None and path not in self._elements:  # element() built the index
            return self.keys.get((path[:-1], path[-1:]))
        return None

    def element_key(self, path: Path, index: int, key: str) -> int | None:
        """The line of ``key = ...`` in the ``index``-th ``[[path]]`` table itself (not its sub-tables).

        Example:
            >>> p = locate("[[frame]]\\nabsent = []\\n[[frame]]\\n\\nabsent = []\\n")
            >>> p.element_key(("frame",), 1, "absent"), p.element_key(("frame",), 2, "absent")
            (5, None)
        """
        header = self.element(path, index)
        if header is None:
            return None
        if self._owned is None:
            self._owned = {}
            for owner, key_path, n in self.owners:
                self._owned.setdefault((owner, key_path), n)
        return self._owned.get((header, (key,)))

    def element_item(self, path: Path, index: int, sub: str, k: int) -> int | None:
        """The line of the ``k``-th (from 0) ``[[path.sub]]`` of the ``index``-th ``[[path]]``.

        When the element writes the array inline (``sub = [{...}, {...}]``), every item gets the
        line of that key: the parser notes no line for each item of an inline array.

        Example:
            >>> p = locate("[[frame]]\\n[[frame.load]]\\n[[frame]]\\nload = [{}, {}]\\n")
            >>> p.element_item(("frame",), 0, "load", 0), p.element_item(("frame",), 1, "load", 1)
            (2, 4)
        """
        groups = self.array((*path, sub), path)
        tables = groups[index] if index < len(groups) else []
        if k < len(tables):
            return tables[k]
        return None if tables else self.element_key(path, index, sub)

    def key(self, table: Path, key: str) -> int | None:
        """The line of ``key`` in a table (its header path; ``()`` for the top level)."""
        return self.keys.get((table, (key,)))

    def array(self, path: Path, parent: Path = ()) -> list[list[int]]:
        """Lines of the array-of-tables headers ``path``, grouped by the element of ``parent`` they belong to.

        ``array(("frame",))`` gives ``[[line of frame 1, line of frame 2, ...]]``;
        ``array(("frame", "member"), ("frame",))`` gives one list of member lines per frame.
        """
        cached = self._arrays.get((path, parent))
        if cached is not None:
            return cached
        groups: list[list[int]] = [[]] if not parent else []
        for where, aot, line in self.headers:
            if parent and where == parent and aot:
                groups.append([])
            elif where == path and aot and groups:
                groups[-1].append(line)
        self._arrays[(path, parent)] = groups
        return groups


class _Locating(Parser):
    """tomlkit's parser, noting where each header and key starts."""

    def __init__(self, text: str) -> None:
        super().__init__(text)
        self.text = text
        self.newlines = [k for k, c in enumerate(text) if c == "\n"]
        self.found = Positions()
        self.current: Path = ()
        self.header = -1
        self.depth = 0

    def line_at(self, index: int) -> int:
        return bisect.bisect_left(self.newlines, index) + 1

    def _parse_table(self, parent_name: Any = None, parent: Any = None) -> Any:
        start = self._idx
        end = self.text.find("\n", start)
        header = self.text[start : len(self.text) if end < 0 else end]
        path, aot = _header_path(header)
        if path:
            self.current = path
            self.header = len(self.found.headers)
            self.found.headers.append((path, aot, self.line_at(start)))
        return super()._parse_table(parent_name, parent)

    def _parse_key_value(self, parse_comment: bool = False) -> Any:
        while self._idx < len(self.text) and self.text[self._idx] in " \t":
            self.inc()
        start = self._idx
        self.depth += 1  # keys inside an inline table are not the table's own: not noted
        try:
            key, value = super()._parse_key_value(parse_comment)
        finally:
            self.depth -= 1
        if self.depth == 0:
            parts = tuple(k.key for k in key) if isinstance(key, DottedKey) else (key.key,)
            self.found.keys.setdefault((self.current, parts), self.line_at(start))
            self.found.owners.append((self.header, parts, self.line_at(start)))
        return key, value


def _header_path(header: str) -> tuple[Path, bool]:
    """The key path of one header line such as ``[["frame".member]]  # note`` (tomlkit reads it alone)."""
    try:
        doc: Any = tomlkit.parse(header)
    except tomlkit.exceptions.TOMLKitError:
        return (), False
    path: list[str] = []
    node: Any = doc.unwrap()
    aot = False
    while isinstance(node, dict) and len(node) == 1:
        name, node = next(iter(node.items()))
        path.append(name)
        if isinstance(node, list) and len(node) == 1:
            aot, node = True, node[0]
    return tuple(path), aot


def cite(line: int | None) -> str:
    """``"line N, "`` to start a message with, or ``""`` when the line is not known."""
    return "" if line is None else f"line {line}, "


def locate(text: str) -> Positions:
    """Where the headers and keys of a TOML text are; empty if tomlkit cannot read it.

    Example:
        >>> p = locate("a = 1\\n[[\\"frame\\"]]\\nname = \'\'\'x\\n[[frame]]\\n\'\'\'\\n[[frame.member]]\\nrow = 1\\n")
        >>> p.array(("frame",)), p.array(("frame", "member"), ("frame",)), p.key(("frame", "member"), "row")
        ([[2]], [[6]], 7)
    """
    parser = _Locating(text)
    try:
        parser.parse()
    except (tomlkit.exceptions.TOMLKitError, RecursionError):
        return Positions()
    return parser.found
