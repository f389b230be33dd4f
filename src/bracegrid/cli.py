"""Command-line shell over the library. The only module that prints.

Exit codes: 0 success (stable; for ``forces``: within capacity), 1 not stable (for
``forces``: over capacity or a mechanism), 2 bad input, 3 proven infeasible, 4 solver limit
reached with no layout, 70 internal error.
"""

from __future__ import annotations

import argparse
import json
import sys
import webbrowser
from collections.abc import Callable, Sequence
from datetime import date
from pathlib import Path
from typing import Any, TextIO, TypeVar

from rich.console import Console
from rich.progress import Progress

from bracegrid._version import __version__
from bracegrid.analysis import (
    CAUTION,
    AdditionAdvice,
    RobustnessOptions,
    check_frame,
    project_robustness,
    rank_additions,
    remove_members,
)
from bracegrid.compare import COMPARE_SAMPLES, StrategyKey, StrategyRobustness, compare_project, compare_robustness
from bracegrid.errors import BraceGridError, ExportError, InfeasibleError, InputError, SolverLimitError
from bracegrid.io import (
    MEMBER_REF_HELP,
    OutputFile,
    check_out_folder,
    load_project,
    parse_member_refs,
    save_project,
    write_outputs,
)
from bracegrid.mechanics import FrameForces, analyse_frame
from bracegrid.model import Frame, MemberKind, Project
from bracegrid.optimize import ProgressEvent, SolveOptions, optimize_project
from bracegrid.outputs import (
    PlotFormat,
    check_dict,
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
)
from bracegrid.web import (
    EditorPaths,
    EditorSession,
    GuardRules,
    bind_socket,
    bound_port,
    check_bind_address,
    create_app,
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


def _emit(out: TextIO, payload: dict[str, Any]) -> None:
    out.write(json.dumps(payload, indent=2) + "\n")


def _cmd_check(args: argparse.Namespace, out: TextIO) -> int:
    project = load_project(args.project)
    target = _without_frame(project, args)
    taken = _flagged("--without", lambda: parse_member_refs(target, args.without)) if target is not None else ()
    chosen = _frames(project, args.frame)
    verdicts = [check_frame(f, without=taken if f is target else ()) for f in chosen]
    forces = {
        f.name: analyse_frame(f, project.strength, members=remove_members(f, taken if f is target else ()))
        for f in chosen
        if f.loads
    }
    additions: dict[str, AdditionAdvice] = {
        f.name: rank_additions(f, project.costs, members=remove_members(f, taken) if f is target else None)
        for f, v in zip(chosen, verdicts, strict=True)
        if not v.stable
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
    folder = _flagged(
        "--out", lambda: check_out_folder(Path(args.out) if args.out else source.with_name(f"{source.stem}-drawings"))
    )
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
    folder = _flagged("--out", lambda: check_out_folder(Path(args.out))) if args.out else None
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
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    target = _without_frame(project, args)
    without = (
        {target.name: _flagged("--without", lambda: parse_member_refs(target, args.without))}
        if target is not None
        else {}
    )
    options = SolveOptions(
        time_limit=args.time_limit,
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
    if args.write:
        save_project(solution.project, args.write)
    if args.json:
        _emit(out, optimize_dict(solution))
    else:
        out.write(render_optimize(project.name, solution))
        if args.write:
            out.write(f"Wrote {args.write}\n")
    return EXIT_OK


def _solver_problems(args: argparse.Namespace) -> list[str]:
    """What is wrong with --time-limit and --workers (shared by optimize and compare)."""
    problems = []
    if not args.time_limit > 0:
        problems.append(f"--time-limit {args.time_limit}: give a positive number of seconds")
    if args.workers < 1:
        problems.append(f"--workers {args.workers}: give at least 1")
    return problems


def _add_solver_options(p: argparse.ArgumentParser, *, per: str, whole: str) -> None:
    p.add_argument(
        "--time-limit", type=float, default=60.0, metavar="S",
        help=f"bounds the solver's search: S seconds for each {per} (default 60); {whole}",
    )  # fmt: skip
    p.add_argument("--workers", type=int, default=2, metavar="N", help="CP-SAT worker threads (default 2)")
    p.add_argument("--seed", type=int, default=0, metavar="N", help="CP-SAT random seed (default 0)")


def _progress() -> Progress:
    """A progress bar on stderr, shown only when stderr is a terminal; it vanishes when done."""
    console = Console(stderr=True)
    return Progress(console=console, transient=True, disable=not console.is_terminal)


def _robustness_problems(args: argparse.Namespace) -> list[str]:
    problems = []
    if args.max_lost < 1:
        problems.append(f"--max-lost {args.max_lost}: give at least 1 member")
    if args.samples < 1:
        problems.append(f"--samples {args.samples}: give at least 1 Monte Carlo sample")
    if args.workers < 1:
        problems.append(f"--workers {args.workers}: give at least 1 process")
    return problems


def _cmd_robustness(args: argparse.Namespace, out: TextIO) -> int:
    problems = _robustness_problems(args)
    if problems:
        raise InputError(problems)
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    source = Path(args.project)
    folder = _flagged(
        "--out",
        lambda: check_out_folder(Path(args.out) if args.out else source.with_name(f"{source.stem}-robustness")),
    )
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
    if args.samples < 0:
        problems.append(f"--samples {args.samples}: give 0 (no robustness curves) or more")
    if problems:
        raise InputError(problems)
    project = load_project(args.project)
    frames = _frames(project, args.frame)
    source = Path(args.project)
    folder = _flagged(
        "--out", lambda: check_out_folder(Path(args.out) if args.out else source.with_name(f"{source.stem}-compare"))
    )
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
    paths = _flagged("--out", lambda: EditorPaths.beside(args.project, out=args.out))
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
        serve(create_app(session, rules), sock)
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
        epilog="Exit codes: 0 stable/success, 1 not stable, 2 bad input, 3 infeasible, "
        "4 solver limit without a layout.",
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
        help=f"check as if these members were taken out (needs --frame if several frames): {MEMBER_REF_HELP}",
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
        help="folder for the files (default: <project>-drawings next to the project file)",
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
        opt, per="frame's solve", whole="the whole run may take up to S x the number of frames, plus a second or two"
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
        description="Solve every frame under five strategies and write a comparison table (CSV), one DXF per "
        "strategy and a self-contained report.html. Members in place are kept; proposed ones are dropped.",
    )
    _add_common(cmp_)
    _add_solver_options(
        cmp_, per="strategy's solve of each frame",
        whole="the whole run may take up to 6 x S x the number of frames, plus the drawing (seconds)",
    )  # fmt: skip
    cmp_.add_argument("--out", metavar="DIR", help="folder for the files (default: <project>-compare)")
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
    rob.add_argument("--out", metavar="DIR", help="folder for the plot files (default: <project>-robustness)")
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
        "--out", metavar="DIR", help="folder for compare files and saved copies (default: <project>-edit)"
    )
    edit.add_argument(
        "--bind", default="127.0.0.1", metavar="ADDRESS",
        help="address to listen on (default 127.0.0.1, this computer only; another address prints a warning)",
    )  # fmt: skip
    edit.set_defaults(handler=_cmd_edit)
    return parser


Handler = Callable[[argparse.Namespace, TextIO], int]


def main(argv: Sequence[str] | None = None, *, out: TextIO | None = None, err: TextIO | None = None) -> int:
    """Run the command line; return the exit code (never calls sys.exit).

    Args:
        argv: Arguments without the program name (default: sys.argv[1:]).
        out: Where results go (default: stdout).
        err: Where errors go (default: stderr).

    Returns:
        The exit code.
    """
    stdout = out or sys.stdout
    stderr = err or sys.stderr
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, usage errors 2
        return int(exc.code or 0)
    handler: Handler = args.handler
    try:
        return handler(args, stdout)
    except BraceGridError as exc:
        label, code = next((lab, c) for kind, lab, c in _EXIT_FOR if isinstance(exc, kind))
        hint = "; give it more seconds with --time-limit" if isinstance(exc, SolverLimitError) else ""
        stderr.write(f"{label}: {exc}{hint}\n")
        return code
    except KeyboardInterrupt:
        stderr.write("interrupted\n")
        return 130
    except BrokenPipeError:  # output piped into e.g. `head`, which stopped reading
        return EXIT_OK
    except Exception as exc:
        stderr.write(
            f"internal error ({type(exc).__name__}: {exc}). This is a bracegrid bug; "
            "please report it with the project file.\n"
        )
        return EXIT_INTERNAL
