"""The command line under misuse: bad options, failing output streams, signals, half-written sets.

One test per class of the fuzzing findings (issue "never crash, never lie, never leave half a
set"); each failed before the fix. Streams and signals are real: the script runs in a shell with
stdout closed, on /dev/full, piped into a reader that quits, or gets SIGINT/SIGTERM mid-run.
Exit codes are the documented ones (README.md, ``bracegrid --help``, cli.EXIT_CODES).
"""

from __future__ import annotations

import io
import json
import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

import bracegrid.cli as cli
from bracegrid.cli import EXIT_CODES, SEED_MAX, main, terminal_text
from tests.common import project_head

ROOT = Path(__file__).resolve().parents[1]
SHED = str(ROOT / "projects" / "orchard-shed.toml")
LOOSE = project_head("p") + '[[frame]]\nname = "loose été"\nwidths = [3.0, 3.0]\nheights = [2.0]\n'


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    return main(list(argv), out=out, err=err), out.getvalue(), err.getvalue()


def shell(command: str, *, env: dict[str, str] | None = None, cwd: Path | None = None) -> tuple[int, str, str]:
    script = f"'{sys.executable}' -m bracegrid {command}"
    done = subprocess.run(
        ["bash", "-c", script], capture_output=True, text=True, timeout=120, env={**os.environ, **(env or {})},
        cwd=cwd, check=False,
    )  # fmt: skip
    return done.returncode, done.stdout, done.stderr


@pytest.fixture
def loose(tmp_path: Path) -> Path:
    path = tmp_path / "loose.toml"
    path.write_text(LOOSE, encoding="utf-8")
    return path


def test_every_exit_code_is_listed_in_help_and_readme(capsys: pytest.CaptureFixture[str]) -> None:
    code, _, _ = run("--help")  # argparse prints help on sys.stdout itself
    out = capsys.readouterr().out
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    flat = " ".join(out.split())
    assert code == 0
    for number, _what in EXIT_CODES:
        assert f"{number} " in flat
        assert f" {number} " in " ".join(readme.split("Exit codes")[1][:1500].split())
    assert "out/ in the current directory" in flat


def _subcommands() -> list[str]:
    import argparse

    sub = next(a for a in cli.build_parser()._actions if isinstance(a, argparse._SubParsersAction))
    return sorted(sub.choices)


@pytest.mark.parametrize("command", _subcommands())
def test_every_subcommand_help_prints(command: str, capsys: pytest.CaptureFixture[str]) -> None:
    """argparse expands every help string with %-formatting: a bare '%' crashed optimize --help."""
    code, _, _ = run(command, "--help")
    assert code == 0
    assert "usage: bracegrid" in capsys.readouterr().out


@pytest.mark.parametrize(
    "argv",
    [
        ["optimize", SHED, "--seed", "-1"],
        ["optimize", SHED, "--seed", "1180591620717411303424"],
        ["optimize", SHED, "--seed", str(SEED_MAX + 1)],
        ["compare", SHED, "--seed", "-5"],
        ["robustness", SHED, "--seed", "-1"],
        ["optimize", SHED, "--workers", "99999999999"],
    ],
)
def test_seed_and_workers_out_of_range_are_bad_input(argv: list[str], tmp_path: Path) -> None:
    code, out, err = run(
        *argv, "--out" if argv[0] != "optimize" else "--json", *([str(tmp_path)] * (argv[0] != "optimize"))
    )
    assert code == 2, err
    assert "give" in err
    assert "0 to 2147483647" in err or "at most 256" in err
    assert out == ""


def test_the_largest_seed_is_accepted() -> None:
    code, _, err = run("optimize", SHED, "--seed", str(SEED_MAX), "--time-limit", "5", "--workers", "1", "--json")
    assert code == 0, err


@pytest.mark.parametrize(
    ("argv", "words"),
    [
        (["optimize", SHED, "--write", ""], "--write empty file name"),
        (["draw", SHED, "--out", ""], "--out empty folder name"),
        (["compare", SHED, "--out", ""], "--out empty folder name"),
        (["forces", SHED, "--out", ""], "--out empty folder name"),
        (["robustness", SHED, "--out", ""], "--out empty folder name"),
    ],
)
def test_empty_output_paths_are_rejected(
    argv: list[str], words: str, tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.chdir(tmp_path)
    code, _, err = run(*argv)
    assert code == 2
    assert words in err
    assert list(tmp_path.iterdir()) == []


def test_unwritable_compare_folder_fails_before_any_solve(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    blocker = tmp_path / "a-file"
    blocker.write_text("x", encoding="utf-8")

    def no_solving(*args: object, **kwargs: object) -> None:
        msg = "solved before checking the output folder"
        raise AssertionError(msg)

    monkeypatch.setattr(cli, "compare_project", no_solving)
    monkeypatch.setattr(cli, "optimize_project", no_solving)
    code, _, err = run("compare", SHED, "--out", str(blocker / "sub"))
    assert code == 2
    assert "is not a folder" in err
    code, _, err = run("optimize", SHED, "--write", str(blocker / "sub" / "x.toml"))
    assert code == 2
    assert "is not a folder" in err


def test_control_characters_in_names_are_escaped_in_tables(tmp_path: Path) -> None:
    path = tmp_path / "p.toml"
    path.write_text(LOOSE.replace("loose été", "red\\u001b[31m\\u0000back\\bspace\\u202e"), encoding="utf-8")
    code, out, _ = run("check", str(path))
    assert code == 1
    assert not {"\x1b", "\x00", "\b", "\u202e"} & set(out)
    assert "red\\x1b[31m\\x00back\\x08space\\u202e" in out
    code, out, _ = run("check", str(path), "--json")  # JSON escapes on its own and keeps the name exact
    assert json.loads(out)["frames"][0]["name"] == "red\x1b[31m\x00back\bspace\u202e"
    assert terminal_text("a\tb\nc") == "a\\tb\nc"


def test_bay_that_does_not_exist_is_named_with_the_frame_size(tmp_path: Path) -> None:
    path = tmp_path / "p.toml"
    path.write_text(
        project_head("p") + '[[frame]]\nname = "f"\nwidths = [1, 1, 1, 1, 1, 1]\nheights = [1, 1, 1, 1]\n',
        encoding="utf-8",
    )
    code, _, err = run("check", str(path), "--without", "r9c9")
    assert code == 2
    assert "frame 'f' has no bay r9c9; it is 6 bays wide and 4 high" in err
    assert "holds no member" not in err


# --- output streams (real processes) ---------------------------------------------------------


def test_stdout_closed_is_an_io_error(loose: Path) -> None:
    code, _, err = shell(f"check '{loose}' >&-")
    assert code == 74
    assert err.strip().splitlines() == ["bracegrid: standard output is closed; the results were not shown (exit 74)"]


def test_stdout_full_is_an_io_error(loose: Path) -> None:
    code, _, err = shell(f"check '{loose}' >/dev/full")
    assert code == 74
    assert "Traceback" not in err
    assert err.strip().splitlines() == [
        "bracegrid: cannot write the results to standard output (No space left on device); exit 74"
    ]


def test_ascii_stdout_escapes_names_and_keeps_the_verdict(loose: Path) -> None:
    code, out, err = shell(f"check '{loose}'", env={"PYTHONIOENCODING": "ascii"})
    assert code == 1, err
    assert "loose \\xe9t\\xe9" in out
    assert err == ""


def test_broken_pipe_keeps_the_verdicts_exit_code(loose: Path) -> None:
    code, _, err = shell(f"check '{loose}' | true; exit ${{PIPESTATUS[0]}}")
    assert code == 1
    assert "Traceback" not in err
    assert "Exception ignored" not in err


def test_closed_stderr_keeps_the_exit_code(loose: Path) -> None:
    code, out, _ = shell(f"check '{loose}' --frame nope 2>&-")
    assert code == 2
    assert out == ""


# --- signals ------------------------------------------------------------------------------------


def _slow_project(folder: Path) -> Path:
    """A 40 x 40 frame with scattered blocked bays (invented for tests): CP-SAT works on it for seconds."""
    rng = random.Random(5)
    n = 40
    blocked = sorted({(rng.randint(1, n), rng.randint(1, n)) for _ in range(300)})
    widths = [rng.choice([1.8, 2.4, 3.0]) for _ in range(n)]
    heights = [rng.choice([2.0, 2.5]) for _ in range(n)]
    path = folder / "slow.toml"
    path.write_text(
        project_head("slow")
        + f'[[frame]]\nname = "big"\nwidths = {widths}\nheights = {heights}\nblocked = {[list(b) for b in blocked]}\n',
        encoding="utf-8",
    )
    return path


@pytest.mark.parametrize("sig", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
@pytest.mark.parametrize("delay", [0.3, 2.5], ids=["during start-up", "during the solve"])
def test_signal_stops_with_130_and_leaves_earlier_outputs(tmp_path: Path, sig: int, delay: float) -> None:
    project = _slow_project(tmp_path)
    target = tmp_path / "braced.toml"
    target.write_text("# an earlier result\n", encoding="utf-8")
    argv = [sys.executable, "-m", "bracegrid", "optimize", str(project), "--time-limit", "60", "--workers", "1"]
    proc = subprocess.Popen([*argv, "--write", str(target)], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    time.sleep(delay)
    sent = time.monotonic()
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err
    assert time.monotonic() - sent < 10  # prompt: the grace period is 1.5 s (start-up may be slow on a busy machine)
    assert err.strip().splitlines()[-1] == "interrupted"
    assert target.read_text(encoding="utf-8") == "# an earlier result\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["braced.toml", "slow.toml"]  # no .part files


def test_optimize_write_keeps_the_users_comments_and_every_frame(tmp_path: Path) -> None:
    source = ROOT / "projects" / "quayside-scaffold.toml"
    target = tmp_path / "braced.toml"
    code, _, err = run("optimize", str(source), "--time-limit", "10", "--workers", "1", "--write", str(target))
    assert code == 0, err
    text, new = source.read_text(encoding="utf-8"), target.read_text(encoding="utf-8")
    comments = [line for line in text.splitlines() if line.lstrip().startswith("#")]
    assert comments
    assert all(c in new.splitlines() for c in comments)
    assert new.count("[[frame]]") == text.count("[[frame]]")
    assert new.count("[[frame.member]]") > text.count("[[frame.member]]")


def test_draw_refuses_a_frame_too_large_to_read_at_once(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # 300 x 300 bays: before, 289 s and 3.6 GB for "A0 at 1:16384000"; now a plain message, nothing written.
    path = tmp_path / "dense.toml"
    path.write_text(
        project_head("dense") + f'[[frame]]\nname = "dense"\nwidths = {[2.4] * 300}\nheights = {[2.0] * 300}\n',
        encoding="utf-8",
    )
    monkeypatch.chdir(tmp_path)
    started = time.monotonic()
    code, _, err = run("draw", str(path))
    assert code == 2
    assert "frame 'dense' is 300 bays across and 300 up: too large to draw legibly on one sheet" in err
    assert time.monotonic() - started < 30
    assert not (tmp_path / "out").exists()


def test_time_limit_bounds_the_whole_run_of_the_script(tmp_path: Path) -> None:
    # A 1000 x 1000 frame: reading it and building its tables alone takes longer than the limit.
    n = 1000
    path = tmp_path / "huge.toml"
    path.write_text(
        project_head("huge")
        + f'[[frame]]\nname = "huge"\nwidths = [{", ".join(["2.4"] * n)}]\nheights = [{", ".join(["2.0"] * n)}]\n'
        'supports = "base"\nblocked = [[3, 3], [500, 7]]\n',
        encoding="utf-8",
    )
    argv = [sys.executable, "-m", "bracegrid", "optimize", str(path), "--time-limit", "1"]
    started = time.monotonic()
    done = subprocess.run(
        [*argv, "--write", str(tmp_path / "o.toml")], capture_output=True, text=True, timeout=120, check=False
    )
    wall = time.monotonic() - started
    assert done.returncode == 4, done.stderr
    assert "no layout within the limit" in done.stderr
    assert wall < 1.1 + 15  # 1.1 x the limit after start-up; start-up on a busy test machine is generous
    assert sorted(p.name for p in tmp_path.iterdir()) == ["huge.toml"]


@pytest.mark.parametrize(
    ("old", "new"),
    [
        ("per_piece = 25.0", "per_piece = 1e15"),  # check accepted it, optimize overflowed a C long
        ("widths = [3.0, 3.0]", "widths = [1e308, 3.0]"),
        ("widths = [3.0, 3.0]", "widths = [9223372036854775807, 3.0]"),
        ("per_metre = 3.0", "per_metre = 1e300"),
    ],
)
def test_check_and_optimize_agree_on_what_is_valid(tmp_path: Path, old: str, new: str) -> None:
    path = tmp_path / "p.toml"
    path.write_text(LOOSE.replace(old, new, 1), encoding="utf-8")
    assert new in path.read_text(encoding="utf-8")
    answers = {command: run(command, str(path), "--json") for command in ("check", "optimize")}
    assert {command: code for command, (code, _, _) in answers.items()} == {"check": 2, "optimize": 2}
    assert answers["check"][2] == answers["optimize"][2]  # the same message, naming field, value and range
    assert "out of range" in answers["check"][2]


def test_version_and_check_do_not_load_the_heavy_libraries() -> None:
    heavy = ("starlette", "uvicorn", "ortools", "matplotlib", "ezdxf")
    done = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "bracegrid", "--version"],
        capture_output=True, text=True, timeout=60, check=False,
    )  # fmt: skip
    assert (done.returncode, done.stdout) == (0, f"bracegrid {cli.__version__}\n")
    loaded = {line.rsplit("|", 1)[-1].strip().split(".")[0] for line in done.stderr.splitlines()}
    assert "numpy" not in loaded
    assert not loaded & set(heavy)
    probe = (
        "import io, sys\nfrom bracegrid.cli import main\n"
        f"code = main(['check', {SHED!r}], out=io.StringIO())\n"
        f"print(code, sorted({{m.split('.')[0] for m in sys.modules}} & {set(heavy)!r}))\n"
    )
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=60, check=False)
    assert done.stdout.strip() == "0 []", done.stderr


def test_native_prints_never_reach_stdout() -> None:
    """A solver's own C-level print (HiGHS printed one on a fuzzed general frame) goes to stderr."""
    script = (
        "import ctypes, sys\n"
        "import bracegrid.cli as cli\n"
        "real = cli._run\n"
        "def noisy(args, out, stderr):\n"
        "    ctypes.CDLL(None).puts(b'native solver chatter')\n"
        "    return real(args, out, stderr)\n"
        "cli._run = noisy\n"
        f"sys.exit(cli.main(['check', {SHED!r}, '--json'], signalled=lambda: False))\n"
    )
    done = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120, check=False)
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["frames"]
    assert "native solver chatter" in done.stderr
