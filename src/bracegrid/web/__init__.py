"""The browser editor: a local server over the same library API as the CLI (docs/editor.md)."""

from bracegrid.web.app import create_app
from bracegrid.web.guard import GuardRules, check_bind_address, new_token
from bracegrid.web.jobs import JobBoard, JobKind, JobSpec, execute
from bracegrid.web.server import bind_socket, bound_port, serve
from bracegrid.web.session import EditorPaths, EditorSession, FrameEdit, SaveConflictError, version_of

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
