"""The editor's web application: the page, its assets and the JSON API (docs/editor.md), behind the guard.

Every handler is thin: it reads the request with :mod:`bracegrid.web.requests`, calls one
library function (through the session for anything touching a file), and answers with a shape
from :mod:`bracegrid.outputs.shapes`. Every failure becomes a JSON answer with a 4xx code (5xx
only for a bracegrid bug or a file that cannot be written); none shows a traceback, and the
server goes on.
"""

from __future__ import annotations

import asyncio
import contextlib
import html
import json
import re
import time
from collections.abc import AsyncIterator, Awaitable, Callable
from importlib import resources
from typing import Any

from starlette.applications import Starlette
from starlette.requests import Request
from starlette.responses import JSONResponse, Response, StreamingResponse
from starlette.routing import Route

from bracegrid.analysis import check_frame
from bracegrid.errors import BraceGridError, ExportError, InputError, NumericalError
from bracegrid.io import parse_member_refs
from bracegrid.mechanics import analyse_frame
from bracegrid.outputs.shapes import (
    editor_forces_dict,
    editor_project_dict,
    error_dict,
    live_check_dict,
    problems_dict,
)
from bracegrid.web.guard import BodyTooLargeError, GuardMiddleware, GuardRules
from bracegrid.web.jobs import Job, JobBoard, JobKind, JobSpec, compare_files
from bracegrid.web.requests import RequestError, check_request, job_request, parse_json, save_request
from bracegrid.web.session import EditorSession, SaveConflictError

#: The files of the page, served from the package (no network, no build step).
ASSETS = {
    "app.js": "text/javascript; charset=utf-8",
    "style.css": "text/css; charset=utf-8",
}
#: Content types of the files a session writes into its output folder.
OUTPUT_TYPES = {
    ".html": "text/html; charset=utf-8",
    ".csv": "text/csv; charset=utf-8",
    ".dxf": "application/dxf",
    ".toml": "text/plain; charset=utf-8",
}
#: What a written HTML report may do when opened from the editor: show its inline CSS and SVG, nothing else.
REPORT_POLICY = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; frame-ancestors 'none'"
#: Seconds between looks at a job while streaming its events.
STREAM_POLL = 0.1
#: Seconds between keep-alive comments on a quiet stream.
STREAM_HEARTBEAT = 10.0

_JOB_ID = re.compile(r"^[0-9a-f]{16}$")

Handler = Callable[[Request], Awaitable[Response]]


def _asset(name: str) -> bytes:
    return (resources.files("bracegrid.web") / "static" / name).read_bytes()


def _json(payload: dict[str, Any], status: int = 200) -> JSONResponse:
    return JSONResponse(payload, status_code=status)


def answer_errors(handler: Handler) -> Handler:
    """Wrap a handler so every failure is a JSON answer (never a traceback), and the server goes on."""

    async def wrapped(request: Request) -> Response:
        try:
            return await handler(request)
        except RequestError as exc:
            kind = "bad-request" if exc.status == 400 else "invalid-request"
            return _json(error_dict(kind, str(exc), field=exc.field), exc.status)
        except BodyTooLargeError:
            return _json(error_dict("too-large", "request body over the size limit"), 413)
        except SaveConflictError as exc:
            offer = "reload the file (your edits are lost) or save a copy into the output folder"
            return _json(
                error_dict("conflict", f"not saved: {exc.reason}; {offer}", disk_version=exc.disk_version), 409
            )
        except InputError as exc:
            names = [f.name for f in request.app.state.session.project.frames]
            return _json(problems_dict(exc.problems, frame_names=names), 422)
        except ExportError as exc:
            return _json(error_dict("cannot-write", str(exc)), 500)
        except BraceGridError as exc:
            return _json(error_dict("invalid", str(exc)), 422)
        except Exception as exc:
            message = f"internal error ({type(exc).__name__}: {exc}); this is a bracegrid bug, please report it"
            return _json(error_dict("internal", message), 500)

    return wrapped


async def _body(request: Request) -> dict[str, Any]:
    return dict(parse_json(await request.body()))


def _session(request: Request) -> EditorSession:
    session: EditorSession = request.app.state.session
    return session


def _board(request: Request) -> JobBoard:
    board: JobBoard = request.app.state.board
    return board


async def page(request: Request) -> Response:
    """``GET /``: the editor page, with the token placed where its script and links need it."""
    rules: GuardRules = request.app.state.rules
    token = html.escape(rules.token, quote=True)
    text = _asset("index.html").decode("utf-8").replace("{{TOKEN}}", token)
    text = text.replace("{{TITLE}}", html.escape(_session(request).file_name))
    return Response(text, media_type="text/html; charset=utf-8")


async def asset(request: Request) -> Response:
    """``GET /static/{name}``: one of the page's own files (a fixed list; nothing else is served)."""
    name = request.path_params["name"]
    if name not in ASSETS:
        return _json(error_dict("not-found", f"no asset {name!r}"), 404)
    return Response(_asset(name), media_type=ASSETS[name])


async def project(request: Request) -> Response:
    """``GET /api/project``: the project read from disk now, with its version."""
    session = _session(request)
    loaded, version = await asyncio.to_thread(session.reload)
    return _json(editor_project_dict(loaded, version=version, file_name=session.file_name))


async def check(request: Request) -> Response:
    """``POST /api/check``: the live verdict of one edited frame."""
    start = time.perf_counter()
    req = check_request(await _body(request))
    session = _session(request)

    def work() -> dict[str, Any]:
        frame = session.frame(req.frame)
        project = session.project
        return live_check_dict(frame, check_frame(frame), project.costs, unit=project.length_unit)

    payload = await asyncio.to_thread(work)
    payload["server_ms"] = round((time.perf_counter() - start) * 1000.0, 2)
    return _json(payload)


async def forces(request: Request) -> Response:
    """``POST /api/forces``: member forces and utilisation of one edited frame under its load cases.

    Asked for after the verdict (it costs more than the check), so the verdict never waits on it.
    A frame without load cases, or whose stiffness the file does not give, answers ``available:
    false`` with the reason in words; a solve that fails its residual check reports no numbers.
    """
    req = check_request(await _body(request))
    session = _session(request)

    def work() -> dict[str, Any]:
        frame = session.frame(req.frame)
        if not frame.loads:
            return editor_forces_dict(None, reason="this frame has no load cases ([[frame.load]] in the project file)")
        try:
            result = analyse_frame(frame, session.project.strength)
        except (InputError, NumericalError) as exc:
            return editor_forces_dict(None, reason=str(exc))
        return editor_forces_dict(result)

    return _json(await asyncio.to_thread(work))


async def save(request: Request) -> Response:
    """``POST /api/save``: write the edits back to the project file, if it is still the version edited."""
    req = save_request(await _body(request), versioned=True)
    session = _session(request)
    saved = await asyncio.to_thread(session.save, req.frames, version=req.version)
    return _json(
        {
            "saved": saved.path.name,
            "version": saved.version,
            "backup": saved.backup.name if saved.backup else None,
            "project": editor_project_dict(saved.project, version=saved.version, file_name=session.file_name),
        }
    )


async def save_copy(request: Request) -> Response:
    """``POST /api/save-copy``: write the edits as a new file in the output folder."""
    req = save_request(await _body(request), versioned=False)
    session = _session(request)
    saved = await asyncio.to_thread(session.save_copy, req.frames)
    return _json({"saved": saved.path.name, "folder": str(session.paths.out), "href": _href(session, saved.path)})


def _href(session: EditorSession, path: Any) -> str:
    return f"/out/{session.file_index(path)}"


def _started(job: Job) -> Response:
    return _json({"job": job.id, "kind": job.kind.value, "events": f"/api/jobs/{job.id}/events"}, 202)


def _busy() -> Response:
    return _json(error_dict("busy", "a job is already running; wait for it or cancel it first"), 409)


async def _start(request: Request, kind: JobKind) -> Response:
    data = await _body(request)
    req = job_request(data, repair=kind is JobKind.REPAIR, allow=kind is not JobKind.COMPARE)
    session = _session(request)
    edited = session.apply([req.frame])
    frame = edited.frame(req.frame.name)
    without: tuple[Any, ...] = ()
    if kind is JobKind.REPAIR:
        try:
            without = parse_member_refs(frame, [r.label for r in req.without])
        except InputError as exc:
            return _json(error_dict("invalid", "; ".join(exc.problems), field="without"), 422)
    spec = JobSpec(
        kind=kind,
        project=edited,
        frame=frame.name,
        options=req.options,
        without=without,
        keep_clear=req.keep_clear,
        stem=session.paths.project.stem,
    )
    job = await asyncio.to_thread(_board(request).start, spec)
    return _busy() if job is None else _started(job)


async def optimize(request: Request) -> Response:
    """``POST /api/optimize``: start the optimizer on one edited frame (a job)."""
    return await _start(request, JobKind.OPTIMIZE)


async def repair(request: Request) -> Response:
    """``POST /api/repair``: start a repair after taking out the selected members (a job)."""
    return await _start(request, JobKind.REPAIR)


async def compare(request: Request) -> Response:
    """``POST /api/compare``: start the strategy comparison of one edited frame (a job)."""
    return await _start(request, JobKind.COMPARE)


def _job(request: Request) -> Job | None:
    job_id = request.path_params["job"]
    return _board(request).get(job_id) if _JOB_ID.match(job_id) else None


def _no_job() -> Response:
    return _json(error_dict("not-found", "no such job (it was never started here, or is long finished)"), 404)


async def job_state(request: Request) -> Response:
    """``GET /api/jobs/{job}``: a job's state and every event so far."""
    job = _job(request)
    if job is None:
        return _no_job()
    events, _ = job.events()
    return _json({"job": job.id, "kind": job.kind.value, "state": job.state.value, "events": events})


async def job_events(request: Request) -> Response:
    """``GET /api/jobs/{job}/events``: the job's events as a server-sent event stream, ending with the job."""
    job = _job(request)
    if job is None:
        return _no_job()

    async def stream() -> AsyncIterator[bytes]:
        seen = 0
        quiet = 0.0
        while True:
            events, finished = job.events(seen)
            for event in events:
                yield f"data: {json.dumps(event)}\n\n".encode()
            seen += len(events)
            if finished and not events:
                break
            quiet = 0.0 if events else quiet + STREAM_POLL
            if quiet >= STREAM_HEARTBEAT:
                quiet = 0.0
                yield b": still working\n\n"
            await asyncio.sleep(STREAM_POLL)

    return StreamingResponse(stream(), media_type="text/event-stream", headers={"X-Accel-Buffering": "no"})


async def job_cancel(request: Request) -> Response:
    """``POST /api/jobs/{job}/cancel``: stop a running job at once."""
    job = _job(request)
    if job is None:
        return _no_job()
    stopped = await asyncio.to_thread(job.cancel)
    return _json({"job": job.id, "cancelled": stopped, "state": job.state.value})


async def output(request: Request) -> Response:
    """``GET /out/{n}``: a file this session wrote into its output folder, by its number (never by a path)."""
    session = _session(request)
    path = session.written(request.path_params["n"])
    if path is None:
        return _json(error_dict("not-found", "no such output file"), 404)
    kind = OUTPUT_TYPES.get(path.suffix.lower(), "application/octet-stream")
    headers = {"Content-Security-Policy": REPORT_POLICY}
    if not kind.startswith("text/html"):
        headers["Content-Disposition"] = f'attachment; filename="{path.name}"'
    data = await asyncio.to_thread(path.read_bytes)
    return Response(data, media_type=kind, headers=headers)


def _finisher(session: EditorSession) -> Callable[[JobKind, dict[str, Any]], dict[str, Any]]:
    def finish(kind: JobKind, payload: dict[str, Any]) -> dict[str, Any]:
        if kind is not JobKind.COMPARE:
            return payload
        written = session.write_outputs(compare_files(payload))
        links = [{"name": p.name, "href": _href(session, p)} for p in written]
        return {**{k: v for k, v in payload.items() if k != "files"}, "files": links, "folder": str(session.paths.out)}

    return finish


async def _not_found(request: Request, exc: Exception) -> Response:
    return _json(error_dict("not-found", f"no such page or endpoint: {request.url.path}"), 404)


async def _not_allowed(request: Request, exc: Exception) -> Response:
    return _json(error_dict("method", f"{request.method} is not used at {request.url.path}"), 405)


def create_app(session: EditorSession, rules: GuardRules, *, board: JobBoard | None = None) -> GuardMiddleware:
    """The editor application for one session, behind its guard.

    Args:
        session: The project being edited.
        rules: Token, bound address and body limit.
        board: Where jobs run (default: a new board of worker processes).

    Returns:
        The ASGI application to serve.
    """
    jobs = board if board is not None else JobBoard(_finisher(session))

    @contextlib.asynccontextmanager
    async def lifespan(app: Starlette) -> AsyncIterator[None]:
        yield
        await asyncio.to_thread(jobs.shutdown)

    def route(path: str, handler: Handler, method: str) -> Route:
        return Route(path, answer_errors(handler), methods=[method])

    routes = [
        route("/", page, "GET"),
        route("/static/{name}", asset, "GET"),
        route("/api/project", project, "GET"),
        route("/api/check", check, "POST"),
        route("/api/forces", forces, "POST"),
        route("/api/save", save, "POST"),
        route("/api/save-copy", save_copy, "POST"),
        route("/api/optimize", optimize, "POST"),
        route("/api/repair", repair, "POST"),
        route("/api/compare", compare, "POST"),
        route("/api/jobs/{job}", job_state, "GET"),
        route("/api/jobs/{job}/events", job_events, "GET"),
        route("/api/jobs/{job}/cancel", job_cancel, "POST"),
        route("/out/{n:int}", output, "GET"),
    ]
    app = Starlette(routes=routes, lifespan=lifespan, exception_handlers={404: _not_found, 405: _not_allowed})
    app.state.session = session
    app.state.rules = rules
    app.state.board = jobs
    return GuardMiddleware(app, rules)


def finisher_for(session: EditorSession) -> Callable[[JobKind, dict[str, Any]], dict[str, Any]]:
    """How a session takes a finished job's result (a compare's files are written into its output folder)."""
    return _finisher(session)
