"""Atomic writes (src/bracegrid/io/atomic.py): a file appears whole or not at all.

References: POSIX rename semantics (``os.replace`` swaps the name in one step, so a reader sees
the old file or the new one, never a part); the file mode expected of a new file is the usual
``0o666 & ~umask`` (POSIX ``open``/``creat``). Everything else is checked directly on the file
system in a temporary folder.
"""

from __future__ import annotations

import os
import stat
from pathlib import Path
from typing import IO

import pytest

import bracegrid.io.atomic as atomic
from bracegrid.errors import BraceGridError, ExportError
from bracegrid.io import (
    OutputFile,
    check_out_folder,
    write_atomic,
    write_bytes_atomic,
    write_outputs,
    write_text_atomic,
)


def _leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".part"))


def test_writes_a_new_file(tmp_path: Path) -> None:
    dest = tmp_path / "a.txt"
    assert write_bytes_atomic(dest, b"hello") == dest
    assert dest.read_bytes() == b"hello"
    assert _leftovers(tmp_path) == []


def test_text_is_utf8(tmp_path: Path) -> None:
    dest = write_text_atomic(tmp_path / "t.txt", "Straße 2,4 m")
    assert dest.read_bytes() == "Straße 2,4 m".encode()


def test_replaces_an_old_file(tmp_path: Path) -> None:
    dest = tmp_path / "a.txt"
    dest.write_text("old", encoding="utf-8")
    write_text_atomic(dest, "new")
    assert dest.read_text(encoding="utf-8") == "new"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt"]


def test_creates_missing_folders(tmp_path: Path) -> None:
    dest = tmp_path / "x" / "y" / "z.bin"
    write_bytes_atomic(dest, b"\x00\x01")
    assert dest.read_bytes() == b"\x00\x01"


def test_new_file_gets_the_usual_mode(tmp_path: Path) -> None:
    current = os.umask(0o022)
    try:
        dest = write_bytes_atomic(tmp_path / "m.bin", b"x")
    finally:
        os.umask(current)
    # mkstemp makes 0600; the writer widens it to 0o666 & ~umask = 0o644 under umask 022.
    assert stat.S_IMODE(dest.stat().st_mode) == 0o644


def test_oserror_in_the_writer_leaves_the_old_file(tmp_path: Path) -> None:
    dest = tmp_path / "plan.dxf"
    dest.write_bytes(b"old drawing")

    def failing(handle: IO[bytes]) -> None:
        handle.write(b"half a new draw")
        raise OSError(28, "No space left on device")

    with pytest.raises(ExportError) as info:
        write_atomic(dest, failing)
    assert dest.read_bytes() == b"old drawing"
    assert _leftovers(tmp_path) == []
    assert str(dest) in str(info.value)
    assert "No space left on device" in str(info.value)
    # ExportError is both a bracegrid error and an OSError (errors.py).
    assert isinstance(info.value, OSError)
    assert isinstance(info.value, BraceGridError)


def test_oserror_when_nothing_was_there(tmp_path: Path) -> None:
    def failing(handle: IO[bytes]) -> None:
        msg = "disk gone"
        raise OSError(msg)

    with pytest.raises(ExportError):
        write_atomic(tmp_path / "new.csv", failing)
    assert list(tmp_path.iterdir()) == []


def test_other_errors_pass_through_and_still_clean_up(tmp_path: Path) -> None:
    dest = tmp_path / "plan.dxf"
    dest.write_bytes(b"old")

    def buggy(handle: IO[bytes]) -> None:
        handle.write(b"partial")
        msg = "renderer bug"
        raise ValueError(msg)

    with pytest.raises(ValueError, match="renderer bug"):
        write_atomic(dest, buggy)
    assert dest.read_bytes() == b"old"
    assert _leftovers(tmp_path) == []


def test_unwritable_folder_raises_export_error(tmp_path: Path) -> None:
    # A path "under" a regular file: its folder can never be created, whatever the user's rights.
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("I am a file", encoding="utf-8")
    with pytest.raises(ExportError, match="cannot write"):
        write_text_atomic(blocker / "out.toml", "x")
    with pytest.raises(ExportError):
        write_bytes_atomic(blocker / "deeper" / "out.bin", b"x")
    assert blocker.read_text(encoding="utf-8") == "I am a file"


def test_check_out_folder(tmp_path: Path) -> None:
    assert check_out_folder(tmp_path) == tmp_path
    missing = tmp_path / "later"
    assert check_out_folder(str(missing)) == missing  # may not exist yet
    assert not missing.exists()  # and is not created by the check
    a_file = tmp_path / "report.html"
    a_file.write_text("x", encoding="utf-8")
    with pytest.raises(ExportError, match="exists and is not a folder") as info:
        check_out_folder(a_file)
    assert str(a_file) in str(info.value)


def test_write_outputs(tmp_path: Path) -> None:
    folder = tmp_path / "out"
    files = [OutputFile("a.csv", b"frame,cost\n"), OutputFile("b.svg", b"<svg/>"), OutputFile("c.txt", b"")]
    paths = write_outputs(folder, files)
    assert paths == (folder / "a.csv", folder / "b.svg", folder / "c.txt")
    assert [p.read_bytes() for p in paths] == [f.data for f in files]
    assert sorted(p.name for p in folder.iterdir()) == ["a.csv", "b.svg", "c.txt"]


def test_write_outputs_into_a_file_path_writes_nothing(tmp_path: Path) -> None:
    a_file = tmp_path / "out"
    a_file.write_text("keep me", encoding="utf-8")
    with pytest.raises(ExportError, match="not a folder"):
        write_outputs(a_file, [OutputFile("a.csv", b"x")])
    assert a_file.read_text(encoding="utf-8") == "keep me"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out"]


def _set(*names: str, data: bytes = b"new") -> list[OutputFile]:
    return [OutputFile(n, data + n.encode()) for n in names]


def test_a_set_into_a_new_folder_appears_in_one_rename(tmp_path: Path) -> None:
    out = tmp_path / "fresh"
    written = write_outputs(out, _set("a.csv", "b.dxf"))
    assert written == (out / "a.csv", out / "b.dxf")
    assert (out / "b.dxf").read_bytes() == b"newb.dxf"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["fresh"]  # no stage folder left


def test_a_failed_move_leaves_the_old_set_whole(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    out = tmp_path / "o"
    write_outputs(out, _set("a.csv", "b.dxf", "c.png", data=b"old"))
    real = os.replace
    calls = {"n": 0}

    def flaky(src: str | os.PathLike[str], dst: str | os.PathLike[str]) -> None:
        calls["n"] += 1
        if calls["n"] == 4:  # a.csv swapped in, b.dxf's old copy set aside: then the disk fails
            raise OSError(28, "No space left on device")
        real(src, dst)

    monkeypatch.setattr(os, "replace", flaky)
    with pytest.raises(ExportError, match="nothing there was changed"):
        write_outputs(out, _set("a.csv", "b.dxf", "c.png"))
    monkeypatch.setattr(os, "replace", real)
    assert {p.name: p.read_bytes() for p in out.iterdir()} == {
        "a.csv": b"olda.csv",
        "b.dxf": b"oldb.dxf",
        "c.png": b"oldc.png",
    }


def test_an_interrupt_while_rendering_the_set_leaves_no_temporary(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    out = tmp_path / "o"
    write_outputs(out, _set("a.csv", data=b"old"))

    opened: list[str] = []

    def interrupted_open(path: str, mode: str) -> IO[bytes]:
        opened.append(path)
        if len(opened) == 2:  # Ctrl-C while the second file of the set is being written
            raise KeyboardInterrupt
        return open(path, mode)  # the caller closes it

    monkeypatch.setattr(atomic, "open", interrupted_open, raising=False)
    with pytest.raises(KeyboardInterrupt):
        write_outputs(out, _set("a.csv", "b.dxf"))
    assert sorted(p.name for p in out.iterdir()) == ["a.csv"]
    assert (out / "a.csv").read_bytes() == b"olda.csv"


def test_folder_checks_happen_before_any_work(tmp_path: Path) -> None:
    blocker = tmp_path / "file"
    blocker.write_text("x", encoding="utf-8")
    with pytest.raises(ExportError, match="is not a folder"):
        check_out_folder(blocker / "deeper" / "still")
    with pytest.raises(ExportError, match="empty folder name"):
        check_out_folder("")
