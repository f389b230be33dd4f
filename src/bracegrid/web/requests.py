"""Request bodies of the editor's API: JSON checked field by field into typed requests.

Only the shape is checked here (known fields, types, sizes); values that a project file holds
(lengths, kinds, bays) go on to the loader, whose own messages the page shows. Nothing in a
request names a file: a field this module does not know is refused.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from bracegrid.model import Diagonal, MemberKind
from bracegrid.optimize import SolveOptions
from bracegrid.web.session import FrameEdit

#: Longest list a request may hold (a 100 x 100 frame has 20,000 diagonals).
MAX_ITEMS = 40_000
#: Longest string a request may hold.
MAX_TEXT = 200
#: Largest magnitude of a number in a request: far beyond any length or count a frame needs, and
#: small enough that no unit conversion or integer cost downstream can overflow.
MAX_NUMBER = 1e9
#: Longest time an editor job may be given, in seconds.
MAX_TIME_LIMIT = 600.0
#: CP-SAT workers a job may use (the machine is shared).
MAX_WORKERS = 2
#: Largest CP-SAT seed (CP-SAT takes a 32-bit signed seed).
MAX_SEED = 2**31 - 1


class RequestError(Exception):
    """A request body that is not of the documented shape (answered 400 or 422).

    Attributes:
        status: 400 for a body that is not JSON, 422 for JSON of the wrong shape.
        field: Where in the body the problem is.
    """

    def __init__(self, message: str, *, field: str = "", status: int = 422) -> None:
        self.status = status
        self.field = field
        super().__init__(f"{field}: {message}" if field else message)


def _no_constant(name: str) -> Any:
    msg = f"{name} is not a number JSON allows"
    raise ValueError(msg)


def parse_json(body: bytes) -> Mapping[str, Any]:
    """A request body as a JSON object.

    Raises:
        RequestError: If it is not UTF-8 JSON holding one object (400).

    Example:
        >>> parse_json(b'{"a": 1}')
        {'a': 1}
    """
    try:
        data = json.loads(body.decode("utf-8"), parse_constant=_no_constant)
    except (UnicodeDecodeError, ValueError, RecursionError) as exc:
        msg = f"the body is not valid JSON ({str(exc)[:120]}); send one JSON object"
        raise RequestError(msg, status=400) from None
    if not isinstance(data, dict):
        msg = f"the body must be a JSON object, got {type(data).__name__}"
        raise RequestError(msg, status=400)
    return data


def _fields(where: str, raw: object, required: set[str], optional: set[str]) -> Mapping[str, Any]:
    if not isinstance(raw, dict):
        msg = f"expected an object, got {type(raw).__name__}"
        raise RequestError(msg, field=where)
    unknown = sorted(set(raw) - required - optional)
    if unknown:
        known = ", ".join(sorted(required | optional))
        msg = f"unknown field {unknown[0]!r}; this request takes {known}"
        raise RequestError(msg, field=where)
    missing = sorted(required - set(raw))
    if missing:
        msg = f"missing field {missing[0]!r}"
        raise RequestError(msg, field=where)
    return raw


def _text(where: str, raw: object) -> str:
    if not isinstance(raw, str) or not raw or len(raw) > MAX_TEXT:
        msg = f"expected a string of 1 to {MAX_TEXT} characters, got {_show(raw)}"
        raise RequestError(msg, field=where)
    return raw


def _show(raw: object) -> str:
    text = repr(raw)
    return text if len(text) <= 60 else f"{text[:57]}..."


def _number(where: str, raw: object) -> float | int:
    if isinstance(raw, bool) or not isinstance(raw, int | float) or not math.isfinite(raw) or abs(raw) > MAX_NUMBER:
        msg = f"expected a number of at most {MAX_NUMBER:g} in size, got {_show(raw)}"
        raise RequestError(msg, field=where)
    return raw


def _integer(where: str, raw: object, low: int, high: int) -> int:
    if isinstance(raw, bool) or not isinstance(raw, int) or not low <= raw <= high:
        msg = f"expected a whole number from {low} to {high}, got {_show(raw)}"
        raise RequestError(msg, field=where)
    return raw


def _list(where: str, raw: object) -> list[Any]:
    if not isinstance(raw, list) or len(raw) > MAX_ITEMS:
        msg = f"expected a list of at most {MAX_ITEMS} items, got {_show(raw)}"
        raise RequestError(msg, field=where)
    return raw


def _length(where: str, raw: object) -> str | float | int:
    """A size as typed: a number, or a string such as "2.4" or "2400 mm" (the loader reads it)."""
    if isinstance(raw, str):
        return _text(where, raw)
    return _number(where, raw)


def _member(where: str, raw: object) -> dict[str, Any]:
    table = _fields(where, raw, {"row", "col", "kind", "diagonal"}, {"existing"})
    existing = table.get("existing", True)
    if not isinstance(existing, bool):
        msg = f"expected true or false, got {_show(existing)}"
        raise RequestError(msg, field=f"{where}.existing")
    return {
        "row": _integer(f"{where}.row", table["row"], -MAX_ITEMS, MAX_ITEMS),
        "col": _integer(f"{where}.col", table["col"], -MAX_ITEMS, MAX_ITEMS),
        "kind": _text(f"{where}.kind", table["kind"]),
        "diagonal": _text(f"{where}.diagonal", table["diagonal"]),
        "status": "existing" if existing else "proposed",
    }


_FRAME_FIELDS = {"widths", "heights", "supports", "blocked", "members"}


def frame_edit(where: str, raw: object) -> FrameEdit:
    """A frame edit: ``{"name", "widths", "heights", "supports", "blocked", "members"}`` (all but name optional).

    Example:
        >>> frame_edit("frame", {"name": "f", "widths": [3, "2400 mm"]}).fields
        {'widths': [3, '2400 mm']}
    """
    table = _fields(where, raw, {"name"}, _FRAME_FIELDS)
    fields: dict[str, Any] = {}
    for key in ("widths", "heights"):
        if key in table:
            fields[key] = [
                _length(f"{where}.{key}[{k}]", v) for k, v in enumerate(_list(f"{where}.{key}", table[key]), 1)
            ]
    if "supports" in table:
        fields["supports"] = _text(f"{where}.supports", table["supports"])
    if "blocked" in table:
        bays = []
        for k, bay in enumerate(_list(f"{where}.blocked", table["blocked"]), start=1):
            here = f"{where}.blocked[{k}]"
            if not isinstance(bay, list) or len(bay) != 2:
                msg = f"expected [row, col], got {_show(bay)}"
                raise RequestError(msg, field=here)
            bays.append([_integer(here, v, -MAX_ITEMS, MAX_ITEMS) for v in bay])
        fields["blocked"] = bays
    if "members" in table:
        items = _list(f"{where}.members", table["members"])
        fields["member"] = [_member(f"{where}.members[{k}]", m) for k, m in enumerate(items, start=1)]
    return FrameEdit(name=_text(f"{where}.name", table["name"]), fields=fields)


@dataclass(frozen=True, slots=True)
class CheckRequest:
    """``POST /api/check``: the live verdict of one edited frame."""

    frame: FrameEdit


@dataclass(frozen=True, slots=True)
class SaveRequest:
    """``POST /api/save`` and ``/api/save-copy``: every edited frame (and, for a save, the version edited)."""

    frames: tuple[FrameEdit, ...]
    version: str = ""


@dataclass(frozen=True, slots=True)
class MemberRef:
    """A member named by bay and diagonal (a repair takes these out)."""

    row: int
    col: int
    diagonal: Diagonal

    @property
    def label(self) -> str:
        """The member reference as the CLI writes it, e.g. ``r2c3:rising``."""
        return f"r{self.row}c{self.col}:{self.diagonal.value}"


@dataclass(frozen=True, slots=True)
class JobRequest:
    """``POST /api/optimize``, ``/api/repair`` and ``/api/compare``: one edited frame and solver options."""

    frame: FrameEdit
    options: SolveOptions
    without: tuple[MemberRef, ...] = ()
    keep_clear: bool = False


def check_request(data: Mapping[str, Any]) -> CheckRequest:
    """Read ``{"frame": {...}}``."""
    table = _fields("body", data, {"frame"}, set())
    return CheckRequest(frame=frame_edit("frame", table["frame"]))


def save_request(data: Mapping[str, Any], *, versioned: bool) -> SaveRequest:
    """Read ``{"version": "...", "frames": [...]}`` (no version for a copy)."""
    table = _fields("body", data, {"frames", "version"} if versioned else {"frames"}, set())
    frames = tuple(frame_edit(f"frames[{k}]", f) for k, f in enumerate(_list("frames", table["frames"]), start=1))
    names = [f.name for f in frames]
    if len(set(names)) != len(names):
        msg = "a frame is listed twice; send each frame once"
        raise RequestError(msg, field="frames")
    version = _text("version", table["version"]) if versioned else ""
    return SaveRequest(frames=frames, version=version)


def _options(table: Mapping[str, Any]) -> SolveOptions:
    limit = float(_number("time_limit", table.get("time_limit", 20.0)))
    if not 0 < limit <= MAX_TIME_LIMIT:
        msg = f"give a positive number of seconds up to {MAX_TIME_LIMIT:g}, got {limit:g}"
        raise RequestError(msg, field="time_limit")
    allow = None
    if "allow" in table:
        kinds = {k.value: k for k in MemberKind}
        raw = _list("allow", table["allow"])
        if not raw or any(k not in kinds for k in raw):
            msg = f"expected a non-empty list of {', '.join(repr(k) for k in kinds)}, got {_show(raw)}"
            raise RequestError(msg, field="allow")
        allow = frozenset(kinds[k] for k in raw)
    alone = table.get("stability_only", False)
    if not isinstance(alone, bool):
        msg = f"expected true or false, got {_show(alone)}"
        raise RequestError(msg, field="stability_only")
    return SolveOptions(
        time_limit=limit,
        workers=_integer("workers", table.get("workers", MAX_WORKERS), 1, MAX_WORKERS),
        seed=_integer("seed", table.get("seed", 0), 0, MAX_SEED),
        allow=allow,
        stability_only=alone,
    )


_SOLVER_FIELDS = {"time_limit", "workers", "seed", "stability_only"}


def job_request(data: Mapping[str, Any], *, repair: bool = False, allow: bool = True) -> JobRequest:
    """Read an optimize, repair or compare request.

    Optimize: ``{"frame", "time_limit"?, "workers"?, "seed"?, "stability_only"?, "allow"?}``; repair adds
    ``"without": [{"row", "col", "diagonal"}]`` and ``"keep_clear"?``; compare takes no ``allow``.
    """
    optional = _SOLVER_FIELDS | ({"allow"} if allow else set()) | ({"keep_clear"} if repair else set())
    table = _fields("body", data, {"frame", "without"} if repair else {"frame"}, optional)
    without: list[MemberRef] = []
    if repair:
        items = _list("without", table["without"])
        if not items:
            msg = "select at least one member to take out"
            raise RequestError(msg, field="without")
        sides = {d.value: d for d in Diagonal}
        for k, item in enumerate(items, start=1):
            here = f"without[{k}]"
            ref = _fields(here, item, {"row", "col", "diagonal"}, set())
            side = ref["diagonal"]
            if side not in sides:
                msg = f"expected 'rising' or 'falling', got {_show(side)}"
                raise RequestError(msg, field=f"{here}.diagonal")
            row = _integer(f"{here}.row", ref["row"], 1, MAX_ITEMS)
            col = _integer(f"{here}.col", ref["col"], 1, MAX_ITEMS)
            without.append(MemberRef(row, col, sides[side]))
    keep = table.get("keep_clear", False)
    if not isinstance(keep, bool):
        msg = f"expected true or false, got {_show(keep)}"
        raise RequestError(msg, field="keep_clear")
    return JobRequest(
        frame=frame_edit("frame", table["frame"]), options=_options(table), without=tuple(without), keep_clear=keep
    )
