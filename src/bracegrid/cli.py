"""Command-line shell over the library. The only module that prints.

Exit codes (:data:`EXIT_CODES`, printed by ``--help`` and listed in README.md): 0 success
(stable; for ``forces``: within capacity), 1 not stable (for ``forces``: over capacity or a
mechanism), 2 bad input (nothing written), 3 proven infeasible, 4 solver limit reached with no
layout, 70 internal error, 74 the results could not be written to standard output, 130
interrupted (SIGINT or SIGTERM; temporary files removed, earlier outputs as they were).

Results are gathered in memory and written to standard output once the command is done, so a
reader that stops early (``| head``) or a failing stream never changes the verdict's exit code
and never leaves a traceback.
"""

from __future__ import annotations

import argparse
import contextlib
import io
import json
import os
import signal
import sys
import threading
import time
import webbrowser
from collections.abc import Callable, Iterator, Sequence
from datetime import date
from pathlib import Path
from typing import Any, TextIO, TypeVar

from rich.console import Console
from rich.progress import Progress

import bracegrid.web as web  # web.create_app loads Starlette on first use only
from bracegrid._version import __version__
from bracegrid.analysis import (
    CAUTION,
    AdditionAdvice,
    RobustnessOptions,
    project_robustness,
    rank_additions,
    remove_members,
)
from bracegrid.compare import COMPARE_SAMPLES, StrategyKey, StrategyRobustness, compare_project, compare_robustness
from bracegrid.errors import BraceGridError, ExportError, InfeasibleError, InputError, SolverLimitError
from bracegrid.io import (
    GRID_BAR_REF_HELP,
    MEMBER_REF_HELP,
    MOVING,
    OutputFile,
    check_out_file,
    check_out_folder,
    is_grid_bar_ref,
    load_project,
    parse_grid_bar_refs,
    parse_member_refs,
    parse_project,
    read_project_text,
    remove_temporaries,
    save_project,
    write_outputs,
)
from bracegrid.mechanics import FrameForces, analyse_frame, check_frame_any, without_bars
from bracegrid.model import Frame, Member, MemberKind, Project
from bracegrid.optimize import ProgressEvent, SolveOptions, optimize_project
from bracegrid.outputs import (
    PlotFormat,
    check_dict,
    check_drawable,
    compare_dict,
    force_summary_lines,
    forces_dict,
    optimize_dict,
    parse_formats,
    progress_line,
    render_check,
    render_compare,
    render_compare_outputs,
    render_force_files,
    render_forces,
    render_optimize,
    render_outputs,
    render_robustness,
    render_robustness_plot,
    robustness_dict,
    robustness_panels,
    visible_text,
)
from bracegrid.web import (
    EditorPaths,
    EditorSession,
    GuardRules,
    bind_socket,
    bound_port,
    check_bind_address,
    new_token,
    serve,
)

_T = TypeVar("_T")

EXIT_OK = 0
EXIT_UNSTABLE = 1
EXIT_INPUT = 2
EXIT_INFEASIBLE = 3
EXIT_LIMIT = 4
EXIT_INTERNAL = 70
EXIT_IO = 74  # sysexits.h EX_IOERR
EXIT_INTERRUPTED = 130  # 128 + SIGINT, as shells report it

#: Every exit code and its meaning (``--help`` and README.md print the same list).
EXIT_CODES: tuple[tuple[int, str], ...] = (
    (EXIT_OK, "stable / done (forces: every member within capacity)"),
    (EXIT_UNSTABLE, "not stable (forces: over capacity, or a load case finds a mechanism)"),
    (EXIT_INPUT, "bad input or an output that cannot be written; nothing written"),
    (EXIT_INFEASIBLE, "proven infeasible, with the reason"),
    (EXIT_LIMIT, "solver limit reached before any layout"),
    (EXIT_INTERNAL, "internal error (a bracegrid bug)"),
    (EXIT_IO, "the results could not be written to standard output"),
    (EXIT_INTERRUPTED, "interrupted (Ctrl-C or SIGTERM); temporary files removed"),
)

#: CP-SAT's random_seed is a 32-bit signed integer; numpy seeds must not be negative.
SEED_MAX = 2**31 - 1

#: Seconds the main thread gets to stop by itself after a signal before the process ends anyway
#: (it may be inside a C++ solve that does not return to Python until its own time is up).
_GRACE_S = 1.5

#: Where outputs go without --out: a folder in the current directory, never beside the input file.
DEFAULT_OUT = Path("out")

#: How each error is labelled on stderr and which exit code it gives (first match wins).
_EXIT_FOR: tuple[tuple[type[BraceGridError], str, int], ...] = (
    (InfeasibleError, "infeasible", EXIT_INFEASIBLE),
    (SolverLimitError, "solver limit", EXIT_LIMIT),
    (BraceGridError, "error", EXIT_INPUT),  # InputError, ExportError
)


def _flagged(flag: str, call: Callable[[], _T]) -> _T:
    """Run a library call whose messages name a value, and put the option it came from in front."""
    try:
        return call()
    except InputError as exc:
        raise InputError([f"{flag} {p}" for p in exc.problems], source=exc.source) from None
    except ExportError as exc:
        msg = f"{flag} {exc}"
        raise ExportError(msg) from None


def _frames(project: Project, name: str | None) -> tuple[Frame, ...]:
    if name is None:
        return project.frames
    try:
        return (project.frame(name),)
    except KeyError:
        names = ", ".join(repr(f.name) for f in project.frames)
        msg = f"--frame {name!r}: no frame of that name; the project has {names}"
        raise InputError(msg) from None


def _without_frame(project: Project, args: argparse.Namespace) -> Frame | None:
    """The single frame --without refers to, or None when --without is not used."""
    if not args.without:
        return None
    if args.frame is None and len(project.frames) > 1:
        msg = "--without needs --frame NAME when the project has more than one frame"
        raise InputError(msg)
    return _frames(project, args.frame)[0]


def _split_without(frame: Frame, refs: Sequence[str]) -> tuple[Frame, tuple[Member, ...]]:
    """The frame less the grid bars named in ``refs`` (``ledger3c4``), and the members named (``r2c3``)."""
    bars = parse_grid_bar_refs(frame, [r for r in refs if is_grid_bar_ref(r)])
    shaped = without_bars(frame, bars)
    return shaped, parse_member_refs(shaped, [r for r in refs if not is_grid_bar_ref(r)])


def _emit(out: TextIO, payload: dict[str, Any]) -> None:
    out.write(json.dumps(payload, indent=2) + "\n")


def _cmd_check(args: argparse.Namespace, out: TextIO) -> int:
    project = load_project(args.project)
    original = _without_frame(project, args)
    target, taken = _flagged("--without", lambda: _split_without(original, args.without)) if original else (None, ())
    chosen = tuple(target if target is not None and f is original else f for f in _frames(project, args.frame))
    verdicts = [check_frame_any(f, without=taken if f is target else ()) for f in chosen]
    forces = {
        f.name: analyse_frame(f, project.strength, members=remove_members(f, taken if f is target else ()))
        for f in chosen
        if f.loads
    }
    additions: dict[str, AdditionAdvice] = {
        f.name: rank_additions(f, project.costs, members=remove_members(f, taken) if f is target else None)
        for f, v in zip(chosen, verdicts, strict=True)
        if not v.stable and f.is_complete
    }
    if args.json:
        _emit(out, check_dict(verdicts, forces=forces, additions=additions))
    else:
        notes = force_summary_lines(list(forces.values()))
        out.write(render_check(project.name, verdicts, notes=notes, additions=additions))
        if target is not None and not all(v.stable for v in verdicts):
            refs = " ".join(args.without)
            out.write(
                f"Cheapest repair: bracegrid optimize {args.project} --frame {target.name!r} --without {refs} "
                "[--keep-clear]\n"
            )
    return EXIT_OK if all(v.stable for v in verdicts) else EXIT_UNSTABLE


def _cmd_draw(args: argparse.Namespace, out: TextIO) -> int:
    formats = _flagged("--format", lambda: parse_formats(args.format))
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    source = Path(args.project)
    folder = _flagged("--out", lambda: check_out_folder(DEFAULT_OUT if args.out is None else args.out))
    sheets, files = render_outputs(
        project, stem=source.stem, frames=frames, formats=formats, per_frame=args.per_frame, when=date.today()
    )
    written = write_outputs(folder, files)
    for sheet in sheets:
        for fs in sheet.frames:
            v = fs.verdict
            state = "stable" if v.stable else f"NOT STABLE ({v.racking_modes} racking modes, shaded on the sheet)"
            out.write(f"{fs.frame.name}: {state}; {len(fs.frame.members)} members\n")
        out.write(f"sheet {sheet.plan.sheet} at 1:{sheet.plan.scale}\n")
    for path in written:
        out.write(f"wrote {path}\n")
    out.write(f"Caution: {CAUTION}\n")
    return EXIT_OK


def _cmd_forces(args: argparse.Namespace, out: TextIO) -> int:
    formats = _flagged("--format", lambda: parse_formats(args.format))
    project = load_project(args.project)
    frames = [f for f in _frames(project, args.frame) if f.loads]
    if args.case is not None:
        frames = [f for f in frames if any(c.name == args.case for c in f.loads)]
    if not frames:
        where = f"frame {args.frame!r}" if args.frame else "the project"
        what = f"no load case named {args.case!r}" if args.case else "no load cases"
        msg = (
            f"{args.project}: {where} has {what}; add [[frame.load]] tables with name and horizontal "
            "(see docs/project-file.md)"
        )
        raise InputError(msg)
    folder = _flagged("--out", lambda: check_out_folder(args.out)) if args.out is not None else None
    cases = [args.case] if args.case is not None else None
    results: list[FrameForces] = [analyse_frame(f, project.strength, cases=cases) for f in frames]
    written: tuple[Path, ...] = ()
    if folder is not None:
        _, files = render_force_files(
            project, results, stem=Path(args.project).stem, formats=formats, when=date.today()
        )
        written = write_outputs(folder, files)
    if args.json:
        payload = forces_dict(results)
        payload["files"] = [str(p) for p in written]
        _emit(out, payload)
    else:
        out.write(render_forces(project.name, results))
        for path in written:
            out.write(f"wrote {path}\n")
    return EXIT_OK if all(r.ok for r in results) else EXIT_UNSTABLE


def _parse_allow(text: str | None) -> frozenset[MemberKind] | None:
    if text is None:
        return None
    names = [t.strip().lower() for t in text.split(",") if t.strip()]
    kinds = {k.value: k for k in MemberKind}
    bad = [n for n in names if n not in kinds]
    if bad or not names:
        msg = f"--allow {text!r}: expected a comma list of {', '.join(kinds)} (e.g. --allow brace,tie)"
        raise InputError(msg)
    return frozenset(kinds[n] for n in names)


def _add_stability_only(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--stability-only", action="store_true",
        help="ignore load cases, capacities and spreading rules: the cheapest stable layout (the price of "
        "stability alone); the layouts are still checked against the loads and the result says so",
    )  # fmt: skip


def _cmd_optimize(args: argparse.Namespace, out: TextIO) -> int:
    problems = _solver_problems(args)
    if args.redundancy is not None and args.redundancy < 0:
        problems.append(f"--redundancy {args.redundancy}: give 0 (stable) or more (members that may be lost)")
    if args.keep_clear and not args.without:
        problems.append("--keep-clear only applies with --without MEMBER ...")
    if problems:
        raise InputError(problems)
    started = time.monotonic()
    deadline = [started + args.time_limit * _LIMIT_SLACK]
    if args.whole_run_limit:  # the script: --time-limit bounds the whole run, reading and set-up included
        _arm_deadline(deadline, args.time_limit)
    original = read_project_text(args.project)
    project = parse_project(original, source=args.project)
    write_to = _flagged("--write", lambda: check_out_file(args.write)) if args.write is not None else None
    frames = _frames(project, args.frame)
    deadline[0] = started + args.time_limit * len(frames) * _LIMIT_SLACK  # S per frame
    target = _without_frame(project, args)
    without = (
        {target.name: _flagged("--without", lambda: parse_member_refs(target, args.without))}
        if target is not None
        else {}
    )
    # Reading a huge file already spent part of the limit: the search gets what is left of it.
    spent = (time.monotonic() - started) / len(frames) if args.whole_run_limit else 0.0
    options = SolveOptions(
        time_limit=max(0.1 * args.time_limit, args.time_limit - spent),
        workers=args.workers,
        seed=args.seed,
        allow=_parse_allow(args.allow),
        redundancy=args.redundancy,
        stability_only=args.stability_only,
    )
    live = sys.stderr if (not args.json and sys.stderr.isatty()) else None

    def show(event: ProgressEvent) -> None:
        if live is not None:
            live.write("\r\033[K" + progress_line(event))
            live.flush()

    solution = optimize_project(
        project,
        options=options,
        frame_names=[f.name for f in frames],
        on_progress=show,
        without=without,
        keep_clear=args.keep_clear,
    )
    if live is not None:
        live.write("\r\033[K")
        live.flush()
    if write_to is not None:
        save_project(solution.project, write_to, original=original)  # the user's comments and layout kept
    if args.json:
        _emit(out, optimize_dict(solution))
    else:
        out.write(render_optimize(project.name, solution))
        if write_to is not None:
            out.write(f"Wrote {write_to}\n")
    return EXIT_OK


def _solver_problems(args: argparse.Namespace) -> list[str]:
    """What is wrong with --time-limit and --workers (shared by optimize and compare)."""
    problems = _seed_problems(args)
    if not args.time_limit > 0:
        problems.append(f"--time-limit {args.time_limit}: give a positive number of seconds")
    if not 1 <= args.workers <= _MAX_WORKERS:
        problems.append(f"--workers {args.workers}: give at least 1 (at most {_MAX_WORKERS})")
    return problems


_MAX_WORKERS = 256

#: The whole run of ``optimize`` (reading, set-up, warm starts, solves, re-checks, writing) may take
#: this factor of ``--time-limit`` per frame (the 10% is for the work after the search).
_LIMIT_SLACK = 1.1


def _arm_deadline(deadline: list[float], limit: float) -> None:
    """End the process with exit 4 if the run is not done by ``deadline[0]`` (monotonic; it may be moved later).

    The library's search honours the limit on its own; the timer bounds what the search does not
    see (reading a huge frame, its bay tables, warm starts, the final re-check). It waits for any
    set of files being moved into place (:data:`~bracegrid.io.MOVING`) and removes temporary files,
    so what is on disk is the old set or the new one.
    """

    def expire() -> None:
        while time.monotonic() < deadline[0]:
            time.sleep(min(0.05, max(0.0, deadline[0] - time.monotonic())))
        with MOVING:
            remove_temporaries()
            _say(
                sys.stderr,
                f"solver limit: no layout within the limit ({limit:g} s per frame for the whole run, set-up "
                "included); give it more seconds with --time-limit",
            )
            os._exit(EXIT_LIMIT)

    threading.Thread(target=expire, name="time-limit", daemon=True).start()


_MAX_SAMPLES = 100_000_000


def _seed_problems(args: argparse.Namespace) -> list[str]:
    if not 0 <= args.seed <= SEED_MAX:
        return [f"--seed {args.seed}: give a whole number from 0 to {SEED_MAX}"]
    return []


def _add_solver_options(p: argparse.ArgumentParser, *, per: str, whole: str) -> None:
    p.add_argument(
        "--time-limit", type=float, default=60.0, metavar="S",
        help=f"S seconds for each {per} (default 60); {whole}",
    )  # fmt: skip
    p.add_argument("--workers", type=int, default=2, metavar="N", help="CP-SAT worker threads (default 2)")
    p.add_argument("--seed", type=int, default=0, metavar="N", help="CP-SAT random seed (default 0)")


def _progress() -> Progress:
    """A progress bar on stderr, shown only when stderr is a terminal; it vanishes when done."""
    console = Console(stderr=True)
    return Progress(console=console, transient=True, disable=not console.is_terminal)


def _robustness_problems(args: argparse.Namespace) -> list[str]:
    problems = _seed_problems(args)
    if args.max_lost < 1:
        problems.append(f"--max-lost {args.max_lost}: give at least 1 member")
    if not 1 <= args.samples <= _MAX_SAMPLES:
        problems.append(f"--samples {args.samples}: give at least 1 Monte Carlo sample (at most {_MAX_SAMPLES})")
    if not 1 <= args.workers <= _MAX_WORKERS:
        problems.append(f"--workers {args.workers}: give at least 1 process (at most {_MAX_WORKERS})")
    return problems


def _cmd_robustness(args: argparse.Namespace, out: TextIO) -> int:
    problems = _robustness_problems(args)
    if problems:
        raise InputError(problems)
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    source = Path(args.project)
    folder = _flagged("--out", lambda: check_out_folder(DEFAULT_OUT if args.out is None else args.out))
    options = RobustnessOptions(max_lost=args.max_lost, samples=args.samples, seed=args.seed, workers=args.workers)
    with _progress() as progress:
        task = progress.add_task("robustness", total=None)

        def step(frame_name: str, done: int, total: int) -> None:
            progress.update(task, description=f"{frame_name}: sampling", completed=done, total=total)

        results = project_robustness(project, frames=frames, options=options, on_progress=step)
    panels = robustness_panels(results, title=f"{project.name}: members lost at random")
    files = [
        OutputFile(f"{source.stem}-robustness.{fmt.value}", render_robustness_plot(panels, fmt)) for fmt in PlotFormat
    ]
    written = write_outputs(folder, files)
    if args.json:
        payload = robustness_dict(results)
        payload["files"] = [str(p) for p in written]
        _emit(out, payload)
    else:
        out.write(render_robustness(project.name, results))
        for path in written:
            out.write(f"wrote {path}\n")
    return EXIT_OK if all(r.stable for r in results) else EXIT_UNSTABLE


def _cmd_compare(args: argparse.Namespace, out: TextIO) -> int:
    problems = _solver_problems(args)
    if not 0 <= args.samples <= _MAX_SAMPLES:
        problems.append(f"--samples {args.samples}: give 0 (no robustness curves) to {_MAX_SAMPLES}")
    if problems:
        raise InputError(problems)
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    source = Path(args.project)
    folder = _flagged(
        "--out", lambda: check_out_folder(DEFAULT_OUT / f"{source.stem}-compare" if args.out is None else args.out)
    )
    check_drawable(frames, per_frame=False)  # each strategy's DXF shows every frame: refuse before solving
    options = SolveOptions(
        time_limit=args.time_limit, workers=args.workers, seed=args.seed, stability_only=args.stability_only
    )
    total = len(frames) * len(StrategyKey)
    with _progress() as progress:
        task = progress.add_task("comparing", total=total)

        def step(frame_name: str, key: StrategyKey) -> None:
            progress.update(task, description=f"{frame_name}: {key.value}")
            progress.advance(task)

        comparison = compare_project(project, options=options, frames=frames, bare=args.bare, on_progress=step)
        curves: tuple[StrategyRobustness, ...] = ()
        if args.samples:
            robust = RobustnessOptions(samples=args.samples, seed=args.seed, rank_members=False)
            progress.update(task, completed=0, total=total)

            def curve_step(frame_name: str, key: StrategyKey) -> None:
                progress.update(task, description=f"{frame_name}: {key.value} robustness")
                progress.advance(task)

            curves = compare_robustness(comparison, options=robust, on_progress=curve_step)
    files = render_compare_outputs(
        comparison, stem=source.stem, when=date.today(), time_limit=args.time_limit, robustness=curves
    )
    written = write_outputs(folder, files)
    if args.json:
        payload = compare_dict(comparison)
        payload["files"] = [str(p) for p in written]
        _emit(out, payload)
    else:
        out.write(render_compare(comparison))
        for path in written:
            out.write(f"wrote {path}\n")
    return EXIT_OK


def _cmd_edit(args: argparse.Namespace, out: TextIO) -> int:
    host, loopback = _flagged("--bind", lambda: check_bind_address(args.bind))
    if args.out == "":
        msg = "--out empty folder name; give a folder path (e.g. out/)"
        raise InputError(msg)
    folder = DEFAULT_OUT / f"{Path(args.project).stem}-edit" if args.out is None else args.out
    paths = _flagged("--out", lambda: EditorPaths.beside(args.project, out=folder))
    session = EditorSession(paths)  # reads and validates the project: bad input stops here
    sock = _flagged("--port", lambda: bind_socket(host, args.port))
    rules = GuardRules.bound(host, bound_port(sock), new_token())
    url = rules.url()
    out.write(f"{url}\n")
    out.flush()
    if not loopback:
        sys.stderr.write(
            f"warning: the editor listens on {host}, not only on this computer: anyone who can reach that "
            "address and learns the URL can read and change the project. Use it only on a network you trust.\n"
        )
    sys.stderr.write(f"editing {paths.project} (backup {paths.backup.name}, outputs in {paths.out}); Ctrl-C stops\n")
    sys.stderr.flush()
    if not args.no_browser:
        webbrowser.open(url)
    try:
        serve(web.create_app(session, rules), sock)
    except KeyboardInterrupt:  # a second Ctrl-C, or the signal raised again after a clean shutdown
        pass
    finally:
        sock.close()
    out.write("stopped\n")
    return EXIT_OK


def _add_common(p: argparse.ArgumentParser) -> None:
    p.add_argument("project", help="project file (TOML)")
    p.add_argument("--frame", metavar="NAME", help="only this frame (default: every frame)")
    p.add_argument("--json", action="store_true", help="print one JSON object instead of tables")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every sub-command."""
    parser = argparse.ArgumentParser(
        prog="bracegrid",
        description="Lay out and check diagonal bracing of rectangular pin-jointed frames.",
        epilog="Outputs go where --out or --write says; without them, into out/ in the current directory "
        "(never beside the project file). Exit codes: " + "; ".join(f"{c} {what}" for c, what in EXIT_CODES) + ".",
    )
    parser.add_argument("--version", action="version", version=f"bracegrid {__version__}")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")

    check = sub.add_parser(
        "check",
        help="is every frame free of mechanisms? loose parts, racking sense, critical members",
        description="Check every frame's layout with the directed-cycle criterion.",
    )
    _add_common(check)
    check.add_argument(
        "--without", nargs="+", default=[], metavar="MEMBER",
        help=f"check as if these members or grid bars were taken out (needs --frame if several frames): "
        f"{MEMBER_REF_HELP} Or {GRID_BAR_REF_HELP}.",
    )  # fmt: skip
    check.set_defaults(handler=_cmd_check)

    draw = sub.add_parser(
        "draw",
        help="marked-up DXF drawing, PNG/SVG/PDF preview and bill of materials (CSV)",
        description="Draw every frame as it stands (existing and proposed members) on one sheet: grid, "
        "dimension chains, braces and ties with the racking sense each tie resists, blocked bays, "
        "critical members, loose parts, legend, bill of materials and title block.",
    )
    draw.add_argument("project", help="project file (TOML)")
    draw.add_argument("--frame", metavar="NAME", help="only this frame (default: every frame)")
    draw.add_argument(
        "--out", metavar="DIR",
        help="folder for the files (default: out/ in the current directory)",
    )  # fmt: skip
    draw.add_argument(
        "--format", default="dxf,png", metavar="LIST",
        help="comma-separated: dxf, svg, png, pdf (default: dxf,png); the bill CSV is always written",
    )  # fmt: skip
    draw.add_argument("--per-frame", action="store_true", help="one sheet per frame instead of one for all")
    draw.set_defaults(handler=_cmd_draw)

    opt = sub.add_parser(
        "optimize",
        help="minimum-cost stable layout for every frame (CP-SAT with directed cuts, exact shortcuts)",
        description="Add the cheapest braces and ties that make every frame stable, keeping members in place.",
    )
    _add_common(opt)
    opt.add_argument("--allow", metavar="KINDS", help="member kinds to add, e.g. brace,tie (default: each frame's)")
    _add_solver_options(
        opt,
        per="frame",
        whole="this bounds the whole run, reading, set-up and writing included (within 10%%); "
        "if no layout is ready by then: exit 4",
    )
    opt.add_argument("--write", metavar="OUT.toml", help="write the project with the new members added")
    opt.add_argument(
        "--without", nargs="+", default=[], metavar="MEMBER",
        help=f"repair: take these members out first, keep the rest (needs --frame if several frames): "
        f"{MEMBER_REF_HELP}",
    )  # fmt: skip
    opt.add_argument("--keep-clear", action="store_true", help="with --without: leave those bays clear")
    opt.add_argument(
        "--redundancy", type=int, metavar="K",
        help="survive the loss of any K members (1 = N-1; default: each frame's 'redundancy')",
    )  # fmt: skip
    _add_stability_only(opt)
    opt.set_defaults(handler=_cmd_optimize)

    frc = sub.add_parser(
        "forces",
        help="member forces, reactions and sway under each load case (tension-only ties), utilisation",
        description="Analyse every frame with load cases as a pin-jointed bar framework (direct stiffness, "
        "ties in tension only): the force in every diagonal, standard and ledger, support reactions and uplift, "
        "the sway of every line and each lift's drift, and each member's utilisation against its capacity. "
        "Exit code 0 when everything is within capacity, 1 when something is over or a case finds a mechanism.",
    )
    _add_common(frc)
    frc.add_argument("--case", metavar="NAME", help="only this load case (both senses if it reverses)")
    frc.add_argument("--out", metavar="DIR", help="write the member-force CSV and the force sheets into this folder")
    frc.add_argument(
        "--format", default="dxf,png", metavar="LIST",
        help="force sheet formats with --out, comma-separated: dxf, svg, png, pdf (default: dxf,png)",
    )  # fmt: skip
    frc.set_defaults(handler=_cmd_forces)

    cmp_ = sub.add_parser(
        "compare",
        help="cost braces-only, ties-only, mixed, mixed N-1 and a rule-of-thumb layout side by side",
        description="Solve every frame under six strategies and write a comparison table (CSV), one DXF per "
        "strategy and a self-contained report.html. Members in place are kept; proposed ones are dropped.",
    )
    _add_common(cmp_)
    _add_solver_options(
        cmp_, per="strategy's solve of each frame (the search only)",
        whole="the whole run may take up to 6 x S x the number of frames, plus the drawing (seconds)",
    )  # fmt: skip
    cmp_.add_argument(
        "--out", metavar="DIR", help="folder for the files (default: out/<project>-compare/ in the current directory)"
    )
    cmp_.add_argument("--bare", action="store_true", help="ignore every member in the file: price from the bare frame")
    cmp_.add_argument(
        "--samples", type=int, default=COMPARE_SAMPLES, metavar="N",
        help=f"Monte Carlo samples per robustness curve in the report (default {COMPARE_SAMPLES}; 0 leaves them out)",
    )  # fmt: skip
    _add_stability_only(cmp_)
    cmp_.set_defaults(handler=_cmd_compare)

    rob = sub.add_parser(
        "robustness",
        help="probability of staying stable as members go missing at random; which members matter most",
        description="For k = 1..K members lost at random (uniformly, or weighted by [robustness.loss_likelihood] "
        "in the project file), the probability that each frame stays free of mechanisms, with 95% intervals "
        "(exact where enumeration is cheap, Monte Carlo otherwise), the expected number of losses until the "
        "first mechanism, and for a stable frame the members whose absence lowers the curve most. Writes the "
        "plot as PNG and SVG.",
    )
    _add_common(rob)
    rob.add_argument(
        "--max-lost", type=int, default=10, metavar="K", help="largest number of members lost (default 10)"
    )
    rob.add_argument("--samples", type=int, default=20_000, metavar="N", help="Monte Carlo samples (default 20000)")
    rob.add_argument(
        "--seed", type=int, default=0, metavar="S", help="random seed; same seed, same numbers (default 0)"
    )
    rob.add_argument(
        "--workers", type=int, default=2, metavar="N",
        help="processes for large runs; the numbers do not depend on it (default 2)",
    )  # fmt: skip
    rob.add_argument("--out", metavar="DIR", help="folder for the plot files (default: out/ in the current directory)")
    rob.set_defaults(handler=_cmd_robustness)

    edit = sub.add_parser(
        "edit",
        help="edit the layout in the browser: click bays, see the verdict live, optimize, save back",
        description="Start a local editor for the project and open it in the browser. The first line printed is "
        "the page's URL with its access token. Only the project file, its backup (NAME.toml.bak) and the output "
        "folder are touched. Ctrl-C stops it.",
    )
    edit.add_argument("project", help="project file (TOML)")
    edit.add_argument("--port", type=int, default=0, metavar="N", help="port to listen on (default 0: any free port)")
    edit.add_argument("--no-browser", action="store_true", help="print the URL only; do not open a browser")
    edit.add_argument(
        "--out",
        metavar="DIR",
        help="folder for compare files and saved copies (default: out/<project>-edit/ in the current directory)",
    )
    edit.add_argument(
        "--bind", default="127.0.0.1", metavar="ADDRESS",
        help="address to listen on (default 127.0.0.1, this computer only; another address prints a warning)",
    )  # fmt: skip
    edit.set_defaults(handler=_cmd_edit)
    return parser


Handler = Callable[[argparse.Namespace, TextIO], int]


def main(
    argv: Sequence[str] | None = None,
    *,
    out: TextIO | None = None,
    err: TextIO | None = None,
    signalled: Callable[[], bool] | None = None,
) -> int:
    """Run the command line; return the exit code (never calls sys.exit).

    Args:
        argv: Arguments without the program name (default: sys.argv[1:]).
        out: Where results go (default: stdout).
        err: Where errors go (default: stderr).
        signalled: Whether SIGINT or SIGTERM arrived before ``main`` took them over (the script
            records them during start-up); then the run stops at once with exit 130.

    Returns:
        The exit code (one of :data:`EXIT_CODES`).
    """
    stdout = out if out is not None else sys.stdout
    stderr = err if err is not None else sys.stderr
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, usage errors 2
        return int(exc.code or 0)
    except (AttributeError, OSError):  # argparse printing --help or usage into a closed or failing stream
        return EXIT_IO
    if args.command == "edit":  # the URL must appear at once; the server handles its own signals
        if signalled is not None and signalled():
            _say(stderr, "interrupted")
            return EXIT_INTERRUPTED
        if signalled is not None:  # the script: Python's own handlers until the server's take over
            signal.signal(signal.SIGINT, signal.default_int_handler)
            signal.signal(signal.SIGTERM, signal.SIG_DFL)
        if stdout is None:
            _say(stderr, "bracegrid: standard output is closed; the editor's URL could not be shown")
            return EXIT_IO
        return _run(args, stdout, stderr)
    buffer = io.StringIO()
    with _stop_on_signals(stderr):
        try:
            if signalled is not None and signalled():
                raise KeyboardInterrupt
            args.whole_run_limit = signalled is not None  # only the script, never an in-process caller
            with _native_prints_to_stderr() if signalled is not None else contextlib.nullcontext():
                code = _run(args, buffer, stderr)
            return _deliver(buffer.getvalue(), stdout, stderr, code, escape=not getattr(args, "json", False))
        except KeyboardInterrupt:  # a signal while the results are being delivered
            _say(stderr, "interrupted")
            return EXIT_INTERRUPTED


def _run(args: argparse.Namespace, out: TextIO, stderr: TextIO | None) -> int:
    handler: Handler = args.handler
    try:
        return handler(args, out)
    except BraceGridError as exc:
        label, code = next((lab, c) for kind, lab, c in _EXIT_FOR if isinstance(exc, kind))
        hint = "; give it more seconds with --time-limit" if isinstance(exc, SolverLimitError) else ""
        _say(stderr, f"{label}: {exc}{hint}")
        return code
    except KeyboardInterrupt:
        remove_temporaries()
        _say(stderr, "interrupted")
        return EXIT_INTERRUPTED
    except BrokenPipeError:  # the editor's output piped into a reader that stopped
        return EXIT_OK
    except Exception as exc:
        _say(
            stderr,
            f"internal error ({type(exc).__name__}: {exc}). This is a bracegrid bug; "
            "please report it with the project file.",
        )
        return EXIT_INTERNAL


def terminal_text(text: str) -> str:
    r"""Text for a terminal: control characters (but the newline) and bidirectional overrides escaped.

    Example:
        >>> terminal_text("frame \x1b[31mred\x00\n")
        'frame \\x1b[31mred\\x00\n'
    """
    return visible_text(text, one_line=False)


def _say(stream: TextIO | None, message: str) -> None:
    """One line on stderr, if stderr can take it (a closed or failing stderr never changes the exit code)."""
    if stream is None:
        return
    with contextlib.suppress(OSError, ValueError, AttributeError):
        stream.write(terminal_text(message) + "\n")
        stream.flush()


def _silence(stream: TextIO) -> None:
    """Point a failed stream's descriptor at /dev/null so the interpreter's exit flush stays quiet."""
    with contextlib.suppress(OSError, ValueError, AttributeError, io.UnsupportedOperation):
        fd = stream.fileno()
        null = os.open(os.devnull, os.O_WRONLY)
        os.dup2(null, fd)
        os.close(null)


def _deliver(text: str, stdout: TextIO | None, stderr: TextIO | None, code: int, *, escape: bool) -> int:
    """Write the results; a reader that went away keeps ``code``, a failing stream gives :data:`EXIT_IO`."""
    if not text:
        return code
    if stdout is None:
        _say(stderr, f"bracegrid: standard output is closed; the results were not shown (exit {EXIT_IO})")
        return EXIT_IO
    shown = terminal_text(text) if escape else text
    try:
        try:
            stdout.write(shown)
        except UnicodeEncodeError:  # e.g. PYTHONIOENCODING=ascii: names the stream cannot hold are escaped
            encoding = getattr(stdout, "encoding", None) or "ascii"
            stdout.write(shown.encode(encoding, "backslashreplace").decode(encoding))
        stdout.flush()
    except BrokenPipeError:  # `| head`, `| true`: the reader stopped; the verdict still counts
        _silence(stdout)
        return code
    except (OSError, ValueError) as exc:  # a full disk, a closed file
        reason = exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)
        _say(stderr, f"bracegrid: cannot write the results to standard output ({reason}); exit {EXIT_IO}")
        _silence(stdout)
        return EXIT_IO
    return code


def _flush_native() -> None:
    """Flush the C library's own output buffers (a solver's printf) into the descriptor they point at."""
    with contextlib.suppress(Exception):
        import ctypes  # the standard library's; loaded only for this flush

        ctypes.CDLL(None).fflush(None)


@contextlib.contextmanager
def _native_prints_to_stderr() -> Iterator[None]:
    """While a command runs, whatever writes to file descriptor 1 directly lands on stderr instead.

    The results go to stdout only afterwards, from the buffer. Solvers' native code may print a
    diagnostic of its own (HiGHS printed "HighsMipSolverData::transformNewIntegerFeasibleSolution"
    on one fuzzed general frame): on stdout it would break every ``--json`` reader. Skipped when
    either descriptor is unusable (a closed stream: the usual rules apply then).
    """
    try:
        sys.stdout.flush()
        saved = os.dup(1)
    except (OSError, ValueError, AttributeError, io.UnsupportedOperation):
        yield
        return
    try:
        os.dup2(2, 1)
    except OSError:
        os.close(saved)
        yield
        return
    try:
        yield
    finally:
        with contextlib.suppress(OSError, ValueError, AttributeError):
            sys.stdout.flush()
        _flush_native()
        os.dup2(saved, 1)
        os.close(saved)


@contextlib.contextmanager
def _stop_on_signals(stderr: TextIO | None) -> Iterator[None]:
    """SIGINT and SIGTERM raise KeyboardInterrupt; if the main thread cannot act on it soon, end the process.

    The main thread may be inside a C++ solve that returns to Python only at its own time limit.
    A watcher thread wakes on every signal (through the wakeup descriptor the interpreter writes to
    from its C handler), gives the main thread :data:`_GRACE_S` to stop by itself, then waits for
    any set of files being moved into place (:data:`~bracegrid.io.MOVING`), removes the temporary
    files, says "interrupted" and exits 130.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def interrupt(signum: int, frame: object) -> None:
        raise KeyboardInterrupt

    read_fd, write_fd = os.pipe()
    os.set_blocking(write_fd, False)
    finished = threading.Event()
    watcher = threading.Thread(target=_watch, args=(read_fd, finished, stderr), name="signal-watch", daemon=True)
    old = {sig: signal.signal(sig, interrupt) for sig in (signal.SIGINT, signal.SIGTERM)}
    old_fd = signal.set_wakeup_fd(write_fd, warn_on_full_buffer=False)
    watcher.start()
    try:
        yield
    finally:
        finished.set()
        signal.set_wakeup_fd(old_fd)
        for sig, handler in old.items():
            signal.signal(sig, handler)
        os.close(write_fd)
        watcher.join(timeout=1.0)
        os.close(read_fd)


def _watch(read_fd: int, finished: threading.Event, stderr: TextIO | None) -> None:
    while True:
        try:
            got = os.read(read_fd, 64)
        except OSError:
            return
        if not got or finished.wait(_GRACE_S):
            return
        with MOVING:
            if finished.is_set():
                return
            remove_temporaries()
            _say(stderr, "interrupted")
            os._exit(EXIT_INTERRUPTED)
