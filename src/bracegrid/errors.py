"""Every exception bracegrid raises, and nothing else.

Callers can catch :class:`BraceGridError` for all of them, or the matching
built-in (``ValueError``, ``RuntimeError``, ``OSError``) where one fits.
"""

from __future__ import annotations


class BraceGridError(Exception):
    """Base class of every bracegrid error."""


class InputError(BraceGridError, ValueError):
    """The project file or a command-line value is wrong.

    Attributes:
        problems: One line per problem found, each saying where, what and how
            to fix it. Validation collects all problems before raising.
    """

    def __init__(self, problems: list[str] | tuple[str, ...] | str, *, source: str = "") -> None:
        items = (problems,) if isinstance(problems, str) else tuple(problems)
        self.problems: tuple[str, ...] = items
        self.source = source
        head = f"{source}: " if source else ""
        if len(items) == 1:
            message = f"{head}{items[0]}"
        else:
            lines = "\n".join(f"  - {p}" for p in items)
            message = f"{head}{len(items)} problems found:\n{lines}"
        super().__init__(message)


class InfeasibleError(BraceGridError, ValueError):
    """No layout can satisfy the request (proven, with the reasons found)."""

    def __init__(self, reasons: list[str] | tuple[str, ...] | str) -> None:
        items = (reasons,) if isinstance(reasons, str) else tuple(reasons)
        self.reasons: tuple[str, ...] = items
        super().__init__("\n".join(items))


class SolverLimitError(BraceGridError, RuntimeError):
    """The solver stopped at its limit before finding any layout."""


class ExportError(BraceGridError, OSError):
    """A drawing, report or project file could not be written."""


class NumericalError(BraceGridError, ArithmeticError):
    """A numerical solve could not meet its own accuracy check, so no numbers are reported."""
