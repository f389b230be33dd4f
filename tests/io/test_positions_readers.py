"""The readers of load cases, general-frame fields and [robustness] cite the right line.

They used to find their lines by scanning the text with regular expressions (a ``[[frame.load]]``
or ``[robustness...]`` line): a quoted or spaced header (``[[ frame . "load" ]]``) got no line, a
multi-line string holding a header-like line got the string's line (or shifted the frames), an
inline array of tables (``load = [{...}]``) and the ``absent`` / ``held_edges`` fields got none.
Now every reader takes its lines from tomlkit's parser (src/bracegrid/io/positions.py); each test
below failed with the scans, but the one marked as a guard (where the scan was right). The
expected line is the one marked ``# <- here`` in the text shown."""

from __future__ import annotations

import io
import random
from pathlib import Path

import pytest

from bracegrid.cli import main
from bracegrid.errors import InputError
from bracegrid.io import parse_project
from bracegrid.io.positions import locate
from tests.common import project_head

HEAD = project_head("p")  # lines 1-8
FRAME = '[[frame]]\nname = "f"\nwidths = [3.0, 3.0]\nheights = [2.0, 2.0]\nsupports = "base"\n'
BAD_LOAD = 'name = ""\nhorizontal = [1.0, 1.0]\n'


def _here(text: str, nth: int = 1) -> int:
    """The line (from 1) of the ``nth`` line marked ``# <- here``."""
    marked = [k for k, row in enumerate(text.split("\n"), start=1) if row.endswith("# <- here")]
    return marked[nth - 1]


def _problems(text: str) -> list[str]:
    with pytest.raises(InputError) as info:
        parse_project(text, source="p.toml")
    return list(info.value.problems)


def _cited(problems: list[str], part: str) -> list[str]:
    """The problems that hold ``part`` (the field and what is wrong)."""
    found = [p for p in problems if part in p]
    assert found, f"no problem holds {part!r}: {problems}"
    return found


# --------------------------------------------------------------------------- [[frame.load]]


def test_a_spaced_and_quoted_load_header_gets_its_line() -> None:
    text = HEAD + FRAME + '[[ frame . "load" ]]  # <- here\n' + BAD_LOAD
    (got,) = _cited(_problems(text), "frame 'f' load #1.name: expected a non-empty string")
    assert got.startswith(f"line {_here(text)}, ")


def test_a_load_header_inside_a_multiline_string_is_not_a_table() -> None:
    text = (
        HEAD
        + FRAME.replace('name = "f"', 'name = "f"\nnote = """\n[[frame.load]]\n"""')
        + ("# [[frame.load]] is written below\n[[frame.load]]  # <- here\n" + BAD_LOAD)
    )
    (got,) = _cited(_problems(text), "frame 'f' load #1.name: expected a non-empty string")
    assert got.startswith(f"line {_here(text)}, ")


def test_a_frame_header_inside_a_string_does_not_shift_the_loads_of_later_frames() -> None:
    first = FRAME.replace('name = "f"', "name = '''g\n[[frame]]\n'''")  # a frame named "g\n[[frame]]\n"
    text = HEAD + first + FRAME + "[[frame.load]]  # <- here\n" + BAD_LOAD
    (got,) = _cited(_problems(text), "frame 'f' load #1.name: expected a non-empty string")
    assert got.startswith(f"line {_here(text)}, ")


def test_inline_load_cases_get_the_line_of_their_key() -> None:
    text = HEAD + FRAME + 'load = [{ name = "", horizontal = [1.0, 1.0] }]  # <- here\n'
    (got,) = _cited(_problems(text), "frame 'f' load #1.name: expected a non-empty string")
    assert got.startswith(f"line {_here(text)}, ")


def test_loads_of_the_second_frame_get_their_own_lines() -> None:
    # Here the scan was right (plain headers): a guard that the parser's lines keep it so.
    second = FRAME.replace('name = "f"', 'name = "g"')
    text = HEAD + FRAME + "[[frame.load]]\n" + 'name = "a"\nhorizontal = [1.0, 1.0]\n' + second
    text += '[[frame.load]]\nname = "b"\nhorizontal = [1.0, 1.0]\n[[frame.load]]  # <- here\n' + BAD_LOAD
    (got,) = _cited(_problems(text), "frame 'g' load #2.name: expected a non-empty string")
    assert got.startswith(f"line {_here(text)}, ")


def test_a_repeated_load_case_name_gets_the_line_of_the_second_case() -> None:
    case = '[[frame.load]]{}\nname = "wind"\nhorizontal = [1.0, 1.0]\n'
    text = HEAD + FRAME + case.format("") + case.format("  # <- here")
    (got,) = _cited(_problems(text), "frame 'f'.load: two load cases are named 'wind'")
    assert got.startswith(f"line {_here(text)}, ")


def test_held_edges_get_the_line_of_their_field() -> None:
    text = HEAD + FRAME.replace('"base"', '"free"') + 'held_edges = ["left", "top side"]  # <- here\n'
    (got,) = _cited(_problems(text), "frame 'f'.held_edges[2]: 'top side' is not one of")
    assert got.startswith(f"line {_here(text)}, ")


# --------------------------------------------------------------------------- general frames


def test_a_quoted_missing_header_gets_its_line() -> None:
    text = HEAD + FRAME + '[[frame."missing"]]  # <- here\nbar = "rail"\nline = 1\nspan = 1\n'
    (got,) = _cited(_problems(text), 'frame \'f\' missing #1.bar: expected "ledger" or "standard"')
    assert got.startswith(f"line {_here(text)}, ")


def test_a_missing_header_inside_a_multiline_string_is_not_a_table() -> None:
    fake = FRAME.replace('name = "f"', "name = \"f\"\nnote = '''\n  [[frame.missing]]\n'''")
    text = HEAD + fake + '[[frame.missing]]\nbar = "ledger"\nline = 1\nspan = 1\n'
    text += '[[frame.missing]]  # <- here\nbar = "ledger"\nline = 9\nspan = 1\n'
    (got,) = _cited(_problems(text), "frame 'f' missing #2: ledger9c1 is outside the frame")
    assert got.startswith(f"line {_here(text)}, ")


def test_inline_missing_bars_get_the_line_of_their_key() -> None:
    text = HEAD + FRAME + 'missing = [{ bar = "ledger", line = 1, span = 7 }]  # <- here\n'
    (got,) = _cited(_problems(text), "frame 'f' missing #1: ledger1c7 is outside the frame")
    assert got.startswith(f"line {_here(text)}, ")


def test_absent_bays_get_the_line_of_their_field() -> None:
    text = HEAD + FRAME + "absent = [[1, 1], [5, 1]]  # <- here\n"
    (got,) = _cited(_problems(text), "frame 'f'.absent[2]: bay r5c1 is outside the frame")
    assert got.startswith(f"line {_here(text)}, ")


def test_absent_bays_of_the_second_frame_get_their_own_line() -> None:
    second = FRAME.replace('name = "f"', 'name = "g"')
    text = HEAD + FRAME + "absent = [[1, 1]]\n" + second + "absent = [[1, 1], [1, 2], [2, 1], [2, 2]]  # <- here\n"
    (got,) = _cited(_problems(text), "frame 'g'.absent: every bay is absent")
    assert got.startswith(f"line {_here(text)}, ")


def test_a_member_in_an_absent_bay_gets_the_line_of_its_frame() -> None:
    second = FRAME.replace("[[frame]]", "[[frame]]  # <- here").replace('name = "f"', 'name = "g"')
    text = HEAD + FRAME + second
    text += 'absent = [[1, 1]]\n[[frame.member]]\nrow = 1\ncol = 1\nkind = "brace"\ndiagonal = "rising"\n'
    (got,) = _cited(_problems(text), "frame 'g' member r1c1:rising: bay r1c1 is absent")
    assert got.startswith(f"line {_here(text)}, ")


def test_inline_members_of_the_second_frame_get_their_own_line() -> None:
    member = 'member = [{ row = 1, col = 9, kind = "brace", diagonal = "rising" }]'
    second = FRAME.replace('name = "f"', 'name = "g"')
    text = HEAD + FRAME + member.replace("9", "1") + "\n" + second + member + "  # <- here\n"
    (got,) = _cited(_problems(text), "frame 'g' member #1: col 9 is outside the frame")
    assert got.startswith(f"line {_here(text)}, ")


def test_frames_written_inline_get_the_line_of_their_key() -> None:
    frames = 'frame = [{ name = "f", widths = [3.0], heights = [-2.0] },  # <- here\n'
    frames += '         { name = "g", widths = [3.0], heights = [2.0], held_edges = ["up"] }]\n'
    text = frames + HEAD
    problems = _problems(text)
    (heights,) = _cited(problems, "frame 'f'.heights[1]: size must be positive")
    (held,) = _cited(problems, "frame 'g'.held_edges[1]: 'up' is not one of")
    assert heights.startswith(f"line {_here(text)}, ")
    assert held.startswith(f"line {_here(text)}, ")


# --------------------------------------------------------------------------- [robustness]


@pytest.mark.parametrize(
    "table",
    [
        '["robustness".loss_likelihood]  # <- here\ntie = -1\n',
        "[ robustness . 'loss_likelihood' ]  # <- here\ntie = -1\n",
        "robustness = { loss_likelihood = { tie = -1 } }  # <- here\n",
        "robustness.loss_likelihood.tie = -1  # <- here\n",
        "[robustness]\nloss_likelihood = { tie = -1 }  # <- here\n",
    ],
)
def test_robustness_tables_written_any_way_get_their_line(table: str) -> None:
    text = table + HEAD + FRAME if not table.startswith("[") else HEAD + table + FRAME
    (got,) = _cited(_problems(text), "[robustness.loss_likelihood].tie: expected a number 0 or above")
    assert got.startswith(f"line {_here(text)}, ")


def test_a_robustness_header_inside_a_multiline_string_is_not_the_table() -> None:
    text = HEAD.replace('name = "p"', 'name = """p\n[robustness.loss_likelihood]\n"""')
    text += "[robustness.loss_likelihood]  # <- here\ntie = -1\n" + FRAME
    (got,) = _cited(_problems(text), "[robustness.loss_likelihood].tie: expected a number 0 or above")
    assert got.startswith(f"line {_here(text)}, ")


def test_an_unknown_robustness_field_under_a_sub_table_only_gets_a_line() -> None:
    text = HEAD + "[robustness.loss_likelihood]  # <- here\ntie = 2.0\n[robustness.lost]\nx = 1\n" + FRAME
    (got,) = _cited(_problems(text), "[robustness]: unknown field 'lost'")
    assert got.startswith(f"line {_here(text)}, ")


# --------------------------------------------------------------------------- the command line


def test_the_cli_cites_file_line_and_field(tmp_path: Path) -> None:
    text = (
        HEAD
        + FRAME
        + "absent = [[5, 1]]  # <- here\n"
        + '[[ frame . "load" ]]  # <- here\n'
        + BAD_LOAD
        + "[[frame.'missing']]  # <- here\nbar = \"ledger\"\nline = 9\nspan = 1\n"
    )
    path = tmp_path / "p.toml"
    path.write_text(text, encoding="utf-8")
    out, err = io.StringIO(), io.StringIO()
    code = main(["check", str(path)], out=out, err=err)
    assert code == 2
    message = err.getvalue()
    assert str(path) in message
    assert f"line {_here(text, 1)}, frame 'f'.absent[1]: bay r5c1 is outside the frame" in message
    assert f"line {_here(text, 2)}, frame 'f' load #1.name: expected a non-empty string" in message
    assert f"line {_here(text, 3)}, frame 'f' missing #1: ledger9c1 is outside the frame" in message
    assert "Traceback" not in message


# --------------------------------------------------------------------------- positions, checked wholesale


def test_element_lines_match_where_a_generated_file_put_them() -> None:
    # Random files of plain and spaced/quoted headers, inline arrays, comments with brackets and
    # multi-line strings holding header-like lines; the generator knows where it wrote each table,
    # so the lines the parser reports are checked against the truth, not against another scan.
    rng = random.Random(20261202)
    headers = {"load": ['[[frame.load]]', '[[ frame . "load" ]]', "[['frame'.load]]"],
               "missing": ["[[frame.missing]]", '[[frame."missing"]]', "[[ frame.missing ]]"]}  # fmt: skip
    for _ in range(200):
        rows: list[str] = ["# [[frame]] and [[frame.load]] in a comment", "top = 1"]
        expect: list[tuple[int, str, int, int]] = []  # (frame, sub, k, line)
        frame_lines: list[int] = []
        absent_lines: list[int | None] = []
        for index in range(rng.randint(1, 4)):
            rows.append(rng.choice(["[[frame]]", '[["frame"]]', "[[ frame ]]  # [[frame.load]]"]))
            frame_lines.append(len(rows))
            rows.append(f'name = "f{index}"')
            if rng.random() < 0.5:
                rows += ["note = '''", "[[frame.load]]", "[[frame]]", "'''"]
            absent_lines.append(None)
            if rng.random() < 0.5:
                rows.append("absent = [[1, 1]]  # [[frame.missing]]")
                absent_lines[-1] = len(rows)
            counts = {sub: rng.randint(0, 3) for sub in rng.sample(["load", "missing"], 2)}
            inline = {sub for sub, count in counts.items() if count and rng.random() < 0.3}
            for sub in inline:  # written inline (before any sub-table): every item gets the key's line
                rows.append(f"{sub} = [" + ", ".join("{ x = 1 }" for _ in range(counts[sub])) + "]")
                expect += [(index, sub, k, len(rows)) for k in range(counts[sub])]
            for sub, count in counts.items():
                if sub in inline:
                    continue
                for k in range(count):
                    rows.append(rng.choice(headers[sub]))
                    expect.append((index, sub, k, len(rows)))
                    rows += ["x = 1", ""] if rng.random() < 0.5 else ['s = """', "[[frame]]", '"""']
        found = locate("\n".join(rows) + "\n")
        for index, line in enumerate(frame_lines):
            assert found.element_line(("frame",), index) == line
            assert found.element_key(("frame",), index, "absent") == absent_lines[index]
        for index, sub, k, line in expect:
            assert found.element_item(("frame",), index, sub, k) == line
        assert found.element_line(("frame",), len(frame_lines)) is None
