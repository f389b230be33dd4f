"""Lint, format and type checks run with the tests, so CI enforces them (ruff, mypy --strict)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.parametrize(
    "argv",
    [
        ["ruff", "check", "src", "tests", "benchmarks"],
        ["ruff", "format", "--check", "src", "tests", "benchmarks"],
        ["mypy"],
    ],
    ids=["ruff-check", "ruff-format", "mypy-strict"],
)
def test_tool_is_clean(argv: list[str]) -> None:
    proc = subprocess.run([sys.executable, "-m", *argv], cwd=ROOT, capture_output=True, text=True, check=False)
    assert proc.returncode == 0, proc.stdout[-4000:] + proc.stderr[-2000:]
