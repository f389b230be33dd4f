"""The README's set-up commands stay true: CI runs exactly the README's test command."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _command(marker: str) -> str:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    match = re.search(rf"<!-- {marker} -->\s*```sh\n(.+?)\n```", text, re.DOTALL)
    assert match is not None, f"README lost its {marker} block"
    return match.group(1).strip()


def test_ci_runs_the_readme_test_command() -> None:
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    assert _command("test-command") in ci.splitlines()


def test_demo_command_names_a_shipped_project() -> None:
    demo = _command("demo-command")
    projects = re.findall(r"projects/[\w.-]+\.toml", demo)
    assert projects, "the demo command must run on a shipped project"
    for p in projects:
        assert (ROOT / p).is_file()
