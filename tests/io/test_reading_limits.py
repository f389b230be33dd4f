"""Hostile project files (src/bracegrid/io/reading.py): every one is bad input in words, never a crash.

One test per class of the fuzzing findings; each failed before the fix (RecursionError,
OverflowError, MemoryError or a hang, a frame silently dropped). The ranges checked are the
documented ones (docs/project-file.md, "Valid ranges"); the price bound is argued in
src/bracegrid/model/costs.py (integer costs in 1/10000 units stay below 2**53).
"""

from __future__ import annotations

import os
import threading
import warnings
from pathlib import Path

import pytest

from bracegrid.errors import InputError
from bracegrid.io import load_project, parse_project
from bracegrid.io.reading import MAX_FILE_BYTES, MAX_NESTING, nesting_depth
from bracegrid.model import MemberKind
from tests.common import project_head

FRAME = '[[frame]]\nname = "f"\nwidths = [3.0, 3.0]\nheights = [2.0]\n'


def _problems(text: str) -> str:
    with pytest.raises(InputError) as info:
        parse_project(text, source="p.toml")
    return str(info.value)


@pytest.mark.parametrize("inline", [False, True], ids=["arrays", "inline tables"])
def test_deep_nesting_is_refused_before_parsing(inline: bool) -> None:
    deep = ("{a = " * 1000 + "1" + "}" * 1000) if inline else ("[" * 1000 + "1" + "]" * 1000)
    message = _problems(project_head("p") + FRAME + f"blocked = {deep}\n")
    assert "nested 1000 deep" in message
    assert f"at most {MAX_NESTING}" in message
    assert "line 13" in message


def test_nesting_is_measured_outside_strings_and_comments() -> None:
    text = 'a = "[[[[[[[[[[[[[[[[[[[[" # [[[[[[[[[[[[[[[[[[[[\nb = """\n[[[[[[[[[[[[[[[[[[[[\n"""\nc = [[1]]\n'
    assert nesting_depth(text) == (2, 5)
    # The demo files need little depth: the bound leaves room.
    for demo in sorted(Path(__file__).resolve().parents[2].joinpath("projects").glob("*.toml")):
        assert nesting_depth(demo.read_text(encoding="utf-8"))[0] <= 3


@pytest.mark.parametrize(
    ("field", "value", "expected"),
    [
        ("widths", "[1e308, 3.0]", "lengths run up to 100 km"),
        ("widths", "[1e300, 3.0]", "lengths run up to 100 km"),
        ("widths", "[9223372036854775807, 3.0]", "lengths run up to 100 km"),
        ("widths", "[2000.0, 3.0]", "a bay size runs from 1 mm to 1 km, got 2000.0"),
        ("heights", "[-1e308]", "lengths run up to 100 km"),
    ],
)
def test_huge_sizes_are_bad_input_with_field_value_and_range(field: str, value: str, expected: str) -> None:
    text = project_head("p") + FRAME.replace(f"{field} = [", f"{field} = {value}\n_old_{field} = [")
    message = _problems(text.replace(f"_old_{field}", "#"))
    assert f"frame 'f'.{field}[1]" in message
    assert expected in message


@pytest.mark.parametrize(
    ("table", "field", "value"),
    [
        ("tie", "per_metre", "1e300"),
        ("brace", "per_piece", "1e15"),
        ("brace", "per_piece", "9223372036854775807"),
        ("brace", "labour_per_piece", "-1"),
        ("tie", "per_metre", "inf"),
    ],
)
def test_prices_out_of_range_name_field_value_and_range(table: str, field: str, value: str) -> None:
    rates = {"brace": {"per_piece": "25.0", "per_metre": "8.0"}, "tie": {"per_piece": "9.0", "per_metre": "3.0"}}
    rates[table][field] = value
    head = '[project]\nname = "p"\n' + "".join(
        f"[costs.{kind}]\n" + "".join(f"{k} = {v}\n" for k, v in fields.items()) for kind, fields in rates.items()
    )
    message = _problems(head + FRAME)
    assert message.count("\n") == 0  # one problem
    assert f"[costs.{table}].{field}" in message
    shown = value if value.lstrip("-").isdigit() else repr(float(value))
    assert f"{shown} is out of range; give a value from 0 to 1e+06" in message


def test_dearest_layout_must_stay_exact() -> None:
    # Rates and sizes inside their own ranges, but 100 x 100 bays of 1 km at a million a metre: the
    # dearest layout (20,000 members of 1.41 km, about 2.8e13) would not be exact in 1/10000 units.
    sizes = "[" + ", ".join(["1000.0"] * 100) + "]"
    text = project_head("p", brace=(1e6, 1e6), tie=(1e6, 1e6)) + (
        f'[[frame]]\nname = "huge"\nwidths = {sizes}\nheights = {sizes}\n'
    )
    message = _problems(text)
    assert "the dearest layout would cost" in message
    assert "frame 'huge'" in message


@pytest.mark.parametrize(
    "allow",
    ['["brace", "brace"]', '["Brace", "brace"]', '["tie", "tie", "brace"]'],
)
def test_repeated_allow_entries_are_merged_never_dropping_the_frame(allow: str) -> None:
    project = parse_project(project_head("p") + FRAME + f"allow = {allow}\n")
    assert [f.name for f in project.frames] == ["f"]
    expected = {MemberKind.BRACE} | ({MemberKind.TIE} if "tie" in allow else set())
    assert project.frames[0].allow == expected


def test_an_unreadable_allow_entry_is_named_not_silently_dropped() -> None:
    message = _problems(project_head("p") + FRAME + 'allow = ["brace", "strut"]\n')
    assert "allow[2]" in message
    assert "'strut' is not one of" in message


def test_huge_opening_coordinates_are_range_errors_not_warnings() -> None:
    text = project_head("p") + FRAME + '[[frame.opening]]\nname = "o"\npolygon = [[0, 0], [1e308, 0], [1e308, 1e308]]\n'
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        message = _problems(text)
    assert "polygon[2]" in message
    assert "out of range" in message


def test_syntax_error_at_the_end_gets_a_line() -> None:
    message = _problems(project_head("p") + FRAME + "blocked = [[1, 1],\n")
    assert "not valid TOML" in message
    assert "end of document" not in message
    assert "line 13" in message  # the open array


def test_devices_fifos_and_folders_are_refused_before_reading(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    for path, words in [("/dev/zero", "not a regular file"), (fifo, "not a regular file"), (tmp_path, "a folder")]:
        result: list[BaseException] = []

        def read(p: Path | str = path, into: list[BaseException] = result) -> None:
            try:
                load_project(p)
            except BaseException as exc:  # collected for the assertion below
                into.append(exc)

        worker = threading.Thread(target=read, daemon=True)
        worker.start()
        worker.join(timeout=10)
        assert not worker.is_alive(), f"reading {path} blocked"
        assert isinstance(result[0], InputError)
        assert words in str(result[0])


def test_files_over_the_limit_are_refused_unread(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    with big.open("wb") as handle:  # sparse: no disk space used
        handle.truncate(MAX_FILE_BYTES + 1)
    with pytest.raises(InputError, match="too big for a project file"):
        load_project(big)


def test_non_utf8_names_the_byte(tmp_path: Path) -> None:
    bad = tmp_path / "latin.toml"
    bad.write_bytes(project_head("p").encode() + b'[[frame]]\nname = "caf\xe9"\n')
    with pytest.raises(InputError, match="is not UTF-8 text"):
        load_project(bad)
