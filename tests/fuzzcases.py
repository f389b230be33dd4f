"""A seeded generator of hostile project files, and a runner that puts each through the commands.

Each case starts from a small valid project and mutates it the way a careless or hostile user
might: huge or odd numbers, wrong types, repeated list entries, control characters in names,
deep nesting, cut-off or shuffled text, quoted headers, multi-line strings, unknown fields.
The runner calls the command line in-process (``bracegrid.cli.main``) and records, for every
command, the exit code, whether anything escaped ``main`` (a traceback), whether a library
warning leaked, and whether a frame of the input is missing from an output (a lost frame).

``python -m tests.fuzzcases [N] [SEED]`` prints the counts (the numbers quoted in
docs/validation.md); tests/test_fuzz.py runs a few hundred cases in the suite.
"""

from __future__ import annotations

import contextlib
import io
import json
import os
import random
import re
import subprocess
import sys
import tempfile
import tomllib
import warnings
from collections import Counter
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

from bracegrid.cli import main

#: The exit codes the command line documents (README, ``bracegrid --help``).
DOCUMENTED_EXITS = frozenset({0, 1, 2, 3, 4, 74, 130})

_HEAD = """# fuzz base
[project]
name = "fuzz base"
length_unit = "m"

[costs.brace]
per_piece = 25.0
per_metre = 8.0

[costs.tie]
per_piece = 9.0
per_metre = 3.0
"""

_FRAME = """
[[frame]]
name = "{name}"
widths = {widths}
heights = {heights}
supports = "{supports}"
allow = {allow}
{extra}
[[frame.member]]
row = 1
col = 1
kind = "brace"
diagonal = "rising"
"""

_ODD_NUMBERS = [
    "1e308", "1e300", "-1e308", "9223372036854775807", "-9223372036854775808", "1180591620717411303424",
    "0", "-1", "0.0001", "1e-300", "nan", "inf", "-inf", "1e15", "1e9", "2147483648", "3.0", "true", '"x"',
    '"1e308 m"', '"3 parsecs"', "[]", "{}", '"  "', "1_000", "0x10",
]  # fmt: skip
_ODD_NAMES = [
    "\\u001b[31mred\\u001b[0m", "nul\\u0000byte", "back\\bspace", "tab\\there", "ünïcödé façade", "名前", "",
    "   ", "a\\u0085b", "bell\\u0007", "\\u202eevil", "x" * 300,
]  # fmt: skip
_ALLOWS = [
    '["brace", "brace"]', '["Brace", "brace"]', '["tie", "tie", "brace"]', '["brace", "tie", "tie"]', "[]",
    '["strut"]', '"brace"', '["brace", 3]', '["TIE"]', '["brace","tie","brace","tie"]',
]  # fmt: skip


def _nest(depth: int, inline: bool) -> str:
    return ("{a = " * depth + "1" + "}" * depth) if inline else ("[" * depth + "1" + "]" * depth)


def _frame(rng: random.Random, index: int) -> str:
    cols, rows = rng.randint(1, 5), rng.randint(1, 4)
    widths = [rng.choice([1.8, 2.4, 3.0]) for _ in range(cols)]
    heights = [rng.choice([2.0, 2.5]) for _ in range(rows)]
    return _FRAME.format(
        name=f"frame {index}",
        widths=widths,
        heights=heights,
        supports=rng.choice(["free", "base"]),
        allow='["brace", "tie"]',
        extra="",
    )


def _base(rng: random.Random) -> str:
    return _HEAD + "".join(_frame(rng, k) for k in range(rng.randint(1, 3)))


def _replace_value(rng: random.Random, text: str, key: str, value: str) -> str:
    lines = text.splitlines()
    spots = [k for k, line in enumerate(lines) if line.split("=")[0].strip() == key]
    if not spots:
        return text
    k = rng.choice(spots)
    lines[k] = f"{key} = {value}"
    return "\n".join(lines) + "\n"


def _list_item(rng: random.Random, text: str, key: str, value: str) -> str:
    lines = text.splitlines()
    spots = [k for k, line in enumerate(lines) if line.split("=")[0].strip() == key]
    if not spots:
        return text
    k = rng.choice(spots)
    items = lines[k].split("=", 1)[1].strip().strip("[]").split(",")
    items[rng.randrange(len(items))] = value
    lines[k] = f"{key} = [{', '.join(items)}]"
    return "\n".join(lines) + "\n"


Mutation = Callable[[random.Random, str], str]


def _m_number(rng: random.Random, text: str) -> str:
    key = rng.choice(["per_piece", "per_metre", "contingency_pct", "labour_per_piece", "redundancy", "row", "col"])
    if key in ("contingency_pct", "labour_per_piece"):
        return text.replace("[costs.tie]\n", f"[costs.tie]\n{key} = {rng.choice(_ODD_NUMBERS)}\n", 1)
    return _replace_value(rng, text, key, rng.choice(_ODD_NUMBERS))


def _m_size(rng: random.Random, text: str) -> str:
    return _list_item(rng, text, rng.choice(["widths", "heights"]), rng.choice(_ODD_NUMBERS))


def _m_allow(rng: random.Random, text: str) -> str:
    return _replace_value(rng, text, "allow", rng.choice(_ALLOWS))


def _m_name(rng: random.Random, text: str) -> str:
    return _replace_value(rng, text, "name", json.dumps(rng.choice(_ODD_NAMES)).replace("\\\\", "\\"))


def _m_nesting(rng: random.Random, text: str) -> str:
    depth = rng.choice([50, 200, 1000, 3000])
    key = rng.choice(["widths", "allow", "supports", "name", "blocked"])
    return _replace_value(rng, text, key, _nest(depth, inline=rng.random() < 0.5))


def _m_cut(rng: random.Random, text: str) -> str:
    return text[: rng.randrange(len(text))]


def _m_drop_line(rng: random.Random, text: str) -> str:
    lines = text.splitlines()
    del lines[rng.randrange(len(lines))]
    return "\n".join(lines) + "\n"


def _m_repeat_line(rng: random.Random, text: str) -> str:
    lines = text.splitlines()
    k = rng.randrange(len(lines))
    lines.insert(rng.randrange(len(lines)), lines[k])
    return "\n".join(lines) + "\n"


def _m_swap_lines(rng: random.Random, text: str) -> str:
    lines = text.splitlines()
    a, b = rng.randrange(len(lines)), rng.randrange(len(lines))
    lines[a], lines[b] = lines[b], lines[a]
    return "\n".join(lines) + "\n"


def _m_quoted_header(rng: random.Random, text: str) -> str:
    return text.replace("[[frame]]", '[["frame"]]').replace("[[frame.member]]", '[["frame".member]]')


def _m_multiline(rng: random.Random, text: str) -> str:
    return text.replace('[project]\nname = "fuzz base"', '[project]\nname = """fuzz\n\n[[frame]]\nbase"""', 1)


def _m_unknown(rng: random.Random, text: str) -> str:
    where = rng.choice(["[project]\n", "[costs.brace]\n", "[[frame]]\n", "[[frame.member]]\n"])
    return text.replace(where, f"{where}{rng.choice(['colour', 'widht', 'x'])} = 1\n", 1)


def _m_blocked(rng: random.Random, text: str) -> str:
    bay = rng.choice(["[1, 1]", "[99, 99]", "[0, 1]", "[1]", "[1.5, 2]", '["a", 1]', "[-1, -1]"])
    return text.replace("[[frame.member]]", f"blocked = [{bay}]\n[[frame.member]]", 1)


def _m_opening(rng: random.Random, text: str) -> str:
    big = rng.choice(["1e308", "1e300", "1e30", "2.0", "-1e308"])
    table = f'[[frame.opening]]\nname = "hole"\npolygon = [[0, 0], [{big}, 0], [{big}, {big}], [0, {big}]]\n'
    return text.replace("[[frame.member]]", f"{table}\n[[frame.member]]", 1)


def _m_inline(rng: random.Random, text: str) -> str:
    return text.replace(
        "[costs.tie]\nper_piece = 9.0\nper_metre = 3.0\n", "costs.tie = {per_piece = 9.0, per_metre = -3.0}\n", 1
    )


def _m_types(rng: random.Random, text: str) -> str:
    key = rng.choice(["widths", "heights", "supports", "member", "frame", "costs", "project", "kind", "diagonal"])
    return _replace_value(rng, text, key, rng.choice(['"text"', "3", "[1, [2]]", "{a = 1}", "1979-05-27", "true"]))


MUTATIONS: tuple[Mutation, ...] = (
    _m_number, _m_size, _m_allow, _m_name, _m_nesting, _m_cut, _m_drop_line, _m_repeat_line, _m_swap_lines,
    _m_quoted_header, _m_multiline, _m_unknown, _m_blocked, _m_opening, _m_inline, _m_types,
)  # fmt: skip


def hostile_projects(count: int, seed: int = 0) -> Iterator[tuple[str, str]]:
    """``count`` (label, TOML text) pairs; the same seed gives the same files."""
    rng = random.Random(seed)
    for k in range(count):
        text = _base(rng)
        names = []
        for _ in range(rng.choice([1, 1, 1, 2, 3])):
            mutation = rng.choice(MUTATIONS)
            text = mutation(rng, text)
            names.append(mutation.__name__[3:])
        yield f"case {k} ({'+'.join(names)})", text


def input_frames(text: str) -> int | None:
    """How many [[frame]] tables a file holds (by the standard library's reader), or None if unreadable."""
    try:
        data = tomllib.loads(text)
    except (tomllib.TOMLDecodeError, RecursionError):
        return None
    frames = data.get("frame")
    return len(frames) if isinstance(frames, list) else None


@dataclass
class Tally:
    """What went wrong across a run."""

    exits: Counter[tuple[str, int]] = field(default_factory=Counter)
    undocumented: list[str] = field(default_factory=list)
    tracebacks: list[str] = field(default_factory=list)
    internal: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    lost_frames: list[str] = field(default_factory=list)
    cases: int = 0

    def summary(self) -> dict[str, int]:
        return {
            "cases": self.cases,
            "exit 70 (internal error)": len(self.internal),
            "tracebacks": len(self.tracebacks),
            "exit codes outside the documented set": len(self.undocumented),
            "leaked warnings": len(self.warnings),
            "lost frames": len(self.lost_frames),
        }


def _run(argv: list[str]) -> tuple[int | None, str, str, str | None, list[str]]:
    out, err = io.StringIO(), io.StringIO()
    escaped: str | None = None
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            code: int | None = main(argv, out=out, err=err)
        except BaseException as exc:  # what would be a traceback in a real run
            code, escaped = None, f"{type(exc).__name__}: {exc}"[:200]
    return code, out.getvalue(), err.getvalue(), escaped, [str(w.message)[:120] for w in caught]


def run_case(label: str, text: str, folder: Path, tally: Tally, *, heavy: bool) -> None:
    """Put one project file through check (always) and optimize and draw (when ``heavy``)."""
    tally.cases += 1
    path = folder / "case.toml"
    path.write_text(text, encoding="utf-8")
    expected = input_frames(text)
    commands: list[tuple[str, list[str]]] = [("check", ["check", str(path), "--json"])]
    if heavy:
        written = folder / "written.toml"
        written.unlink(missing_ok=True)
        commands.append(
            (
                "optimize",
                ["optimize", str(path), "--json", "--time-limit", "2", "--workers", "1", "--write", str(written)],
            )
        )
        commands.append(("draw", ["draw", str(path), "--format", "dxf", "--out", str(folder / "drawn")]))
    for name, argv in commands:
        code, out, err, escaped, leaked = _run(argv)
        tag = f"{label} {name}"
        if escaped is not None or "Traceback" in err:
            tally.tracebacks.append(f"{tag}: {escaped or err[-200:]}")
            continue
        assert code is not None
        tally.exits[(name, code)] += 1
        if code == 70:
            tally.internal.append(f"{tag}: {err.strip()[:200]}")
        elif code not in DOCUMENTED_EXITS:
            tally.undocumented.append(f"{tag}: exit {code}")
        if leaked:
            tally.warnings.append(f"{tag}: {leaked[0]}")
        if code in (0, 1) and expected is not None:
            got = _frames_out(name, out, folder)
            if got is not None and got != expected:
                tally.lost_frames.append(f"{tag}: {expected} frames in, {got} out")


def _frames_out(command: str, out: str, folder: Path) -> int | None:
    if command == "check":
        return len(json.loads(out)["frames"])
    if command == "optimize":
        shown = len(json.loads(out)["frames"])
        written = tomllib.loads((folder / "written.toml").read_text(encoding="utf-8")).get("frame", [])
        return shown if shown == len(written) else -1
    return sum(1 for line in out.splitlines() if re.search(r"; \d+ members$", line))


def run_fuzz(count: int, seed: int = 0, *, heavy_every: int = 2) -> Tally:
    """Run ``count`` hostile files; optimize and draw every ``heavy_every``-th one."""
    tally = Tally()
    with tempfile.TemporaryDirectory() as tmp:
        for k, (label, text) in enumerate(hostile_projects(count, seed)):
            run_case(label, text, Path(tmp), tally, heavy=k % heavy_every == 0)
    return tally


_UNSTABLE = (
    _HEAD
    + """
[[frame]]
name = "loose été"
widths = [3.0, 3.0]
heights = [2.0]
"""
)


def misuse_commands(folder: Path) -> list[tuple[str, list[str], dict[str, str], str]]:
    """(label, argv after ``python -m bracegrid``, extra environment, shell redirection) of each misuse."""
    good = folder / "good.toml"
    good.write_text(
        _UNSTABLE.replace(
            "heights = [2.0]",
            'heights = [2.0]\nsupports = "base"\n'
            '[[frame.member]]\nrow = 1\ncol = 1\nkind = "brace"\ndiagonal = "rising"\n'
            '[[frame.member]]\nrow = 1\ncol = 2\nkind = "brace"\ndiagonal = "rising"\n',
        ),
        encoding="utf-8",
    )
    loose = folder / "loose.toml"
    loose.write_text(_UNSTABLE, encoding="utf-8")
    fifo = folder / "fifo.toml"
    if not fifo.exists():
        os.mkfifo(fifo)
    g, lo = str(good), str(loose)
    return [
        ("--seed -1", ["optimize", g, "--seed", "-1"], {}, ""),
        ("--seed 2**70", ["optimize", g, "--seed", "1180591620717411303424"], {}, ""),
        ("robustness --seed -1", ["robustness", g, "--seed", "-1", "--out", str(folder / "r")], {}, ""),
        ("/dev/zero", ["check", "/dev/zero"], {}, ""),
        ("FIFO without writer", ["check", str(fifo)], {}, ""),
        ("a folder", ["check", str(folder)], {}, ""),
        ("stdout closed", ["check", lo], {}, ">&-"),
        ("stdout /dev/full", ["check", lo], {}, ">/dev/full"),
        ("ascii stdout, non-ASCII name", ["check", lo], {"PYTHONIOENCODING": "ascii"}, ""),
        ("broken pipe keeps exit 1", ["check", lo], {}, "| true"),
        ("stderr closed, bad --frame", ["check", lo, "--frame", "nope"], {}, "2>&-"),
        ("--write ''", ["optimize", g, "--write", ""], {}, ""),
        ("draw --out ''", ["draw", g, "--out", ""], {}, ""),
        ("--without r9c9", ["check", g, "--without", "r9c9"], {}, ""),
    ]


#: What each misuse should give: the exit code (74 = output stream failed).
MISUSE_EXPECTED = {
    "--seed -1": 2, "--seed 2**70": 2, "robustness --seed -1": 2, "/dev/zero": 2, "FIFO without writer": 2,
    "a folder": 2, "stdout closed": 74, "stdout /dev/full": 74, "ascii stdout, non-ASCII name": 1,
    "broken pipe keeps exit 1": 1, "stderr closed, bad --frame": 2, "--write ''": 2, "draw --out ''": 2,
    "--without r9c9": 2,
}  # fmt: skip


def run_misuse(folder: Path, *, timeout: float = 60.0) -> list[tuple[str, int | None, str]]:
    """Run every misuse command in a shell; (label, exit code or None on time-out, stderr tail)."""
    results = []
    for label, argv, env, redirect in misuse_commands(folder):
        cmd = " ".join([_quote(sys.executable), "-m", "bracegrid", *(_quote(a) for a in argv)])
        if redirect.startswith("|"):
            cmd = f"set -o pipefail; {cmd} {redirect}; echo EXIT=$? >&2"
        else:
            cmd = f"{cmd} {redirect}"
        try:
            done = subprocess.run(
                ["bash", "-c", cmd], capture_output=True, text=True, timeout=timeout, env={**os.environ, **env},
                cwd=folder, check=False,
            )  # fmt: skip
        except subprocess.TimeoutExpired:
            results.append((label, None, "timed out"))
            continue
        code = done.returncode
        if redirect.startswith("|"):
            found = re.search(r"EXIT=(\d+)", done.stderr)
            code = int(found.group(1)) if found else -1
        results.append((label, code, done.stderr.strip()[-300:]))
    return results


def _quote(text: str) -> str:
    return "'" + text.replace("'", "'\\''") + "'"


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 300
    s = int(sys.argv[2]) if len(sys.argv) > 2 and sys.argv[2].isdigit() else 0
    result = run_fuzz(n, s)
    with contextlib.suppress(BrokenPipeError):
        for key, value in result.summary().items():
            print(f"{key:40s} {value}")
        for name in ("internal", "tracebacks", "undocumented", "warnings", "lost_frames"):
            for line in getattr(result, name)[:8]:
                print(f"  {name}: {line}")
        if "--misuse" in sys.argv:
            with tempfile.TemporaryDirectory() as tmp:
                misuse = run_misuse(Path(tmp), timeout=20)
            wrong = 0
            for label, code, tail in misuse:
                ok = code == MISUSE_EXPECTED[label]
                wrong += not ok
                last = tail.splitlines()[-1] if tail else ""
                print(f"{'ok ' if ok else 'BAD'} {label:32s} exit {code} (want {MISUSE_EXPECTED[label]}) {last[:90]}")
            print(f"misuse commands answered wrongly: {wrong} of {len(misuse)}")
