"""``python -m bracegrid`` and the ``bracegrid`` script: the only place that exits.

Ctrl-C or SIGTERM while the libraries are still being imported is only recorded (a library's
``try: import ... except:`` could otherwise swallow the KeyboardInterrupt and the run would go on);
:func:`bracegrid.cli.main` then stops at once with "interrupted" and exit 130.
"""

import signal
import sys
from types import FrameType

_EARLY: list[int] = []


def _record(signum: int, frame: FrameType | None) -> None:
    _EARLY.append(signum)


_BEFORE = {sig: signal.signal(sig, _record) for sig in (signal.SIGINT, signal.SIGTERM)}

from bracegrid.cli import main  # noqa: E402  (after the handlers above, on purpose)


def run() -> None:
    """Run the command line and exit with its code (``main`` has already written and flushed everything)."""
    sys.exit(main(signalled=lambda: bool(_EARLY)))


if __name__ == "__main__":
    run()
