"""Atomic writes: a file, or a set of files in a folder, appears whole or not at all."""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import IO

from bracegrid.errors import ExportError


def _umask() -> int:
    current = os.umask(0)
    os.umask(current)
    return current


def write_atomic(path: str | Path, write: Callable[[IO[bytes]], None]) -> Path:
    """Write a file through a temporary file in the same folder, then rename.

    Either the whole file appears or nothing does: a failure part-way leaves
    any older file at ``path`` untouched.

    Args:
        path: Destination.
        write: Called with the open binary temporary file.

    Returns:
        The destination path.

    Raises:
        ExportError: If the folder cannot be written or ``write`` fails with OSError.
    """
    dest = Path(path)
    tmp_name = ""
    try:
        dest.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp_name = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".part", dir=dest.parent)
        with os.fdopen(fd, "wb") as handle:
            write(handle)
        os.chmod(tmp_name, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        os.replace(tmp_name, dest)
        tmp_name = ""
    except OSError as exc:
        msg = f"cannot write {dest}: {exc.strerror or exc}; check the folder exists and is writable"
        raise ExportError(msg) from None
    finally:
        if tmp_name and os.path.exists(tmp_name):
            os.unlink(tmp_name)
    return dest


def write_text_atomic(path: str | Path, text: str) -> Path:
    """Write UTF-8 text atomically (see :func:`write_atomic`)."""
    data = text.encode("utf-8")

    def put(handle: IO[bytes]) -> None:
        handle.write(data)

    return write_atomic(path, put)


def write_bytes_atomic(path: str | Path, data: bytes) -> Path:
    """Write bytes atomically (see :func:`write_atomic`)."""

    def put(handle: IO[bytes]) -> None:
        handle.write(data)

    return write_atomic(path, put)


def replace_with_backup(path: str | Path, text: str, *, backup: str | Path) -> Path:
    """Replace a file atomically, keeping its previous contents as the one backup.

    The backup is written (atomically) first, from the bytes on disk now, so at every moment
    either the old file or the new one is at ``path`` and the old one is never lost.

    Args:
        path: The file to replace (it may not exist yet: then no backup is written).
        text: Its new contents (UTF-8).
        backup: Where the previous contents go (overwritten: one backup, not a series).

    Returns:
        The destination path.

    Raises:
        ExportError: If either file cannot be written.
    """
    dest = Path(path)
    try:
        old = dest.read_bytes()
    except FileNotFoundError:
        old = None
    except OSError as exc:
        msg = f"cannot read {dest} to back it up: {exc.strerror or exc}"
        raise ExportError(msg) from None
    if old is not None:
        write_bytes_atomic(backup, old)
    return write_text_atomic(dest, text)


@dataclass(frozen=True, slots=True)
class OutputFile:
    """One file of an output set, rendered in memory before anything is written.

    Attributes:
        name: File name (no folder).
        data: Its full contents.
    """

    name: str
    data: bytes


def check_out_folder(folder: str | Path) -> Path:
    """The output folder, if it can be one (it may not exist yet).

    Raises:
        ExportError: If the path exists and is not a folder.
    """
    out = Path(folder)
    if out.exists() and not out.is_dir():
        msg = f"{out}: exists and is not a folder; give a folder path"
        raise ExportError(msg)
    return out


def write_outputs(folder: str | Path, files: Sequence[OutputFile]) -> tuple[Path, ...]:
    """Write rendered files into a folder, each atomically.

    Raises:
        ExportError: If the folder or a file cannot be written.
    """
    out = check_out_folder(folder)
    return tuple(write_bytes_atomic(out / item.name, item.data) for item in files)
