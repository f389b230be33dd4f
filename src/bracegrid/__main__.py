"""``python -m bracegrid`` and the ``bracegrid`` script: the only place that exits.

``bracegrid --version`` is answered before any library is imported. Ctrl-C or SIGTERM while the
libraries are still being imported is only recorded (a library's
``try: import ... except:`` could otherwise swallow the KeyboardInterrupt and the run would go on);
:func:`bracegrid.cli.main` then stops at once with "interrupted" and exit 130.
"""

import os
import signal
import sys
from types import FrameType

from bracegrid._version import __version__

_EARLY: list[int] = []


def _record(signum: int, frame: FrameType | None) -> None:
    _EARLY.append(signum)


_BEFORE = {sig: signal.signal(sig, _record) for sig in (signal.SIGINT, signal.SIGTERM)}


def _version_only() -> int:
    """``bracegrid --version`` before the libraries load (the text argparse prints; exit codes as main's)."""
    try:
        sys.stdout.write(f"bracegrid {__version__}\n")
        sys.stdout.flush()
    except BrokenPipeError:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    except (AttributeError, OSError):  # stdout closed or failing
        return 74
    return 0


if sys.argv[1:] == ["--version"]:
    sys.exit(_version_only())

from bracegrid.cli import main  # noqa: E402  (after the handlers above, on purpose)


def run() -> None:
    """Run the command line and exit with its code (``main`` has already written and flushed everything)."""
    sys.exit(main(signalled=lambda: bool(_EARLY)))


if __name__ == "__main__":
    run()
