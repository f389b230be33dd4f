"""Atomic writes: a file, or a set of files in a folder, appears whole or not at all.

Every temporary file or folder is listed while it exists (:func:`remove_temporaries` removes them,
for a shell that must stop at once), and the few renames that put a set in place run with SIGINT
and SIGTERM held back (:func:`uninterrupted`), so an interrupt leaves either the old set or the new one.
"""

from __future__ import annotations

import contextlib
import os
import shutil
import signal
import tempfile
import threading
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import IO

from bracegrid.errors import ExportError

#: Temporary files and folders that exist right now (removed by :func:`remove_temporaries`).
_TEMPORARIES: set[str] = set()

#: Held while a set of files is being moved into place: a shell that must stop waits for it.
MOVING = threading.Lock()

_HELD_SIGNALS = {signal.SIGINT, signal.SIGTERM}


def remove_temporaries() -> None:
    """Remove every temporary file and folder still listed (for a shell stopping on a signal)."""
    for name in sorted(_TEMPORARIES, reverse=True):
        with contextlib.suppress(OSError):
            if os.path.isdir(name):
                shutil.rmtree(name, ignore_errors=True)
            else:
                os.unlink(name)
        _TEMPORARIES.discard(name)


@contextlib.contextmanager
def uninterrupted() -> Iterator[None]:
    """Hold SIGINT and SIGTERM back (in this thread) and hold :data:`MOVING` for the duration."""
    main = threading.current_thread() is threading.main_thread()
    old = signal.pthread_sigmask(signal.SIG_BLOCK, _HELD_SIGNALS) if main else None
    try:
        with MOVING:
            yield
    finally:
        if old is not None:
            signal.pthread_sigmask(signal.SIG_SETMASK, old)


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
        _TEMPORARIES.add(tmp_name)
        with os.fdopen(fd, "wb") as handle:
            write(handle)
        os.chmod(tmp_name, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
        with uninterrupted():
            os.replace(tmp_name, dest)
            _TEMPORARIES.discard(tmp_name)
            tmp_name = ""
    except OSError as exc:
        msg = f"cannot write {dest}: {exc.strerror or exc}; check the folder exists and is writable"
        raise ExportError(msg) from None
    finally:
        if tmp_name:
            with contextlib.suppress(OSError):
                os.unlink(tmp_name)
            _TEMPORARIES.discard(tmp_name)
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


def _probe_writable(folder: Path) -> None:
    """Create and remove a file in ``folder`` (the nearest existing one), so a run fails before its work."""
    place = folder
    while not place.exists() and place != place.parent:
        place = place.parent
    if not place.is_dir():
        msg = f"{folder}: {place} is not a folder; give a folder path"
        raise ExportError(msg)
    try:
        with tempfile.TemporaryFile(dir=place):
            pass
    except OSError as exc:
        msg = f"cannot write in {place}: {exc.strerror or exc}; choose a folder you may write to"
        raise ExportError(msg) from None


def check_out_folder(folder: str | Path) -> Path:
    """The output folder, if it can be one and can be written (it may not exist yet).

    Called before any work is done, so a run with an unwritable output fails at once.

    Raises:
        ExportError: If the path is empty, exists and is not a folder, or cannot be written.
    """
    if not str(folder):
        msg = "empty folder name; give a folder path (e.g. out/)"
        raise ExportError(msg)
    out = Path(folder)
    if out.exists() and not out.is_dir():
        msg = f"{out}: exists and is not a folder; give a folder path"
        raise ExportError(msg)
    _probe_writable(out)
    return out


def check_out_file(path: str | Path) -> Path:
    """An output file path, if its folder can be written (checked before any work is done).

    Raises:
        ExportError: If the path is empty, is a folder, or its folder cannot be written.
    """
    if not str(path):
        msg = "empty file name; give a file path (e.g. out/braced.toml)"
        raise ExportError(msg)
    dest = Path(path)
    if dest.is_dir():
        msg = f"{dest}: is a folder; give a file path"
        raise ExportError(msg)
    _probe_writable(dest.parent)
    return dest


def write_outputs(folder: str | Path, files: Sequence[OutputFile]) -> tuple[Path, ...]:
    """Write a set of rendered files into a folder: either every file is new, or none is.

    The set is written into a temporary folder first (beside the target if it does not exist yet,
    inside it otherwise, so the renames never cross a file system), then moved into place with
    signals held back; if a move fails, the files already moved are put back as they were.

    Raises:
        ExportError: If the folder or a file cannot be written (nothing in ``folder`` changed then).
    """
    out = check_out_folder(folder)
    names = [item.name for item in files]
    if len(set(names)) != len(names) or any(Path(n).name != n for n in names):
        msg = f"output names must be distinct plain file names, got {names}"
        raise ExportError(msg)
    fresh = not out.exists()
    stage = ""
    try:
        place = out.parent if fresh else out
        place.mkdir(parents=True, exist_ok=True)
        stage = tempfile.mkdtemp(prefix=f".{out.name or 'out'}.", suffix=".part", dir=place)
        _TEMPORARIES.add(stage)
        for item in files:
            with open(os.path.join(stage, item.name), "wb") as handle:
                handle.write(item.data)
        with uninterrupted():
            if fresh:
                os.chmod(stage, 0o777 & ~_umask())  # mkdtemp makes 0700; give the usual mode
                os.rename(stage, out)
                _TEMPORARIES.discard(stage)
                stage = ""
            else:
                _move_set(Path(stage), out, names)
    except OSError as exc:
        msg = f"cannot write into {out}: {exc.strerror or exc}; nothing there was changed"
        raise ExportError(msg) from None
    finally:
        if stage:
            shutil.rmtree(stage, ignore_errors=True)
            _TEMPORARIES.discard(stage)
    return tuple(out / n for n in names)


def _move_set(stage: Path, out: Path, names: Sequence[str]) -> None:
    """Move staged files into ``out``, keeping the old ones in the stage until all are in place."""
    old = stage / ".old"
    old.mkdir()
    done: list[tuple[str, bool]] = []  # (name, an old file was kept)
    try:
        for name in names:
            had = (out / name).exists()
            if had:
                os.replace(out / name, old / name)
            done.append((name, had))
            os.replace(stage / name, out / name)
    except OSError:
        for name, had in reversed(done):
            with contextlib.suppress(OSError):
                if had:
                    os.replace(old / name, out / name)
                elif (out / name).exists() and not (stage / name).exists():
                    os.unlink(out / name)
        raise
