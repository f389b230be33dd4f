"""``python -m bracegrid`` and the ``bracegrid`` script: the only place that exits."""

import os
import sys

from bracegrid.cli import main


def run() -> None:
    """Run the command line and exit with its code."""
    code = main()
    try:
        sys.stdout.flush()
    except BrokenPipeError:  # the reader went away: do not let the exit flush complain
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    sys.exit(code)


if __name__ == "__main__":
    run()
