"""Every problem cites the right line (src/bracegrid/io/positions.py, io/reading.py).

Before, lines came from scanning the text: a multi-line string holding a ``[[frame]]`` line or a
quoted header (``[["frame"]]``) shifted them to the wrong table, inline tables and the
``[project]`` / ``[costs.*]`` / top-level fields had none, and a syntax error at the end said only
"at end of document". Each test below failed then. The expected line numbers are counted by hand
in the texts shown.
"""

from __future__ import annotations

import re

import pytest

from bracegrid.errors import InputError
from bracegrid.io import parse_project

HEAD = """[project]
name = "p"
[costs.brace]
per_piece = 25.0
per_metre = 8.0
[costs.tie]
per_piece = 9.0
per_metre = 3.0
"""  # lines 1-8


def _lines(text: str) -> dict[str, int]:
    """Problem text (without its line) -> line cited."""
    with pytest.raises(InputError) as info:
        parse_project(text)
    out = {}
    for problem in info.value.problems:
        found = re.match(r"line (\d+), (.*)", problem)
        assert found, f"no line in {problem!r}"
        out[found.group(2)] = int(found.group(1))
    return out


def test_project_costs_and_top_level_fields_get_lines() -> None:
    text = HEAD.replace('name = "p"', 'name = "p"\ncolour = "red"').replace("per_metre = 3.0", "per_metre = -3.0")
    text = "extra = 1\n" + text + '[[frame]]\nname = "f"\nwidths = [3.0]\nheights = [2.0]\n'
    found = _lines(text)
    assert [n for p, n in found.items() if p.startswith("top level")] == [1]
    assert [n for p, n in found.items() if p.startswith("[project]")] == [4]  # colour = "red"
    assert [n for p, n in found.items() if p.startswith("[costs.tie].per_metre")] == [8]  # the [costs.tie] header


def test_quoted_headers_and_multiline_strings_do_not_shift_lines() -> None:
    text = HEAD + (
        '[["frame"]]\n'  # 9
        'name = "a"\n'
        "widths = [3.0]\n"
        "heights = [2.0]\n"
        'note = """\n'  # 13: a field the reader does not know, holding a fake header
        "[[frame]]\n"
        '"""\n'
        '[["frame".member]]\n'  # 16
        "row = 5\n"
        "col = 1\n"
        'kind = "brace"\n'
        'diagonal = "rising"\n'
    )
    found = _lines(text)
    assert sorted(found.values()) == [9, 16]
    assert found["frame 'a' member #1: row 5 is outside the frame; rows run 1..1 from the bottom"] == 16
    assert next(n for p, n in found.items() if "unknown field 'note'" in p) == 9


def test_inline_tables_get_the_line_of_their_key() -> None:
    text = (
        '[project]\nname = "p"\n'
        "[costs]\n"
        "brace = {per_piece = 25.0, per_metre = 8.0}\n"
        "tie = {per_piece = 9.0, per_metre = -1.0}\n"  # 5
        '[[frame]]\nname = "f"\nwidths = [3.0]\nheights = [2.0]\n'  # 6-9
        'member = [{row = 1, col = 9, kind = "brace", diagonal = "rising"}]\n'  # 10
    )
    found = _lines(text)
    assert found["[costs.tie].per_metre: -1.0 is out of range; give a value from 0 to 1e+06"] == 5
    assert [n for p, n in found.items() if p.startswith("frame 'f' member #1")] == [10]


def test_syntax_errors_name_a_line_even_at_the_end() -> None:
    with pytest.raises(InputError) as info:
        parse_project(HEAD + '[[frame]]\nname = "f"\nwidths = [3.0,\n')
    assert "end of document" not in str(info.value)
    assert re.search(r"line 1[12]", str(info.value))
