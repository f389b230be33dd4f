"""The only module that knows about length units.

Internally every length is an integer number of millimetres: it keeps the
CP-SAT model integral and makes equality of sizes exact. Inputs may be bare
numbers (read in the project's length unit, metres unless the project says
otherwise) or strings with a unit such as ``"2400 mm"``, ``"3.2 m"`` or
``"10 ft"``.
"""

from __future__ import annotations

import math
import re

#: Millimetres per unit, for every unit a project file may use.
MM_PER_UNIT: dict[str, float] = {
    "mm": 1.0,
    "cm": 10.0,
    "m": 1000.0,
    "in": 25.4,
    "ft": 304.8,
}

#: DXF ``$INSUNITS`` codes (DXF reference, HEADER section) for the units we write.
DXF_INSUNITS: dict[str, int] = {"in": 1, "ft": 2, "mm": 4, "cm": 5, "m": 6}

#: Largest size of one bay (a width or a height): 1 km. No frame has a bay this big; the bound keeps
#: every later product (diagonal lengths, areas, prices per metre) far from overflow.
MAX_BAY_MM = 1_000_000

#: Largest distance from the frame's corner any length or coordinate may have: 100 km (a frame of a
#: hundred 1 km bays). Larger numbers (1e308 m, 9223372036854775807) are typing mistakes; they
#: would overflow to infinity in millimetres or lose exactness in shapely's float geometry.
MAX_LENGTH_MM = 100_000_000

_QUANTITY = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([a-zA-Z]*)\s*$")


def parse_length(value: object, *, unit: str = "m") -> int:
    """Convert a length from a project file to whole millimetres.

    Args:
        value: A number (read in ``unit``) or a string such as ``"2.4 m"``.
        unit: The unit of bare numbers.

    Returns:
        The length rounded to the nearest millimetre.

    Raises:
        ValueError: If the value is not a finite length in a known unit, or is more than
            :data:`MAX_LENGTH_MM` (100 km) either side of zero.

    Example:
        >>> parse_length(2.4)
        2400
        >>> parse_length("10 ft")
        3048
    """
    if isinstance(value, bool):
        msg = f"expected a length, got {value!r}"
        raise ValueError(msg)
    if isinstance(value, int | float):
        number, name = float(value), unit
    elif isinstance(value, str):
        match = _QUANTITY.match(value)
        if match is None:
            msg = f'cannot read {value!r} as a length; write e.g. 2.4 or "2400 mm"'
            raise ValueError(msg)
        number, name = float(match.group(1)), (match.group(2) or unit).lower()
    else:
        msg = f'expected a length (number or string such as "2.4 m"), got {type(value).__name__}'
        raise ValueError(msg)
    if name not in MM_PER_UNIT:
        known = ", ".join(MM_PER_UNIT)
        msg = f"unknown length unit {name!r}; use one of {known}"
        raise ValueError(msg)
    if not math.isfinite(number):
        msg = f"length {value!r} is not finite"
        raise ValueError(msg)
    mm = number * MM_PER_UNIT[name]
    if not abs(mm) <= MAX_LENGTH_MM:
        msg = f"length {value!r} is out of range; lengths run up to {MAX_LENGTH_MM // 1_000_000} km"
        raise ValueError(msg)
    return round(mm)


def length_in_unit(length_mm: int, unit: str) -> float | int:
    """A millimetre length in a project's unit, as a project file writes it (whole numbers stay whole).

    Example:
        >>> length_in_unit(2400, "m"), length_in_unit(3000, "m"), length_in_unit(3048, "ft")
        (2.4, 3, 10)
    """
    value = length_mm / MM_PER_UNIT[unit]
    return int(value) if float(value).is_integer() else round(value, 6)


def mm_to_m(length_mm: float) -> float:
    """Convert millimetres to metres.

    Example:
        >>> mm_to_m(2400)
        2.4
    """
    return length_mm / 1000.0


def m_to_mm(length_m: float) -> int:
    """Convert metres to whole millimetres.

    Example:
        >>> m_to_mm(3.0)
        3000
    """
    return round(length_m * 1000.0)


def diagonal_mm(width_mm: int, height_mm: int) -> float:
    """Length of a bay diagonal in millimetres.

    Example:
        >>> diagonal_mm(3000, 4000)
        5000.0
    """
    return math.hypot(width_mm, height_mm)


def cut_length_mm(width_mm: int, height_mm: int) -> int:
    """Cut length of a bay diagonal: its node-to-node length to the nearest whole millimetre.

    Exact integer arithmetic (``math.isqrt``): ``w**2 + h**2`` is a whole number, so its root
    is either whole or irrational and never ends in exactly .5; no tie-breaking rule is needed.

    Example:
        >>> cut_length_mm(3000, 4000), cut_length_mm(1300, 2000), cut_length_mm(2500, 2000)
        (5000, 2385, 3202)
    """
    square = width_mm * width_mm + height_mm * height_mm
    floor = math.isqrt(square)
    return floor + (1 if square > floor * floor + floor else 0)


def metres(length_mm: float) -> float:
    """Millimetres to metres, rounded to the millimetre (three decimals) for JSON and CSV.

    Example:
        >>> metres(82238)
        82.238
    """
    return round(length_mm / 1000.0, 3)


def metres_text(length_mm: int) -> str:
    """Whole millimetres as metres to the millimetre (three decimals, no unit), exact from the integer.

    Bill lengths print this way, so printed rows add up to printed totals.

    Example:
        >>> metres_text(38160), metres_text(5)
        ('38.160', '0.005')
    """
    whole, part = divmod(int(length_mm), 1000)
    return f"{whole}.{part:03d}"


def format_length_m(length_mm: float, *, decimals: int = 2) -> str:
    """Format a millimetre length as metres for reports.

    Example:
        >>> format_length_m(2400)
        '2.40 m'
    """
    return f"{length_mm / 1000.0:.{decimals}f} m"
