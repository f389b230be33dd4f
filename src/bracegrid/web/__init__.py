"""The browser editor: a local server over the same library API as the CLI (docs/editor.md).

``create_app`` (the Starlette routes) loads on first use (PEP 562), so a command that never starts
the editor (``bracegrid check``) does not import Starlette.
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

from bracegrid.web.guard import GuardRules, check_bind_address, new_token
from bracegrid.web.jobs import JobBoard, JobKind, JobSpec, execute
from bracegrid.web.server import bind_socket, bound_port, serve
from bracegrid.web.session import EditorPaths, EditorSession, FrameEdit, SaveConflictError, version_of

if TYPE_CHECKING:
    from bracegrid.web.app import create_app


def __getattr__(name: str) -> Any:
    """``create_app`` from :mod:`bracegrid.web.app`, imported when first asked for."""
    if name != "create_app":
        msg = f"module 'bracegrid.web' has no attribute {name!r}"
        raise AttributeError(msg)
    value = importlib.import_module("bracegrid.web.app").create_app
    globals()[name] = value
    return value


__all__ = [
    "EditorPaths",
    "EditorSession",
    "FrameEdit",
    "GuardRules",
    "JobBoard",
    "JobKind",
    "JobSpec",
    "SaveConflictError",
    "bind_socket",
    "bound_port",
    "check_bind_address",
    "create_app",
    "execute",
    "new_token",
    "serve",
    "version_of",
]
