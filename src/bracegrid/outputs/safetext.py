"""User text (frame, case and project names) made safe to show: in a terminal, a drawing or a plot.

Names come from the project file and may hold any character TOML allows. Control characters (C0
and C1) and the bidirectional overrides are written as Python escapes (``\\x07``, ``\\u202e``), so a
name cannot move a terminal's cursor, ring, erase or reorder what is shown, leave an XML file (SVG)
ill-formed, or ask a font for glyphs it has not got. Plots also shorten very long names, which
would otherwise squeeze the axes to nothing.
"""

from __future__ import annotations

import contextlib
import html
import re
import warnings
from collections.abc import Iterator

# C0 and C1 control characters and the bidirectional overrides; the newline only where text is
# one line (drawings and plots), a terminal keeps it.
_UNSAFE = re.compile("[\x00-\x09\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")
_UNSAFE_ONE_LINE = re.compile("[\x00-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")

#: Characters a plot label keeps before it is shortened with an ellipsis.
LABEL_CHARS = 60


def _escape(match: re.Match[str]) -> str:
    return match.group().encode("unicode_escape").decode("ascii")


def visible_text(text: str, *, one_line: bool = True) -> str:
    r"""The text with control characters and bidirectional overrides escaped.

    Example:
        >>> visible_text("bell\x07 \u202eevil")
        'bell\\x07 \\u202eevil'
        >>> visible_text("a\nb"), visible_text("a\nb", one_line=False)
        ('a\\nb', 'a\nb')
    """
    return (_UNSAFE_ONE_LINE if one_line else _UNSAFE).sub(_escape, text)


def short_label(text: str, limit: int = LABEL_CHARS) -> str:
    """A one-line visible label of at most ``limit`` characters (an ellipsis marks a cut).

    Example:
        >>> short_label("x" * 100, 10)
        'xxxxxxxxx…'
    """
    shown = visible_text(text)
    return shown if len(shown) <= limit else shown[: limit - 1] + "…"


def markup_text(text: object) -> str:
    r"""Text for HTML and SVG: control characters escaped as above, then the markup characters.

    Example:
        >>> markup_text('<a & "b"\x07>')
        '&lt;a &amp; &quot;b&quot;\\x07&gt;'
    """
    return html.escape(visible_text(str(text), one_line=False), quote=True)


@contextlib.contextmanager
def missing_glyphs_quiet() -> Iterator[None]:
    """Rendering with matplotlib: a name in a script the bundled font lacks (CJK, say) is drawn as
    boxes in PNG and PDF previews without a warning on the user's terminal; the DXF and the SVG
    keep the real text for a viewer with the font (docs/drawings.md)."""
    with warnings.catch_warnings():
        warnings.filterwarnings("ignore", message=r"Glyph \d+ .*missing from font", category=UserWarning)
        yield
