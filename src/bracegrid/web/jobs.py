"""Long library jobs of the editor (optimize, repair, compare), each in its own worker process.

A job runs in a child process so that cancelling it is immediate and certain: the process is
terminated, whatever the solver is doing. The child sends JSON-ready events through a queue
(progress with incumbent, bound and gap; then the result or the error in words); a thread in
the server collects them into the job's event list, which the page reads as a stream.
"""

from __future__ import annotations

import multiprocessing
import queue
import secrets
import threading
import time
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from enum import Enum
from multiprocessing.process import BaseProcess
from typing import Any

from bracegrid.compare import StrategyKey, compare_project
from bracegrid.errors import BraceGridError, InfeasibleError, SolverLimitError
from bracegrid.io import OutputFile
from bracegrid.model import Member, Project
from bracegrid.optimize import ProgressEvent, SolveOptions, optimize_frame, repair_frame
from bracegrid.outputs import compare_dict, render_compare_outputs
from bracegrid.outputs.shapes import compare_progress_dict, error_dict, progress_dict, proposal_dict

#: Jobs that may run at once (each may use up to two CP-SAT workers; the machine has two cores).
MAX_RUNNING = 1
#: Finished jobs remembered for their streams (older ones are forgotten).
MAX_KEPT = 20
#: Seconds between looks at a job's queue and process.
POLL_SECONDS = 0.05


class JobKind(Enum):
    """What a job does."""

    OPTIMIZE = "optimize"
    REPAIR = "repair"
    COMPARE = "compare"


class JobState(Enum):
    """Where a job stands."""

    RUNNING = "running"
    DONE = "done"
    FAILED = "failed"
    CANCELLED = "cancelled"


@dataclass(frozen=True, slots=True)
class JobSpec:
    """Everything a worker process needs (all of it picklable).

    Attributes:
        kind: What to do.
        project: The project with the edited frame in place.
        frame: The frame's name.
        options: Solver options.
        without: Members a repair takes out.
        keep_clear: A repair leaves their bays clear.
        stem: Base of the names of the files a compare writes.
    """

    kind: JobKind
    project: Project
    frame: str
    options: SolveOptions
    without: tuple[Member, ...] = ()
    keep_clear: bool = False
    stem: str = "project"


Send = Callable[[tuple[str, Any]], None]


def _failure(exc: BaseException) -> dict[str, Any]:
    if isinstance(exc, InfeasibleError):
        return error_dict("infeasible", str(exc), reasons=list(exc.reasons))
    if isinstance(exc, SolverLimitError):
        return error_dict("solver-limit", f"{exc}; give it more seconds")
    if isinstance(exc, BraceGridError):
        return error_dict("invalid", str(exc))
    return error_dict("internal", f"internal error ({type(exc).__name__}: {exc}); this is a bracegrid bug")


def execute(spec: JobSpec, send: Send) -> None:
    """Run one job, sending ``("progress", dict)`` events and then ``("done", dict)`` or ``("failed", dict)``.

    The done payload of a compare holds ``"files"``: the rendered output files as ``(name, bytes)``
    pairs, for the server to write (the worker writes nothing).
    """
    try:
        frame = spec.project.frame(spec.frame)
        costs = spec.project.costs

        def progress(event: ProgressEvent) -> None:
            send(("progress", progress_dict(event)))

        if spec.kind is JobKind.OPTIMIZE:
            strength = spec.project.strength
            sol = optimize_frame(frame, costs, options=spec.options, on_progress=progress, strength=strength)
            send(("done", proposal_dict(frame, sol)))
        elif spec.kind is JobKind.REPAIR:
            sol = repair_frame(
                frame, costs, spec.without, keep_clear=spec.keep_clear, options=spec.options, on_progress=progress,
                strength=spec.project.strength,
            )  # fmt: skip
            send(("done", proposal_dict(frame, sol)))
        else:
            steps = len(StrategyKey)
            done = [0]

            def step(name: str, key: StrategyKey) -> None:
                done[0] += 1
                send(("progress", compare_progress_dict(name, key, done[0], steps)))

            comparison = compare_project(spec.project, options=spec.options, frames=(frame,), on_progress=step)
            files = render_compare_outputs(comparison, stem=spec.stem, time_limit=spec.options.time_limit)
            send(("done", {**compare_dict(comparison), "files": [(f.name, f.data) for f in files]}))
    except Exception as exc:
        send(("failed", _failure(exc)))


def _worker(spec: JobSpec, out: Any) -> None:  # pragma: no cover - runs in the child process
    execute(spec, out.put)


Finish = Callable[[JobKind, dict[str, Any]], dict[str, Any]]


class Job:
    """One job: its process, its events so far and its state."""

    def __init__(self, kind: JobKind, process: BaseProcess, channel: Any) -> None:
        self.id = secrets.token_hex(8)
        self.kind = kind
        self.started = time.monotonic()
        self._process = process
        self._channel = channel
        self._lock = threading.Lock()
        self._events: list[dict[str, Any]] = []
        self._state = JobState.RUNNING

    @property
    def state(self) -> JobState:
        """Where the job stands."""
        with self._lock:
            return self._state

    def events(self, start: int = 0) -> tuple[list[dict[str, Any]], bool]:
        """Events from number ``start`` on, and whether the job has finished (no more will come)."""
        with self._lock:
            return self._events[start:], self._state is not JobState.RUNNING

    def _add(self, event: dict[str, Any], state: JobState | None = None) -> bool:
        with self._lock:
            if self._state is not JobState.RUNNING:
                return False
            self._events.append({"seq": len(self._events), **event})
            if state is not None:
                self._state = state
            return True

    def cancel(self) -> bool:
        """Stop the worker process at once; False if the job had already finished."""
        with self._lock:
            if self._state is not JobState.RUNNING:
                return False
        self._process.terminate()
        self._process.join(timeout=5)
        if self._process.is_alive():  # pragma: no cover - terminate() is answered at once on POSIX
            self._process.kill()
            self._process.join(timeout=5)
        return self._add(
            {"type": "cancelled", "seconds": round(time.monotonic() - self.started, 3)}, JobState.CANCELLED
        )

    def follow(self, finish: Finish) -> None:
        """Collect the worker's events until it ends (run in a thread of its own)."""
        while True:
            try:
                tag, payload = self._channel.get(timeout=POLL_SECONDS)
            except queue.Empty:
                if self._process.is_alive():
                    continue
                try:  # the process ended: take whatever it sent last
                    tag, payload = self._channel.get(timeout=POLL_SECONDS)
                except queue.Empty:
                    if self.state is JobState.RUNNING:
                        why = f"the worker process ended without an answer (exit code {self._process.exitcode})"
                        self._add({"type": "failed", **error_dict("internal", why)}, JobState.FAILED)
                    break
            except (EOFError, OSError):  # the queue closed under a cancel
                break
            if tag == "progress":
                self._add({"type": "progress", **payload})
                continue
            if tag == "done":
                try:
                    result = finish(self.kind, payload)
                except Exception as exc:
                    self._add({"type": "failed", **_failure(exc)}, JobState.FAILED)
                else:
                    self._add(
                        {"type": "done", "seconds": round(time.monotonic() - self.started, 3), **result}, JobState.DONE
                    )
            else:
                self._add({"type": "failed", **payload}, JobState.FAILED)
            break
        self._process.join(timeout=5)


class JobBoard:
    """The jobs of one server: start, look up, cancel, and stop them all on shutdown."""

    def __init__(self, finish: Finish, *, max_running: int = MAX_RUNNING) -> None:
        self._finish = finish
        self._max_running = max_running
        self._lock = threading.Lock()
        self._jobs: dict[str, Job] = {}
        self._context = multiprocessing.get_context("spawn")

    def running(self) -> Sequence[Job]:
        """Jobs still running."""
        with self._lock:
            return [j for j in self._jobs.values() if j.state is JobState.RUNNING]

    def start(self, spec: JobSpec) -> Job | None:
        """Start a job in a new worker process; None when as many jobs as allowed are running."""
        with self._lock:
            if sum(1 for j in self._jobs.values() if j.state is JobState.RUNNING) >= self._max_running:
                return None
            channel = self._context.Queue()
            process = self._context.Process(target=_worker, args=(spec, channel), daemon=True)
            process.start()
            job = Job(spec.kind, process, channel)
            self._jobs[job.id] = job
            finished = [k for k, j in self._jobs.items() if j.state is not JobState.RUNNING]
            for key in finished[: max(0, len(self._jobs) - MAX_KEPT)]:
                del self._jobs[key]
        threading.Thread(target=job.follow, args=(self._finish,), name=f"job-{job.id}", daemon=True).start()
        return job

    def get(self, job_id: str) -> Job | None:
        """The job with this id, if this server started it and still remembers it."""
        with self._lock:
            return self._jobs.get(job_id)

    def shutdown(self) -> None:
        """Cancel every running job (the server is stopping)."""
        for job in self.running():
            job.cancel()


def compare_files(payload: dict[str, Any]) -> tuple[OutputFile, ...]:
    """The rendered files a compare job sent back."""
    return tuple(OutputFile(name, data) for name, data in payload.get("files", []))
