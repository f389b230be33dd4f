"""Hostile project files with loads, capacities, spreading rules and general-frame fields, through
check, forces, optimize, robustness and compare (the commands tests/fuzzcases.py leaves out).

The base files are valid (a pinned face with wind, a plan grid held on two edges, rules within
range, a missing grid bar or an absent corner bay now and then); the mutations of
tests/fuzzcases.py and a few of the strength fields' own then spoil them. The runner records what
tests/fuzzcases.py records, and also anything a native library printed on file descriptor 1
directly (it would corrupt ``--json``). On the code before the fix a 150-file run gave leaked
matplotlib warnings (missing glyphs for control characters and CJK names, a collapsed plot layout
for a 300-character name) and one HiGHS diagnostic inside ``optimize --json``.

``python -m tests.fuzzrich [N] [SEED]`` prints the counts.
"""

from __future__ import annotations

import contextlib
import os
import random
import sys
import tempfile
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path

from tests import fuzzcases as base

HEAD = (
    base._HEAD.replace("[costs.tie]\n", "[costs.tie]\ntension_kn = 12.0\nea_kn = 10000.0\n").replace(
        "[costs.brace]\n", "[costs.brace]\ntension_kn = 20.0\ncompression_kn = 9.0\nea_kn = 80000.0\n"
    )
    + "\n[grid]\nea_kn = 110000.0\nstandard_kn = 40.0\nledger_kn = 6.0\nuplift_kn = 5.0\n"
    + "\n[robustness.loss_likelihood]\nbrace = 1.0\ntie = 2.0\n"
)


def _frame(rng: random.Random, index: int) -> str:
    cols, rows = rng.randint(1, 5), rng.randint(1, 4)
    widths = [rng.choice([1.8, 2.4, 3.0]) for _ in range(cols)]
    heights = [rng.choice([2.0, 2.5]) for _ in range(rows)]
    plan = rng.random() < 0.3
    supports = "free" if plan else rng.choice(["free", "base"])
    extra = ['held_edges = ["left", "right"]'] if plan else []
    for key, chance, top in (("max_unbraced_bays", 0.4, cols), ("end_bay_within", 0.2, cols),
                             ("min_braced_bays", 0.2, cols), ("max_members_per_column", 0.2, 2 * rows)):  # fmt: skip
        if rng.random() < chance:
            extra.append(f"{key} = {rng.randint(0 if key == 'max_unbraced_bays' else 1, top)}")
    if rng.random() < 0.25 and cols * rows > 1:
        extra.append(f"absent = [[{rows}, {cols}]]")
    text = base._FRAME.format(name=f"frame {index}", widths=widths, heights=heights, supports=supports,
                              allow='["brace", "tie"]', extra="\n".join(extra))  # fmt: skip
    if rng.random() < 0.3:
        kind = rng.choice(["ledger", "standard"])
        line = rng.randint(0, rows if kind == "ledger" else cols)
        span = rng.randint(1, cols if kind == "ledger" else rows)
        text += f'\n[[frame.missing]]\nbar = "{kind}"\nline = {line}\nspan = {span}\n'
    if rng.random() < 0.7 and (plan or supports == "base"):
        if plan:
            v = [0.0, *(round(rng.uniform(0.2, 3), 2) for _ in range(cols - 1)), 0.0]
            h = [0.0] * (rows + 1)
            text += f'\n[[frame.load]]\nname = "plan"\nhorizontal = {h}\nvertical = {v}\nreverse = true\n'
        else:
            h = [0.0, *(round(rng.uniform(0.2, 4), 2) for _ in range(rows))]
            text += f'\n[[frame.load]]\nname = "wind"\nhorizontal = {h}\nreverse = {str(rng.random() < 0.5).lower()}\n'
            if rng.random() < 0.5 and "absent" not in text:
                text += f"gravity = {[round(rng.uniform(0, 6), 1) for _ in range(cols + 1)]}\n"
            if rng.random() < 0.3:
                text += f"point = [[{rng.randint(0, rows)}, {rng.randint(0, cols)}, 1.0, -2.0]]\n"
    return text


_KEYS = ["tension_kn", "compression_kn", "ea_kn", "standard_kn", "ledger_kn", "uplift_kn", "max_unbraced_bays",
         "end_bay_within", "min_braced_bays", "max_members_per_column", "brace", "tie", "line", "span"]  # fmt: skip
_HELD = ['["left"]', '["top", "bottom"]', '["left", "left"]', '["up"]', "[]", '"left"', '["left", "right", "top"]']
_POINTS = ["[[99, 0, 1, 1]]", "[[0, 0]]", "[[0, 0, 1e308, 0]]", "[]", "[[1, 1, nan, 0]]", '[["a", 0, 1, 1]]']
_ABSENT = ["[[1, 1]]", "[[99, 99]]", "[[1, 1], [1, 1]]", "[1]", "[]"]


def _m_strength(rng: random.Random, text: str) -> str:
    return base._replace_value(rng, text, rng.choice(_KEYS), rng.choice(base._ODD_NUMBERS))


def _m_load_list(rng: random.Random, text: str) -> str:
    return base._list_item(rng, text, rng.choice(["horizontal", "vertical", "gravity"]), rng.choice(base._ODD_NUMBERS))


def _m_held(rng: random.Random, text: str) -> str:
    return base._replace_value(rng, text, "held_edges", rng.choice(_HELD))


def _m_point(rng: random.Random, text: str) -> str:
    return base._replace_value(rng, text, "point", rng.choice(_POINTS))


def _m_bar(rng: random.Random, text: str) -> str:
    return base._replace_value(rng, text, "bar", rng.choice(['"ledger"', '"standard"', '"brace"', "3"]))


def _m_absent(rng: random.Random, text: str) -> str:
    return base._replace_value(rng, text, "absent", rng.choice(_ABSENT))


MUTATIONS: tuple[base.Mutation, ...] = (
    _m_strength,
    _m_load_list,
    _m_held,
    _m_point,
    _m_bar,
    _m_absent,
    *base.MUTATIONS,
)


def rich_projects(count: int, seed: int = 0) -> Iterator[tuple[str, str]]:
    """``count`` (label, TOML text) pairs; the same seed gives the same files."""
    rng = random.Random(seed)
    for k in range(count):
        text = HEAD + "".join(_frame(rng, i) for i in range(rng.randint(1, 2)))
        names = []
        for _ in range(rng.choice([0, 1, 1, 2])):
            mutation = rng.choice(MUTATIONS)
            text = mutation(rng, text)
            names.append(mutation.__name__[3:])
        yield f"case {k} ({'+'.join(names) or 'valid'})", text


@dataclass
class RichTally:
    """What went wrong across a run (as :class:`tests.fuzzcases.Tally`, plus native prints)."""

    exits: dict[tuple[str, int], int] = field(default_factory=dict)
    problems: list[str] = field(default_factory=list)
    native: list[str] = field(default_factory=list)
    cases: int = 0


@contextlib.contextmanager
def _descriptor_one(into: Path) -> Iterator[None]:
    """Point file descriptor 1 at a file while a command runs in-process."""
    sys.stdout.flush()
    saved = os.dup(1)
    with into.open("wb") as sink:
        os.dup2(sink.fileno(), 1)
        try:
            yield
        finally:
            sys.stdout.flush()
            os.dup2(saved, 1)
            os.close(saved)


def run_rich_fuzz(count: int, seed: int = 0) -> RichTally:
    """Every file through check, forces, optimize and robustness; every fifth also through compare."""
    tally = RichTally()
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        for k, (label, text) in enumerate(rich_projects(count, seed)):
            tally.cases += 1
            path = folder / "case.toml"
            path.write_text(text, encoding="utf-8")
            commands = [
                ["check", str(path), "--json"],
                ["forces", str(path), "--json", "--out", str(folder / "f")],
                ["optimize", str(path), "--json", "--time-limit", "2", "--workers", "1", "--write",
                 str(folder / "w.toml")],
                ["robustness", str(path), "--json", "--samples", "200", "--max-lost", "3", "--workers", "1",
                 "--out", str(folder / "r")],
            ]  # fmt: skip
            if k % 5 == 0:
                commands.append(["compare", str(path), "--json", "--time-limit", "1", "--workers", "1",
                                 "--samples", "100", "--out", str(folder / "c")])  # fmt: skip
            for argv in commands:
                printed = folder / "fd1.txt"
                with _descriptor_one(printed):
                    code, _, err, escaped, leaked = base._run(argv)
                tag = f"{label} {argv[0]}"
                if escaped is not None or "Traceback" in err:
                    tally.problems.append(f"{tag}: traceback {escaped or err[-200:]}")
                    continue
                assert code is not None
                tally.exits[(argv[0], code)] = tally.exits.get((argv[0], code), 0) + 1
                if code == 70 or code not in base.DOCUMENTED_EXITS:
                    tally.problems.append(f"{tag}: exit {code} {err.strip()[:200]}")
                if leaked:
                    tally.problems.append(f"{tag}: warning {leaked[0]}")
                if printed.read_bytes().strip():
                    tally.native.append(f"{tag}: {printed.read_bytes()[:120]!r}")
    return tally


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 150
    s = int(sys.argv[2]) if len(sys.argv) > 2 else 0
    result = run_rich_fuzz(n, s)
    print(f"cases {result.cases}, problems {len(result.problems)}, native prints {len(result.native)}")
    for line in result.problems + result.native:
        print(" ", line)
    print(sorted(result.exits.items()))
