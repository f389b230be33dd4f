"""The utilisation colour ramp (ours), one source for force sheets, report figures and the editor."""

from __future__ import annotations

import itertools

#: The utilisation colour ramp (ours): utilisation -> RGB, interpolated between the stops.
RAMP: tuple[tuple[float, tuple[int, int, int]], ...] = (
    (0.0, (70, 110, 200)),
    (0.5, (40, 160, 90)),
    (0.8, (235, 170, 30)),
    (1.0, (220, 60, 30)),
)
#: Beyond capacity.
OVER_RGB = (150, 0, 110)
#: No capacity given for this bar.
UNRATED_RGB = (70, 70, 70)


def utilisation_rgb(value: float) -> tuple[int, int, int]:
    """Colour of a utilisation (0..1 along the ramp; above 1 the over-capacity colour).

    Example:
        >>> utilisation_rgb(0.0), utilisation_rgb(0.25), utilisation_rgb(1.5)
        ((70, 110, 200), (55, 135, 145), (150, 0, 110))
    """
    if value > 1.0 + 1e-9:
        return OVER_RGB
    v = min(max(value, 0.0), 1.0)
    for (a, ca), (b, cb) in itertools.pairwise(RAMP):
        if v <= b:
            t = (v - a) / (b - a)
            return tuple(round(x + t * (y - x)) for x, y in zip(ca, cb, strict=True))  # type: ignore[return-value]
    return RAMP[-1][1]


def hex_colour(rgb: tuple[int, int, int]) -> str:
    """``#rrggbb`` of an RGB triple.

    Example:
        >>> hex_colour((150, 0, 110))
        '#96006e'
    """
    return "#{:02x}{:02x}{:02x}".format(*rgb)
