"""The console script: start the command line, and stop quietly (exit code 130) when
interrupted while it is still loading, before its own handling of Ctrl-C is in place."""

from __future__ import annotations

import os
import signal
import sys

__all__ = ["main"]


def _interrupted(signum, frame) -> None:  # pragma: no cover - runs in a subprocess in the tests
    sys.stderr.write("hasten: interrupted\n")
    sys.stderr.flush()
    os._exit(130)  # nothing has been written yet: no file to finish or remove


# in place from the moment this module is loaded until the command line has loaded
signal.signal(signal.SIGINT, _interrupted)


def main() -> None:  # pragma: no cover - exercised through a subprocess in the tests
    from .cli import main as run

    signal.signal(signal.SIGINT, signal.default_int_handler)  # the commands handle Ctrl-C
    run()
