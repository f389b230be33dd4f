"""Shared pieces of the editor tests: a project copied into a temporary folder, and a test client on it."""

from __future__ import annotations

import shutil
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from starlette.testclient import TestClient

from bracegrid.web import EditorPaths, EditorSession, GuardRules, create_app

ROOT = Path(__file__).resolve().parents[2]
PROJECTS = ROOT / "projects"
HOST = "127.0.0.1"
PORT = 8765
TOKEN = "test-token-0123456789"
ORIGIN = f"http://{HOST}:{PORT}"
#: Headers of a request from the editor's own page.
PAGE = {"X-Bracegrid-Token": TOKEN, "Origin": ORIGIN}


def copy_project(tmp_path: Path, name: str = "orchard-shed.toml") -> Path:
    """A demo project copied into the test's folder (the editor may write beside it)."""
    dest = tmp_path / name
    shutil.copyfile(PROJECTS / name, dest)
    return dest


@contextmanager
def editor(path: Path, **rules: Any) -> Iterator[tuple[TestClient, EditorSession]]:
    """A running editor app on a project file, with a client that talks to it at the bound address."""
    session = EditorSession(EditorPaths.beside(path))
    app = create_app(session, GuardRules.bound(HOST, PORT, TOKEN, **rules))
    with TestClient(app, base_url=ORIGIN, raise_server_exceptions=False) as client:
        yield client, session


def frame_edit(frame: dict[str, Any], **changes: Any) -> dict[str, Any]:
    """The edit the page would send for a frame as ``GET /api/project`` gave it."""
    keys = ("name", "widths", "heights", "supports", "blocked", "members")
    return {**{k: frame[k] for k in keys}, **changes}


def load(client: TestClient) -> dict[str, Any]:
    """The project as the page loads it."""
    got = client.get("/api/project", headers=PAGE)
    assert got.status_code == 200, got.text
    data: dict[str, Any] = got.json()
    return data
