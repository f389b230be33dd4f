"""Shared pieces of test project files."""

from __future__ import annotations


def project_head(name: str, *, brace: tuple[float, float] = (25.0, 8.0), tie: tuple[float, float] = (9.0, 3.0)) -> str:
    """The ``[project]`` and ``[costs]`` tables of a test project (prices invented for tests).

    Args:
        name: Project name.
        brace: Brace price per piece and per metre.
        tie: Tie price per piece and per metre.
    """
    return (
        f'[project]\nname = "{name}"\n'
        f"[costs.brace]\nper_piece = {brace[0]}\nper_metre = {brace[1]}\n"
        f"[costs.tie]\nper_piece = {tie[0]}\nper_metre = {tie[1]}\n"
    )
