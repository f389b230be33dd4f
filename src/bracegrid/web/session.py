"""One editing session: the project file it was started with, its backup, its output folder, and saving.

The session is the only code of the editor that touches the file system, and it touches only the
three places fixed when it starts (no path ever comes from a request). Edits arrive in the
project file's own field names and are validated by the loader, so the page shows the loader's
own messages and nothing invalid is ever written.

Versions: a version is a digest of the file's bytes. Every save names the version it was edited
from; when the bytes on disk no longer have that digest (another program changed the file, or
another tab saved first), the save is refused and the page offers to reload or to save a copy.
"""

from __future__ import annotations

import dataclasses
import hashlib
import threading
import tomllib
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path
from typing import Any

from bracegrid.errors import InputError
from bracegrid.io import (
    OutputFile,
    check_out_folder,
    parse_project,
    project_from_data,
    replace_with_backup,
    update_project_text,
    write_outputs,
)
from bracegrid.model import Frame, Project

#: Hex digits of the SHA-256 digest kept as a version (80 bits: no accidental collision).
VERSION_DIGITS = 20


def version_of(data: bytes) -> str:
    """The version of a file's contents.

    Example:
        >>> version_of(b"abc")
        'ba7816bf8f01cfea4141'
    """
    return hashlib.sha256(data).hexdigest()[:VERSION_DIGITS]


@dataclass(frozen=True, slots=True)
class EditorPaths:
    """The only places an editing session reads or writes.

    Attributes:
        project: The project file the editor was started with.
        backup: Its one backup (the contents before the last save).
        out: The output folder (compare files, saved copies).
    """

    project: Path
    backup: Path
    out: Path

    @classmethod
    def beside(cls, project: str | Path, *, out: str | Path | None = None) -> EditorPaths:
        """The default places: ``NAME.toml.bak`` and ``NAME-edit/`` next to the project file."""
        path = Path(project).resolve()
        folder = Path(out).resolve() if out is not None else path.with_name(f"{path.stem}-edit")
        return cls(project=path, backup=path.with_name(f"{path.name}.bak"), out=check_out_folder(folder))


@dataclass(frozen=True, slots=True)
class FrameEdit:
    """A frame as the page has edited it, in the project file's own field names.

    Values are kept as the user typed them (a width may be ``"2400 mm"``); the loader checks them.

    Attributes:
        name: The frame's name (frames are not renamed in the editor).
        fields: ``widths``, ``heights``, ``supports``, ``blocked`` and ``member`` as a project file
            writes them; fields left out keep the file's values.
    """

    name: str
    fields: Mapping[str, Any]


@dataclass(frozen=True, slots=True)
class Saved:
    """What a save did.

    Attributes:
        path: The file written.
        version: The version of the new contents.
        backup: The backup written (None when the file was new or is a copy).
        project: The project as written (read back from the written text).
    """

    path: Path
    version: str
    backup: Path | None
    project: Project


class SaveConflictError(Exception):
    """The file is no longer the version the page edited; nothing was written.

    Attributes:
        reason: Why, in words.
        disk_version: The version on disk now.
    """

    def __init__(self, reason: str, disk_version: str) -> None:
        self.reason = reason
        self.disk_version = disk_version
        super().__init__(reason)


def _normal(project: Project) -> Project:
    """A project with member order and its source name left out, for comparing content."""
    frames = tuple(
        dataclasses.replace(f, members=tuple(sorted(f.members, key=lambda m: m.sort_key))) for f in project.frames
    )
    return dataclasses.replace(project, frames=frames, source="")


def _read(path: Path) -> bytes:
    try:
        return path.read_bytes()
    except FileNotFoundError:
        msg = "file not found; it was moved or deleted since the editor started"
        raise InputError(msg, source=str(path)) from None
    except OSError as exc:
        msg = f"cannot read the file ({exc.strerror or exc}); check you may read it"
        raise InputError(msg, source=str(path)) from None


def _decode(data: bytes, path: Path) -> str:
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        msg = f"not UTF-8 text ({exc}); save it as UTF-8"
        raise InputError(msg, source=str(path)) from None


class EditorSession:
    """The project being edited, and the one place that reads and writes its files.

    Methods are safe to call from several threads at once (one lock guards the state).
    """

    def __init__(self, paths: EditorPaths) -> None:
        self.paths = paths
        self._lock = threading.Lock()
        self._text = ""
        self._data: dict[str, Any] = {}
        self._project: Project | None = None
        self._version = ""
        self._saved_version = ""  # the version this server itself last wrote
        self._files: list[Path] = []
        self.reload()

    # --- reading ------------------------------------------------------------------------------

    def reload(self) -> tuple[Project, str]:
        """Read the project file from disk again.

        Returns:
            The project and its version.

        Raises:
            InputError: If the file cannot be read or is not valid (the loader's problems).
        """
        raw = _read(self.paths.project)
        text = _decode(raw, self.paths.project)
        project = parse_project(text, source=str(self.paths.project))
        with self._lock:
            self._text, self._data, self._project = text, tomllib.loads(text), project
            self._version = version_of(raw)
            return project, self._version

    @property
    def project(self) -> Project:
        """The project as last loaded or saved."""
        with self._lock:
            assert self._project is not None  # set by reload() in __init__
            return self._project

    @property
    def version(self) -> str:
        """The version last loaded or saved."""
        with self._lock:
            return self._version

    @property
    def file_name(self) -> str:
        """The project file's name (no folder)."""
        return self.paths.project.name

    # --- edits --------------------------------------------------------------------------------

    def _merged(self, base: Mapping[str, Any], edits: Sequence[FrameEdit]) -> dict[str, Any]:
        frames = base.get("frame", [])
        names = [f.get("name") if isinstance(f, dict) else None for f in frames]
        problems = [
            f"frame {e.name!r}: no frame of that name; the project has {names}" for e in edits if e.name not in names
        ]
        if problems:
            raise InputError(problems)
        by_name = {e.name: e for e in edits}
        merged = []
        for table in frames:
            edit = by_name.get(table.get("name"))
            merged.append({**table, **edit.fields} if edit is not None else table)
        return {**base, "frame": merged}

    def apply(self, edits: Sequence[FrameEdit]) -> Project:
        """The project with the page's edits in place, validated by the loader.

        Raises:
            InputError: With the loader's problems (field, value, fix), if any edit is invalid.
        """
        with self._lock:
            base = self._data
        return project_from_data(self._merged(base, edits), source=self.file_name)

    def frame(self, edit: FrameEdit) -> Frame:
        """One edited frame, validated in its project (see :meth:`apply`)."""
        return self.apply([edit]).frame(edit.name)

    # --- writing ------------------------------------------------------------------------------

    def save(self, edits: Sequence[FrameEdit], *, version: str) -> Saved:
        """Write the edited project back to its file, atomically, keeping one backup.

        Args:
            edits: The edited frames.
            version: The version the page loaded (or last saved).

        Returns:
            What was written.

        Raises:
            SaveConflictError: The file on disk is not that version (nothing written).
            InputError: An edit is invalid (nothing written).
            ExportError: The file or its backup cannot be written.
        """
        with self._lock:
            raw = _read(self.paths.project)
            disk = version_of(raw)
            if disk != version:
                why = (
                    "another tab saved this project first"
                    if disk == self._saved_version
                    else "the file changed on disk since it was loaded"
                )
                raise SaveConflictError(why, disk)
            text = _decode(raw, self.paths.project)
            data = tomllib.loads(text)
            project = project_from_data(self._merged(data, edits), source=self.file_name)
            new_text = self._render(text, project)
            written = replace_with_backup(self.paths.project, new_text, backup=self.paths.backup)
            new_version = version_of(new_text.encode("utf-8"))
            self._text, self._data, self._project = new_text, tomllib.loads(new_text), project
            self._version = self._saved_version = new_version
            return Saved(path=written, version=new_version, backup=self.paths.backup, project=project)

    def save_copy(self, edits: Sequence[FrameEdit]) -> Saved:
        """Write the edited project as a new file in the output folder (the project file is untouched).

        The name is chosen here: ``<stem>-copy-<date>-<time>.toml``, numbered if it exists.

        Raises:
            InputError: An edit is invalid (nothing written).
            ExportError: The file cannot be written.
        """
        with self._lock:
            text, data = self._text, self._data
        project = project_from_data(self._merged(data, edits), source=self.file_name)
        new_text = self._render(text, project)
        stamp = datetime.now().strftime("%Y%m%d-%H%M%S")
        stem = f"{self.paths.project.stem}-copy-{stamp}"
        name, k = f"{stem}.toml", 2
        while (self.paths.out / name).exists():
            name, k = f"{stem}-{k}.toml", k + 1
        (path,) = self.write_outputs([OutputFile(name, new_text.encode("utf-8"))])
        return Saved(path=path, version=version_of(new_text.encode("utf-8")), backup=None, project=project)

    def _render(self, original: str, project: Project) -> str:
        """The text to write for a project, checked to read back as exactly that project."""
        text = update_project_text(original, project)  # the user's comments and layout are kept
        back = parse_project(text, source=self.file_name)
        if _normal(back) != _normal(project):
            msg = "internal error: the project text written does not read back as the project edited; nothing written"
            raise RuntimeError(msg)
        return text

    def write_outputs(self, files: Sequence[OutputFile]) -> tuple[Path, ...]:
        """Write rendered files into the output folder and remember them (see :meth:`written`).

        Raises:
            ExportError: If the folder or a file cannot be written.
        """
        paths = write_outputs(self.paths.out, files)
        with self._lock:
            for p in paths:
                if p not in self._files:
                    self._files.append(p)
            return tuple(paths)

    def written(self, index: int) -> Path | None:
        """The file this session wrote into the output folder under this number, if any."""
        with self._lock:
            return self._files[index] if 0 <= index < len(self._files) else None

    def file_index(self, path: Path) -> int:
        """The number under which :meth:`written` serves a file this session wrote."""
        with self._lock:
            return self._files.index(path)
