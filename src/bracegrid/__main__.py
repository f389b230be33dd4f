"""``python -m bracegrid`` and the ``bracegrid`` script: the only place that exits."""

import sys

from bracegrid.cli import main


def run() -> None:
    """Run the command line and exit with its code (``main`` has already written and flushed everything)."""
    sys.exit(main())


if __name__ == "__main__":
    run()
