"""The words of every output table: column names, counts, supports, money and saving, in one place.

The sheet, the HTML report, the terminal tables and the CSV files take their
column names and wording from here, so the same quantity has the same name
everywhere (docs/drawings.md and docs/compare.md list them).
"""

from __future__ import annotations

from bracegrid.model import Supports

#: Label of a bay listed as blocked in the project file.
BLOCKED_LABEL = "blocked"

#: Column names shared by the sheet's bill, the report's bill and the terminal tables.
MEMBER = "member"
STATUS = "status"
COUNT = "no."
CUT_EACH = "cut each mm"
LENGTH = "length m"
COST = "cost"
SAVING = "saving"


def plural(count: int, word: str) -> str:
    """A count with its noun, singular for one.

    Example:
        >>> plural(1, "round"), plural(3, "round"), plural(0, "brace")
        ('1 round', '3 rounds', '0 braces')
    """
    if count == 1:
        return f"{count} {word}"
    return f"{count} {word}es" if word.endswith(("s", "x", "ch", "sh")) else f"{count} {word}s"


def counts_words(braces: int, ties: int) -> str:
    """Members by kind, written out.

    Example:
        >>> counts_words(0, 16)
        '0 braces, 16 ties'
    """
    return f"{plural(braces, 'brace')}, {plural(ties, 'tie')}"


def supports_words(supports: Supports) -> str:
    """How a frame is held, as the sheet and the report write it.

    Example:
        >>> supports_words(Supports.BASE), supports_words(Supports.FREE)
        ('pinned base', 'free-standing')
    """
    return "pinned base" if supports is Supports.BASE else "free-standing"


def money_text(cents: int) -> str:
    """Whole cents as money with two decimals and thousands separators, from the integer (no float rounding).

    Example:
        >>> money_text(48444), money_text(-1230), money_text(123456789)
        ('484.44', '-12.30', '1,234,567.89')
    """
    sign = "-" if cents < 0 else ""
    whole, part = divmod(abs(cents), 100)
    return f"{sign}{whole:,}.{part:02d}"


def cents(money: float) -> int:
    """Money that is a whole number of cents (a sum of member prices) back to its cents.

    Example:
        >>> cents(484.44), cents(0.1 + 0.2)
        (48444, 30)
    """
    return round(money * 100)


def saving_text(saving_cents: int | None) -> str:
    """A saving against the rule-of-thumb baseline; a negative one is marked as a cost increase.

    Example:
        >>> saving_text(1230), saving_text(-1230), saving_text(None)
        ('12.30', '-12.30 (dearer)', '-')
    """
    if saving_cents is None:
        return "-"
    text = money_text(saving_cents)
    return f"{text} (dearer)" if saving_cents < 0 else text
